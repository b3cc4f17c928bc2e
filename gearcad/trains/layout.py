"""Shaft layout: place every shaft in the plane so the train meshes and nothing collides.

The shafts of a compound train form a chain: each mesh fixes the distance
between two shafts (its centre distance) and leaves the direction free.  The
search picks the turn at every shaft that gives the smallest plate:

1. a grid over the free turns (5° with up to two free turns, 10° with three, and
   coordinate descent from the best grid points with four or more), every
   candidate checked against the clearance rules and scored by the area of the
   smallest rectangle (over the plate's own rotation, sampled every 3°) that
   holds every tip circle plus the margin;
2. the best candidates refined by halving the step down to 0.01°.

Rules: gears of one layer that do not mesh keep their tip circles
``clearance`` apart; a shaft runs through its own gears' layers and on to both
plates (every arbor held at its two ends, the first rule of a movement; common
practice), and keeps ``clearance`` from the tip circle of every gear in the
layers it passes.  Only where no placement lets every shaft reach both plates
does the search accept a shaft that reaches one plate: the plan then holds its
other end in a bridge (``gearcad.trains.supports``), and the search ranks the
placements with fewer such shafts first.  Other placements (``alternative``)
are there for a planner whose best placement leaves a stud.  Coaxial shafts
coincide.
Pure numpy; lengths in mm, angles in radians.
"""

from __future__ import annotations

import dataclasses
import functools
import itertools
import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError

__all__ = ["LayoutGear", "Link", "LayoutProblem", "Layout", "solve_layout", "mesh_phase", "shaft_sides",
           "clearance_shortfall", "fit_plate"]

ROTATIONS = np.radians(np.arange(0.0, 90.0, 3.0))
ONE_PLATE = 1e9  # mm²: the score of a shaft that reaches one plate only, above any plate's area (a ranking key)
ALTERNATIVES = 6  # other placements a planner may ask for
SPREAD = math.radians(30.0)  # alternatives start from grid points this far apart in some turn at least


@dataclass(frozen=True)
class LayoutGear:
    """A gear as the layout sees it: its shaft, layer and tip radius (mm)."""

    name: str
    shaft: int
    layer: int
    tip_radius: float


@dataclass(frozen=True)
class Link:
    """Shaft ``child`` sits ``distance`` (mm) from shaft ``parent`` (a mesh's centre distance)."""

    parent: int
    child: int
    distance: float


@dataclass(frozen=True)
class LayoutProblem:
    """What must be placed: shafts (radii, mm), gears, links in placing order, meshing gear pairs."""

    shaft_radii: tuple[float, ...]
    gears: tuple[LayoutGear, ...]
    links: tuple[Link, ...]
    meshes: frozenset[frozenset[int]]
    clearance: float
    margin: float
    coaxial: tuple[int, int] | None = None
    both_plates: bool = True  # every shaft must reach both plates (False: one plate, the other end in a bridge)


@dataclass(frozen=True)
class Layout:
    """Shaft positions (S, 2) in plate coordinates (mm, the plate's lower-left corner at 0, 0) and the plate size."""

    positions: np.ndarray
    width: float
    height: float
    search: str
    both_plates: bool = True  # the rule the placement keeps: every shaft reaches both plates (False: one, and a bridge)

    @property
    def area(self) -> float:
        """Plate area (rectangle, before corner rounding), mm²."""
        return self.width * self.height


def _positions(problem: LayoutProblem, turns: np.ndarray) -> np.ndarray:
    """Shaft positions for turn angles (K, L-1) -> (K, S, 2); the first link points along +x."""
    k = turns.shape[0]
    pos = np.zeros((k, len(problem.shaft_radii), 2))
    heading = np.zeros(k)
    for i, link in enumerate(problem.links):
        if i:
            heading = heading + turns[:, i - 1]
        pos[:, link.child] = pos[:, link.parent] + link.distance * np.column_stack((np.cos(heading), np.sin(heading)))
    return pos


def _shaft_gaps(problem: LayoutProblem, pos: np.ndarray, shaft: int, layers: set[int]) -> np.ndarray:
    """Largest shortfall (mm) between ``shaft`` and the gears of ``layers`` on other shafts."""
    worst = np.full(pos.shape[0], -np.inf)
    coax = set(problem.coaxial or ())
    radius = problem.shaft_radii[shaft]
    for g in problem.gears:
        if g.layer not in layers or g.shaft == shaft or {g.shaft, shaft} <= coax:
            continue
        d = np.linalg.norm(pos[:, shaft] - pos[:, g.shaft], axis=1)
        worst = np.maximum(worst, g.tip_radius + radius + problem.clearance - d)
    return worst


