"""The plan of a summing train: two paths from one input shaft into a differential on one axle.

Pure.  The input shaft carries path A's driver (layer 0) and path B's driver
(the top layer); each path meshes directly, or through an idler, with a gear on
the differential axle, ``axis_distance`` from the input.  The axle is fixed in
both plates; each side's gears ride on it, joined by a tube; the carrier turns
on it and is the output.

- ``mean`` (a spur differential): layers 0 path A; 1 lower carrier disc; 2
  sun A and the ``a`` planets; 3 the ``a`` and ``b`` planets in mesh; 4 the ``b``
  planets and sun B; 5 upper carrier disc; 6 path B.  Each planet is two layers
  thick (two laminations on one pin), so an ``a`` planet meshes sun A and its
  ``b`` mate but never sun B.  The carrier turns at the mean of the suns.
- ``planetary``: layers 0 path A; 1 a web bonded under the ring (it rides on
  sun A's tube); 2 a spacer ring bonded between web and ring, and inside it the
  lower carrier disc; 3 sun, planets and ring, whose outside teeth are path B's
  driven gear; 4 the upper carrier disc.  Each planet pin is held at both ends,
  in the two carrier discs (as in :mod:`.epicyclic`); the pins join the discs.

Lengths in mm, angles in radians.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..meshes.checks import Finding, analyse_pair
from .epicyclic import kerf_cut, ring_phase, same_phase, toothed_parts
from ..errors import InputError
from ..geometry.gear import SpurGear
from ..geometry.internal import ring_loop
from ..geometry.shape import Part, circle_loop, gear_loop
from ..meshes.internal import analyse_internal_pair, make_internal_pair
from ..ratio.kinematics import Gear, Mesh, direction_of, make_network, network_ratio
from .layout import LayoutGear, LayoutProblem, clearance_shortfall, fit_plate, mesh_phase, shaft_sides
from ..meshes.pair import make_pair
from .plan import (MIN_RIM, InputLoad, Plan, PlannedGear, PlannedMesh, PlannedPlate, PlannedShaft, _check_bore, _system,
                   frame_plates)
from ..ratio.planetary_set import check_set, make_set
from ..profiles import Fabrication, load_fabrication
from ..ratio.summing import summing_ratio
from .spec import GearSpec, StageSpec, SummingSpec, TrainSpec

__all__ = ["plan_summing", "mean_assembles", "axle_room", "TUBE_WALL"]

MAX_IDLER = 400  # teeth; our limit: a longer reach wants a closer axle, not a larger idler
TUBE_WALL = 0.5  # wall of the tubes joining each side's gears on the axle, mm (telescoping brass tube); common practice


def mean_assembles(sun: int, pairs: int) -> bool:
    """Whether ``pairs`` equally spaced planet pairs assemble between two equal ``sun``-tooth suns.

    Carrying pair 1 round to pair 2's place with sun A held turns the carrier by
    ``2 pi / N`` and sun B by ``4 pi / N`` (the carrier turns at the mean of the
    suns), so pair 2's place takes the same sun B only if ``4 pi / N`` is whole
    pitches of sun B: ``2 z_s / N`` whole (derived here; the plan checks it again
    by phasing every mesh).
    """
    return (2 * sun) % pairs == 0


@dataclass(frozen=True)
class _Frame:
    """What a differential needs of its train (a :class:`TrainSpec` serves as well)."""

    summing: SummingSpec
    module: float
    bore: float
    name: str = ""


def axle_room(summing: SummingSpec, module: float, bore: float = 3.0, tooth_system: str = "iso53-a",
              fabrication: str = "laser-3mm-acrylic") -> float:
    """Least distance (mm) from the input shaft to the differential axle at which the shaft clears the differential."""
    from ..profiles import load_tooth_system

    if summing.differential != "mean":
        return 0.0
    fab = load_fabrication(fabrication)
    tube = summing.tube if summing.tube is not None else bore + 2 * TUBE_WALL
    return _MeanDifferential(_Frame(summing, module, bore), load_tooth_system(tooth_system), fab, tube).room()


@dataclass(frozen=True)
class _Path:
    """One path's gears (driver, [idler,] driven) with the pairs between them."""

    name: str
    gears: tuple[tuple[str, SpurGear, GearSpec], ...]
    pairs: tuple  # GearPair, one per mesh along the path

    @property
    def shafts(self) -> list[str]:
        """The shaft of each gear: the input, the idler's (if any), the axle."""
        return ["input"] + ([f"idler-{self.name}"] if len(self.pairs) == 2 else []) + ["axle"]


