"""The fewest-teeth train of exactly ``k`` stages whose driver and driven products are ``P`` and ``Q``.

A depth-first search over stages ``(driver, driven)`` in lexicographic order
(so a train is met once, as its sorted stages), each stage dividing what is
left of ``P`` and ``Q`` and obeying the per-stage rules (ratio, hunting).  A
branch is cut when what is left cannot be split at all (its products or ratio
outside what ``j`` more stages reach) or when the teeth so far plus the
AM-GM bound of what is left, ``j (P'^(1/j) + Q'^(1/j))``, exceed the best
total found.  The stage-ratio cut is what keeps products with many
factorizations cheap: near the end of the reach only stages close to the
largest ratio survive.
"""

from __future__ import annotations

import heapq
import math
from bisect import bisect_left, bisect_right
from collections import Counter
from fractions import Fraction
from math import gcd
from typing import Sequence

from .limits import Limits, stage_allowed

__all__ = ["best_split", "Splitter", "teeth_bound"]


def teeth_bound(p: int, q: int, k: int, smallest: int) -> int:
    """A lower bound of the teeth of ``k`` stages with driver and driven products ``p`` and ``q``: on each
    side the factors' mean is at least their geometric mean (AM-GM) and at least ``smallest``."""
    return math.floor(k * (max(p ** (1 / k), smallest) + max(q ** (1 / k), smallest)) * (1 - 1e-12))


