"""The best train of each kind for one target, and the room each takes: ``gearcad ratio --kind any``.

For a target and one set of tooth limits, :func:`best_of_kinds` finds

* the best compound train of 1 to 4 stages (those whose reach holds the target),
  ranked as ``gearcad ratio`` ranks (:func:`gearcad.ratio.listing.distinct_trains`),
* the best planetary set, simple and stepped, with 2 to 6 planets (ring fixed;
  the sun drives for a target at most 1, the carrier above; or the members the
  caller names),
* the best summing train (two one-stage paths into a mean differential, both
  paths on one axle, as ``gearcad build`` needs),

each with its error, its teeth and its **envelope**: the diameter of the
smallest circle holding the train seen along its shafts, at module 1.  The
envelope is a plain figure a user can compare across kinds; it is derived from
the geometry each kind is built with, not from a rule of thumb:

* compound: the shafts placed by the same layout search ``gearcad build`` runs
  (:func:`gearcad.trains.layout.solve_layout`, every mesh at its reference centre
  distance, no clearance, no margin, shafts of no size), and every gear's tip
  circle (reference tip ``z/2 + h_a``) on its shaft: the smallest circle holding
  those circles.  The layout minimises its plate's rectangle, so this is the
  circle of the layout a build would use, not a separate optimum;
* planetary: the ring's outside (root circle ``z_r/2 + h_f`` plus the rim of
  :data:`gearcad.geometry.internal.RIM_FACTOR` tooth depths, as the ring is
  drawn), the sun's tip circle and each planet's tip circles at the centre
  distance and angles of the set's conditions: the smallest circle holding them
  (the ring, unless a stepped planet's sun-side gear sweeps beyond it);
* summing: the input shaft at the origin and the differential axle at the axis
  distance on +x (the layout summing trains are built with), each path's tip
  circles, an idler (the fewest teeth that span its gap, at the meeting point of
  its two mesh circles, on whichever side gives the smaller circle), and the
  differential as its outside circle on the axle (the mean differential of
  :func:`gearcad.trains.differential.axle_room` at module 1, bore 3 mm).

Shifts are left out of the tip circles (a few tenths of a module at most), so
the envelope is the reference one.  Every search is bounded (stage counts
only where the reach holds the target, one result each).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from ..geometry.enclosing import enclosing_circle

__all__ = ["KindBest", "best_of_kinds", "compound_circles", "planetary_circles", "summing_circles",
           "envelope_diameter", "other_kinds_note", "PLANET_COUNTS", "KIND_NAMES"]

#: The planet counts the planetary kind is searched with.
PLANET_COUNTS = (2, 3, 4, 5, 6)
KIND_NAMES = ("compound", "planetary", "summing")
_ADDENDUM, _DEDENDUM = 1.0, 1.25  # ISO 53 profile A, modules (replaced by the tooth system's when given)


@dataclass(frozen=True)
class KindBest:
    """The best train of one kind: ``best`` is a compound Train, a PlanetaryResult or a SummingTrain (or None)."""

    kind: str
    best: Any
    envelope_diameter: float | None

    @property
    def error(self) -> float | None:
        """|relative error| of the best, or None."""
        return None if self.best is None else abs(float(self.best.relative_error))


# -- placed circles at module 1 ------------------------------------------------------------------------------

def compound_circles(train: Any, addendum: float = _ADDENDUM) -> tuple[np.ndarray, np.ndarray]:
    """Centres (N, 2) and tip radii (N,) of a compound train's gears as the layout places them (module 1)."""
    from .layout import Link, LayoutGear, LayoutProblem, solve_layout

    gears, links, meshes = [], [], []
    last = len(train.stages) - 1
    shaft = 0
    for k, (driver, driven) in enumerate(train.stages):
        chain = [driver, train.idler, driven] if (train.idler is not None and k == last) else [driver, driven]
        for i, teeth in enumerate(chain):
            if i:
                shaft += 1
                links.append(Link(shaft - 1, shaft, (chain[i - 1] + teeth) / 2))
                meshes.append(frozenset((len(gears) - 1, len(gears))))
            gears.append(LayoutGear(f"g{len(gears)}", shaft, k, teeth / 2 + addendum))
    problem = LayoutProblem(tuple(0.0 for _ in range(shaft + 1)), tuple(gears), tuple(links), frozenset(meshes),
                            0.0, 0.0)
    layout = solve_layout(problem)
    centres = np.array([layout.positions[g.shaft] for g in gears], dtype=float)
    return centres, np.array([g.tip_radius for g in gears])


