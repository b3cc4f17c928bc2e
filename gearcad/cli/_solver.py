"""The ratio solver's options, shared by ``ratio`` and ``design`` (same names, same meaning)."""

from __future__ import annotations

import argparse
from typing import Any

__all__ = ["add_solver_options", "add_planetary_options", "exclusions", "limits_from_args", "stage_counts_from_args", "planetary_query_from_args"]


def add_solver_options(parser: argparse.ArgumentParser) -> None:
    """Add the search limits: stages, tooth range, stage ratio, hunting, exclusions, inventory, coaxial, direction."""
    from ..ratio.limits import DEFAULT_MAX_STAGE_RATIO, DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH

    parser.add_argument("--stages", type=int, metavar="N",
                        help="number of stages, 1 to 4 (default: search 1, 2 and 3 and show the best of each; "
                             "with --coaxial: 2)")
    parser.add_argument("--min-teeth", type=int, metavar="Z",
                        help=f"fewest teeth of a gear (default {DEFAULT_MIN_TEETH}; with --inventory: the shelf's)")
    parser.add_argument("--max-teeth", type=int, metavar="Z",
                        help=f"most teeth of a gear (default {DEFAULT_MAX_TEETH}; with --inventory: the shelf's)")
    parser.add_argument("--max-stage-ratio", type=float, default=DEFAULT_MAX_STAGE_RATIO, metavar="R",
                        help=f"largest ratio of one stage either way, 1/R <= driver/driven <= R (default "
                             f"{DEFAULT_MAX_STAGE_RATIO:g}, common practice for a spur stage)")
    parser.add_argument("--hunting", action="store_true",
                        help="driver and driven of every stage share no factor (even wear; common practice)")
    parser.add_argument("--exclude", metavar="Z,...", default="", help="tooth counts never to use")
    parser.add_argument("--inventory", metavar="LIST|FILE",
                        help="use only these gears, each physical gear once (syntax above)")
    parser.add_argument("--coaxial", action="store_true",
                        help="output on the input's axis: each pair of stages has one centre distance "
                             "(equal tooth sums with one module)")
    parser.add_argument("--shift-limit", type=float, metavar="X",
                        help="profile shift allowed per gear (+-X) to bring unequal centre distances together: "
                             "with --coaxial for compound trains, and for planetary sets (reports the shifts)")
    parser.add_argument("--direction", choices=("same", "opposite"),
                        help="output turns the same way as the input or the opposite way; adds an idler "
                             "(smallest tooth count available) where needed")


def exclusions(text: str) -> list[str]:
    """The tooth counts of ``--exclude`` (commas or spaces)."""
    return [part for part in text.replace(" ", ",").split(",") if part]


def limits_from_args(args: argparse.Namespace) -> Any:
    """The search limits of the options (tooth range, stage ratio, hunting, exclusions, inventory, direction)."""
    from ..ratio.inventory import read_inventory
    from ..ratio.limits import DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, make_limits

    inventory = read_inventory(args.inventory) if args.inventory is not None else None
    low = args.min_teeth if args.min_teeth is not None else (min(inventory.teeth) if inventory else DEFAULT_MIN_TEETH)
    high = args.max_teeth if args.max_teeth is not None else (max(inventory.teeth) if inventory else DEFAULT_MAX_TEETH)
    return make_limits(low, high, args.max_stage_ratio, args.hunting, exclusions(args.exclude), inventory,
                       args.direction)


def stage_counts_from_args(args: argparse.Namespace) -> tuple[int, ...]:
    """The stage counts to search (validated without loading the solver)."""
    from ..errors import InputError
    from ..ratio.limits import MAX_STAGES
    from ..validate import as_int

    if args.shift_limit is not None and not args.coaxial:
        raise InputError("--shift-limit works only with --coaxial")
    if args.stages is None:
        return (2,) if args.coaxial else (1, 2, 3)
    k = as_int(args.stages, "stages")
    if not 1 <= k <= MAX_STAGES:
        raise InputError(f"stages must be from 1 to {MAX_STAGES}, got {args.stages!r}")
    if args.coaxial and k not in (2, 4):
        raise InputError(f"a coaxial train has 2 or 4 stages (one or two reverted pairs), got {k}")
    return (k,)


def planetary_query_from_args(args: argparse.Namespace, target: Any, count: int | None = None) -> Any:
    """The planetary search of the options (``--planets``, ``--fixed``, ``--input``, ``--stepped``, ...)."""
    from ..ratio.planetary_set import NEIGHBOUR_MARGIN, make_arrangement
    from ..ratio.planetary import make_query
    from ..profiles import load_tooth_system
    from ..ratio.tolerance import count_value

    system = load_tooth_system(getattr(args, "system", None) or "iso53-a")
    if count is None:
        default_count = 5 if args.tolerance is not None else 1
        count = count_value(args.count if args.count is not None else default_count)
    margin = args.neighbour_margin if args.neighbour_margin is not None else NEIGHBOUR_MARGIN
    return make_query(target, limits_from_args(args), make_arrangement(args.fixed or "ring", args.input_member),
                      args.planets, args.stepped, args.max_ring_teeth, args.shift_limit, margin, count,
                      system.pressure_angle, system.addendum)


#: The defaults of gearcad.planetary, written out so that building the parser imports neither sympy nor numpy
#: (tests/test_ratio_planetary_cli.py checks that they agree).
MEMBERS = ("sun", "ring", "carrier")
DEFAULT_PLANETS, MAX_PLANETS, DEFAULT_MAX_RING_TEETH, NEIGHBOUR_MARGIN = 3, 24, 200, 0.5


def add_planetary_options(parser: argparse.ArgumentParser, any_kind: bool = False) -> None:
    """Planetary options: --kind, --planets, --fixed, --input, --stepped, --max-ring-teeth, --neighbour-margin.

    ``any_kind`` adds ``--kind any`` (the best of each kind side by side; ``gearcad ratio`` only).
    """
    kinds = ("compound", "planetary", "summing") + (("any",) if any_kind else ())
    parser.add_argument("--kind", choices=kinds, default="compound",
                        help="a compound train (default), a planetary set, or a summing train (two paths and a "
                             "differential: reaches fractions with primes above the largest tooth count)"
                             + ("; any: the best of each kind side by side, with the diameter each takes"
                                if any_kind else ""))
    parser.add_argument("--planets", type=int, metavar="N",
                        help=f"planetary: number of planets, 1 to {MAX_PLANETS} (default {DEFAULT_PLANETS}); summing: the "
                             "differential's planets (planet pairs of --differential mean)")
    parser.add_argument("--fixed", choices=MEMBERS, help="planetary: the member held still (default ring)")
    parser.add_argument("--input", choices=MEMBERS, dest="input_member",
                        help="planetary: the input member, turned by the drive (default: the first of sun, ring, "
                             "carrier not fixed); the output is the third")
    parser.add_argument("--stepped", action="store_true",
                        help="planetary: stepped planets (one gear meshes the sun, another the ring)")
    parser.add_argument("--max-ring-teeth", type=int, metavar="Z",
                        help=f"planetary: most teeth of the ring (default {DEFAULT_MAX_RING_TEETH})")
    parser.add_argument("--neighbour-margin", type=float, metavar="M",
                        help=f"planetary: least clearance between adjacent planets' tips, modules (default "
                             f"{NEIGHBOUR_MARGIN:g}, common practice)")
