"""Cubic B-splines fitted to the true curves of a loop, for DXF ``SPLINE`` entities.

Pure (numpy; shapely measures distances).  Each free-form or circular curve of a
:class:`~gearcad.geometry.shape.Loop` gets a clamped cubic B-spline by least
squares over dense points of the true curve (recovered between samples by the
cubic Hermite interpolant of :class:`~gearcad.geometry.arcfit.SampledCurve`):
the end points are kept exactly and the end tangents keep the curve's
directions, so neighbouring curves meet tangentially.  The knots are refined
(each span whose fit is too far off is halved) until the spline lies within
the tolerance of the true curve, measured both ways (true points to the spline
and spline points to the true curve).

Each fitted spline is then put in Bezier form: every inner knot is inserted
until it is triple (Boehm's knot insertion; the curve is unchanged), so a
reader that turns splines into cubic Bezier segments (as SVG-based importers
do) needs no knot arithmetic of its own and gets the curve exactly.

Neighbouring curves are joined into one spline: their knot vectors are laid
end to end with a knot of multiplicity 3 at each joint, so the joint is a
control point on the curve.  Straight curves stay straight lines.  A loop
without straight curves is one spline whose first and last control points
coincide (geometrically closed).

Knot values are arc lengths in mm.  The evaluation is Cox-de Boor's recursion
(de Boor, *A Practical Guide to Splines*, 1978, chapter IX).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError, InputError
from .arcfit import STRAIGHT_KINDS, SampledCurve, smooth_pieces
from .generate import Curve
from .shape import Loop

__all__ = ["SplinePiece", "LinePiece", "basis_matrix", "evaluate", "fit_curve", "insert_knot", "bezier_form",
           "loop_pieces", "DEGREE"]

DEGREE = 3
_FIT_MARGIN = 0.8  # the fit aims at 80 % of the tolerance
_PROBES_PER_SAMPLE = 8  # true-curve points per sample span used for the fit and the check
_PROBES_PER_SPAN = 24  # spline points per knot span used for the check
_MAX_SPANS = 4096
_MIN_TOLERANCE, _MAX_TOLERANCE = 1e-6, 1.0  # mm


@dataclass(frozen=True)
class SplinePiece:
    """A clamped B-spline of degree :data:`DEGREE`.

    Attributes
    ----------
    control : numpy.ndarray
        (N, 2) control points, mm.
    knots : numpy.ndarray
        (N + DEGREE + 1,) non-decreasing knots (arc length, mm); the first and
        last values repeat ``DEGREE + 1`` times.
    closed : bool
        The first and last control points coincide and the loop is this one spline.
    """

    control: np.ndarray
    knots: np.ndarray
    closed: bool = False

    @property
    def start(self) -> np.ndarray:
        return self.control[0]

    @property
    def end(self) -> np.ndarray:
        return self.control[-1]


@dataclass(frozen=True)
class LinePiece:
    """A straight segment from ``start`` to ``end`` (each (2,), mm)."""

    start: np.ndarray
    end: np.ndarray


# -- evaluation ---------------------------------------------------------------------

def basis_matrix(knots: np.ndarray, u: np.ndarray, degree: int = DEGREE) -> np.ndarray:
    """B-spline basis functions at parameters ``u``: an (M, N) matrix, N = len(knots) - degree - 1.

    Cox-de Boor recursion; the last parameter value belongs to the last non-empty span.
    """
    knots = np.asarray(knots, dtype=float)
    u = np.asarray(u, dtype=float)
    n_basis0 = len(knots) - 1
    left, right = knots[:-1], knots[1:]
    b = ((u[:, None] >= left) & (u[:, None] < right)).astype(float)
    last = np.flatnonzero(right > left)[-1]
    b[u >= knots[last + 1], :] = 0.0
    b[u >= knots[last + 1], last] = 1.0
    for p in range(1, degree + 1):
        count = n_basis0 - p
        d1 = knots[p:p + count] - knots[:count]
        d2 = knots[p + 1:p + 1 + count] - knots[1:1 + count]
        with np.errstate(divide="ignore", invalid="ignore"):
            a = np.where(d1 > 0, (u[:, None] - knots[:count]) / np.where(d1 > 0, d1, 1.0), 0.0)
            c = np.where(d2 > 0, (knots[p + 1:p + 1 + count] - u[:, None]) / np.where(d2 > 0, d2, 1.0), 0.0)
        b = a * b[:, :count] + c * b[:, 1:count + 1]
    return b


def evaluate(piece: SplinePiece, u: np.ndarray) -> np.ndarray:
    """Points (M, 2, mm) of ``piece`` at parameters ``u`` (knot units, mm): de Boor's algorithm, span by span."""
    t, c, p = np.asarray(piece.knots, dtype=float), np.asarray(piece.control, dtype=float), DEGREE
    u = np.asarray(u, dtype=float)
    k = np.clip(np.searchsorted(t, u, side="right") - 1, p, len(c) - 1)
    d = np.stack([c[k - p + j] for j in range(p + 1)], axis=1)
    for r in range(1, p + 1):
        for j in range(p, r - 1, -1):
            i = k - p + j
            denom = t[i + p + 1 - r] - t[i]
            alpha = np.where(denom > 0, (u - t[i]) / np.where(denom > 0, denom, 1.0), 0.0)[:, None]
            d[:, j] = (1.0 - alpha) * d[:, j - 1] + alpha * d[:, j]
    return d[:, p]


