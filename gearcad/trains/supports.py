"""The mechanism around the gears: what holds every shaft, and the frame's bought parts, placed.

Pure.  From a plan's gears, shafts and plates this module works out

- what holds each shaft at two points (the trade's first rule of a movement, common
  practice): both frame plates; one plate and a *bridge* (a small bar of our own design,
  cut like the plates, standing on its own pillars in room the plan leaves between two
  layers) where a gear of another layer blocks the way; a pair of carrier discs for planet
  pins; or, as the last resort, a fixed *stud* in one plate with the gears turning on a
  pipe at least ``STUD_PIPE`` bore diameters long (reported as a warning);
- every shaft's length from the layer stack and the plates' thickness, and its free span
  (between the inner faces of its two supports);
- the pipes: an output on the axis of the input turns on a pipe around it, the sides of a
  summing train's differential on tubes around the axle;
- the spacers that keep each gear in its layer (cut to the gaps, the last one short by the
  end shake);
- the pillars that hold the plates apart, each outside every moving part's sweep (gear
  tips, planets' orbits plus their tip radius, carriers) by the fabrication profile's
  gear clearance, with a through screw and nut; the ring bolts of a fixed ring likewise;
- the frame plates with every hole, no hole nearer a plate edge than its own diameter
  (the plate grows to the right and up when the pillars need room).

Lengths in mm, angles in radians.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..meshes.checks import Finding
from ..errors import InputError
from ..geometry.shape import Loop, Part, arc_curve, line_curve, rounded_rectangle
from .hardware import (EDGE_RULE, END_SHAKE, FRAME, Mechanism, PIPE_WALL, REACH, Rod, SPACER_WALL, STUD_PIPE,
                       ShaftSupport, Sweep, screw_length, screw_size, spacer_name, spacers_of)

__all__ = ["complete_plan"]


# -- sweeps ------------------------------------------------------------------------------------

def _gear_top(g, thickness: float) -> float:
    return g.z + thickness + g.hub_length


def _centre_of(plan) -> tuple[float, float] | None:
    sun = next((g for g in plan.gears if g.role == "sun"), None)
    if sun is None:
        return None
    s = plan.shafts[sun.shaft]
    return s.x, s.y


def _carrier_turns(plan) -> bool:
    if plan.spec.planetary is not None:
        return plan.spec.planetary.fixed != "carrier"
    return plan.spec.summing is not None


def _sweeps(plan) -> list[Sweep]:
    t = plan.spec.thickness
    out = []
    centre = _centre_of(plan)
    orbit = _carrier_turns(plan)
    for g in plan.gears:
        s = plan.shafts[g.shaft]
        top = _gear_top(g, t)
        if g.role == "ring":
            ring_turns = plan.spec.planetary is None or plan.spec.planetary.fixed != "ring"
            outer = g.gear.outer_diameter / 2 if hasattr(g.gear, "outer_diameter") else g.gear.tip_diameter / 2
            if ring_turns:
                out.append(Sweep(g.name, s.x, s.y, outer, g.gear.tip_diameter / 2, g.z, top))
            continue
        tip = g.gear.tip_diameter / 2
        if g.role == "planet" and orbit and centre is not None:
            r = math.hypot(s.x - centre[0], s.y - centre[1])
            out.append(Sweep(g.name, centre[0], centre[1], r + tip, max(r - tip, 0.0), g.z, top))
        else:
            out.append(Sweep(g.name, s.x, s.y, tip, 0.0, g.z, g.z + t))
            if g.hub is not None and g.hub_length > 0:
                hub = float(np.hypot(*g.hub.outer.points().T).max())
                out.append(Sweep(f"{g.name}-hub", s.x, s.y, hub, 0.0, g.z + t, top))
    for p in plan.plates:
        if p.name in FRAME or p.name.startswith("bridge-"):
            continue
        pts = p.part.outer.points()
        c = pts.mean(axis=0)
        out.append(Sweep(p.name, float(c[0]), float(c[1]), float(np.hypot(*(pts - c).T).max()), 0.0, p.z, p.z + t))
    return out


def _clear_of_sweeps(x: float, y: float, r: float, z0: float, z1: float, sweeps, margin: float) -> float:
    """Least gap (mm) between a circle (x, y, r) over z0..z1 and the sweeps it meets in z; +inf if none."""
    gap = math.inf
    for w in sweeps:
        if min(z1, w.z1) - max(z0, w.z0) <= 1e-9:
            continue
        d = math.hypot(x - w.x, y - w.y)
        outside = d - w.outer - r
        inside = (w.inner - d - r) if w.inner > 0 else -math.inf
        gap = min(gap, max(outside, inside))
    return gap - margin


# -- shafts ------------------------------------------------------------------------------------

@dataclass
class _Work:
    plan: object
    t: float
    fab: object
    back_z: float
    front_z: float  # lower face of the front plate
    rods: list
    findings: list
    sweeps: list
    shafts: list
    bridges: list  # PlannedPlate
    margin: float
    screw: str = "M3"
    nominal: float = 3.0
    future: dict = dataclasses.field(default_factory=dict)  # bridged shafts not built yet: name -> _Ahead


def _plate(plan, name):
    return next((p for p in plan.plates if p.name == name), None)


def _holding_discs(plan, s) -> list:
    """Non-frame plates (carrier discs) with a hole centred on the shaft."""
    out = []
    for p in plan.plates:
        if p.name in FRAME or p.name.startswith("bridge-"):
            continue
        if any(math.hypot(cx - s.x, cy - s.y) < 1e-6 for cx, cy, _ in p.part.circles):
            out.append(p)
    return out


def _spacers(w: _Work, name: str, x: float, y: float, d: float, occupied: list[tuple[float, float]],
             lo: float, hi: float) -> None:
    """Spacers on a shaft in every gap between ``occupied`` intervals from ``lo`` to ``hi``; the last one short by the end shake.

    Those shorter than the shaft's diameter are named washers (``hardware.spacer_word``).
    """
    occupied = sorted((a, b) for a, b in occupied if b > lo - 1e-9 and a < hi + 1e-9)
    gaps, at = [], lo
    for a, b in occupied:
        if a > at + 1e-6:
            gaps.append((at, a))
        at = max(at, b)
    if hi > at + 1e-6:
        gaps.append((at, hi))
    if not gaps:
        return
    inner = d + w.fab.bore_clearance
    outer = d + 2 * SPACER_WALL
    for k, (a, b) in enumerate(gaps, start=1):
        top = b - END_SHAKE if k == len(gaps) and b - a > 2 * END_SHAKE else b
        w.rods.append(Rod(spacer_name(name, k, top - a, d), "spacer", x, y, outer, inner, a, top))


def _reach(name: str, d: float) -> tuple[float, float]:
    """How far a shaft stands out behind the back plate and in front of the front plate, mm."""
    return (REACH * d if name in ("input", "centre") else 0.0), (REACH * d if name in ("output", "centre") else 0.0)


def _frame_shaft(w: _Work, i: int, s, gears, supports: list[tuple[str, float]], kind: str) -> ShaftSupport:
    """A shaft held by two supports (name, lower face z): its rod and spacers."""
    t = w.t
    supports = sorted(supports, key=lambda p: p[1])
    (n0, z_lo), (n1, z_hi) = supports[0], supports[-1]
    back, front = _reach(s.name, s.diameter)
    z0, z1 = z_lo - back, z_hi + t + front
    rod = Rod(s.name, kind, s.x, s.y, s.diameter, 0.0, z0, z1, tuple(n for n, _ in supports), tuple(g.name for g in gears))
    w.rods.append(rod)
    occupied = [(z, z + t) for _, z in supports] + [(g.z, _gear_top(g, t)) for g in gears]
    occupied += [(p.z, p.z + t) for p in _holding_discs(w.plan, s)]  # carrier discs riding on this shaft
    _spacers(w, s.name, s.x, s.y, s.diameter, occupied, z_lo + t, z_hi)
    return ShaftSupport(s.name, kind, tuple(n for n, _ in supports), z1 - z0, z_hi - (z_lo + t))


def _stud(w: _Work, s, gears, support: tuple[str, float], why: str) -> ShaftSupport:
    """The last resort: a stud fixed in one plate, the gears fixed to a pipe that turns on it."""
    t = w.t
    name, z_plate = support
    d_stud = s.diameter - 2 * PIPE_WALL
    low = min(g.z for g in gears)
    high = max(_gear_top(g, t) for g in gears)
    # The pipe runs from the plate's face past the gears; the stud ends flush with it (a washer glued or the end peened).
    if z_plate < low:
        p0, p1 = z_plate + t, high
        z0, z1 = z_plate, high
    else:
        p0, p1 = low, z_plate
        z0, z1 = low, z_plate + t
    pipe = f"{s.name}-pipe"
    w.rods.append(Rod(s.name, "stud", s.x, s.y, d_stud, 0.0, z0, z1, (name,), tuple(g.name for g in gears)))
    w.rods.append(Rod(pipe, "pipe", s.x, s.y, s.diameter, d_stud + w.fab.bore_clearance, p0, p1, (s.name,),
                      tuple(g.name for g in gears)))
    length = p1 - p0
    severity = "ok" if why.startswith("the train file") and length >= STUD_PIPE * s.diameter - 1e-9 else "warning"
    w.findings.append(Finding(f"stud {s.name}", severity, length, STUD_PIPE * s.diameter,
                              f"{s.name}: {why}; it is a {d_stud:g} mm stud fixed in the {name} with its gears fixed to a "
                              f"{s.diameter:g} mm pipe {length:.2f} mm long turning on it "
                              f"({'at least' if length >= STUD_PIPE * s.diameter else 'SHORTER than'} "
                              f"{STUD_PIPE:g} bore diameters); a cantilever: keep its load light"))
    return ShaftSupport(s.name, "stud", (name,), z1 - z0, length, pipe=pipe)


def _axle_pipes(w: _Work, s, gears) -> list[tuple[float, float]]:
    """Tubes of a summing train's differential axle: one per side (gears named ``a-...``/``...-a`` or ``b``)."""
    t = w.t
    sides: dict[str, list] = {}
    for g in gears:
        parts = g.name.split("-")
        side = "b" if "b" in parts else "a"
        sides.setdefault(side, []).append(g)
    spans = []
    for side, members in sorted(sides.items()):
        z0, z1 = min(g.z for g in members), max(_gear_top(g, t) for g in members)
        tube = max(g.bore for g in members)
        name = f"{s.name}-tube-{side}"
        w.rods.append(Rod(name, "pipe", s.x, s.y, tube, s.diameter + w.fab.bore_clearance, z0, z1,
                          (s.name,), tuple(g.name for g in members)))
        # Discs riding on the tube (a carrier disc, a ring's web) are kept in their layers by spacers and washers on
        # the tube between them and the tube's gears.
        riding = [p for p in _holding_discs(w.plan, s) if z0 - 1e-9 <= p.z and p.z + t <= z1 + 1e-9]
        occupied = [(g.z, _gear_top(g, t)) for g in members] + [(p.z, p.z + t) for p in riding]
        _spacers(w, name, s.x, s.y, tube, occupied, z0, z1)
        spans.append((z0, z1))
    return spans


