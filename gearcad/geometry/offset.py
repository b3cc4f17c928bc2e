"""Kerf and tool compensation: a loop moved sideways by a distance (its parallel curve).

Sign convention.  Loops keep the material on their left: outer loops run
counter-clockwise, holes clockwise.  A **positive distance moves the loop to
its right, away from the material**: an outer loop grows, a hole shrinks.  A
laser with kerf ``k`` follows ``offset_loop(loop, k / 2)`` for every loop of a
part; a negative distance moves into the material.

Construction.  Each curve point ``p`` with unit tangent ``t`` moves to
``p + d n``, ``n = (t_y, -t_x)`` the unit normal on the loop's right: a
free-form curve becomes its exact parallel curve (samples are moved exactly;
points added to keep the chord tolerance come from the Hermite interpolant
of :class:`~gearcad.geometry.arcfit.SampledCurve`), a circular arc stays an arc
on the same centre with radius ``R +- d``.  Where the pieces of two curves
separate at a corner a join arc of radius ``|d|`` centred on the corner closes
the gap; where they cross, and where a curve tighter than ``|d|`` folds (a
swallowtail), the crossing loops are cut away: of the raw offset curve only the
stretches with winding number 0 on their right and 1 on their left remain,
which is exactly the boundary of the grown (or shrunk) material, and of those
only the ones that keep the distance ``|d|`` from the input loop (this catches
parts that turned inside out without crossing anything, as a circle shrunk by
more than its radius does).

Lengths in mm, angles in radians.

The raw offset curve is built in :mod:`.offset_raw`; this module cuts away its crossing loops and
turns what remains back into curves.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError, InputError
from .arcfit import STRAIGHT_KINDS, smooth_pieces
from .generate import DEFAULT_TOLERANCE, Curve
from .shape import Loop, polygon_area
from .offset_raw import CORNER_ANGLE, SAME_POINT, Polyline, arc_sense, cross2d, dot2d, raw_offset, turn_angle

__all__ = ["offset_loop", "min_concave_radius", "CORNER_ANGLE"]

_MIN_LOOP_AREA = 1e-12  # mm²: loops smaller than this are rounding debris


# -- self-crossings -------------------------------------------------------------------

def _candidate_pairs(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Pairs (i < j) of segments whose bounding boxes share a cell of a uniform grid."""
    lo, hi = np.minimum(a, b), np.maximum(a, b)
    length = np.hypot(*(b - a).T)
    cell = max(2.0 * float(np.median(length)), float(np.ptp(np.concatenate((a, b)), axis=0).max()) / 4096, 1e-9)
    origin = lo.min(axis=0)
    c0 = np.floor((lo - origin) / cell).astype(np.int64)
    c1 = np.floor((hi - origin) / cell).astype(np.int64)
    span = c1 - c0 + 1
    count = span[:, 0] * span[:, 1]
    owner = np.repeat(np.arange(len(a)), count)
    local = np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count)
    cx = c0[owner, 0] + local % span[owner, 0]
    cy = c0[owner, 1] + local // span[owner, 0]
    key = cx * (int(c1[:, 1].max()) + 2) + cy
    order = np.lexsort((owner, key))
    key, owner = key[order], owner[order]
    group_start = np.r_[0, np.nonzero(np.diff(key))[0] + 1]
    group_end = np.r_[group_start[1:], len(key)]
    size = group_end - group_start
    position_end = np.repeat(group_end, size)
    after = position_end - np.arange(len(key)) - 1
    first = np.repeat(np.arange(len(key)), after)
    second = first + 1 + np.arange(after.sum()) - np.repeat(np.cumsum(after) - after, after)
    i, j = owner[first], owner[second]
    i, j = np.minimum(i, j), np.maximum(i, j)
    pair = np.unique(i * len(a) + j)
    return pair // len(a), pair % len(a)


@dataclass(frozen=True)
class _Crossings:
    seg_i: np.ndarray
    u_i: np.ndarray
    seg_j: np.ndarray
    u_j: np.ndarray
    points: np.ndarray


def _self_crossings(poly: Polyline) -> _Crossings:
    """Where the closed polyline crosses itself; each segment is taken half-open, ``[start, end)``."""
    a, b = poly.points, poly.ends
    k = len(a)
    i, j = _candidate_pairs(a, b)
    neighbours = (j - i == 1) | ((i == 0) & (j == k - 1)) | (i == j)
    i, j = i[~neighbours], j[~neighbours]
    r, s = b[i] - a[i], b[j] - a[j]
    denominator = cross2d(r, s)
    q = a[j] - a[i]
    with np.errstate(divide="ignore", invalid="ignore"):
        u = cross2d(q, s) / denominator
        v = cross2d(q, r) / denominator
    hit = (denominator != 0) & (u >= 0) & (u < 1) & (v >= 0) & (v < 1)
    i, j, u, v = i[hit], j[hit], u[hit], v[hit]
    return _Crossings(i, u, j, v, a[i] + u[:, None] * (b[i] - a[i]))


