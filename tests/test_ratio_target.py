"""Target parsing: exact values, safety, errors.

Sources: mpmath's own constants at 50 digits, exact rational arithmetic of the
Python fractions module, and the worked decimal values given beside each case.
"""

from __future__ import annotations

from fractions import Fraction

import mpmath
import pytest

from gearcad.errors import InputError
from gearcad.ratio import parse_target


@pytest.mark.parametrize("text, exact", [
    ("29.530588853", Fraction("29.530588853")),
    ("127/20", Fraction(127, 20)),
    ("366.2422/365.2422", Fraction("366.2422") / Fraction("365.2422")),
    ("2^10", Fraction(1024)),
    ("1.5e-3", Fraction(3, 2000)),
    ("-(-3)", Fraction(3)),
    ("sqrt(4)/3", Fraction(2, 3)),
])
def test_rational_targets_are_exact(text, exact):
    assert parse_target(text).rational == exact  # Python's fractions module


def test_irrational_targets_agree_with_mpmath_to_60_digits():
    mpmath.mp.dps = 70
    cases = {"2*pi": 2 * mpmath.pi, "25.4/(8*pi)": mpmath.mpf("25.4") / (8 * mpmath.pi), "sqrt(2)": mpmath.sqrt(2),
             "e": mpmath.e, "exp(1)^2": mpmath.e ** 2}
    for text, value in cases.items():
        approx = parse_target(text).approx
        assert parse_target(text).rational is None
        assert abs(mpmath.mpf(approx.numerator) / approx.denominator - value) < mpmath.mpf(10) ** -60 * value, text


@pytest.mark.parametrize("text, words", [
    ("0", "greater than 0"), ("-2", "greater than 0"), ("sqrt(-1)", "not a real"), ("foo", "unknown name"),
    ("1/0", "divides by zero"), ("2**", "ends too early"), ("", "empty"), ("__import__('os')", "cannot be read"),
    ("10^10^10", "exponent"), ("log(0)", "finite"), ("(2", "ends too early"),
])
def test_bad_targets_raise_one_line_input_errors(text, words):
    with pytest.raises(InputError, match=words) as info:
        parse_target(text)
    assert "\n" not in str(info.value) and repr(text)[1:-1][:4] in str(info.value)
