"""``gearcad ratio --worm``: spur stages then a worm driving its wheel."""

from __future__ import annotations

import argparse
from typing import Any

from ._format import print_json, table

__all__ = ["add_worm_option", "run_worm_ratio", "worm_train_json"]


def add_worm_option(parser: argparse.ArgumentParser) -> None:
    """``--worm STARTS[:WHEEL_MIN-WHEEL_MAX]``."""
    parser.add_argument("--worm", metavar="STARTS[:ZMIN-ZMAX]",
                        help="end the train with a worm of STARTS starts driving a wheel of ZMIN to ZMAX teeth "
                             "(default: the tooth range, from 18, the undercut limit at 20 degrees); --stages then "
                             "counts the worm stage too; the worm stage is marked worm: true")


def worm_train_json(train: Any, tolerance: float | None = None) -> dict[str, Any]:
    """JSON of a train with a worm stage: the keys of a compound result, stages marked ``worm``."""
    from ..ratio.tolerance import is_within

    return {"numerator": train.numerator, "denominator": train.denominator, "ratio": train.ratio,
            "relative_error": train.relative_error, "direction": "crossed",
            "stages": [{"driver": d, "driven": n, "worm": w} for d, n, w in train.stages], "idler": None,
            "total_teeth": train.total_teeth, "worm": {"starts": train.starts, "wheel_teeth": train.wheel},
            "within_tolerance": is_within(train.relative_error, tolerance)}


def _stages_text(train: Any) -> str:
    return "  ".join(f"{d}/{n}" + (" worm" if w else "") for d, n, w in train.stages)


_HEADER = ["#", "stages", "driver/driven per stage", "exact ratio", "decimal", "error ppm", "rel. error", "teeth"]


def run_worm_ratio(args: argparse.Namespace, limits: Any, progress: Any) -> int:
    """Solve, check each result's ratio with the kinematic model, print; exit 1 when nothing meets --tolerance."""
    from ..errors import InputError
    from ..ratio.solve import count_value, tolerance_value
    from ..ratio.target import parse_target
    from ..ratio.worm import make_worm_query, parse_worm_option, solve_worm, worm_reach, worm_reach_note

    for attr, flag in (("coaxial", "--coaxial"), ("fractions", "--fractions"), ("shift_limit", "--shift-limit")):
        if getattr(args, attr, None) not in (None, False):
            raise InputError(f"{flag} does not apply to a train with a worm stage; allowed: leave it out or drop --worm")
    target = parse_target(args.target)
    worm = parse_worm_option(args.worm, limits)
    tolerance = tolerance_value(args.tolerance) if args.tolerance is not None else None
    default_count = 5 if args.stages is not None or tolerance is not None else 1
    count = count_value(args.count if args.count is not None else default_count)
    query = make_worm_query(target, worm, limits, args.stages, count)
    reach = worm_reach(query)
    head = {"expression": target.expression, "value": target.value}
    if not reach.holds(target.approx):  # said at once: no search can reach it
        note = worm_reach_note(query)
        if args.json:
            print_json({"target": head, "results": [], "tolerance": tolerance, "reach": reach.as_json(),
                        "unreachable": note})
        else:
            print(note)
        return 1
    try:
        trains = solve_worm(query, progress)
    finally:
        progress.close()
    shown = [t for t in trains if tolerance is None or abs(t.relative_error) <= tolerance]
    heading = (f"target {target.expression} = {target.digits(20)}\n"
               f"limits: {limits.describe()}; worm {worm.starts} start{'s' if worm.starts > 1 else ''}, wheel "
               f"{worm.wheel_min}-{worm.wheel_max} teeth\n"
               "ratio = output turns per input turn = product of driver/driven (worm: starts/wheel teeth); "
               "the worm's axis crosses the wheel's, so the output's sense follows the worm's hand\n"
               "listed worm last; design and build make the worm the first stage (the train's input, across the "
               "plates): the same product, so the same ratio")
    if args.json:
        print_json({"target": head, "results": [worm_train_json(t, tolerance) for t in shown],
                    "tolerance": tolerance, "reach": reach.as_json(),
                    **({"best": worm_train_json(trains[0], tolerance)} if not shown and trains else {})})
        return 0 if shown else 1
    print(heading)
    if not trains:
        print("no train satisfies the limits")
        return 1
    if not shown:
        print(f"no train within tolerance {tolerance:g}; the best found:")
    rows = [[str(i), str(len(t.stages)), _stages_text(t), f"{t.numerator}/{t.denominator}", f"{t.ratio:.15g}",
             f"{t.relative_error * 1e6:+.6f}", f"{t.relative_error:+.3e}", str(t.total_teeth)]
            for i, t in enumerate(shown or trains[:1], 1)]
    print(table(rows, _HEADER))
    return 0 if shown else 1
