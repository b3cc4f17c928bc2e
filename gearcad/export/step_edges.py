"""Edges and wires for the STEP/STL solids: exact arcs and segments, B-spline edges within a tolerance.

A :class:`~gearcad.geometry.shape.Part`'s curves become exact edges: circular
curves (``radius > 0``) exact circular arcs, ``"line"``/``"chamfer"`` curves
straight segments, every other curve (involute, fillet) one B-spline edge
interpolated through a subset of the curve's points with the curve's end
tangents, the subset grown until the spline passes within ``tolerance`` of
every given point.  Nothing is faceted.  The kernel (cadquery / OCP) is
imported inside the functions; :func:`kernel_quiet` keeps its statistics off
standard output.  Lengths in mm.
"""

from __future__ import annotations

import math
import os
import sys
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..errors import GeometryError

if TYPE_CHECKING:
    from OCP.Geom import Geom_BSplineCurve
    from OCP.TopoDS import TopoDS_Edge, TopoDS_Wire

    from ..geometry.generate import Curve
    from ..geometry.shape import Loop

__all__ = ["STRAIGHT_KINDS", "kernel_quiet", "spline_through"]

STRAIGHT_KINDS = frozenset({"line", "chamfer"})


# -- keeping the kernel off stdout ---------------------------------------------------------

def _flush_c_stdio() -> None:
    import ctypes

    try:
        ctypes.CDLL(None).fflush(None)
    except (OSError, AttributeError):  # no C library handle on this platform
        pass


@contextmanager
def kernel_quiet() -> Iterator[None]:
    """Point file descriptor 1 at the null device for the duration, then restore it.

    The kernel writes transfer statistics to stdout, which would corrupt JSON
    output and mean nothing to a user; gearcad reports its own errors.  Python's
    and the C library's buffers are flushed on both sides so no kernel output is
    left to reach the real stdout afterwards.
    """
    sys.stdout.flush()
    _flush_c_stdio()
    saved = os.dup(1)
    sink = os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(sink, 1)
        os.close(sink)
        try:
            yield
        finally:
            sys.stdout.flush()
            _flush_c_stdio()
    finally:
        os.dup2(saved, 1)
        os.close(saved)


# -- edges ------------------------------------------------------------------------------------

def _pnt(xy: Sequence[float]) -> Any:
    from OCP.gp import gp_Pnt

    return gp_Pnt(float(xy[0]), float(xy[1]), 0.0)


