"""A capped compound search (used by the worm search to skip what cannot enter its list) returns exactly the
uncapped search's trains within the cap (the uncapped search is held to the exhaustive reference elsewhere)."""

import pytest

from gearcad.ratio.compound import solve_compound
from gearcad.ratio.limits import make_limits
from gearcad.ratio.target import parse_target


def _key(trains):
    return [(t.numerator, t.denominator, t.total_teeth) for t in trains]


@pytest.mark.parametrize("k", [2, 3])
@pytest.mark.parametrize("text", ["0.0123", "0.3", "7/3", "1/27", "5.9"])
@pytest.mark.parametrize("nth", [0, 2, 4, 10])
def test_capped_equals_uncapped_within_the_cap(k, text, nth):
    target, limits = parse_target(text), make_limits(10, 40)
    full = solve_compound(target, k, limits, count=30)
    cap = abs(full[nth].relative_error) * (1 + 1e-9)  # the float error rounds: a hair of slack keeps the nth
    within = [t for t in full if abs(t.relative_error) <= cap][:5]
    assert _key(solve_compound(target, k, limits, count=5, cap=cap)) == _key(within)
    # A cap below the best leaves nothing (or only an exact hit when the best is exact).
    below = solve_compound(target, k, limits, count=5, cap=cap / 2)
    assert all(abs(t.relative_error) <= cap / 2 for t in below)
