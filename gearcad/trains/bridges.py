"""Bridges: a small bar of our own design that holds a shaft's end where a gear of another layer blocks its way.

Pure.  A bridge stands on two pillars on the plate the shaft reaches, in the room the plan left
beyond the shaft's layer; its bar passes through the shaft's centre at the angle that gives the
shortest bar whose pillars clear every sweep, rod and bridge (those of the bridged shafts still
to come included), and whose bar clears every rod and other bar at its height.  Where none fits
the shaft becomes a stud, with a finding that names the nearly coaxial shaft whose bridge is in
the way when that is the cause.  Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..geometry.shape import Loop, Part, arc_curve, line_curve
from .hardware import EDGE_RULE, Rod, ShaftSupport
from .rods import Work, add_pillar, frame_shaft, stud
from .sweeps import clear_of_sweeps, gear_top, near_outline

__all__ = ["Ahead", "bridge_z", "bridged_span", "bridged"]


@dataclass(frozen=True)
class Ahead:
    """A bridged shaft not built yet, as its rod will stand (spacers included): bridges placed before it keep clear."""

    name: str
    x: float
    y: float
    radius: float
    z0: float
    z1: float


def bridge_z(w: Work, gears, side: str) -> float:
    """Lower face of the bridge that holds a shaft's ``side`` end: in the room the plan left beyond its layer, mm."""
    t, plan = w.t, w.plan
    if side == "front":  # above the top of its layer (hubs included)
        layer = max(g.layer for g in gears)
        return max(gear_top(g, t) for g in plan.gears if g.layer == layer) + w.fab.layer_gap
    return min(g.z for g in gears) - w.fab.layer_gap - w.t


def bridged_span(w: Work, gears, side: str) -> tuple[float, float]:
    """From where to where the rod of a shaft held by a plate and a bridge will stand, mm."""
    zb = bridge_z(w, gears, side)
    return (w.back_z, zb + w.t) if side == "front" else (zb, w.front_z + w.t)


def _stadium(p1: np.ndarray, p2: np.ndarray, half: float, tolerance: float) -> Loop:
    """A counter-clockwise bar of half-width ``half`` with round ends about ``p1`` and ``p2``, mm."""
    u = (p2 - p1) / np.linalg.norm(p2 - p1)
    phi = math.atan2(u[1], u[0])
    a2 = arc_curve(tuple(p2), half, phi - math.pi / 2, phi + math.pi / 2, tolerance)
    a1 = arc_curve(tuple(p1), half, phi + math.pi / 2, phi + 3 * math.pi / 2, tolerance)
    return Loop((a2, line_curve(tuple(a2.points[-1]), tuple(a1.points[0])), a1,
                 line_curve(tuple(a1.points[-1]), tuple(a2.points[0]))))


def _segment_distance(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> float:
    ab = b - a
    k = float(np.clip(np.dot(p - a, ab) / np.dot(ab, ab), 0.0, 1.0))
    return float(np.linalg.norm(p - (a + k * ab)))


def _segments_distance(a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray) -> float:
    """Least distance between segments ab and cd (0 when they cross), mm."""
    def side(p, q, r):
        return (q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0])

    if side(a, b, c) * side(a, b, d) < 0 and side(c, d, a) * side(c, d, b) < 0:
        return 0.0
    return min(_segment_distance(a, c, d), _segment_distance(b, c, d), _segment_distance(c, a, b), _segment_distance(d, a, b))


