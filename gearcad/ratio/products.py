"""Products of tooth counts: sorted product sets, row-wise product streams, factorizations.

A train of ``k`` stages has ratio ``P / Q`` with ``P`` the product of the
``k`` driver tooth counts and ``Q`` that of the ``k`` driven ones.  The search
works on these products; this module builds them and splits them back into
tooth counts.
"""

from __future__ import annotations

import math
from typing import Iterator, Sequence

import numpy as np

__all__ = [
    "multiset_count", "product_set", "sieve_square_products", "products_upto", "product_blocks", "product_tails",
    "smooth_mask", "Factorizer", "sum_lower_bound", "factor_sum_bounds", "multiple_bounds",
]

#: Above this many elements per side a product set is built by a bit sieve, not by sorting.
_SORT_LIMIT = 8_000_000


def multiset_count(n: int, k: int) -> int:
    """Number of multisets of ``k`` elements from ``n`` kinds: C(n + k - 1, k)."""
    return math.comb(n + k - 1, k) if k > 0 else 1


_BITMAP_LIMIT = 1 << 25  # products below this are deduplicated by marking a boolean map (32 MB at most)


def _outer_unique(left: np.ndarray, right: np.ndarray) -> np.ndarray:
    """Sorted distinct products ``l * r``: by a boolean map when they are small, else by sorting."""
    products = np.multiply.outer(left, right).ravel()
    top = int(left[-1]) * int(right[-1])
    if top < _BITMAP_LIMIT and int(left[0]) > 0 and int(right[0]) > 0:
        seen = np.zeros(top + 1, dtype=bool)
        seen[products] = True
        return np.flatnonzero(seen).astype(np.int64)
    products.sort()  # sort and drop repeats (numpy's hash-based unique is slower on these arrays)
    first = np.ones(len(products), dtype=bool)
    first[1:] = products[1:] != products[:-1]
    return products[first]