def _shaft_layers(problem: LayoutProblem, shaft: int) -> tuple[int, int]:
    own = [g.layer for g in problem.gears if g.shaft == shaft]
    return min(own), max(own)


def shaft_sides(problem: LayoutProblem, pos: np.ndarray) -> list[tuple[bool, bool]]:
    """For one placement (S, 2): can each shaft reach the back plate, the front plate, without piercing a gear."""
    top = max(g.layer for g in problem.gears)
    sides = []
    for s in range(len(problem.shaft_radii)):
        lo, hi = _shaft_layers(problem, s)
        back = _shaft_gaps(problem, pos[None], s, set(range(0, lo)))[0] <= 1e-9
        front = _shaft_gaps(problem, pos[None], s, set(range(hi + 1, top + 1)))[0] <= 1e-9
        sides.append((bool(back), bool(front)))
    return sides


def _violation(problem: LayoutProblem, pos: np.ndarray) -> np.ndarray:
    """Largest clearance shortfall of each candidate (<= 0: every rule kept), mm.

    A shaft runs through the layers of its own gears and on to one plate at least
    (back, behind layer 0, or front, before the top layer): it must clear the
    gears of the layers it passes.
    """
    worst = np.full(pos.shape[0], -np.inf)
    gears = problem.gears
    coax = set(problem.coaxial or ())
    for i, j in itertools.combinations(range(len(gears)), 2):
        gi, gj = gears[i], gears[j]
        if gi.layer != gj.layer or gi.shaft == gj.shaft or frozenset((i, j)) in problem.meshes:
            continue
        if {gi.shaft, gj.shaft} <= coax:
            continue
        d = np.linalg.norm(pos[:, gi.shaft] - pos[:, gj.shaft], axis=1)
        worst = np.maximum(worst, gi.tip_radius + gj.tip_radius + problem.clearance - d)
    top = max(g.layer for g in gears)
    for s in range(len(problem.shaft_radii)):
        lo, hi = _shaft_layers(problem, s)
        worst = np.maximum(worst, _shaft_gaps(problem, pos, s, set(range(lo, hi + 1))))
        back = _shaft_gaps(problem, pos, s, set(range(0, lo)))
        front = _shaft_gaps(problem, pos, s, set(range(hi + 1, top + 1)))
        worst = np.maximum(worst, np.maximum(back, front) if problem.both_plates else np.minimum(back, front))
    return worst


def _plate(problem: LayoutProblem, pos: np.ndarray, rotations: np.ndarray = ROTATIONS) -> tuple[np.ndarray, np.ndarray]:
    """Least rectangle area over the sampled rotations, and the rotation that gives it, per candidate."""
    centres = pos[:, [g.shaft for g in problem.gears]]  # (K, G, 2)
    radii = np.array([g.tip_radius for g in problem.gears]) + problem.margin
    c, s = np.cos(rotations), np.sin(rotations)
    x = centres[..., 0, None] * c - centres[..., 1, None] * s  # (K, G, R)
    y = centres[..., 0, None] * s + centres[..., 1, None] * c
    r = radii[None, :, None]
    width = (x + r).max(axis=1) - (x - r).min(axis=1)
    height = (y + r).max(axis=1) - (y - r).min(axis=1)
    area = width * height
    best = area.argmin(axis=1)
    return area[np.arange(len(area)), best], rotations[best]


def _one_plate(problem: LayoutProblem, pos: np.ndarray) -> np.ndarray:
    """How many shafts of each candidate reach one plate only (their other end wants a bridge, or a stud)."""
    top = max(g.layer for g in problem.gears)
    count = np.zeros(pos.shape[0])
    for s in range(len(problem.shaft_radii)):
        lo, hi = _shaft_layers(problem, s)
        back = _shaft_gaps(problem, pos, s, set(range(0, lo))) <= 1e-9
        front = _shaft_gaps(problem, pos, s, set(range(hi + 1, top + 1))) <= 1e-9
        count += ~(back & front)
    return count