@dataclass(frozen=True)
class _Ahead:
    """A bridged shaft not built yet, as its rod will stand (spacers included): bridges placed before it keep clear."""

    name: str
    x: float
    y: float
    radius: float
    z0: float
    z1: float


def _shafts(w: _Work, bridges_wanted: dict[int, str]) -> None:
    """Every shaft's support; the bridged ones last, so their pillars see every other shaft's rods.

    The bridged shafts go intermediate shafts first, the input and output last: a bridge keeps clear of the rods
    of the bridged shafts still to come, so where two nearly coaxial shafts both want a bridge in one room, the
    first (an intermediate shaft where there is one) becomes the stud and the other keeps its bridge.
    """
    plan = w.plan
    one_plate = [i for i, s in enumerate(plan.shafts)
                 if s.back != s.front and i in bridges_wanted and any(g.shaft == i for g in plan.gears)]
    one_plate.sort(key=lambda i: (plan.shafts[i].name in ("input", "output", "centre"), i))
    done = {i: _one_shaft(w, i, s, bridges_wanted) for i, s in enumerate(plan.shafts) if i not in one_plate}
    for i in one_plate:
        s = plan.shafts[i]
        z0, z1 = _bridged_span(w, [g for g in plan.gears if g.shaft == i], bridges_wanted[i])
        w.future[s.name] = _Ahead(s.name, s.x, s.y, s.diameter / 2 + SPACER_WALL, z0, z1)
    for i in one_plate:
        w.future.pop(plan.shafts[i].name)
        done[i] = _one_shaft(w, i, plan.shafts[i], bridges_wanted)
    w.shafts = [done[i] for i in range(len(plan.shafts))]


