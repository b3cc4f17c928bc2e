"""Candidate pairs (P, Q): driver and driven products whose quotient lies near the target.

Two exact generators, both returning *every* pair ``(P, Q)`` of products of
``k`` allowed tooth counts with ``|P / (T Q) - 1| <= eps`` (plus a small float
margin), where ``T`` is the target:

* :class:`SortedCandidates` keeps the sorted set of products and finds, for
  every driven product ``Q``, the range of driver products within the window
  by binary search (numpy ``searchsorted``, vectorised over all ``Q``).
* :class:`ScanCandidates` never builds the (large) set of ``k``-products.  It
  streams every product of the smaller side (``Q`` for a target of 1 or more,
  else ``P``) and tries the few integers of the other side that lie in the
  window (only ``round(T Q)`` while ``eps * P < 1/2``); those are screened for
  having no prime factor above the largest tooth count (a vectorised test) and
  later split into tooth counts exactly.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np

from .products import product_blocks, product_set, product_tails, products_upto, smooth_mask

__all__ = ["SortedCandidates", "ScanCandidates", "FLOAT_MARGIN", "Progress", "not_exact", "unique_pairs"]

#: Relative float margin added to every window (float products are good to ~1e-16).
FLOAT_MARGIN = 1e-14
#: The scan tries every integer of a window while eps times the largest product is below this.
MAX_SPAN = 40.0
#: Four-stage scans whose streamed products stay below this list them once (a bit sieve of 32 MB at most).
DISTINCT_LIMIT = 1 << 28
_DISTINCT_BLOCK = 1 << 16
_SCREEN_BATCH = 1 << 20
#: Most raw candidates one scan round may produce (bounds its time; memory is per block, screened at once).
MAX_RAW = 2e7
#: Edges (log-spaced) at which the sums of streamed products are known (they size the windows).
_EDGES = 96
#: Largest denominator of an exact target whose quantum (1 / v) prunes the stream (float rounding stays far below it).
_QUANTUM_DENOMINATOR = 100_000
Progress = Callable[[float], None]


def unique_pairs(p: np.ndarray, q: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The distinct (p, q) pairs, sorted by p then q."""
    if len(p) == 0:
        return p, q
    if int(p.max()) < 2 ** 31 and int(q.max()) < 2 ** 31 and int(p.min()) >= 0 and int(q.min()) >= 0:
        packed = np.sort((p << 31) | q)  # one int64 key per pair: a 1-D sort, much faster than lexsort
        first = np.ones(len(packed), dtype=bool)
        first[1:] = packed[1:] != packed[:-1]
        packed = packed[first]
        return packed >> 31, packed & (2 ** 31 - 1)
    order = np.lexsort((q, p))
    p, q = p[order], q[order]
    first = np.ones(len(p), dtype=bool)
    first[1:] = (p[1:] != p[:-1]) | (q[1:] != q[:-1])
    return p[first], q[first]


def not_exact(p: np.ndarray, q: np.ndarray, exact: tuple[int, int] | None) -> np.ndarray:
    """Mask of pairs whose ratio is not exactly ``exact = (a, b)`` (all True without it)."""
    if exact is None or len(p) == 0:
        return np.ones(len(p), dtype=bool)
    a, b = exact
    if a > int(p.max()) or b > int(q.max()):  # no multiple of a/b lies among these pairs
        return np.ones(len(p), dtype=bool)
    if max(a, b) * max(int(p.max()), int(q.max())) >= 2 ** 62:  # rare hits; int64 would overflow
        return np.array([int(x) * b != a * int(y) for x, y in zip(p, q)], dtype=bool)
    return p * b != a * q


