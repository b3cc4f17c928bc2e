"""Write every file of a plan into an output folder, built whole in a staging folder first.

The folder is gearcad's when it holds the marker file ``.gearcad-output`` (which
lists the files of the last build, so a rebuild removes what it no longer makes);
a non-empty folder without it is refused unless ``force``.  Every file is
written into a hidden sibling folder that replaces the output folder only when
the last file is written (:mod:`gearcad.export.staging`): a failure or an
interrupt leaves the previous folder as it was, and two builds of one folder
at the same time are kept apart by a lock (the later one is refused).
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from ..jsonable import jsonable
from .atomic import atomic_write
from .staging import MARKER, check_folder, owned_files, staged_folder

__all__ = ["BuildOptions", "write_plan", "prepare_folder", "MARKER", "FORMATS"]

FORMATS = ("dxf", "svg", "step", "stl")


@dataclass(frozen=True)
class BuildOptions:
    """What to write and how (mm, degrees)."""

    formats: tuple[str, ...] = FORMATS
    dxf_mode: str = "arcs"
    dxf_version: str = "R2010"
    dxf_tolerance: float = 1e-3
    stl_tolerance: float = 0.02
    stl_angle: float = 15.0
    assembly: bool = True
    preview: bool = True
    extra_files: tuple[tuple[str, str], ...] = field(default=())  # (name, text) written as they are
    dxf_layers: tuple[tuple[str, str, int], ...] = ()  # (role, layer name, colour) remappings


def prepare_folder(folder: Path, force: bool) -> list[str]:
    """Check that ``folder`` may be written (nothing is created); the files the last build listed.

    Raises
    ------
    ExportError
        The folder is a file, or a non-empty folder gearcad did not make (without ``force``).
    """
    folder = Path(folder)
    check_folder(folder, force)
    return owned_files(folder) if (folder / MARKER).exists() else []


def _label_height(plan, gear) -> tuple[tuple[float, float], float]:
    if gear.label_at is not None:
        return gear.label_at, 2.0
    root = gear.gear.root_diameter / 2
    hole = gear.bore / 2
    rim = max(root - hole, 0.5)
    height = min(2.5, 0.3 * rim, 2.6 * root / max(len(gear.part.label), 1))
    return (0.0, -(hole + root) / 2), max(height, 0.3)


def write_plan(plan, folder: str | Path, options: BuildOptions = BuildOptions(), force: bool = False,
               progress: Callable[[str], None] | None = None) -> dict[str, dict[str, str]]:
    """Write the plan's files; returns ``{part: {kind: relative path}}`` (also the report's ``files``).

    Every file goes into a staging folder that replaces ``folder`` whole at the end
    (see :func:`gearcad.export.staging.staged_folder`); on any error ``folder`` is
    left as it was.
    """
    note = progress or (lambda _msg: None)
    with staged_folder(folder, force) as stage:
        files: dict[str, dict[str, str]] = {}

        def put(part: str, kind: str, name: str) -> Path:
            files.setdefault(part, {})[kind] = name
            return stage.file(name)

        _write_all(plan, options, put, files, note)
    return files


def _write_all(plan, options: BuildOptions, put, files: dict[str, dict[str, str]], note) -> None:
    """Write every file of ``plan`` to the paths ``put(part, kind, name)`` gives (which lists them in ``files``)."""
    from ..drawings import part_drawing, plate_scene
    from ..report import report_data, report_markdown
    from .dxf import write_dxf
    from .svg import write_svg

    warnings: list[str] = []
    for g in plan.gears:
        at, height = _label_height(plan, g)
        drawing = part_drawing(g.cut_part, options.dxf_mode, options.dxf_tolerance, at, height)
        if "dxf" in options.formats:
            note(f"DXF {g.name}")
            warnings += write_dxf(drawing, put(g.name, "dxf", f"{g.name}.dxf"), version=options.dxf_version,
                                  layers=_layers(options))
        if "svg" in options.formats:
            if options.dxf_mode == "splines":  # SVG takes arcs, not spline fit points
                drawing = part_drawing(g.cut_part, "arcs", options.dxf_tolerance, at, height)
            write_svg(drawing, put(g.name, "svg", f"{g.name}.svg"))
    margin = plan.fabrication.plate_margin
    for p in plan.plates:
        drawing = part_drawing(p.cut_part, options.dxf_mode, options.dxf_tolerance, (plan.layout.width / 2, margin / 2),
                               min(3.0, margin / 3))
        if "dxf" in options.formats:
            note(f"DXF {p.name}")
            warnings += write_dxf(drawing, put(p.name, "dxf", f"{p.name}.dxf"), version=options.dxf_version,
                                  layers=_layers(options))
        if "svg" in options.formats:
            if options.dxf_mode == "splines":  # SVG takes arcs, not spline fit points
                drawing = part_drawing(p.cut_part, "arcs", options.dxf_tolerance, (plan.layout.width / 2, margin / 2),
                                       min(3.0, margin / 3))
            write_svg(drawing, put(p.name, "svg", f"{p.name}.svg"))
    if "step" in options.formats or "stl" in options.formats:
        _write_solids(plan, options, put, note)
    if options.preview:
        from .preview import write_preview

        note("preview")
        write_preview(plate_scene(plan), put("preview", "png", "preview.png"))
    for name, text in options.extra_files:
        atomic_write(put(name, "toml", name), lambda tmp, text=text: tmp.write_text(text, encoding="utf-8"))
    data = report_data(plan, files)
    data["warnings"] = sorted(set(warnings))
    atomic_write(put("report", "json", "report.json"),
                 lambda tmp: tmp.write_text(json.dumps(jsonable(data), indent=2, ensure_ascii=False) + "\n", encoding="utf-8"))
    atomic_write(put("report", "md", "report.md"), lambda tmp: tmp.write_text(report_markdown(data), encoding="utf-8"))


def _layers(options: BuildOptions) -> dict[str, tuple[str, int]] | None:
    return {role: (name, colour) for role, name, colour in options.dxf_layers} or None


def _shape_key(part, hub=None, hub_length: float = 0.0) -> str:
    """A digest of a flat part's loops and round holes (and its hub): equal keys, equal solids."""
    import hashlib

    import numpy as np

    digest = hashlib.sha256()
    for piece in (part, hub):
        if piece is None:
            continue
        for loop in (piece.outer, *piece.holes):
            digest.update(np.ascontiguousarray(loop.points(), dtype=float).tobytes())
        digest.update(repr(tuple(piece.circles)).encode())
    digest.update(repr(hub_length).encode())
    return digest.hexdigest()


