"""The planetary differential of a summing train: sun on side A, ring (with outside teeth) on side B.

Pure.  Layers 0 path A; 1 a web under the ring (it rides on sun A's tube); 2 a spacer ring
between web and ring, and inside it the lower carrier disc; 3 sun, planets and ring, whose
outside teeth are path B's driven gear; 4 the upper carrier disc.  Each planet pin is held at
both ends, in the two carrier discs (as in :mod:`.epicyclic`); the pins join the discs.  The
carrier is the output.

The web, the spacer ring and the ring are glued into one cup, face on face (:meth:`stack`): the
top of one is the bottom of the next.  Gaps stay only between parts that turn relative to each
other: the lower carrier disc stands ``END_SHAKE`` above the web inside the cup (so it stands
out of the spacer ring by as much), the sun and the planets ``END_SHAKE`` above the disc, so
they stand ``2 END_SHAKE`` above the ring and mesh it over the sheet's thickness less that
(path B's gears stay level with the ring, whose outside teeth they mesh over the full face).
Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..meshes.checks import Finding, analyse_pair
from .epicyclic import kerf_cut, ring_phase, same_phase
from ..errors import InputError
from .hardware import END_SHAKE
from ..geometry.internal import ring_loop
from ..geometry.shape import Part, circle_loop, gear_loop
from ..meshes.internal import analyse_internal_pair, make_internal_pair
from ..ratio.kinematics import Gear, Mesh
from .layout import mesh_phase
from ..meshes.pair import make_pair
from .plan import MIN_RIM, PlannedMesh, PlannedPlate, _check_bore
from ..ratio.planetary_set import check_set, make_set
from ..profiles import Fabrication
from ..ratio.summing import summing_ratio
from .spec import GearSpec, TrainSpec
from .summing_paths import SummingBuild, SummingPath

__all__ = ["PlanetaryDifferential", "DifferentialStack"]


@dataclass(frozen=True)
class DifferentialStack:
    """Lower faces (mm) of the planetary differential's parts: the glued cup (web, spacer, ring), the lower carrier
    disc in it, the sun and planets above the disc, and the upper carrier disc."""

    web: float
    spacer: float
    ring: float
    disc: float
    planets: float
    carrier: float


class PlanetaryDifferential:
    """A planetary set as differential: sun on side A, ring (with outside teeth) on side B, carrier the output."""

    kind = "planetary"
    top_layer = 3

    def __init__(self, spec: TrainSpec, system, fab: Fabrication, tube: float, path_b: SummingPath) -> None:
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
        # The planets stand 2 END_SHAKE above the ring, into the upper carrier's layer.
        reach = self.radius + self.sun_pair.gear2.tip_diameter / 2
        return [(1, web), (2, web), (4, max(self.carrier_radius, reach))]

    def stack(self, z_of, thickness: float, gap: float) -> DifferentialStack:
        """The z stack from the web's layer (``z_of(1)``): the cup face on face, the moving parts END_SHAKE apart.

        ``thickness``: the sheet's, ``gap``: the fabrication profile's layer gap (under the upper carrier disc,
        room for the planet pins' washers with the end shake), mm.
        """
        web = z_of(1)
        spacer = web + thickness
        ring = spacer + thickness
        disc = spacer + END_SHAKE  # turns in the cup: END_SHAKE over the web, so it stands END_SHAKE out of the spacer
        planets = disc + thickness + END_SHAKE
        return DifferentialStack(web, spacer, ring, disc, planets, planets + thickness + gap)

    def gear_z(self, role: str, layer: int, z_of, thickness: float, gap: float) -> float:
        """A gear's lower face: the sun and planets above the lower carrier disc; path B's gears level with the ring."""
        st = self.stack(z_of, thickness, gap)
        if role in ("sun", "planet"):
            return st.planets
        return st.ring if layer == self.top_layer else z_of(layer)

    def bonded(self) -> tuple[tuple[str, ...], ...]:
        """The parts glued face on face, bottom up."""
        return (("ring-web", "ring-spacer", "ring"),)

    def face(self, names: tuple[str, str], thickness: float) -> float:
        """Face width of a mesh, mm: the planets meet the ring over the sheet less their 2 END_SHAKE rise."""
        return thickness - 2 * END_SHAKE if "ring" in names and names[0].startswith("planet") else thickness

    def _web_diameter(self) -> float:
        return (self.outside.root_diameter + self.ring_pair.ring.root_diameter) / 2

    def add(self, build: SummingBuild, axle: np.ndarray, input_at: np.ndarray, paths) -> None:
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
                    f"{self.spec.bore:g} mm axle; the ring web, the spacer ring and the ring are glued face on face into "
                    "one cup whose web rides on that tube; the lower carrier disc drops into the cup through the ring "
                    f"and turns in it {END_SHAKE:g} mm over the web (a shim washer on the tube between), the sun and "
                    f"planets {END_SHAKE:g} mm over the disc; the planet pins are held at both ends, in the lower carrier "
                    "disc and the carrier (the output, on the axle above the set); the pins join the two discs"),
            self._face_finding(),
            Finding("lower carrier disc", "ok", self.disc_room, self.fab.gear_clearance,
                    f"the lower carrier disc clears the spacer ring by {self.disc_room:.3f} mm all round (at least "
                    f"{self.fab.gear_clearance:g} mm)"),
            Finding("ring rim", "ok", self.rim, MIN_RIM * self.m,
                    f"the ring's outside teeth ({self.outside.teeth}, path b's driven gear) leave {self.rim:.3f} mm of rim "
                    f"below their root circle (at least {MIN_RIM:g} module)")]

    def _face_finding(self) -> Finding:
        t = self.spec.thickness
        face = self.face(("planet-1", "ring"), t)
        # Our rule: the planets meet the ring over half the sheet at least (a thinner contact wears the teeth).
        return Finding("ring face", "ok" if face >= t / 2 - 1e-9 else "failure", face, t / 2,
                       f"the planets stand {2 * END_SHAKE:g} mm above the ring (the lower carrier disc turns under them "
                       f"in the glued cup) and mesh it over {face:.2f} of the {t:g} mm sheet (at least half; our rule)")

    def rephase_path_b(self, build: SummingBuild, placed: dict, paths) -> None:
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

    def plates(self, build: SummingBuild, axle: np.ndarray, z_of) -> list[PlannedPlate]:
        fab, tol = self.fab, build.tolerance
        st = self.stack(z_of, self.spec.thickness, fab.layer_gap)
        pins = tuple((*c, self.pin + fab.bore_clearance) for _, c in self.pins)
        disc = circle_loop(*axle, 2 * self.carrier_radius, tol, clockwise=False)
        carrier = Part("carrier", disc, (), ((*axle, self.spec.bore + fab.bore_clearance),) + pins,
                       f"{self.spec.name} carrier (the output), {len(self.pins)} planet pins")
        # Its mate under the set, on sun A's tube: each pin held at both ends (gearcad.trains.epicyclic does the same).
        lower = Part("carrier-back", disc, (), ((*axle, self.tube + fab.bore_clearance),) + pins,
                     f"{self.spec.name} carrier-back, {len(self.pins)} planet pins")
        rim = circle_loop(*axle, self._web_diameter(), tol, clockwise=False)
        web = Part("ring-web", rim, (), ((*axle, self.tube + fab.bore_clearance),),
                   f"{self.spec.name} ring web (glued under the ring spacer)")
        bore = circle_loop(*axle, self.ring_pair.ring.tip_diameter, tol, clockwise=True)  # an inner contour, not a hole
        spacer = Part("ring-spacer", rim, (bore,), (),
                      f"{self.spec.name} ring spacer (glued between web and ring)")
        return [PlannedPlate("ring-web", web, kerf_cut(web, fab, tol), st.web),
                PlannedPlate("ring-spacer", spacer, kerf_cut(spacer, fab, tol), st.spacer),
                PlannedPlate("carrier-back", lower, kerf_cut(lower, fab, tol), st.disc),
                PlannedPlate("carrier", carrier, kerf_cut(carrier, fab, tol), st.carrier)]

    def network(self, gears: list, meshes: list) -> None:
        ss = self.spec.summing
        gears += [Gear("sun", "side-a", ss.sun), Gear("planet-1", "planet-1", ss.planet), Gear("ring", "side-b", ss.ring)]
        meshes += [Mesh("sun", "planet-1", carrier="carrier"), Mesh("planet-1", "ring", carrier="carrier", internal=True)]

    def formula(self, rho_a: Fraction, rho_b: Fraction) -> Fraction:
        ss = self.spec.summing
        return summing_ratio("planetary", rho_a, rho_b, (ss.sun, ss.planet, ss.ring, ss.planets))
