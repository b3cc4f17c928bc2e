"""The rods that hold a plan's shafts: shafts in two supports, studs on pipes, tubes, spacers and pillars.

Pure.  The working state of :func:`gearcad.trains.supports.complete_plan` and the ways a shaft is
held, each adding its rods (the shaft, its pipe or tubes, the spacers and washers that keep each
gear in its layer, cut to the gaps, the last one short by the end shake); and a pillar with its
through screw.  Lengths in mm.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..meshes.checks import Finding
from .hardware import (END_SHAKE, FRAME, NUTS, PIPE_WALL, REACH, Rod, SPACER_WALL, STUD_PIPE, WASHERS, ShaftSupport,
                       spacer_name, spacers_of, through_screw_length)
from .sweeps import gear_top, near_outline

__all__ = ["Work", "plate_named", "holding_discs", "add_spacers", "frame_shaft", "stud", "axle_pipes", "respace",
           "coaxial_pipe", "add_pillar"]


@dataclass
class Work:
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
    future: dict = dataclasses.field(default_factory=dict)  # bridged shafts not built yet: name -> Ahead


def plate_named(plan, name):
    return next((p for p in plan.plates if p.name == name), None)


def holding_discs(plan, s) -> list:
    """Non-frame plates (carrier discs) with a hole centred on the shaft."""
    out = []
    for p in plan.plates:
        if p.name in FRAME or p.name.startswith("bridge-"):
            continue
        if any(math.hypot(cx - s.x, cy - s.y) < 1e-6 for cx, cy, _ in p.part.circles):
            out.append(p)
    return out


def add_spacers(w: Work, name: str, x: float, y: float, d: float, occupied: list[tuple[float, float]],
                lo: float, hi: float) -> None:
    """Spacers on a shaft in every gap between ``occupied`` intervals from ``lo`` to ``hi``; the last one long enough
    (over twice the end shake) short by the end shake, so the parts between them keep their play.

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
    short = max((k for k, (a, b) in enumerate(gaps, start=1) if b - a > 2 * END_SHAKE), default=None)
    for k, (a, b) in enumerate(gaps, start=1):
        top = b - END_SHAKE if k == short else b
        w.rods.append(Rod(spacer_name(name, k, top - a, d), "spacer", x, y, outer, inner, a, top))


def _reach(name: str, d: float) -> tuple[float, float]:
    """How far a shaft stands out behind the back plate and in front of the front plate, mm."""
    return (REACH * d if name in ("input", "centre") else 0.0), (REACH * d if name in ("output", "centre") else 0.0)


def frame_shaft(w: Work, i: int, s, gears, supports: list[tuple[str, float]], kind: str) -> ShaftSupport:
    """A shaft held by two supports (name, lower face z): its rod and spacers."""
    t = w.t
    supports = sorted(supports, key=lambda p: p[1])
    z_lo, z_hi = supports[0][1], supports[-1][1]
    back, front = _reach(s.name, s.diameter)
    z0, z1 = z_lo - back, z_hi + t + front
    rod = Rod(s.name, kind, s.x, s.y, s.diameter, 0.0, z0, z1, tuple(n for n, _ in supports), tuple(g.name for g in gears))
    w.rods.append(rod)
    occupied = [(z, z + t) for _, z in supports] + [(g.z, gear_top(g, t)) for g in gears]
    occupied += [(p.z, p.z + t) for p in holding_discs(w.plan, s)]  # carrier discs riding on this shaft
    add_spacers(w, s.name, s.x, s.y, s.diameter, occupied, z_lo + t, z_hi)
    return ShaftSupport(s.name, kind, tuple(n for n, _ in supports), z1 - z0, z_hi - (z_lo + t))


