"""``gearcad ratio --kind any``: the best compound, planetary and summing train side by side."""

from __future__ import annotations

import argparse
from typing import Any, Callable

from ._format import print_json, table

__all__ = ["run_any", "ANY_REFUSED"]

#: Options that fix the shape of one kind, refused with --kind any.
ANY_REFUSED = (("stages", "--stages"), ("coaxial", "--coaxial"), ("inventory", "--inventory"),
               ("fractions", "--fractions"), ("planets", "--planets"), ("stepped", "--stepped"),
               ("differential", "--differential"), ("separate_axes", "--separate-axes"), ("worm", "--worm"),
               ("count", "--count"), ("direction", "--direction"), ("shift_limit", "--shift-limit"))


def _describe(found: Any) -> str:
    if found.kind == "compound":
        t = found.best
        return f"{len(t.stages)} stage{'s' * (len(t.stages) != 1)}: " + "  ".join(f"{d}/{n}" for d, n in t.stages)
    if found.kind == "planetary":
        return found.best.set.describe() + f" ({found.best.arrangement.describe()})"
    t = found.best
    return f"paths {t.path_a[0]}/{t.path_a[1]}{' +idler' if t.sign_a > 0 else ''} and " \
           f"{t.path_b[0]}/{t.path_b[1]}{' +idler' if t.sign_b > 0 else ''}, mean differential"


def _fraction(found: Any) -> tuple[int, int]:
    best = found.best
    if found.kind == "summing":
        return best.ratio.numerator, best.ratio.denominator
    return best.numerator, best.denominator


def run_any(args: argparse.Namespace, train_json: Callable, planetary_json: Callable) -> int:
    """Search every kind, print the table or the JSON contract (``kinds``); exit 0 when some best meets the
    tolerance (any result without one), 1 otherwise."""
    from ..ratio.clean import MeshJudge
    from ..ratio.kinematics import network_ratio
    from ..ratio.summing import summing_network
    from ..ratio.target import parse_target
    from ..ratio.tolerance import tolerance_value
    from ..trains.kinds import best_of_kinds
    from ._other import kind_options
    from ._solver import limits_from_args
    from ._summing import summing_json

    target = parse_target(args.target)
    tolerance = tolerance_value(args.tolerance) if args.tolerance is not None else None
    limits = limits_from_args(args)
    options = kind_options(args)
    clean = MeshJudge().clean
    found = best_of_kinds(target, limits, judge=clean, **options)

    def within(item: Any) -> bool:
        return item.best is not None and (tolerance is None or item.error <= tolerance)

    code = 0 if any(within(item) for item in found) else 1
    if args.json:
        kinds = []
        for item in found:
            best = None
            if item.best is not None:
                if item.kind == "compound":
                    best = train_json(item.best, tolerance, clean)
                elif item.kind == "planetary":
                    best = planetary_json(item.best)
                    best["within_tolerance"] = within(item)
                else:
                    best = summing_json(item.best, network_ratio(*summing_network(item.best)))
                    best["within_tolerance"] = within(item)
            kinds.append({"kind": item.kind, "best": best, "envelope_diameter": item.envelope_diameter})
        print_json({"target": {"expression": target.expression, "value": target.value}, "tolerance": tolerance,
                    "module": 1.0, "kinds": kinds})
        return code
    print(f"target {target.expression} = {target.digits(20)}")
    print(f"limits: {limits.describe()}; the best train of each kind")
    rows = []
    for item in found:
        if item.best is None:
            rows.append([item.kind, "none within the limits", "-", "-", "-", "-", "-"])
            continue
        num, den = _fraction(item)
        rows.append([item.kind, _describe(item), f"{num}/{den}", f"{float(item.best.relative_error):+.3e}",
                     str(item.best.total_teeth), f"{item.envelope_diameter:.1f}",
                     "yes" if within(item) else "no"])
    print(table(rows, ["kind", "best", "exact ratio", "rel. error", "teeth", "envelope/m", "within"], left=(0, 1)))
    print("envelope/m: diameter of the smallest circle holding the train along its shafts, at module 1 "
          "(multiply by the module in mm); within: meets --tolerance (any result without one)")
    return code
