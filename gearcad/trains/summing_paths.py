"""A summing train's two paths and the working state while its plan is assembled.

Pure.  Each path runs from the input shaft to a gear on the differential axle, directly or
through an idler; the axle's distance from the input comes from the direct paths' centre
distances or, when both paths carry idlers, from the least distance that clears.  The build
state collects gears, meshes and findings for :mod:`.differential` and the differentials
(:mod:`.differential_mean`, :mod:`.differential_planetary`).  Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..meshes.checks import analyse_pair
from .epicyclic import kerf_cut, toothed_parts
from ..errors import InputError
from ..geometry.gear import SpurGear
from ..geometry.shape import Part
from .layout import mesh_phase
from ..meshes.pair import make_pair
from .plan import PlannedMesh
from ..profiles import Fabrication
from .spec import GearSpec, StageSpec, TrainSpec

__all__ = ["MAX_IDLER", "TUBE_WALL", "SummingPath", "make_path", "axis_distance", "idler_position", "PlacedGear",
           "SummingBuild", "place_path_gears", "bore_of"]

MAX_IDLER = 400  # teeth; our limit: a longer reach wants a closer axle, not a larger idler
TUBE_WALL = 0.5  # wall of the tubes joining each side's gears on the axle, mm (telescoping brass tube); common practice


@dataclass(frozen=True)
class SummingPath:
    """One path's gears (driver, [idler,] driven) with the pairs between them."""

    name: str
    gears: tuple[tuple[str, SpurGear, GearSpec], ...]
    pairs: tuple  # GearPair, one per mesh along the path

    @property
    def shafts(self) -> list[str]:
        """The shaft of each gear: the input, the idler's (if any), the axle."""
        return ["input"] + ([f"idler-{self.name}"] if len(self.pairs) == 2 else []) + ["axle"]


def make_path(name: str, stage: StageSpec, module: float, system, fab: Fabrication) -> SummingPath:
    specs = [("driver", stage.driver)] + ([("idler", stage.idler)] if stage.idler else []) + [("driven", stage.driven)]
    m = stage.module or module
    pairs = tuple(make_pair(g1.teeth, g2.teeth, m, system, shifts=(g1.shift, g2.shift), backlash=fab.backlash)
                  for (_, g1), (_, g2) in zip(specs, specs[1:]))
    gears = [pairs[0].gear1] + [p.gear2 for p in pairs]
    return SummingPath(name, tuple((f"{name}-{role}", g, s) for (role, s), g in zip(specs, gears)), pairs)


def _least_idler(path: SummingPath, distance: float) -> int:
    """Fewest idler teeth that reach ``distance`` (reference centre distances, mm)."""
    (_, driver, _), (_, driven, _) = path.gears[0], path.gears[-1]
    m = driver.module
    return math.floor((2 * distance / m - driver.teeth - driven.teeth) / 2) + 1


def axis_distance(spec: TrainSpec, paths: tuple[SummingPath, SummingPath], room: float) -> tuple[float, str]:
    """Input shaft to differential axle, mm, and how it was set."""
    direct = [(p.name, p.pairs[0].centre_distance) for p in paths if len(p.pairs) == 1]
    given = spec.summing.axis_distance
    if len(direct) == 2 and abs(direct[0][1] - direct[1][1]) > 1e-6:
        raise InputError(f"path a reaches the differential axle at {direct[0][1]:.4f} mm, path b at {direct[1][1]:.4f} mm: "
                         "without idlers both paths need one centre distance (equal tooth sums, or profile shifts that "
                         "make them equal), or give one path an idler")
    if direct:
        name, distance = direct[0]
        if given is not None and abs(given - distance) > 1e-6:
            raise InputError(f"summing axis_distance {given!r} mm disagrees with path {name}'s centre distance "
                             f"{distance:.4f} mm; leave it out")
        return distance, f"set by path {name}'s centre distance"
    least = max(room, *(_tip_gap_distance(p) for p in paths))
    if given is not None:
        return given, "given in the train file"
    return math.ceil(least * 2 - 1e-9) / 2, "both paths carry idlers: the least distance that clears, rounded up to 0.5 mm"


