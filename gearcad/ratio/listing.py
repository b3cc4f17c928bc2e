"""Distinct trains, best first: what ``gearcad ratio --count K`` lists.

:func:`gearcad.ratio.solve.solve_ratio` gives the best ``K`` distinct *ratios*
of each stage count (each by its fewest-teeth train).  A practitioner wants
the best ``K`` distinct *trains*: other trains of one ratio may suit better
(larger pinions pass the pair checks without a warning).  So, per stage count,
the ratios are taken best first and each is expanded into its trains
(:func:`gearcad.ratio.alternatives.same_ratio_trains`: every train of that ratio
within ``extra_teeth`` teeth of its fewest, at most ``per_ratio`` of them), until
``K`` trains are held and the next ratio is strictly worse.  The trains are
ranked by

1. |relative error| (exact),
2. meshes that pass without a warning first (:class:`gearcad.ratio.clean.MeshJudge`),
3. fewer teeth, then the ratio and the stages.

Every train of the ``K`` best belongs to one of the ``K`` best ratios (each
ratio has a train of its own), so expanding those ratios is enough; the bound
on extra teeth and on trains per ratio keeps the work small whatever the ratio.
"""

from __future__ import annotations

from dataclasses import replace
from fractions import Fraction
from typing import Callable

from .solve import RatioQuery, solve_ratio
from .train import Train, exact_relative_error

__all__ = ["distinct_trains", "EXTRA_TEETH", "PER_RATIO"]

#: Alternatives of one ratio have at most this many teeth more than its fewest-teeth train.
EXTRA_TEETH = 40
#: Most trains of one ratio considered (the fewest-teeth ones).
PER_RATIO = 24
Progress = Callable[[float], None]


def distinct_trains(query: RatioQuery, clean: Callable[[Train], bool] | None = None,
                    progress: Progress | None = None, *, extra_teeth: int = EXTRA_TEETH,
                    per_ratio: int = PER_RATIO) -> list[Train]:
    """Up to ``query.count`` distinct trains of each stage count of the query, merged, best first.

    Parameters
    ----------
    query : RatioQuery
    clean : callable, optional
        ``clean(train)`` is True when the train's meshes pass without a warning
        (e.g. :meth:`gearcad.ratio.clean.MeshJudge.clean`); without it only the
        error and the teeth rank.
    progress : callable, optional
        Called with a fraction from 0 to 1.
    extra_teeth, per_ratio : int
        Bounds of the alternatives of one ratio (see the module notes).

    Returns
    -------
    list of Train
        Ranked by |error|, clean meshes first, fewer teeth, ratio, stages.
        Coaxial trains are listed one per ratio (their alternatives need the
        centre-distance rule, which the compound split does not know).
    """
    from .alternatives import same_ratio_trains

    target = query.target

    def error(train: Train) -> Fraction:
        return abs(exact_relative_error(train.numerator, train.denominator, target))

    def key(train: Train) -> tuple:
        return (error(train), not clean(train) if clean else False, train.total_teeth, train.fraction,
                train.stages, train.idler or 0)

    if query.coaxial:
        return sorted(solve_ratio(query, progress), key=key)
    out: list[Train] = []
    counts = query.stage_counts
    for n, k in enumerate(counts):
        def step(fraction: float, n: int = n) -> None:
            if progress is not None:
                progress((n + fraction) / len(counts))
        ratios = solve_ratio(replace(query, stage_counts=(k,)), step)
        held: dict[tuple, Train] = {}
        for i, best in enumerate(ratios):
            same = same_ratio_trains(best.numerator, best.denominator, k, query.limits, target,
                                     max(per_ratio, query.count), extra_teeth)
            if clean is not None and not any(clean(t) for t in same):
                same += _larger_pinions(best, k, query, clean, max(per_ratio, query.count), extra_teeth)
            for train in [best, *same]:
                held.setdefault((train.stages, train.idler), train)
            following = ratios[i + 1] if i + 1 < len(ratios) else None
            if len(held) >= query.count and (following is None or error(following) > error(best)):
                break
        out += sorted(held.values(), key=key)[: query.count]
    return sorted(out, key=key)


#: Least tooth counts tried, in turn, when no train of a ratio passes without a warning: small pinions are
#: what thin tips and undercut come from (the steps ``gearcad design`` takes too).
LEAST_TEETH_STEPS = (12, 14, 17, 20, 24, 28)


def _larger_pinions(best: Train, k: int, query: RatioQuery, clean: Callable[[Train], bool], count: int,
                    extra_teeth: int) -> list[Train]:
    """Trains of ``best``'s ratio under larger least tooth counts, up to the first step that gives a clean one."""
    from .alternatives import same_ratio_trains

    limits = query.limits
    if limits.inventory is not None:
        return []
    for least in LEAST_TEETH_STEPS:
        if least <= limits.min_teeth or least > limits.max_teeth:
            continue
        narrower = replace(limits, min_teeth=least)
        if not narrower.teeth:
            break
        found = same_ratio_trains(best.numerator, best.denominator, k, narrower, query.target, count, extra_teeth)
        if not found:
            break
        if any(clean(t) for t in found):
            return found
    return []
