"""Compound pairs joined as the process allows: two gears on one shaft that must turn together.

Pure.  The default follows the fabrication process (a train file may choose with
``join = "fused" | "pinned" | "flat"``):

- ``fused`` (FDM printing): both gears printed as one part, in phase, with a hub filling
  the layer gap between them (the export writes the fused solid as ``<shaft>-compound``);
- ``pinned`` (laser cutting): two laminations with two alignment-pin holes each, placed so
  they line up in the assembly; a dowel pin through both and glue on the faces;
- ``flat`` (CNC milling): a D-flat in both bores and a flat on the shaft, which turns in
  the plates with its gears.

Lengths in mm, angles in radians.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from ..meshes.checks import Finding
from .spec import JOINS

__all__ = ["Join", "JOINS", "DEFAULT_JOIN", "join_compounds"]

DEFAULT_JOIN = {"fdm": "fused", "laser": "pinned", "cnc": "flat"}
FLAT_DEPTH = 0.1  # a D-flat takes this share of the shaft diameter; common practice (D-shafts of small motors)
PIN_SIZES = (1.0, 1.5, 2.0, 2.5, 3.0, 4.0)  # dowel pins, ISO 2338 diameters (from memory)


@dataclass(frozen=True)
class Join:
    """How the gears of one compound shaft are joined: method, gears, note; dowel pins (diameter, positions) if any."""

    shaft: str
    gears: tuple[str, ...]
    method: str
    note: str
    pin: float = 0.0
    pins: tuple[tuple[float, float], ...] = ()  # plate coordinates, mm
    file: str | None = None  # the fused part's file stem
    hub: tuple[float, float, float, float] | None = None  # fused: the hub's diameter, bore, z0 and z1, mm


def _method(plan) -> str:
    chosen = getattr(plan.spec, "join", None)
    return chosen or DEFAULT_JOIN.get(plan.fabrication.process, "pinned")


def _spacer_radius(rods, shaft) -> float:
    from .hardware import spacers_of

    return max([r.diameter / 2 for r in spacers_of(rods, shaft)] + [0.0])


def _pinned(plan, shaft, gears, rods):
    from .plan import MIN_RIM

    fab = plan.fabrication
    s = shaft
    hole = max(g.bore for g in gears) + fab.bore_clearance
    inner = max(hole / 2, _spacer_radius(rods, s.name)) + 0.5
    outer = min(g.gear.root_diameter / 2 - MIN_RIM * g.gear.module for g in gears)
    # The smallest stock pin of at least half the bore, else the largest that fits (common practice).
    sizes = [p for p in PIN_SIZES if p >= hole / 2] + [p for p in reversed(PIN_SIZES) if p < hole / 2]
    for pin in sizes:
        wall = max(0.5, pin / 2)
        if inner + wall + pin <= outer - wall:
            break
    else:
        return None
    radius = (inner + outer) / 2
    pins = tuple((s.x + radius * math.cos(a), s.y + radius * math.sin(a)) for a in (0.0, math.pi))
    changed = []
    for g in gears:
        local = tuple((radius * math.cos(a - g.rotation), radius * math.sin(a - g.rotation), pin + fab.bore_clearance)
                      for a in (0.0, math.pi))
        part = dataclasses.replace(g.part, circles=g.part.circles + local)
        cut = dataclasses.replace(g.cut_part, circles=g.cut_part.circles +
                                  tuple((x, y, d - fab.kerf) for x, y, d in local))
        changed.append(dataclasses.replace(g, part=part, cut_part=cut))
    return changed, pin, pins


def _flat(plan, gears):
    """The gears with a D-flat bore (their outlines kept; only the bore is made again, kerf applied)."""
    from ..geometry.bore import bore_loop
    from ..geometry.offset import offset_loop

    fab, tol = plan.fabrication, plan.tolerance
    out = []
    for g in gears:
        if g.spec.flat is not None or g.spec.keyway is not None:  # shaped as the train file says already
            out.append(g)
            continue
        spec = dataclasses.replace(g.spec, flat=g.bore / 2 - FLAT_DEPTH * g.bore)
        keyway = (spec.keyway.width, spec.keyway.depth) if spec.keyway else None
        shaped = bore_loop(g.bore + fab.bore_clearance, flat=spec.flat, keyway=keyway, tolerance=tol)
        extra = tuple(c for c in g.part.circles if (c[0], c[1]) != (0.0, 0.0))  # pin holes stay
        cut_extra = tuple(c for c in g.cut_part.circles if (c[0], c[1]) != (0.0, 0.0))
        part = dataclasses.replace(g.part, holes=(shaped,), circles=extra)
        cut_hole = offset_loop(shaped, fab.kerf / 2, tol) if fab.kerf else shaped
        cut = dataclasses.replace(g.cut_part, holes=(cut_hole,), circles=cut_extra)
        out.append(dataclasses.replace(g, spec=spec, part=part, cut_part=cut))
    return out


def _fused_hub(plan, gears) -> tuple[float, float, float, float]:
    """The hub of a fused part across the layer gap: diameter (inside every root less two modules, at most
    2.5 bores + 2 mm: common practice for printed hubs), bore (running fit), lower and upper z, mm."""
    low = min(gears, key=lambda g: g.z)
    diameter = min(min(g.gear.root_diameter for g in gears) - 2 * max(g.gear.module for g in gears),
                   2.5 * low.bore + 2.0)
    z0 = low.z + plan.spec.thickness
    return diameter, low.bore + plan.fabrication.bore_clearance, z0, max(z0, max(g.z for g in gears))


def _pipe_output(plan, index: int) -> bool:
    """A coaxial train's output: its gear is fixed to the output pipe (glued), not to a shaft."""
    return bool(plan.spec.coaxial) and index == len(plan.shafts) - 1