def planetary_circles(result: Any, addendum: float = _ADDENDUM, dedendum: float = _DEDENDUM) -> tuple[np.ndarray, np.ndarray]:
    """Centres and radii of a planetary set at module 1: the ring's outside, the sun, every planet gear."""
    from ..geometry.internal import RIM_FACTOR

    s, c = result.set, result.conditions
    centres = [(0.0, 0.0), (0.0, 0.0)]
    radii = [s.ring / 2 + dedendum + RIM_FACTOR * (addendum + dedendum), s.sun / 2 + addendum]
    for angle in c.angles:
        at = (c.centre_distance * math.cos(angle), c.centre_distance * math.sin(angle))
        for teeth in {s.planet, s.ring_planet}:
            centres.append(at)
            radii.append(teeth / 2 + addendum)
    return np.array(centres), np.array(radii)


def _idler_at(distance: float, driver: int, driven: int, least: int, side: float) -> tuple[float, int, np.ndarray]:
    """Fewest idler teeth spanning ``distance`` from the input (origin) to the axle (+x), and its centre."""
    teeth = max(least, math.ceil(distance - (driver + driven) / 2 - 1e-9))
    r1, r2 = (driver + teeth) / 2, (teeth + driven) / 2
    x = (distance ** 2 + r1 ** 2 - r2 ** 2) / (2 * distance)
    y = side * math.sqrt(max(r1 ** 2 - x ** 2, 0.0))
    return teeth / 2, teeth, np.array([x, y])


def summing_circles(train: Any, least_teeth: int, differential_radius: float, min_axis: int = 0,
                    addendum: float = _ADDENDUM, sides: tuple[float, float] = (1.0, -1.0)) -> tuple[np.ndarray, np.ndarray]:
    """Centres and radii of a summing train at module 1 (input at the origin, axle on +x).

    ``sides`` puts path A's and path B's idler above (+1) or below (-1) the line of the shafts.
    """
    axis = train.axis_teeth
    if axis is None:  # both paths carry idlers: the axle as near as their tips clear by a module
        axis = max(min_axis, *(sum(p) + 6 for p in (train.path_a, train.path_b)))
    distance = axis / 2
    centres: list[Any] = [(distance, 0.0)]
    radii = [differential_radius]
    for (driver, driven), sign, side in ((train.path_a, train.sign_a, sides[0]), (train.path_b, train.sign_b, sides[1])):
        centres += [(0.0, 0.0), (distance, 0.0)]
        radii += [driver / 2 + addendum, driven / 2 + addendum]
        if sign > 0:
            radius, _, at = _idler_at(distance, driver, driven, least_teeth, side)
            centres.append(tuple(at))
            radii.append(radius + addendum)
    return np.array(centres, dtype=float), np.array(radii)


def envelope_diameter(centres: np.ndarray, radii: np.ndarray) -> float:
    """Diameter of the smallest circle holding the circles."""
    return 2 * enclosing_circle(centres, radii)[2]


# -- the searches ----------------------------------------------------------------------------------------------

def _best_compound(target: Any, limits: Any, judge: Any) -> Any:
    from ..ratio.limits import MAX_STAGES
    from ..ratio.listing import distinct_trains
    from ..ratio.reach import reach_of
    from ..ratio.solve import RatioQuery

    counts = tuple(k for k in range(1, MAX_STAGES + 1) if reach_of(limits, (k,)).holds(target.approx))
    if not counts:
        return None
    found = distinct_trains(RatioQuery(target, counts, limits, 1), judge)
    return found[0] if found else None