def bridged(w: Work, i: int, s, gears, plate: tuple[str, float], side: str) -> ShaftSupport:
    """One plate and a bridge on the blocked side, standing on pillars on that plate; a stud where none fits."""
    t, fab, plan = w.t, w.fab, w.plan
    hole = fab.spacer_hole
    pillar_d = 2 * w.nominal
    half = max(EDGE_RULE * hole + hole / 2, EDGE_RULE * (s.diameter + fab.bore_clearance) * 1.5, pillar_d / 2)
    zb = bridge_z(w, gears, side)  # the room the plan left
    pz0, pz1 = (w.back_z + t, zb) if side == "front" else (zb + t, w.front_z)
    centre = np.array([s.x, s.y])
    others = [r for r in w.rods if r.kind in ("arbor", "axle", "pipe", "stud", "pin", "pillar", "spacer")]
    # The bridged shafts still to come, as rods (with their spacers' radius), so this bridge keeps clear of them.
    others += [Rod(a.name, "arbor", a.x, a.y, 2 * a.radius, 0.0, a.z0, a.z1) for a in w.future.values()]
    width, height = plan.layout.width, plan.layout.height
    edge = EDGE_RULE * hole + hole / 2

    def pillar_ok(p: np.ndarray) -> bool:
        if not (edge <= p[0] <= width - edge and edge <= p[1] <= height - edge):
            return False
        if clear_of_sweeps(p[0], p[1], pillar_d / 2, pz0, pz1, w.sweeps, w.margin) < 0:
            return False
        for r in others:
            near = math.hypot(p[0] - r.x, p[1] - r.y) < r.diameter / 2 + pillar_d / 2 + w.margin
            if near and min(pz1, r.z1) - max(pz0, r.z0) > 1e-9:
                return False
        for br in w.bridges:  # a bridge placed before stands in this pillar's way
            if min(pz1, br.z + t) - max(pz0, br.z) > 1e-9 and near_outline(br.part.outer.points(), p, pillar_d / 2 + w.margin):
                return False
        return True

    def bar_ok(a: np.ndarray, b: np.ndarray) -> bool:
        for r in others:
            if r.name.startswith(s.name):
                continue
            if min(zb + t, r.z1) - max(zb, r.z0) > 1e-9 and _segment_distance(np.array([r.x, r.y]), a, b) < half + r.diameter / 2 + w.margin:
                return False
        for g in w.sweeps:
            if min(zb + t, g.z1) - max(zb, g.z0) > 1e-9 and _segment_distance(np.array([g.x, g.y]), a, b) < half + g.outer + w.margin:
                return False
        for br in w.bridges:  # another bar at this height: the two axes keep both half-widths and the margin apart
            if abs(br.z - zb) < t and br.name != f"bridge-{s.name}":
                c, d = (np.array(h[:2]) for h in br.part.circles[1:3])
                other = max(_segment_distance(q, c, d) for q in br.part.outer.points())
                if _segments_distance(a, b, c, d) < half + other + w.margin:
                    return False
        return True

    best = None
    steps = np.arange(s.diameter / 2 + pillar_d / 2 + 2 * half / 2, max(width, height), 0.5)
    for theta in np.radians(np.arange(0.0, 180.0, 5.0)):
        u = np.array([math.cos(theta), math.sin(theta)])
        ends = []
        for sign in (1.0, -1.0):
            hit = next((centre + sign * d * u for d in steps if pillar_ok(centre + sign * d * u)), None)
            ends.append(hit)
        if ends[0] is None or ends[1] is None:
            continue
        length = float(np.linalg.norm(ends[0] - ends[1]))
        if (best is None or length < best[0]) and bar_ok(ends[0], ends[1]):
            best = (length, ends[0], ends[1])
    if best is None:
        near = [(math.hypot(r.x - s.x, r.y - s.y), r.name) for r in others
                if r.kind == "arbor" and r.name in w.future and min(zb + t, r.z1) - max(zb, r.z0) > 1e-9
                and math.hypot(r.x - s.x, r.y - s.y) < half + r.diameter / 2 + w.margin]
        if near:
            gap, other = min(near)
            end = (f"; the stud does not turn, so take the {s.name}'s motion from its gear"
                   if s.name in ("input", "output") else "")
            return stud(w, s, gears, plate, f"a gear of another layer blocks its way to the other plate, and its "
                        f"bridge would meet {other}, {gap:.2f} mm away and also held by a bridge "
                        f"at that height (nearly coaxial shafts, too close for a bridge each): the room is left to "
                        f"{other}'s bridge{end}")
        return stud(w, s, gears, plate, "a gear of another layer blocks its way to the other plate and no bridge fits")
    _, p1, p2 = best
    name = f"bridge-{s.name}"
    holes = ((s.x, s.y, s.diameter + fab.bore_clearance),) + tuple((float(p[0]), float(p[1]), hole) for p in (p1, p2))
    from .epicyclic import kerf_cut
    from .plan import PlannedPlate

    # marked with its name where the bar holds the smallest marking (gearcad.geometry.marking places it)
    part = Part(name, _stadium(p1, p2, half, plan.tolerance), (), holes, name)
    w.bridges.append(PlannedPlate(name, part, kerf_cut(part, fab, plan.tolerance), zb))
    ends = (w.back_z, zb + t) if side == "front" else (zb, w.front_z + t)
    for k, p in enumerate((p1, p2), start=1):
        add_pillar(w, f"{name}-pillar-{k}", float(p[0]), float(p[1]), pz0, pz1, (plate[0], name), ends, tapped=True)
    supports = [plate, (name, zb)]
    return frame_shaft(w, i, s, gears, supports, "arbor")
