"""Write every file of a plan into an output folder, each under a temporary name first.

The folder is gearcad's when it holds the marker file ``.gearcad-output`` (which
lists the files of the last build, so a rebuild removes what it no longer makes);
a non-empty folder without it is refused unless ``force``.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from ..errors import ExportError, InputError
from ..jsonable import jsonable
from .atomic import atomic_write

__all__ = ["BuildOptions", "write_plan", "prepare_folder", "MARKER", "FORMATS"]

MARKER = ".gearcad-output"
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
    sheets: bool = True  # nested cut sheets (DXF/SVG as the formats ask)
    sheet_size: tuple[float, float] | None = None  # mm; None: the fabrication profile's sheet


def prepare_folder(folder: Path, force: bool) -> list[str]:
    """Make ``folder`` ready; return the files the last build listed (to remove if not rewritten)."""
    if folder.exists() and not folder.is_dir():
        raise ExportError(f"output folder {str(folder)!r} is a file; choose a folder with --out")
    marker = folder / MARKER
    if folder.is_dir() and any(folder.iterdir()) and not marker.exists() and not force:
        raise ExportError(f"output folder {str(folder)!r} is not empty and was not made by gearcad; "
                          "choose another with --out or pass --force")
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise ExportError(f"cannot create output folder {str(folder)!r}: {exc.strerror or exc}") from None
    if marker.exists():
        try:
            return [line for line in marker.read_text(encoding="utf-8").splitlines() if line and "/" not in line]
        except OSError:
            return []
    # Claim the folder before the first file, so that a build cut short can be rebuilt in place.
    atomic_write(marker, lambda tmp: tmp.write_text("", encoding="utf-8"))
    return []


def write_plan(plan, folder: str | Path, options: BuildOptions = BuildOptions(), force: bool = False,
               progress: Callable[[str], None] | None = None) -> dict[str, dict[str, str]]:
    """Write the plan's files; returns ``{part: {kind: relative path}}`` (also the report's ``files``)."""
    from ..drawings import part_drawing, plate_scene
    from ..report import report_data, report_markdown
    from ..sheets import plan_sheets, sheet_drawing, sheet_name, sheets_summary, flat_parts
    from .dxf import DXF_VERSIONS, write_dxf
    from .svg import write_svg

    if options.dxf_mode == "splines" and "dxf" in options.formats and not DXF_VERSIONS[options.dxf_version].splines:
        raise InputError(f"--dxf-mode splines needs DXF R2000 or later; {options.dxf_version} has no SPLINE entity")
    cut_files = {"dxf", "svg"} & set(options.formats)
    groups = plan_sheets(plan, options.sheet_size) if options.sheets and cut_files else ()
    folder = Path(folder)
    old = prepare_folder(folder, force)
    note = progress or (lambda _msg: None)
    files: dict[str, dict[str, str]] = {}
    written: list[str] = []

    def put(part: str, kind: str, name: str) -> Path:
        files.setdefault(part, {})[kind] = name
        written.append(name)
        return folder / name

    warnings: list[str] = []
    parts = {fp.name: fp for fp in flat_parts(plan)}
    arcs: dict[str, object] = {}  # SVG always takes arcs, whatever the DXF mode
    dxf_drawings: dict[str, object] = {}
    for fp in parts.values():
        if "svg" in options.formats or options.dxf_mode == "arcs":
            arcs[fp.name] = part_drawing(fp.part, "arcs", options.dxf_tolerance, fp.label_at, fp.label_height)
        dxf_drawings[fp.name] = arcs[fp.name] if options.dxf_mode == "arcs" else part_drawing(
            fp.part, options.dxf_mode, options.dxf_tolerance, fp.label_at, fp.label_height)
        if "dxf" in options.formats:
            note(f"DXF {fp.name}")
            warnings += write_dxf(dxf_drawings[fp.name], put(fp.name, "dxf", f"{fp.name}.dxf"),
                                  version=options.dxf_version, layers=_layers(options))
        if "svg" in options.formats:
            write_svg(arcs[fp.name], put(fp.name, "svg", f"{fp.name}.svg"))
    for group in groups:
        for k, sheet in enumerate(group.nesting.sheets, start=1):
            stem = sheet_name(group, k)
            note(f"sheet {stem}")
            if "dxf" in options.formats:
                drawing = sheet_drawing(sheet, parts, options.dxf_mode, options.dxf_tolerance, dxf_drawings)
                warnings += write_dxf(drawing, put(stem, "dxf", f"{stem}.dxf"), version=options.dxf_version,
                                      layers=_layers(options))
            if "svg" in options.formats:
                write_svg(sheet_drawing(sheet, parts, "arcs", options.dxf_tolerance, arcs), put(stem, "svg", f"{stem}.svg"),
                          page=(0.0, 0.0, sheet.width, sheet.height))
        warnings += [f"part {name} is larger than the fabrication profile's {group.width:g} x {group.height:g} mm "
                     "sheet and is on no cut sheet (give a larger one with --sheet WxH)"
                     for name in group.nesting.left_out]
    if "step" in options.formats or "stl" in options.formats:
        _write_solids(plan, folder, options, put, note)
    if options.preview:
        from .preview import write_preview

        note("preview")
        write_preview(plate_scene(plan), put("preview", "png", "preview.png"))
    for name, text in options.extra_files:
        atomic_write(put(name, "toml", name), lambda tmp, text=text: tmp.write_text(text, encoding="utf-8"))
    data = report_data(plan, files)
    data["warnings"] = sorted(set(warnings))
    if groups:
        data["sheets"] = sheets_summary(groups)
    atomic_write(put("report", "json", "report.json"),
                 lambda tmp: tmp.write_text(json.dumps(jsonable(data), indent=2, ensure_ascii=False) + "\n", encoding="utf-8"))
    atomic_write(put("report", "md", "report.md"), lambda tmp: tmp.write_text(report_markdown(data), encoding="utf-8"))
    for stale in set(old) - set(written):
        (folder / stale).unlink(missing_ok=True)
    atomic_write(folder / MARKER, lambda tmp: tmp.write_text("\n".join(sorted(written)) + "\n", encoding="utf-8"))
    return files


def _layers(options: BuildOptions) -> dict[str, tuple[str, int]] | None:
    return {role: (name, colour) for role, name, colour in options.dxf_layers} or None


def _write_solids(plan, folder: Path, options: BuildOptions, put, note) -> None:
    from .step import AssemblyItem, build_solid, kernel_quiet, with_hub, write_step, write_stl

    thickness = plan.spec.thickness
    items = []
    with kernel_quiet():
        for g in plan.gears:
            note(f"solid {g.name}")
            built = build_solid(g.part, thickness, plan.tolerance)
            if g.hub is not None:
                built = with_hub(built, g.hub, thickness, g.hub_length, plan.tolerance)
            solid = built.solid
            if "step" in options.formats:
                write_step(solid, put(g.name, "step", f"{g.name}.step"), names=[g.name])
            if "stl" in options.formats:
                write_stl(solid, put(g.name, "stl", f"{g.name}.stl"), options.stl_tolerance, options.stl_angle)
            shaft = plan.shafts[g.shaft]
            items.append(AssemblyItem(g.name, solid, shaft.x, shaft.y, g.z, math.degrees(g.rotation)))
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