def _score(problem: LayoutProblem, turns: np.ndarray) -> np.ndarray:
    """The plate's area of each candidate (inf where a rule fails); where shafts may reach one plate, fewer such
    shafts first (each costs ``ONE_PLATE`` mm², more than any plate), then the area."""
    pos = _positions(problem, turns)
    area, _ = _plate(problem, pos)
    if not problem.both_plates:
        area = area + ONE_PLATE * _one_plate(problem, pos)
    return np.where(_violation(problem, pos) <= 1e-9, area, np.inf)


def _grid(free: int) -> np.ndarray:
    if free == 0:
        return np.zeros((1, 0))
    step = {0: 1.0, 1: 5.0, 2: 5.0, 3: 10.0}.get(free, 15.0)
    values = np.radians(np.arange(-180.0, 180.0, step))
    if free <= 3:
        return np.array(list(itertools.product(values, repeat=free))).reshape(-1, free)
    rng = np.random.default_rng(12345)  # fixed seed: the same train always gets the same layout
    return rng.choice(values, size=(20000, free))


def _refine(problem: LayoutProblem, start: np.ndarray, fixed: np.ndarray) -> tuple[np.ndarray, float]:
    best, best_score = start.copy(), float(_score(problem, _with_fixed(start[None], fixed))[0])
    step = math.radians(5.0)
    while step > math.radians(0.01):
        improved = False
        for i in range(len(best)):
            trial = np.repeat(best[None], 2, axis=0)
            trial[0, i] += step
            trial[1, i] -= step
            scores = _score(problem, _with_fixed(trial, fixed))
            k = int(np.argmin(scores))
            if scores[k] < best_score - 1e-12:
                best, best_score, improved = trial[k], float(scores[k]), True
        if not improved:
            step /= 2
    return best, best_score


def _with_fixed(turns: np.ndarray, fixed: np.ndarray) -> np.ndarray:
    """Insert the coaxial (fixed) turns among the free ones: ``fixed`` holds NaN where a turn is free."""
    out = np.repeat(fixed[None], turns.shape[0], axis=0)
    out[:, np.isnan(fixed)] = turns
    return out


def _fixed_turns(problem: LayoutProblem) -> np.ndarray:
    fixed = np.full(max(len(problem.links) - 1, 0), np.nan)
    if problem.coaxial is None:
        return fixed
    if len(problem.links) != 2 or abs(problem.links[0].distance - problem.links[1].distance) > 1e-6:
        raise InputError("a coaxial train needs exactly two stages with equal centre distances "
                         f"(got {', '.join(f'{l.distance:.4f}' for l in problem.links)} mm)")
    fixed[0] = math.pi
    return fixed


def solve_layout(problem: LayoutProblem, alternative: int = 0) -> Layout | None:
    """Place the shafts for the smallest plate; raise :class:`InputError` when no placement keeps the rules.

    ``alternative`` k > 0: the k-th other placement, refined from a grid point at least ``SPREAD`` away in some
    turn from those before it (a planner tries them where the best one leaves a shaft on a stud); ``None`` when
    there are no more.
    """
    found = _candidates(problem, ALTERNATIVES if alternative else 0)
    if alternative >= len(found):
        return None
    problem, pos, free = found[alternative]
    fine = np.radians(np.arange(0.0, 90.0, 0.05))
    _, rotation = _plate(problem, pos[None], fine)
    return _place_on_plate(problem, pos, float(rotation[0]), free)


