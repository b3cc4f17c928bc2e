"""Product sets of tooth counts: the boolean-map and bit-sieve paths against numpy's own np.unique (reference)."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gearcad.ratio.products import product_set, sieve_square_products


def reference(teeth, k):
    base = np.array(sorted(set(teeth)), dtype=np.int64)
    out = np.ones(1, dtype=np.int64)
    for _ in range(k):
        out = np.unique(np.multiply.outer(out, base).ravel())
    return out


@settings(max_examples=60, deadline=None)
@given(st.lists(st.integers(4, 400), min_size=1, max_size=40), st.integers(1, 3))
def test_product_sets_are_numpys_unique_products(teeth, k):
    got = product_set(teeth, k)
    assert got.dtype == np.int64 and np.array_equal(got, reference(teeth, k))


def test_the_bit_sieve_gives_the_same_square_products():
    values = product_set(range(10, 61), 2)
    assert np.array_equal(sieve_square_products(values, segment_bits=1 << 16), reference(range(10, 61), 4))


def _trial_division_smooth(value, largest):
    """Reference: divide out every integer 2..largest by plain trial division (no numpy)."""
    for p in range(2, largest + 1):
        while value % p == 0:
            value //= p
    return value == 1


@settings(max_examples=40, deadline=None)
@given(st.lists(st.integers(1, 2 ** 34), min_size=1, max_size=60), st.integers(1, 220))
def test_smooth_mask_is_trial_division(values, largest):
    # both paths: below 2^32 (multiplication by inverses) and above (int64 remainders)
    from gearcad.ratio.products import smooth_mask

    for chunk in (values, [v % (2 ** 32 - 1) + 1 for v in values]):
        expected = [_trial_division_smooth(v, largest) for v in chunk]
        assert smooth_mask(np.array(chunk, dtype=np.int64), largest).tolist() == expected


@pytest.mark.parametrize("k, low, high", [(2, 10, 40), (3, 10, 30), (4, 10, 18), (3, 20, 60)])
def test_factor_sum_bounds_are_lower_bounds_of_the_fewest_teeth(k, low, high):
    # reference: every multiset of k counts listed (itertools), its product and its least sum
    from itertools import combinations_with_replacement

    from gearcad.ratio.products import factor_sum_bounds

    least = {}
    for counts in combinations_with_replacement(range(low, high + 1), k):
        product = int(np.prod(counts))
        least[product] = min(least.get(product, 10 ** 9), sum(counts))
    values = np.arange(low ** k, high ** k + 1, max(1, (high ** k - low ** k) // 20000))
    splits, bound = factor_sum_bounds(np.concatenate([values, list(least)]), k, low, high)
    for value, ok, b in zip(np.concatenate([values, list(least)]).tolist(), splits.tolist(), bound.tolist()):
        if value in least:
            assert ok and b <= least[value]
        elif not _trial_division_smooth(value, high):
            assert not ok
