"""The mechanism around the gears: what holds every shaft, and the frame's bought parts, placed.

Pure.  From a plan's gears, shafts and plates this module works out

- what holds each shaft at two points (the trade's first rule of a movement, common
  practice): both frame plates; one plate and a *bridge* (a small bar of our own design,
  cut like the plates, standing on its own pillars in room the plan leaves between two
  layers) where a gear of another layer blocks the way; a pair of carrier discs for planet
  pins; or, as the last resort, a fixed *stud* in one plate with the gears turning on a
  pipe at least ``STUD_PIPE`` bore diameters long, standing proud of its gears where they
  span less (reported as a warning; a failure where the layer stack leaves no room for it);
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

The pieces live in their own modules: :mod:`.sweeps`, :mod:`.rods` (shafts, studs, pipes,
spacers, pillars), :mod:`.bridges` and :mod:`.frame` (frame pillars, ring bolts, frame plates);
this module decides what holds each shaft and puts the mechanism together.  Lengths in mm,
angles in radians.
"""

from __future__ import annotations

import dataclasses

from ..errors import InputError
from .hardware import Mechanism, Rod, SPACER_WALL, ShaftSupport, screw_size, spacers_of
from .bridges import Ahead, bridged, bridged_span
from .frame import check_edges, finish_frame_plates, frame_pillars, ring_bolts
from .planetary_drive import planetary_centre, ring_drive_finding
from .rods import Work, axle_pipes, coaxial_pipe, frame_shaft, holding_discs, plate_named, respace, stud
from .sweeps import sweeps_of

__all__ = ["complete_plan"]


def _shafts(w: Work, bridges_wanted: dict[int, str]) -> None:
    """Every shaft's support; the bridged ones last, so their pillars see every other shaft's rods.

    The bridged shafts go intermediate shafts first, the input and output last: a bridge keeps clear of the rods
    of the bridged shafts still to come, so where two nearly coaxial shafts both want a bridge in one room, the
    first (an intermediate shaft where there is one) becomes the stud and the other keeps its bridge.  Where that
    stud's pipe finds no room for its ``STUD_PIPE`` bore diameters, the order is tried once more with that shaft
    last (the other one takes the stud), and kept when it has no such failure.
    """
    plan = w.plan
    one_plate = [i for i, s in enumerate(plan.shafts)
                 if s.back != s.front and i in bridges_wanted and any(g.shaft == i for g in plan.gears)]
    one_plate.sort(key=lambda i: (plan.shafts[i].name in ("input", "output", "centre"), i))
    start = (list(w.rods), list(w.findings), list(w.bridges))
    _build_shafts(w, bridges_wanted, one_plate)
    short = [i for i in one_plate if _short_stud(w, plan.shafts[i].name)]
    if short and len(one_plate) > 1:
        first = (w.rods, w.findings, w.bridges, w.shafts)
        w.rods, w.findings, w.bridges = (list(x) for x in start)
        _build_shafts(w, bridges_wanted, [i for i in one_plate if i != short[0]] + [short[0]])
        if any(_short_stud(w, s.name) for s in plan.shafts):
            w.rods, w.findings, w.bridges, w.shafts = first


def _short_stud(w: Work, name: str) -> bool:
    return any(f.check == f"stud {name}" and f.severity == "failure" for f in w.findings)


def _build_shafts(w: Work, bridges_wanted: dict[int, str], one_plate: list[int]) -> None:
    plan = w.plan
    done = {i: _one_shaft(w, i, s, bridges_wanted) for i, s in enumerate(plan.shafts) if i not in one_plate}
    for i in one_plate:
        s = plan.shafts[i]
        z0, z1 = bridged_span(w, [g for g in plan.gears if g.shaft == i], bridges_wanted[i])
        w.future[s.name] = Ahead(s.name, s.x, s.y, s.diameter / 2 + SPACER_WALL, z0, z1)
    for i in one_plate:
        w.future.pop(plan.shafts[i].name)
        done[i] = _one_shaft(w, i, plan.shafts[i], bridges_wanted)
    w.shafts = [done[i] for i in range(len(plan.shafts))]