def _path(name: str, stage: StageSpec, module: float, system, fab: Fabrication) -> _Path:
    specs = [("driver", stage.driver)] + ([("idler", stage.idler)] if stage.idler else []) + [("driven", stage.driven)]
    m = stage.module or module
    pairs = tuple(make_pair(g1.teeth, g2.teeth, m, system, shifts=(g1.shift, g2.shift), backlash=fab.backlash)
                  for (_, g1), (_, g2) in zip(specs, specs[1:]))
    gears = [pairs[0].gear1] + [p.gear2 for p in pairs]
    return _Path(name, tuple((f"{name}-{role}", g, s) for (role, s), g in zip(specs, gears)), pairs)


def _least_idler(path: _Path, distance: float) -> int:
    """Fewest idler teeth that reach ``distance`` (reference centre distances, mm)."""
    (_, driver, _), (_, driven, _) = path.gears[0], path.gears[-1]
    m = driver.module
    return math.floor((2 * distance / m - driver.teeth - driven.teeth) / 2) + 1


def _axis_distance(spec: TrainSpec, paths: tuple[_Path, _Path], room: float) -> tuple[float, str]:
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


def _tip_gap_distance(path: _Path) -> float:
    """Least axle distance at which a path's driver and driven tips keep a module apart, mm."""
    (_, driver, _), (_, driven, _) = path.gears[0], path.gears[-1]
    return (driver.tip_diameter + driven.tip_diameter) / 2 + driver.module


def _idler_position(path: _Path, distance: float, side: int) -> np.ndarray:
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
class _Placed:
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
class _Build:
    """Working state while the plan is assembled."""

    spec: TrainSpec
    fab: Fabrication
    tolerance: float
    gears: list  # _Placed
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
        self.gears.append(_Placed(name, role, stage, gear, gspec, shaft, layer, bore, part, cut, rotation, label_at))


def plan_summing(spec: TrainSpec, tolerance: float, load: InputLoad | None = None) -> Plan:
    """Plan the summing train described by ``spec.summing`` and its two stages (path A, path B)."""
    system = _system(spec)
    fab = load_fabrication(spec.fabrication)
    ss = spec.summing
    tube = ss.tube if ss.tube is not None else spec.bore + 2 * TUBE_WALL
    if tube <= spec.bore:
        raise InputError(f"summing tube must be wider than the bore {spec.bore:g} mm, got {tube!r}")
    paths = (_path("a", spec.stages[0], spec.module, system, fab), _path("b", spec.stages[1], spec.module, system, fab))
    build = _Build(spec, fab, tolerance, [], [], [], {"input": np.zeros(2)},
                   {"input": spec.bore, "axle": spec.bore, "idler-a": spec.bore, "idler-b": spec.bore}, tube)
    diff = _MeanDifferential(spec, system, fab, tube) if ss.differential == "mean" else _PlanetaryDifferential(spec, system, fab, tube, paths[1])
    distance, how = _axis_distance(spec, paths, diff.room())
    build.positions["axle"] = np.array([distance, 0.0])
    build.findings.append(Finding("one axle", "ok", distance, distance,
                                  f"both paths reach the differential axle {distance:.4f} mm from the input shaft ({how})"))
    top = diff.top_layer
    with_idler = [p for p in paths if len(p.pairs) == 2]
    layouts = []
    for sides in itertools.product((1, -1), repeat=len(with_idler)):  # each idler above or below the line
        trial = dict(build.positions)
        for path, side in zip(with_idler, sides):
            trial[f"idler-{path.name}"] = _idler_position(path, distance, side)
        problem, keys = _layout_problem(paths, trial, diff, build.bores, fab, top)
        pos = np.array([trial[k] for k in keys])
        shortfall = clearance_shortfall(problem, pos)
        one_sided = sum(not (back and front) for back, front in shaft_sides(problem, pos))
        layouts.append((shortfall > 1e-9, one_sided, _extent(problem, pos), shortfall, problem, keys, pos))
    layouts.sort(key=lambda t: t[:3])
    bad, _, _, shortfall, problem, keys, pos = layouts[0]
    if bad:
        raise InputError(f"the differential and the paths' gears do not clear each other (short by {shortfall:.2f} mm): "
                         "the input shaft passes the differential, so the axle must be farther from it: use a smaller "
                         "differential module, fewer differential teeth, or larger path gears")
    layout = fit_plate(problem, pos, "fixed by the paths: input shaft and differential axle on one line, idlers where their "
                                     "two meshes meet (the side giving the smaller plate)")
    placed = {k: layout.positions[i] for i, k in enumerate(keys)}
    sides = dict(zip(keys, shaft_sides(problem, layout.positions)))
    _path_gears(build, paths, placed, top)
    diff.add(build, placed["axle"], placed["input"], paths)
    return _finish(build, spec, system, fab, layout, placed, sides, keys, diff, paths, tolerance, top, load)


