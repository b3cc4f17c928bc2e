"""Tangent circular arcs fitted to the true curves of a loop, as DXF bulge vertices.

Laser cutters and CAM software move smoothest along lines and arcs.  This
module turns each :class:`~gearcad.geometry.generate.Curve` of a loop into a
chain of vertices with bulges, the form of a DXF ``LWPOLYLINE``:

* circular curves (``radius > 0``) become exact arcs, one bulge segment per
  piece of at most 90 degrees;
* straight curves (``"line"``, ``"chamfer"``) become one segment of bulge 0;
* free-form curves (involute, fillet, offsets of them) become chains of biarcs
  (pairs of tangent arcs) that stay within a tolerance of the true curve and
  are tangent-continuous along the curve.

Conventions: lengths in mm, angles in radians.  A vertex row is
``(x, y, bulge)``; the bulge belongs to the segment from this vertex to the
next one and is ``tan(theta / 4)``, ``theta`` the segment's included angle,
positive for a counter-clockwise arc, 0 for a straight segment.

The true curve between two samples is recovered by cubic Hermite
interpolation of the samples' points and unit tangents, the tangent lengths
chosen so that a circular arc is reproduced to sixth order in its angle: a
curve sampled to a chord tolerance ``t`` is recovered to far better than
``t`` (about 1e-7 mm for the 1 µm gear outlines).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from .generate import DEFAULT_TOLERANCE, Curve
from .shape import Loop

__all__ = [
    "fit_arcs",
    "fit_loop",
    "smooth_pieces",
    "SampledCurve",
    "STRAIGHT_KINDS",
    "MAX_ARC_ANGLE",
]

STRAIGHT_KINDS = frozenset({"line", "chamfer"})
MAX_ARC_ANGLE = math.pi / 2  # radians: largest included angle of one bulge segment
_MIN_FIT_TOLERANCE = 1e-6  # mm
_MAX_FIT_TOLERANCE = 1.0  # mm
_SAME_POINT = 1e-10  # mm: vertices closer than this are one vertex
_FIT_MARGIN = 0.9  # the fit aims at 90 % of the tolerance, leaving room for the interpolation
_MAX_BISECTIONS = 40


# -- the true curve between samples ------------------------------------------------

def _cross(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return a[..., 0] * b[..., 1] - a[..., 1] * b[..., 0]


def _dot(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return a[..., 0] * b[..., 0] + a[..., 1] * b[..., 1]


def _unit(v: np.ndarray) -> np.ndarray:
    return v / np.hypot(v[..., 0], v[..., 1])[..., None]


def _turn_angle(t0: np.ndarray, t1: np.ndarray) -> np.ndarray:
    """Signed angle (radians, counter-clockwise positive) from direction ``t0`` to ``t1``."""
    return np.arctan2(_cross(t0, t1), _dot(t0, t1))


@dataclass(frozen=True)
class SampledCurve:
    """A smooth curve known by points and unit tangents, evaluated anywhere between them.

    Parameters
    ----------
    points : numpy.ndarray
        (N, 2) points on the true curve, mm, N >= 2.
    tangents : numpy.ndarray
        (N, 2) unit tangents in travel order.

    The parameter ``s`` runs from 0 to N - 1; at whole numbers it gives the
    samples themselves, between them the cubic Hermite interpolant whose
    tangent length is ``chord / cos(phi / 4)**2`` (``phi`` the turn between the
    two tangents), which reproduces a circular arc to O(phi**6).
    """

    points: np.ndarray
    tangents: np.ndarray

    @property
    def last(self) -> int:
        """Parameter of the last sample."""
        return len(self.points) - 1

    def at(self, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Points (M, 2, mm) and unit tangents (M, 2) at parameters ``s`` (M,)."""
        s = np.asarray(s, dtype=float)
        i = np.clip(np.floor(s).astype(int), 0, self.last - 1)
        u = (s - i)[:, None]
        p0, p1 = self.points[i], self.points[i + 1]
        t0, t1 = self.tangents[i], self.tangents[i + 1]
        chord = np.hypot(*(p1 - p0).T)
        phi = np.abs(_turn_angle(t0, t1))
        m = (chord / np.cos(phi / 4) ** 2)[:, None]
        u2, u3 = u * u, u * u * u
        pts = (2 * u3 - 3 * u2 + 1) * p0 + (u3 - 2 * u2 + u) * m * t0 + (3 * u2 - 2 * u3) * p1 + (u3 - u2) * m * t1
        der = (6 * u2 - 6 * u) * p0 + (3 * u2 - 4 * u + 1) * m * t0 + (6 * u - 6 * u2) * p1 + (3 * u2 - 2 * u) * m * t1
        exact = u[:, 0] == 0.0
        pts[exact] = p0[exact]
        tan = _unit(der)
        tan[exact] = t0[exact]
        return pts, tan


