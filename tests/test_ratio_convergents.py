"""Continued-fraction convergents and semiconvergents.

Sources: OEIS A002485 / A002486 (numerators / denominators of the convergents
of pi), OEIS A007676 / A007677 (the same for e), values from memory, cross
-checked against sympy's continued_fraction_convergents; and the definition of a
best approximation, checked by brute force over all denominators.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import islice

import sympy
from sympy.ntheory.continued_fraction import continued_fraction_convergents, continued_fraction_iterator

from gearcad.ratio import best_approximations, make_limits, parse_target
from gearcad.ratio.solve import approximations_with_trains

# OEIS A002485 and A002486 from the third term on (after 0/1 and 1/0) (from memory).
PI_NUMERATORS = [3, 22, 333, 355, 103993, 104348, 208341, 312689, 833719, 1146408, 4272943, 5419351, 80143857,
                 165707065, 245850922]
PI_DENOMINATORS = [1, 7, 106, 113, 33102, 33215, 66317, 99532, 265381, 364913, 1360120, 1725033, 25510582,
                   52746197, 78256779]
# OEIS A007676 and A007677 (from memory).
E_NUMERATORS = [2, 3, 8, 11, 19, 87, 106, 193, 1264, 1457, 2721, 23225, 25946, 49171, 517656, 566827, 1084483]
E_DENOMINATORS = [1, 1, 3, 4, 7, 32, 39, 71, 465, 536, 1001, 8544, 9545, 18089, 190435, 208524, 398959]


def convergents_of(expression, bound):
    return [(a.numerator, a.denominator) for a in best_approximations(parse_target(expression), bound)
            if a.kind == "convergent"]


def test_pi_convergents_match_oeis():
    assert convergents_of("pi", 10 ** 8) == list(zip(PI_NUMERATORS, PI_DENOMINATORS))  # OEIS A002485/A002486


def test_e_convergents_match_oeis():
    assert convergents_of("e", 400000) == list(zip(E_NUMERATORS, E_DENOMINATORS))  # OEIS A007676/A007677


def test_convergents_match_sympy():
    for expression, value in [("sqrt(2)", sympy.sqrt(2)), ("366.2422/365.2422", sympy.Rational(3662422, 3652422))]:
        expected = [(int(c.p), int(c.q)) for c in islice(continued_fraction_convergents(continued_fraction_iterator(value)), 12)]
        expected = [c for c in expected if c[1] <= 10 ** 9]
        assert convergents_of(expression, 10 ** 9)[: len(expected)] == expected  # sympy's continued fractions


def brute_best_approximations(x, bound):
    """Fractions closer to x than every fraction with a smaller denominator (definition), by brute force."""
    found, best = [], None
    for q in range(1, bound + 1):
        p = round(x * q)
        distance, cand = min((abs(Fraction(c, q) - x), c) for c in (p - 1, p, p + 1) if c >= 0)
        if best is None or distance < best:
            best = distance
            found.append((cand, q))
    return found


def test_semiconvergents_are_exactly_the_best_approximations():
    # Every best approximation is a convergent or a semiconvergent (Khinchin, Continued Fractions, from memory);
    # the list holds all convergents (sympy) and, beyond them, exactly the best approximations (brute force).
    for expression, value in (("pi", sympy.pi), ("29.530588853", sympy.Rational(29530588853, 10 ** 9)),
                              ("0.2718", sympy.Rational(2718, 10000))):
        target = parse_target(expression)
        listed = best_approximations(target, 3000)
        semis = {(a.numerator, a.denominator) for a in listed if a.kind == "semiconvergent"}
        convs = {(a.numerator, a.denominator) for a in listed if a.kind == "convergent"}
        reference = {(int(c.p), int(c.q)) for c in islice(continued_fraction_convergents(continued_fraction_iterator(value)), 30)
                     if 0 < c.q <= 3000 and c.p > 0}
        best = {f for f in brute_best_approximations(target.approx, 3000) if f[0] > 0}
        assert convs == reference, expression  # sympy
        assert semis == best - reference, expression  # definition, brute force
        assert [a.denominator for a in listed] == sorted(a.denominator for a in listed)


def test_marks_use_exact_trains_in_range():
    listing = approximations_with_trains(parse_target("pi"), make_limits(10, 120), 2)
    marks = {(a.numerator, a.denominator): t for a, t in listing}
    assert marks[(355, 113)] is not None  # 355/113 = (71*5)/113: 113 is prime and within 10-120
    assert marks[(179, 57)] is None  # 179 is prime, above 120 teeth: no train of any stages
    train = marks[(355, 113)]
    assert train.fraction == Fraction(355, 113)