def _span_parameters(knots: np.ndarray, per_span: int) -> np.ndarray:
    """``per_span`` parameters across every non-empty knot span, both ends included."""
    breaks = np.unique(knots)
    f = np.linspace(0.0, 1.0, per_span + 1)[:-1]
    u = (breaks[:-1, None] + f[None, :] * np.diff(breaks)[:, None]).ravel()
    return np.append(u, breaks[-1])


# -- fitting one curve --------------------------------------------------------------

def _true_points(curve: Curve) -> np.ndarray:
    """Dense points of the true curve: the Hermite interpolant at fractions of every sample span."""
    track = SampledCurve(curve.points, curve.tangents)
    s = np.linspace(0.0, track.last, track.last * _PROBES_PER_SAMPLE + 1)
    pts, _ = track.at(s)
    pts[-1] = curve.points[-1]
    return pts


def _clamped_knots(breaks: np.ndarray) -> np.ndarray:
    return np.concatenate(([breaks[0]] * DEGREE, breaks, [breaks[-1]] * DEGREE))


def _least_squares(points: np.ndarray, u: np.ndarray, knots: np.ndarray, t0: np.ndarray, t1: np.ndarray) -> np.ndarray:
    """Control points minimising the squared distance at ``u``, ends fixed, end tangents along ``t0``/``t1``.

    Unknowns: the lengths ``a, b`` of the end legs (``P1 = P0 + a t0``,
    ``P(n-2) = P(n-1) - b t1``) and the inner control points.
    """
    basis = basis_matrix(knots, u)
    n = basis.shape[1]
    p0, p1 = points[0], points[-1]
    inner = n - 4
    rhs = points - np.outer(basis[:, 0] + basis[:, 1], p0) - np.outer(basis[:, -1] + basis[:, -2], p1)
    m = len(u)
    system = np.zeros((2 * m, 2 + 2 * inner))
    system[:m, 0] = basis[:, 1] * t0[0]
    system[m:, 0] = basis[:, 1] * t0[1]
    system[:m, 1] = -basis[:, -2] * t1[0]
    system[m:, 1] = -basis[:, -2] * t1[1]
    if inner:
        system[:m, 2:2 + inner] = basis[:, 2:n - 2]
        system[m:, 2 + inner:] = basis[:, 2:n - 2]
    solution, *_ = np.linalg.lstsq(system, np.concatenate((rhs[:, 0], rhs[:, 1])), rcond=None)
    a, b = solution[0], solution[1]
    control = np.empty((n, 2))
    control[0], control[-1] = p0, p1
    control[1], control[-2] = p0 + a * t0, p1 - b * t1
    if inner:
        control[2:n - 2, 0] = solution[2:2 + inner]
        control[2:n - 2, 1] = solution[2 + inner:]
    return control


def _deviation(true_pts: np.ndarray, piece: SplinePiece) -> tuple[float, np.ndarray]:
    """Largest distance between the spline and the true curve both ways (mm), and each true point's distance."""
    import shapely

    spline_pts = evaluate(piece, _span_parameters(piece.knots, _PROBES_PER_SPAN))
    true_line = shapely.LineString(true_pts)
    spline_line = shapely.LineString(spline_pts)
    to_spline = shapely.distance(spline_line, shapely.points(true_pts))
    to_true = shapely.distance(true_line, shapely.points(spline_pts))
    return float(max(to_spline.max(), to_true.max())), to_spline


