"""The plan of a planetary set: sun, planets and ring in place and in phase, the carrier and the plates.

Pure.  The sun, the ring and the carrier share one axis at the plate's centre;
the planets sit at the assembly angles on the working centre distance.  Each
planet is turned so its teeth sit in the sun's spaces (external mesh), and the
ring so its spaces take the planets' teeth (internal mesh: a planet turned by
``d`` turns the ring by ``d z_p / z_r`` the same way); the assembly condition
makes that ring phase the same for every planet, which the plan checks.
Lengths in mm, angles in radians.
"""

from __future__ import annotations

import dataclasses
import math
from fractions import Fraction

import numpy as np

from ..meshes.checks import Finding, analyse_pair
from ..errors import GeometryError, InputError
from ..geometry.internal import RingGear, ring_part
from ..geometry.offset import offset_loop
from ..geometry.shape import Part, circle_loop, gear_loop, rounded_rectangle
from ..meshes.internal import analyse_internal_pair, make_internal_pair
from ..ratio.kinematics import direction_of
from .layout import Layout, mesh_phase
from ..meshes.pair import make_pair
from .plan import InputLoad, Plan, PlannedGear, PlannedMesh, PlannedPlate, PlannedShaft, _system
from ..ratio.planetary_set import check_set, make_arrangement, make_set, set_ratio
from ..profiles import Fabrication, load_fabrication
from .spec import GearSpec, TrainSpec

__all__ = ["plan_planetary", "ring_phase", "same_phase", "kerf_cut", "toothed_parts", "bolt_angle"]

RING_BOLTS = 6  # mounting holes in the rim of a fixed ring; common practice


def ring_phase(planet_rotation: float, planet_teeth: int, ring_teeth: int, direction: float) -> float:
    """Rotation (radians) of a ring (tooth 0 on +x) so that a planet at ``direction`` meshes it.

    With a planet tooth on the line from the ring's centre through the planet's,
    the ring shows a space there (its spaces lie half a pitch from its teeth);
    turning the planet by ``d`` turns the ring by ``d z_p / z_r`` the same way.
    """
    offset = planet_rotation - direction
    return direction - math.pi / ring_teeth + offset * planet_teeth / ring_teeth


def same_phase(angles: list[float], teeth: int) -> bool:
    pitch = 2 * math.pi / teeth
    first = angles[0]
    return all(abs((a - first + pitch / 2) % pitch - pitch / 2) < 1e-9 for a in angles)


def _stepped_turn(turn: float, angle: float, ps, pset, first_turn: float, first_angle: float) -> float:
    """The sun-side turn (this turn plus whole sun-side pitches) that meshes the ring in planet 1's ring phase."""
    target = ring_phase(first_turn, pset.ring_planet, ps.ring, first_angle)
    for j in range(ps.planet):
        candidate = turn + 2 * math.pi * j / ps.planet
        if same_phase([target, ring_phase(candidate, pset.ring_planet, ps.ring, angle)], ps.ring):
            return candidate
    return turn


def kerf_cut(part: Part, fab: Fabrication, tolerance: float) -> Part:
    if not fab.kerf:
        return part
    half = fab.kerf / 2
    return Part(part.name, offset_loop(part.outer, half, tolerance), tuple(offset_loop(h, half, tolerance) for h in part.holes),
                tuple((x, y, d - fab.kerf) for x, y, d in part.circles), part.label, part.symmetry)


def toothed_parts(name: str, gear, bore: float, fab: Fabrication, tolerance: float) -> tuple[Part, Part]:
    hole = bore + fab.bore_clearance
    part = Part(name, gear_loop(gear, tolerance), (), ((0.0, 0.0, hole),),
                f"{name}  z{gear.teeth}  m{gear.module:g}  x{gear.shift:+.3f}", symmetry=gear.teeth)
    return part, kerf_cut(part, fab, tolerance)


def _ring_part(ring: RingGear, fixed: bool, fab: Fabrication, tolerance: float, rotation: float = 0.0,
               bolt_circle: float | None = None) -> tuple[Part, Part, float]:
    """The ring's part; a fixed ring's bolt holes turned by ``-rotation`` so that, placed, they sit at the plate's angles."""
    base = ring_part(ring, tolerance, name="ring")
    if bolt_circle is None:
        bolt_circle = (ring.root_diameter / 2 + ring.outer_diameter / 2) / 2
    bolts = tuple((bolt_circle * math.cos(bolt_angle(k) - rotation),
                   bolt_circle * math.sin(bolt_angle(k) - rotation), fab.spacer_hole)
                  for k in range(RING_BOLTS)) if fixed else ()
    part = Part("ring", base.outer, base.holes, bolts, f"ring  z{ring.teeth}  m{ring.module:g}  x{ring.shift:+.3f}")
    return part, kerf_cut(part, fab, tolerance), bolt_circle