def _planetary_joins(plan, rods) -> tuple[object, list[Join], list[Finding]]:
    """A ring-fixed set: the sun fixed to the centre shaft by a D-flat, the carrier's front disc glued to its pipe
    (:mod:`gearcad.trains.planetary_drive`); the input and output each on one of them."""
    from .planetary_drive import PIPE_SUFFIX

    pipe = next((r for r in rods if r.kind == "pipe" and r.name == "centre" + PIPE_SUFFIX), None)
    if pipe is None:
        return plan, [], []
    gears = list(plan.gears)
    sun = next(g for g in gears if g.role == "sun")
    gears[gears.index(sun)] = _flat(plan, [sun])[0]
    a = plan.spec.planetary
    ends = {"sun": "the centre shaft's end behind the back plate", "carrier": "the pipe's end in front of the front plate"}
    inp = a.input or "sun"
    joins = [Join("centre", ("sun",), "flat", "The sun is fixed to the centre shaft: its bore has a D-flat; file or grind "
                  f"the matching flat on the shaft (the {'input' if inp == 'sun' else 'output'}, at "
                  f"{ends['sun']})"),
             Join("centre", ("carrier",), "pipe", f"Glue the carrier's front disc to the {pipe.name} "
                  f"({pipe.diameter:g} mm tube, {pipe.length:.2f} mm long), which turns on the centre shaft and passes "
                  f"the front plate (the {'input' if inp == 'carrier' else 'output'}, at {ends['carrier']}); the "
                  "carrier's back disc turns on the shaft, joined to the front one by the planet pins")]
    return dataclasses.replace(plan, gears=tuple(gears)), joins, []


def join_compounds(plan, rods) -> tuple[object, list[Join], list[Finding]]:
    """Join the gears of every compound shaft of a compound train, and fix the input's and output's gears to their
    shafts; the plan with its gears changed, the joins, findings."""
    if plan.spec.planetary is not None:
        return _planetary_joins(plan, rods)
    if plan.spec.summing is not None:
        return plan, [], []
    method = _method(plan)
    gears = list(plan.gears)
    joins, findings = [], []
    for i, s in enumerate(plan.shafts):
        members = [g for g in gears if g.shaft == i]
        on_stud = any(r.kind == "stud" and r.name == s.name for r in rods)
        if len(members) == 1 and s.name in ("input", "output") and on_stud:
            joins.append(Join(s.name, (members[0].name,), "pipe", f"glue {members[0].name} to the {s.name}-pipe, which "
                              "turns on the fixed stud and carries the drive"))
            continue
        if len(members) == 1 and s.name in ("input", "output") and not _pipe_output(plan, i):
            # The input's gear must take the drive from its shaft, the output's give it to a hand or a coupling.
            g = members[0]
            if g.spec.flat is None and g.spec.keyway is None:
                gears[gears.index(g)] = _flat(plan, [g])[0]
            joins.append(Join(s.name, (g.name,), "flat",
                              f"{g.name} is fixed to the {s.name} shaft: its bore has a D-flat (or its keyway); file or "
                              "grind the matching flat on the shaft (or fit the key)"))
            continue
        if len(members) < 2:
            continue
        names = tuple(g.name for g in members)
        if on_stud:
            joins.append(Join(s.name, names, "pipe", f"glue {' and '.join(names)} to the {s.name}-pipe, teeth in the "
                              "phase the assembly shows; the pipe turns on the fixed stud"))
            continue
        how = method
        if how == "pinned":
            done = _pinned(plan, s, members, rods)
            if done is None:
                how = "flat"
                findings.append(Finding(f"join {s.name}", "warning", 0.0, 0.0,
                                        f"{s.name}: no room for alignment pins between the bore and the roots of "
                                        f"{' and '.join(names)}; their bores get a D-flat instead"))
            else:
                changed, pin, pins = done
                for g in changed:
                    gears[gears.index(next(x for x in gears if x.name == g.name))] = g
                joins.append(Join(s.name, names, "pinned",
                                  f"push two {pin:g} mm dowel pins through the pin holes of {' and '.join(names)} (they "
                                  "line up only with the teeth in phase), the spacer washer between the gears on the "
                                  "shaft, and glue the pins in", pin, pins))
                continue
        if how == "flat":
            for g in _flat(plan, members):
                gears[gears.index(next(x for x in gears if x.name == g.name))] = g
            joins.append(Join(s.name, names, "flat",
                              f"{' and '.join(names)} have a D-flat bore: grind or file a flat "
                              f"{FLAT_DEPTH * members[0].bore:.2f} mm deep along the {s.name} shaft, which turns in its "
                              "supports with both gears"))
            continue
        joins.append(Join(s.name, names, "fused",
                          f"print {' and '.join(names)} as one part ({s.name}-compound.stl), teeth in phase, with a hub "
                          "filling the gap between them", file=f"{s.name}-compound", hub=_fused_hub(plan, members)))
    return dataclasses.replace(plan, gears=tuple(gears)), joins, findings
