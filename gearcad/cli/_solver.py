"""The ratio solver's options, shared by ``ratio`` and ``design`` (same names, same meaning)."""

from __future__ import annotations

import argparse

__all__ = ["add_solver_options", "exclusions"]


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
