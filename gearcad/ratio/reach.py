"""What the limits can reach, computed before any search (pure Python: no numpy, no sympy).

A stage obeys ``1/R <= driver/driven <= R`` (and hunting, exclusions, the
tooth range or the shelf), so the largest stage ratio ``s`` the limits allow
bounds every train of ``k`` stages to ``[s^-k, s^k]`` (the allowed stages are
symmetric: swapping driver and driven keeps every rule).  The bound is reached
by ``k`` equal stages wherever the shelf holds enough gears.

:func:`reach_note` turns an unreachable target into one line naming what was
asked, what the limits reach and what would reach it.
"""

from __future__ import annotations

import math
from bisect import bisect_right
from math import gcd
from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from .limits import MAX_STAGES, TEETH_BOUNDS, Limits

__all__ = ["Reach", "largest_stage_ratio", "reach_of", "reach_note", "needed_stage_ratio"]


@dataclass(frozen=True)
class Reach:
    """The ratios trains of some stage counts can have.

    Attributes
    ----------
    stage_counts : tuple of int
    low, high : Fraction
        Least and greatest ratio of any train of those stage counts (output
        turns per input turn); both 0 when no stage is allowed at all.
    """

    stage_counts: tuple[int, ...]
    low: Fraction
    high: Fraction

    def holds(self, value: Fraction | float) -> bool:
        """Whether ``value`` lies within the reach."""
        return self.high > 0 and self.low <= value <= self.high

    def as_json(self) -> dict[str, float]:
        """``{"min": low, "max": high}`` as floats."""
        return {"min": float(self.low), "max": float(self.high)}

    def describe(self) -> str:
        """``1/1296 to 1296`` style text."""
        return f"{_ratio_text(self.low)} to {_ratio_text(self.high)}"


def _ratio_text(value: Fraction) -> str:
    if value == 0:
        return "0"
    if value < 1:
        inverse = 1 / value
        return f"1/{inverse.numerator}" if inverse.denominator == 1 else f"1/{float(inverse):.6g}"
    return str(value.numerator) if value.denominator == 1 else f"{float(value):.6g}"


def largest_stage_ratio(limits: Limits) -> Fraction | None:
    """The largest driver/driven of one allowed stage (None when no stage is allowed).

    For each driven count, the largest driver within ``R`` times it (by
    bisection), stepping down past drivers that share a factor with it when
    hunting is asked; integer arithmetic only.
    """
    teeth = limits.teeth
    shelf = limits.shelf()
    r = limits.max_stage_ratio
    best: Fraction | None = None
    for driven in teeth:
        top = bisect_right(teeth, driven * r.numerator // r.denominator) - 1
        for index in range(top, -1, -1):
            driver = teeth[index]
            if best is not None and driver * best.denominator <= best.numerator * driven:
                break
            if driver == driven and shelf is not None and shelf[driver] < 2:
                continue
            if not limits.hunting or gcd(driver, driven) == 1:
                best = Fraction(driver, driven)
                break
    return best


def reach_of(limits: Limits, stage_counts: Sequence[int]) -> Reach:
    """The reach of trains of the given stage counts under ``limits``."""
    counts = tuple(stage_counts)
    s = largest_stage_ratio(limits)
    if s is None:
        return Reach(counts, Fraction(0), Fraction(0))
    return Reach(counts, 1 / s ** max(counts), s ** max(counts)) if s >= 1 else Reach(counts, Fraction(0), Fraction(0))


def needed_stage_ratio(target: float, stages: int) -> float:
    """The stage ratio ``k`` equal stages need to reach ``target`` (either way)."""
    return math.exp(abs(math.log(target)) / stages)


def reach_note(target_text: str, value: float, limits: Limits, stage_counts: Sequence[int], *,
               coaxial: bool = False) -> str:
    """One line: the target, what the limits reach with those stage counts, and what would reach it."""
    reach = reach_of(limits, stage_counts)
    counts = tuple(stage_counts)
    stages_text = f"{counts[0]} stage{'s' * (counts[0] != 1)}" if len(counts) == 1 else \
        f"{min(counts)} to {max(counts)} stages"
    head = (f"target {target_text} = {value:.6g} cannot be reached: {stages_text} under the limits "
            f"({limits.describe()}) reach {reach.describe()}")
    s = largest_stage_ratio(limits)
    if s is None:
        return head + "; no stage obeys the limits: widen the tooth range or the stage ratio"
    ways = []
    step = 2 if coaxial else 1
    more = next((k for k in range(max(counts) + step, MAX_STAGES + 1, step)
                 if Fraction(1) / s ** k <= Fraction(value) <= s ** k), None)
    if more is not None:
        ways.append(f"--stages {more} (reach {reach_of(limits, (more,)).describe()})")
    low, high = min(limits.teeth), max(limits.teeth)
    for k in (max(counts), MAX_STAGES - (MAX_STAGES - max(counts)) % step):
        need = needed_stage_ratio(value, k) * (1 - 1e-12)
        ratio = f"--max-stage-ratio {math.ceil(need * 100) / 100:g}"
        stages = "" if k == max(counts) else f"--stages {k} "
        if need <= high / low:
            ways.append(stages + ratio)
            break
        if math.ceil(need * low) <= TEETH_BOUNDS[1]:
            ways.append(f"{stages}{ratio} --max-teeth {math.ceil(need * low)} ({k} stages of {need:.3g}:1 need "
                        f"that tooth range)")
            break
    ways.append("another kind of train: --kind planetary (--stepped for large ratios) or --kind summing")
    return head + "; would reach it: " + "; or ".join(ways)