def smooth_pieces(curve: Curve) -> list[Curve]:
    """Split a free-form curve where its tangent reverses between two samples.

    A span whose chord points against either end tangent holds a cusp (the
    involute's turning point on the base circle, met in marginal undercut).
    The sampler kept that span within its chord tolerance of the true curve,
    so the span is returned as a ``"line"`` curve; the smooth runs between such
    spans keep the curve's kind.  Curves without a reversal come back whole.
    """
    pts, tan = curve.points, curve.tangents
    chord = pts[1:] - pts[:-1]
    reversed_ = (_dot(tan[:-1], chord) <= 0) | (_dot(tan[1:], chord) <= 0)
    if not reversed_.any():
        return [curve]
    pieces: list[Curve] = []
    start = 0
    for k in np.nonzero(reversed_)[0]:
        if k > start:
            pieces.append(_sub_curve(curve, start, k))
        direction = _unit(chord[k])
        tangents = np.array([direction, direction])
        pieces.append(Curve("line", pts[k:k + 2].copy(), tangents, curve.params[k:k + 2].copy()))
        start = k + 1
    if start < len(pts) - 1:
        pieces.append(_sub_curve(curve, start, len(pts) - 1))
    return pieces


def _sub_curve(curve: Curve, first: int, last: int) -> Curve:
    sl = slice(first, last + 1)
    return Curve(curve.kind, curve.points[sl], curve.tangents[sl], curve.params[sl], curve.radius, curve.centre)


# -- one arc: start point, start tangent, end point -------------------------------------

@dataclass(frozen=True)
class _Arcs:
    """Arcs given by start points ``a``, unit start tangents ``t`` and end points ``b`` (arrays (K, 2))."""

    a: np.ndarray
    t: np.ndarray
    b: np.ndarray

    @property
    def half_angle(self) -> np.ndarray:
        """Signed angle from the start tangent to the chord: half the included angle."""
        return _turn_angle(self.t, self.b - self.a)

    @property
    def bulge(self) -> np.ndarray:
        return np.tan(self.half_angle / 2)

    @property
    def end_tangent(self) -> np.ndarray:
        h = 2 * self.half_angle
        c, s = np.cos(h), np.sin(h)
        return np.column_stack((c * self.t[:, 0] - s * self.t[:, 1], s * self.t[:, 0] + c * self.t[:, 1]))

    def distance(self, p: np.ndarray) -> np.ndarray:
        """Distance (mm) from each point ``p`` (K, M, 2) to arc k (the arc, not its full circle)."""
        a, t, b = self.a[:, None, :], self.t[:, None, :], self.b[:, None, :]
        chord = np.hypot(*(self.b - self.a).T)
        k = np.where(chord > 0, 2 * np.sin(self.half_angle) / np.where(chord > 0, chord, 1.0), 0.0)[:, None]
        w = p - a
        normal = np.stack((-t[..., 1], t[..., 0]), axis=-1)
        f = k * _dot(w, w) - 2 * _dot(w, normal)
        to_circle = np.abs(f) / (1 + np.sqrt(np.maximum(1 + k * f, 0.0)))
        inside = (_dot(w, t) >= 0) & (_dot(p - b, self.end_tangent[:, None, :]) <= 0)
        to_ends = np.minimum(np.hypot(*np.moveaxis(w, -1, 0)), np.hypot(*np.moveaxis(p - b, -1, 0)))
        return np.where(inside, to_circle, to_ends)


