"""Every train of one exact ratio, fewest teeth first: the alternatives a practitioner may prefer.

Trains of equal ratio have equal error, so the solver's choice among them
(fewest teeth) is only a tie-break; a builder may rather take a train whose
meshes pass every check without a warning (no thin tips, no undercut left
after the least shift), which usually means larger pinions.  The ratio
``a/b`` is realised by driver and driven products ``(g a, g b)``; ``g`` runs
upwards while the AM-GM bound of the products stays within the teeth allowed,
and each pair is split exhaustively (:meth:`gearcad.ratio.split.Splitter.every_for`).
"""

from __future__ import annotations

from .limits import Limits
from .reach import largest_stage_ratio
from .split import Splitter
from .target import Target
from .train import Train, make_train

__all__ = ["same_ratio_trains"]

#: Most multiples ``g`` tried (bounded work whatever the ratio).
MAX_MULTIPLES = 200_000


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
    from .compound import needs_idler

    idler = needs_idler(k, limits)
    splitter = Splitter(k, limits, limits.shelf(), idler, s)
    low, high = min(limits.teeth), max(limits.teeth)
    floor = low if idler else 0
    found: list[tuple[int, tuple, int | None]] = []
    best = None
    g_low = max(-(-low ** k // numerator), -(-low ** k // denominator), 1)
    g_high = min(high ** k // numerator, high ** k // denominator, g_low + MAX_MULTIPLES)
    for g in range(g_low, g_high + 1):
        p, q = numerator * g, denominator * g
        bound = k * (p ** (1 / k) + q ** (1 / k)) * (1 - 1e-12) + floor
        if best is not None and bound > best + extra_teeth:
            break
        for total, stages, idler_teeth in splitter.every_for(p, q, float("inf") if best is None
                                                             else best + extra_teeth):
            found.append((total, stages, idler_teeth))
            best = total if best is None else min(best, total)
    found = sorted(set(t for t in found if best is not None and t[0] <= best + extra_teeth))
    return [make_train(stages, target, idler_teeth) for _, stages, idler_teeth in found[:count]]