def _bridge_z(w: _Work, gears, side: str) -> float:
    """Lower face of the bridge that holds a shaft's ``side`` end: in the room the plan left beyond its layer, mm."""
    t, plan = w.t, w.plan
    if side == "front":  # above the top of its layer (hubs included)
        layer = max(g.layer for g in gears)
        return max(_gear_top(g, t) for g in plan.gears if g.layer == layer) + w.fab.layer_gap
    return min(g.z for g in gears) - w.fab.layer_gap - w.t


def _bridged_span(w: _Work, gears, side: str) -> tuple[float, float]:
    """From where to where the rod of a shaft held by a plate and a bridge will stand, mm."""
    zb = _bridge_z(w, gears, side)
    return (w.back_z, zb + w.t) if side == "front" else (zb, w.front_z + w.t)


def _one_shaft(w: _Work, i: int, s, bridges_wanted: dict[int, str]) -> ShaftSupport:
    """What holds shaft ``i``: both plates, carrier discs, a plate and a bridge, or (last) a stud."""
    plan = w.plan
    coaxial = plan.spec.coaxial and plan.spec.planetary is None and plan.spec.summing is None
    gears = [g for g in plan.gears if g.shaft == i and g.role != "ring"]
    frame = [(n, z) for n, z, ok in (("back-plate", w.back_z, s.back), ("front-plate", w.front_z, s.front)) if ok]
    if coaxial and i == len(plan.shafts) - 1:
        return _coaxial_pipe(w, s, gears)
    if not gears and not frame:
        return ShaftSupport(s.name, "pin", (), 0.0, 0.0)
    if s.name in plan.spec.studs and frame and gears:
        return _stud(w, s, gears, frame[0], "the train file names it a stud")
    tubes = [g for g in gears if g.bore > s.diameter + 1e-9]
    if len(frame) == 2 and tubes:
        spans = _axle_pipes(w, s, tubes)
        rest = [g for g in gears if g not in tubes]
        support = _frame_shaft(w, i, s, rest, frame, "axle")
        _respace(w, s, spans, rest, frame)
        return support
    if len(frame) == 2:
        return _frame_shaft(w, i, s, gears, frame, "arbor")
    discs = _holding_discs(plan, s)
    if not frame and len(discs) >= 2:
        return _frame_shaft(w, i, s, gears, [(p.name, p.z) for p in discs], "pin")
    if len(frame) == 1 and i in bridges_wanted:
        return _bridged(w, i, s, gears, frame[0], bridges_wanted[i])
    support = frame[0] if frame else ((discs[0].name, discs[0].z) if discs else None)
    if support is None:
        raise InputError(f"shaft {s.name!r} reaches no plate and no carrier: it cannot be held")
    return _stud(w, s, gears, support, "a gear of another layer blocks its way to the other plate"
                 if frame else "it is held by one carrier disc only")