def _biarc_joint(p0: np.ndarray, t0: np.ndarray, p1: np.ndarray, t1: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Joint point and tangent of the equal-leg biarc from (p0, t0) to (p1, t1).

    The control legs ``p0 + d t0`` and ``p1 - d t1`` are equally long and the
    joint is the midpoint of the middle leg of length ``2 d``:
    ``2 (1 - t0.t1) d**2 + 2 (v.(t0 + t1)) d - v.v = 0`` with ``v = p1 - p0``,
    solved in the cancellation-free form.  NaN where no biarc with forward legs exists.
    """
    v = p1 - p0
    tsum = t0 + t1
    vt, vv = _dot(v, tsum), _dot(v, v)
    c = 1.0 - _dot(t0, t1)
    root = np.sqrt(np.maximum(vt * vt + 2.0 * c * vv, 0.0))
    denominator = vt + root
    d = np.where(denominator > 0, vv / np.where(denominator > 0, denominator, 1.0), np.nan)
    joint = 0.5 * (p0 + d[..., None] * t0 + p1 - d[..., None] * t1)
    tangent = _unit(v - d[..., None] * tsum)
    return joint, tangent


# -- fitting a smooth curve ---------------------------------------------------------

def _probe_parameters(s0: float, s1: float) -> np.ndarray:
    """Samples strictly inside (s0, s1) and the quarter points of every piece between them."""
    inner = np.arange(math.floor(s0) + 1, math.ceil(s1), dtype=float)
    knots = np.concatenate(([s0], inner, [s1]))
    quarters = [knots[:-1] + f * np.diff(knots) for f in (0.25, 0.5, 0.75)]
    return np.concatenate([inner] + quarters)


def _biarc_deviation(track: SampledCurve, s0: float, s1: float) -> tuple[float, np.ndarray]:
    """Largest distance (mm) from the true curve on [s0, s1] to its biarc, and the biarc's vertices."""
    (p0, p1), (t0, t1) = track.at(np.array([s0, s1]))
    joint, joint_tangent = _biarc_joint(p0, t0, p1, t1)
    if not np.isfinite(joint).all():
        return math.inf, np.empty((0, 3))
    arcs = _Arcs(np.array([p0, joint]), np.array([t0, joint_tangent]), np.array([joint, p1]))
    probes, _ = track.at(_probe_parameters(s0, s1))
    deviation = arcs.distance(np.broadcast_to(probes, (2,) + probes.shape)).min(axis=0)
    vertices = np.column_stack((np.array([p0, joint]), arcs.bulge))
    return float(deviation.max(initial=0.0)), vertices


def _fit_smooth(track: SampledCurve, tolerance: float) -> np.ndarray:
    """Greedy biarc chain over a smooth curve: each biarc reaches as far as the tolerance allows."""
    limit = _FIT_MARGIN * tolerance
    rows: list[np.ndarray] = []
    s = 0.0
    while s < track.last:
        end, vertices = _furthest_fit(track, s, limit)
        rows.append(vertices)
        s = end
    end_point = track.points[-1]
    rows.append(np.array([[end_point[0], end_point[1], 0.0]]))
    return np.concatenate(rows)


def _furthest_fit(track: SampledCurve, s: float, limit: float) -> tuple[float, np.ndarray]:
    """The furthest sample (or, failing that, fraction of a span) one biarc from ``s`` can reach."""
    deviation, vertices = _biarc_deviation(track, s, float(track.last))
    if deviation <= limit:
        return float(track.last), vertices
    good, good_vertices = None, None
    low, high = math.floor(s) + 1, track.last  # whole-sample ends: high fails
    while low < high:
        mid = (low + high) // 2
        deviation, vertices = _biarc_deviation(track, s, float(mid))
        if deviation <= limit:
            good, good_vertices, low = mid, vertices, mid + 1
        else:
            high = mid
    if good is not None:
        return float(good), good_vertices
    end = float(math.floor(s) + 1)  # not even the next sample: bisect the span
    for _ in range(_MAX_BISECTIONS):
        end = 0.5 * (s + end)
        deviation, vertices = _biarc_deviation(track, s, end)
        if deviation <= limit:
            return end, vertices
    raise InputError(f"cannot fit arcs within {limit / _FIT_MARGIN:g} mm: the curve's samples are inconsistent")


# -- circular and straight curves ----------------------------------------------------

def _circle_vertices(curve: Curve) -> np.ndarray:
    """Exact arc of a circular curve in pieces of at most 90 degrees, end point included."""
    centre = np.asarray(curve.centre, dtype=float)
    rel = curve.points - centre
    sweep = float(_turn_angle(rel[:-1], rel[1:]).sum())
    pieces = max(1, math.ceil(abs(sweep) / MAX_ARC_ANGLE - 1e-9))
    start = math.atan2(rel[0, 1], rel[0, 0])
    angles = start + sweep * np.arange(pieces + 1) / pieces
    pts = centre + curve.radius * np.column_stack((np.cos(angles), np.sin(angles)))
    pts[0], pts[-1] = curve.points[0], curve.points[-1]
    bulge = np.full(pieces + 1, math.tan(sweep / pieces / 4))
    bulge[-1] = 0.0
    return np.column_stack((pts, bulge))


def _straight_vertices(curve: Curve) -> np.ndarray:
    a, b = curve.points[0], curve.points[-1]
    return np.array([[a[0], a[1], 0.0], [b[0], b[1], 0.0]])


# -- public ------------------------------------------------------------------------

def _check_tolerance(tolerance: float) -> float:
    if not (isinstance(tolerance, (int, float)) and math.isfinite(tolerance)
            and _MIN_FIT_TOLERANCE <= tolerance <= _MAX_FIT_TOLERANCE):
        raise InputError(f"arc-fit tolerance must be from {_MIN_FIT_TOLERANCE:g} to {_MAX_FIT_TOLERANCE:g} mm, "
                         f"got {tolerance!r}")
    return float(tolerance)


def fit_arcs(curve: Curve, tolerance: float = DEFAULT_TOLERANCE) -> np.ndarray:
    """Bulge vertices of one curve, as an open chain that ends on the curve's last point.

    Parameters
    ----------
    curve : Curve
        The curve; its points lie on the true curve, its tangents are unit
        vectors in travel order.
    tolerance : float
        Largest distance between the arcs and the true curve, mm (1e-6 to 1).

    Returns
    -------
    numpy.ndarray
        (N, 3) rows ``x, y, bulge`` (mm, mm, dimensionless).  Row i's bulge is
        that of the segment to row i + 1; the last row is the curve's end
        point and carries bulge 0.  Along a free-form curve consecutive arcs
        meet tangentially; the first arc starts along the curve's first
        tangent and the last arc ends along its last tangent.
    """
    tolerance = _check_tolerance(tolerance)
    if curve.radius > 0:
        return _circle_vertices(curve)
    if curve.kind in STRAIGHT_KINDS:
        return _straight_vertices(curve)
    chains = []
    for piece in smooth_pieces(curve):
        if piece.kind in STRAIGHT_KINDS:
            chains.append(_straight_vertices(piece)[:-1])
        else:
            chains.append(_fit_smooth(SampledCurve(piece.points, piece.tangents), tolerance)[:-1])
    end = curve.points[-1]
    return np.concatenate(chains + [np.array([[end[0], end[1], 0.0]])])


def fit_loop(loop: Loop, tolerance: float = DEFAULT_TOLERANCE) -> np.ndarray:
    """Bulge vertices of a closed loop, ready for a closed DXF ``LWPOLYLINE``.

    Parameters
    ----------
    loop : Loop
        Closed chain of curves (outer loops counter-clockwise, holes clockwise).
    tolerance : float
        Largest distance between the arcs and the true curves, mm.

    Returns
    -------
    numpy.ndarray
        (N, 3) rows ``x, y, bulge``: vertex i to vertex i + 1, the last vertex
        back to the first.  The first vertex is not repeated; no two
        consecutive vertices coincide.  Bulge ``tan(theta / 4)``, positive
        for counter-clockwise arcs.
    """
    tolerance = _check_tolerance(tolerance)
    rows = np.concatenate([fit_arcs(c, tolerance)[:-1] for c in loop.curves])
    return _drop_repeated_vertices(rows)


def _drop_repeated_vertices(rows: np.ndarray) -> np.ndarray:
    """Remove each vertex that coincides with the next one (cyclically); its segment has no length."""
    step = np.roll(rows[:, :2], -1, axis=0) - rows[:, :2]
    repeated = np.hypot(step[:, 0], step[:, 1]) <= _SAME_POINT
    if repeated.all():
        raise InputError("the loop has no length: all its points coincide")
    return rows[~repeated]