# -- keeping the boundary of the material ----------------------------------------------

@dataclass(frozen=True)
class _Piece:
    """The raw curve from one crossing to the next: from (segment, fraction) to (segment, fraction)."""

    start_seg: int
    start_u: float
    end_seg: int
    end_u: float
    start_crossing: int
    end_crossing: int


def _pieces(poly: Polyline, crossings: _Crossings) -> list[_Piece]:
    seg = np.concatenate((crossings.seg_i, crossings.seg_j))
    u = np.concatenate((crossings.u_i, crossings.u_j))
    ident = np.tile(np.arange(len(crossings.seg_i)), 2)
    order = np.lexsort((u, seg))
    seg, u, ident = seg[order], u[order], ident[order]
    nxt = np.roll(np.arange(len(seg)), -1)
    return [_Piece(int(seg[e]), float(u[e]), int(seg[f]), float(u[f]), int(ident[e]), int(ident[f]))
            for e, f in zip(range(len(seg)), nxt)]


def _piece_segments(piece: _Piece, k: int) -> list[tuple[int, float, float]]:
    """(segment, from fraction, to fraction) stretches of a piece, in order."""
    if piece.end_seg == piece.start_seg and piece.end_u > piece.start_u:
        return [(piece.start_seg, piece.start_u, piece.end_u)]
    parts = [(piece.start_seg, piece.start_u, 1.0)]
    s = (piece.start_seg + 1) % k
    while s != piece.end_seg:
        parts.append((s, 0.0, 1.0))
        s = (s + 1) % k
    parts.append((piece.end_seg, 0.0, piece.end_u))
    return parts


def _winding_right(poly: Polyline, seg: int, point: np.ndarray) -> int:
    """Winding number of the raw curve just right of ``point``, a point inside segment ``seg``.

    The other segments subtend a total angle ``S`` at the point; segment ``seg``
    itself subtends ``-pi`` seen from its right, so the winding there is
    ``(S - pi) / (2 pi)``.
    """
    a, b = poly.points - point, poly.ends - point
    angles = np.arctan2(cross2d(a, b), dot2d(a, b))
    angles[seg] = 0.0
    return int(round((angles.sum() - math.pi) / (2 * math.pi)))


def _test_point(poly: Polyline, parts: list[tuple[int, float, float]]) -> tuple[int, np.ndarray]:
    a, b = poly.points, poly.ends
    lengths = [(hi - lo) * math.hypot(*(b[s] - a[s])) for s, lo, hi in parts]
    s, lo, hi = parts[int(np.argmax(lengths))]
    u = 0.5 * (lo + hi)
    return s, a[s] + u * (b[s] - a[s])


@dataclass(frozen=True)
class _Original:
    """The loop being offset, as a closed polyline, with the distance every kept stretch must keep from it."""

    starts: np.ndarray
    ends: np.ndarray
    clearance: float  # mm

    def distance(self, points: np.ndarray, chunk: int = 64) -> np.ndarray:
        """Distance (mm) from each point to the polyline."""
        d = self.ends - self.starts
        length2 = np.maximum(dot2d(d, d), SAME_POINT ** 2)
        out = np.empty(len(points))
        for k in range(0, len(points), chunk):
            rel = points[k:k + chunk, None, :] - self.starts[None]
            u = np.clip(dot2d(rel, d[None]) / length2, 0.0, 1.0)
            gap = rel - u[..., None] * d[None]
            out[k:k + chunk] = np.sqrt(dot2d(gap, gap).min(axis=1))
        return out


def _original(curves: list[Curve], d: float, tolerance: float) -> _Original:
    """The input polyline and the clearance a true stretch of the offset keeps from it.

    A point of the true offset is ``|d|`` from the true curve; the input's
    chords may come closer to it by their sagitta (estimated from the turn of
    the tangents, ``L phi / 8``), and the output's chords by ``tolerance``.
    """
    pts = np.concatenate([c.points[:-1] for c in curves])
    tan = np.concatenate([c.tangents[:-1] for c in curves])
    ends = np.roll(pts, -1, axis=0)
    chord = np.hypot(*(ends - pts).T)
    turn = np.abs(turn_angle(tan, np.concatenate([c.tangents[1:] for c in curves])))
    sagitta = float((chord * np.minimum(turn, math.pi) / 8).max(initial=0.0))
    return _Original(pts, ends, abs(d) - 2 * sagitta - 2 * tolerance)


