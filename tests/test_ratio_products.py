"""Product sets of tooth counts: the boolean-map and bit-sieve paths against numpy's own np.unique (reference)."""

import numpy as np
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
