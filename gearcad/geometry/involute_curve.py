"""Points and tangents of an involute of a circle (numpy arrays).

Angles are in radians, lengths in mm; nothing here knows about gears.  The
involute function itself is :mod:`gearcad.geometry.involute`'s.
"""

from __future__ import annotations

import numpy as np

__all__ = ["involute_points", "involute_tangents", "roll_angle_at"]


def roll_angle_at(radius: np.ndarray | float, base_radius: float) -> np.ndarray | float:
    """Roll angle ``t`` (radians) of the involute point at ``radius`` (mm): ``sqrt(R²/rb² - 1)``."""
    return np.sqrt(np.maximum(np.square(radius / base_radius) - 1.0, 0.0))


def involute_points(base_radius: float, start_angle: float, roll: np.ndarray) -> np.ndarray:
    """Points of the involute that leaves the base circle at polar angle ``start_angle``.

    The involute unwinds clockwise: its polar angle falls as the roll angle
    grows (the upper flank of a tooth centred on +x).  ``roll`` holds roll
    angles in radians; returns an (N, 2) array in mm.
    """
    roll = np.asarray(roll, dtype=float)
    phi = start_angle - roll
    c, s = np.cos(phi), np.sin(phi)
    return base_radius * np.column_stack((c - roll * s, s + roll * c))


def involute_tangents(start_angle: float, roll: np.ndarray) -> np.ndarray:
    """Unit tangents (direction of growing roll angle) of :func:`involute_points`.

    ``d p / d t = rb t (cos(phi), sin(phi))``: on the second branch (t < 0)
    the tangent points the other way.
    """
    roll = np.asarray(roll, dtype=float)
    phi = start_angle - roll
    sign = np.where(roll < 0, -1.0, 1.0)
    return sign[:, None] * np.column_stack((np.cos(phi), np.sin(phi)))