def _kept_chains(poly: Polyline, crossings: _Crossings, original: _Original) -> list[list[tuple[int, float, float]]]:
    """The stretches of the raw curve that bound the material, chained into closed loops.

    A stretch is kept if the raw curve winds 0 times round the point just to
    its right (so 1 just to its left) and it keeps its distance from the
    input loop (which rejects parts that turned inside out without crossing
    anything, such as a circle shrunk by more than its radius).
    """
    k = len(poly.points)
    if len(crossings.seg_i) == 0:
        pieces, parts = [], [[(s, 0.0, 1.0) for s in range(k)]]
    else:
        pieces = _pieces(poly, crossings)
        parts = [_piece_segments(p, k) for p in pieces]
    tests = [_test_point(poly, pp) for pp in parts]
    winding_ok = [_winding_right(poly, seg, point) == 0 for seg, point in tests]
    clear = original.distance(np.array([point for _, point in tests])) >= original.clearance
    kept = [n for n in range(len(parts)) if winding_ok[n] and clear[n]]
    if not pieces:
        return [parts[0]] if kept else []
    leaving: dict[int, list[int]] = {}
    for n in kept:
        leaving.setdefault(pieces[n].start_crossing, []).append(n)
    chains, used = [], set()
    for n in kept:
        if n in used:
            continue
        chain, current = [], n
        while current not in used:
            used.add(current)
            chain.extend(parts[current])
            options = [m for m in leaving.get(pieces[current].end_crossing, []) if m not in used]
            if not options:
                break
            current = options[0]
        if pieces[current].end_crossing != pieces[n].start_crossing:
            raise GeometryError("the offset loop does not close: the loop is not simple or the distance is degenerate")
        chains.append(chain)
    return chains


# -- back to curves -------------------------------------------------------------------