def _helical_pairs(sun_pair, ring_pair, hand: str):
    """The set's pairs with hands: the sun ``hand``; planets and ring the other (external pair opposite,
    internal pair the same)."""
    from ..meshes.internal import InternalPair
    from ..meshes.helical import HelicalGear, as_helical_ring, opposite_hand
    from ..meshes.pair import GearPair

    other = opposite_hand(hand)

    def helical(gear, h):
        return HelicalGear(gear.teeth, gear.module, gear.system, gear.shift, gear.thinning, gear.tip_shortening, hand=h)

    sun = GearPair(helical(sun_pair.gear1, hand), helical(sun_pair.gear2, other), sun_pair.centre_distance,
                   sun_pair.centre_allowance)
    ring = InternalPair(helical(ring_pair.pinion, other), as_helical_ring(ring_pair.ring, other),
                        ring_pair.centre_distance, ring_pair.centre_allowance)
    return sun, ring


def _helical_mesh(mesh: PlannedMesh, thickness: float, ps) -> PlannedMesh:
    """A planned mesh of a helical set with its hands and overlap findings, undercut restated in normal shifts."""
    from ..meshes.helical import hand_findings, helical_mesh, in_normal_terms, overlap_finding

    internal = hasattr(mesh.pair, "ring")
    g1, g2 = (mesh.pair.pinion, mesh.pair.ring) if internal else (mesh.pair.gear1, mesh.pair.gear2)
    width = (thickness - ps.gap) / 2 if ps.herringbone else thickness
    figures = helical_mesh(mesh.pair, mesh.analysis.contact_ratio, mesh.analysis.backlash, width)
    extra = (*hand_findings(g1.hand, g2.hand, internal=internal), overlap_finding(figures))
    return dataclasses.replace(mesh, analysis=in_normal_terms(mesh.analysis), findings=(*extra, *mesh.findings))


def bolt_angle(k: int) -> float:
    """Angle (radians) of a fixed ring's ``k``-th bolt in plate coordinates: half a bolt spacing off +x."""
    return 2 * math.pi * k / RING_BOLTS + math.pi / RING_BOLTS


def _sweep_radius(centre: float, planet_tips: list[float]) -> float:
    """Outer radius of the planets' sweep about the set's axis (orbit plus the largest tip radius), mm."""
    return centre + max(planet_tips)


