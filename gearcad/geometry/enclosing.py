"""The smallest circle holding a set of circles (pure numpy).

The radius needed about a centre ``c`` is ``f(c) = max_i (|c - c_i| + r_i)``, a
maximum of convex functions, so ``f`` is convex and so is ``g(x) = min_y f(x, y)``.
Golden-section search over ``x``, each step minimising over ``y`` the same way,
finds the centre to the float resolution of the coordinates (the bracket
shrinks by 0.618 a step; 90 steps take a span of 1e3 below 1e-15).  The
circle's radius is ``f`` at that centre, never less than the true least radius.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["enclosing_circle"]

_GOLD = (math.sqrt(5) - 1) / 2
_STEPS = 90


def _golden(function, low: float, high: float) -> float:
    a, b = low, high
    c, d = b - _GOLD * (b - a), a + _GOLD * (b - a)
    fc, fd = function(c), function(d)
    for _ in range(_STEPS):
        if fc <= fd:
            b, d, fd = d, c, fc
            c = b - _GOLD * (b - a)
            fc = function(c)
        else:
            a, c, fc = c, d, fd
            d = a + _GOLD * (b - a)
            fd = function(d)
    return (a + b) / 2


def enclosing_circle(centres: np.ndarray, radii: np.ndarray) -> tuple[float, float, float]:
    """Centre ``(x, y)`` and radius of the smallest circle holding every circle (centres (N, 2), radii (N,)).

    Units are the caller's (gearcad: modules or mm).
    """
    centres = np.asarray(centres, dtype=float).reshape(-1, 2)
    radii = np.asarray(radii, dtype=float).reshape(-1)
    if len(centres) == 0 or len(centres) != len(radii) or not np.all(np.isfinite(centres)) \
            or not np.all(np.isfinite(radii)) or np.any(radii < 0):
        raise ValueError("enclosing_circle needs one finite centre and one radius >= 0 per circle")
    if len(centres) == 1:
        return float(centres[0, 0]), float(centres[0, 1]), float(radii[0])
    xs, ys = centres[:, 0], centres[:, 1]
    x_low, x_high = float((xs - radii).min()), float((xs + radii).max())
    y_low, y_high = float((ys - radii).min()), float((ys + radii).max())

    def radius(x: float, y: float) -> float:
        return float(np.max(np.hypot(xs - x, ys - y) + radii))

    def best_y(x: float) -> float:
        return _golden(lambda y: radius(x, y), y_low, y_high)

    x = _golden(lambda x: radius(x, best_y(x)), x_low, x_high)
    y = best_y(x)
    return x, y, radius(x, y)
