"""A train's worm wheel as a flat part: the worm's generated mid-plane section, each tooth space one fitted curve.

The hob simulation (:func:`gearcad.geometry.worm_wheel.wheel_slice`) gives the wheel's mid-plane section as
a polygon of many thousand vertices: every generating position of the worm leaves a straight piece
of its thread's edge, and the vertices are where neighbouring pieces cross (the cusps of the scallops).
Written as it stands, that polygon makes a solid of one planar face per vertex (megabytes of STEP that
meshers choke on) and a drawing of as many segments.  Gear outlines elsewhere are true curves, fitted
by the writers with arcs (DXF) or B-splines (STEP) within a tolerance; this module gives the wheel the
same form:

* the section's tip lands (its vertices on the blank's circle) become exact arcs of the throat radius;
* each tooth space, from tip corner to tip corner (flank, root fillet, root, fillet, flank: tangent to
  each other, since the pair's bounds refuse undercut), is one clamped cubic B-spline fitted by least
  squares to the space's vertices and its edges' midpoints, the corners kept exactly, the parameters corrected towards each
  vertex's foot point (Hoschek's parameter correction) and the knot spans halved where a vertex is
  further than the limit; one space is fitted and turned to every tooth;
* the spline is handed on as :class:`~gearcad.geometry.generate.Curve` pieces: points dense enough that the
  polyline keeps within nanometres of the spline, with its exact unit tangents, cut where the shape changes
  (flank, fillet, root, fillet, flank), each piece one face of the solid.

The section is built as the hob simulation builds its slices, the blank minus the thread's sweep (one tooth
space) turned to the neighbouring teeth; every tooth of the whole section is that space turned, so one space
is fitted and checked.  The deviation is measured both ways: from each vertex of the space to the fitted
curve, and from the curve to the space's edges (which takes in the scallops between the cusps).  The
generating positions are :data:`POSITIONS_FACTOR` times the simulation's default, so the scallops (about
``delta^2 / (8 rho)`` on the flanks, falling with the square of the count; deeper in the fillet, which the
thread's sharp tip corner cuts) stay inside the limit.  ``tests/test_worm_wheel_outline.py`` checks the fit
against the whole section of :func:`gearcad.geometry.worm_wheel.wheel_slice`.  Pure (numpy, shapely): mm
and radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError
from ..geometry.bspline import DEGREE, basis_matrix
from ..geometry.generate import Curve
from ..geometry.shape import Loop, arc_curve

__all__ = ["WheelOutline", "wheel_outline", "space_chains", "fit_space", "POSITIONS_FACTOR", "FIT_SHARE"]

#: Generating positions of the mid-plane section, times the hob simulation's default (40 per axial pitch):
#: the scallops shrink with the square of the count (about 3 µm at the default on a module 1.5 wheel).
POSITIONS_FACTOR = 4
#: The fit aims at this share of the tolerance (the writers' own fit of the curve comes on top).
FIT_SHARE = 0.5
_RESOLUTION = 256  # segments a quarter circle of the blank, as in wheel_slice
_START_SPANS = 4
_MAX_SPANS = 512
_CORRECTIONS = 3  # parameter corrections per knot vector
_PROBES = 16  # spline points a span checked against the chain's edges
_MIN_HELD = 2  # vertices a span must hold to be halved
_SAMPLE_STEP = 0.004  # mm between the dense samples the deviation is measured on (sag on a 0.1 mm radius: 20 nm)
_SAG = 2e-5  # mm: the handed-on samples' polyline keeps this close to the spline (chord sag step^2 / (8 rho))
_MAX_STEP = 0.05  # mm: the longest step between handed-on samples


@dataclass(frozen=True)
class WheelOutline:
    """The wheel's fitted mid-plane outline and how close it keeps to the generated section.

    Attributes
    ----------
    loop : Loop
        Counter-clockwise: per tooth the space's fitted curve (kind ``"worm-space"``, in pieces) and the tip
        land's arc.
    deviation : float
        Largest distance between the fitted outline and the section (both ways, every tooth), mm.
    vertex_deviation : float
        Largest distance from a section vertex to the fitted outline, mm.
    vertices : int
        Section vertices checked.
    spans : int
        Knot spans of one space's spline.
    pieces : int
        Curves a space is cut into (flank, fillet, root, fillet, flank), each one face of the solid.
    positions : int
        Generating positions of the section.
    section_area, area : float
        The section's area and the fitted outline's, mm².
    """

    loop: Loop
    deviation: float
    vertex_deviation: float
    vertices: int
    spans: int
    pieces: int
    positions: int
    section_area: float
    area: float


def _rotation(angle: float) -> np.ndarray:
    c, s = math.cos(angle), math.sin(angle)
    return np.array([[c, -s], [s, c]])


def space_chains(ring: np.ndarray, radius: float) -> list[np.ndarray]:
    """The tooth spaces of a counter-clockwise section ``ring`` (N, 2), each from tip corner to tip corner, mm.

    A vertex lies on the tip land when it is on the blank's polygon (within twice its chords' sag of
    ``radius``); the corners are the last land vertex before a space and the first after it, put on the circle.

    Raises
    ------
    GeometryError
        No land, or no space.
    """
    r = np.hypot(ring[:, 0], ring[:, 1])
    sag = radius * (1 - math.cos(math.pi / (4 * _RESOLUTION)))
    land = r >= radius - 2 * sag - 1e-9
    if land.all() or not land.any():
        raise GeometryError("the wheel's section has no tip lands between its tooth spaces")
    first = int(np.nonzero(land & ~np.roll(land, -1))[0][0])  # a land vertex followed by a space
    order = np.roll(np.arange(len(ring)), -first)
    pts, on = ring[order], land[order]
    chains, k = [], 0
    while k < len(pts):
        if on[k]:
            k += 1
            continue
        j = k
        while j < len(pts) and not on[j]:
            j += 1
        a, b = pts[k - 1], pts[j % len(pts)]
        a, b = a * radius / math.hypot(*a), b * radius / math.hypot(*b)
        chains.append(np.vstack((a, pts[k:j], b)))
        k = j
    return chains


def _derivative(control: np.ndarray, knots: np.ndarray, u: np.ndarray) -> np.ndarray:
    """First derivative (M, 2) of the clamped cubic at ``u``: the degree-2 spline of the control differences."""
    p = DEGREE
    q = p * (control[1:] - control[:-1]) / (knots[p + 1:-1] - knots[1:-p - 1])[:, None]
    return basis_matrix(knots[1:-1], u, p - 1) @ q


def _least_squares(points: np.ndarray, u: np.ndarray, knots: np.ndarray) -> np.ndarray:
    """Control points minimising the squared distances at ``u``, the first and last kept on the end points."""
    basis = basis_matrix(knots, u)
    rhs = points - np.outer(basis[:, 0], points[0]) - np.outer(basis[:, -1], points[-1])
    inner, *_ = np.linalg.lstsq(basis[:, 1:-1], rhs, rcond=None)
    return np.vstack((points[0], inner, points[-1]))


def _corrected(points: np.ndarray, u: np.ndarray, control: np.ndarray, knots: np.ndarray) -> np.ndarray:
    """Each inner point's parameter moved to its foot on the spline (one Newton step), kept in order."""
    at = basis_matrix(knots, u) @ control
    d = _derivative(control, knots, u)
    speed2 = np.einsum("ij,ij->i", d, d)
    step = np.einsum("ij,ij->i", points - at, d) / np.where(speed2 > 0, speed2, 1.0)
    new = np.clip(u + step, knots[0], knots[-1])
    new[0], new[-1] = knots[0], knots[-1]
    return np.maximum.accumulate(new)