def _respace(w: _Work, s, spans, rest, frame) -> None:
    """An axle's spacers fill the gaps between its tubes (not its gears)."""
    t = w.t
    gone = spacers_of(w.rods, s.name)
    w.rods[:] = [r for r in w.rods if r not in gone]
    occupied = [(z, z + t) for _, z in frame] + spans + [(g.z, _gear_top(g, t)) for g in rest]
    occupied += [(p.z, p.z + t) for p in _holding_discs(w.plan, s)]  # carrier discs riding on the axle
    zs = sorted(z for _, z in frame)
    _spacers(w, s.name, s.x, s.y, s.diameter, occupied, zs[0] + t, zs[-1])


def _coaxial_pipe(w: _Work, s, gears) -> ShaftSupport:
    """The output of a coaxial train: a pipe around the input shaft, through the front plate."""
    t = w.t
    inner = next(r for r in w.rods if r.name == w.plan.shafts[0].name)
    low = min(g.z for g in gears)
    top = w.front_z + t + REACH * inner.diameter
    bore = inner.diameter + w.fab.bore_clearance
    w.rods.append(Rod(s.name, "pipe", s.x, s.y, s.diameter, bore, low, top, ("front-plate", inner.name),
                      tuple(g.name for g in gears)))
    # The input stands out beyond the pipe by one diameter.
    idx = w.rods.index(inner)
    w.rods[idx] = dataclasses.replace(inner, z1=max(inner.z1, top + inner.diameter))
    gone = spacers_of(w.rods, inner.name)
    w.rods[:] = [r for r in w.rods if r not in gone]
    occupied = [(w.back_z, w.back_z + t)] + [(g.z, _gear_top(g, t)) for g in w.plan.gears if g.shaft == 0]
    _spacers(w, inner.name, s.x, s.y, inner.diameter, occupied + [(low, top)], w.back_z + t, low)
    # Between the output gear and the front plate, a spacer tube on the pipe.
    _spacers(w, s.name, s.x, s.y, s.diameter, [(g.z, _gear_top(g, t)) for g in gears], max(_gear_top(g, t) for g in gears),
             w.front_z)
    return ShaftSupport(s.name, "pipe", ("front-plate", inner.name), top - low, w.front_z - max(_gear_top(g, t) for g in gears),
                        pipe=s.name, around=inner.name)


