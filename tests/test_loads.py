"""Loads of planetary sets and differentials: statics against textbook relations, power balance, and the
Hertz stress of an internal pair against ISO 6336-2's form."""

import math
from fractions import Fraction

import pytest

from gearcad.meshes.loads import differential_side_torques, member_torques, planet_mesh_loads
from gearcad.trains.plan import InputLoad
from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train

EPICYCLIC = """name = "epi"
module = 1.0
thickness = 3.0
fabrication = "fdm-pla-0.4mm"
[planetary]
sun = 18
planet = 24
ring = 66
planets = 3
fixed = "{fixed}"
input = "{input}"
"""


@pytest.mark.parametrize("sun,ring", [(18, 66), (24, 72), (30, 90)])
def test_ring_fixed_sun_in_carrier_torque_is_the_textbook_one(sun, ring):
    # Textbook relation (Shigley ch. 13, from memory): ring fixed, sun driving, the carrier carries
    # T_s (1 + z_r / z_s) against it and the ring reacts T_s z_r / z_s.
    ratio = Fraction(sun, sun + ring)  # carrier turns per sun turn
    speeds = {"sun": Fraction(1), "ring": Fraction(0), "carrier": ratio}
    t = member_torques(speeds, "ring", "sun", "carrier", 2.0)
    assert t["carrier"] == pytest.approx(-2.0 * (1 + ring / sun))
    assert t["ring"] == pytest.approx(2.0 * ring / sun)
    assert sum(t.values()) == pytest.approx(0.0, abs=1e-12)
    assert sum(t[m] * float(w) for m, w in speeds.items()) == pytest.approx(0.0, abs=1e-12)  # lossless


@pytest.mark.parametrize("fixed,input", [("ring", "sun"), ("carrier", "sun"), ("sun", "ring"), ("ring", "carrier")])
def test_the_planets_pass_the_ring_exactly_its_reaction(fixed, input):
    # Two derivations must agree: the members' torques (equilibrium and power of the whole set) and the
    # planets' own equilibrium (the rating of one planet's ring mesh, times the planets).
    plan = plan_train(parse_train(EPICYCLIC.format(fixed=fixed, input=input)), load=InputLoad(0.3, 120.0))
    ring_mesh = next(m for m in plan.meshes if "ring" in m.names)
    ring_torque = ring_mesh.rating.gears[1].torque * 3
    from gearcad.ratio.kinematics import solve_network
    from gearcad.ratio.planetary_set import make_arrangement, make_set, set_network

    arrangement = make_arrangement(fixed, input)
    speeds = solve_network(set_network(make_set(18, 24, 66, 3)), {fixed: 0, input: 1}).speeds
    torques = member_torques(speeds, arrangement.fixed, arrangement.input, arrangement.output, 0.3)
    assert ring_torque == pytest.approx(abs(torques["ring"]), rel=1e-9)
    assert plan.meshes[0].rating.gears[0].torque * 3 == pytest.approx(abs(torques["sun"]), rel=1e-9)


def test_planet_loads_scale_with_the_planet_and_share_the_sun():
    sun_mesh, ring_mesh = planet_mesh_loads(0.9, 300.0, 3, 18, 24)
    assert sun_mesh.torque == pytest.approx(0.3) and sun_mesh.speed == pytest.approx(300.0)
    assert ring_mesh.torque == pytest.approx(0.3 * 24 / 18) and ring_mesh.speed == pytest.approx(300.0 * 18 / 24)
    assert ring_mesh.torque * ring_mesh.speed == pytest.approx(sun_mesh.torque * sun_mesh.speed)  # one planet's power


@pytest.mark.parametrize("w_a,w_b", [(1.0, 0.2), (-0.5, 0.75), (3.0, -2.0)])
def test_differential_sides_keep_the_power_balance(w_a, w_b):
    # Virtual work: for any side speeds the sides' powers add up to the carrier's (lossless).
    for kind, sun, ring in (("mean", None, None), ("planetary", 21, 57)):
        t_a, t_b = differential_side_torques(kind, 4.0, sun, ring)
        w_c = (w_a + w_b) / 2 if kind == "mean" else (sun * w_a + ring * w_b) / (sun + ring)
        assert t_a * w_a + t_b * w_b == pytest.approx(4.0 * w_c)


