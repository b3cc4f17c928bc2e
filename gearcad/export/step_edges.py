"""Edges and wires for the STEP/STL solids: exact arcs and segments, B-spline edges within a tolerance.

A :class:`~gearcad.geometry.shape.Part`'s curves become exact edges: circular
curves (``radius > 0``) exact circular arcs, ``"line"``/``"chamfer"`` curves
straight segments, every other curve (involute, fillet) one B-spline edge
interpolated through a subset of the curve's points with the curve's end
tangents, the subset grown until the spline passes within ``tolerance`` of
every given point.  For straight solids a tooth space's bottom (fillet, root
arc, fillet, tangent to each other) is joined into one B-spline edge within the
same tolerance, so the file holds one face there instead of three.  Nothing is
faceted.  The kernel (cadquery / OCP) is
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


# -- a tooth space's bottom as one B-spline edge ---------------------------------------------------

_SMOOTH = 1e-6  # sine of the largest turn between two curves' tangents at a junction that still counts as smooth
_ARC_SAMPLES = 33  # points on an arc of a run (the joined spline's distance is measured at them)


def _smooth(a: "Curve", b: "Curve") -> bool:
    """Whether curve ``b`` continues ``a`` without a corner (tangents equal at the junction)."""
    t0, t1 = a.tangents[-1], b.tangents[0]
    return abs(t0[0] * t1[1] - t0[1] * t1[0]) <= _SMOOTH and float(t0 @ t1) > 0


def _runs(curves: Sequence["Curve"]) -> list[list["Curve"]]:
    """The loop's curves in runs, each run one edge: an exact arc with a free-form curve tangent to it on either
    side (a tooth space's bottom: fillet, root arc, fillet) is one run; every other curve is a run of its own.

    Only these runs are joined: a face through a fillet and its involute (curvature jumping inside the face)
    integrates 0.1-0.5 % off in the kernel's default volume, a face through fillet, root and fillet about
    1e-4 (measured against the kernel's adaptive area; tests/test_export_step.py).
    """
    n = len(curves)
    free = [c.radius == 0 and c.kind not in STRAIGHT_KINDS for c in curves]
    bottoms = {(i - 1) % n for i, c in enumerate(curves)
               if n >= 3 and c.radius > 0 and free[i - 1] and free[(i + 1) % n]
               and _smooth(curves[i - 1], c) and _smooth(c, curves[(i + 1) % n])}
    inner = {(k + j) % n for k in bottoms for j in (1, 2)}
    start = next((k for k in range(n) if k not in inner), None)
    if start is None:  # every curve inside some run: no loop of a gear looks like that
        return [[c] for c in curves]
    runs: list[list[Curve]] = []
    k, done = start, 0
    while done < n:
        size = 3 if k in bottoms and done + 3 <= n else 1
        runs.append([curves[(k + j) % n] for j in range(size)])
        k, done = (k + size) % n, done + size
    return runs


def _arc_samples(curve: "Curve") -> tuple[np.ndarray, np.ndarray]:
    """Points and unit tangents along an arc curve (from its first to its last point, in its sense), mm."""
    cx, cy = curve.centre
    (x0, y0), (x1, y1), t0 = curve.points[0], curve.points[-1], curve.tangents[0]
    a0, a1 = math.atan2(y0 - cy, x0 - cx), math.atan2(y1 - cy, x1 - cx)
    sense = 1.0 if (x0 - cx) * t0[1] - (y0 - cy) * t0[0] > 0 else -1.0
    span = sense * ((sense * (a1 - a0)) % (2 * math.pi))
    angles = a0 + span * np.linspace(0.0, 1.0, _ARC_SAMPLES)
    points = np.column_stack((cx + curve.radius * np.cos(angles), cy + curve.radius * np.sin(angles)))
    points[0], points[-1] = curve.points[0], curve.points[-1]
    return points, sense * np.column_stack((-np.sin(angles), np.cos(angles)))


def _distance(spline: "Geom_BSplineCurve", points: np.ndarray) -> float:
    """Largest distance of the points from the spline (the kernel's orthogonal projection), mm."""
    from OCP.GeomAPI import GeomAPI_ProjectPointOnCurve

    worst = 0.0
    ends = (spline.Value(spline.FirstParameter()), spline.Value(spline.LastParameter()))
    for x, y in points:
        p = _pnt((x, y))
        projection = GeomAPI_ProjectPointOnCurve(p, spline)
        d = projection.LowerDistance() if projection.NbPoints() else min(p.Distance(e) for e in ends)
        worst = max(worst, d)
    return worst


def _fewer_knots(spline: "Geom_BSplineCurve", budget: float) -> "Geom_BSplineCurve":
    """The spline with interior knots lowered by one multiplicity wherever the kernel can do so within ``budget`` mm.

    Each removal moves the curve by at most its own tolerance (the kernel's bound on the poles' shift, and
    so, by the convex hull property, on the curve's), and the removals share the budget: the result stays
    within ``budget`` of the spline given.
    """
    steps = 16
    share = budget / steps
    changed = True
    while changed and steps:
        changed = False
        for i in range(2, spline.NbKnots()):
            trial = spline.Copy()
            if trial.RemoveKnot(i, spline.Multiplicity(i) - 1, share):
                spline, changed, steps = trial, True, steps - 1
                break
    return spline


def _run_edge(run: Sequence["Curve"], tolerance: float, stats: _Stats, what: str) -> "TopoDS_Edge":
    """One B-spline edge through a run of smooth curves, within ``tolerance`` of every point of each."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
    from OCP.GeomConvert import GeomConvert_CompCurveToBSplineCurve

    pieces, points, fitted = [], [], 0.0
    for curve in run:
        pts, tangents = _arc_samples(curve) if curve.radius > 0 else (curve.points, curve.tangents)
        piece, _, piece_worst = spline_through(pts, tangents, tolerance)
        pieces.append(piece)
        points.append(pts)
        fitted = max(fitted, piece_worst)
    joined = GeomConvert_CompCurveToBSplineCurve(pieces[0])
    for piece in pieces[1:]:
        if not joined.Add(piece, 1e-7, True):
            raise GeometryError(f"{what}: the {len(run)} curves from {tuple(run[0].points[0])} mm do not join")
    every = np.vstack(points)
    spline = _fewer_knots(joined.BSplineCurve(), tolerance - fitted)
    worst = _distance(spline, every)  # measured, not only bounded
    if worst > tolerance:
        raise GeometryError(f"{what}: the joined spline strays {worst:.3g} mm from its curves, over {tolerance:g} mm")
    stats.splines += 1
    stats.poles += spline.NbPoles()
    stats.worst = max(stats.worst, worst)
    return BRepBuilderAPI_MakeEdge(spline).Edge()


def _loop_wire(loop: "Loop", tolerance: float, stats: _Stats, what: str, join: bool = False) -> "TopoDS_Wire":
    """The loop as a closed wire: an edge per curve, or with ``join`` an edge per run (see :func:`_runs`), mm."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeWire

    maker = BRepBuilderAPI_MakeWire()
    for run in (_runs(loop.curves) if join else [[c] for c in loop.curves]):
        edge = _curve_edge(run[0], tolerance, stats) if len(run) == 1 else _run_edge(run, tolerance, stats, what)
        maker.Add(edge)
        if not maker.IsDone():
            raise GeometryError(f"{what}: the {run[0].kind} curve starting at {tuple(run[0].points[0])} mm "
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
