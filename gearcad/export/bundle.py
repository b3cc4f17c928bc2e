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

from ..errors import InputError
from .jsonable import jsonable
from .atomic import atomic_write
from .staging import MARKER, check_folder, owned_files, staged_folder

__all__ = ["BuildOptions", "write_plan", "prepare_folder", "parts_csv", "MARKER", "FORMATS"]

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
    laminations: int = 0  # helical gears: also write this many turned laminations per gear (DXF, SVG)
    sheets: bool = True  # nested cut sheets (DXF/SVG as the formats ask)
    sheet_size: tuple[float, float] | None = None  # mm; None: the fabrication profile's sheet


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
    from .cutting import part_drawing, plate_scene
    from .report import report_data, report_markdown
    from .sheets import flat_parts, plan_sheets, sheet_drawing, sheet_name, sheets_summary
    from .dxf import DXF_VERSIONS, write_dxf
    from .svg import write_svg

    if options.dxf_mode == "splines" and "dxf" in options.formats and not DXF_VERSIONS[options.dxf_version].splines:
        raise InputError(f"--dxf-mode splines needs DXF R2000 or later; {options.dxf_version} has no SPLINE entity")
    cut_files = {"dxf", "svg"} & set(options.formats)
    groups = plan_sheets(plan, options.sheet_size) if options.sheets and cut_files else ()

    warnings: list[str] = []
    parts = {fp.name: fp for fp in flat_parts(plan)}
    if options.laminations:
        for g in plan.gears:
            if not hasattr(g.gear, "hand"):
                continue
            for lam in _laminations(plan, g, options.laminations):
                if "dxf" in options.formats:
                    note(f"DXF {lam.name}")
                    warnings += write_dxf(part_drawing(lam, options.dxf_mode, options.dxf_tolerance),
                                          put(lam.name, "dxf", f"{lam.name}.dxf"), version=options.dxf_version,
                                          layers=_layers(options))
                if "svg" in options.formats:  # SVG always takes arcs
                    write_svg(part_drawing(lam, "arcs", options.dxf_tolerance), put(lam.name, "svg", f"{lam.name}.svg"))
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
    worm_items: list = []
    if getattr(plan, "worm", None) is not None:  # a worm stage: the blocks' drawings, the worm's and blocks' solids
        from .worm_stage_files import write_worm_stage

        more, worm_items = write_worm_stage(plan, options, put, note)
        warnings += more
    if "step" in options.formats or "stl" in options.formats:
        _write_solids(plan, options, put, note, worm_items)
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
    if data.get("parts"):
        text = parts_csv(data["parts"])
        atomic_write(put("parts", "csv", "parts.csv"), lambda tmp: tmp.write_text(text, encoding="utf-8"))
    atomic_write(put("report", "json", "report.json"),
                 lambda tmp: tmp.write_text(json.dumps(jsonable(data), indent=2, ensure_ascii=False) + "\n", encoding="utf-8"))
    atomic_write(put("report", "md", "report.md"), lambda tmp: tmp.write_text(report_markdown(data), encoding="utf-8"))


def parts_csv(parts: list[dict]) -> str:
    """The parts list as CSV (RFC 4180 quoting; lengths in mm)."""
    import csv
    import io

    from ..trains.parts import PARTS_COLUMNS

    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(PARTS_COLUMNS)
    for p in parts:
        writer.writerow(["" if p.get(c) is None else (" ".join(p[c]) if isinstance(p.get(c), list) else p[c])
                         for c in PARTS_COLUMNS])
    return out.getvalue()


def _layers(options: BuildOptions) -> dict[str, tuple[str, int]] | None:
    return {role: (name, colour) for role, name, colour in options.dxf_layers} or None


def _laminations(plan, g, count: int):
    """The cut laminations of helical gear ``g`` (see gearcad.meshes.helical.lamination_parts)."""
    from ..meshes.helical import lamination_parts

    herringbone, gap = _helix_style(plan, g)
    thickness = plan.spec.thickness
    return lamination_parts(g.cut_part, count, thickness, g.gear.twist(thickness), herringbone, gap,
                            turn_holes=_is_ring(g))


