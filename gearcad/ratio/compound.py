"""Exact search for the best compound trains of ``k`` stages: the entry point.

:func:`solve_compound` checks its arguments, settles what needs no search
(no stage allowed, too few gears on the shelf) and hands the target to one of
two exact searches with the same results:

* one and two stages over few tooth counts (:func:`gearcad.ratio.small.small_enough`):
  the pure-Python search of :mod:`gearcad.ratio.small`, so the common
  ``gearcad ratio X --stages 2`` starts without loading numpy;
* everything else: the window search of :mod:`gearcad.ratio.windows` (numpy).

Either way the first result is the global optimum (least |relative error|,
ties to fewer total teeth, then smaller ratio, then the lexicographically
first stages); the tests check this against an exhaustive enumeration.
Results are one train per distinct ratio: the one with the fewest teeth.
A target beyond the reach of ``k`` stages is searched at the reach's end
(:func:`_beyond_reach`: same order of results, bounded work); the reach is
:mod:`gearcad.ratio.reach`'s.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Callable

from ..errors import InputError
from ..validate import as_int
from .limits import MAX_STAGES, Limits
from .reach import largest_stage_ratio
from .target import Target, significant
from .train import Train, make_train, needs_idler, rank_key

__all__ = ["solve_compound", "stage_ratio_range", "check_stages", "needs_idler", "rank_key", "METHODS"]

#: Searches ``solve_compound`` may be told to take (all give the same results): ``small`` is the pure-Python
#: one (one or two stages only), ``sorted`` and ``scan`` the window search's two candidate generators.
METHODS = ("auto", "small", "sorted", "scan")
Progress = Callable[[float], None]


def check_stages(stages: object) -> int:
    """A stage count from 1 to MAX_STAGES, else :class:`InputError`."""
    k = as_int(stages, "stages")
    if not 1 <= k <= MAX_STAGES:
        raise InputError(f"stages must be from 1 to {MAX_STAGES}, got {stages!r}")
    return k


def stage_ratio_range(limits: Limits, k: int) -> tuple[Fraction, Fraction] | None:
    """Least and greatest ratio any ``k``-stage train may have, or None if no stage exists.

    The allowed stages are symmetric (swapping driver and driven keeps every rule), so the range is
    ``[s^-k, s^k]`` with ``s`` the largest allowed stage ratio (:func:`gearcad.ratio.reach.largest_stage_ratio`).
    """
    s = largest_stage_ratio(limits)
    if s is None:
        return None
    return 1 / s ** k, s ** k


def solve_compound(target: Target, stages: int, limits: Limits, count: int = 5, *,
                   progress: Progress | None = None, method: str = "auto", cap: float | None = None) -> list[Train]:
    """The best ``count`` trains of exactly ``stages`` stages, best first.

    Parameters
    ----------
    target : Target
        The wanted ratio (output turns per input turn).
    stages : int
        Number of stages, 1 to 4.
    limits : Limits
        Tooth range, stage-ratio limit, hunting, exclusions, inventory, direction.
    count : int
        Number of trains (distinct ratios) wanted.
    progress : callable, optional
        Called with a fraction from 0 to 1 as the search advances (by the window search).
    method : {"auto", "small", "sorted", "scan"}
        The search (see :data:`METHODS`); all give the same results.  ``auto``
        takes ``small`` wherever it serves.
    cap : float, optional
        Leave out every train whose |relative error| exceeds ``cap``: the
        result is then the best ``count`` of those within it (maybe fewer, or
        none); a caller merging several searches passes the worst error it
        still needs, and the windows stop growing there.

    Returns
    -------
    list of Train
        Sorted by |relative error|, then total teeth; empty if no train
        satisfies the limits.
    """
    k = check_stages(stages)
    count = as_int(count, "count")
    if count < 1:
        raise InputError(f"count must be 1 or more, got {count}")
    if method not in METHODS:
        raise InputError(f"method must be one of {', '.join(METHODS)}, got {method!r}")
    if method == "small" and k > 2:
        raise InputError(f"the small search takes 1 or 2 stages, got {k}")
    shelf = limits.shelf()
    if shelf is not None and sum(shelf.values()) < 2 * k + needs_idler(k, limits):
        return []
    span = stage_ratio_range(limits, k)
    if span is None:
        return []
    if not span[0] <= target.approx <= span[1]:
        found = _beyond_reach(target, k, limits, count, span, progress, method)
        return found if cap is None else [t for t in found if abs(t.relative_error) <= cap]
    from .small import small_enough

    if method == "small" or (method == "auto" and small_enough(k, limits)):
        from .small import search_small
        from .split import Splitter

        splitter = Splitter(k, limits, shelf, needs_idler(k, limits), largest_stage_ratio(limits))
        return search_small(target, k, limits, count, splitter, span, None if cap is None else Fraction(float(cap)))
    from .windows import search_windows

    return search_windows(target, k, limits, count, span, progress=progress, method=method,
                          cap=None if cap is None else float(cap))


def _beyond_reach(target: Target, k: int, limits: Limits, count: int, span: tuple[Fraction, Fraction],
                  progress: Progress | None, method: str) -> list[Train]:
    """The best trains for a target outside ``span``: those nearest the end of the span it lies beyond.

    Every train lies within ``span``, so against a target beyond its upper end
    the error ``1 - r / T`` falls as the ratio ``r`` rises, exactly as against
    the end itself: searching for the end ranks the trains in the same order
    (ties alike), and the search stays as small as any within reach.
    """
    end = span[1] if target.approx > span[1] else span[0]
    proxy = Target(significant(end, 17), end, float(end), end, end)
    found = solve_compound(proxy, k, limits, count, progress=progress, method=method)
    return sorted((make_train(t.stages, target, t.idler, t.shifts) for t in found), key=lambda t: rank_key(t, target))
