"""Exact search of one- and two-stage trains in pure Python (no numpy): the common small case.

A train of ``k`` stages has ratio ``P / Q``, ``P`` and ``Q`` products of
``k`` tooth counts.  For ``k <= 2`` the sorted set of such products is small
(about 4,000 over 10-120 teeth), so the pairs can be taken best first without
arrays:

1. for every driven product ``Q`` the driver products just below and just
   above ``T Q`` (bisection) enter a heap keyed by the float error
   ``|P / (T Q) - 1|``; popping a pair pushes the next one outwards on that
   side, so pairs leave the heap in order of float error, each once;
2. pairs are popped in runs that end where the next float error lies more
   than ``CLUSTER`` (1e-12) beyond the last (far above float rounding, ~1e-15,
   so every pair of one reduced ratio falls in one run and no exact error
   crosses a split); a run is grouped by reduced ratio and the groups ranked
   by their exact error (rational arithmetic against the target), then by
   ratio;
3. each group's fewest-teeth train comes from the exact split of its pairs
   (:meth:`gearcad.ratio.split.Splitter.best_of`, as in the general search);
4. the search stops at the first group strictly worse than the ``count``-th
   train found (or worse than the cap).

The order and the trains are those of the general window search
(:mod:`gearcad.ratio.windows`); ``tests/test_ratio_small.py`` holds the two
equal over random targets and limits.  The point is start-up: ``gearcad ratio
X --stages 2`` loads neither numpy nor sympy.
"""

from __future__ import annotations

import heapq
import math
from bisect import bisect_left
from fractions import Fraction

from .limits import Limits
from .split import Splitter
from .target import Target
from .train import Train, exact_relative_error, make_train

__all__ = ["small_enough", "search_small", "SMALL_LIMIT", "CLUSTER"]

#: Most multisets of ``k`` tooth counts (products on one side) the pure search takes (10-120 teeth at 2 stages:
#: 6,216); beyond it numpy's window search is the faster (near an end of the reach the pure search pays a split for
#: every pair that no pair of stages realises: 0.1 s at 10-150 teeth, 0.3 s at 10-200).
SMALL_LIMIT = 8_000
#: Float errors closer than this are ranked together exactly (float error of an error is ~1e-15).
CLUSTER = 1e-12


def small_enough(k: int, limits: Limits) -> bool:
    """Whether the pure search serves ``k`` stages under ``limits`` (one or two stages, few products)."""
    return k <= 2 and math.comb(len(limits.teeth) + k - 1, k) <= SMALL_LIMIT


def _products(teeth: tuple[int, ...], k: int) -> list[int]:
    if k == 1:
        return list(teeth)
    return sorted({a * b for i, a in enumerate(teeth) for b in teeth[i:]})


class _Pairs:
    """Pairs ``(P, Q)`` of products with ``low <= P / Q <= high``, in order of float error (a heap)."""

    def __init__(self, products: list[int], value: float, low: float, high: float) -> None:
        self.products, self.value, self.low, self.high = products, value, low, high
        heap = []
        for j, q in enumerate(products):
            x = value * q
            i = bisect_left(products, x)
            if i < len(products) and products[i] <= high * q:
                heap.append((products[i] / x - 1.0, i, j, 1))
            if i > 0 and products[i - 1] >= low * q:
                heap.append((1.0 - products[i - 1] / x, i - 1, j, -1))
        heapq.heapify(heap)
        self.heap = heap

    def peek(self) -> float | None:
        return self.heap[0][0] if self.heap else None

    def pop(self) -> tuple[float, int, int]:
        """The next pair as ``(float error, P, Q)``; its successor on that side enters the heap."""
        error, i, j, step = heapq.heappop(self.heap)
        products = self.products
        q = products[j]
        n = i + step
        if 0 <= n < len(products) and self.low * q <= products[n] <= self.high * q:
            heapq.heappush(self.heap, (abs(products[n] / (self.value * q) - 1.0), n, j, step))
        return error, products[i], q


def search_small(target: Target, k: int, limits: Limits, count: int, splitter: Splitter,
                 span: tuple[Fraction, Fraction], cap: Fraction | None = None) -> list[Train]:
    """The best ``count`` distinct ratios of ``k`` stages, each by its fewest-teeth train, best first.

    Parameters
    ----------
    target : Target
        Within ``span``.
    k : int
        1 or 2 (see :func:`small_enough`).
    limits : Limits
    count : int
    splitter : Splitter
        Splits a pair of products into stages under the limits.
    span : (Fraction, Fraction)
        Least and greatest ratio of any train of ``k`` stages.
    cap : Fraction, optional
        Trains worse than this |relative error| are left out.

    Returns
    -------
    list of Train
        Sorted by |relative error| (exact), total teeth, ratio, stages.
    """
    pairs = _Pairs(_products(limits.teeth, k), target.value, float(span[0]) * (1 - 1e-14), float(span[1]) * (1 + 1e-14))
    found: list[tuple[Fraction, Train]] = []
    while pairs.peek() is not None:
        run = [pairs.pop()]
        while pairs.peek() is not None and pairs.peek() - run[-1][0] <= CLUSTER:
            run.append(pairs.pop())
        groups: dict[tuple[int, int], list[tuple[int, int]]] = {}
        for _, p, q in run:
            g = math.gcd(p, q)
            groups.setdefault((p // g, q // g), []).append((p, q))
        ranked = sorted(((abs(exact_relative_error(num, den, target)), Fraction(num, den), members)
                         for (num, den), members in groups.items()), key=lambda item: item[:2])
        for error, _, members in ranked:
            if len(found) >= count and error > sorted(e for e, _ in found)[count - 1]:
                return _results(found, count)
            if cap is not None and error > cap:
                return _results(found, count)
            best = splitter.best_of(members)
            if best is not None:
                found.append((error, make_train(best[1], target, best[2])))
    return _results(found, count)


def _results(found: list[tuple[Fraction, Train]], count: int) -> list[Train]:
    ranked = sorted(found, key=lambda item: (item[0], item[1].total_teeth, item[1].fraction, item[1].stages))
    return [train for _, train in ranked[:count]]
