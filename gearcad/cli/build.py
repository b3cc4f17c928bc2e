"""``gearcad build``: every file of a train described in a train file."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ._format import print_json
from ._load import add_load_options, load_from_args

__all__ = ["add_parser", "run", "add_output_options", "build_and_write", "failed_checks", "summary", "parse_sheet"]

DESCRIPTION = """\
Build a train from its train file (TOML; see README): the checks of every mesh, the
shaft layout and plates, and the files: DXF and SVG outlines (kerf applied for laser
cutting), nested cut sheets per material and thickness, STEP and STL solids, an
assembly, report.md, report.json and preview.png.
Every option and table is checked before the first file; the files are written into a
staging folder beside the output folder and put in place whole at the end.
Exit 0: built, no check failed; 1: a check failed (a mesh, or a part the fabrication
process cannot make): reported, nothing written; 2: bad input, nothing written."""


def add_output_options(p: argparse.ArgumentParser) -> None:
    """Options shared by ``build``, ``design`` and ``demo``."""
    p.add_argument("--out", metavar="DIR", help="output folder (default: output/<train name>/)")
    p.add_argument("--force", action="store_true", help="write into a non-empty folder gearcad did not make")
    p.add_argument("--formats", default="dxf,svg,step,stl", metavar="LIST",
                   help="which files per part, from dxf,svg,step,stl (default: all)")
    p.add_argument("--dxf-mode", choices=("arcs", "segments", "splines"), default="arcs",
                   help="DXF contours as tangent arcs (default), straight segments, or cubic B-splines "
                        "(SPLINE with control points and knots; straight edges stay LINE; SVG keeps arcs)")
    p.add_argument("--dxf-version", choices=("R2010", "R2000", "R2013", "R2018", "R12"), default="R2010",
                   help="DXF version (default R2010; R12 for old controllers: no SPLINE, no unit variable of "
                        "its own, marked as millimetres in the ways R12 allows)")
    p.add_argument("--dxf-layers", default="", metavar="SPEC",
                   help="rename DXF layers for your cutter: role=NAME[:COLOUR],... with roles outer, inner, marking "
                        "(defaults CUT_OUTER:5, CUT_INNER:6, MARKING:3; colours are AutoCAD colour indices 1-255)")
    p.add_argument("--dxf-tolerance", type=float, default=0.001, metavar="MM",
                   help="largest distance between the DXF arcs and the true curves, mm (default 0.001)")
    p.add_argument("--stl-tolerance", type=float, default=0.02, metavar="MM",
                   help="STL chord tolerance, mm (absolute; default 0.02)")
    p.add_argument("--stl-angle", type=float, default=15.0, metavar="DEG",
                   help="STL angular tolerance, degrees (default 15; the chord tolerance governs accuracy)")
    p.add_argument("--no-assembly", action="store_true", help="skip the assembly STEP")
    p.add_argument("--laminations", type=int, default=0, metavar="N",
                   help="helical gears: also write N laminations per gear (DXF/SVG), each the section turned by its "
                        "share of the twist, to stack from sheets of face width / N (2 to 200)")
    p.add_argument("--sheet", metavar="WxH",
                   help="stock sheet for the nested cut sheets, width x height in mm, e.g. 600x400 "
                        "(default: the fabrication profile's sheet)")
    p.add_argument("--no-sheets", action="store_true", help="skip the nested cut sheets")
    p.add_argument("--json", action="store_true", help="print report.json's content on stdout instead of the summary")
    add_load_options(p)


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``build``."""
    p = subparsers.add_parser("build", help="all files of a train from its train file", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("train", metavar="TRAIN.toml", help="train file")
    add_output_options(p)
    return p


def _options(args: argparse.Namespace, extra_files=()):
    from ..errors import InputError
    from ..export.bundle import FORMATS, BuildOptions
    from ..validate import in_range

    formats = tuple(f.strip().lower() for f in args.formats.split(",") if f.strip())
    bad = [f for f in formats if f not in FORMATS]
    if bad or not formats:
        raise InputError(f"--formats must list some of {', '.join(FORMATS)}, got {args.formats!r}")
    return BuildOptions(formats=formats, dxf_mode=args.dxf_mode, dxf_version=args.dxf_version,
                        dxf_tolerance=in_range(args.dxf_tolerance, "--dxf-tolerance", 1e-5, 0.5, "mm"),
                        stl_tolerance=in_range(args.stl_tolerance, "--stl-tolerance", 1e-3, 1.0, "mm"),
                        stl_angle=in_range(args.stl_angle, "--stl-angle", 0.5, 45.0, "degrees"),
                        assembly=not args.no_assembly, extra_files=tuple(extra_files),
                        dxf_layers=_layer_spec(args.dxf_layers), laminations=_laminations(args),
                        sheets=not getattr(args, "no_sheets", False),
                        sheet_size=parse_sheet(getattr(args, "sheet", None)))


def _laminations(args: argparse.Namespace) -> int:
    from ..errors import InputError
    from ..meshes.helical import MAX_LAMINATIONS

    n = getattr(args, "laminations", 0)
    if n and not 2 <= n <= MAX_LAMINATIONS:
        raise InputError(f"--laminations must be from 2 to {MAX_LAMINATIONS}, got {n}")
    return n


def parse_sheet(text: str | None) -> tuple[float, float] | None:
    """``600x400`` -> (600.0, 400.0) mm; None stays None."""
    import math

    from ..errors import InputError
    from ..geometry.nest import MAX_SHEET_SIDE, MIN_SHEET_SIDE

    if text is None:
        return None
    width, sep, height = text.strip().lower().replace("×", "x").partition("x")
    try:
        size = (float(width), float(height)) if sep else None
    except ValueError:
        size = None
    if size is None or not all(math.isfinite(v) and MIN_SHEET_SIDE <= v <= MAX_SHEET_SIDE for v in size):
        raise InputError(f"--sheet must read WIDTHxHEIGHT in mm, each from {MIN_SHEET_SIDE:g} to "
                         f"{MAX_SHEET_SIDE:g} (e.g. 600x400), got {text!r}")
    return size


def _layer_spec(text: str) -> tuple[tuple[str, str, int], ...]:
    """``outer=CUT:5,marking=TEXT`` -> ((role, name, colour), ...); colours default to the role's."""
    from ..errors import InputError
    from ..export.dxf import DEFAULT_LAYERS, resolve_layers

    out = []
    for item in (part.strip() for part in text.split(",") if part.strip()):
        role, _, rest = item.partition("=")
        name, _, colour = rest.partition(":")
        if role not in DEFAULT_LAYERS or not name:
            raise InputError(f"--dxf-layers entry {item!r} must read role=NAME[:COLOUR] with role outer, inner or marking")
        try:
            number = int(colour) if colour else DEFAULT_LAYERS[role].colour
        except ValueError:
            raise InputError(f"--dxf-layers colour {colour!r} must be a whole number from 1 to 255") from None
        out.append((role, name, number))
    resolve_layers({r: (n, c) for r, n, c in out})  # the writer's own checks, before any file
    return tuple(out)


def _note(message: str) -> None:
    if sys.stderr.isatty():
        print(f"  writing {message} ...", file=sys.stderr, flush=True)


def build_and_write(spec, args: argparse.Namespace, extra_files=()) -> int:
    """Plan ``spec``, check it, write its files, print the summary (or JSON); the exit code.

    Every option and the output folder are checked before the plan; a plan with a
    failed check (a mesh, or a part the process cannot make) is reported and
    nothing is written (exit 1).
    """
    from ..export.bundle import prepare_folder, write_plan
    from ..trains.planner import plan_train
    from ..export.report import report_data

    options = _options(args, extra_files)
    folder = Path(args.out) if args.out else Path("output") / spec.name
    prepare_folder(folder, args.force)
    plan = plan_train(spec, tolerance=min(options.dxf_tolerance, 1e-3), load=load_from_args(args))
    failures = failed_checks(plan)
    if failures:
        report = report_data(plan, {})
        if args.json:
            print_json(report)
        else:
            print(summary(report, folder, {}, written=False))
        print(f"gearcad {args.command}: {len(failures)} check(s) failed; nothing was written", file=sys.stderr)
        return 1
    files = write_plan(plan, folder, options, force=args.force, progress=_note)
    import json

    report = json.loads((folder / "report.json").read_text(encoding="utf-8"))
    if args.json:
        print_json(report)
    else:
        print(summary(report, folder, files))
    for warning in report.get("warnings", []):
        print(f"gearcad: note: {warning}", file=sys.stderr)
    return 0


def failed_checks(plan) -> list:
    """The findings of ``plan`` whose severity is ``failure`` (meshes first, then the parts)."""
    found = [f for m in plan.meshes for f in m.analysis.findings + m.findings]
    return [f for f in found + list(plan.findings) if f.severity == "failure"]


def summary(report: dict, folder: Path, files: dict, written: bool = True) -> str:
    """A short account of what was built and where (or, ``written`` False, why nothing was)."""
    r = report["ratio"]
    lines = [f"{report['title'] or report['name']}: ratio {r['numerator']}/{r['denominator']} = {r['value']:.10g}"]
    if r["relative_error"] is not None:
        lines.append(f"  target {r['target']} = {r['target_value']:.10g}; relative error {r['relative_error']:+.3e}")
    if report.get("worm"):
        lines.append(f"  worm {report['worm']['starts']} start(s), the input (first stage), across the plates, centre distance "
                     f"{report['worm']['centre_distance']:.4f} mm; the wheel's sense follows the worm's hand, the spur "
                     f"stages turn the output the {'same way as' if r['direction'] == 'same' else 'opposite way to'} "
                     "the wheel")
    else:
        lines.append(f"  output turns the {r['direction']} way as the input" if r["direction"] == "same"
                     else "  output turns the opposite way to the input")
    for m in report["meshes"]:
        worst = max((f["severity"] for f in m["findings"]), key=("ok", "warning", "failure").index)
        lines.append(f"  mesh {m['gears'][0]} / {m['gears'][1]}: centre {m['centre_distance']:.4f} mm, "
                     f"contact ratio {m['contact_ratio']:.3f}, {worst}")
        if m.get("rating"):
            r = m["rating"]
            worst_bend = min(g["safety_factor"] for g in r["gears"])
            lines.append(f"    load: bending safety {worst_bend:.2f}, contact safety {r['contact_safety']:.2f} "
                         "(estimates for light duty)")
    for f in report["findings"]:
        if f["severity"] != "ok":
            lines.append(f"  {f['severity']}: {f['message']}")
    lay = report["layout"]
    count = sum(len(v) for v in files.values())
    if written:
        lines.append(f"  plate {lay['width']:.1f} x {lay['height']:.1f} mm; {count} files in {folder}/ (see report.md)")
    else:
        lines.append(f"  plate {lay['width']:.1f} x {lay['height']:.1f} mm; nothing written to {folder}/: "
                     "a check failed (see above)")
    lines.append("Caution: guard pinch points; strength figures are estimates for light duty; never laser-cut PVC or vinyl."
                 + (" See report.md." if written else ""))
    return "\n".join(lines)


def solved(spec):
    """``spec`` itself, or, when it has no stages but a [solve] table, the solved spec and its train file text."""
    if spec.stages or spec.planetary is not None:
        return spec, ()
    from ..trains.stages import solve_train_spec
    from ..trains.trainfile import train_to_toml

    spec, _ = solve_train_spec(spec)
    return spec, (("train.toml", train_to_toml(spec)),)


def run(args: argparse.Namespace) -> int:
    """Run ``build``."""
    from ..trains.trainfile import read_train

    spec, extra = solved(read_train(args.train))
    return build_and_write(spec, args, extra)
