"""``gearcad ratio``: the best tooth counts for a ratio, and proof that nothing beats them."""

from __future__ import annotations

import argparse
import sys
import time
from typing import Any, Sequence

from ._format import print_json, table
from ._solver import add_solver_options, exclusions

__all__ = ["add_parser", "run"]

CONVENTION = ("Ratio = output turns per input turn = the product over stages of driver teeth / driven teeth. "
              "Each external mesh reverses the direction of rotation; an idler adds a mesh and changes no ratio.")

DESCRIPTION = f"""\
Find the tooth counts of a compound gear train that reaches TARGET as closely as
the limits allow.  The search is exact: for each stage count the first train is
the best there is within the limits (least |relative error|, ties to fewer
teeth).  One train is shown per distinct ratio, the one with the fewest teeth.

Ratio = output turns per input turn = the product over stages of driver
teeth / driven teeth.  Each external mesh reverses the direction of rotation;
an idler adds a mesh and changes no ratio.

TARGET is a decimal (29.530588853), a fraction (127/20) or an expression
(2*pi, 25.4/(8*pi), sqrt(2), 366.2422/365.2422); it is read exactly, never
evaluated as Python.

Inventory syntax (--inventory): entries separated by commas or lines, '#'
comments; Z (one gear), ZxN (N gears), A-B (every count from A to B), A-B/S
(every S-th count); e.g. 20x2,25-60/5,127.  A name of an existing file is read
as a file.

Exit codes: 0 found; 1 nothing within --tolerance (or no train at all);
2 bad input."""


