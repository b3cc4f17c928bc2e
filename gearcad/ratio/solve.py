"""The ratio solver's entry points: one stage count or several, tolerance, binding limits."""

from __future__ import annotations

from dataclasses import dataclass, replace
from fractions import Fraction
from typing import TYPE_CHECKING, Callable, Sequence

from .compound import check_stages, solve_compound
from .limits import MAX_STAGES, TEETH_BOUNDS, Limits
from .target import Target, parse_target
from .tolerance import count_value, tolerance_value
from .train import Train

if TYPE_CHECKING:  # the convergents are loaded only by --fractions
    from .convergents import Approximant

__all__ = ["RatioQuery", "solve_ratio", "within_tolerance", "binding_limits", "realising_stages",
           "approximations_with_trains", "tolerance_value", "count_value", "DEFAULT_STAGE_COUNTS"]

#: Stage counts searched when none is given (coaxial: one reverted pair).
DEFAULT_STAGE_COUNTS = (1, 2, 3)
Progress = Callable[[float], None]


@dataclass(frozen=True)
class RatioQuery:
    """One search: target, stage counts, limits and how many results per stage count."""

    target: Target
    stage_counts: tuple[int, ...]
    limits: Limits
    count: int = 5
    coaxial: bool = False
    shift_limit: float | None = None


def _one(query: RatioQuery, k: int, progress: Progress | None) -> list[Train]:
    if query.coaxial:
        from .coaxial import solve_coaxial

        return solve_coaxial(query.target, k, query.limits, query.count, query.shift_limit)
    return solve_compound(query.target, k, query.limits, query.count, progress=progress)


def solve_ratio(query: RatioQuery, progress: Progress | None = None) -> list[Train]:
    """Best trains of every stage count of the query, merged and sorted.

    Sorted by |relative error|, then total teeth (then ratio and stages).
    """
    results: list[Train] = []
    counts = query.stage_counts
    for n, k in enumerate(counts):
        def step(fraction: float, n: int = n) -> None:
            if progress is not None:
                progress((n + fraction) / len(counts))
        results += _one(query, k, step)
    return sorted(results, key=lambda t: (abs(Fraction(t.numerator, t.denominator) / query.target.approx - 1),
                                          t.total_teeth, t.fraction, t.stages))


def within_tolerance(trains: Sequence[Train], tolerance: float) -> list[Train]:
    """The trains whose |relative error| is at most ``tolerance``."""
    return [t for t in trains if abs(t.relative_error) <= tolerance]


def _relaxations(query: RatioQuery) -> list[tuple[str, RatioQuery]]:
    limits = query.limits
    out = [("--max-stage-ratio", replace(query, limits=replace(limits, max_stage_ratio=Fraction(10 ** 6))))]
    if limits.hunting:
        out.append(("--hunting", replace(query, limits=replace(limits, hunting=False))))
    if limits.exclude:
        out.append(("--exclude", replace(query, limits=replace(limits, exclude=frozenset()))))
    if limits.inventory is None and limits.max_teeth < TEETH_BOUNDS[1]:
        wider = min(TEETH_BOUNDS[1], int(limits.max_teeth * 1.5))
        out.append((f"--max-teeth (raised to {wider})", replace(query, limits=replace(limits, max_teeth=wider))))
    if limits.inventory is None and limits.min_teeth > TEETH_BOUNDS[0]:
        lower = max(TEETH_BOUNDS[0], limits.min_teeth - 4)
        out.append((f"--min-teeth (lowered to {lower})", replace(query, limits=replace(limits, min_teeth=lower))))
    top = max(query.stage_counts)
    step = 2 if query.coaxial else 1
    if top + step <= MAX_STAGES:
        out.append((f"--stages (raised to {top + step})", replace(query, stage_counts=(top + step,))))
    return out


def binding_limits(query: RatioQuery, tolerance: float) -> list[str]:
    """The options that, relaxed alone, would let some train meet ``tolerance``.

    Each relaxation is searched for its single best train; an empty list
    means no single relaxation suffices.
    """
    binding = []
    for name, relaxed in _relaxations(query):
        best = solve_ratio(replace(relaxed, count=1))
        if best and abs(best[0].relative_error) <= tolerance:
            binding.append(name)
    return binding


def realising_stages(numerator: int, denominator: int, limits: Limits, max_stages: int) -> Train | None:
    """A train of the fewest stages (up to ``max_stages``) whose ratio is exactly p/q, or None."""
    target = parse_target(f"{numerator}/{denominator}")
    largest = max(limits.teeth)
    for k in range(1, max_stages + 1):
        if max(numerator, denominator) > largest ** k:
            continue
        found = solve_compound(target, k, limits, 1)
        if found and found[0].numerator == numerator and found[0].denominator == denominator:
            return found[0]
    return None


def approximations_with_trains(target: Target, limits: Limits, max_stages: int) -> list[tuple[Approximant, Train | None]]:
    """Best rational approximations up to the largest train denominator, each with a realising train."""
    from .convergents import best_approximations

    max_stages = check_stages(max_stages)
    largest = max(limits.teeth)
    return [(a, realising_stages(a.numerator, a.denominator, limits, max_stages))
            for a in best_approximations(target, largest ** max_stages)]
