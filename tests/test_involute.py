"""The involute function and its inverse against published tables and mpmath."""

import math

import mpmath
import pytest

from gearcad.geometry.involute import inv, inv_inverse

# Involute function tables, e.g. Machinery's Handbook, "Involute functions" table (from memory),
# six significant figures as printed.
TABLE = [
    (14.5, 0.0055448),
    (20.0, 0.014904),
    (22.5, 0.021514),
    (25.0, 0.029975),
    (30.0, 0.053751),
]


@pytest.mark.parametrize("degrees, tabulated", TABLE)
def test_inv_matches_published_table(degrees, tabulated):
    assert inv(math.radians(degrees)) == pytest.approx(tabulated, rel=5e-5)


@pytest.mark.parametrize("degrees", [0.5, 5, 14.5, 20, 26.0886, 35, 50, 70, 85, 89.5])
def test_inv_matches_mpmath_at_30_digits(degrees):
    # Reference library: mpmath at 30 significant digits.
    mpmath.mp.dps = 30
    a = mpmath.radians(degrees)
    assert inv(math.radians(degrees)) == pytest.approx(float(mpmath.tan(a) - a), rel=1e-14)


@pytest.mark.parametrize("degrees", [0.01, 1, 10, 14.5, 20, 25, 26.0886, 35, 45, 60, 80, 89])
def test_inverse_is_full_double_precision(degrees):
    # Reference: mpmath.findroot solves tan(a) - a = y at 30 digits.
    mpmath.mp.dps = 30
    y = inv(math.radians(degrees))
    exact = mpmath.findroot(lambda a: mpmath.tan(a) - a - mpmath.mpf(y), math.radians(degrees))
    assert inv_inverse(y) == pytest.approx(float(exact), rel=5e-16)


def test_inverse_refuses_negative_values():
    with pytest.raises(ValueError):
        inv_inverse(-1e-3)


def test_working_pressure_angle_of_the_handbook_pair():
    # KHK Gear Technical Reference, profile-shifted spur gear table (from memory: verify):
    # inv(alpha_w) = inv 20 deg + 2 tan 20 deg (0.6 + 0.36) / 36 gives 26.0886 degrees.
    value = inv(math.radians(20)) + 2 * math.tan(math.radians(20)) * 0.96 / 36
    assert value == pytest.approx(0.034316, abs=2e-6)
    assert math.degrees(inv_inverse(value)) == pytest.approx(26.0886, abs=5e-5)


def test_series_coefficients_are_the_taylor_coefficients_of_tan():
    # Reference: mpmath.taylor of tan at 0 (the tangent numbers of OEIS A000182 over n!).
    from gearcad.geometry.involute import _SERIES

    mpmath.mp.dps = 30
    taylor = mpmath.taylor(mpmath.tan, 0, 2 * len(_SERIES) + 2)
    for k, c in enumerate(_SERIES):
        assert c == pytest.approx(float(taylor[2 * k + 3]), rel=1e-15)