def _arc_edge(curve: "Curve") -> "TopoDS_Edge":
    """An exact arc of the curve's circle from its first to its last point."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
    from OCP.GC import GC_MakeArcOfCircle
    from OCP.gp import gp_Ax2, gp_Circ, gp_Dir

    cx, cy = curve.centre
    p0, t0 = curve.points[0], curve.tangents[0]
    ccw = (p0[0] - cx) * t0[1] - (p0[1] - cy) * t0[0] > 0
    axis = gp_Ax2(_pnt((cx, cy)), gp_Dir(0.0, 0.0, 1.0 if ccw else -1.0))
    arc = GC_MakeArcOfCircle(gp_Circ(axis, curve.radius), _pnt(p0), _pnt(curve.points[-1]), True)
    if not arc.IsDone():
        raise GeometryError(f"cannot build the arc of radius {curve.radius:g} mm at ({cx:g}, {cy:g}) mm")
    return BRepBuilderAPI_MakeEdge(arc.Value()).Edge()


def _segment_edge(curve: "Curve") -> "TopoDS_Edge":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge

    return BRepBuilderAPI_MakeEdge(_pnt(curve.points[0]), _pnt(curve.points[-1])).Edge()


def _interpolate(points: np.ndarray, params: np.ndarray, t0: np.ndarray, t1: np.ndarray) -> "Geom_BSplineCurve":
    """The cubic B-spline through ``points`` at ``params`` (mm of chord) with unit end tangents."""
    from OCP.GeomAPI import GeomAPI_Interpolate
    from OCP.gp import gp_Vec
    from OCP.TColgp import TColgp_HArray1OfPnt
    from OCP.TColStd import TColStd_HArray1OfReal

    pts = TColgp_HArray1OfPnt(1, len(points))
    par = TColStd_HArray1OfReal(1, len(points))
    for i, (p, u) in enumerate(zip(points, params), start=1):
        pts.SetValue(i, _pnt(p))
        par.SetValue(i, float(u))
    try:
        interp = GeomAPI_Interpolate(pts, par, False, 1e-9)
        # Unit tangents with a chord-length parameter: the curve runs at about unit speed, so no scaling.
        interp.Load(gp_Vec(float(t0[0]), float(t0[1]), 0.0), gp_Vec(float(t1[0]), float(t1[1]), 0.0), False)
        interp.Perform()
    except Exception as exc:  # the kernel's Standard_Failure (e.g. coincident points)
        raise GeometryError(f"B-spline interpolation through {len(points)} points failed: {exc}") from exc
    if not interp.IsDone():
        raise GeometryError(f"B-spline interpolation through {len(points)} points failed")
    return interp.Curve()


def _deviations(spline: "Geom_BSplineCurve", points: np.ndarray, params: np.ndarray) -> np.ndarray:
    """Distance from each point to the spline point found by one Newton step from its parameter, mm.

    Each value is the distance to an actual point of the spline, so it bounds the
    true point-to-curve distance from above.
    """
    from OCP.gp import gp_Pnt, gp_Vec

    lo, hi = spline.FirstParameter(), spline.LastParameter()
    p, v = gp_Pnt(), gp_Vec()
    out = np.empty(len(points))
    for i, (xy, u) in enumerate(zip(points, params)):
        spline.D1(float(u), p, v)
        dx, dy = xy[0] - p.X(), xy[1] - p.Y()
        speed2 = v.X() ** 2 + v.Y() ** 2
        u2 = min(hi, max(lo, u + (dx * v.X() + dy * v.Y()) / speed2)) if speed2 > 0 else u
        q = spline.Value(u2)
        out[i] = min(math.hypot(dx, dy), math.hypot(xy[0] - q.X(), xy[1] - q.Y()))
    return out


def _refined(chosen: np.ndarray, dev: np.ndarray, tolerance: float) -> np.ndarray:
    """Add, in every span between chosen points that strays too far, its worst point."""
    extra = []
    for a, b in zip(chosen[:-1], chosen[1:]):
        if b - a > 1:
            k = a + 1 + int(np.argmax(dev[a + 1:b]))
            if dev[k] > tolerance:
                extra.append(k)
    return np.union1d(chosen, np.array(extra, dtype=int))


def spline_through(points: np.ndarray, tangents: np.ndarray, tolerance: float) -> tuple["Geom_BSplineCurve", int, float]:
    """A cubic B-spline within ``tolerance`` of every point, interpolating a growing subset of them.

    Starts from the two end points (one cubic span: 4 control points, the end
    tangents imposed) and adds, in each span that strays too far, its worst
    point, until every point is within ``tolerance``: the fewest control points
    this way finds, so the files stay small.

    Parameters
    ----------
    points : numpy.ndarray
        (N, 2) points on the curve in travel order, mm.
    tangents : numpy.ndarray
        (N, 2) unit tangents; the first and last are imposed at the ends.
    tolerance : float
        Largest allowed distance from a given point to the spline, mm.

    Returns
    -------
    spline : OCP.Geom.Geom_BSplineCurve
        Passes exactly through the first and last point.
    used : int
        Number of points interpolated.
    worst : float
        Largest distance of a given point from the spline (upper bound), mm.
    """
    steps = np.hypot(*np.diff(points, axis=0).T)
    params = np.concatenate(([0.0], np.cumsum(steps)))  # chord length, mm
    n = len(points)
    chosen = np.array([0, n - 1]) if n > 1 else np.arange(n)
    while True:
        spline = _interpolate(points[chosen], params[chosen], tangents[0], tangents[-1])
        dev = _deviations(spline, points, params)
        worst = float(dev.max())
        if worst <= tolerance or len(chosen) == n:
            return spline, len(chosen), worst
        more = _refined(chosen, dev, tolerance)
        chosen = more if len(more) > len(chosen) else np.arange(n)  # no span to split: take every point


@dataclass
class _Stats:
    splines: int = 0
    poles: int = 0
    worst: float = 0.0


def _curve_edge(curve: "Curve", tolerance: float, stats: _Stats) -> "TopoDS_Edge":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge

    if curve.radius > 0:
        return _arc_edge(curve)
    if curve.kind in STRAIGHT_KINDS:
        return _segment_edge(curve)
    spline, _, worst = spline_through(curve.points, curve.tangents, tolerance)
    stats.splines += 1
    stats.poles += spline.NbPoles()
    stats.worst = max(stats.worst, worst)
    return BRepBuilderAPI_MakeEdge(spline).Edge()


def _loop_wire(loop: "Loop", tolerance: float, stats: _Stats, what: str) -> "TopoDS_Wire":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeWire

    maker = BRepBuilderAPI_MakeWire()
    for curve in loop.curves:
        maker.Add(_curve_edge(curve, tolerance, stats))
        if not maker.IsDone():
            raise GeometryError(f"{what}: the {curve.kind} curve starting at {tuple(curve.points[0])} mm "
                                "does not join the previous one")
    wire = maker.Wire()
    if not wire.Closed():
        raise GeometryError(f"{what}: the loop of {len(loop.curves)} curves is not closed")
    return wire


def _circle_wire(x: float, y: float, diameter: float) -> "TopoDS_Wire":
    """A clockwise full circle (a hole in a face whose normal is +z)."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.gp import gp_Ax2, gp_Circ, gp_Dir

    circ = gp_Circ(gp_Ax2(_pnt((x, y)), gp_Dir(0.0, 0.0, -1.0)), diameter / 2)
    return BRepBuilderAPI_MakeWire(BRepBuilderAPI_MakeEdge(circ).Edge()).Wire()
