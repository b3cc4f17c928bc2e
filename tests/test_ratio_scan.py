"""The streaming candidate scan gives every pair the sorted product search gives, at any target and width.

Sources: the sorted search (every product of k tooth counts listed by numpy and
searched by bisection) as the reference for the window ``|P / (T Q) - 1| <= eps``,
itself checked against the exhaustive enumeration in tests/test_ratio_optimality.py;
and the exhaustive reference for whole searches at targets below 1.
"""

from __future__ import annotations

import numpy as np
import pytest

from gearcad.ratio import make_limits, parse_target, solve_compound
from gearcad.ratio.candidates import ScanCandidates, SortedCandidates
from gearcad.ratio.products import product_set, products_upto
from test_ratio_optimality import exhaustive

TEETH = range(10, 41)


def pairs(p, q):
    return set(zip(p.tolist(), q.tolist()))


@pytest.mark.parametrize("k", [3, 4])
@pytest.mark.parametrize("target, exact", [(0.0123, None), (0.3, None), (7.7, None), (1 / 27, (1, 27)), (20.0, (20, 1))])
@pytest.mark.parametrize("span", [0.2, 1.5, 6.0])  # eps times the largest product: one integer, a few, several
def test_scan_window_equals_sorted_window(k, target, exact, span):
    high = max(TEETH) ** k
    ratio_range = (1 / 6 ** k, 6.0 ** k)
    eps = span / high
    scan = ScanCandidates(TEETH, k, target, ratio_range, exact)
    sorted_ = SortedCandidates(TEETH, k, target, ratio_range, exact)
    products = set(product_set(TEETH, k).tolist())
    got = {(p, q) for p, q in pairs(*scan.within(eps)) if p in products and q in products}
    assert got == pairs(*sorted_.within(eps))  # the sorted search is the reference


@pytest.mark.parametrize("upto", [10_000, 123_457, 40 ** 4])
def test_products_upto_is_the_listed_set_cut(upto):
    full = product_set(TEETH, 4)
    assert np.array_equal(products_upto(TEETH, 4, upto), full[full <= upto])


@pytest.mark.parametrize("expression", ["0.0123", "1/27", "0.00081", "3/7000"])
def test_targets_below_one_match_exhaustive(expression):
    target = parse_target(expression)
    for k, limits in ((3, make_limits(10, 24)), (4, make_limits(10, 16, 8))):
        found = solve_compound(target, k, limits, 4, method="scan")
        assert [(t.numerator, t.denominator, t.total_teeth) for t in found] == exhaustive(target, k, limits, 4)