def _points_on(poly: Polyline, seg: np.ndarray, u: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Points, unit tangents and curve parameters at fractions ``u`` along segments ``seg``."""
    w = u[:, None]
    a, b = poly.points[seg], poly.ends[seg]
    t = (1 - w) * poly.t0[seg] + w * poly.t1[seg]
    norm = np.hypot(t[:, 0], t[:, 1])[:, None]
    t = np.where(norm > 0, t / np.where(norm > 0, norm, 1.0), poly.t0[seg])
    return a + w * (b - a), t, (1 - u) * poly.p0[seg] + u * poly.p1[seg]


def _chain_to_curves(poly: Polyline, chain: list[tuple[int, float, float]]) -> list[Curve]:
    """Group the chain's stretches by source into Curves (each ends where the next begins)."""
    st = np.array([s for s in chain if s[2] > s[1]], dtype=float).reshape(-1, 3)
    seg, lo, hi = st[:, 0].astype(int), st[:, 1], st[:, 2]
    source = poly.source[seg]
    change = np.nonzero(source != np.roll(source, 1))[0]
    if len(change):  # start the walk where one source gives way to another
        order = np.roll(np.arange(len(seg)), -int(change[0]))
        seg, lo, hi, source = seg[order], lo[order], hi[order], source[order]
    starts, tangents, params = _points_on(poly, seg, lo)
    _, end_tangents, end_params = _points_on(poly, seg, hi)
    bounds = np.r_[np.nonzero(np.diff(source))[0] + 1, len(seg)]
    curves: list[Curve] = []
    first = 0
    for last in bounds:
        nxt = last % len(seg)  # the next group's first stretch starts where this group ends
        points = np.vstack((starts[first:last], starts[nxt]))
        tan = np.vstack((tangents[first:last], end_tangents[last - 1]))
        par = np.r_[params[first:last], end_params[last - 1]]
        src = poly.sources[int(source[first])]
        curves.append(Curve(src.kind, points, tan, par, src.radius, src.centre))
        first = last
    return curves


def _loop_from_chains(poly: Polyline, chains: list[list[tuple[int, float, float]]], distance: float) -> Loop:
    loops = [Loop(tuple(_chain_to_curves(poly, c))) for c in chains]
    loops = [lp for lp in loops if abs(lp.area()) > _MIN_LOOP_AREA]
    if not loops:
        raise GeometryError(f"an offset of {distance:g} mm removes the whole loop")
    if len(loops) > 1:
        raise GeometryError(f"an offset of {distance:g} mm splits the loop into {len(loops)} loops")
    return loops[0]


# -- public ------------------------------------------------------------------------

def _check_distance(distance: float) -> float:
    if isinstance(distance, bool) or not isinstance(distance, (int, float)) or not math.isfinite(distance):
        raise InputError(f"offset distance must be a finite number of mm, got {distance!r}")
    return float(distance)


def _check_tolerance(tolerance: float) -> float:
    if not (isinstance(tolerance, (int, float)) and math.isfinite(tolerance) and 1e-6 <= tolerance <= 1.0):
        raise InputError(f"offset tolerance must be from 1e-06 to 1 mm, got {tolerance!r}")
    return float(tolerance)


def _split_at_cusps(curves: tuple[Curve, ...]) -> list[Curve]:
    """The loop's curves with free-form ones split where their tangent reverses (see ``smooth_pieces``)."""
    out: list[Curve] = []
    for c in curves:
        out.extend(smooth_pieces(c) if c.radius <= 0 and c.kind not in STRAIGHT_KINDS else [c])
    return out


def offset_loop(loop: Loop, distance: float, tolerance: float = DEFAULT_TOLERANCE) -> Loop:
    """The loop moved ``distance`` mm to its right, away from the material.

    Parameters
    ----------
    loop : Loop
        A simple closed loop: an outer contour (counter-clockwise) or a hole
        (clockwise); in both the material lies on the left.
    distance : float
        Offset, mm.  Positive moves away from the material (outer loops grow,
        holes shrink: half the kerf for a laser cut); negative moves into it.
    tolerance : float
        Chord tolerance of the output's polyline, mm; the input curves' own
        sampling tolerance carries over.

    Returns
    -------
    Loop
        The offset loop, same orientation as ``loop``.  Offset curves keep their
        kind; arcs keep their centre (radius ``R +- distance``); join arcs at
        corners have kind ``"arc"``, radius ``|distance|`` and the corner as centre.

    Raises
    ------
    GeometryError
        If the offset removes the loop or splits it into several loops.
    """
    distance = _check_distance(distance)
    tolerance = _check_tolerance(tolerance)
    if distance == 0:
        return loop
    counter_clockwise = polygon_area(loop.points()) > 0
    work = loop if counter_clockwise else loop.reversed()
    grow = distance if counter_clockwise else -distance  # to the right of the counter-clockwise loop
    curves = _split_at_cusps(work.curves)
    poly = raw_offset(curves, grow, tolerance)
    chains = _kept_chains(poly, _self_crossings(poly), _original(curves, grow, tolerance))
    result = _loop_from_chains(poly, chains, distance)
    return result if counter_clockwise else result.reversed()


def min_concave_radius(loop: Loop) -> float:
    """Smallest radius of curvature (mm) where the loop bends round the scrap side.

    That is where a cutting tool on the scrap side (the loop's right, away from
    the material) has to fit: a tool of larger radius cannot follow the loop
    there.  A concave corner (tangent break) gives 0; a loop without concave
    stretches gives ``math.inf``.  Free-form curves are measured from the turn
    of their tangents between neighbouring samples, an average over each span.

    Parameters
    ----------
    loop : Loop
        Outer loop (counter-clockwise) or hole (clockwise).
    """
    smallest = math.inf
    curves = loop.curves
    for k, curve in enumerate(curves):
        smallest = min(smallest, _curve_concave_radius(curve))
        turn = float(turn_angle(curve.tangents[-1], curves[(k + 1) % len(curves)].tangents[0]))
        if turn < -CORNER_ANGLE:
            smallest = 0.0
    return smallest


def _curve_concave_radius(curve: Curve) -> float:
    if curve.radius > 0:
        return curve.radius if arc_sense(curve) < 0 else math.inf
    if curve.kind in STRAIGHT_KINDS:
        return math.inf
    smallest = math.inf
    pieces = smooth_pieces(curve)
    for n, piece in enumerate(pieces):
        if n and float(turn_angle(pieces[n - 1].tangents[-1], piece.tangents[0])) < -CORNER_ANGLE:
            smallest = 0.0
        if piece.kind in STRAIGHT_KINDS:
            continue
        turn = turn_angle(piece.tangents[:-1], piece.tangents[1:])
        chord = np.hypot(*np.diff(piece.points, axis=0).T)
        half = np.abs(turn) / 2
        length = chord * np.where(half > 0, half / np.sin(np.where(half > 0, half, 1.0)), 1.0)
        right = turn < 0
        if right.any():
            smallest = min(smallest, float((length[right] / -turn[right]).min()))
    return smallest