# -- bridges -----------------------------------------------------------------------------------

def _stadium(p1: np.ndarray, p2: np.ndarray, half: float, tolerance: float) -> Loop:
    """A counter-clockwise bar of half-width ``half`` with round ends about ``p1`` and ``p2``, mm."""
    u = (p2 - p1) / np.linalg.norm(p2 - p1)
    phi = math.atan2(u[1], u[0])
    a2 = arc_curve(tuple(p2), half, phi - math.pi / 2, phi + math.pi / 2, tolerance)
    a1 = arc_curve(tuple(p1), half, phi + math.pi / 2, phi + 3 * math.pi / 2, tolerance)
    return Loop((a2, line_curve(tuple(a2.points[-1]), tuple(a1.points[0])), a1,
                 line_curve(tuple(a1.points[-1]), tuple(a2.points[0]))))


def _near_outline(pts: np.ndarray, p: np.ndarray, reach: float) -> bool:
    """Whether point ``p`` lies inside the closed outline ``pts`` or within ``reach`` of its edge, mm."""
    a, b = pts, np.roll(pts, -1, axis=0)
    ab = b - a
    k = np.clip(np.einsum("ij,ij->i", p - a, ab) / np.einsum("ij,ij->i", ab, ab), 0, 1)
    if float(np.min(np.hypot(*(p - (a + k[:, None] * ab)).T))) < reach:
        return True
    crosses = ((a[:, 1] > p[1]) != (b[:, 1] > p[1])) & (
        p[0] < a[:, 0] + (p[1] - a[:, 1]) * ab[:, 0] / np.where(ab[:, 1] == 0, 1, ab[:, 1]))
    return bool(np.count_nonzero(crosses) % 2)


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