def fit_space(chain: np.ndarray, limit: float) -> tuple[np.ndarray, np.ndarray]:
    """A clamped cubic B-spline (control points, knots in mm of chord) within ``limit`` mm of the chain both ways.

    Every vertex within ``limit`` of the spline, and the spline (probed across every span) within ``limit`` of
    the chain's edges.  A span off either way is halved while it holds enough vertices to fix its shape.

    Raises
    ------
    GeometryError
        No fit within the limit (a span off with too few vertices to halve, or :data:`_MAX_SPANS` spans).
    """
    edges = chain
    chain = np.empty((2 * len(edges) - 1, 2))  # the vertices and the edges' midpoints (between the cusps)
    chain[::2], chain[1::2] = edges, (edges[:-1] + edges[1:]) / 2
    steps = np.hypot(*np.diff(chain, axis=0).T)
    u0 = np.concatenate(([0.0], np.cumsum(steps)))
    length = float(u0[-1])
    breaks = np.linspace(0.0, length, _START_SPANS + 1)
    probe = np.linspace(0.0, 1.0, _PROBES + 1)[:-1]
    while True:
        knots = np.concatenate(([0.0] * DEGREE, breaks, [length] * DEGREE))
        u = u0.copy()
        for _ in range(_CORRECTIONS):
            control = _least_squares(chain, u, knots)
            u = _corrected(chain, u, control, knots)
        control = _least_squares(chain, u, knots)
        off = np.hypot(*(chain - basis_matrix(knots, u) @ control).T)
        span = np.clip(np.searchsorted(breaks, u, side="right") - 1, 0, len(breaks) - 2)
        probes = (breaks[:-1, None] + probe[None, :] * np.diff(breaks)[:, None]).ravel()
        stray = _distance(basis_matrix(knots, probes) @ control, edges)
        bad = np.union1d(span[off > limit], np.repeat(np.arange(len(breaks) - 1), _PROBES)[stray > limit])
        if bad.size == 0:
            return control, knots
        held = np.bincount(span, minlength=len(breaks) - 1)
        if len(breaks) - 1 + bad.size > _MAX_SPANS or (held[bad] < _MIN_HELD).any():
            raise GeometryError(f"cannot fit the worm wheel's tooth space within {limit:g} mm (worst "
                                f"{max(off.max(), stray.max()):.3g} mm with {len(breaks) - 1} spans); allowed: a "
                                "coarser tolerance, or more generating positions")
        breaks = np.sort(np.concatenate((breaks, (breaks[bad] + breaks[bad + 1]) / 2)))