@functools.lru_cache(maxsize=8)
def _candidates(problem: LayoutProblem, wanted: int) -> list[tuple[LayoutProblem, np.ndarray, int]]:
    """The best placement and up to ``wanted`` distinct others: (the problem whose rules they keep, positions, free)."""
    fixed = _fixed_turns(problem)
    free = int(np.isnan(fixed).sum())
    grid = _grid(free)
    scores = _score(problem, _with_fixed(grid, fixed))
    if not np.isfinite(scores).any() and problem.both_plates:
        # No placement reaches both plates with every shaft: accept one plate and a bridge for the other end.
        problem = dataclasses.replace(problem, both_plates=False)
        scores = _score(problem, _with_fixed(grid, fixed))
    if not np.isfinite(scores).any():
        shortfall = float(_violation(problem, _positions(problem, _with_fixed(grid[:1], fixed))).min())
        raise InputError(f"no shaft layout keeps every gear clear (short by {shortfall:.2f} mm at best): "
                         "a gear on one shaft is larger than the distance to a shaft it passes; "
                         "change the tooth counts or use fewer stages")
    finite = int(np.isfinite(scores).sum())
    order = np.argsort(scores)[: min(8, finite)]
    best_turns, best_score = grid[order[0]], float(scores[order[0]])
    for k in order if free else []:
        turns, score = _refine(problem, grid[k], fixed)
        if score < best_score:
            best_turns, best_score = turns, score
    chosen = [best_turns]
    if free and wanted:
        seeds = [grid[order[0]]]
        for k in np.argsort(scores)[:finite]:
            if len(chosen) > wanted:
                break
            if min(float(np.abs(_wrap(grid[k] - q)).max()) for q in seeds) < SPREAD:
                continue
            seeds.append(grid[k])
            turns, _ = _refine(problem, grid[k], fixed)
            shape = _shape(_positions(problem, _with_fixed(turns[None], fixed))[0])
            if all(np.abs(shape - _shape(_positions(problem, _with_fixed(q[None], fixed))[0])).max() > 1e-3
                   for q in chosen):  # not the same placement, nor its mirror image
                chosen.append(turns)
    return [(problem, _positions(problem, _with_fixed(t[None], fixed))[0], free) for t in chosen]


def _shape(pos: np.ndarray) -> np.ndarray:
    """A placement's distances between every two shafts, in order: equal for placements equal up to a rigid motion
    or a mirror image (which hold their shafts alike), mm."""
    d = pos[:, None, :] - pos[None, :, :]
    return np.hypot(d[..., 0], d[..., 1])


def _wrap(angles: np.ndarray) -> np.ndarray:
    return (angles + math.pi) % (2 * math.pi) - math.pi


def clearance_shortfall(problem: LayoutProblem, positions: np.ndarray) -> float:
    """Largest shortfall (mm) against the clearance rules for one placement (S, 2); <= 0 when every rule is kept."""
    return float(_violation(problem, np.asarray(positions, dtype=float)[None])[0])


def fit_plate(problem: LayoutProblem, positions: np.ndarray, search: str) -> Layout:
    """The plate around a fixed placement (S, 2): shafts moved to plate coordinates, turned landscape if need be."""
    placed = _place_on_plate(problem, np.asarray(positions, dtype=float), 0.0, 0)
    return Layout(placed.positions, placed.width, placed.height, search)


def _place_on_plate(problem: LayoutProblem, pos: np.ndarray, rotation: float, free: int) -> Layout:
    c, s = math.cos(rotation), math.sin(rotation)
    turned = pos @ np.array([[c, -s], [s, c]]).T
    centres = turned[[g.shaft for g in problem.gears]]
    radii = np.array([g.tip_radius for g in problem.gears]) + problem.margin
    low = (centres - radii[:, None]).min(axis=0)
    high = (centres + radii[:, None]).max(axis=0)
    width, height = high - low
    if height > width:  # landscape plates: turn a quarter
        turned = np.column_stack((turned[:, 1], -turned[:, 0]))
        return _place_on_plate(problem, turned, 0.0, free)
    how = (f"grid search over {free} free shaft turn(s), then refinement to 0.01 deg; plate rotation sampled every 0.05 deg"
           if free else "no free turns (coaxial or single stage)")
    how += ("; every shaft reaches both plates" if problem.both_plates
            else "; no placement lets every shaft reach both plates: blocked ends go to bridges")
    return Layout(turned - low, float(width), float(height), how, problem.both_plates)


def mesh_phase(driver_rotation: float, driver_teeth: int, driven_teeth: int, direction: float) -> float:
    """Rotation (radians) of a driven gear so that its teeth sit in the driver's spaces.

    Gears are drawn with tooth 0 on their +x axis.  ``direction`` is the angle of the
    line from the driver's centre to the driven gear's.  With a driver tooth on that
    line the driven gear must show a space back along it (``direction + pi``), i.e.
    its tooth 0 half a pitch beside it; turning the driver by ``d`` turns the driven
    gear by ``-d z1 / z2`` (they roll on their pitch circles).
    """
    offset = driver_rotation - direction
    return direction + math.pi + math.pi / driven_teeth - offset * driver_teeth / driven_teeth