def add_parser(subparsers: Any) -> argparse.ArgumentParser:
    """Register ``gearcad ratio``."""

    parser = subparsers.add_parser("ratio", help="best tooth counts of a gear train for a ratio",
                                   description=DESCRIPTION, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("target", help="wanted ratio: output turns per input turn")
    parser.add_argument("--tolerance", type=float, metavar="REL",
                        help="list every train with |relative error| <= REL (up to --count); exit 1 if none")
    parser.add_argument("--count", type=int, metavar="K",
                        help="trains listed per stage count (default 5; 1 when --stages is left out)")
    add_solver_options(parser)
    parser.add_argument("--fractions", action="store_true",
                        help="list the continued-fraction convergents and semiconvergents of the target and mark "
                             "those that a train of at most N stages realises exactly")
    parser.add_argument("--json", action="store_true", help="print JSON on stdout instead of a table")
    return parser


class _LazyProgress:
    """A rich progress bar on stderr that appears only after about a second."""

    def __init__(self, enabled: bool, delay: float = 1.0) -> None:
        self.enabled, self.delay = enabled, delay
        self.start = time.monotonic()
        self.bar: Any = None
        self.task: Any = None

    def __call__(self, fraction: float) -> None:
        if not self.enabled or time.monotonic() - self.start < self.delay:
            return
        if self.bar is None:
            from rich.console import Console
            from rich.progress import Progress

            self.bar = Progress(console=Console(stderr=True), transient=True)
            self.bar.start()
            self.task = self.bar.add_task("searching", total=1.0)
        self.bar.update(self.task, completed=min(1.0, max(0.0, fraction)))

    def close(self) -> None:
        if self.bar is not None:
            self.bar.stop()


def _limits(args: argparse.Namespace) -> Any:
    from ..ratio.inventory import read_inventory
    from ..ratio.limits import DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, make_limits

    inventory = read_inventory(args.inventory) if args.inventory is not None else None
    low = args.min_teeth if args.min_teeth is not None else (min(inventory.teeth) if inventory else DEFAULT_MIN_TEETH)
    high = args.max_teeth if args.max_teeth is not None else (max(inventory.teeth) if inventory else DEFAULT_MAX_TEETH)
    return make_limits(low, high, args.max_stage_ratio, args.hunting, exclusions(args.exclude), inventory,
                       args.direction)


def _query(args: argparse.Namespace, target: Any, limits: Any) -> Any:
    from ..errors import InputError
    from ..ratio.compound import check_stages
    from ..ratio.solve import DEFAULT_STAGE_COUNTS, RatioQuery, count_value

    if args.shift_limit is not None and not args.coaxial:
        raise InputError("--shift-limit works only with --coaxial")
    if args.stages is not None:
        counts: tuple[int, ...] = (check_stages(args.stages),)
    else:
        counts = (2,) if args.coaxial else DEFAULT_STAGE_COUNTS
    default_count = 5 if args.stages is not None or args.tolerance is not None else 1
    count = count_value(args.count if args.count is not None else default_count)
    return RatioQuery(target, counts, limits, count, args.coaxial, args.shift_limit)


def _train_json(train: Any) -> dict[str, Any]:
    out = {"numerator": train.numerator, "denominator": train.denominator, "ratio": train.ratio,
           "relative_error": train.relative_error, "direction": train.direction,
           "stages": [{"driver": d, "driven": n} for d, n in train.stages], "idler": train.idler,
           "total_teeth": train.total_teeth}
    if train.shifts is not None:
        out["shifts"] = [{"driver": a, "driven": b} for a, b in train.shifts]
    return out


def _stages_text(train: Any) -> str:
    text = "  ".join(f"{d}/{n}" for d, n in train.stages)
    if train.shifts is not None and any(x for pair in train.shifts for x in pair):
        text += "  shifts " + " ".join(f"{a:+.3f}/{b:+.3f}" for a, b in train.shifts)
    return text


def _rows(trains: Sequence[Any]) -> list[list[str]]:
    return [[str(i), str(len(t.stages)), _stages_text(t), f"{t.numerator}/{t.denominator}", f"{t.ratio:.15g}",
             f"{t.relative_error * 1e6:+.6f}", f"{t.relative_error:+.3e}", t.direction,
             str(t.idler) if t.idler is not None else "-", str(t.total_teeth)]
            for i, t in enumerate(trains, 1)]


_HEADER = ["#", "stages", "driver/driven per stage", "exact ratio", "decimal", "error ppm", "rel. error",
           "output", "idler", "teeth"]


def _heading(target: Any, limits: Any) -> str:
    return (f"target {target.expression} = {target.digits(20)}\n"
            f"limits: {limits.describe()}\n"
            f"ratio = output turns per input turn = product of driver/driven teeth")


def _print_fractions(args: argparse.Namespace, target: Any, limits: Any) -> int:
    from ..ratio.solve import approximations_with_trains

    depth = args.stages or 3
    listing = approximations_with_trains(target, limits, depth)
    if args.json:
        print_json({"target": {"expression": target.expression, "value": target.value},
                    "approximations": [{"numerator": a.numerator, "denominator": a.denominator, "kind": a.kind,
                                        "relative_error": a.relative_error,
                                        "train": _train_json(t) if t else None} for a, t in listing]})
        return 0
    rows = [[a.kind, f"{a.numerator}/{a.denominator}", f"{a.numerator / a.denominator:.15g}",
             f"{a.relative_error:+.3e}", ("* " + _stages_text(t)) if t else "-"] for a, t in listing]
    print(_heading(target, limits))
    print(f"best rational approximations; * = realised exactly by a train of at most {depth} stages")
    print(table(rows, ["kind", "fraction", "decimal", "rel. error", "train"]))
    return 0


def _report_miss(args: argparse.Namespace, query: Any, trains: Sequence[Any]) -> int:
    from ..ratio.solve import binding_limits

    binding = binding_limits(query, args.tolerance) if trains else []
    if args.json:
        print_json({"target": {"expression": query.target.expression, "value": query.target.value}, "results": [],
                    "best": _train_json(trains[0]) if trains else None, "binding": binding})
        return 1
    print(_heading(query.target, query.limits))
    if not trains:
        print("no train satisfies the limits (not enough gears, or no stage obeys the stage-ratio limit and hunting)")
        return 1
    print(f"no train within tolerance {args.tolerance:g}; the best found:")
    print(table(_rows(trains[:1]), _HEADER))
    if binding:
        print("binding: relaxing any one of " + ", ".join(binding) + " would meet the tolerance")
    else:
        print("binding: the limits together; no single relaxation of the stage ratio, hunting, exclusions, "
              "tooth range or stage count meets the tolerance")
    return 1


def run(args: argparse.Namespace) -> int:
    """Run ``gearcad ratio``; returns the exit code."""
    from ..ratio.solve import solve_ratio, tolerance_value, within_tolerance
    from ..ratio.target import parse_target

    target = parse_target(args.target)
    limits = _limits(args)
    if args.tolerance is not None:
        tolerance_value(args.tolerance)
    if args.fractions:
        return _print_fractions(args, target, limits)
    query = _query(args, target, limits)
    progress = _LazyProgress(enabled=not args.json and sys.stderr.isatty())
    try:
        trains = solve_ratio(query, progress)
    finally:
        progress.close()
    shown = within_tolerance(trains, args.tolerance) if args.tolerance is not None else trains
    if not shown:
        return _report_miss(args, query, trains)
    if args.json:
        print_json({"target": {"expression": target.expression, "value": target.value},
                    "results": [_train_json(t) for t in shown]})
        return 0
    print(_heading(target, limits))
    print(table(_rows(shown), _HEADER))
    return 0