SUMMING = """name = "sum"
module = 1.0
thickness = 3.0
[summing]
differential = "{kind}"
{extra}
[[stage]]
driver = {a}
driven = 30
{idler}
[[stage]]
driver = 20
driven = {b}
idler = 20
"""


@pytest.mark.parametrize("kind,extra,a,b,idler", [
    ("mean", "", 45, 40, ""),                                                 # path a direct, against the input
    ("mean", "", 25, 40, "idler = 20"),                                        # both with the input
    ("planetary", "sun = 15\nplanet = 21\nring = 57\nplanets = 3", 29, 75, "idler = 30"),
])
def test_summing_paths_return_the_input_torque(kind, extra, a, b, idler):
    # Power balance of the whole train, which the rating does not use: the two path drivers' torques,
    # signed by the way each side turns, add up to the torque on the input shaft.
    spec = parse_train(SUMMING.format(kind=kind, extra=extra, a=a, b=b, idler=idler))
    plan = plan_train(spec, load=InputLoad(0.1, 60.0))
    by_name = {m.names[0]: m.rating for m in plan.meshes}
    signs = [(1 if s.idler else -1) for s in spec.stages]
    total = by_name["a-driver"].gears[0].torque * signs[0] + by_name["b-driver"].gears[0].torque * signs[1]
    assert total == pytest.approx(0.1 * (1 if plan.direction == "same" else -1), rel=1e-9)
    assert by_name["a-driver"].speed == pytest.approx(60.0) and by_name["b-driver"].speed == pytest.approx(60.0)


@pytest.mark.parametrize("planet,ring", [(20, 66), (24, 90), (30, 57)])
def test_internal_contact_stress_is_iso_6336_2s_with_a_negative_gear_ratio(planet, ring):
    # ISO 6336-2 (from memory): sigma_H0 = Z_H Z_E sqrt(F_t / (d_1 b) (u + 1) / u), u = z_2 / z_1 negative for an
    # internal pair, Z_H = sqrt(2 / (sin(alpha) cos(alpha))) for unshifted spur gears at the reference circle.
    from gearcad.meshes.internal import make_internal_pair
    from gearcad.profiles import load_tooth_system
    from gearcad.meshes.strength import contact_stress, elastic_coefficient

    pair = make_internal_pair(planet, ring, 2.0, load_tooth_system("iso53-a"))
    alpha = pair.operating_pressure_angle
    assert alpha == pytest.approx(math.radians(20))
    load, width, e, nu = 150.0, 8.0, 3000.0, 0.35
    ours = contact_stress(pair, load, width, e, nu, e, nu)
    u = -ring / planet
    z_h = math.sqrt(2 / (math.sin(alpha) * math.cos(alpha)))
    iso = z_h * elastic_coefficient(e, nu, e, nu) * math.sqrt(load / (2.0 * planet * width) * (u + 1) / u)
    assert ours == pytest.approx(iso, rel=1e-9)


def test_the_ring_is_rated_with_the_racks_form_factor_and_is_the_stronger_gear():
    from gearcad.meshes.internal import make_internal_pair
    from gearcad.materials import load_material
    from gearcad.profiles import load_tooth_system
    from gearcad.meshes.strength import rate_internal_pair

    pair = make_internal_pair(20, 66, 1.0, load_tooth_system("iso53-a"))
    pla = load_material("pla")
    r = rate_internal_pair(pair, 0.1, 100.0, 5.0, pla, pla, "cast")
    pinion, ring = r.gears
    assert ring.torque == pytest.approx(0.1 * 66 / 20) and ring.tangential_load == pytest.approx(pinion.tangential_load)
    # Shigley's table 14-2 (from memory): Y rises with the teeth to about 0.485 for the rack, 0.322 at 20 teeth.
    assert 0.44 < ring.form_factor < 0.49 and ring.form_factor > pinion.form_factor
    assert ring.safety_factor > pinion.safety_factor