def _bridged(w: _Work, i: int, s, gears, plate: tuple[str, float], side: str) -> ShaftSupport:
    """One plate and a bridge on the blocked side, standing on pillars on that plate; a stud where none fits."""
    t, fab, plan = w.t, w.fab, w.plan
    hole = fab.spacer_hole
    pillar_d = 2 * w.nominal
    half = max(EDGE_RULE * hole + hole / 2, EDGE_RULE * (s.diameter + fab.bore_clearance) * 1.5, pillar_d / 2)
    zb = _bridge_z(w, gears, side)  # the room the plan left
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
        if _clear_of_sweeps(p[0], p[1], pillar_d / 2, pz0, pz1, w.sweeps, w.margin) < 0:
            return False
        for r in others:
            near = math.hypot(p[0] - r.x, p[1] - r.y) < r.diameter / 2 + pillar_d / 2 + w.margin
            if near and min(pz1, r.z1) - max(pz0, r.z0) > 1e-9:
                return False
        for br in w.bridges:  # a bridge placed before stands in this pillar's way
            if min(pz1, br.z + t) - max(pz0, br.z) > 1e-9 and _near_outline(br.part.outer.points(), p, pillar_d / 2 + w.margin):
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
            return _stud(w, s, gears, plate, f"a gear of another layer blocks its way to the other plate, and its "
                                             f"bridge would meet {other}, {gap:.2f} mm away and also held by a bridge "
                                             f"at that height (nearly coaxial shafts): {other} keeps the bridge{end}")
        return _stud(w, s, gears, plate, "a gear of another layer blocks its way to the other plate and no bridge fits")
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
        _pillar(w, f"{name}-pillar-{k}", float(p[0]), float(p[1]), pz0, pz1, (plate[0], name), ends, tapped=True)
    supports = [plate, (name, zb)]
    return _frame_shaft(w, i, s, gears, supports, "arbor")


# -- pillars -----------------------------------------------------------------------------------

def _pillar(w: _Work, name: str, x: float, y: float, z0: float, z1: float, holds: tuple[str, ...],
            bolt_z: tuple[float, float] | None = None, tapped: bool = False) -> None:
    """A pillar (a sleeve over a through screw) from ``z0`` to ``z1``, and its screw through the plates it holds.

    ``tapped``: the screw comes in from the outside of the frame plate and ends flush in a thread tapped in the
    bridge (nothing stands out into the layer beyond the bridge); otherwise a nut and washer close it.
    """
    hole = w.fab.spacer_hole
    w.rods.append(Rod(name, "pillar", x, y, 2 * w.nominal, hole, z0, z1, holds))
    lo, hi = bolt_z if bolt_z else (z0 - w.t, z1 + w.t)
    if tapped:
        w.rods.append(Rod(f"{name}-screw", "screw", x, y, w.nominal, 0.0, lo, hi, holds, thread=w.screw))
        return
    nut = 0.8 * w.nominal + 0.5 * w.nominal  # nut (ISO 4032, 0.8 d, from memory) and a washer
    length = screw_length(hi - lo + nut)
    w.rods.append(Rod(f"{name}-screw", "screw", x, y, w.nominal, 0.0, lo, lo + length, holds, thread=w.screw))


def _corner_offset(hole: float, radius: float, pillar: float) -> float:
    """Distance of a corner pillar's centre from both edges: its hole one diameter from the straight edges and the arc."""
    need = max(EDGE_RULE * hole + hole / 2, pillar / 2)
    if need >= radius:
        return need
    # The corner arc (centre (r, r)) must stay ``need`` from the hole's centre (a, a): r - sqrt(2) (r - a) >= need.
    return max(need, radius - (radius - need) / math.sqrt(2))


def _frame_pillars(w: _Work, width: float, height: float) -> tuple[float, float]:
    """Four pillars near the corners, each outside every sweep by the margin; the plate grows where none fits."""
    fab = w.fab
    hole, pillar_d = fab.spacer_hole, 2 * w.nominal
    z0, z1 = w.back_z + w.t, w.front_z
    fixed = [r for r in w.rods if r.kind in ("arbor", "axle", "pin", "stud", "pipe", "pillar", "spacer")]
    for grow in range(0, 401):
        a = _corner_offset(hole, fab.plate_corner_radius, pillar_d)
        found = []
        for cx, cy, sx, sy in ((0, 0, 1, 1), (1, 0, -1, 1), (1, 1, -1, -1), (0, 1, 1, -1)):
            x0 = a if cx == 0 else width - a
            y0 = a if cy == 0 else height - a
            best = None
            for step in np.arange(0.0, max(width, height) / 2 - a, 1.0):
                for x, y in ((x0 + sx * step, y0), (x0, y0 + sy * step)):
                    if _pillar_clear(w, x, y, pillar_d, z0, z1, fixed):
                        best = (x, y)
                        break
                if best:
                    break
            found.append(best)
        if all(found):
            for k, (x, y) in enumerate(found, start=1):
                _pillar(w, f"pillar-{k}", x, y, z0, z1, FRAME)
            return width, height
        width, height = width + 1.0, height + 1.0  # grow to the right and up (the shafts keep their coordinates)
    raise InputError("no place for the frame pillars outside every sweep: use a larger plate_margin in the "
                     "fabrication profile or a smaller spacer_hole")


