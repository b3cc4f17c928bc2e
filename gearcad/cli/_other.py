"""The one-line note when a chosen kind of train misses the tolerance where another kind meets it
(shared by ``ratio``'s compound, planetary and summing paths)."""

from __future__ import annotations

import argparse
from typing import Any

__all__ = ["other_kinds_line", "kind_options"]


def kind_options(args: argparse.Namespace) -> dict[str, Any]:
    """The planetary options --kind any and the note take from the command line."""
    from ..ratio.planetary_set import NEIGHBOUR_MARGIN, make_arrangement

    arrangement = make_arrangement(args.fixed, args.input_member) if args.fixed or args.input_member else None
    margin = args.neighbour_margin if args.neighbour_margin is not None else NEIGHBOUR_MARGIN
    return {"arrangement": arrangement, "max_ring_teeth": args.max_ring_teeth, "margin": margin}


def other_kinds_line(args: argparse.Namespace, chosen: str, chosen_error: float | None, tolerance: float) -> str:
    """The one-line note (empty when none) that another kind meets ``tolerance`` where ``chosen`` does not.

    Searched only when the chosen kind's best misses the tolerance (bounded: one best per other kind).
    """
    from ..ratio.target import parse_target
    from ..trains.kinds import other_kinds_note
    from ._solver import limits_from_args

    if chosen_error is not None and chosen_error <= tolerance:
        return ""
    if getattr(args, "inventory", None) is not None:  # the other kinds make their gears; a shelf says nothing of them
        return ""
    from ..ratio.clean import MeshJudge

    return other_kinds_note(parse_target(args.target), limits_from_args(args), chosen, chosen_error, tolerance,
                            judge=MeshJudge().clean, **kind_options(args))