def sieve_square_products(values: np.ndarray, segment_bits: int = 1 << 30, upto: int | None = None) -> np.ndarray:
    """Sorted distinct products ``a * b`` of a sorted array with itself (at most ``upto``), by a bit sieve.

    Used instead of sorting when the products are many: it marks each product
    in a bitmap (segment by segment, so memory stays at ``segment_bits / 8``
    bytes) and reads the set bits back in order.
    """
    low, high = int(values[0]) ** 2, int(values[-1]) ** 2
    if upto is not None:
        high = min(high, int(upto))
    if high < low:
        return np.zeros(0, dtype=np.int64)
    masks = (np.uint8(1) << np.arange(8, dtype=np.uint8))
    rows = np.arange(len(values))
    found = []
    for start in range(low, high + 1, segment_bits):
        stop = min(start + segment_bits, high + 1)
        bits = np.zeros((stop - start + 7) // 8, np.uint8)
        first = np.maximum(rows, np.searchsorted(values, -(-start // values)))
        last = np.searchsorted(values, (stop - 1) // values, "right")
        for i in np.flatnonzero(last > first).tolist():
            offsets = values[first[i]:last[i]] * values[i] - start
            bits[offsets >> 3] |= masks[offsets & 7]  # one row never hits a byte twice (steps >= 8)
        nonzero = np.flatnonzero(bits)
        at = np.flatnonzero(np.unpackbits(bits[nonzero], bitorder="little"))  # 1-D: far faster than a 2-D nonzero
        found.append(nonzero[at >> 3] * 8 + (at & 7) + start)
    return np.concatenate(found)


def product_set(teeth: Sequence[int], k: int) -> np.ndarray:
    """Sorted distinct products of ``k`` tooth counts (repetition allowed), int64."""
    base = np.asarray(sorted(set(teeth)), dtype=np.int64)
    if k == 0:
        return np.ones(1, dtype=np.int64)
    if k == 4 and multiset_count(len(base), 4) > _SORT_LIMIT and min(base) >= 8:
        return sieve_square_products(product_set(base, 2))
    result = base
    for _ in range(k - 1):
        result = _outer_unique(result, base)
    return result


def products_upto(teeth: Sequence[int], k: int, upto: int) -> np.ndarray:
    """Sorted distinct products of ``k`` tooth counts that are at most ``upto``."""
    if k == 4:
        return sieve_square_products(product_set(teeth, 2), upto=upto)
    found = product_set(teeth, k)
    return found[found <= upto]


def _split(k: int) -> tuple[int, int]:
    return k // 2, k - k // 2


def product_blocks(teeth: Sequence[int], k: int, q_range: tuple[float, float] = (0.0, math.inf),
                   block: int = 1 << 17) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """Every product of ``k`` tooth counts within ``q_range``, possibly repeated, as outer-product blocks.

    Yields ``(rows, cols)``: the products of the block are ``rows[i] * cols[j]``
    (``rows`` are products of ``k // 2`` counts, ``cols`` of the rest).  Each
    product of ``k`` counts within ``q_range`` appears at least once over all
    blocks (blocks may also hold products outside the range).
    """
    k1, k2 = _split(k)
    left, right = product_set(teeth, k1), product_set(teeth, k2)
    low, high = q_range
    same = k1 == k2
    step = max(1, block // max(1, len(right)))
    for r0 in range(0, len(left), step):
        rows = left[r0:r0 + step]
        cols = right[r0:] if same else right
        cols = cols[np.searchsorted(cols, low / rows[-1], "left"):np.searchsorted(cols, high / rows[0], "right")]
        rows = rows[rows * cols[0] <= high] if len(cols) else rows[:0]
        if len(rows) and len(cols):
            yield rows, cols


def product_tails(teeth: Sequence[int], k: int, edges: np.ndarray) -> np.ndarray:
    """For each of the ascending ``edges``, about the sum of the products at least that large that
    :func:`product_blocks` yields (each product of its two halves once; for sizing a search).

    The halves are sorted, so for each left half the right halves above an edge are a
    suffix: one vectorised bisection over every (left half, edge) and prefix sums.
    """
    k1, k2 = _split(k)
    left, right = product_set(teeth, k1).astype(float), product_set(teeth, k2).astype(float)
    suffix = np.concatenate([np.cumsum(right[::-1])[::-1], [0.0]])  # suffix[j]: sum of right[j:]
    first = np.searchsorted(right, np.divide.outer(edges, left), "left")  # edges x left halves
    if k1 == k2:  # the halves of a product are taken in order (right index at least the left one)
        first = np.maximum(first, np.arange(len(left)))
    return (suffix[first] * left).sum(axis=1)


def smooth_mask(values: np.ndarray, largest_factor: int) -> np.ndarray:
    """True where every prime factor of ``values`` is at most ``largest_factor`` (False at values below 1)."""
    return _strip(values, largest_factor)[0] == 1


def _strip(values: np.ndarray, largest_factor: int) -> tuple[np.ndarray, np.ndarray]:
    """``(rest, top)``: each value with its prime factors up to ``largest_factor`` divided out, and the
    largest of those factors (1 if none)."""
    values = np.asarray(values)
    top = np.ones(len(values), dtype=np.int64)
    if len(values) and int(values.max()) < 2 ** 32 and int(values.min()) >= 1:
        return _strip_32(values.astype(np.uint32), largest_factor, top), top
    rest = values.astype(np.int64).copy()
    for prime in _primes_up_to(largest_factor):
        at = np.flatnonzero(rest % prime == 0)  # one pass over all; then only the divisible ones again
        top[at] = prime
        while len(at):
            rest[at] //= prime
            at = at[rest[at] % prime == 0]
    return rest, top


def _strip_32(rest: np.ndarray, largest_factor: int, top: np.ndarray) -> np.ndarray:
    """:func:`_strip` of values from 1 to 2^32 - 1 (uint32, changed in place), without a division per prime.

    An odd ``p`` has an inverse ``p'`` modulo 2^32, and ``n`` is a multiple of ``p``
    exactly when ``n p' mod 2^32 <= (2^32 - 1) // p``, the product then being ``n / p``
    (the divisibility test by multiplication of Granlund and Montgomery, 1994); uint32
    products wrap modulo 2^32 by themselves.  Factors 2 go at once: ``n`` over its
    lowest set bit.
    """
    if largest_factor >= 2:
        lowest = rest & (~rest + np.uint32(1))
        top[lowest > 1] = 2
        rest //= lowest
    quotient = np.empty_like(rest)
    divisible = np.empty(len(rest), dtype=bool)
    for prime in _primes_up_to(largest_factor)[1:]:
        inverse, limit = np.uint32(pow(prime, -1, 1 << 32)), np.uint32((2 ** 32 - 1) // prime)
        np.multiply(rest, inverse, out=quotient)
        np.less_equal(quotient, limit, out=divisible)
        at = np.flatnonzero(divisible)
        top[at] = prime
        while len(at):
            rest[at] = quotient[at]
            quotient[at] = rest[at] * inverse
            at = at[quotient[at] <= limit]
    return rest


def factor_sum_bounds(values: np.ndarray, k: int, smallest: int, largest: int) -> tuple[np.ndarray, np.ndarray]:
    """``(splits, bound)``: whether each value may be a product of ``k`` factors from ``smallest`` to
    ``largest`` (no prime factor above ``largest``), and a lower bound of the sum of such factors.

    The bound is the larger of two: the factors' mean is at least their geometric mean
    (AM-GM) and at least ``smallest``; and the factor holding the largest prime ``L``
    is at least ``L``, the other ``k - 1`` as before, which is the stronger bound when
    ``L`` is above the ``k``-th root (the sum ``x + (k-1) (N/x)^(1/(k-1))`` grows with
    ``x`` from there).
    """
    values = np.asarray(values, dtype=np.int64)
    rest, top = _strip(values, largest)
    n = values.astype(float)
    bound = k * np.maximum(n ** (1 / k), smallest)
    if k >= 2:
        others = (k - 1) * np.maximum((n / top) ** (1 / (k - 1)), smallest)
        bound = np.maximum(bound, np.where(top >= n ** (1 / k), top + others, 0.0))
    return rest == 1, np.floor(bound * (1 - 1e-12))


def multiple_bounds(a: int, b: int, g: np.ndarray, k: int, smallest: int, largest: int) -> tuple[np.ndarray, np.ndarray]:
    """``(bounds, order)`` of the products ``(g a, g b)``: a lower bound of the teeth of any ``k``-stage
    train with those driver and driven products (:func:`factor_sum_bounds` of each side), and
    the multiples that may split at all, fewest bound first."""
    p_ok, p_bound = factor_sum_bounds(a * g, k, smallest, largest)
    q_ok, q_bound = factor_sum_bounds(b * g, k, smallest, largest)
    bounds = p_bound + q_bound
    candidates = np.flatnonzero(p_ok & q_ok)
    return bounds, candidates[np.argsort(bounds[candidates], kind="stable")]


def _primes_up_to(n: int) -> list[int]:
    sieve = bytearray([1]) * (n + 1)
    sieve[:2] = b"\x00\x00"
    for i in range(2, int(n ** 0.5) + 1):
        if sieve[i]:
            sieve[i * i::i] = bytearray(len(sieve[i * i::i]))
    return [i for i in range(n + 1) if sieve[i]]


def sum_lower_bound(product: int, k: int, smallest: int) -> int:
    """A lower bound of the sum of ``k`` factors >= ``smallest`` whose product is ``product``.

    By the inequality of arithmetic and geometric means, ``sum >= k * product^(1/k)``.
    """
    return max(k * smallest, math.floor(k * product ** (1.0 / k) * (1 - 1e-12)))


class Factorizer:
    """Splits a number into ``k`` allowed tooth counts (non-decreasing tuples), with a cache."""

    def __init__(self, teeth: Sequence[int]) -> None:
        self.teeth = tuple(sorted(set(teeth)))
        self.members = frozenset(self.teeth)
        self._cache: dict[tuple[int, int, int], tuple[tuple[int, ...], ...]] = {}

    def factorizations(self, number: int, k: int, start: int = 0) -> tuple[tuple[int, ...], ...]:
        """Every non-decreasing ``k``-tuple of allowed counts >= teeth[start] with product ``number``."""
        key = (number, k, start)
        cached = self._cache.get(key)
        if cached is None:
            cached = self._cache[key] = self._compute(number, k, start)
        return cached

    def _compute(self, number: int, k: int, start: int) -> tuple[tuple[int, ...], ...]:
        teeth = self.teeth
        if start >= len(teeth) or number < teeth[start] ** k or number > teeth[-1] ** k:
            return ()
        if k == 1:
            return ((number,),) if number in self.members else ()
        found = []
        for index in range(start, len(teeth)):
            factor = teeth[index]
            if factor ** k > number:
                break
            if number % factor == 0:
                found.extend((factor,) + rest for rest in self.factorizations(number // factor, k - 1, index))
        return tuple(found)

    def by_sum(self, number: int, k: int) -> list[tuple[int, tuple[int, ...]]]:
        """Factorizations as (sum, tuple), fewest teeth first."""
        return sorted((sum(f), f) for f in self.factorizations(number, k))
