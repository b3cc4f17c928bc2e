"""Every train of one exact ratio, fewest teeth first: the alternatives a practitioner may prefer.

Trains of equal ratio have equal error, so the solver's choice among them
(fewest teeth) is only a tie-break; a builder may rather take a train whose
meshes pass every check without a warning (no thin tips, no undercut left
after the least shift), which usually means larger pinions.  The ratio
``a/b`` is realised by driver and driven products ``(g a, g b)``; ``g`` runs
upwards while the AM-GM bound of the products stays within the teeth allowed
(within a block of ``g``, pairs go lightest bound first: :func:`gearcad.ratio.products.multiple_bounds`),
and each pair is split exhaustively (:meth:`gearcad.ratio.split.Splitter.every_for`).
One and two stages take the multiples in plain order under the AM-GM bound
alone (it grows with ``g``), in pure Python: ``gearcad ratio --stages 2`` starts
without numpy.  Any valid lower bound gives the same trains (each pair is split
exhaustively up to the fewest held), so the two ways agree.
"""

from __future__ import annotations

import math

from .limits import Limits
from .reach import largest_stage_ratio
from .split import Splitter, teeth_bound
from .target import Target
from .train import Train, make_train, needs_idler

__all__ = ["same_ratio_trains"]

#: Most multiples ``g`` tried (bounded work whatever the ratio).
MAX_MULTIPLES = 200_000
_CHUNK = 4096


def same_ratio_trains(numerator: int, denominator: int, k: int, limits: Limits, target: Target, count: int,
                      extra_teeth: int) -> list[Train]:
    """Up to ``count`` trains of ``k`` stages with ratio exactly ``numerator/denominator``.

    Parameters
    ----------
    numerator, denominator : int
        The ratio, output turns per input turn.
    k : int
        Number of stages.
    limits : Limits
    target : Target
        For the trains' errors.
    count : int
        Most trains returned.
    extra_teeth : int
        Only trains with at most this many teeth more than the fewest.

    Returns
    -------
    list of Train
        Fewest teeth first (then stages), distinct stages.
    """
    s = largest_stage_ratio(limits)
    if s is None:
        return []
    idler = needs_idler(k, limits)
    splitter = Splitter(k, limits, limits.shelf(), idler, s)
    low, high = min(limits.teeth), max(limits.teeth)
    floor = low if idler else 0
    found: list[tuple[int, tuple, int | None]] = []
    best = None
    g_low = max(-(-low ** k // numerator), -(-low ** k // denominator), 1)
    g_high = min(high ** k // numerator, high ** k // denominator, g_low + MAX_MULTIPLES)
    if k <= 2:
        for multiple in range(g_low, g_high + 1):
            limit = _limit(found, best, count, extra_teeth)
            if teeth_bound(numerator * multiple, denominator * multiple, k, low) + floor > limit:
                break  # the bound grows with the multiple
            found = sorted(set(found + splitter.every_for(numerator * multiple, denominator * multiple, limit, keep=count)))
            best = found[0][0] if found else None
    else:
        found, best = _by_blocks(numerator, denominator, k, splitter, (g_low, g_high), (low, high), floor, count,
                                 extra_teeth)
    found = [t for t in found if t[0] <= best + extra_teeth] if best is not None else []
    return [make_train(stages, target, idler_teeth) for _, stages, idler_teeth in found[:count]]


def _by_blocks(numerator: int, denominator: int, k: int, splitter: Splitter, g_range: tuple[int, int],
               teeth_range: tuple[int, int], floor: int, count: int, extra_teeth: int) -> tuple[list, int | None]:
    """The multiples in blocks, each block lightest factor bound first (numpy: the ranges of 3 and 4 stages)."""
    import numpy as np

    from .products import multiple_bounds

    (g_low, g_high), (low, high) = g_range, teeth_range
    found: list[tuple[int, tuple, int | None]] = []
    best = None
    for start in range(g_low, g_high + 1, _CHUNK):
        limit = _limit(found, best, count, extra_teeth)
        if math.floor(k * ((numerator * start) ** (1 / k) + (denominator * start) ** (1 / k)) * (1 - 1e-12)) + floor > limit:
            break  # the AM-GM bound grows with g and is below the bound of every later pair
        g = np.arange(start, min(start + _CHUNK, g_high + 1), dtype=np.int64)
        # only products whose every prime factor is a possible tooth count can split; the lightest bound first
        bounds, order = multiple_bounds(numerator, denominator, g, k, low, high)
        for i in order.tolist():
            limit = _limit(found, best, count, extra_teeth)
            if bounds[i] + floor > limit:
                break
            multiple = int(g[i])
            found = sorted(set(found + splitter.every_for(numerator * multiple, denominator * multiple, limit, keep=count)))
            best = found[0][0] if found else None
    return found, best


def _limit(found: list, best: int | None, count: int, extra_teeth: int) -> float:
    """Most teeth a train may have and still enter: within ``extra_teeth`` of the fewest, and as light
    as the ``count``-th held once ``count`` are held."""
    limit = float("inf") if best is None else best + extra_teeth
    if len(found) >= count:
        limit = min(limit, found[count - 1][0])
    return limit