class _Splitter:
    def __init__(self, k: int, limits: Limits, shelf: Counter | None, idler: bool, largest_ratio: Fraction) -> None:
        self.k = k
        self.limits = limits
        self.teeth: Sequence[int] = limits.teeth
        self.members = frozenset(self.teeth)
        self.low, self.high = self.teeth[0], self.teeth[-1]
        self.shelf = shelf
        self.idler = idler
        self.idler_floor = self.low if idler else 0
        self.s = largest_ratio
        self.best: tuple[int, tuple, int | None] | None = None
        self.bound = 0.0
        self.collect: list | None = None
        self.keep: int | None = None
        self.powers = [(largest_ratio.numerator ** j, largest_ratio.denominator ** j, self.low ** j, self.high ** j)
                       for j in range(k + 1)]
        self.partners: dict[int, list[int]] = {}

    def partners_of(self, d: int) -> list[int]:
        """Driven counts a driver ``d`` may mesh with (ratio and hunting), ascending."""
        found = self.partners.get(d)
        if found is None:
            r = self.limits.max_stage_ratio  # d / R <= n <= d R, in integers
            first = bisect_left(self.teeth, -(-d * r.denominator // r.numerator))
            last = bisect_right(self.teeth, d * r.numerator // r.denominator)
            found = list(self.teeth[first:last])
            if self.limits.hunting:
                found = [n for n in found if gcd(n, d) == 1]
            self.partners[d] = found
        return found

    def idler_for(self, used: Counter) -> int | None:
        if self.shelf is None:
            return self.low
        return next((z for z in sorted(self.shelf) if self.shelf[z] > used[z]), None)

    def fits(self, used: Counter) -> bool:
        return self.shelf is None or all(self.shelf[z] >= n for z, n in used.items())

    def possible(self, p: int, q: int, j: int, least_driver: int, spent: int) -> bool:
        """Whether ``j`` more stages (drivers >= least_driver) can split p, q within the bound."""
        if j == 0:
            return p == 1 and q == 1
        s_num, s_den, low, high = self.powers[j]
        if p < least_driver ** j or p > high or q < low or q > high:
            return False
        if p * s_den > s_num * q or q * s_den > s_num * p:
            return False
        return spent + j * (p ** (1 / j) + q ** (1 / j)) * (1 - 1e-12) + self.idler_floor <= self.bound

    def leaf(self, stages: list[tuple[int, int]], spent: int) -> None:
        used = Counter(z for stage in stages for z in stage)
        if not self.fits(used):
            return
        idler = self.idler_for(used) if self.idler else None
        if self.idler and idler is None:
            return
        total = spent + (idler or 0)
        key = tuple(stages)
        if self.collect is not None:
            if total <= self.bound:
                heapq.heappush(self.collect, (-total, tuple((-d, -n) for d, n in key), key, idler))
                if self.keep is not None and len(self.collect) > self.keep:
                    heapq.heappop(self.collect)  # the worst (most teeth, then last stages) leaves
                if self.keep is not None and len(self.collect) == self.keep:
                    self.bound = -self.collect[0][0]  # only as few teeth as the worst held can still enter
            return
        if total <= self.bound and (self.best is None or (total, key) < (self.best[0], self.best[1])):
            self.best = (total, key, idler)
            self.bound = total

    def walk(self, p: int, q: int, j: int, stages: list[tuple[int, int]], spent: int) -> None:
        last_d, last_n = stages[-1] if stages else (0, 0)
        if j == 1:
            if p in self.members and q in self.members and (p, q) >= (last_d, last_n) \
                    and stage_allowed(p, q, self.limits):
                self.leaf(stages + [(p, q)], spent + p + q)
            return
        s_num, s_den = self.powers[j - 1][:2]
        for d in self.teeth[bisect_left(self.teeth, last_d):]:
            if d ** j > p:
                break
            if p % d:
                continue
            rest_p = p // d
            partners = self.partners_of(d)
            # what is left must keep a ratio j - 1 stages reach: q / n within rest_p * s^-(j-1) .. rest_p * s^(j-1)
            first = bisect_left(partners, q * s_den / (rest_p * s_num) * (1 - 1e-12))
            last = bisect_right(partners, q * s_num / (rest_p * s_den) * (1 + 1e-12))
            for n in partners[first:last]:
                if q % n or (d == last_d and n < last_n):
                    continue
                rest_q = q // n
                if self.possible(rest_p, rest_q, j - 1, d, spent + d + n):
                    self.walk(rest_p, rest_q, j - 1, stages + [(d, n)], spent + d + n)


class Splitter(_Splitter):
    """:func:`best_split` for many products under one set of limits (the stage tables are kept)."""

    def best_for(self, p: int, q: int, bound: float) -> tuple[int, tuple, int | None] | None:
        """As :func:`best_split` for ``p``, ``q`` and ``bound``."""
        self.best, self.bound = None, bound
        if self.possible(p, q, self.k, self.low, 0):
            self.walk(p, q, self.k, [], 0)
        return self.best

    def best_of(self, pairs) -> tuple[int, tuple, int | None] | None:
        """The fewest-teeth train (then the first stages) over the product pairs ``(p, q)`` of one ratio.

        Pairs go lightest :func:`teeth_bound` first, each split within the best total so far; any order
        gives the same train (each split is exhaustive up to its bound), the bound's only cuts the work.
        """
        best = None
        for bound, p, q in sorted((teeth_bound(p, q, self.k, self.low), p, q) for p, q in pairs):
            limit = math.inf if best is None else best[0]
            if bound + self.idler_floor > limit:
                break
            found = self.best_for(p, q, limit)
            if found is not None and (best is None or found[:2] < best[:2]):
                best = found
        return best

    def every_for(self, p: int, q: int, bound: float, keep: int | None = None) -> list[tuple[int, tuple, int | None]]:
        """Every train of ``k`` stages with products ``p``, ``q`` and at most ``bound`` teeth, fewest first.

        With ``keep``, only the first ``keep`` of them (fewest teeth, then stages); the bound
        tightens as they are found.
        """
        self.best, self.bound, self.collect, self.keep = None, bound, [], keep
        try:
            if self.possible(p, q, self.k, self.low, 0):
                self.walk(p, q, self.k, [], 0)
            return sorted((-total, key, idler) for total, _, key, idler in self.collect)
        finally:
            self.collect, self.keep = None, None


def best_split(p: int, q: int, k: int, limits: Limits, bound: float, *, shelf: Counter | None = None,
               idler: bool = False, largest_ratio: Fraction | None = None) -> tuple[int, tuple, int | None] | None:
    """The fewest-teeth train of ``k`` stages with driver product ``p`` and driven product ``q``.

    Parameters
    ----------
    p, q : int
        Products of the driver and of the driven tooth counts.
    k : int
        Number of stages.
    limits : Limits
    bound : float
        Only trains of at most this many teeth (idler included) are wanted.
    shelf : Counter, optional
        Gears on the shelf (each used once).
    idler : bool
        Whether the train needs an idler (the smallest the shelf still holds).
    largest_ratio : Fraction, optional
        The largest allowed stage ratio (from :func:`gearcad.ratio.reach.largest_stage_ratio`).

    Returns
    -------
    (total teeth, stages, idler) or None
        Stages sorted by (driver, driven); among equal totals the
        lexicographically first stages.
    """
    if largest_ratio is None:
        from .reach import largest_stage_ratio

        largest_ratio = largest_stage_ratio(limits)
        if largest_ratio is None:
            return None
    return Splitter(k, limits, shelf, idler, largest_ratio).best_for(p, q, bound)