def _space_curve(control: np.ndarray, knots: np.ndarray) -> tuple[Curve, np.ndarray]:
    """The fitted spline as a curve (samples every :data:`_SAMPLE_STEP` mm or closer, at least 8 a span, with
    their exact unit tangents) and its signed curvature at the samples (1/mm, positive turning left)."""
    breaks = np.unique(knots)
    u = [breaks[:1]]
    for lo, hi in zip(breaks[:-1], breaks[1:]):
        n = max(8, math.ceil((hi - lo) / _SAMPLE_STEP))
        u.append(np.linspace(lo, hi, n + 1)[1:])
    params = np.concatenate(u)
    points = basis_matrix(knots, params) @ control
    points[0], points[-1] = control[0], control[-1]
    d = _derivative(control, knots, params)
    p = DEGREE  # the second derivative: the linear spline of the first derivative's control differences
    q = p * (control[1:] - control[:-1]) / (knots[p + 1:-1] - knots[1:-p - 1])[:, None]
    inner = knots[1:-1]
    q2 = (p - 1) * (q[1:] - q[:-1]) / (inner[p:-1] - inner[1:-p])[:, None]
    dd = basis_matrix(inner[1:-1], params, p - 2) @ q2
    speed = np.hypot(d[:, 0], d[:, 1])
    curvature = (d[:, 0] * dd[:, 1] - d[:, 1] * dd[:, 0]) / speed ** 3
    return Curve("worm-space", points, d / speed[:, None], params), curvature


def _pieces(curve: Curve, curvature: np.ndarray, root_radius: float, near: float, module: float) -> list[Curve]:
    """The space cut where its shape changes: flank, fillet, root, fillet, flank.

    A flank turns left (convex), the fillet the thread's tip corner cuts turns right (concave): the fillet is
    where the curvature is below ``-1 / module`` (1/mm; a large wheel's flank is so nearly straight that the
    fit's own wobble changes the sign of its curvature, the fillet's is tens to thousands of times that).  The
    root is on the circle the thread's tip line cuts (radius ``a - r_a1``, within ``near`` mm).  Each piece becomes one
    face of the solid: the kernel's volume integration of a face whose curvature jumps inside it comes out
    a percent off (measured on the camera-slider wheel), and the writers fit each piece on its own.
    """
    n = len(curve.points)
    concave = np.nonzero(curvature < -1 / module)[0]
    low = np.nonzero(np.hypot(curve.points[:, 0], curve.points[:, 1]) <= root_radius + near)[0]
    cuts = []
    if len(concave):
        cuts += [int(concave[0]), int(concave[-1]) + 1]
    if len(low):
        cuts += [int(low[0]), int(low[-1])]
    cuts = sorted({c for c in cuts if 2 <= c <= n - 3})
    edges = [0]
    for c in cuts:
        if c - edges[-1] >= 2:
            edges.append(c)
    if n - 1 - edges[-1] < 2:
        edges.pop()
    edges.append(n - 1)
    return [_thinned(curve, curvature, a, b) for a, b in zip(edges[:-1], edges[1:])]