def _is_ring(g) -> bool:
    """Whether a planned gear is a ring (internal teeth; helical rings included): its holes twist with it."""
    from ..geometry.ring import RingGear

    return isinstance(g.gear, RingGear)


def _helix_style(plan, g) -> tuple[bool, float]:
    """Herringbone or not, and the gap (mm), of a helical gear: its stage's, or the planetary set's."""
    style = plan.spec.planetary if plan.spec.planetary is not None else plan.spec.stages[g.stage - 1]
    return style.herringbone, style.gap


def _gear_build(plan, g, thickness: float):
    """A gear's solid: straight, or swept along its helix (the drawn part is the section at mid-face)."""
    from .step import build_solid, helical_solid

    if not hasattr(g.gear, "hand"):
        return build_solid(g.part, thickness, plan.tolerance)
    herringbone, gap = _helix_style(plan, g)
    return helical_solid(g.part, thickness, g.gear.twist(thickness), plan.tolerance, herringbone=herringbone,
                         gap=gap, gap_diameter=g.gear.root_diameter, twist_holes=_is_ring(g))


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


def _write_solids(plan, options: BuildOptions, put, note, extra_items=()) -> None:
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
            if hasattr(g.gear, "hand"):  # a helical gear's solid also depends on its hand, helix and halves
                key += repr((g.gear.hand, g.gear.helix_angle, _helix_style(plan, g)))
            solid = built_by_key.get(key)
            if solid is None:
                note(f"solid {g.name}")
                built = _gear_build(plan, g, thickness)
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
        fused = _fused_compounds(plan, options, put, note, items)
        joined = {name for j in (plan.mechanism.joins if plan.mechanism else ()) if j.hub is not None for name in j.gears}
        items = [it for it in items if it.name not in joined] + fused  # a fused pair is one solid in the assembly
        items += _rod_items(plan) + list(extra_items)
        if options.assembly and "step" in options.formats:
            from .step import assembly_step

            note("assembly")
            assembly_step(items, put("assembly", "step", "assembly.step"), name=plan.spec.name)


def _rod_items(plan) -> list:
    """Every bought round part of the mechanism as a placed solid (one solid per size, reused)."""
    from .step import AssemblyItem, tube_solid

    mech = plan.mechanism
    if mech is None:
        return []
    made: dict[tuple[float, float, float], object] = {}
    taken = {g.name for g in plan.gears} | {p.name for p in plan.plates}
    items = []
    for r in mech.rods:
        key = (round(r.diameter, 6), round(r.bore, 6), round(r.length, 6))
        if key not in made:
            made[key] = tube_solid(r.diameter, r.bore, r.length)
        # a planet's pin shares its planet's name: the assembly names it by its kind as well
        name = r.name if r.name not in taken else f"{r.name}-{r.kind}"
        items.append(AssemblyItem(name, made[key], r.x, r.y, r.z0, 0.0))
    return items


def _fused_compounds(plan, options: BuildOptions, put, note, items) -> list:
    """FDM: the gears of each compound shaft fused into one part with a hub across the layer gap (STEP and STL);
    the fused parts as assembly items, placed on their shafts."""
    from .step import AssemblyItem, fuse_placed, write_step, write_stl

    mech = plan.mechanism
    out: list = []
    for j in (mech.joins if mech else ()):
        if j.hub is None or not j.file:
            continue
        note(f"solid {j.file}")
        members = [it for it in items if it.name in j.gears]
        shaft = plan.shafts[plan.gear(j.gears[0]).shaft]
        low = min(it.z for it in members)
        diameter, hole, z0, z1 = j.hub
        solid = fuse_placed(members, shaft.x, shaft.y, z0, z1 - z0, diameter, hole, plan.tolerance)
        if "step" in options.formats:
            write_step(solid, put(j.file, "step", f"{j.file}.step"), names=[j.file])
        if "stl" in options.formats:
            write_stl(solid, put(j.file, "stl", f"{j.file}.stl"), options.stl_tolerance, options.stl_angle)
        out.append(AssemblyItem(j.file, solid, shaft.x, shaft.y, low, 0.0))
    return out