def _write_solids(plan, options: BuildOptions, put, note) -> None:
    """Per-part STEP and STL files and the assembly; a solid repeated in the plan (the planets of a set)
    is built once and written once in the assembly, placed once per part."""
    from .step import AssemblyItem, build_solid, kernel_quiet, with_hub, write_step, write_stl

    thickness = plan.spec.thickness
    items = []
    built_by_key: dict[str, object] = {}
    part_of_key: dict[str, str] = {}
    with kernel_quiet():
        for g in plan.gears:
            key = _shape_key(g.part, g.hub, g.hub_length)
            solid = built_by_key.get(key)
            if solid is None:
                note(f"solid {g.name}")
                built = build_solid(g.part, thickness, plan.tolerance)
                if g.hub is not None:
                    built = with_hub(built, g.hub, thickness, g.hub_length, plan.tolerance)
                solid = built_by_key[key] = built.solid
                part_of_key[key] = g.name
            if "step" in options.formats:
                write_step(solid, put(g.name, "step", f"{g.name}.step"), names=[g.name])
            if "stl" in options.formats:
                write_stl(solid, put(g.name, "stl", f"{g.name}.stl"), options.stl_tolerance, options.stl_angle)
            shaft = plan.shafts[g.shaft]
            items.append(AssemblyItem(g.name, solid, shaft.x, shaft.y, g.z, math.degrees(g.rotation), part_of_key[key]))
        for p in plan.plates:
            note(f"solid {p.name}")
            solid = build_solid(p.part, thickness, plan.tolerance).solid
            if "step" in options.formats:
                write_step(solid, put(p.name, "step", f"{p.name}.step"), names=[p.name])
            items.append(AssemblyItem(p.name, solid, 0.0, 0.0, p.z, 0.0))
        if options.assembly and "step" in options.formats:
            from .step import assembly_step

            note("assembly")
            assembly_step(items, put("assembly", "step", "assembly.step"), name=plan.spec.name)
