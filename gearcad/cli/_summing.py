"""``gearcad ratio --kind summing``: two paths recombined in a differential."""

from __future__ import annotations

import argparse

from ._format import print_json, table

__all__ = ["add_summing_options", "run_summing", "on_the_shelf", "summing_json"]


def add_summing_options(parser: argparse.ArgumentParser) -> None:
    """``--differential``: what recombines the two paths."""
    parser.add_argument("--differential", choices=("mean", "planetary"),
                        help="summing: a differential whose carrier turns at the mean of its sides (default), or a "
                             "planetary set with the sun and the ring driven and the carrier the output")
    parser.add_argument("--separate-axes", action="store_true",
                        help="summing: let the two paths end on different axes (any sum of two stage ratios; by "
                             "default both reach one differential axle from one input shaft, as gearcad build needs)")


def summing_json(train, check) -> dict:
    paths = [{"driver": d, "driven": n, "idler": s > 0} for (d, n), s in ((train.path_a, train.sign_a), (train.path_b, train.sign_b))]
    members = {"differential": train.kind, "paths": paths, "kinematic_check": str(check), "axis_teeth": train.axis_teeth}
    if train.planetary:
        sun, planet, ring, count = train.planetary
        members.update({"sun": sun, "planet": planet, "ring": ring, "planets": count})
    return {"numerator": train.ratio.numerator, "denominator": train.ratio.denominator, "ratio": float(train.ratio),
            "relative_error": train.relative_error, "direction": "same",
            "stages": [{"driver": p["driver"], "driven": p["driven"]} for p in paths], "idler": None,
            "total_teeth": train.total_teeth, "kind": "summing", "members": members}


def on_the_shelf(train, inventory) -> bool:
    """Each physical gear of the two paths used once (the differential's own gears are made, not shelved)."""
    from collections import Counter

    need = Counter([*train.path_a, *train.path_b])
    return all(inventory.quantity(z) >= n for z, n in need.items())


def _least_axis(kind: str, planets: int) -> int:
    """Half-modules from the input shaft to the axle that the default mean differential needs (module 1, bore 3 mm)."""
    import math

    from ..trains.differential import axle_room
    from ..trains.spec import SummingSpec

    return math.ceil(2 * axle_room(SummingSpec("mean", planets=planets), 1.0) - 1e-9) if kind == "mean" else 0


def run_summing(args: argparse.Namespace, limits) -> int:
    """Solve, check every result with the kinematic model, print."""
    from ..errors import GearcadError, InputError
    from ..ratio.kinematics import network_ratio
    from ..ratio.tolerance import is_within, tolerance_value
    from ..ratio.target import parse_target
    from ..ratio.summing import solve_summing, summing_network

    target = parse_target(args.target)
    if args.tolerance is not None:
        tolerance_value(args.tolerance)
    count = args.count or 5
    kind = args.differential or "mean"
    inventory = limits.inventory
    wanted = count * 20 if inventory else count  # some may need more of a tooth count than the shelf holds
    one_axis = not args.separate_axes
    planets = args.planets if args.planets is not None else 3
    if not 1 <= planets <= 24:
        raise InputError(f"--planets must be from 1 to 24, got {planets!r}")
    min_axis = _least_axis(kind, planets) if one_axis else 0
    trains = solve_summing(target, sorted(limits.teeth), kind, wanted, float(limits.max_stage_ratio),
                           args.max_ring_teeth or 200, planets, args.neighbour_margin or 0.5,
                           one_axis=one_axis, min_axis=min_axis)
    if inventory:
        trains = [t for t in trains if on_the_shelf(t, inventory)][:count]
    checked = []
    for t in trains:
        model = network_ratio(*summing_network(t))
        if model != t.ratio:  # the one kinematic model has the last word
            raise GearcadError(f"internal check failed: the network gives {model}, the search {t.ratio}")
        checked.append((t, model))
    shown = [(t, m) for t, m in checked if args.tolerance is None or abs(t.relative_error) <= args.tolerance]
    other = _other_kinds(args, trains)
    if args.json:
        print_json({"target": {"expression": target.expression, "value": target.value},
                    "results": [{**summing_json(t, m), "within_tolerance": is_within(t.relative_error, args.tolerance)}
                                for t, m in shown], "tolerance": args.tolerance,
                    **({"other_kinds": other} if other else {})})
        return 0 if shown else 1
    print(f"target {target.expression} = {target.digits(20)}")
    print(f"summing train: two one-stage paths from the input into a {kind} differential; "
          "ratio = output (carrier) turns per input turn")
    if one_axis:
        rules = "both paths reach one differential axle: paths without idler share one tooth sum"
        rules += f" of at least {min_axis} (room for the default differential at module 1, bore 3 mm)" if min_axis else ""
        rules += "; an idler path's driver and driven tips clear by a module"
        if kind == "planetary":
            rules += "; path B's driven gear carries the ring inside it (at least ring + 7 teeth)"
        print(rules)
    rows = []
    for n, (t, _) in enumerate(shown, start=1):
        path = lambda p, s: f"{p[0]}/{p[1]}{' +idler' if s > 0 else ''}"  # noqa: E731
        diff = "mean" if not t.planetary else "sun {0} planet {1} ring {2} x{3}".format(*t.planetary)
        rows.append((str(n), path(t.path_a, t.sign_a), path(t.path_b, t.sign_b), diff,
                     f"{t.ratio.numerator}/{t.ratio.denominator}", f"{float(t.ratio):.15g}",
                     f"{t.relative_error * 1e6:+.6f}", str(t.total_teeth)))
    if rows:
        print(table(rows, ("#", "path A", "path B", "differential", "exact ratio", "decimal", "error ppm", "teeth"),
                    left=(1, 2, 3)))
    if other:
        print(other)
    if not shown:
        print(f"nothing within tolerance {args.tolerance:g}")
        return 1
    return 0


def _other_kinds(args: argparse.Namespace, trains) -> str:
    """The one-line note that another kind meets the tolerance (``--tolerance``, else design's) the best misses."""
    from ..ratio.tolerance import DESIGN_TOLERANCE

    wanted = args.tolerance if args.tolerance is not None else DESIGN_TOLERANCE
    best = abs(trains[0].relative_error) if trains else None
    if best is not None and best <= wanted:
        return ""
    from ._other import other_kinds_line

    return other_kinds_line(args, "summing", best, wanted)
