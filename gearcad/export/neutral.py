"""The neutral form of a cut file: contours as ``x, y, bulge`` rows or B-splines, circles, labels (mm).

Pure data with validation; the DXF and SVG writers consume it, the planning code
(``gearcad.export.cutting``) produces it from a plan.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..geometry.bspline import DEGREE, LinePiece, SplinePiece

__all__ = ["Label", "CutDrawing", "polyline_contour", "MIN_SEGMENT", "LinePiece", "SplinePiece", "arc_extremes",
           "drawing_extents", "moved_drawing", "merged_drawing"]

MIN_SEGMENT = 1e-9  # mm: shorter segments count as a repeated vertex


@dataclass(frozen=True)
class Label:
    """One line of marking text.

    Attributes
    ----------
    text : str
        The text, one line.
    x, y : float
        Left end of the text's baseline, mm (the insert point of a left-aligned
        text, so a reader that ignores alignment still places it right).
    height : float
        Capital height, mm.
    """

    text: str
    x: float
    y: float
    height: float

    def __post_init__(self) -> None:
        if not self.text or any(c in self.text for c in "\r\n"):
            raise InputError(f"label text must be one non-empty line, got {self.text!r}")
        if not all(math.isfinite(v) for v in (self.x, self.y, self.height)):
            raise InputError(f"label {self.text!r}: position and height must be finite numbers (mm)")
        if self.height <= 0:
            raise InputError(f"label {self.text!r}: height must be greater than 0 mm, got {self.height!r}")


def _frozen(array: np.ndarray) -> np.ndarray:
    array.setflags(write=False)
    return array


def _check_vertices(xy: np.ndarray, what: str) -> None:
    """Reject non-finite values and repeated neighbours (closing pair included)."""
    if not np.isfinite(xy).all():
        raise InputError(f"{what}: coordinates must be finite numbers (mm)")
    gaps = np.hypot(*(np.roll(xy, -1, axis=0) - xy).T)
    bad = np.flatnonzero(gaps <= MIN_SEGMENT)
    if bad.size:
        k = int(bad[0])
        raise InputError(f"{what}: vertices {k} and {(k + 1) % len(xy)} coincide "
                         "(a closed contour lists each vertex once, the first is not repeated at the end)")


def _contour(data: object, what: str) -> np.ndarray:
    """An (N, 3) read-only copy of ``x, y, bulge`` rows, checked."""
    arr = np.array(data, dtype=float)
    if arr.ndim != 2 or arr.shape[1] != 3 or len(arr) < 2:
        raise InputError(f"{what}: expected (N, 3) rows of x, y, bulge with N >= 2, got shape {arr.shape}")
    if len(arr) == 2 and not np.any(arr[:, 2]):
        raise InputError(f"{what}: two vertices enclose nothing unless a segment is an arc")
    if not np.isfinite(arr[:, 2]).all():
        raise InputError(f"{what}: bulges must be finite numbers")
    _check_vertices(arr[:, :2], what)
    return _frozen(arr)


def _spline_contour(data: object, what: str) -> tuple[LinePiece | SplinePiece, ...]:
    """A chain of lines and B-splines, checked: finite, consistent knots, each piece ending where the next starts."""
    pieces = tuple(data)  # type: ignore[arg-type]
    if not pieces or not all(isinstance(p, (LinePiece, SplinePiece)) for p in pieces):
        raise InputError(f"{what}: expected a non-empty chain of LinePiece and SplinePiece")
    for k, piece in enumerate(pieces):
        if isinstance(piece, SplinePiece):
            control, knots = np.asarray(piece.control), np.asarray(piece.knots)
            if control.ndim != 2 or control.shape[1] != 2 or len(control) <= DEGREE:
                raise InputError(f"{what}, piece {k}: a cubic spline needs (N, 2) control points with N >= 4")
            if knots.shape != (len(control) + DEGREE + 1,) or np.any(np.diff(knots) < 0):
                raise InputError(f"{what}, piece {k}: knots must be non-decreasing, N + 4 of them")
            if not (np.isfinite(control).all() and np.isfinite(knots).all()):
                raise InputError(f"{what}, piece {k}: control points and knots must be finite numbers")
        elif not (np.isfinite(piece.start).all() and np.isfinite(piece.end).all()):
            raise InputError(f"{what}, piece {k}: line ends must be finite numbers (mm)")
    ends = [np.asarray(p.end) for p in pieces]
    starts = [np.asarray(p.start) for p in pieces[1:] + pieces[:1]]
    gaps = [float(np.hypot(*(a - b))) for a, b in zip(ends, starts)]
    if max(gaps) > 1e-6:
        raise InputError(f"{what}: pieces do not join (gap {max(gaps):.3g} mm); the chain must be closed")
    return pieces


def _circle(data: object, k: int) -> tuple[float, float, float]:
    try:
        x, y, d = (float(v) for v in data)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise InputError(f"circle {k}: expected (x, y, diameter) in mm, got {data!r}") from None
    if not all(math.isfinite(v) for v in (x, y, d)) or d <= 0:
        raise InputError(f"circle {k}: needs finite x, y and a diameter greater than 0 mm, got {data!r}")
    return (x, y, d)


@dataclass(frozen=True)
class CutDrawing:
    """What a cut file holds, in the form the writers take it (mm).

    Attributes
    ----------
    outer : tuple of numpy.ndarray
        Outer contours, each (N, 3) rows ``x, y, bulge``: segment ``i`` runs from
        vertex ``i`` to ``i + 1`` and the last closes to the first; the first
        vertex is not repeated.  Bulge is ``tan(included angle / 4)``, positive
        for a counter-clockwise arc, 0 for a straight segment.
    inner : tuple of numpy.ndarray
        Inner contours (holes that are not plain circles), same form.
    circles : tuple of (x, y, diameter)
        Round holes, mm.
    outer_splines, inner_splines : tuple of tuple
        Contours given as closed chains of :class:`LinePiece` and
        :class:`SplinePiece` (cubic B-splines: control points and knots) instead,
        for the spline mode; R2000 and later only.
    labels : tuple of Label
        Marking texts.
    """

    outer: tuple[np.ndarray, ...] = ()
    inner: tuple[np.ndarray, ...] = ()
    circles: tuple[tuple[float, float, float], ...] = ()
    outer_splines: tuple[tuple[LinePiece | SplinePiece, ...], ...] = ()
    inner_splines: tuple[tuple[LinePiece | SplinePiece, ...], ...] = ()
    labels: tuple[Label, ...] = ()

    def __post_init__(self) -> None:
        put = object.__setattr__
        put(self, "outer", tuple(_contour(c, f"outer contour {k}") for k, c in enumerate(self.outer)))
        put(self, "inner", tuple(_contour(c, f"inner contour {k}") for k, c in enumerate(self.inner)))
        put(self, "circles", tuple(_circle(c, k) for k, c in enumerate(self.circles)))
        put(self, "outer_splines", tuple(_spline_contour(c, f"outer spline {k}") for k, c in enumerate(self.outer_splines)))
        put(self, "inner_splines", tuple(_spline_contour(c, f"inner spline {k}") for k, c in enumerate(self.inner_splines)))
        put(self, "labels", tuple(self.labels))
        if not (self.outer or self.inner or self.circles or self.outer_splines or self.inner_splines):
            raise InputError("a cut drawing needs at least one contour or circle")


def polyline_contour(points: np.ndarray) -> np.ndarray:
    """A straight-segment contour: (N, 2) vertices mm with bulge 0 appended.

    Parameters
    ----------
    points : numpy.ndarray
        (N, 2) vertices of a closed polyline, first not repeated at the end, mm.

    Returns
    -------
    numpy.ndarray
        (N, 3) rows ``x, y, 0``.
    """
    pts = np.asarray(points, dtype=float)
    return np.column_stack((pts, np.zeros(len(pts))))




def _arc_centre(p0: np.ndarray, p1: np.ndarray, bulge: float) -> np.ndarray:
    """Centre of the bulge arc from ``p0`` to ``p1``: ``m + perp(c) (1 - b^2) / (4 b)``."""
    chord = p1 - p0
    perp = np.array((-chord[1], chord[0]))
    return (p0 + p1) / 2 + perp * (1 - bulge * bulge) / (4 * bulge)


def arc_extremes(p0: np.ndarray, p1: np.ndarray, bulge: float) -> list[np.ndarray]:
    """Points where the bulge arc from ``p0`` to ``p1`` (mm) reaches an extreme x or y, mm."""
    centre = _arc_centre(p0, p1, bulge)
    radius = float(np.hypot(*(p0 - centre)))
    start = math.atan2(p0[1] - centre[1], p0[0] - centre[0])
    sweep = 4 * math.atan(bulge)
    lo, hi = (start, start + sweep) if sweep > 0 else (start + sweep, start)
    found = []
    for k in range(math.ceil(lo / (math.pi / 2)), math.floor(hi / (math.pi / 2)) + 1):
        a = k * math.pi / 2
        found.append(centre + radius * np.array((math.cos(a), math.sin(a))))
    return found


def _contour_points(contour: np.ndarray) -> np.ndarray:
    xy = contour[:, :2]
    points = [xy]
    for i in np.flatnonzero(contour[:, 2]):
        found = arc_extremes(xy[i], xy[(i + 1) % len(xy)], float(contour[i, 2]))
        if found:
            points.append(np.array(found))
    return np.concatenate(points)


def _spline_points(pieces: tuple[LinePiece | SplinePiece, ...]) -> np.ndarray:
    """Points of a spline contour dense enough for its bounding box (64 per knot span)."""
    from ..geometry.bspline import evaluate

    points = []
    for piece in pieces:
        if isinstance(piece, LinePiece):
            points.append(np.array([piece.start, piece.end], dtype=float))
        else:
            breaks = np.unique(piece.knots)
            f = np.linspace(0.0, 1.0, 65)
            u = (breaks[:-1, None] + f[None, :] * np.diff(breaks)[:, None]).ravel()
            points.append(evaluate(piece, u))
    return np.concatenate(points)


def drawing_extents(drawing: CutDrawing) -> tuple[float, float, float, float]:
    """The bounding box ``(x0, y0, x1, y1)`` of the cut geometry (contours, circles, splines), mm.

    Exact for lines, arcs and circles (arcs by their extreme points); splines by
    64 points per knot span.  Labels lie inside their parts and are not counted.
    """
    points = [_contour_points(c) for c in drawing.outer + drawing.inner]
    points += [_spline_points(c) for c in drawing.outer_splines + drawing.inner_splines]
    points += [np.array([(x - d / 2, y - d / 2), (x + d / 2, y + d / 2)]) for x, y, d in drawing.circles]
    arr = np.concatenate(points)
    low, high = arr.min(axis=0), arr.max(axis=0)
    return float(low[0]), float(low[1]), float(high[0]), float(high[1])


def moved_drawing(drawing: CutDrawing, dx: float, dy: float) -> CutDrawing:
    """``drawing`` moved by ``(dx, dy)`` mm (bulges, knots and text heights unchanged)."""
    shift = np.array([dx, dy, 0.0])
    offset = np.array([dx, dy])

    def pieces(chain):
        return tuple(LinePiece(p.start + offset, p.end + offset) if isinstance(p, LinePiece)
                     else SplinePiece(p.control + offset, p.knots, p.closed) for p in chain)

    return CutDrawing(outer=tuple(c + shift for c in drawing.outer), inner=tuple(c + shift for c in drawing.inner),
                      circles=tuple((x + dx, y + dy, d) for x, y, d in drawing.circles),
                      outer_splines=tuple(pieces(c) for c in drawing.outer_splines),
                      inner_splines=tuple(pieces(c) for c in drawing.inner_splines),
                      labels=tuple(Label(t.text, t.x + dx, t.y + dy, t.height) for t in drawing.labels))


def merged_drawing(drawings: list[CutDrawing] | tuple[CutDrawing, ...]) -> CutDrawing:
    """One drawing holding every contour, circle and label of ``drawings`` (a nested sheet)."""
    return CutDrawing(outer=tuple(c for d in drawings for c in d.outer),
                      inner=tuple(c for d in drawings for c in d.inner),
                      circles=tuple(c for d in drawings for c in d.circles),
                      outer_splines=tuple(c for d in drawings for c in d.outer_splines),
                      inner_splines=tuple(c for d in drawings for c in d.inner_splines),
                      labels=tuple(t for d in drawings for t in d.labels))
