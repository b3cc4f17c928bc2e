"""The frame: pillars clear of every sweep, a fixed ring's bolts, and the frame plates with every hole.

Pure.  Four pillars stand near the plate's corners, each outside every moving part's sweep and
every bridge by the fabrication profile's gear clearance (the plate grows to the right and up
where none fits); a fixed ring is bolted through sleeves outside the planets' sweep; the frame
plates get a hole for every rod that crosses them, and no hole may lie nearer a plate's edge than
its own diameter.  Lengths in mm.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from ..geometry.shape import Part, rounded_rectangle
from .hardware import EDGE_RULE, FRAME
from .rods import Work, add_pillar
from .sweeps import clear_of_sweeps, gear_top, near_outline

__all__ = ["frame_pillars", "ring_bolts", "finish_frame_plates", "check_edges"]


def _corner_offset(hole: float, radius: float, pillar: float) -> float:
    """Distance of a corner pillar's centre from both edges: its hole one diameter from the straight edges and the arc."""
    need = max(EDGE_RULE * hole + hole / 2, pillar / 2)
    if need >= radius:
        return need
    # The corner arc (centre (r, r)) must stay ``need`` from the hole's centre (a, a): r - sqrt(2) (r - a) >= need.
    return max(need, radius - (radius - need) / math.sqrt(2))


def frame_pillars(w: Work, width: float, height: float) -> tuple[float, float]:
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
                add_pillar(w, f"pillar-{k}", x, y, z0, z1, FRAME)
            return width, height
        width, height = width + 1.0, height + 1.0  # grow to the right and up (the shafts keep their coordinates)
    raise InputError("no place for the frame pillars outside every sweep: use a larger plate_margin in the "
                     "fabrication profile or a smaller spacer_hole")


def _pillar_clear(w: Work, x: float, y: float, d: float, z0: float, z1: float, fixed) -> bool:
    if clear_of_sweeps(x, y, d / 2, z0, z1, w.sweeps, w.margin) < 0:
        return False
    for br in w.bridges:  # a frame pillar passes the bridges' height
        if min(z1, br.z + w.t) - max(z0, br.z) > 1e-9 and near_outline(br.part.outer.points(), np.array([x, y]),
                                                                          d / 2 + w.margin):
            return False
    return all(math.hypot(x - r.x, y - r.y) >= r.diameter / 2 + d / 2 + w.margin
               for r in fixed if min(z1, r.z1) - max(z0, r.z0) > 1e-9)


def ring_bolts(w: Work) -> None:
    """A fixed ring's bolts: a sleeve under and over the ring on one through screw, outside the planets' sweep."""
    plan = w.plan
    ring = next((g for g in plan.gears if g.role == "ring"), None)
    if ring is None or plan.spec.planetary is None or plan.spec.planetary.fixed != "ring":
        return
    s = plan.shafts[ring.shaft]
    top = gear_top(ring, w.t)
    for k, (bx, by, _) in enumerate(ring.part.circles, start=1):
        c, si = math.cos(ring.rotation), math.sin(ring.rotation)
        x, y = s.x + bx * c - by * si, s.y + bx * si + by * c
        lo, hi = w.back_z, w.front_z + w.t
        # One screw (with its washer and nut) through both sleeves.
        add_pillar(w, f"ring-bolt-{k}-lower", x, y, w.back_z + w.t, ring.z, ("back-plate", "ring"), (lo, hi), screw=None)
        add_pillar(w, f"ring-bolt-{k}-upper", x, y, top, w.front_z, ("ring", "front-plate"), (lo, hi),
                   screw=f"ring-bolt-{k}")


def _frame_holes(w: Work, z: float) -> tuple[tuple[float, float, float], ...]:
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


def finish_frame_plates(w: Work, width: float, height: float) -> list:
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


def check_edges(plates, tolerance: float = 1e-6) -> None:
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