def fit_curve(curve: Curve, tolerance: float) -> SplinePiece:
    """A clamped cubic B-spline within ``tolerance`` (mm) of one smooth curve.

    Parameters
    ----------
    curve : Curve
        A smooth curve (no tangent reversal), points on the true curve with unit tangents.
    tolerance : float
        Largest distance between the spline and the true curve, mm.

    Returns
    -------
    SplinePiece
        Knots in arc length (mm) from 0; end points exactly the curve's.

    Raises
    ------
    GeometryError
        No fit within the tolerance with up to 4096 knot spans.
    """
    true_pts = _true_points(curve)
    steps = np.hypot(*np.diff(true_pts, axis=0).T)
    u = np.concatenate(([0.0], np.cumsum(steps)))
    length = float(u[-1])
    t0, t1 = curve.tangents[0], curve.tangents[-1]
    breaks = np.array([0.0, length])
    limit = _FIT_MARGIN * tolerance
    while True:
        knots = _clamped_knots(breaks)
        piece = SplinePiece(_least_squares(true_pts, u, knots, t0, t1), knots)
        worst, per_point = _deviation(true_pts, piece)
        forward = (piece.control[1] - piece.control[0]) @ t0 > 0 and (piece.control[-1] - piece.control[-2]) @ t1 > 0
        if worst <= limit and forward:  # within the tolerance, leaving and arriving along the curve
            return piece
        if len(breaks) - 1 >= _MAX_SPANS:
            raise GeometryError(f"cannot fit a B-spline within {tolerance:g} mm to a {curve.kind} curve "
                                f"of {length:.3f} mm with {_MAX_SPANS} spans")
        breaks = _refined_breaks(breaks, u, per_point, limit, worst)


def _refined_breaks(breaks: np.ndarray, u: np.ndarray, per_point: np.ndarray, limit: float, worst: float) -> np.ndarray:
    """Halve every span holding a true point off by more than the limit (all spans if none is found).

    An end leg pointing backwards has no point off the limit: then every span is halved too.
    """
    span = np.clip(np.searchsorted(breaks, u, side="right") - 1, 0, len(breaks) - 2)
    bad = np.unique(span[per_point > limit])
    if bad.size == 0:  # the spline strays between true points: refine everywhere
        bad = np.arange(len(breaks) - 1)
    mids = (breaks[bad] + breaks[bad + 1]) / 2
    return np.sort(np.concatenate((breaks, mids)))


# -- Bezier form ---------------------------------------------------------------------

def insert_knot(piece: SplinePiece, t: float) -> SplinePiece:
    """The same curve with knot ``t`` inserted once (Boehm, 1980; de Boor 1978, chapter XI).

    With ``k`` the span holding ``t``, control points ``k - p + 1 .. k`` become
    ``(1 - a_j) P(j-1) + a_j P(j)`` with ``a_j = (t - t_j) / (t_(j+p) - t_j)``.
    """
    c, knots, p = piece.control, piece.knots, DEGREE
    k = int(np.searchsorted(knots, t, side="right") - 1)
    j = np.arange(k - p + 1, k + 1)
    a = ((t - knots[j]) / (knots[j + p] - knots[j]))[:, None]
    blended = (1.0 - a) * c[j - 1] + a * c[j]
    control = np.concatenate((c[:k - p + 1], blended, c[k:]))
    return SplinePiece(control, np.insert(knots, k + 1, t), piece.closed)


def bezier_form(piece: SplinePiece) -> SplinePiece:
    """The same curve with every inner knot triple: a chain of cubic Bezier segments in B-spline form."""
    for value in np.unique(piece.knots)[1:-1]:
        while np.count_nonzero(piece.knots == value) < DEGREE:
            piece = insert_knot(piece, float(value))
    return piece


# -- a loop -------------------------------------------------------------------------

def _check_tolerance(tolerance: float) -> float:
    if not (isinstance(tolerance, (int, float)) and math.isfinite(tolerance)
            and _MIN_TOLERANCE <= tolerance <= _MAX_TOLERANCE):
        raise InputError(f"spline tolerance must be from {_MIN_TOLERANCE:g} to {_MAX_TOLERANCE:g} mm, got {tolerance!r}")
    return float(tolerance)


