"""Coaxial (reverted) trains against an exhaustive enumeration written here.

Sources: the brute-force listing below (every pair of stages with equal tooth
sums, or sums a shift within the limit reconciles, checked with the pair
module's own centre-distance formula of ISO 21771) and the geometry rule that
two stages share an axis pair only at one centre distance.
"""

from __future__ import annotations

import math
from fractions import Fraction
from functools import lru_cache
from itertools import combinations_with_replacement

import pytest

from gearcad.errors import InputError
from gearcad.meshes.pair import centre_distance_for_shift
from gearcad.profiles import load_tooth_system
from gearcad.ratio import make_limits, parse_target, solve_coaxial

ALPHA = load_tooth_system().pressure_angle


def stages_of(limits):
    teeth = [z for z in range(limits.min_teeth, limits.max_teeth + 1) if z not in limits.exclude]
    r = limits.max_stage_ratio
    return [(d, n) for d in teeth for n in teeth if 1 / r <= Fraction(d, n) <= r
            and (not limits.hunting or math.gcd(d, n) == 1)]


@lru_cache(maxsize=None)
def reachable(stage, limit):
    """Centre distances (module 1) of a stage with shift sum in [-2X, 2X], by a fine scan."""
    values = []
    for i in range(401):
        try:
            values.append(centre_distance_for_shift(*stage, 1.0, ALPHA, -2 * limit + 4 * limit * i / 400))
        except InputError:
            continue
    return min(values), max(values)


def exhaustive_coaxial(target, limits, count, limit=0.0):
    best = {}
    for a, b in combinations_with_replacement(stages_of(limits), 2):
        if sum(a) != sum(b):
            if not limit:
                continue
            (lo1, hi1), (lo2, hi2) = reachable(a, limit), reachable(b, limit)
            if max(lo1, lo2) > min(hi1, hi2) + 1e-9:
                continue
        ratio = Fraction(a[0] * b[0], a[1] * b[1])
        best[ratio] = min(best.get(ratio, 10 ** 9), sum(a) + sum(b))
    ranked = sorted(best.items(), key=lambda kv: (abs(kv[0] / target.approx - 1), kv[1], kv[0]))
    return [(r.numerator, r.denominator, t) for r, t in ranked[:count]]


def as_rows(trains):
    return [(t.numerator, t.denominator, t.total_teeth) for t in trains]


@pytest.mark.parametrize("expression", ["12", "29.530588853", "sqrt(3)"])
def test_two_stage_coaxial_matches_exhaustive(expression):
    limits = make_limits(10, 48)
    target = parse_target(expression)
    found = solve_coaxial(target, 2, limits, 5)
    assert as_rows(found) == exhaustive_coaxial(target, limits, 5)  # exhaustive reference above
    for train in found:
        (d1, n1), (d2, n2) = train.stages
        assert d1 + n1 == d2 + n2  # one module, one centre distance: equal tooth sums
        assert train.direction == "same"


def test_clock_motion_work_is_exact():
    # Motion work of a clock: minute hand to hour hand 1/12 on one axis (common practice).
    found = solve_coaxial(parse_target("1/12"), 2, make_limits(6, 72), 1)
    assert found[0].fraction == Fraction(1, 12)
    (d1, n1), (d2, n2) = found[0].stages
    assert d1 + n1 == d2 + n2


def test_shift_limit_matches_exhaustive_and_shifts_equalise_centres():
    limits = make_limits(10, 30)
    target = parse_target("7.77")
    found = solve_coaxial(target, 2, limits, 4, shift_limit=0.4)
    assert as_rows(found) == exhaustive_coaxial(target, limits, 4, 0.4)  # exhaustive reference above
    for train in found:
        (s1, s2), (x1, x2) = train.stages, train.shifts
        assert max(abs(v) for v in x1 + x2) <= 0.4 + 1e-9
        a1 = centre_distance_for_shift(*s1, 1.0, ALPHA, sum(x1))
        a2 = centre_distance_for_shift(*s2, 1.0, ALPHA, sum(x2))
        assert a1 == pytest.approx(a2, abs=1e-9)  # ISO 21771 centre distance, pair module


def test_four_stage_coaxial_matches_pairs_of_pairs():
    limits = make_limits(10, 18)
    target = parse_target("pi")
    pairs = [(a, b) for a, b in combinations_with_replacement(stages_of(limits), 2) if sum(a) == sum(b)]
    best = {}
    for p1, p2 in combinations_with_replacement(pairs, 2):
        ratio = math.prod(Fraction(d, n) for d, n in p1 + p2)
        teeth = sum(map(sum, p1 + p2))
        best[ratio] = min(best.get(ratio, 10 ** 9), teeth)
    expected = sorted(best.items(), key=lambda kv: (abs(kv[0] / target.approx - 1), kv[1], kv[0]))[:3]
    found = solve_coaxial(target, 4, limits, 3)
    assert as_rows(found) == [(r.numerator, r.denominator, t) for r, t in expected]  # exhaustive reference
    for train in found:
        stages = train.stages
        assert sum(stages[0]) == sum(stages[1]) and sum(stages[2]) == sum(stages[3])


def test_coaxial_rejects_opposite_direction_and_odd_stages():
    with pytest.raises(InputError, match="coaxial"):
        solve_coaxial(parse_target("2"), 3, make_limits(), 1)
    with pytest.raises(InputError, match="opposite"):
        solve_coaxial(parse_target("2"), 2, make_limits(direction="opposite"), 1)