def plan_planetary(spec: TrainSpec, tolerance: float, load: InputLoad | None = None) -> Plan:
    """Plan a planetary set described by ``spec.planetary``."""
    ps = spec.planetary
    system = _system(spec)
    fab = load_fabrication(spec.fabrication)
    m = spec.module
    shift_limit = ps.shift_limit
    if ps.helix:  # helical: the set is solved and built in the transverse section (gearcad.meshes.helical)
        from ..meshes.helical import transverse_system

        if load is not None:
            raise InputError("the load rating of a helical planetary set is not available yet; build it without "
                             "--torque/--power, or with helix = 0")
        beta = math.radians(ps.helix)
        system, m = transverse_system(system, beta), m / math.cos(beta)
        shift_limit = None if shift_limit is None else shift_limit * math.cos(beta)
    pset = make_set(ps.sun, ps.planet, ps.ring, ps.planets, ps.planet_ring)
    arrangement = make_arrangement(ps.fixed, ps.input)
    conditions = check_set(pset, m, shift_limit, pressure_angle=system.pressure_angle, addendum=system.addendum)
    failed = [f for f in conditions.findings if f.severity == "failure"]
    if failed:
        raise InputError(f"the planetary set {pset.describe()} cannot be built: {failed[0].message}")
    x_s, x_p1, x_p2, x_r = conditions.shifts
    sun_pair = make_pair(ps.sun, ps.planet, m, system, shifts=(x_s, x_p1), backlash=fab.backlash)
    ring_pair = make_internal_pair(pset.ring_planet, ps.ring, m, system, shifts=(x_p2, x_r), backlash=fab.backlash)
    centre = sun_pair.centre_distance
    if abs(ring_pair.centre_distance - centre) > 1e-6:
        raise GeometryError(f"sun and ring centre distances differ ({centre:.6f} and {ring_pair.centre_distance:.6f} mm)")
    if ps.helix:
        from ..meshes.helical import check_face_width

        sun_pair, ring_pair = _helical_pairs(sun_pair, ring_pair, ps.hand)
        check_face_width((sun_pair.gear1, sun_pair.gear2, ring_pair.pinion), spec.thickness)
    ring = ring_pair.ring
    sun_gear, planet_sun, planet_ring = sun_pair.gear1, sun_pair.gear2, ring_pair.pinion
    centre = sun_pair.centre_distance
    sweep = _sweep_radius(centre, [planet_sun.tip_diameter / 2, planet_ring.tip_diameter / 2])
    bolt_circle = None
    if ps.fixed == "ring":
        # A fixed ring is bolted to both plates through sleeves: its bolts stand outside the planets' sweep by the
        # gear clearance (the sleeves pass the planets' layers), each hole its own diameter from the rim.
        from .hardware import screw_size

        sleeve = 2 * screw_size(fab.spacer_hole)[1]
        bolt_circle = max((ring.root_diameter / 2 + ring.outer_diameter / 2) / 2,
                          sweep + fab.gear_clearance + sleeve / 2, ring.root_diameter / 2 + 1.5 * fab.spacer_hole)
        rim = 2 * (bolt_circle + 1.5 * fab.spacer_hole)
        ring = dataclasses.replace(ring, rim_diameter=max(rim, ring.outer_diameter))

    # Plate coordinates: the set's axis at the centre of a square plate.
    half = max(ring.outer_diameter / 2, sweep) + fab.plate_margin  # the plates cover the ring and the planets' sweep
    cx = cy = half
    angles = conditions.angles
    planet_rot_a = [mesh_phase(0.0, ps.sun, ps.planet, a) for a in angles]
    if pset.stepped:
        # A stepped planet's two gears are one part, so the ring-side gear turns with the sun-side one.  Any
        # whole pitch of the sun-side gear meshes the sun as well; pick, planet by planet, the pitch that puts
        # the ring-side teeth where the ring (phased by planet 1) has its spaces.
        planet_rot_a = [planet_rot_a[0]] + [_stepped_turn(r, a, ps, pset, planet_rot_a[0], angles[0])
                                            for r, a in zip(planet_rot_a[1:], angles[1:])]
    planet_rot_b = planet_rot_a
    ring_rots = [ring_phase(rb, pset.ring_planet, ps.ring, a) for rb, a in zip(planet_rot_b, angles)]
    if not same_phase(ring_rots, ps.ring):
        raise GeometryError("the planets do not all mesh the ring at one ring position: the assembly condition fails")

    bore = spec.bore
    layer_b = 1 if pset.stepped else 0
    z0 = 2 * fab.layer_gap + spec.thickness  # under the set: the back carrier disc (each planet pin held at two points)
    pitch = spec.thickness + fab.layer_gap
    gears: list[PlannedGear] = []
    sun_part, sun_cut = toothed_parts("sun", sun_gear, bore, fab, tolerance)
    gears.append(PlannedGear("sun", "sun", 1, sun_gear, GearSpec(ps.sun, x_s), 0, 0, bore, sun_part, sun_cut, 0.0, z0))
    shafts = [PlannedShaft("centre", cx, cy, bore, True, True)]
    pin = bore
    for k, a in enumerate(angles, start=1):
        shafts.append(PlannedShaft(f"planet-{k}", cx + centre * math.cos(a), cy + centre * math.sin(a), pin, False, False))
        part, cut = toothed_parts(f"planet-{k}", planet_sun, pin, fab, tolerance)
        gears.append(PlannedGear(f"planet-{k}", "planet", 1, planet_sun, GearSpec(ps.planet, x_p1), k, 0, pin, part, cut,
                                 planet_rot_a[k - 1], z0))
        if pset.stepped:
            part, cut = toothed_parts(f"planet-{k}-ring-side", planet_ring, pin, fab, tolerance)
            gears.append(PlannedGear(f"planet-{k}-ring-side", "planet", 1, planet_ring, GearSpec(pset.ring_planet, x_p2), k,
                                     1, pin, part, cut, planet_rot_b[k - 1], z0 + pitch))
    ring_drawn, ring_cut, bolt_circle = _ring_part(ring, ps.fixed == "ring", fab, tolerance, ring_rots[0], bolt_circle)
    label_r = (ring.root_diameter / 2 + ring.outer_diameter / 2) / 2
    gears.append(PlannedGear("ring", "ring", 1, ring, GearSpec(ps.ring, x_r), 0, layer_b, bore, ring_drawn, ring_cut,
                             ring_rots[0], z0 + layer_b * pitch, label_at=(0.0, -label_r)))

    ratings = _ratings(pset, arrangement, sun_pair, ring_pair, spec, fab, load) if load is not None else (None, None)
    meshes = (PlannedMesh(("sun", "planet-1"), sun_pair, analyse_pair(sun_pair),
                          ratings[0].findings() if ratings[0] else (), ratings[0]),
              PlannedMesh(("planet-1-ring-side" if pset.stepped else "planet-1", "ring"), ring_pair,
                          analyse_internal_pair(ring_pair), ratings[1].findings() if ratings[1] else (), ratings[1]))
    if ps.helix:
        meshes = tuple(_helical_mesh(mesh, spec.thickness, ps) for mesh in meshes)
    top = z0 + (layer_b + 1) * pitch
    plates = _plates(spec, fab, tolerance, cx, cy, centre, angles, ps, ring, bolt_circle, top, pin)
    layout = Layout(np.array([[s.x, s.y] for s in shafts]), 2 * half, 2 * half,
                    "concentric: sun, ring and carrier on the plate's centre; planets at the assembly angles")
    signed = set_ratio(pset, arrangement)
    findings = tuple(conditions.findings) + (Finding(
        "arrangement", "ok", float(signed), 0.0,
        f"{arrangement.describe()}: ratio {signed.numerator}/{signed.denominator} from the kinematic model"),)
    return Plan(spec, system, fab, tuple(gears), meshes, tuple(shafts), plates, layout, abs(Fraction(signed)),
                direction_of(signed), tolerance, findings)