def _pillar_clear(w: _Work, x: float, y: float, d: float, z0: float, z1: float, fixed) -> bool:
    if _clear_of_sweeps(x, y, d / 2, z0, z1, w.sweeps, w.margin) < 0:
        return False
    for br in w.bridges:  # a frame pillar passes the bridges' height
        if min(z1, br.z + w.t) - max(z0, br.z) > 1e-9 and _near_outline(br.part.outer.points(), np.array([x, y]),
                                                                           d / 2 + w.margin):
            return False
    return all(math.hypot(x - r.x, y - r.y) >= r.diameter / 2 + d / 2 + w.margin
               for r in fixed if min(z1, r.z1) - max(z0, r.z0) > 1e-9)


def _ring_bolts(w: _Work) -> None:
    """A fixed ring's bolts: a sleeve under and over the ring on one through screw, outside the planets' sweep."""
    plan = w.plan
    ring = next((g for g in plan.gears if g.role == "ring"), None)
    if ring is None or plan.spec.planetary is None or plan.spec.planetary.fixed != "ring":
        return
    s = plan.shafts[ring.shaft]
    top = _gear_top(ring, w.t)
    for k, (bx, by, _) in enumerate(ring.part.circles, start=1):
        c, si = math.cos(ring.rotation), math.sin(ring.rotation)
        x, y = s.x + bx * c - by * si, s.y + bx * si + by * c
        lo, hi = w.back_z, w.front_z + w.t
        _pillar(w, f"ring-bolt-{k}-lower", x, y, w.back_z + w.t, ring.z, ("back-plate", "ring"), (lo, hi))
        w.rods.pop()  # one screw for both sleeves
        _pillar(w, f"ring-bolt-{k}-upper", x, y, top, w.front_z, ("ring", "front-plate"), (lo, hi))
        w.rods[-1] = dataclasses.replace(w.rods[-1], name=f"ring-bolt-{k}-screw")


# -- the frame plates --------------------------------------------------------------------------

def _frame_holes(w: _Work, z: float) -> tuple[tuple[float, float, float], ...]:
    """The holes of a frame plate at ``z``: every rod crossing it (shafts, pipes and studs at a running fit, screws
    at the clearance hole); coaxial rods share the largest hole."""
    fab = w.fab
    holes: dict[tuple[float, float], float] = {}
    for r in w.rods:
        if r.kind in ("spacer", "pillar") or min(z + w.t, r.z1) - max(z, r.z0) <= 1e-9:
            continue
        d = fab.spacer_hole if r.kind == "screw" else r.diameter + fab.bore_clearance
        key = (round(r.x, 9), round(r.y, 9))
        holes[key] = max(holes.get(key, 0.0), d)
    return tuple((r.x, r.y, holes.pop((round(r.x, 9), round(r.y, 9))))
                 for r in w.rods if (round(r.x, 9), round(r.y, 9)) in holes)


def _frame_plates(w: _Work, width: float, height: float) -> list:
    from .epicyclic import kerf_cut
    from .plan import PlannedPlate

    plan, fab = w.plan, w.fab
    out = []
    for p in plan.plates:
        if p.name not in FRAME:
            out.append(p)
            continue
        if plan.spec.planetary is not None and (width, height) == (plan.layout.width, plan.layout.height):
            outer = p.part.outer
        else:
            outer = rounded_rectangle(width, height, fab.plate_corner_radius, plan.tolerance)
        part = Part(p.name, outer, p.part.holes, _frame_holes(w, p.z), p.part.label)
        out.append(PlannedPlate(p.name, part, kerf_cut(part, fab, plan.tolerance), p.z))
    return out + w.bridges