def _extent(problem: LayoutProblem, pos: np.ndarray) -> float:
    centres = pos[[g.shaft for g in problem.gears]]
    radii = np.array([g.tip_radius for g in problem.gears]) + problem.margin
    size = (centres + radii[:, None]).max(axis=0) - (centres - radii[:, None]).min(axis=0)
    return float(size[0] * size[1])


def _layout_problem(paths, positions: dict, diff, bores: dict, fab: Fabrication, top: int):
    """The shafts (input, axle, idlers), the path gears and the differential's envelope in its layers."""
    keys = [k for k in ("input", "axle", "idler-a", "idler-b") if k in positions]
    index = {k: i for i, k in enumerate(keys)}
    gears, meshes = [], set()
    for path, layer in zip(paths, (0, top)):
        start = len(gears)
        for (name, gear, _), shaft in zip(path.gears, path.shafts):
            gears.append(LayoutGear(name, index[shaft], layer, gear.tip_diameter / 2))
        meshes |= {frozenset((start + k, start + k + 1)) for k in range(len(path.pairs))}
    for layer, radius in diff.envelope():
        gears.append(LayoutGear(f"differential-{layer}", index["axle"], layer, radius))
    radii = tuple(bores[k] / 2 for k in keys)
    # One plate at least is the rule here (the loop is fixed by construction); the choice of idler sides prefers the
    # placements that let more shafts reach both plates (see plan_summing).
    return LayoutProblem(radii, tuple(gears), (), frozenset(meshes), fab.gear_clearance, fab.plate_margin,
                         both_plates=False), keys


def _path_gears(build: _Build, paths, placed: dict, top: int) -> None:
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
                           _bore_of(build, shaft), rotation)
        for (n1, _, _), (n2, _, _), pair in zip(path.gears, path.gears[1:], path.pairs):
            if n2 == "b-driven" and build.spec.summing.differential == "planetary":
                n2 = "ring"
            build.meshes.append(PlannedMesh((n1, n2), pair, analyse_pair(pair), ()))


def _bore_of(build: _Build, shaft: str) -> float:
    return build.tube if shaft == "axle" else build.spec.bore