def _one_shaft(w: Work, i: int, s, bridges_wanted: dict[int, str]) -> ShaftSupport:
    """What holds shaft ``i``: both plates, carrier discs, a plate and a bridge, or (last) a stud."""
    plan = w.plan
    coaxial = plan.spec.coaxial and plan.spec.planetary is None and plan.spec.summing is None
    gears = [g for g in plan.gears if g.shaft == i and g.role != "ring"]
    frame = [(n, z) for n, z, ok in (("back-plate", w.back_z, s.back), ("front-plate", w.front_z, s.front)) if ok]
    if coaxial and i == len(plan.shafts) - 1:
        return coaxial_pipe(w, s, gears)
    if not gears and not frame:
        return ShaftSupport(s.name, "pin", (), 0.0, 0.0)
    if s.name in plan.spec.studs and frame and gears:
        return stud(w, s, gears, frame[0], "the train file names it a stud")
    tubes = [g for g in gears if g.bore > s.diameter + 1e-9]
    if len(frame) == 2 and tubes:
        spans = axle_pipes(w, s, tubes)
        rest = [g for g in gears if g not in tubes]
        support = frame_shaft(w, i, s, rest, frame, "axle")
        respace(w, s, spans, rest, frame)
        return support
    if len(frame) == 2 and plan.spec.planetary is not None and s.name == "centre":
        return planetary_centre(w, s, frame_shaft(w, i, s, gears, frame, "arbor"))
    if len(frame) == 2:
        return frame_shaft(w, i, s, gears, frame, "arbor")
    discs = holding_discs(plan, s)
    if not frame and len(discs) >= 2:
        return frame_shaft(w, i, s, gears, [(p.name, p.z) for p in discs], "pin")
    if len(frame) == 1 and i in bridges_wanted:
        return bridged(w, i, s, gears, frame[0], bridges_wanted[i])
    support = frame[0] if frame else ((discs[0].name, discs[0].z) if discs else None)
    if support is None:
        raise InputError(f"shaft {s.name!r} reaches no plate and no carrier: it cannot be held")
    return stud(w, s, gears, support, "a gear of another layer blocks its way to the other plate"
                if frame else "it is held by one carrier disc only")


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
    back, front = plate_named(plan, "back-plate"), plate_named(plan, "front-plate")
    if bridges_wanted is None:  # every shaft that reaches one plate: a bridge on the other side where one fits
        bridges_wanted = {i: ("front" if s.back else "back") for i, s in enumerate(plan.shafts) if s.back != s.front}
    name, nominal = screw_size(fab.spacer_hole)
    w = Work(plan, t, fab, back.z, front.z, [], [], sweeps_of(plan), [], [], fab.gear_clearance, name, nominal)
    unknown = sorted(set(plan.spec.studs) - {s.name for s in plan.shafts})
    if unknown:
        raise InputError(f"studs names {unknown[0]!r}, which is not a shaft of this train; shafts: "
                         + ", ".join(s.name for s in plan.shafts))
    _shafts(w, bridges_wanted)
    ring_turns = ring_drive_finding(plan)
    if ring_turns is not None:
        w.findings.append(ring_turns)
    ring_bolts(w)
    width, height = frame_pillars(w, plan.layout.width, plan.layout.height)
    plates = finish_frame_plates(w, width, height)
    check_edges(plates)
    layout = dataclasses.replace(plan.layout, width=width, height=height)
    plan = dataclasses.replace(plan, plates=tuple(plates), layout=layout)
    plan, joins, join_findings = join_compounds(plan, w.rods)
    w.findings += join_findings
    for j in joins:
        members = [g for g in plan.gears if g.name in j.gears]
        if j.hub is not None:  # a fused part's hub fills the gap between its gears: no spacer there
            gap = {r.name for r in spacers_of(w.rods, j.shaft) if r.z0 >= j.hub[2] - 1e-9 and r.z1 <= j.hub[3] + 1e-9}
            w.rods[:] = [r for r in w.rods if r.name not in gap]
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
