"""The files of a worm pair: the wheel's mid-plane drawing (DXF, SVG) and the worm's solid (STEP, STL).

The drawing goes through the writers' neutral form (:class:`gearcad.export.neutral.CutDrawing`); the
solids through :mod:`gearcad.export.step_worm` (the kernel, loaded only when solids are asked for).
Geometry comes from :mod:`gearcad.geometry.worm_wheel`.  Lengths in mm.
"""

from __future__ import annotations

import dataclasses
import os
from pathlib import Path
from typing import Any

import numpy as np

__all__ = ["midplane_drawing", "write_worm_files"]

def midplane_drawing(form: Any, *, throated: bool = True) -> Any:
    """The wheel's mid-plane section as a cut drawing (straight segments, mm), with a label."""
    from ..geometry.worm_wheel import wheel_slice
    from .neutral import CutDrawing, Label, polyline_contour

    section = wheel_slice(form, 0.0, throated=throated)
    points = np.asarray(section.exterior.coords)[:-1]
    label = Label(f"worm wheel z{form.wheel_teeth} m{form.module:g} mid-plane", 0.0, 0.0,
                  max(form.module, form.wheel_reference_radius / 12))
    return CutDrawing(outer=(polyline_contour(points),), labels=(label,))


def write_worm_files(form: Any, folder: str | os.PathLike[str], *, solids: bool = False, throated: bool = True,
                     stem: str = "worm") -> list[Path]:
    """Write the mid-plane DXF and SVG of the wheel and, with ``solids``, the worm as STEP and STL.

    Returns the paths written.  Every file is written under a temporary name and renamed into place.
    """
    from ..errors import ExportError
    from .dxf import write_dxf
    from .svg import write_svg

    out = Path(folder)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise ExportError(f"cannot create folder {out}: {exc.strerror}") from None
    drawing = midplane_drawing(form, throated=throated)
    written = []
    write_dxf(drawing, out / f"{stem}-wheel-midplane.dxf")
    written.append(out / f"{stem}-wheel-midplane.dxf")
    written.append(write_svg(drawing, out / f"{stem}-wheel-midplane.svg"))
    if solids:
        from ..geometry.worm_wheel import axial_section
        from .step import write_step, write_stl
        from .step_worm import worm_solid

        worm = worm_solid(form, axial_section(form, 64, form.root_radius - 0.3 * form.module))
        written.append(write_step(worm, out / f"{stem}-worm.step", names=[f"{stem}-worm"]))
        written.append(write_stl(worm, out / f"{stem}-worm.stl"))
    return written