class _MeanDifferential:
    """A spur differential: suns A and B, pairs of planets, two carrier discs."""

    kind = "mean"
    top_layer = 6

    def __init__(self, spec: TrainSpec, system, fab: Fabrication, tube: float) -> None:
        from ..meshes.shifts import balanced_shifts, thinning_shift

        ss = spec.summing
        self.spec, self.fab, self.tube, self.m = spec, fab, tube, ss.module or spec.module
        if ss.planets < 1:
            raise InputError(f"a mean differential needs at least 1 pair of planets, got {ss.planets!r}")
        if not mean_assembles(ss.sun, ss.planets):
            raise InputError(f"{ss.planets} planet pairs cannot be spaced equally between suns of {ss.sun} teeth: "
                             f"2 x sun teeth / pairs must be whole (2 x {ss.sun} / {ss.planets} is not); "
                             "change sun or planets")
        x_s, x_p = balanced_shifts(ss.sun, ss.planet, system, thinning_shift(fab.backlash, self.m, system))
        self.sun_pair = make_pair(ss.sun, ss.planet, self.m, system, shifts=(x_s, x_p), backlash=fab.backlash)
        self.planet_pair = make_pair(ss.planet, ss.planet, self.m, system, shifts=(x_p, x_p), backlash=fab.backlash)
        self.radius = self.sun_pair.centre_distance
        chord = self.planet_pair.centre_distance
        if chord >= 2 * self.radius:
            raise InputError(f"planets of {ss.planet} teeth are too large for suns of {ss.sun} teeth: a planet pair "
                             "cannot mesh across the sun; use larger suns or smaller planets")
        self.spread = 2 * math.asin(chord / (2 * self.radius))  # angle between an a planet and its b mate
        self.pin = spec.bore
        self.sun, self.planet = self.sun_pair.gear1, self.sun_pair.gear2
        # The pin holes at least their own diameter from the disc's edge (gearcad.trains.supports.EDGE_RULE).
        self.carrier_radius = self.radius + max(self.pin / 2 + max(2.0, 2 * self.m), 1.5 * (self.pin + fab.bore_clearance))

    def room(self) -> float:
        """Least axle distance at which the input shaft clears the differential, mm."""
        return self.outside_radius() + self.spec.bore / 2 + self.fab.gear_clearance

    def outside_radius(self) -> float:
        return max(self.radius + self.planet.tip_diameter / 2, self.carrier_radius)

    def envelope(self):
        reach = self.radius + self.planet.tip_diameter / 2
        return [(1, self.carrier_radius), (2, reach), (3, reach), (4, reach), (5, self.carrier_radius)]

    def add(self, build: _Build, axle: np.ndarray, input_at: np.ndarray, paths) -> None:
        ss = self.spec.summing
        _check_bore("sun-a", self.sun, GearSpec(ss.sun), self.tube)
        _check_bore("planet", self.planet, GearSpec(ss.planet), self.pin)
        base = math.atan2(*(input_at - axle)[::-1]) + math.pi / ss.planets  # pairs straddle away from the input
        angles = [base + 2 * math.pi * k / ss.planets for k in range(ss.planets)]
        sun_b_phase, pins, gears = [], [], []
        for k, theta in enumerate(angles, start=1):
            pa = axle + self.radius * np.array([math.cos(theta), math.sin(theta)])
            pb = axle + self.radius * np.array([math.cos(theta + self.spread), math.sin(theta + self.spread)])
            rot_a = mesh_phase(0.0, ss.sun, ss.planet, theta)
            rot_b = mesh_phase(rot_a, ss.planet, ss.planet, math.atan2(*(pb - pa)[::-1]))
            sun_b_phase.append(mesh_phase(rot_b, ss.planet, ss.sun, math.atan2(*(axle - pb)[::-1])))
            for tag, centre, rot, layers in ((f"{k}a", pa, rot_a, (2, 3)), (f"{k}b", pb, rot_b, (3, 4))):
                key = f"pin-{tag}"
                build.positions[key] = centre
                build.bores[key] = self.pin
                pins.append((key, centre))
                for n, layer in enumerate(layers, start=1):
                    gears.append((f"planet-{tag}-{n}", key, layer, rot, centre))
        if not same_phase(sun_b_phase, ss.sun):  # the closed-form rule passed, so this would be a fault of the phasing
            raise InputError("the planet pairs do not all mesh sun B at one position: the assembly condition fails")
        gspec_s = GearSpec(ss.sun, self.sun.shift)
        gspec_p = GearSpec(ss.planet, self.planet.shift)
        build.add_gear("sun-a", "sun", 0, self.sun, gspec_s, "axle", 2, self.tube, 0.0)
        for name, key, layer, rot, _ in gears:
            build.add_gear(name, "planet", 0, self.planet, gspec_p, key, layer, self.pin, rot)
        build.add_gear("sun-b", "sun", 0, self.sun, gspec_s, "axle", 4, self.tube, sun_b_phase[0])
        build.meshes += [PlannedMesh(("sun-a", "planet-1a-1"), self.sun_pair, analyse_pair(self.sun_pair), ()),
                         PlannedMesh(("planet-1a-2", "planet-1b-1"), self.planet_pair, analyse_pair(self.planet_pair), ()),
                         PlannedMesh(("sun-b", "planet-1b-2"), self.sun_pair, analyse_pair(self.sun_pair), ())]
        build.findings += [
            Finding("assembly", "ok", 2 * ss.sun / ss.planets, 0.0,
                    f"{ss.planets} equally spaced planet pairs: 2 x {ss.sun} sun teeth / {ss.planets} = "
                    f"{2 * ss.sun // ss.planets}, whole; every mesh phased and checked"),
            *self._clearances(axle, gears, pins),
            Finding("assembly notes", "ok", self.tube, self.spec.bore,
                    f"sun a and path a's driven gear are fixed to one {self.tube:g} mm tube, sun b and path b's driven "
                    f"gear to another, both free on the {self.spec.bore:g} mm axle; each carrier disc rides on its tube; "
                    "each planet is two laminations (-1, -2) fixed together on its pin")]
        self.pins = pins

    def _clearances(self, axle, gears, pins) -> list[Finding]:
        """Tip gaps between planets that do not mesh, and pins against the gears of the layers they pass."""
        tip_p, tip_s = self.planet.tip_diameter / 2, self.sun.tip_diameter / 2
        clearance = self.fab.gear_clearance
        circles = [(n, c, layer, tip_p) for n, _, layer, _, c in gears]
        circles += [("sun-a", axle, 2, tip_s), ("sun-b", axle, 4, tip_s)]
        worst_tip, worst_pin = math.inf, math.inf
        for i, (n1, c1, l1, r1) in enumerate(circles):
            for n2, c2, l2, r2 in circles[i + 1:]:
                if l1 != l2 or _meshing(n1, n2):
                    continue
                worst_tip = min(worst_tip, float(np.hypot(*(c1 - c2))) - r1 - r2)
        for key, centre in pins:
            tag = key[4:]
            for n, c, layer, r in circles:
                own = n.startswith(f"planet-{tag}-")
                if not own and 1 <= layer <= 5 and not np.allclose(c, centre):
                    worst_pin = min(worst_pin, float(np.hypot(*(c - centre))) - r - self.pin / 2)
        axle_gap = self.radius - tip_p - self.spec.bore / 2  # layer 3 holds only the axle at the centre
        neighbour = (Finding("neighbour", "ok", math.inf, clearance, "one planet pair: no neighbours")
                     if math.isinf(worst_tip) else
                     Finding("neighbour", "ok" if worst_tip >= clearance else "failure", worst_tip, clearance,
                             f"planets that do not mesh keep their tips {worst_tip:.3f} mm apart (at least {clearance:g} mm)"))
        return [
            neighbour,
            Finding("planet pins", "ok" if worst_pin >= clearance else "failure", worst_pin, clearance,
                    f"each planet pin passes the gears of the other layers {worst_pin:.3f} mm clear (at least {clearance:g} mm)"),
            Finding("axle", "ok" if axle_gap >= clearance else "failure", axle_gap, clearance,
                    f"planet tips pass the axle {axle_gap:.3f} mm clear between the suns (at least {clearance:g} mm)")]

    def plates(self, build: _Build, axle: np.ndarray, z_of) -> list[PlannedPlate]:
        out = []
        for name, layer in (("carrier-lower", 1), ("carrier-upper", 5)):
            holes = ((*axle, self.tube + self.fab.bore_clearance),) + tuple(
                (*c, self.pin + self.fab.bore_clearance) for _, c in self.pins)
            part = Part(name, circle_loop(*axle, 2 * self.carrier_radius, build.tolerance, clockwise=False), (), holes,
                        f"{self.spec.name} {name} (the output: both discs turn together)")
            out.append(PlannedPlate(name, part, kerf_cut(part, self.fab, build.tolerance), z_of(layer)))
        return out

    def network(self, gears: list, meshes: list) -> None:
        ss = self.spec.summing
        gears += [Gear("sun-a", "side-a", ss.sun), Gear("planet-1a", "planet-1a", ss.planet),
                  Gear("planet-1b", "planet-1b", ss.planet), Gear("sun-b", "side-b", ss.sun)]
        meshes += [Mesh("sun-a", "planet-1a", carrier="carrier"), Mesh("planet-1a", "planet-1b", carrier="carrier"),
                   Mesh("planet-1b", "sun-b", carrier="carrier")]

    def formula(self, rho_a: Fraction, rho_b: Fraction) -> Fraction:
        return summing_ratio("mean", rho_a, rho_b)


