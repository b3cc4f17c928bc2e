"""The whole assembly checked for interference, analytically on the plan's solids.

Pure numpy.  Every solid of the assembly is one of two shapes over a range of z:

- a *rod* (shaft, pipe, spacer, pillar, screw, dowel): an annulus (outer and inner radius);
- a *flat* part: a gear (its tip circle as placed, its bore and pin holes), a ring (an
  annulus from its tip circle to its rim) or a plate, bridge or carrier (its outline polygon
  and its round holes).

A fused compound (two gears printed as one part with a hub between them) is one solid of
the assembly: its gears and its hub are pieces of that part, never checked against each other.

Two solids that share some z interfere when their material overlaps in the plane, except at
designed fits: a rod inside a hole or a pipe (nested annuli), and meshing gears (their teeth
are checked by the mesh checks).  Rods that stay put (pillars, screws) are also checked
against the sweep of every moving part (planets' orbits plus their tip radius, carriers).
Lengths in mm.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..meshes.checks import Finding

__all__ = ["Solid", "AssemblyCheck", "check_assembly", "solids_of"]

TOL = 1e-6  # mm


@dataclass(frozen=True)
class Solid:
    """One solid: ``rod`` (annulus ``outer``/``inner`` about (x, y)) or ``flat`` (``polygon`` or a disc, with ``holes``)."""

    name: str
    kind: str  # rod | gear | ring | plate
    x: float
    y: float
    outer: float
    inner: float
    z0: float
    z1: float
    holes: tuple[tuple[float, float, float], ...] = ()  # (x, y, radius) in plate coordinates
    polygon: np.ndarray | None = None
    part: str = ""  # the made part it belongs to when that part is more than one piece (a fused compound)


@dataclass(frozen=True)
class AssemblyCheck:
    """The solids checked and the overlaps found (``(a, b, depth mm)``), empty when clean."""

    solids: int
    overlaps: tuple[tuple[str, str, float], ...]

    def findings(self) -> list[Finding]:
        """One failure per overlap, or one ``ok`` finding."""
        if not self.overlaps:
            return [Finding("assembly interference", "ok", 0.0, 0.0,
                            f"no two of the {self.solids} solids of the assembly overlap but at designed fits")]
        return [Finding("assembly interference", "failure", depth, 0.0,
                        f"{a} and {b} overlap by {depth:.3f} mm in the assembly") for a, b, depth in self.overlaps]


def _placed_circles(g, shaft) -> tuple[tuple[float, float, float], ...]:
    c, s = math.cos(g.rotation), math.sin(g.rotation)
    out = [(shaft.x + x * c - y * s, shaft.y + x * s + y * c, d / 2) for x, y, d in g.part.circles]
    for h in g.part.holes:  # shaped bores (D-flat, keyway): the circle through their farthest point
        r = float(np.hypot(*h.points().T).max())
        out.append((shaft.x, shaft.y, r))
    return tuple(out)


def _inscribed(loop) -> tuple[float, float, float]:
    """A circle inside an inner contour (a spacer ring's bore): about its centroid, to its nearest point, mm."""
    pts = loop.points()
    c = pts.mean(axis=0)
    return float(c[0]), float(c[1]), float(np.hypot(*(pts - c).T).min())


def solids_of(plan, mechanism) -> list[Solid]:
    """Every solid of the assembly as placed."""
    t = plan.spec.thickness
    out = []
    for g in plan.gears:
        s = plan.shafts[g.shaft]
        top = g.z + t + g.hub_length
        if g.role == "ring":
            rim = getattr(g.gear, "outer_diameter", g.gear.tip_diameter) / 2
            out.append(Solid(g.name, "ring", s.x, s.y, rim, g.gear.tip_diameter / 2, g.z, g.z + t,
                             _placed_circles(g, s)[: len(g.part.circles)]))
            continue
        out.append(Solid(g.name, "gear", s.x, s.y, g.gear.tip_diameter / 2, 0.0, g.z, top, _placed_circles(g, s)))
    for p in plan.plates:
        pts = p.part.outer.points()
        holes = tuple((x, y, d / 2) for x, y, d in p.part.circles) + tuple(_inscribed(h) for h in p.part.holes)
        out.append(Solid(p.name, "plate", 0.0, 0.0, 0.0, 0.0, p.z, p.z + t, holes, pts))
    for r in mechanism.rods:
        out.append(Solid(r.name, "rod", r.x, r.y, r.diameter / 2, r.bore / 2, r.z0, r.z1))
    return _fused(plan, mechanism, out)


def _fused(plan, mechanism, solids: list[Solid]) -> list[Solid]:
    """The gears of each fused compound and its hub as pieces of one part (one solid of the assembly)."""
    for j in getattr(mechanism, "joins", ()):
        if j.hub is None:
            continue
        solids = [dataclasses.replace(s, part=j.file) if s.name in j.gears else s for s in solids]
        d, hole, z0, z1 = j.hub
        if z1 - z0 > TOL:
            s = plan.shafts[plan.gear(j.gears[0]).shaft]
            solids.append(Solid(f"{j.file} hub", "gear", s.x, s.y, d / 2, hole / 2, z0, z1, part=j.file))
    return solids


def _inside_hole(x: float, y: float, r: float, holes) -> bool:
    return any(math.hypot(x - hx, y - hy) + r <= hr + TOL for hx, hy, hr in holes)


def _polygon_gap(poly: np.ndarray, x: float, y: float) -> tuple[bool, float]:
    """Whether (x, y) lies inside the polygon, and its distance to the boundary, mm."""
    a, b = poly, np.roll(poly, -1, axis=0)
    ab = b - a
    k = np.clip(np.einsum("ij,ij->i", np.array([x, y]) - a, ab) / np.einsum("ij,ij->i", ab, ab), 0, 1)
    dist = float(np.min(np.hypot(x - (a[:, 0] + k * ab[:, 0]), y - (a[:, 1] + k * ab[:, 1]))))
    crosses = ((a[:, 1] > y) != (b[:, 1] > y)) & (x < a[:, 0] + (y - a[:, 1]) * ab[:, 0] / np.where(ab[:, 1] == 0, 1, ab[:, 1]))
    return bool(np.count_nonzero(crosses) % 2), dist


def _round_vs_round(a: Solid, b: Solid) -> float:
    """Overlap depth (mm, > 0: they overlap) of two annuli."""
    d = math.hypot(a.x - b.x, a.y - b.y)
    depth = a.outer + b.outer - d
    if depth <= TOL:
        return 0.0
    if d + a.outer <= b.inner + TOL or d + b.outer <= a.inner + TOL:
        return 0.0  # one inside the other's hole
    if _inside_hole(a.x, a.y, a.outer, b.holes) or _inside_hole(b.x, b.y, b.outer, a.holes):
        return 0.0
    return depth


def _round_vs_plate(a: Solid, p: Solid) -> float:
    if _inside_hole(a.x, a.y, a.outer, p.holes):
        return 0.0
    inside, dist = _polygon_gap(p.polygon, a.x, a.y)
    if not inside and dist >= a.outer - TOL:
        return 0.0
    if inside and a.inner > 0 and dist + a.inner >= 0:  # a ring around a small plate: inside its hole
        far = float(np.max(np.hypot(p.polygon[:, 0] - a.x, p.polygon[:, 1] - a.y)))
        if far <= a.inner + TOL:
            return 0.0
    return a.outer - dist if not inside else a.outer + dist


def _plate_vs_plate(a: Solid, b: Solid) -> float:
    """1 when an outline point of one plate lies in the other's material (inside its outline, outside its round holes:
    a carrier disc turning inside a spacer ring is clear), else 0."""
    if _outlines_cross(a.polygon, b.polygon):  # two bars crossing like an X: no vertex of either inside the other
        return 1.0
    for p, q in ((a, b), (b, a)):
        if any(_polygon_gap(q.polygon, x, y)[0] and not _inside_hole(x, y, 0.0, q.holes) for x, y in p.polygon[::3]):
            return 1.0
    return 0.0


def _outlines_cross(p: np.ndarray, q: np.ndarray) -> bool:
    """Whether an edge of outline ``p`` properly crosses an edge of outline ``q`` (orientation test, every pair)."""
    a, b = p[:, None, :], np.roll(p, -1, axis=0)[:, None, :]
    c, d = q[None, :, :], np.roll(q, -1, axis=0)[None, :, :]

    def orient(u, v, w):
        return (v[..., 0] - u[..., 0]) * (w[..., 1] - u[..., 1]) - (v[..., 1] - u[..., 1]) * (w[..., 0] - u[..., 0])

    return bool(np.any((orient(a, b, c) * orient(a, b, d) < -TOL) & (orient(c, d, a) * orient(c, d, b) < -TOL)))


def _meshing(plan) -> set[frozenset[str]]:
    pairs = {frozenset(m.names) for m in plan.meshes}
    # The plan lists one planet's meshes; every planet meshes like it.
    planets = [g.name for g in plan.gears if g.role == "planet"]
    suns = [g.name for g in plan.gears if g.role in ("sun", "ring")]
    for p in planets:
        for s in suns:
            pairs.add(frozenset((p, s)))
    for i, p in enumerate(planets):  # planet pairs of a spur differential
        for q in planets[i + 1:]:
            pairs.add(frozenset((p, q)))
    return pairs


def check_assembly(plan, mechanism) -> AssemblyCheck:
    """Every pair of solids that share some z and overlap in the plane beyond a designed fit; fixed rods against sweeps."""
    solids = solids_of(plan, mechanism)
    meshing = _meshing(plan)
    found: list[tuple[str, str, float]] = []
    for i, a in enumerate(solids):
        for b in solids[i + 1:]:
            if min(a.z1, b.z1) - max(a.z0, b.z0) <= TOL or (a.part and a.part == b.part):
                continue
            if a.kind == b.kind == "plate":
                depth = _plate_vs_plate(a, b)
            elif a.kind == "plate" or b.kind == "plate":
                p, r = (a, b) if a.kind == "plate" else (b, a)
                depth = _round_vs_plate(r, p)
            else:
                if a.kind != "rod" and b.kind != "rod" and frozenset((a.name, b.name)) in meshing:
                    continue
                depth = _round_vs_round(a, b)
            if depth > TOL:
                found.append((a.name, b.name, depth))
    for r in mechanism.rods:
        if r.kind not in ("pillar", "screw"):
            continue
        for w in mechanism.sweeps:
            if min(r.z1, w.z1) - max(r.z0, w.z0) <= TOL:
                continue
            d = math.hypot(r.x - w.x, r.y - w.y)
            depth = min(w.outer + r.diameter / 2 - d, d + r.diameter / 2 - w.inner if w.inner > 0 else math.inf)
            if depth > TOL:
                found.append((r.name, f"the sweep of {w.name}", depth))
    pieces = sum(1 for s in solids if not s.part) + len({s.part for s in solids if s.part})  # a fused part is one
    return AssemblyCheck(pieces, tuple(dict.fromkeys(found)))
