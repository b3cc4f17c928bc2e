"""The files of a worm pair: the wheel's mid-plane drawing (DXF, SVG), the worm's and the wheel's solids
(STEP, STL) and the pair assembled at the centre distance (STEP).

The drawing goes through the writers' neutral form (:class:`gearcad.export.neutral.CutDrawing`); the
solids through :mod:`gearcad.export.step_worm` and :mod:`gearcad.export.step_worm_wheel` (the kernel,
loaded only when solids are asked for).  A wheel approximated by a helical gear
(:mod:`gearcad.meshes.worm_helical`) is swept along its helix by :func:`gearcad.export.step_helical.helical_solid`
and moved so its mid-face is the mid-plane.
Geometry comes from :mod:`gearcad.geometry.worm_wheel`.  Lengths in mm.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

import numpy as np

__all__ = ["midplane_drawing", "write_worm_files", "WHEEL_STL_ANGLE"]

WHEEL_STL_ANGLE = 20.0  # degrees between the wheel's STL facets (the linear tolerance stays 0.01 mm)


def midplane_drawing(form: Any, *, throated: bool = True, helical: Any = None) -> Any:
    """The wheel's mid-plane section as a cut drawing (straight segments, mm), with a label: the generated
    wheel's, or with ``helical`` (a :class:`gearcad.meshes.worm_helical.HelicalWheel`) the helical wheel's."""
    from ..geometry.worm_wheel import wheel_slice
    from .neutral import CutDrawing, Label, polyline_contour

    if helical is not None:
        from ..geometry.generate import DEFAULT_TOLERANCE
        from ..meshes.worm_helical import helical_wheel_part

        points = helical_wheel_part(helical, DEFAULT_TOLERANCE).outer.points()
    else:
        section = wheel_slice(form, 0.0, throated=throated)
        points = np.asarray(section.exterior.coords)[:-1]
    label = Label(f"worm wheel z{form.wheel_teeth} m{form.module:g} mid-plane", 0.0, 0.0,
                  max(form.module, form.wheel_reference_radius / 12))
    return CutDrawing(outer=(polyline_contour(points),), labels=(label,))


def write_worm_files(form: Any, folder: str | os.PathLike[str], *, solids: bool = False, throated: bool = True,
                     stem: str = "worm", slices: int | None = None, helical: Any = None) -> list[Path]:
    """Write the mid-plane DXF and SVG of the wheel and, with ``solids``, the worm and the wheel as STEP and
    STL and the two in mesh as an assembly STEP (``<stem>-pair.step``: the wheel about z at the origin, the
    worm's axis along x at the centre distance).

    The solids are all built before any file is written, so a solid the kernel refuses leaves no file.
    ``slices`` is the least count of the wheel's slices across its face width (default
    :data:`gearcad.geometry.worm_wheel_sections.SLICES`).  ``helical`` (a
    :class:`gearcad.meshes.worm_helical.HelicalWheel`) replaces the generated wheel by that helical gear
    (``throated`` is then not used).
    Returns the paths written.  Every file is written under a temporary name and renamed into place.
    """
    from ..errors import ExportError
    from .dxf import write_dxf
    from .svg import write_svg

    drawing = midplane_drawing(form, throated=throated, helical=helical)
    built = _build_solids(form, throated, slices, helical) if solids else None
    out = Path(folder)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise ExportError(f"cannot create folder {out}: {exc.strerror}") from None
    written = []
    write_dxf(drawing, out / f"{stem}-wheel-midplane.dxf")
    written.append(out / f"{stem}-wheel-midplane.dxf")
    written.append(write_svg(drawing, out / f"{stem}-wheel-midplane.svg"))
    if built is not None:
        from .step import AssemblyItem, assembly_step, write_step, write_stl
        from .step_worm_wheel import placed_worm

        worm, wheel = built
        written.append(write_step(worm, out / f"{stem}-worm.step", names=[f"{stem}-worm"]))
        written.append(write_stl(worm, out / f"{stem}-worm.stl"))
        written.append(write_step(wheel, out / f"{stem}-wheel.step", names=[f"{stem}-wheel"]))
        # 0.01 mm from the surface as for every part, but 20 degrees between facets: the lofted flanks carry
        # many knots, and the mesher's 5 degrees made the wheel's file six times larger (73 MB for z2 30, m 3)
        written.append(write_stl(wheel, out / f"{stem}-wheel.stl", angular_tolerance=WHEEL_STL_ANGLE))
        pair = [AssemblyItem(f"{stem}-wheel", wheel), AssemblyItem(f"{stem}-worm", placed_worm(worm, form))]
        written.append(assembly_step(pair, out / f"{stem}-pair.step", name=f"{stem}-pair"))
    return written


def _build_solids(form: Any, throated: bool, slices: int, helical: Any = None) -> tuple[Any, Any]:
    """The worm and the wheel as solids (the wheel from its generated slices, or the helical gear)."""
    from ..geometry.worm_wheel import transverse_flank
    from ..geometry.worm_wheel_sections import sections_volume, tooth_sections
    from .step_worm import worm_solid
    from .step_worm_wheel import wheel_solid

    worm = worm_solid(form, transverse_flank(form))
    if helical is not None:
        from .step_worm_wheel import helical_wheel_solid

        return worm, helical_wheel_solid(helical)
    spans = tooth_sections(form, throated=throated) if slices is None else tooth_sections(form, throated=throated,
                                                                                          count=slices)
    return worm, wheel_solid(form, spans, sections_volume(spans))
