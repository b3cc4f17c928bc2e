"""The spur differential of a summing train: suns A and B, pairs of planets, two carrier discs.

Pure.  Layers 0 path A; 1 lower carrier disc; 2 sun A and the ``a`` planets; 3 the ``a`` and
``b`` planets in mesh; 4 the ``b`` planets and sun B; 5 upper carrier disc; 6 path B.  Each
planet is two layers thick (two laminations on one pin), so an ``a`` planet meshes sun A and its
``b`` mate but never sun B.  The carrier turns at the mean of the suns.  Lengths in mm, angles in
radians.
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np

from ..meshes.checks import Finding, analyse_pair
from .epicyclic import kerf_cut, same_phase
from ..errors import InputError
from ..geometry.shape import Part, circle_loop
from ..ratio.kinematics import Gear, Mesh
from .layout import mesh_phase
from ..meshes.pair import make_pair
from .plan import PlannedMesh, PlannedPlate, _check_bore
from ..profiles import Fabrication
from ..ratio.summing import summing_ratio
from .spec import GearSpec, TrainSpec
from .summing_paths import SummingBuild

__all__ = ["MeanDifferential", "mean_assembles"]


def mean_assembles(sun: int, pairs: int) -> bool:
    """Whether ``pairs`` equally spaced planet pairs assemble between two equal ``sun``-tooth suns.

    Carrying pair 1 round to pair 2's place with sun A held turns the carrier by
    ``2 pi / N`` and sun B by ``4 pi / N`` (the carrier turns at the mean of the
    suns), so pair 2's place takes the same sun B only if ``4 pi / N`` is whole
    pitches of sun B: ``2 z_s / N`` whole (derived here; the plan checks it again
    by phasing every mesh).
    """
    return (2 * sun) % pairs == 0


class MeanDifferential:
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

    def gear_z(self, role: str, layer: int, z_of, thickness: float, gap: float) -> float:
        """A gear's lower face: its layer's, mm."""
        return z_of(layer)

    def bonded(self) -> tuple[tuple[str, ...], ...]:
        """No part of the spur differential is glued to another."""
        return ()

    def face(self, names: tuple[str, str], thickness: float) -> float:
        """Face width of a mesh, mm: every gear of the spur differential meets its mates over the full sheet."""
        return thickness

    def add(self, build: SummingBuild, axle: np.ndarray, input_at: np.ndarray, paths) -> None:
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

    def plates(self, build: SummingBuild, axle: np.ndarray, z_of) -> list[PlannedPlate]:
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
