"""``gearcad lathe``: the change gears of a lathe for a list of threads, checked on the swing frame."""

from __future__ import annotations

import argparse
import sys

from ._format import print_json, table

__all__ = ["add_parser", "run"]

DESCRIPTION = """\
For a lathe described by a machine file (MACHINE: a name from profiles/lathes, see
--machines, or the path of a .toml file) and a list of threads, the best train of
change gears from the machine's shelf for each thread, placed on the swing frame.

Train: stud gear > intermediate stud (driven gear / driver of a compound pair, or one
idler) > leadscrew gear.  Ratio = leadscrew turns per stud turn = stud/driven x
driver/leadscrew; pitch cut = ratio x leadscrew pitch x the fixed gearing from spindle
to stud.  Each train is placed on the frame: the two centre distances and the fixed
stud-to-leadscrew distance must form a triangle, the intermediate stud must land in the
slot (Slot: its distance from the leadscrew, mm), the frame within its swing (Angle:
degrees from the line leadscrew-to-stud), and no gear may hit another shaft's end.
Trains that do not fit are passed over for the best that does, and the notes say when
a better ratio needed a train that does not fit.  Error: relative, and in micrometres
over 25 mm of thread.

Thread list (--threads, --can-cut): items separated by commas: 1.5 or 1.5mm (pitch in
mm), 11tpi (threads per inch), 1mod (worm of module 1: pitch pi x 1 mm), 24dp (worm of
24 diametral pitch: pitch pi/24 inch), M10 (ISO 261 coarse size), or a series name
(see --series): iso-coarse, iso-fine, unc, unf, bsw, bsf, ba, bsp, module, dp.

--can-cut LIST lists only the threads the shelf cuts within --tolerance with a train
that fits, then the ones it does not.

Exit codes: 0 every thread cut within --tolerance by a train that fits; 1 some thread
is not (the table is printed, no file is written; with --build-missing, a thread that
an exact train with a missing gear cuts counts as cut); 2 bad input."""


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``lathe``."""
    p = subparsers.add_parser("lathe", help="change gears of a lathe for a table of threads", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("machine", nargs="?", metavar="MACHINE", help="machine name (see --machines) or machine file .toml")
    what = p.add_mutually_exclusive_group()
    what.add_argument("--threads", metavar="LIST", help="threads to cut: pitches, sizes and series names")
    what.add_argument("--can-cut", metavar="LIST", help="what the shelf can cut of these threads or series")
    p.add_argument("--tolerance", type=float, default=None, metavar="REL",
                   help="largest |relative error| of a thread (default 0.001, i.e. 25 um over 25 mm)")
    form = p.add_mutually_exclusive_group()
    form.add_argument("--markdown", action="store_true", help="print the table as Markdown")
    form.add_argument("--csv", action="store_true", help="print the table as CSV")
    form.add_argument("--json", action="store_true", help="print the table as JSON")
    p.add_argument("--sheet", metavar="FILE", help="write a printable A4 sheet to keep at the machine (.svg or .pdf)")
    p.add_argument("--build-missing", metavar="DIR",
                   help="build the files of every gear the table needs but the shelf lacks (one folder per gear)")
    p.add_argument("--formats", default="dxf,svg,step,stl", metavar="LIST",
                   help="files of each missing gear, from dxf,svg,step,stl (default: all)")
    p.add_argument("--force", action="store_true", help="write into a non-empty folder gearcad did not make")
    p.add_argument("--machines", action="store_true", help="list the shipped machine files and stop")
    p.add_argument("--series", action="store_true", help="list the thread series and stop")
    return p


def _listings(args: argparse.Namespace) -> int | None:
    if args.machines:
        from ..lathe.machine import load_machine, machine_names

        rows = [(n, load_machine(n).title) for n in machine_names()]
        print(table(rows, header=("machine", "title"), left=(0, 1)))
        return 0
    if args.series:
        from ..lathe.threads import SERIES

        rows = [(s.name, str(len(s.pitches())), s.title, s.source) for s in SERIES.values()]
        print(table(rows, header=("series", "pitches", "title", "source"), left=(0, 2, 3)))
        return 0
    return None


def _tolerance(value: float | None) -> float:
    from ..errors import InputError
    from ..lathe.table import APPROACH_LIMIT, DEFAULT_TOLERANCE

    if value is None:
        return DEFAULT_TOLERANCE
    if not (0 < value < APPROACH_LIMIT):
        raise InputError(f"--tolerance must be greater than 0 and less than {APPROACH_LIMIT:g} "
                         f"(a relative error), got {value!r}")
    return value


def _check_outputs(args: argparse.Namespace) -> None:
    """Refuse bad output options before any work."""
    from ..errors import InputError

    if args.sheet is not None:
        from ..export.threadsheet import SHEET_WRITERS
        from pathlib import Path

        if Path(args.sheet).suffix.lower() not in SHEET_WRITERS:
            raise InputError(f"--sheet file {args.sheet!r} must end in {' or '.join(SHEET_WRITERS)}")
        if not Path(args.sheet).resolve().parent.is_dir():
            raise InputError(f"--sheet file {args.sheet!r}: its folder does not exist")
    if args.build_missing is not None:
        from ..export.bundle import FORMATS

        formats = [f.strip().lower() for f in args.formats.split(",") if f.strip()]
        if not formats or any(f not in FORMATS for f in formats):
            raise InputError(f"--formats must list some of {', '.join(FORMATS)}, got {args.formats!r}")


def run(args: argparse.Namespace) -> int:
    """Run ``lathe``."""
    from ..errors import InputError

    listed = _listings(args)
    if listed is not None:
        return listed
    if args.machine is None:
        raise InputError("give a MACHINE (a name from --machines or a machine file .toml) and --threads LIST")
    if args.threads is None and args.can_cut is None:
        raise InputError("give --threads LIST or --can-cut LIST (pitches such as 1.5, 11tpi, 1mod, or a series "
                         "name; see --series)")
    from ..lathe.machine import load_machine
    from ..lathe.threads import parse_threads

    tolerance = _tolerance(args.tolerance)
    _check_outputs(args)
    machine = load_machine(args.machine)
    if args.can_cut is not None:
        from ..lathe.table import can_cut

        result, not_cut = can_cut(machine, parse_threads(args.can_cut), tolerance)
    else:
        from ..lathe.table import thread_table

        result, not_cut = thread_table(machine, parse_threads(args.threads), tolerance), ()
    _show(result, not_cut, args)
    short = [r for r in result.rows if not r.within_tolerance and not (args.build_missing and r.with_missing)]
    if short:
        names = ", ".join(r.pitch.name for r in short[:5]) + (" ..." if len(short) > 5 else "")
        print(f"gearcad lathe: {len(short)} thread(s) not cut within the tolerance {tolerance:g} by a train that "
              f"fits: {names}; no file written", file=sys.stderr)
        return 1
    return _write_files(result, args)


def _show(result, not_cut, args: argparse.Namespace) -> None:
    from ..lathe.report import csv_table, markdown_table, table_json

    if args.json:
        print_json(table_json(result, not_cut))
    elif args.csv:
        sys.stdout.write(csv_table(result))
    elif args.markdown:
        print(markdown_table(result))
        if not_cut:
            print("Not cut within the tolerance: " + "; ".join(p.name for p in not_cut))
    else:
        print(_text(result, not_cut))


def _text(result, not_cut) -> str:
    from ..lathe.report import CAUTION, TEXT_HEADER, hand_note, row_notes, text_rows

    m = result.machine
    lines = [f"{m.title}",
             f"  leadscrew {m.leadscrew.name}, spindle to stud {m.fixed_ratio.numerator}:{m.fixed_ratio.denominator}, "
             f"change gears module {m.module:g} mm, stud to leadscrew {m.stud_to_leadscrew:g} mm, "
             f"slot {m.slot[0]:g} to {m.slot[1]:g} mm; tolerance {result.tolerance:g}",
             f"  shelf: {m.shelf.describe()}",
             "  Intermediate: driven / driver of the pair on the intermediate stud, or the idler. Slot: intermediate "
             "stud from the leadscrew, mm. Angle: frame from the line leadscrew-to-stud, degrees.",
             "  " + hand_note(m),
             table(text_rows(result), header=TEXT_HEADER, left=(0, 3, 10))]
    notes = [(r.pitch.name, n) for r in result.rows for n in row_notes(r, verbose=False)]
    if notes:
        lines.append("Notes")
        lines += [f"  {name}: {note}" for name, note in notes]
    if not_cut:
        lines.append("Not cut within the tolerance by a train that fits: " + "; ".join(p.name for p in not_cut))
    lines.append(CAUTION)
    return "\n".join(lines)


def _write_files(result, args: argparse.Namespace) -> int:
    written: list[str] = []
    code = 0
    if args.build_missing is not None:  # first: its plans are the step that can still refuse
        code = _build_missing(result, args, written)
    if args.sheet is not None:
        from ..export.threadsheet import write_sheet
        from ..lathe.sheet import sheet_pages

        written += [str(p) for p in write_sheet(sheet_pages(result), args.sheet)]
    if written:
        print(f"gearcad lathe: wrote {', '.join(written)}", file=sys.stderr)
    return code


def _build_missing(result, args: argparse.Namespace, written: list[str]) -> int:
    from pathlib import Path

    from ..export.bundle import BuildOptions, write_plan
    from ..lathe.missing import missing_gear_spec, missing_gears
    from ..trains.planner import plan_train
    from ..trains.trainfile import train_to_toml

    gears = missing_gears(result)
    if not gears:
        print("gearcad lathe: no thread of the table needs a gear that is not on the shelf", file=sys.stderr)
        return 0
    formats = tuple(f.strip().lower() for f in args.formats.split(",") if f.strip())
    planned = []
    for gear in gears:  # every plan first: an error leaves no folder half made
        spec = missing_gear_spec(result.machine, gear)
        planned.append((gear, spec, plan_train(spec)))
    failed = False
    for gear, spec, plan in planned:
        options = BuildOptions(formats=formats, extra_files=(("train.toml", train_to_toml(spec)),))
        folder = Path(args.build_missing) / spec.name
        write_plan(plan, folder, options, force=args.force)
        written.append(f"{folder}/")
        failed |= any(f.severity == "failure" for m in plan.meshes for f in m.analysis.findings)
        print(f"gearcad lathe: gear {gear.teeth} (s1-driver, meshing {gear.mate}) for {', '.join(gear.threads)}: "
              f"files in {folder}/ (see report.md)", file=sys.stderr)
    return 1 if failed else 0
