"""The neutral form of a cut file: contours as ``x, y, bulge`` rows, circles, labels (mm).

Pure data with validation; the DXF and SVG writers consume it, the planning code
(``gearcad.drawings``) produces it from a plan.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import InputError

__all__ = ["Label", "CutDrawing", "polyline_contour", "MIN_SEGMENT"]

MIN_SEGMENT = 1e-9  # mm: shorter segments count as a repeated vertex


@dataclass(frozen=True)
class Label:
    """One line of marking text.

    Attributes
    ----------
    text : str
        The text, one line.
    x, y : float
        Centre of the text (middle of its height and width), mm.
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


def _fit_points(data: object, what: str) -> np.ndarray:
    """An (N, 2) read-only copy of spline fit points, checked."""
    arr = np.array(data, dtype=float)
    if arr.ndim != 2 or arr.shape[1] != 2 or len(arr) < 3:
        raise InputError(f"{what}: expected (N, 2) fit points with N >= 3, got shape {arr.shape}")
    _check_vertices(arr, what)
    return _frozen(arr)


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
    outer_splines, inner_splines : tuple of numpy.ndarray
        Contours given as (N, 2) spline fit points instead (first point not
        repeated), for the SPLINE mode; R2000 and later only.
    labels : tuple of Label
        Marking texts.
    """

    outer: tuple[np.ndarray, ...] = ()
    inner: tuple[np.ndarray, ...] = ()
    circles: tuple[tuple[float, float, float], ...] = ()
    outer_splines: tuple[np.ndarray, ...] = ()
    inner_splines: tuple[np.ndarray, ...] = ()
    labels: tuple[Label, ...] = ()

    def __post_init__(self) -> None:
        put = object.__setattr__
        put(self, "outer", tuple(_contour(c, f"outer contour {k}") for k, c in enumerate(self.outer)))
        put(self, "inner", tuple(_contour(c, f"inner contour {k}") for k, c in enumerate(self.inner)))
        put(self, "circles", tuple(_circle(c, k) for k, c in enumerate(self.circles)))
        put(self, "outer_splines", tuple(_fit_points(c, f"outer spline {k}") for k, c in enumerate(self.outer_splines)))
        put(self, "inner_splines", tuple(_fit_points(c, f"inner spline {k}") for k, c in enumerate(self.inner_splines)))
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