def _edge_findings(plates, tolerance: float = 1e-6) -> None:
    """Refuse a plate whose hole lies nearer its edge than the hole's own diameter."""
    for p in plates:
        pts = p.part.outer.points()
        seg_a, seg_b = pts, np.roll(pts, -1, axis=0)
        for x, y, d in p.part.circles:
            q = np.array([x, y])
            ab = seg_b - seg_a
            k = np.clip(np.einsum("ij,ij->i", q - seg_a, ab) / np.einsum("ij,ij->i", ab, ab), 0, 1)
            dist = float(np.min(np.hypot(*(q - (seg_a + k[:, None] * ab)).T)))
            if dist - d / 2 < EDGE_RULE * d - 1e-3:
                raise InputError(f"{p.name}: the {d:g} mm hole at ({x:.2f}, {y:.2f}) mm is {dist - d / 2:.2f} mm from the "
                                 f"plate's edge; it must be at least its own diameter away: use a larger plate_margin in "
                                 "the fabrication profile")


# -- the whole -----------------------------------------------------------------------------------

def complete_plan(plan, bridges_wanted: dict[int, str] | None = None):
    """The plan with its mechanism: supports, bought parts and every hole of the frame plates.

    Parameters
    ----------
    plan : gearcad.plan.Plan
        A plan as the gear stage made it (frame plates with the shaft holes of the layout).
    bridges_wanted : dict, optional
        Shaft index -> ``"front"`` or ``"back"``: the shafts the plan left room for a bridge on that side.

    Returns
    -------
    gearcad.plan.Plan
        With ``mechanism`` set, the frame plates remade (all holes, grown if the pillars needed room)
        and the bridges added to ``plates``.
    """
    from .joins import join_compounds

    fab, t = plan.fabrication, plan.spec.thickness
    back, front = _plate(plan, "back-plate"), _plate(plan, "front-plate")
    if bridges_wanted is None:  # every shaft that reaches one plate: a bridge on the other side where one fits
        bridges_wanted = {i: ("front" if s.back else "back") for i, s in enumerate(plan.shafts) if s.back != s.front}
    name, nominal = screw_size(fab.spacer_hole)
    w = _Work(plan, t, fab, back.z, front.z, [], [], _sweeps(plan), [], [], fab.gear_clearance, name, nominal)
    unknown = sorted(set(plan.spec.studs) - {s.name for s in plan.shafts})
    if unknown:
        raise InputError(f"studs names {unknown[0]!r}, which is not a shaft of this train; shafts: "
                         + ", ".join(s.name for s in plan.shafts))
    _shafts(w, bridges_wanted)
    _ring_bolts(w)
    width, height = _frame_pillars(w, plan.layout.width, plan.layout.height)
    plates = _frame_plates(w, width, height)
    _edge_findings(plates)
    layout = dataclasses.replace(plan.layout, width=width, height=height)
    plan = dataclasses.replace(plan, plates=tuple(plates), layout=layout)
    plan, joins, join_findings = join_compounds(plan, w.rods)
    w.findings += join_findings
    for j in joins:
        members = [g for g in plan.gears if g.name in j.gears]
        for k, (x, y) in enumerate(j.pins, start=1):
            w.rods.append(Rod(f"{j.shaft}-dowel-{k}", "dowel", x, y, j.pin, 0.0, min(g.z for g in members),
                              max(g.z + t for g in members), (), j.gears))
    mech = Mechanism(tuple(w.shafts), tuple(w.rods), tuple(w.sweeps), tuple(b.name for b in w.bridges), w.margin,
                     width, height, tuple(w.findings), w.screw, tuple(joins))
    from .interference import check_assembly

    check = check_assembly(plan, mech)
    mech = dataclasses.replace(mech, findings=mech.findings + tuple(check.findings()), solids=check.solids,
                               overlaps=check.overlaps)
    return dataclasses.replace(plan, mechanism=mech, findings=plan.findings + mech.findings)
