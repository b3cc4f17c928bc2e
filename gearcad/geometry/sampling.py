"""Adaptive sampling of parametric curves to a chord tolerance.

A curve is a vectorised function ``f(params) -> (N, 2)`` points in mm.  The
sampler refines intervals until the polyline through the samples stays within
``tolerance`` (mm) of the curve, checked at the quarter points of each interval.
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np

__all__ = ["sample_curve", "arc_step"]

CurveFunction = Callable[[np.ndarray], np.ndarray]


def _chord_deviation(points: np.ndarray, start: np.ndarray, end: np.ndarray) -> np.ndarray:
    chord = end - start
    length = np.hypot(chord[:, 0], chord[:, 1])
    rel = points - start
    safe = np.where(length > 0, length, 1.0)
    cross = np.abs(chord[:, 0] * rel[:, 1] - chord[:, 1] * rel[:, 0]) / safe
    return np.where(length > 0, cross, np.hypot(rel[:, 0], rel[:, 1]))


def sample_curve(curve: CurveFunction, t0: float, t1: float, tolerance: float,
                 initial: int = 8, max_rounds: int = 40) -> np.ndarray:
    """Parameters in ``[t0, t1]`` whose polyline follows ``curve`` within ``tolerance``.

    Parameters
    ----------
    curve : callable
        Vectorised curve, parameters to (N, 2) points in mm.
    t0, t1 : float
        Parameter range; both ends are included.
    tolerance : float
        Largest allowed distance between the polyline and the curve, mm.

    Returns
    -------
    numpy.ndarray
        Sorted parameter values (first ``t0``, last ``t1``).
    """
    params = np.linspace(t0, t1, initial + 1)
    limit = 0.9 * tolerance  # margin for the deviation between the probe points
    for _ in range(max_rounds):
        a, b = params[:-1], params[1:]
        knots = curve(params)
        start, end = np.tile(knots[:-1], (3, 1)), np.tile(knots[1:], (3, 1))
        probes = np.concatenate([a + f * (b - a) for f in (0.25, 0.5, 0.75)])
        deviation = _chord_deviation(curve(probes), start, end).reshape(3, -1).max(axis=0)
        bad = deviation > limit
        if not bad.any():
            return params
        middles = 0.5 * (a[bad] + b[bad])
        params = np.sort(np.concatenate([params, middles]))
    return params


def arc_step(radius: float, tolerance: float) -> float:
    """Largest angle step (radians) whose chord stays within ``tolerance`` of a circle.

    Sagitta ``R (1 - cos(step/2)) <= tolerance``.
    """
    if tolerance >= radius:
        return math.pi / 2
    return min(2.0 * math.acos(1.0 - tolerance / radius), math.pi / 2)