def _stud_room(w: Work, s, gears, up: bool, reach: float) -> tuple[float, str]:
    """How far a stud's pipe may run beyond its gears, away from its plate, and what stops it there.

    The nearest part (in z, beyond ``reach``) whose material or sweep comes within the gear clearance of the pipe:
    another gear's sweep (planets' orbits and hubs included), a disc, a rod, a bridge, the far frame plate.
    Returns the z of that part's face and its name, mm.
    """
    r = s.diameter / 2
    own = {g.name for g in gears} | {f"{g.name}-hub" for g in gears}
    found = [(w.front_z, "the front plate")] if up else [(w.back_z + w.t, "the back plate")]

    def near(x: float, y: float, outer: float, inner: float = 0.0) -> bool:
        d = math.hypot(x - s.x, y - s.y)
        return max(d - outer - r, (inner - d - r) if inner > 0 else -math.inf) < w.margin

    spans = [(sw.z0, sw.z1, sw.name) for sw in w.sweeps if sw.name not in own and near(sw.x, sw.y, sw.outer, sw.inner)]
    spans += [(rod.z0, rod.z1, rod.name) for rod in w.rods if not rod.name.startswith(s.name)
              and rod.kind != "screw" and near(rod.x, rod.y, rod.diameter / 2)]
    spans += [(a.z0, a.z1, a.name) for a in w.future.values() if near(a.x, a.y, a.radius)]
    spans += [(b.z, b.z + w.t, b.name) for b in w.bridges
              if near_outline(b.part.outer.points(), np.array([s.x, s.y]), r + w.margin)]
    for z0, z1, name in spans:
        if up and z0 >= reach - 1e-9:
            found.append((z0, name))
        elif not up and z1 <= reach + 1e-9:
            found.append((z1, name))
    return min(found) if up else max(found)


def stud(w: Work, s, gears, support: tuple[str, float], why: str) -> ShaftSupport:
    """The last resort: a stud fixed in one plate, the gears fixed to a pipe that turns on it.

    The pipe runs from the plate's face past the gears and is at least ``STUD_PIPE`` bore diameters long: where the
    gears span less, it stands proud of them on the side away from the plate, into the room the layer stack leaves
    (the end shake short of whatever comes next).  Where that room is too short the stud is a failure finding.
    """
    t = w.t
    name, z_plate = support
    d_stud = s.diameter - 2 * PIPE_WALL
    low = min(g.z for g in gears)
    high = max(gear_top(g, t) for g in gears)
    need = STUD_PIPE * s.diameter
    up = z_plate < low
    room, blocker = _stud_room(w, s, gears, up, high if up else low)
    # The stud ends flush with the pipe (a washer glued to it or its end peened keeps the pipe on).
    if up:
        p0 = z_plate + t
        p1 = max(high, min(p0 + need, room - END_SHAKE))
        z0, z1 = z_plate, p1
    else:
        p1 = z_plate
        p0 = min(low, max(p1 - need, room + END_SHAKE))
        z0, z1 = p0, z_plate + t
    pipe = f"{s.name}-pipe"
    w.rods.append(Rod(s.name, "stud", s.x, s.y, d_stud, 0.0, z0, z1, (name,), tuple(g.name for g in gears)))
    w.rods.append(Rod(pipe, "pipe", s.x, s.y, s.diameter, d_stud + w.fab.bore_clearance, p0, p1, (s.name,),
                      tuple(g.name for g in gears)))
    length = p1 - p0
    proud = (p1 - high) if up else (low - p0)
    where = (f", standing {proud:.2f} mm proud of its gears {'above' if up else 'below'} them" if proud > 1e-9 else "")
    if length < need - 1e-9:
        w.findings.append(Finding(
            f"stud {s.name}", "failure", length, need,
            f"{s.name}: {why}; a stud there would turn its gears on a {s.diameter:g} mm pipe only {length:.2f} mm long "
            f"(from the {name} to the end shake before {blocker}), shorter than {STUD_PIPE:g} bore diameters "
            f"({need:.2f} mm): give the train a thicker sheet or other tooth counts, or hold {s.name} in two plates"))
    else:
        severity = "ok" if why.startswith("the train file") else "warning"
        w.findings.append(Finding(
            f"stud {s.name}", severity, length, need,
            f"{s.name}: {why}; it is a {d_stud:g} mm stud fixed in the {name} with its gears fixed to a "
            f"{s.diameter:g} mm pipe {length:.2f} mm long turning on it (at least {STUD_PIPE:g} bore diameters"
            f"{where}); a cantilever: keep its load light"))
    return ShaftSupport(s.name, "stud", (name,), z1 - z0, length, pipe=pipe)


