"""The space each moving part of a plan sweeps, and how far a fixed part keeps from it.

Pure.  A gear sweeps its tip circle over its layer (its hub above it), a planet whose carrier
turns sweeps an annulus about the set's axis (its orbit plus and minus its tip radius), a turning
ring its rim, a carrier disc its outline's circle, a compound shaft's dowel pins or fused hub the
room between its gears.  Pillars, bridges and bolts keep the
fabrication profile's gear clearance from every sweep they meet in z.  Lengths in mm.
"""

from __future__ import annotations

import math

import numpy as np

from .hardware import FRAME, Sweep

__all__ = ["gear_top", "sweeps_of", "clear_of_sweeps", "near_outline"]


def gear_top(g, thickness: float) -> float:
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


def sweeps_of(plan) -> list[Sweep]:
    t = plan.spec.thickness
    out = []
    centre = _centre_of(plan)
    orbit = _carrier_turns(plan)
    for g in plan.gears:
        s = plan.shafts[g.shaft]
        top = gear_top(g, t)
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
    out += _joins(plan, t)
    for p in plan.plates:
        if p.name in FRAME or p.name.startswith("bridge-"):
            continue
        pts = p.part.outer.points()
        c = pts.mean(axis=0)
        out.append(Sweep(p.name, float(c[0]), float(c[1]), float(np.hypot(*(pts - c).T).max()), 0.0, p.z, p.z + t))
    return out


def _joins(plan, t: float) -> list[Sweep]:
    """Between the gears of a compound shaft (a compound train's): its dowel pins or fused hub turn there, inside
    the smaller gear's rim (``MIN_RIM`` modules below its root circle; the joins are placed later, in that room)."""
    if plan.spec.planetary is not None or plan.spec.summing is not None:
        return []
    from .plan import MIN_RIM

    out = []
    for i, s in enumerate(plan.shafts):
        gears = [g for g in plan.gears if g.shaft == i and g.role not in ("ring", "planet")]
        if len(gears) < 2:
            continue
        z0 = min(gear_top(g, t) for g in gears)
        z1 = max(g.z for g in gears)
        if z1 - z0 > 1e-9:
            reach = min(g.gear.root_diameter / 2 - MIN_RIM * g.gear.module for g in gears)
            out.append(Sweep(f"{s.name}-join", s.x, s.y, reach, 0.0, z0, z1))
    return out


def clear_of_sweeps(x: float, y: float, r: float, z0: float, z1: float, sweeps, margin: float) -> float:
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


def near_outline(pts: np.ndarray, p: np.ndarray, reach: float) -> bool:
    """Whether point ``p`` lies inside the closed outline ``pts`` or within ``reach`` of its edge, mm."""
    a, b = pts, np.roll(pts, -1, axis=0)
    ab = b - a
    k = np.clip(np.einsum("ij,ij->i", p - a, ab) / np.einsum("ij,ij->i", ab, ab), 0, 1)
    if float(np.min(np.hypot(*(p - (a + k[:, None] * ab)).T))) < reach:
        return True
    crosses = ((a[:, 1] > p[1]) != (b[:, 1] > p[1])) & (
        p[0] < a[:, 0] + (p[1] - a[:, 1]) * ab[:, 0] / np.where(ab[:, 1] == 0, 1, ab[:, 1]))
    return bool(np.count_nonzero(crosses) % 2)