def _curve_items(curve: Curve, tolerance: float) -> list[LinePiece | SplinePiece]:
    if curve.kind in STRAIGHT_KINDS:
        return [LinePiece(curve.points[0].copy(), curve.points[-1].copy())]
    items: list[LinePiece | SplinePiece] = []
    for piece in smooth_pieces(curve):
        if piece.kind in STRAIGHT_KINDS:
            items.append(LinePiece(piece.points[0].copy(), piece.points[-1].copy()))
        else:
            items.append(bezier_form(fit_curve(piece, tolerance)))
    return items


def _rotated(item: LinePiece | SplinePiece, angle: float) -> LinePiece | SplinePiece:
    c, s = math.cos(angle), math.sin(angle)
    rot = np.array([[c, -s], [s, c]])
    if isinstance(item, LinePiece):
        return LinePiece(rot @ item.start, rot @ item.end)
    return SplinePiece(item.control @ rot.T, item.knots)


def _joined(run: list[SplinePiece], closed: bool) -> SplinePiece:
    """One spline from consecutive clamped pieces: knots end to end, multiplicity 3 at each joint."""
    controls = [run[0].control]
    knots = [run[0].knots[:-1]]  # drop one end knot: the joint keeps multiplicity DEGREE
    offset = float(run[0].knots[-1])
    for piece in run[1:]:
        controls.append(piece.control[1:])
        inner = piece.knots[DEGREE + 1:] - piece.knots[0] + offset
        knots.append(inner[:-1])
        offset = float(inner[-1])
    knots.append([offset])
    control = np.concatenate(controls)
    if closed:
        control[-1] = control[0]
    knots_all = np.concatenate([np.atleast_1d(k) for k in knots])
    knots_all[:DEGREE + 1] = knots_all[0]
    return SplinePiece(control, knots_all, closed)


def loop_pieces(loop: Loop, tolerance: float = 1e-3, copies: int = 1) -> tuple[LinePiece | SplinePiece, ...]:
    """The loop as straight lines and cubic B-splines within ``tolerance`` of its true curves.

    Parameters
    ----------
    loop : Loop
        Closed chain of curves, mm.
    tolerance : float
        Largest distance between the splines and the true curves, mm (1e-6 to 1).
    copies : int
        The loop is this many copies of its first ``len(curves) / copies`` curves
        turned about the origin (a gear's teeth); one copy is fitted and turned.

    Returns
    -------
    tuple of LinePiece and SplinePiece
        In loop order; consecutive smooth curves form one spline.  A loop
        without straight curves is one closed spline.
    """
    tolerance = _check_tolerance(tolerance)
    curves = loop.curves
    per = len(curves) // copies if copies > 1 and len(curves) % copies == 0 else len(curves)
    items: list[LinePiece | SplinePiece] = []
    for curve in curves[:per]:
        items.extend(_curve_items(curve, tolerance))
    if per < len(curves):
        turn = 2 * math.pi / copies
        c, s = math.cos(turn), math.sin(turn)
        rot = np.array([[c, -s], [s, c]])
        if not np.allclose(curves[0].points @ rot.T, curves[per].points, atol=1e-9):
            items = [i for curve in curves for i in _curve_items(curve, tolerance)]
        else:
            items = [_rotated(i, k * turn) for k in range(copies) for i in items]
    return _group(items)


def _group(items: list[LinePiece | SplinePiece]) -> tuple[LinePiece | SplinePiece, ...]:
    """Join runs of consecutive splines; the loop starts at a line when it has one."""
    lines = [k for k, item in enumerate(items) if isinstance(item, LinePiece)]
    if not lines:
        return (_joined(items, closed=True),)  # type: ignore[arg-type]
    start = (lines[-1] + 1) % len(items)  # begin right after a line, so no run wraps round
    ordered = items[start:] + items[:start]
    grouped: list[LinePiece | SplinePiece] = []
    run: list[SplinePiece] = []
    for item in ordered:
        if isinstance(item, SplinePiece):
            run.append(item)
            continue
        if run:
            grouped.append(_joined(run, closed=False))
            run = []
        grouped.append(item)
    if run:
        grouped.append(_joined(run, closed=False))
    return tuple(grouped)