def axle_pipes(w: Work, s, gears) -> list[tuple[float, float]]:
    """Tubes of a summing train's differential axle: one per side (gears named ``a-...``/``...-a`` or ``b``)."""
    t = w.t
    sides: dict[str, list] = {}
    for g in gears:
        parts = g.name.split("-")
        side = "b" if "b" in parts else "a"
        sides.setdefault(side, []).append(g)
    spans = []
    for side, members in sorted(sides.items()):
        z0, z1 = min(g.z for g in members), max(gear_top(g, t) for g in members)
        tube = max(g.bore for g in members)
        name = f"{s.name}-tube-{side}"
        w.rods.append(Rod(name, "pipe", s.x, s.y, tube, s.diameter + w.fab.bore_clearance, z0, z1,
                          (s.name,), tuple(g.name for g in members)))
        # Discs riding on the tube (a carrier disc, a ring's web) are kept in their layers by spacers and washers on
        # the tube between them and the tube's gears.
        riding = [p for p in holding_discs(w.plan, s) if z0 - 1e-9 <= p.z and p.z + t <= z1 + 1e-9]
        occupied = [(g.z, gear_top(g, t)) for g in members] + [(p.z, p.z + t) for p in riding]
        add_spacers(w, name, s.x, s.y, tube, occupied, z0, z1)
        spans.append((z0, z1))
    return spans


def respace(w: Work, s, spans, rest, frame) -> None:
    """An axle's spacers fill the gaps between its tubes (not its gears)."""
    t = w.t
    gone = spacers_of(w.rods, s.name)
    w.rods[:] = [r for r in w.rods if r not in gone]
    occupied = [(z, z + t) for _, z in frame] + spans + [(g.z, gear_top(g, t)) for g in rest]
    occupied += [(p.z, p.z + t) for p in holding_discs(w.plan, s)]  # carrier discs riding on the axle
    zs = sorted(z for _, z in frame)
    add_spacers(w, s.name, s.x, s.y, s.diameter, occupied, zs[0] + t, zs[-1])


def coaxial_pipe(w: Work, s, gears) -> ShaftSupport:
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
    occupied = [(w.back_z, w.back_z + t)] + [(g.z, gear_top(g, t)) for g in w.plan.gears if g.shaft == 0]
    add_spacers(w, inner.name, s.x, s.y, inner.diameter, occupied + [(low, top)], w.back_z + t, low)
    # Between the output gear and the front plate, a spacer tube on the pipe.
    add_spacers(w, s.name, s.x, s.y, s.diameter, [(g.z, gear_top(g, t)) for g in gears], max(gear_top(g, t) for g in gears),
                w.front_z)
    return ShaftSupport(s.name, "pipe", ("front-plate", inner.name), top - low, w.front_z - max(gear_top(g, t) for g in gears),
                        pipe=s.name, around=inner.name)


def add_pillar(w: Work, name: str, x: float, y: float, z0: float, z1: float, holds: tuple[str, ...],
               bolt_z: tuple[float, float] | None = None, tapped: bool = False, screw: str | None = "") -> None:
    """A pillar (a sleeve over a through screw) from ``z0`` to ``z1``, and its screw through the plates it holds.

    ``tapped``: the screw comes in from the outside of the frame plate and ends flush in a thread tapped in the
    bridge (nothing stands out into the layer beyond the bridge); otherwise a plain washer and a hex nut close it.
    ``screw``: the name the screw (and its washer and nut) take, ``""`` for the pillar's own; None for no screw
    (another sleeve's screw runs through this one).
    """
    hole = w.fab.spacer_hole
    w.rods.append(Rod(name, "pillar", x, y, 2 * w.nominal, hole, z0, z1, holds))
    if screw is None:
        return
    screw = screw or name
    lo, hi = bolt_z if bolt_z else (z0 - w.t, z1 + w.t)
    if tapped:
        w.rods.append(Rod(f"{screw}-screw", "screw", x, y, w.nominal, 0.0, lo, hi, holds, thread=w.screw))
        return
    length = through_screw_length(hi - lo, w.screw)
    w.rods.append(Rod(f"{screw}-screw", "screw", x, y, w.nominal, 0.0, lo, lo + length, holds, thread=w.screw))
    # The plain washer on the plate's outer face and the hex nut on it (drawn as its across-corners cylinder).
    bore, outside, thick = WASHERS[w.screw]
    flats, height = NUTS[w.screw]
    w.rods.append(Rod(f"{screw}-washer", "washer", x, y, outside, bore, hi, hi + thick, (), (f"{screw}-screw",),
                      thread=w.screw))
    w.rods.append(Rod(f"{screw}-nut", "nut", x, y, flats / math.cos(math.pi / 6), w.nominal, hi + thick,
                      hi + thick + height, (), (f"{screw}-screw",), thread=w.screw))