@dataclass
class SortedCandidates:
    """Window search over the sorted set of ``k``-products."""

    teeth: Sequence[int]
    k: int
    target: float
    ratio_range: tuple[float, float]
    exact: tuple[int, int] | None = None

    def __post_init__(self) -> None:
        self.products = product_set(self.teeth, self.k)
        self.floats = self.products.astype(float)

    def nearest_errors(self, stride: int = 1) -> np.ndarray:
        """For every ``stride``-th driven product, the least non-zero |relative error| of its nearest drivers.

        Only sizes the first windows (so errors below 1e-14, exact hits, are passed over; a sample
        of the driven products is enough for that).
        """
        wanted = self.floats[::stride] * self.target
        index = np.searchsorted(self.floats, wanted)
        best = np.full(len(wanted), np.inf)
        for shift in (-2, -1, 0, 1):
            at = np.clip(index + shift, 0, len(self.floats) - 1)
            error = np.abs(self.floats[at] / wanted - 1)
            best = np.where(error > 1e-14, np.minimum(best, error), best)
        return best

    def within(self, eps: float, progress: Progress | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Every (P, Q) with |P/(T Q) - 1| <= eps (and a margin), inside the ratio range."""
        q = self.floats
        lo_ratio, hi_ratio = self.ratio_range
        lower = np.maximum(q * self.target * (1 - eps - FLOAT_MARGIN), q * lo_ratio * (1 - FLOAT_MARGIN))
        upper = np.minimum(q * self.target * (1 + eps + FLOAT_MARGIN), q * hi_ratio * (1 + FLOAT_MARGIN))
        first = np.searchsorted(self.floats, lower, "left")
        last = np.searchsorted(self.floats, upper, "right")
        counts = np.maximum(last - first, 0)
        q_index = np.repeat(np.arange(len(q)), counts)
        starts = np.cumsum(counts) - counts
        p_index = first[q_index] + (np.arange(counts.sum()) - starts[q_index])
        p, q = self.products[p_index], self.products[q_index]
        keep = not_exact(p, q, self.exact)
        return p[keep], q[keep]

    def max_eps(self) -> float:
        """An eps that takes in every pair of the ratio range."""
        lo_ratio, hi_ratio = self.ratio_range
        return max(hi_ratio / self.target - 1, 1 - lo_ratio / self.target) + 1e-9


@dataclass
class ScanCandidates:
    """Streaming search that needs no set of ``k``-products (see module notes).

    The side of the ratio with the smaller products is streamed: for a target
    below 1 the driver products ``P`` are streamed and the integers ``Q`` near
    ``P / T`` computed (the window ``|P / (T Q) - 1| <= eps`` reads
    ``|P/T - Q| <= eps Q`` either way), which keeps the stream as short for
    ``1/T`` as for ``T``.  While ``eps`` times the largest product stays below
    :data:`MAX_SPAN` every integer of the window is tried (a few per streamed
    product), so the scan can go on where one integer per product no longer
    suffices; the computed side is screened for prime factors above the largest
    tooth count in each block, so memory stays small.
    """

    teeth: Sequence[int]
    k: int
    target: float
    ratio_range: tuple[float, float]
    exact: tuple[int, int] | None = None

    def __post_init__(self) -> None:
        self.swap = self.target < 1
        self.t = 1 / self.target if self.swap else self.target
        self.largest = max(self.teeth)
        self.p_min, self.p_max = min(self.teeth) ** self.k, self.largest ** self.k
        self.q_range = (self.p_min / self.t * (1 - 1e-6), self.p_max / self.t * (1 + 1e-6))
        self.quantum = self._quantum()
        self.distinct = None
        low, high = self.q_range
        self.edges = np.geomspace(max(low, 1.0), high, _EDGES)
        if self.k == 4 and high <= DISTINCT_LIMIT:  # few enough to list once, each product once
            found = products_upto(self.teeth, self.k, int(high))
            self.distinct = found[found >= low]
            prefix = np.concatenate([[0], np.cumsum(self.distinct)])  # int64: at most ~1e7 products below 2^28
            self.tails = (prefix[-1] - prefix[np.searchsorted(self.distinct, self.edges)]).astype(float)
        else:
            self.tails = product_tails(self.teeth, self.k, self.edges)
        self.tails = np.maximum(self.tails - self.tails[-1], 0.0)  # the products up to the range's top only

    def _quantum(self) -> float:
        """The least ``|x - C|`` of a pair not of the exact ratio (``x = t E``), or 0 when unknown.

        With the exact ratio settled apart, ``t = u / v`` in lowest terms and
        ``x - C = (E u - C v) / v``, a non-zero integer over ``v``: at least ``1 / v``.
        A window ``|x - C| <= eps C`` then holds only pairs with ``C >= 1 / (v eps)``, so
        the stream starts there (:meth:`least_streamed`).  Used while float rounding of
        ``x`` (below 1e-6) stays far under ``1 / v``.
        """
        if self.exact is None:
            return 0.0
        a, b = self.exact
        v = a if self.swap else b
        return 1.0 / v if v <= _QUANTUM_DENOMINATOR else 0.0

    def least_streamed(self, eps: float) -> float:
        """The least streamed product that can give a pair within ``eps`` (see :meth:`_quantum`)."""
        if self.quantum == 0.0:
            return self.q_range[0]
        # |x - C| <= (eps + margin) C + 1e-9 and C <= x (1 + 2 eps) + 1: a generous lower bound of x
        x_least = (self.quantum - 2e-9) / ((eps + FLOAT_MARGIN) * (1 + 2 * eps)) - 1
        return max(self.q_range[0], x_least / self.t * (1 - 1e-9))

    def _streamed(self, least: float):
        """The streamed products from ``least`` on as (rows, cols) blocks: each product is ``rows[i] * cols[j]``."""
        if self.distinct is None:
            yield from product_blocks(self.teeth, self.k, (least, self.q_range[1]))
            return
        one = np.ones(1, dtype=np.int64)
        first = int(np.searchsorted(self.distinct, least))
        for start in range(first, len(self.distinct), _DISTINCT_BLOCK):
            yield self.distinct[start:start + _DISTINCT_BLOCK], one

    def streamed_sum(self, least: float) -> float:
        """About the sum of the streamed products from ``least`` on (the tail sums, interpolated)."""
        return float(np.interp(math.log(max(least, 1.0)), np.log(self.edges), self.tails))

    def raw_estimate(self, eps: float) -> float:
        """About how many raw candidates a window of ``eps`` gives: ``2 eps x`` integers per streamed product."""
        return 2 * eps * self.t * self.streamed_sum(self.least_streamed(eps))

    def eps_for_budget(self, count: float) -> float:
        """An eps that yields about ``count`` raw candidates (bisection of :meth:`raw_estimate`)."""
        low, high = 1e-18, 1.0
        if self.raw_estimate(high) <= count:
            return high
        for _ in range(80):
            mid = math.sqrt(low * high)
            if self.raw_estimate(mid) <= count:
                low = mid
            else:
                high = mid
        return low

    def usable(self, eps: float) -> bool:
        """Whether the scan may take ``eps``: a few integers per product, and a bounded number of raw candidates."""
        return eps * self.p_max < MAX_SPAN and self.raw_estimate(eps) <= MAX_RAW

    def within(self, eps: float, progress: Progress | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Every (P, Q) with |P/(T Q) - 1| <= eps whose computed side is smooth; see :meth:`usable`."""
        found_p, found_q = [], []
        pending: list[tuple[np.ndarray, np.ndarray, np.ndarray]] = []
        waiting = 0

        def screen() -> None:  # in batches: the screen's cost per call outweighs its cost per value
            p, q, c = (np.concatenate(parts) for parts in zip(*pending))
            keep = smooth_mask(c, self.largest)
            found_p.append(p[keep])
            found_q.append(q[keep])
            pending.clear()

        least = self.least_streamed(eps)
        total, done = max(self.streamed_sum(least), 1.0), 0.0
        for rows, cols in self._streamed(least):
            hits = self._block_hits(rows, cols, eps)
            pending.append(hits)
            waiting += len(hits[0])
            if waiting >= _SCREEN_BATCH:
                screen()
                waiting = 0
            if progress is not None:  # the share of the streamed products' sum done
                done += float(rows.sum()) * float(cols.sum())
                progress(min(1.0, done / total))
        if pending:
            screen()
        if not found_p:
            return np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64)
        return unique_pairs(np.concatenate(found_p), np.concatenate(found_q))

    def _block_hits(self, rows: np.ndarray, cols: np.ndarray, eps: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Pairs of one block: every integer ``C`` within ``eps C`` of ``t E`` (``E`` a streamed product).

        Returns ``(P, Q, C)``, the computed side ``C`` still to be screened for smoothness.
        """
        x = np.multiply.outer(rows * self.t, cols.astype(float)).ravel()
        width = len(cols)
        gap = self.quantum / 2  # pairs of the exact ratio (settled apart) lie closer than this, all others farther
        if eps * (float(x.max()) if x.size else 0.0) < 0.45:  # one integer per product can lie in the window
            nearest = np.rint(x)
            limit = nearest * (eps + FLOAT_MARGIN)
            limit += 1e-9
            np.subtract(x, nearest, out=x)
            np.abs(x, out=x)
            inside = x <= limit
            if gap:
                inside &= x > gap
            at = np.flatnonzero(inside)
            c = nearest[at]
        else:  # every integer of [x - w, x + w] (w bounds eps C from above), listed without a loop over offsets
            w = x * (eps * (1 + 2 * eps) + FLOAT_MARGIN) + 1e-9
            low, high = np.ceil(x - w), np.floor(x + w)
            counts = np.maximum(high - low + 1, 0).astype(np.int64)
            owner = np.repeat(np.arange(len(x)), counts)
            c = low[owner] + (np.arange(len(owner)) - np.repeat(np.cumsum(counts) - counts, counts))
            distance = np.abs(c - x[owner])
            inside = distance <= c * (eps + FLOAT_MARGIN) + 1e-9
            if gap:
                inside &= distance > gap
            keep = np.flatnonzero(inside)
            at, c = owner[keep], c[keep]
        found_c, found_e = [c.astype(np.int64)], [rows[at // width] * cols[at % width]]
        c, e = np.concatenate(found_c), np.concatenate(found_e)
        p, q = (e, c) if self.swap else (c, e)
        lo_ratio, hi_ratio = self.ratio_range
        keep = ((c >= self.p_min) & (c <= self.p_max)
                & (p >= q * lo_ratio * (1 - FLOAT_MARGIN)) & (p <= q * hi_ratio * (1 + FLOAT_MARGIN)))
        p, q, c = p[keep], q[keep], c[keep]
        keep = not_exact(p, q, self.exact)  # first: at a whole-number target most hits are exact (settled apart)
        return p[keep], q[keep], c[keep]
