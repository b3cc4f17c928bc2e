"""The raw offset of a loop (see :mod:`gearcad.geometry.offset`): each curve moved along its right normal,
corners closed by join arcs, as one closed polyline that remembers where each segment came from.

Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError
from .arcfit import STRAIGHT_KINDS, SampledCurve
from .generate import Curve
from .sampling import arc_step

__all__ = ["CORNER_ANGLE", "SAME_POINT", "arc_sense", "Source", "Run", "Polyline", "raw_offset", "without_empty_segments",
           "cross2d", "dot2d", "right_normal", "turn_angle", "rotate2d"]

CORNER_ANGLE = 1e-6  # radians: tangents that differ by more than this meet at a corner
SAME_POINT = 1e-12  # mm


def cross2d(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return a[..., 0] * b[..., 1] - a[..., 1] * b[..., 0]


def dot2d(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return a[..., 0] * b[..., 0] + a[..., 1] * b[..., 1]


def right_normal(t: np.ndarray) -> np.ndarray:
    return np.stack((t[..., 1], -t[..., 0]), axis=-1)


def turn_angle(t0: np.ndarray, t1: np.ndarray) -> np.ndarray:
    """Signed turn (radians, counter-clockwise positive) from direction ``t0`` to ``t1``."""
    return np.arctan2(cross2d(t0, t1), dot2d(t0, t1))


def rotate2d(t: np.ndarray, angle: np.ndarray) -> np.ndarray:
    c, s = np.cos(angle), np.sin(angle)
    return np.column_stack((c * t[0] - s * t[1], s * t[0] + c * t[1]))


# -- the raw offset curve ---------------------------------------------------------------

@dataclass(frozen=True)
class Source:
    """What a stretch of the offset curve is: the Curve fields other than the samples."""

    kind: str
    radius: float
    centre: tuple[float, float]


@dataclass
class Run:
    """Samples of one offset piece, end points included."""

    source: Source
    points: np.ndarray
    tangents: np.ndarray
    params: np.ndarray


def arc_sense(curve: Curve) -> float:
    """+1 if the arc runs counter-clockwise round its centre, -1 if clockwise."""
    rel = curve.points[0] - np.asarray(curve.centre)
    return 1.0 if float(cross2d(rel, curve.tangents[0])) > 0 else -1.0


def _offset_arc(curve: Curve, d: float, tolerance: float) -> Run:
    """The arc moved by ``d`` to its right: same centre, radius ``R + d`` (counter-clockwise) or ``R - d``."""
    centre = np.asarray(curve.centre, dtype=float)
    sense = arc_sense(curve)
    radius = curve.radius + sense * d
    rel = curve.points - centre
    sweep = float(turn_angle(rel[:-1], rel[1:]).sum())
    start = math.atan2(rel[0, 1], rel[0, 0])
    n = max(2, math.ceil(abs(sweep) / arc_step(max(abs(radius), tolerance), tolerance)) + 1)
    angles = start + sweep * np.linspace(0.0, 1.0, n)
    radial = np.column_stack((np.cos(angles), np.sin(angles)))
    tangents = sense * np.column_stack((-radial[:, 1], radial[:, 0]))
    points = centre + radius * radial
    points[0] = curve.points[0] + d * right_normal(curve.tangents[0])
    points[-1] = curve.points[-1] + d * right_normal(curve.tangents[-1])
    if radius < 0:
        tangents = -tangents  # the arc turned inside out: it now runs the other way
    return Run(Source(curve.kind, abs(radius), curve.centre), points, tangents, angles)


def _offset_line(curve: Curve, d: float) -> Run:
    ends = curve.points[[0, -1]]
    direction = ends[1] - ends[0]
    direction = direction / math.hypot(*direction)
    tangents = np.array([direction, direction])
    return Run(Source(curve.kind, 0.0, (0.0, 0.0)), ends + d * right_normal(tangents), tangents,
                curve.params[[0, -1]].astype(float))


def _offset_free_form(curve: Curve, d: float, tolerance: float) -> Run:
    """Exact parallel points of the samples, with interpolated points where the chords would stray."""
    track = SampledCurve(curve.points, curve.tangents)
    moved = curve.points + d * right_normal(curve.tangents)
    chord = np.hypot(*np.diff(moved, axis=0).T)
    turn = np.abs(turn_angle(curve.tangents[:-1], curve.tangents[1:]))
    sagitta = chord * turn / 8  # of the offset chord: R' (1 - cos(phi/2)) ~ L' phi / 8
    splits = np.maximum(1, np.ceil(np.sqrt(sagitta / (0.9 * tolerance)))).astype(int)
    s = np.concatenate([i + np.arange(k) / k for i, k in enumerate(splits)] + [[float(track.last)]])
    points, tangents = track.at(s)
    i = np.minimum(np.floor(s).astype(int), track.last - 1)
    params = curve.params[i] + (s - i) * (curve.params[i + 1] - curve.params[i])
    return Run(Source(curve.kind, 0.0, curve.centre), points + d * right_normal(tangents), tangents, params)


def _offset_curve(curve: Curve, d: float, tolerance: float) -> Run:
    if curve.radius > 0:
        return _offset_arc(curve, d, tolerance)
    if curve.kind in STRAIGHT_KINDS:
        return _offset_line(curve, d)
    return _offset_free_form(curve, d, tolerance)


def _corner_run(corner: np.ndarray, t_in: np.ndarray, t_out: np.ndarray, d: float, tolerance: float) -> Run | None:
    """What joins two offset pieces at a corner: a join arc, a straight bridge, or nothing (smooth)."""
    turn = float(turn_angle(t_in, t_out))
    if abs(turn) <= CORNER_ANGLE:
        return None
    if turn * d > 0:  # the pieces separate: round join centred on the corner
        n = max(2, math.ceil(abs(turn) / arc_step(abs(d), tolerance)) + 1)
        phi = np.linspace(0.0, turn, n)
        tangents = rotate2d(t_in, phi)
        points = corner + d * right_normal(tangents)
        return Run(Source("arc", abs(d), (float(corner[0]), float(corner[1]))), points, tangents, phi)
    # the pieces cross: a bridge between their ends, cut away with the crossing loop
    a, b = corner + d * right_normal(t_in), corner + d * right_normal(t_out)
    direction = (b - a) / max(math.hypot(*(b - a)), SAME_POINT)
    tangents = np.array([direction, direction])
    return Run(Source("line", 0.0, (0.0, 0.0)), np.array([a, b]), tangents, np.array([0.0, 1.0]))


@dataclass(frozen=True)
class Polyline:
    """The raw closed offset curve: segment k runs from ``points[k]`` to ``points[k + 1]`` (cyclically)."""

    points: np.ndarray  # (K, 2)
    source: np.ndarray  # (K,) index into ``sources``
    t0: np.ndarray  # (K, 2) tangent at the segment's start, as part of its source
    t1: np.ndarray  # (K, 2) tangent at its end
    p0: np.ndarray  # (K,) curve parameter at the start
    p1: np.ndarray  # (K,) at the end
    sources: tuple[Source, ...]

    @property
    def ends(self) -> np.ndarray:
        return np.roll(self.points, -1, axis=0)


def raw_offset(curves: list[Curve], d: float, tolerance: float) -> Polyline:
    runs: list[Run] = []
    for k, curve in enumerate(curves):
        runs.append(_offset_curve(curve, d, tolerance))
        following = curves[(k + 1) % len(curves)]
        corner = _corner_run(curve.points[-1], curve.tangents[-1], following.tangents[0], d, tolerance)
        if corner is not None:
            runs.append(corner)
    sources = tuple(r.source for r in runs)
    pts, src, t0, t1, p0, p1 = [], [], [], [], [], []
    for k, run in enumerate(runs):
        pts.append(run.points[:-1])  # the next run starts where this one ends
        src.append(np.full(len(run.points) - 1, k))
        t0.append(run.tangents[:-1])
        t1.append(run.tangents[1:])
        p0.append(run.params[:-1])
        p1.append(run.params[1:])
    poly = Polyline(np.concatenate(pts), np.concatenate(src), np.concatenate(t0), np.concatenate(t1),
                     np.concatenate(p0), np.concatenate(p1), sources)
    return without_empty_segments(poly)


def without_empty_segments(poly: Polyline) -> Polyline:
    step = poly.ends - poly.points
    keep = np.hypot(step[:, 0], step[:, 1]) > SAME_POINT
    if keep.sum() < 3:
        raise GeometryError("the offset loop has collapsed to a point")
    return Polyline(poly.points[keep], poly.source[keep], poly.t0[keep], poly.t1[keep], poly.p0[keep],
                     poly.p1[keep], poly.sources)