def _tip_gap_distance(path: SummingPath) -> float:
    """Least axle distance at which a path's driver and driven tips keep a module apart, mm."""
    (_, driver, _), (_, driven, _) = path.gears[0], path.gears[-1]
    return (driver.tip_diameter + driven.tip_diameter) / 2 + driver.module


def idler_position(path: SummingPath, distance: float, side: int) -> np.ndarray:
    """The idler's centre (input at the origin, axle on +x), on the ``side`` (+1 above, -1 below), mm."""
    d1, d2 = path.pairs[0].centre_distance, path.pairs[1].centre_distance
    if not abs(d1 - d2) < distance < d1 + d2:
        least = _least_idler(path, distance)
        if least > MAX_IDLER:
            raise InputError(f"no idler of up to {MAX_IDLER} teeth lets path {path.name} reach the differential axle "
                             f"{distance:.3f} mm from the input: bring the axle closer (axis_distance)")
        raise InputError(f"path {path.name}'s idler of {path.gears[1][1].teeth} teeth cannot reach the differential axle "
                         f"{distance:.3f} mm from the input ({d1:.3f} + {d2:.3f} mm): give it at least {least} teeth")
    x = (distance ** 2 + d1 ** 2 - d2 ** 2) / (2 * distance)
    return np.array([x, side * math.sqrt(max(d1 ** 2 - x ** 2, 0.0))])


@dataclass
class PlacedGear:
    """A gear of the plan while it is assembled (see :class:`gearcad.trains.plan.PlannedGear`)."""

    name: str
    role: str
    stage: int
    gear: object  # SpurGear or RingGear
    spec: GearSpec
    shaft: str  # shaft key
    layer: int
    bore: float
    part: Part
    cut: Part
    rotation: float
    label_at: tuple[float, float] | None = None


@dataclass
class SummingBuild:
    """Working state while the plan is assembled."""

    spec: TrainSpec
    fab: Fabrication
    tolerance: float
    gears: list  # PlacedGear
    meshes: list
    findings: list
    positions: dict  # shaft key -> (x, y), mm: the layout's frame, then (planet pins) the plate's
    bores: dict  # shaft key -> diameter, mm
    tube: float = 0.0  # outer diameter of the side tubes on the axle, mm

    def add_gear(self, name, role, stage, gear, gspec, shaft, layer, bore, rotation, part=None, label_at=None) -> None:
        if part is None:
            part, cut = toothed_parts(name, gear, bore, self.fab, self.tolerance)
        else:
            cut = kerf_cut(part, self.fab, self.tolerance)
        self.gears.append(PlacedGear(name, role, stage, gear, gspec, shaft, layer, bore, part, cut, rotation, label_at))


def place_path_gears(build: SummingBuild, paths, placed: dict, top: int) -> None:
    """The path gears in their layers, each phased to mesh the one before it."""
    for path, layer in zip(paths, (0, top)):
        shafts = path.shafts
        rotation = 0.0
        for k, ((name, gear, gspec), shaft) in enumerate(zip(path.gears, shafts)):
            if k:
                _, prev_gear, _ = path.gears[k - 1]
                dx, dy = placed[shaft] - placed[shafts[k - 1]]
                rotation = mesh_phase(rotation, prev_gear.teeth, gear.teeth, math.atan2(dy, dx))
            role = name.split("-")[1]
            if name == "b-driven" and build.spec.summing.differential == "planetary":
                continue  # the ring's outside teeth: the differential adds the ring, phased to its planets
            build.add_gear(name, role, 1 if path.name == "a" else 2, gear, gspec, shaft, layer,
                           bore_of(build, shaft), rotation)
        for (n1, _, _), (n2, _, _), pair in zip(path.gears, path.gears[1:], path.pairs):
            if n2 == "b-driven" and build.spec.summing.differential == "planetary":
                n2 = "ring"
            build.meshes.append(PlannedMesh((n1, n2), pair, analyse_pair(pair), ()))


def bore_of(build: SummingBuild, shaft: str) -> float:
    return build.tube if shaft == "axle" else build.spec.bore