def _best_planetary(target: Any, limits: Any, arrangement: Any, max_ring: Any, margin: float, system: Any) -> Any:
    from ..errors import GearcadError
    from ..ratio.planetary import make_query, solve_planetary
    from ..ratio.planetary_set import make_arrangement

    if arrangement is None:
        arrangement = make_arrangement("ring", "sun" if target.value <= 1 else "carrier")
    best = None
    for stepped in (False, True):
        for planets in PLANET_COUNTS:
            try:
                query = make_query(target, limits, arrangement, planets, stepped, max_ring, None, margin, 1,
                                   system.pressure_angle, system.addendum)
                found = solve_planetary(query)
            except GearcadError:  # e.g. no ring fits these planets within the limits
                continue
            if found and (best is None or _rank(found[0]) < _rank(best)):
                best = found[0]
    return best


def _rank(result: Any) -> tuple:
    from fractions import Fraction

    return abs(Fraction(result.relative_error)), result.total_teeth


def _best_summing(target: Any, limits: Any, max_ring: Any, margin: float, planets: int = 3) -> tuple[Any, int]:
    from ..ratio.summing import solve_summing
    from .differential import axle_room
    from .spec import SummingSpec

    min_axis = math.ceil(2 * axle_room(SummingSpec("mean", planets=planets), 1.0) - 1e-9)
    found = solve_summing(target, sorted(limits.teeth), "mean", 1, float(limits.max_stage_ratio), max_ring or 200,
                          planets, margin, one_axis=True, min_axis=min_axis)
    return (found[0] if found else None), min_axis


def _mean_differential_radius(planets: int = 3) -> float:
    """Outside radius (module 1, bore 3 mm) of the default mean differential."""
    from ..profiles import load_fabrication
    from .differential import axle_room
    from .spec import SummingSpec

    return axle_room(SummingSpec("mean", planets=planets), 1.0) - 3.0 / 2 - load_fabrication("laser-3mm-acrylic").gear_clearance


def best_of_kinds(target: Any, limits: Any, *, kinds: Sequence[str] = KIND_NAMES, arrangement: Any = None,
                  max_ring_teeth: Any = None, margin: float = 0.5, judge: Any = None) -> list[KindBest]:
    """The best train of each kind in ``kinds`` with its envelope diameter at module 1 (see the module notes)."""
    from ..profiles import load_tooth_system

    system = load_tooth_system("iso53-a")
    ha, hf = system.addendum, system.dedendum
    out = []
    for kind in kinds:
        if kind == "compound":
            best = _best_compound(target, limits, judge)
            size = None if best is None else envelope_diameter(*compound_circles(best, ha))
        elif kind == "planetary":
            best = _best_planetary(target, limits, arrangement, max_ring_teeth, margin, system)
            size = None if best is None else envelope_diameter(*planetary_circles(best, ha, hf))
        elif kind == "summing":
            best, min_axis = _best_summing(target, limits, max_ring_teeth, margin)
            size = None
            if best is not None:
                radius = _mean_differential_radius()
                size = min(envelope_diameter(*summing_circles(best, min(limits.teeth), radius, min_axis, ha, sides))
                           for sides in ((1.0, -1.0), (1.0, 1.0)))
        else:
            raise ValueError(f"unknown kind {kind!r}")
        out.append(KindBest(kind, best, size))
    return out


def other_kinds_note(target: Any, limits: Any, chosen: str, chosen_error: float | None, tolerance: float,
                     **options: Any) -> str:
    """One line when another kind meets ``tolerance`` where the chosen kind's best does not; else empty.

    Only the other kinds are searched, each for its single best (bounded as in :func:`best_of_kinds`).
    """
    if chosen_error is not None and chosen_error <= tolerance:
        return ""
    others = [k for k in KIND_NAMES if k != chosen]
    better = [b for b in best_of_kinds(target, limits, kinds=others, **options)
              if b.best is not None and b.error is not None and b.error <= tolerance]
    if not better:
        return ""
    head = ("no " + chosen + " train" if chosen_error is None else
            f"the best {chosen} train is {chosen_error:.2e} off")
    ways = [f"--kind {b.kind} reaches {b.error:.2e} with {b.best.total_teeth} teeth" for b in better]
    return f"{head}; within the same tooth limits " + " and ".join(ways) + f" (tolerance {tolerance:g}; see --kind any)"
