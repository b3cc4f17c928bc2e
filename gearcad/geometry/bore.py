"""Shaft bores: plain round, D-flat and keyed, centred on the origin.

A plain bore is written as a circle, so :func:`plain_bore` returns the
``(x, y, diameter)`` triple that :class:`~gearcad.geometry.shape.Part` keeps in
``circles``.  Shaped bores are holes: clockwise loops (material on the left)
of a circular arc and straight lines, for ``Part.holes``.  The flat and the
keyway face +y.  Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from ..validate import finite
from .generate import DEFAULT_TOLERANCE, Curve
from .sampling import arc_step
from .shape import Loop

__all__ = ["plain_bore", "d_flat_bore", "keyway_bore", "bore_loop", "FLAT_MIN_FRACTION"]

FLAT_MIN_FRACTION = 0.2  # flat distance from the centre at least this fraction of the diameter


def _diameter(diameter: float) -> float:
    value = finite(diameter, "bore diameter")
    if value <= 0:
        raise InputError(f"bore diameter must be greater than 0 mm, got {diameter!r}")
    return value


def plain_bore(diameter: float) -> tuple[float, float, float]:
    """A round bore as ``(x, y, diameter)`` (mm) for ``Part.circles``: centred on the origin."""
    return (0.0, 0.0, _diameter(diameter))


def _clockwise_arc(radius: float, start: float, stop: float, tolerance: float) -> Curve:
    """Arc of the circle on the origin from polar angle ``start`` down to ``stop`` (< start), clockwise."""
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InputError(f"tolerance must be greater than 0 mm, got {tolerance!r}")
    n = max(2, math.ceil((start - stop) / arc_step(radius, tolerance)) + 1)
    angles = np.linspace(start, stop, n)
    radial = np.column_stack((np.cos(angles), np.sin(angles)))
    tangents = np.column_stack((radial[:, 1], -radial[:, 0]))
    return Curve("arc", radius * radial, tangents, angles, radius, (0.0, 0.0))


def _line(a: tuple[float, float], b: tuple[float, float]) -> Curve:
    pts = np.array([a, b], dtype=float)
    direction = (pts[1] - pts[0]) / math.hypot(*(pts[1] - pts[0]))
    return Curve("line", pts, np.array([direction, direction]), np.array([0.0, 1.0]))


def d_flat_bore(diameter: float, flat: float, tolerance: float = DEFAULT_TOLERANCE) -> Loop:
    """A round bore with one flat, as a clockwise loop (arc, then the flat).

    Parameters
    ----------
    diameter : float
        Bore diameter D, mm.
    flat : float
        Distance from the centre to the flat, mm, from 0.2 D to below D / 2;
        the flat is the chord at ``y = flat``.
    tolerance : float
        Chord tolerance of the arc's samples, mm.
    """
    d = _diameter(diameter)
    f = finite(flat, "flat distance")
    low = FLAT_MIN_FRACTION * d
    if not low <= f < d / 2:
        raise InputError(f"flat distance must be from {low:g} mm (0.2 D) to below {d / 2:g} mm (D/2), got {flat!r}")
    r = d / 2
    half = math.sqrt(r * r - f * f)
    corner = math.atan2(f, half)  # polar angle of the flat's right end
    arc = _clockwise_arc(r, corner, math.pi - corner - 2 * math.pi, tolerance)
    arc.points[0], arc.points[-1] = (half, f), (-half, f)
    return Loop((arc, _line((-half, f), (half, f))))


def keyway_bore(diameter: float, width: float, depth: float, tolerance: float = DEFAULT_TOLERANCE) -> Loop:
    """A round bore with a rectangular hub keyway, as a clockwise loop (arc, three lines).

    Parameters
    ----------
    diameter : float
        Bore diameter D, mm.
    width : float
        Keyway width b, mm, greater than 0 and below D.
    depth : float
        Keyway depth t, mm, greater than 0 and at most D: measured on the
        keyway's centre line from the bore's edge, so the keyway's bottom is
        the line ``y = D/2 + t``.
    tolerance : float
        Chord tolerance of the arc's samples, mm.
    """
    d = _diameter(diameter)
    b = finite(width, "keyway width")
    t = finite(depth, "keyway depth")
    if not 0 < b < d:
        raise InputError(f"keyway width must be greater than 0 and below the bore diameter {d:g} mm, got {width!r}")
    if not 0 < t <= d:
        raise InputError(f"keyway depth must be greater than 0 and at most the bore diameter {d:g} mm, got {depth!r}")
    r = d / 2
    foot = math.sqrt(r * r - b * b / 4)  # where the keyway's sides meet the bore
    corner = math.atan2(foot, b / 2)
    arc = _clockwise_arc(r, corner, math.pi - corner - 2 * math.pi, tolerance)
    arc.points[0], arc.points[-1] = (b / 2, foot), (-b / 2, foot)
    top = r + t
    sides = (_line((-b / 2, foot), (-b / 2, top)), _line((-b / 2, top), (b / 2, top)),
             _line((b / 2, top), (b / 2, foot)))
    return Loop((arc,) + sides)


def bore_loop(diameter: float, flat: float | None = None, keyway: tuple[float, float] | None = None,
              tolerance: float = DEFAULT_TOLERANCE) -> Loop | None:
    """The bore as a hole loop, or ``None`` for a plain round bore (write :func:`plain_bore`).

    Parameters
    ----------
    diameter : float
        Bore diameter, mm.
    flat : float, optional
        Distance from the centre to a flat, mm (see :func:`d_flat_bore`).
    keyway : (float, float), optional
        Keyway ``(width, depth)``, mm (see :func:`keyway_bore`).
    tolerance : float
        Chord tolerance of the arc's samples, mm.
    """
    if flat is not None and keyway is not None:
        raise InputError("a bore takes a flat or a keyway, not both")
    if flat is not None:
        return d_flat_bore(diameter, flat, tolerance)
    if keyway is not None:
        if len(keyway) != 2:
            raise InputError(f"keyway must be (width, depth) in mm, got {keyway!r}")
        return keyway_bore(diameter, keyway[0], keyway[1], tolerance)
    _diameter(diameter)
    return None