def _meshing(n1: str, n2: str) -> bool:
    """Whether two differential gears (by name) mesh: a planet with its sun or its mate."""
    def tag(n):
        return n.split("-")[1] if n.startswith("planet-") else n
    t1, t2 = tag(n1), tag(n2)
    if t1 in ("sun-a", "sun-b") or t2 in ("sun-a", "sun-b"):
        sun, planet = (t1, t2) if t1.startswith("sun") else (t2, t1)
        return planet.endswith("a" if sun == "sun-a" else "b")
    return t1[:-1] == t2[:-1] and t1 != t2


class _PlanetaryDifferential:
    """A planetary set as differential: sun on side A, ring (with outside teeth) on side B, carrier the output."""

    kind = "planetary"
    top_layer = 3

    def __init__(self, spec: TrainSpec, system, fab: Fabrication, tube: float, path_b: _Path) -> None:
        ss = spec.summing
        self.spec, self.fab, self.tube, self.m = spec, fab, tube, ss.module or spec.module
        self.set = make_set(ss.sun, ss.planet, ss.ring, ss.planets)
        self.conditions = check_set(self.set, self.m, ss.shift_limit, pressure_angle=system.pressure_angle,
                                    addendum=system.addendum)
        failed = [f for f in self.conditions.findings if f.severity == "failure"]
        if failed:
            raise InputError(f"the planetary differential {self.set.describe()} cannot be built: {failed[0].message}")
        x_s, x_p, _, x_r = self.conditions.shifts
        self.sun_pair = make_pair(ss.sun, ss.planet, self.m, system, shifts=(x_s, x_p), backlash=fab.backlash)
        self.ring_pair = make_internal_pair(ss.planet, ss.ring, self.m, system, shifts=(x_p, x_r), backlash=fab.backlash)
        self.outside = path_b.gears[-1][1]
        rim = (self.outside.root_diameter - self.ring_pair.ring.root_diameter) / 2
        if rim < MIN_RIM * self.m:
            out = self.outside  # root diameter m (z - 2 (h_f - x_E)), solved for z
            least = math.ceil((self.ring_pair.ring.root_diameter + 2 * MIN_RIM * self.m) / out.module
                              + 2 * (out.system.dedendum - out.generating_shift) - 1e-9)
            raise InputError(f"path b's driven gear ({self.outside.teeth} teeth, root {self.outside.root_diameter:.3f} mm) "
                             f"must carry the {ss.ring}-tooth ring (root {self.ring_pair.ring.root_diameter:.3f} mm) inside "
                             f"it with {MIN_RIM:g} module of rim: give it at least {least} teeth or a smaller differential module")
        self.rim = rim
        self.pin = spec.bore
        self.radius = self.sun_pair.centre_distance
        # The pin holes at least their own diameter from the disc's edge (gearcad.trains.supports.EDGE_RULE).
        self.carrier_radius = self.radius + max(self.pin / 2 + max(2.0, 2 * self.m), 1.5 * (self.pin + fab.bore_clearance))
        # The lower carrier disc turns inside the spacer ring (whose bore is the ring's tip circle) with the gear
        # clearance all round.
        room = self.ring_pair.ring.tip_diameter / 2 - self.carrier_radius
        if room < fab.gear_clearance:
            raise InputError(f"the lower carrier disc ({2 * self.carrier_radius:.2f} mm) does not turn inside the "
                             f"{ss.ring}-tooth ring's tip circle ({self.ring_pair.ring.tip_diameter:.2f} mm) with "
                             f"{fab.gear_clearance:g} mm clearance: use larger planets or a smaller bore")
        self.disc_room = room

    def room(self) -> float:
        return 0.0  # the ring's outside teeth set the axle distance; nothing else reaches the input shaft

    def envelope(self):
        web = self._web_diameter() / 2
        return [(1, web), (2, web), (4, self.carrier_radius)]

    def _web_diameter(self) -> float:
        return (self.outside.root_diameter + self.ring_pair.ring.root_diameter) / 2

    def add(self, build: _Build, axle: np.ndarray, input_at: np.ndarray, paths) -> None:
        ss = self.spec.summing
        _check_bore("sun", self.sun_pair.gear1, GearSpec(ss.sun), self.tube)
        turn = math.atan2(*(input_at - axle)[::-1]) + math.pi / ss.planets
        angles = [a + turn for a in self.conditions.angles]
        rot_p = [mesh_phase(0.0, ss.sun, ss.planet, a) for a in angles]
        ring_rots = [ring_phase(r, ss.planet, ss.ring, a) for r, a in zip(rot_p, angles)]
        if not same_phase(ring_rots, ss.ring):
            raise InputError("the planets do not all mesh the ring at one ring position: the assembly condition fails")
        build.add_gear("sun", "sun", 0, self.sun_pair.gear1, GearSpec(ss.sun, self.sun_pair.gear1.shift), "axle",
                       self.top_layer, self.tube, 0.0)
        self.pins = []
        for k, (a, rot) in enumerate(zip(angles, rot_p), start=1):
            key = f"pin-{k}"
            centre = axle + self.radius * np.array([math.cos(a), math.sin(a)])
            build.positions[key], build.bores[key] = centre, self.pin
            self.pins.append((key, centre))
            build.add_gear(f"planet-{k}", "planet", 0, self.sun_pair.gear2, GearSpec(ss.planet, self.sun_pair.gear2.shift),
                           key, self.top_layer, self.pin, rot)
        ring = self.ring_pair.ring
        ring_part = Part("ring", gear_loop(self.outside, build.tolerance), (ring_loop(ring, build.tolerance),), (),
                         f"ring  z{ring.teeth}  m{ring.module:g}  x{ring.shift:+.3f}; outside z{self.outside.teeth} "
                         f"m{self.outside.module:g}", symmetry=self.outside.teeth)
        label_r = (ring.root_diameter + self.outside.root_diameter) / 4
        build.add_gear("ring", "ring", 2, ring, GearSpec(ss.ring, ring.shift), "axle", self.top_layer, self.tube, ring_rots[0],
                       part=ring_part, label_at=(0.0, -label_r))
        self.ring_rotation = ring_rots[0]
        build.meshes += [PlannedMesh(("sun", "planet-1"), self.sun_pair, analyse_pair(self.sun_pair), ()),
                         PlannedMesh(("planet-1", "ring"), self.ring_pair, analyse_internal_pair(self.ring_pair), ())]
        build.findings += list(self.conditions.findings) + [
            Finding("assembly notes", "ok", self.tube, self.spec.bore,
                    f"the sun and path a's driven gear are fixed to one {self.tube:g} mm tube free on the "
                    f"{self.spec.bore:g} mm axle; the ring web and the spacer ring are bonded under the ring and the web "
                    "rides on that tube; the planet pins are held at both ends, in the lower carrier disc (turning "
                    "inside the spacer ring, on the tube) and the carrier (the output, on the axle above the set); "
                    "the pins join the two discs"),
            Finding("lower carrier disc", "ok", self.disc_room, self.fab.gear_clearance,
                    f"the lower carrier disc clears the spacer ring by {self.disc_room:.3f} mm all round (at least "
                    f"{self.fab.gear_clearance:g} mm)"),
            Finding("ring rim", "ok", self.rim, MIN_RIM * self.m,
                    f"the ring's outside teeth ({self.outside.teeth}, path b's driven gear) leave {self.rim:.3f} mm of rim "
                    f"below their root circle (at least {MIN_RIM:g} module)")]

    def rephase_path_b(self, build: _Build, placed: dict, paths) -> None:
        """Turn path B's gears (from the input) so the last one meshes the ring's outside teeth."""
        path = paths[1]
        names = [n for n, _, _ in path.gears][:-1]
        rotation = self.ring_rotation
        teeth = self.outside.teeth
        centre = placed["axle"]
        for name, shaft in zip(reversed(names), reversed(path.shafts[:-1])):
            dx, dy = placed[shaft] - centre
            gear = next(g for g in build.gears if g.name == name)
            rotation = gear.rotation = mesh_phase(rotation, teeth, gear.gear.teeth, math.atan2(dy, dx))
            teeth, centre = gear.gear.teeth, placed[shaft]

    def plates(self, build: _Build, axle: np.ndarray, z_of) -> list[PlannedPlate]:
        fab, tol = self.fab, build.tolerance
        pins = tuple((*c, self.pin + fab.bore_clearance) for _, c in self.pins)
        disc = circle_loop(*axle, 2 * self.carrier_radius, tol, clockwise=False)
        carrier = Part("carrier", disc, (), ((*axle, self.spec.bore + fab.bore_clearance),) + pins,
                       f"{self.spec.name} carrier (the output), {len(self.pins)} planet pins")
        # Its mate under the set, on sun A's tube: each pin held at both ends (gearcad.trains.epicyclic does the same).
        lower = Part("carrier-back", disc, (), ((*axle, self.tube + fab.bore_clearance),) + pins,
                     f"{self.spec.name} carrier-back, {len(self.pins)} planet pins")
        rim = circle_loop(*axle, self._web_diameter(), tol, clockwise=False)
        web = Part("ring-web", rim, (), ((*axle, self.tube + fab.bore_clearance),),
                   f"{self.spec.name} ring web (bond under the ring spacer)")
        bore = circle_loop(*axle, self.ring_pair.ring.tip_diameter, tol, clockwise=True)  # an inner contour, not a hole
        spacer = Part("ring-spacer", rim, (bore,), (),
                      f"{self.spec.name} ring spacer (bond between web and ring)")
        return [PlannedPlate("ring-web", web, kerf_cut(web, fab, tol), z_of(1)),
                PlannedPlate("ring-spacer", spacer, kerf_cut(spacer, fab, tol), z_of(2)),
                PlannedPlate("carrier-back", lower, kerf_cut(lower, fab, tol), z_of(2)),
                PlannedPlate("carrier", carrier, kerf_cut(carrier, fab, tol), z_of(self.top_layer + 1))]

    def network(self, gears: list, meshes: list) -> None:
        ss = self.spec.summing
        gears += [Gear("sun", "side-a", ss.sun), Gear("planet-1", "planet-1", ss.planet), Gear("ring", "side-b", ss.ring)]
        meshes += [Mesh("sun", "planet-1", carrier="carrier"), Mesh("planet-1", "ring", carrier="carrier", internal=True)]

    def formula(self, rho_a: Fraction, rho_b: Fraction) -> Fraction:
        ss = self.spec.summing
        return summing_ratio("planetary", rho_a, rho_b, (ss.sun, ss.planet, ss.ring, ss.planets))


