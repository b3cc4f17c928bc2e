"""The involute function and its inverse.

Angles are in radians.  Pure functions over floats (no numpy: the ratio
solver's mesh judge loads this); points of an involute are
:mod:`gearcad.geometry.involute_curve`'s.  Nothing here knows about gears.
"""

from __future__ import annotations

import math

__all__ = ["inv", "inv_inverse"]


def _tan_series_coefficients(count: int) -> list[float]:
    """Coefficients c_k of ``tan(a) - a = sum c_k a^(2k+3)``: tangent numbers over factorials.

    Tangent numbers from the derivative polynomials ``P_{n+1}(t) = (1 + t²) P_n'(t)``,
    ``P_0 = t`` (tan's n-th derivative is P_n(tan a)); T_n = P_n(0).
    """
    poly = [0, 1]  # P_0(t) = t, coefficients by power
    coefficients: list[float] = []
    for n in range(1, 2 * count + 4):
        deriv = [k * poly[k] for k in range(1, len(poly))]
        poly = [0] * (len(deriv) + 2)
        for k, c in enumerate(deriv):
            poly[k] += c
            poly[k + 2] += c
        if n >= 3 and n % 2 == 1:
            coefficients.append(poly[0] / math.factorial(n))
    return coefficients


_SERIES = _tan_series_coefficients(14)
_SERIES_LIMIT = 0.25  # radians: below this the series avoids the cancellation in tan(a) - a


def inv(angle: float) -> float:
    """Involute function ``tan(a) - a`` of a pressure angle ``a`` (radians).

    Below 0.25 rad the Taylor series is summed instead, so that the result keeps
    full relative precision (``tan(a) - a`` cancels most of its digits there).
    """
    if abs(angle) < _SERIES_LIMIT:
        a2 = angle * angle
        total = 0.0
        for c in reversed(_SERIES):
            total = total * a2 + c
        return total * a2 * angle
    return math.tan(angle) - angle


def inv_inverse(value: float) -> float:
    """Pressure angle ``a`` (radians, 0 <= a < pi/2) with ``inv(a) == value``.

    Newton's method on ``tan(a) - a - value`` (derivative ``tan(a)**2``),
    safeguarded by bisection so that it always stays in ``[0, pi/2)``, iterated
    until the step no longer changes the result: full double precision.
    """
    if not math.isfinite(value) or value < 0:
        raise ValueError(f"involute function value must be finite and >= 0, got {value!r}")
    if value == 0.0:
        return 0.0
    low, high = 0.0, math.pi / 2
    # (3 y)^(1/3) is the small-angle inverse (inv a = a^3/3 + ...); cap inside the bracket.
    angle = min((3.0 * value) ** (1.0 / 3.0), math.atan(value + math.pi / 2))
    for _ in range(200):
        error = inv(angle) - value
        if error > 0:
            high = angle
        else:
            low = angle
        slope = math.tan(angle) ** 2
        step = error / slope if slope > 0 else math.inf
        candidate = angle - step
        if not low < candidate < high:
            candidate = 0.5 * (low + high)
        if candidate == angle or abs(candidate - angle) <= 2e-16 * angle:
            return candidate
        angle = candidate
    return angle