def _thinned(curve: Curve, curvature: np.ndarray, first: int, last: int) -> Curve:
    """Samples ``first..last`` of the dense curve, fewer where it is flat: each step at most
    ``sqrt(8 rho sag)`` (the chord's sag ``step^2 / (8 rho)`` at most :data:`_SAG`) and :data:`_MAX_STEP`."""
    pts = curve.points[first:last + 1]
    s = np.concatenate(([0.0], np.cumsum(np.hypot(*np.diff(pts, axis=0).T))))
    allowed = np.minimum(np.sqrt(8 * _SAG / np.maximum(np.abs(curvature[first:last + 1]), 1e-12)), _MAX_STEP)
    keep, i = [0], 0
    while i < len(pts) - 1:
        j = i + 1
        limit = allowed[i]
        while j + 1 < len(pts) and s[j + 1] - s[i] <= min(limit, allowed[j + 1]):
            limit = min(limit, allowed[j])
            j += 1
        keep.append(j)
        i = j
    k = np.asarray(keep) + first
    return Curve(curve.kind, curve.points[k], curve.tangents[k], curve.params[k])


def _distance(points: np.ndarray, line: np.ndarray) -> np.ndarray:
    """Distance from each point (M, 2) to the polyline ``line`` (N, 2), mm: nearest of its segments in a tree."""
    import shapely

    segments = shapely.linestrings(np.stack((line[:-1], line[1:]), axis=1))
    _, distance = shapely.STRtree(segments).query_nearest(shapely.points(points), return_distance=True,
                                                          all_matches=False)
    return distance


def wheel_outline(form, tolerance: float, positions: int | None = None) -> WheelOutline:
    """The wheel's mid-plane outline, each tooth space one B-spline within ``FIT_SHARE * tolerance`` of its vertices.

    Parameters
    ----------
    form : ThreadForm
        The pair as the hob simulation takes it (:func:`gearcad.meshes.worm.thread_form`).
    tolerance : float
        The plan's tolerance, mm.
    positions : int, optional
        Generating positions of one thread across the worm (default :data:`POSITIONS_FACTOR` times the hob
        simulation's).

    Raises
    ------
    GeometryError
        The section is not one land and one space a tooth, or the fit fails.
    """
    from shapely.affinity import rotate
    from shapely.geometry import Point
    from shapely.geometry import polygon as shapely_polygon
    from shapely.ops import unary_union

    from ..geometry.worm_wheel import default_positions, tooth_space

    if positions is None:
        positions = POSITIONS_FACTOR * default_positions(form)
    z, radius = form.wheel_teeth, form.wheel_throat_radius
    step = 2 * math.pi / z
    space = tooth_space(form, 0.0, positions)
    blank = Point(0.0, 0.0).buffer(radius, quad_segs=_RESOLUTION)
    local = shapely_polygon.orient(blank.difference(unary_union([rotate(space, k * step, origin=(0, 0),
                                                                        use_radians=True) for k in (-1, 0, 1)])), 1.0)
    if local.geom_type != "Polygon" or len(local.interiors):
        raise GeometryError("the worm cuts the wheel's blank apart in its mid-plane; allowed: a pair whose wheel "
                            "keeps a rim under its teeth")
    ring = np.asarray(local.exterior.coords)[:-1]
    centre = space.centroid
    aim = np.array([centre.x, centre.y]) / math.hypot(centre.x, centre.y)
    chain = max(space_chains(ring, radius), key=lambda c: float(c.mean(axis=0) @ aim))
    control, knots = fit_space(chain, FIT_SHARE * tolerance)
    curve, curvature = _space_curve(control, knots)
    pieces = _pieces(curve, curvature, form.centre_distance - form.tip_radius, FIT_SHARE * tolerance, form.module)
    curves: list[Curve] = []
    for k in range(z):
        curves.extend(c.transformed(rotation=k * step) for c in pieces)
        b = curves[-1].points[-1]
        after = curve.points[0] if k == z - 1 else _rotation((k + 1) * step) @ curve.points[0]
        a0, a1 = math.atan2(b[1], b[0]), math.atan2(after[1], after[0])
        land = arc_curve((0.0, 0.0), radius, a0, a0 + (a1 - a0) % (2 * math.pi), tolerance)
        land.points[0], land.points[-1] = b, after
        curves.append(land)
    loop = Loop(tuple(curves))
    vertex = float(_distance(chain, curve.points).max())
    edge = float(_distance(curve.points, chain).max())
    section_area = float(blank.area - z * blank.intersection(space).area)
    return WheelOutline(loop, max(vertex, edge), vertex, len(chain), len(np.unique(knots)) - 1, len(pieces),
                        positions, section_area, loop.area())
