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
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..meshes.checks import Finding
from ..errors import InputError
from ..ratio.kinematics import Gear, Mesh, direction_of, make_network, network_ratio
from .layout import LayoutGear, LayoutProblem, clearance_shortfall, fit_plate, shaft_sides
from .plan import InputLoad, Plan, PlannedGear, PlannedMesh, PlannedShaft, _system, frame_plates
from ..profiles import Fabrication, load_fabrication
from .spec import SummingSpec, TrainSpec
from .summing_paths import (TUBE_WALL, SummingBuild, SummingPath, axis_distance, idler_position, make_path,
                            place_path_gears)
from .differential_mean import MeanDifferential, mean_assembles
from .differential_planetary import PlanetaryDifferential

__all__ = ["plan_summing", "mean_assembles", "axle_room", "TUBE_WALL"]


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
    return MeanDifferential(_Frame(summing, module, bore), load_tooth_system(tooth_system), fab, tube).room()


def plan_summing(spec: TrainSpec, tolerance: float, load: InputLoad | None = None) -> Plan:
    """Plan the summing train described by ``spec.summing`` and its two stages (path A, path B)."""
    system = _system(spec)
    fab = load_fabrication(spec.fabrication)
    ss = spec.summing
    tube = ss.tube if ss.tube is not None else spec.bore + 2 * TUBE_WALL
    if tube <= spec.bore:
        raise InputError(f"summing tube must be wider than the bore {spec.bore:g} mm, got {tube!r}")
    paths = (make_path("a", spec.stages[0], spec.module, system, fab), make_path("b", spec.stages[1], spec.module, system, fab))
    build = SummingBuild(spec, fab, tolerance, [], [], [], {"input": np.zeros(2)},
                   {"input": spec.bore, "axle": spec.bore, "idler-a": spec.bore, "idler-b": spec.bore}, tube)
    diff = (MeanDifferential(spec, system, fab, tube) if ss.differential == "mean"
            else PlanetaryDifferential(spec, system, fab, tube, paths[1]))
    distance, how = axis_distance(spec, paths, diff.room())
    build.positions["axle"] = np.array([distance, 0.0])
    build.findings.append(Finding("one axle", "ok", distance, distance,
                                  f"both paths reach the differential axle {distance:.4f} mm from the input shaft ({how})"))
    top = diff.top_layer
    with_idler = [p for p in paths if len(p.pairs) == 2]
    layouts = []
    for sides in itertools.product((1, -1), repeat=len(with_idler)):  # each idler above or below the line
        trial = dict(build.positions)
        for path, side in zip(with_idler, sides):
            trial[f"idler-{path.name}"] = idler_position(path, distance, side)
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
    place_path_gears(build, paths, placed, top)
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


def _finish(build: SummingBuild, spec, system, fab, layout, placed, sides, keys, diff, paths, tolerance, top, load) -> Plan:
    if diff.kind == "planetary":
        diff.rephase_path_b(build, placed, paths)
    pitch = spec.thickness + fab.layer_gap
    # An idler that reaches one plate only is held at its other end by a bridge (gearcad.trains.supports): leave
    # room for it above path A's layer (idler a) or below path B's (idler b).
    from .hardware import bridge_room

    room = bridge_room(spec.thickness, fab.layer_gap)
    room_a = "idler-a" in sides and not sides["idler-a"][1]
    # The planetary differential's web, spacer ring and ring are glued face on face (its stack): no room may open
    # between them, so idler b's bridge stands beside the differential, below the ring's layer.
    room_b = "idler-b" in sides and not sides["idler-b"][0] and diff.kind != "planetary"

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
        z = diff.gear_z(g.role, g.layer, z_of, spec.thickness, fab.layer_gap)
        planned.append(PlannedGear(g.name, g.role, g.stage, g.gear, g.spec, index[g.shaft], g.layer, g.bore, g.part,
                                   g.cut, g.rotation, z, label_at=g.label_at))
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
                abs(signed), direction_of(signed), tolerance, tuple(build.findings), bonded=diff.bonded())


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
        rating = rate(m.pair, at.torque, at.speed, diff.face(m.names, spec.thickness), material, material, process)
        out.append(PlannedMesh(m.names, m.pair, m.analysis, m.findings + rating.findings(), rating))
    return tuple(out)


def _path_ratio(path: SummingPath) -> Fraction:
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
