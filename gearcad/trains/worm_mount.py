"""What holds a worm stage's worm, and its clearance check: run after the mechanism is complete.

:func:`finish_worm` takes a plan from :func:`gearcad.trains.worm_stage.plan_worm` through
:func:`gearcad.trains.supports.complete_plan` and adds

- the bearing blocks' screws: two a block, from the back plate's outside into a thread tapped in the
  block's foot (bought rods, so the parts list and the assembly take them), with their clearance
  holes in the back plate;
- the worm's shaft and its two supports (the blocks) after the plate-crossing shafts' own;
- the worm's clearance check: the worm (its thread's and its shaft's envelopes) and the blocks
  against every rod, every moving part's sweep and every plate of the assembly, each an
  upright prism over its z range.  The worm against its wheel is the designed mesh and is not an
  overlap (the wheel's teeth are the worm's own envelope, :mod:`gearcad.geometry.worm_wheel`); a
  screw in its own block is a designed fit.

Pure; mm.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..meshes.checks import Finding
from .hardware import FRAME, Rod, ShaftSupport, screw_length

__all__ = ["finish_worm", "worm_solids", "ENGAGEMENT"]

#: Thread engagement of a block's screw, in screw diameters: 1.5 d in a tapped plastic or aluminium part
#: (common practice).
ENGAGEMENT = 1.5


def worm_solids(worm) -> list[tuple[str, np.ndarray, float, float]]:
    """The worm's parts as upright prisms: (name, footprint corners (4, 2), z0, z1), mm."""
    from .worm_stage import footprint

    p = worm.pair
    r_a1, r_s = p.tip_diameter / 2, worm.shaft_diameter / 2
    thread = footprint(worm.x, worm.y, worm.direction, -worm.thread / 2, worm.thread / 2, r_a1)
    shaft = footprint(worm.x, worm.y, worm.direction, -worm.shaft_end, worm.shaft_end, r_s)
    out = [("worm", thread, worm.z - r_a1, worm.z + r_a1), ("worm", shaft, worm.z - r_s, worm.z + r_s)]
    for b in worm.blocks:
        u = (b.x - worm.x) * math.cos(worm.direction) + (b.y - worm.y) * math.sin(worm.direction)
        out.append((b.name, footprint(worm.x, worm.y, worm.direction, u - b.length / 2, u + b.length / 2, b.width / 2),
                    0.0, b.height))
    return out


def _depth_circle(rect: np.ndarray, x: float, y: float, r: float) -> float:
    """How far a circle (x, y, r) reaches into a rectangle (4, 2); <= 0: apart (minus the gap), mm."""
    from shapely.geometry import Point, Polygon

    poly, point = Polygon(rect), Point(x, y)
    inside = poly.contains(point)
    d = poly.exterior.distance(point)
    return r + d if inside else r - d


def _overlaps(plan, worm) -> tuple[list[tuple[str, str, float]], float]:
    """Overlaps of the worm's parts with the rest of the assembly, and the least gap found, mm."""
    from shapely.geometry import Polygon

    mech = plan.mechanism
    t = plan.spec.thickness
    found, least = [], math.inf
    blocks = {b.name for b in worm.blocks}
    for name, rect, z0, z1 in worm_solids(worm):
        def meets(a0: float, a1: float) -> bool:
            return min(z1, a1) - max(z0, a0) > 1e-9

        for r in mech.rods:
            if not meets(r.z0, r.z1) or (name in r.supports and r.kind == "screw"):
                continue
            depth = _depth_circle(rect, r.x, r.y, r.diameter / 2)
            least = min(least, -depth)
            if depth > 1e-6:
                found.append((name, r.name, depth))
        for s in mech.sweeps:
            if not meets(s.z0, s.z1) or (name == "worm" and s.name == worm.wheel):
                continue  # the worm in its wheel: the designed mesh
            depth = _depth_circle(rect, s.x, s.y, s.outer)
            least = min(least, -depth)
            if depth > 1e-6:
                found.append((name, s.name, depth))
        for p in plan.plates:
            if not meets(p.z, p.z + t) or p.name in blocks:
                continue
            poly = Polygon(p.part.outer.points())
            if p.name in FRAME:
                continue  # the room lies between the frame plates by the z stack (checked below)
            depth = poly.intersection(Polygon(rect)).area
            if depth > 1e-9:
                found.append((name, p.name, math.sqrt(depth)))
    back = next(p for p in plan.plates if p.name == "back-plate")
    front = next(p for p in plan.plates if p.name == "front-plate")
    for name, _, z0, z1 in worm_solids(worm):
        if z0 < back.z + t - 1e-9:
            found.append((name, back.name, back.z + t - z0))
        if z1 > front.z + 1e-9:
            found.append((name, front.name, z1 - front.z))
    return found, least


def _screws(plan, worm) -> list[Rod]:
    back = next(p for p in plan.plates if p.name == "back-plate")
    t = plan.spec.thickness
    length = screw_length(t + ENGAGEMENT * worm.screw_diameter)
    rods = []
    for b in worm.blocks:
        for k, (x, y) in enumerate(b.screws, start=1):
            rods.append(Rod(f"{b.name}-screw-{k}", "screw", x, y, worm.screw_diameter, 0.0, back.z, back.z + length,
                            ("back-plate", b.name), thread=worm.screw))
    return rods


def finish_worm(plan):
    """The plan with the worm's screws, their holes, the worm shaft's supports and the worm's clearance check."""
    from .epicyclic import kerf_cut
    from .plan import PlannedPlate

    worm, mech, fab = plan.worm, plan.mechanism, plan.fabrication
    screws = _screws(plan, worm)
    plates = []
    for p in plan.plates:
        if p.name == "back-plate":
            holes = p.part.circles + tuple((r.x, r.y, fab.spacer_hole) for r in screws)
            part = dataclasses.replace(p.part, circles=holes)
            p = PlannedPlate(p.name, part, kerf_cut(part, fab, plan.tolerance), p.z)
        plates.append(p)
    inner = min(abs((b.x - worm.x) * math.cos(worm.direction) + (b.y - worm.y) * math.sin(worm.direction))
                - b.length / 2 for b in worm.blocks)
    support = ShaftSupport("worm", "arbor", tuple(b.name for b in worm.blocks), 2 * worm.shaft_end, 2 * inner)
    mech = dataclasses.replace(mech, shafts=mech.shafts + (support,), rods=mech.rods + tuple(screws))
    plan = dataclasses.replace(plan, plates=tuple(plates), mechanism=mech)
    found, least = _overlaps(plan, worm)
    if found:
        findings = tuple(Finding("worm clearance", "failure", depth, 0.0,
                                 f"{a} and {b} overlap by {depth:.3f} mm") for a, b, depth in found)
    else:
        findings = (Finding("worm clearance", "ok", least, 0.0,
                            f"the worm and its blocks clear every other part (least gap {least:.2f} mm); the worm in "
                            "its wheel is the designed mesh, each block's screws are designed fits"),)
    mech = dataclasses.replace(mech, findings=mech.findings + findings, overlaps=mech.overlaps + tuple(found),
                               solids=mech.solids + 1 + len(worm.blocks) + len(screws))
    return dataclasses.replace(plan, mechanism=mech, findings=plan.findings + findings)