def _finish(build: _Build, spec, system, fab, layout, placed, sides, keys, diff, paths, tolerance, top, load) -> Plan:
    if diff.kind == "planetary":
        diff.rephase_path_b(build, placed, paths)
    pitch = spec.thickness + fab.layer_gap
    # An idler that reaches one plate only is held at its other end by a bridge (gearcad.trains.supports): leave
    # room for it above path A's layer (idler a) or below path B's (idler b).
    from .hardware import bridge_room

    room = bridge_room(spec.thickness, fab.layer_gap)
    room_a = "idler-a" in sides and not sides["idler-a"][1]
    room_b = "idler-b" in sides and not sides["idler-b"][0]

    def z_of(layer: int) -> float:
        return fab.layer_gap + layer * pitch + (room if room_a and layer >= 1 else 0.0) + (room if room_b and layer >= top else 0.0)

    shaft_keys = list(keys) + [k for k, _ in diff.pins]
    names = {"input": "input", "axle": "differential", "idler-a": "idler-a", "idler-b": "idler-b"}
    shafts = []
    for key in shaft_keys:
        x, y = placed[key] if key in placed else build.positions[key]
        back, front = sides.get(key, (False, False))
        shafts.append(PlannedShaft(names.get(key, key), float(x), float(y), build.bores.get(key, spec.bore), back, front))
    index = {k: i for i, k in enumerate(shaft_keys)}
    planned = []
    for g in build.gears:
        planned.append(PlannedGear(g.name, g.role, g.stage, g.gear, g.spec, index[g.shaft], g.layer, g.bore, g.part,
                                   g.cut, g.rotation, z_of(g.layer), label_at=g.label_at))
    axle = np.array([shafts[index["axle"]].x, shafts[index["axle"]].y])
    discs = diff.plates(build, axle, z_of)
    # The front plate above the top layer and above every disc (the planetary differential's carrier sits one
    # layer above path B).
    front_z = max([z_of(top + 1)] + [p.z + spec.thickness + fab.layer_gap for p in discs])
    plates = list(frame_plates(spec, fab, layout, shafts, tolerance, front_z)) + list(discs)
    signed = _network_ratio(spec, paths, diff)
    rho = [_path_ratio(p) for p in paths]
    expected = diff.formula(*rho)
    if expected != signed:
        raise InputError(f"internal check failed: the kinematic model gives {signed}, the summing formula {expected}")
    meshes = tuple(build.meshes) if load is None else _rated(build.meshes, paths, diff, signed, rho, spec, fab, load)
    build.findings.append(Finding(
        "kinematics", "ok", float(signed), 0.0,
        f"carrier (output) turns {signed.numerator}/{signed.denominator} per input turn from the kinematic model; "
        f"side a at {rho[0]}, side b at {rho[1]}, {diff.kind} differential"))
    return Plan(spec, system, fab, tuple(planned), meshes, tuple(shafts), tuple(plates), layout,
                abs(signed), direction_of(signed), tolerance, tuple(build.findings))