def _ratings(pset, arrangement, sun_pair, ring_pair, spec: TrainSpec, fab: Fabrication, load: InputLoad):
    """Load ratings of one planet's two meshes for ``load`` on the input member (gearcad.loads)."""
    from ..ratio.kinematics import solve_network
    from ..meshes.loads import member_torques, planet_mesh_loads
    from ..materials import load_material
    from ..ratio.planetary_set import set_network
    from ..meshes.strength import PROCESS_CLASS, rate_internal_pair, rate_pair

    speeds = solve_network(set_network(pset), {arrangement.fixed: 0, arrangement.input: 1}).speeds
    torques = member_torques(speeds, arrangement.fixed, arrangement.input, arrangement.output, load.torque)
    relative = float(speeds["sun"] - speeds["carrier"]) * load.speed
    at_sun, at_ring = planet_mesh_loads(torques["sun"], relative, pset.planets, pset.sun, pset.planet)
    material, process = load_material(fab.material_profile), PROCESS_CLASS[fab.process]
    return (rate_pair(sun_pair, at_sun.torque, at_sun.speed, spec.thickness, material, material, process),
            rate_internal_pair(ring_pair, at_ring.torque, at_ring.speed, spec.thickness, material, material, process))


def _plates(spec, fab, tolerance, cx, cy, centre, angles, ps, ring, bolt_circle, top, pin) -> tuple[PlannedPlate, ...]:
    side = 2 * cx
    outer = rounded_rectangle(side, side, fab.plate_corner_radius, tolerance)
    inset = fab.plate_margin / 2
    corners = tuple((x, y, fab.spacer_hole) for x in (inset, side - inset) for y in (inset, side - inset))
    shaft_hole = ((cx, cy, spec.bore + fab.bore_clearance),)
    bolts = tuple((cx + bolt_circle * math.cos(bolt_angle(k)), cy + bolt_circle * math.sin(bolt_angle(k)), fab.spacer_hole)
                  for k in range(RING_BOLTS)) if ps.fixed == "ring" else ()
    plates = []
    for name, z in (("back-plate", -spec.thickness), ("front-plate", top + spec.thickness + fab.layer_gap)):
        part = Part(name, outer, (), shaft_hole + bolts + corners, f"{spec.name} {name}")
        plates.append(PlannedPlate(name, part, kerf_cut(part, fab, tolerance), z))
    # The carrier: a disc on the set's axis holding the planet pins at their angles.
    # The pin holes at least their own diameter from the disc's edge (gearcad.trains.supports.EDGE_RULE).
    radius = centre + max(pin / 2 + max(2.0, 2 * spec.module), 1.5 * (pin + fab.bore_clearance))
    pins = tuple((cx + centre * math.cos(a), cy + centre * math.sin(a), pin + fab.bore_clearance) for a in angles)
    carrier = Part("carrier", circle_loop(cx, cy, 2 * radius, tolerance, clockwise=False), (), shaft_hole + pins,
                   f"{spec.name} carrier, {len(angles)} planet pins on {2 * centre:.3f} mm")
    plates.append(PlannedPlate("carrier", carrier, kerf_cut(carrier, fab, tolerance), top))
    # Its mate under the set: the pins are held at both ends; the two discs turn together (the pins join them).
    lower = Part("carrier-back", carrier.outer, (), carrier.circles,
                 f"{spec.name} carrier-back, {len(angles)} planet pins on {2 * centre:.3f} mm")
    plates.append(PlannedPlate("carrier-back", lower, kerf_cut(lower, fab, tolerance), fab.layer_gap))
    return tuple(plates)