def _rated(meshes: list, paths, diff, signed: Fraction, rho: list[Fraction], spec: TrainSpec, fab: Fabrication,
           load: InputLoad) -> tuple[PlannedMesh, ...]:
    """The meshes with their load ratings for ``load`` on the input shaft (gearcad.loads; losses neglected).

    The carrier carries ``T_in / |ratio|``; the differential splits it between
    its sides; each path carries its side's torque back to the input, scaled
    along the path by the tooth counts; the differential's meshes run at their
    sides' speeds relative to the carrier, shared by its planets.
    """
    from ..meshes.loads import MeshLoad, differential_side_torques, planet_mesh_loads
    from ..materials import load_material
    from ..meshes.strength import PROCESS_CLASS, rate_internal_pair, rate_pair

    ss = spec.summing
    sides = differential_side_torques(ss.differential, load.torque / abs(float(signed)), ss.sun, ss.ring)
    wanted: dict[tuple[str, str], MeshLoad] = {}
    for path, torque, speed in zip(paths, sides, rho):
        driven = path.gears[-1][1].teeth
        for (n1, g1, _), (n2, _, _) in zip(path.gears, path.gears[1:]):
            n2 = "ring" if n2 == "b-driven" and ss.differential == "planetary" else n2
            wanted[(n1, n2)] = MeshLoad(torque * g1.teeth / driven, load.speed * abs(float(speed)) * driven / g1.teeth)
    relative = [float(r - signed) * load.speed for r in rho]
    if ss.differential == "mean":
        (sun_a, planet_a), (sun_b, _) = (planet_mesh_loads(t, w, ss.planets, ss.sun, ss.planet)
                                         for t, w in zip(sides, relative))
        wanted.update({("sun-a", "planet-1a-1"): sun_a, ("planet-1a-2", "planet-1b-1"): planet_a,
                       ("sun-b", "planet-1b-2"): sun_b})
    else:
        wanted[("sun", "planet-1")], wanted[("planet-1", "ring")] = planet_mesh_loads(
            sides[0], relative[0], ss.planets, ss.sun, ss.planet)
    material, process = load_material(fab.material_profile), PROCESS_CLASS[fab.process]
    out = []
    for m in meshes:
        at = wanted[m.names]
        rate = rate_internal_pair if hasattr(m.pair, "ring") else rate_pair
        rating = rate(m.pair, at.torque, at.speed, spec.thickness, material, material, process)
        out.append(PlannedMesh(m.names, m.pair, m.analysis, m.findings + rating.findings(), rating))
    return tuple(out)


def _path_ratio(path: _Path) -> Fraction:
    """Signed turns of the side member per input turn along one path."""
    (_, driver, _), (_, driven, _) = path.gears[0], path.gears[-1]
    return Fraction(driver.teeth, driven.teeth) * (-1) ** len(path.pairs)


def _network_ratio(spec: TrainSpec, paths, diff) -> Fraction:
    gears, meshes = [], []
    for path in paths:
        members = path.shafts[:-1] + [f"side-{path.name}"]
        names = [n for n, _, _ in path.gears]
        if path.name == "b" and diff.kind == "planetary":
            names[-1] = "ring-outside"
        gears += [Gear(n, mem, g.teeth) for n, mem, (_, g, _) in zip(names, members, path.gears)]
        meshes += [Mesh(n1, n2) for n1, n2 in zip(names, names[1:])]
    diff.network(gears, meshes)
    return network_ratio(make_network(gears, meshes), (), "input", "carrier")
