"""Worm pair figures against a handbook worked example; efficiency, friction and limits derived a second way."""

import math

import pytest

from gearcad.errors import InputError
from gearcad.meshes.worm import (analyse_worm_pair, copper_alloy_friction, efficiency_wheel_driving,
                                 efficiency_worm_driving, friction_angle, make_worm_pair, min_wheel_teeth,
                                 worm_friction)

# KHK Gear Technical Reference, "calculations of an axial module cylindrical worm gear pair"
# (m_x 3, z1 2, z2 30, d1 44, x2 0; printed digits, from memory: verify):
# gamma 7.76517 deg, a 67, d2 90, d_a1 50, throat 96, outside 99, d_f1 36.5, d_f2 82.5, throat radius 19.
KHK = dict(gamma=7.76517, a=67.0, d1=44.0, d2=90.0, da1=50.0, throat=96.0, outside=99.0, df1=36.5, df2=82.5, rg=19.0)


@pytest.fixture
def khk():
    return make_worm_pair(2, 30, 3, worm_diameter=44, pressure_angle=20)


def test_khk_axial_module_worm_pair(khk):
    assert math.degrees(khk.lead_angle) == pytest.approx(KHK["gamma"], abs=5e-6)
    assert khk.centre_distance == pytest.approx(KHK["a"], abs=1e-12)
    assert khk.reference_diameter == pytest.approx(KHK["d1"], abs=1e-12)
    assert khk.wheel_reference_diameter == pytest.approx(KHK["d2"], abs=1e-12)
    assert khk.tip_diameter == pytest.approx(KHK["da1"], abs=1e-12)
    assert khk.throat_diameter == pytest.approx(KHK["throat"], abs=1e-12)
    assert khk.outside_diameter == pytest.approx(KHK["outside"], abs=1e-12)
    assert khk.root_diameter == pytest.approx(KHK["df1"], abs=1e-12)
    assert khk.wheel_root_diameter == pytest.approx(KHK["df2"], abs=1e-12)
    assert khk.throat_radius == pytest.approx(KHK["rg"], abs=1e-12)


def test_pitch_and_lead(khk):
    # DIN 3975 definitions: p_x = pi m_x, p_z = z1 p_x; and tan(gamma) = p_z / (pi d1) (the helix unrolled).
    assert khk.axial_pitch == pytest.approx(math.pi * 3, rel=1e-15)
    assert khk.lead == pytest.approx(2 * math.pi * 3, rel=1e-15)
    assert math.tan(khk.lead_angle) == pytest.approx(khk.lead / (math.pi * khk.reference_diameter), rel=1e-14)


def test_the_wheel_face_width_rule_and_its_cap(khk):
    # 0.45 (d_a1 + 4 m) = 0.45 * 62 = 27.9 mm (the rule, from memory); the chord of the worm's tip circle at the
    # throat, 2 sqrt(25^2 - 19^2) = 32.496 mm, does not cap it here.
    assert khk.wheel_face_width == pytest.approx(27.9, abs=1e-12)
    # Worm length: chord of the 48 mm throat circle at the worm's tip line, 42 mm from the wheel's axis.
    assert khk.worm_length == pytest.approx(2 * math.sqrt(48 ** 2 - 42 ** 2), rel=1e-14)


def test_shift_moves_the_centre_and_the_wheel_not_the_worm():
    # DIN 3975: a = (d1 + d2)/2 + x2 m; d_a2 = d2 + 2 m (1 + x2); the throat surface radius stays d1/2 - m.
    p = make_worm_pair(1, 40, 2, diameter_factor=10, wheel_shift=0.25)
    assert p.centre_distance == pytest.approx(10 + 40 + 0.5, rel=1e-15)
    assert p.throat_diameter == pytest.approx(80 + 2 * 2 * 1.25, rel=1e-15)
    assert p.throat_radius == pytest.approx(10 - 2, rel=1e-14)


@pytest.mark.parametrize("z1, q, alpha", [(1, 10, 20), (2, 9, 20), (4, 11, 25), (3, 10, 20)])
def test_zi_base_diameter_two_ways(z1, q, alpha):
    # ISO/TR 10828: d_b1 = d1 tan(gamma)/tan(gamma_b), cos(gamma_b) = cos(gamma) cos(alpha_n).  Second way: the worm
    # as a helical gear with helix angle 90 - gamma: tan(alpha_t) = tan(alpha_n)/sin(gamma), d_b = d1 cos(alpha_t).
    p = make_worm_pair(z1, 40, 2, diameter_factor=q, pressure_angle=alpha, flank="zi")
    alpha_t = math.atan(math.tan(math.radians(alpha)) / math.sin(p.lead_angle))
    assert p.base_diameter == pytest.approx(p.reference_diameter * math.cos(alpha_t), rel=1e-13)


@pytest.mark.parametrize("gamma_deg", [2.0, 5.7, 11.3, 21.8, 35.0])
@pytest.mark.parametrize("mu", [0.02, 0.05, 0.12, 0.3])
def test_efficiencies_match_the_force_balance_form(gamma_deg, mu):
    # Shigley's worm efficiency in force form (from memory): (cos a_n - mu tan g)/(cos a_n + mu cot g) worm driving,
    # and (cos a_n - mu cot g)/(cos a_n + mu tan g) wheel driving (zero or less: self-locking).
    g, an = math.radians(gamma_deg), math.radians(20)
    rho = friction_angle(mu, an)
    forward = (math.cos(an) - mu * math.tan(g)) / (math.cos(an) + mu / math.tan(g))
    back = (math.cos(an) - mu / math.tan(g)) / (math.cos(an) + mu * math.tan(g))
    assert efficiency_worm_driving(g, rho) == pytest.approx(forward, rel=1e-12)
    assert efficiency_wheel_driving(g, rho) == pytest.approx(max(back, 0.0), abs=1e-12)


def test_self_locking_starts_where_the_wheel_driving_efficiency_vanishes():
    # gamma = rho' exactly when mu = tan(gamma) cos(alpha_n) (the force form's numerator above).
    p = make_worm_pair(1, 40, 2, diameter_factor=10)
    mu = math.tan(p.lead_angle) * math.cos(p.normal_pressure_angle)
    assert analyse_worm_pair(p, friction=mu * 1.0001).self_locking
    assert not analyse_worm_pair(p, friction=mu * 0.9999).self_locking


def test_copper_alloy_friction_curve():
    # AGMA's curve as Shigley gives it (from memory): 0.15 at rest; the two branches, fitted separately, meet within
    # 2 % at 10 ft/min (a check that the recollection is right), and friction falls with speed.
    assert copper_alloy_friction(0.0) == 0.15
    edge = 10 * 0.3048 / 60
    below, above = copper_alloy_friction(edge * (1 - 1e-9)), copper_alloy_friction(edge * (1 + 1e-9))
    assert abs(below / above - 1) < 0.025
    speeds = [0.001, 0.01, 0.1, 1.0, 5.0, 15.0]
    values = [copper_alloy_friction(v) for v in speeds]
    assert values == sorted(values, reverse=True)


def test_unknown_material_pair_is_refused_with_the_allowed_pairs():
    with pytest.raises(InputError, match="allowed pairs"):
        worm_friction("pla", "bronze", 0.0)


def test_midplane_contact_ratio_by_coordinates(khk):
    # Second derivation: place the wheel's centre at the origin and the rack (the worm's axial section) with its
    # pitch line tangent at P = (0, r2); the line of action through P at alpha_x; its ends are where it meets the
    # wheel's throat circle and the rack's tip line, found here by solving the line-circle quadratic directly.
    a = khk.axial_pressure_angle
    r2, ra = 45.0, 48.0
    d = (math.cos(a), -math.sin(a))  # direction along the line of action, into the wheel
    # Point P + t d on the circle |.| = ra: t^2 + 2 t (P.d) + r2^2 - ra^2 = 0; take the root on the approach side.
    pd = r2 * d[1]
    t_tip = -pd - math.sqrt(pd * pd - (r2 * r2 - ra * ra))
    # The rack's tip line y = r2 - m (x2 = 0): r2 + t d_y = r2 - m.
    t_rack = -3.0 / d[1]
    length = t_rack - t_tip
    assert khk.midplane_contact_ratio == pytest.approx(length / (math.pi * 3 * math.cos(a)), rel=1e-12)


def test_undercut_limit_of_the_wheel():
    # ISO 21771 rack-generation limit 2/sin^2(alpha): 17.097 at 20 degrees, so 17 teeth undercut and 18 do not.
    assert min_wheel_teeth(math.radians(20)) == pytest.approx(17.097, abs=5e-4)
    make_worm_pair(1, 18, 2, diameter_factor=10)
    with pytest.raises(InputError, match="wheel teeth 17 is too few.*at least 18"):
        make_worm_pair(1, 17, 2, diameter_factor=10)
    make_worm_pair(1, 17, 2, diameter_factor=10, wheel_shift=0.1)  # a positive shift lowers the limit


def test_lead_angle_beyond_the_flank_forms_range():
    # 4 starts on q 10: gamma = 21.8 deg, beyond ZA's 15 deg (common practice); ZI takes it.
    with pytest.raises(InputError, match="lead angle 21.801 degrees.*ZA.*--flank zi"):
        make_worm_pair(4, 40, 2, diameter_factor=10)
    make_worm_pair(4, 40, 2, diameter_factor=10, flank="zi")
    with pytest.raises(InputError, match="base cylinder"):
        make_worm_pair(12, 60, 2, diameter_factor=12, flank="zi", pressure_angle=10)


@pytest.mark.parametrize("kwargs, word", [
    (dict(starts=0), "worm starts"), (dict(starts=1.5), "worm starts"), (dict(wheel_teeth=10 ** 9), "wheel teeth"),
    (dict(module=1e9), "module"), (dict(module=float("nan")), "module"), (dict(diameter_factor=1e6), "diameter factor"),
    (dict(pressure_angle=45), "pressure angle"), (dict(flank="zx"), "flank form"),
])
def test_bad_values_are_named(kwargs, word):
    args = dict(starts=1, wheel_teeth=40, module=2, diameter_factor=10)
    args.update(kwargs)
    with pytest.raises(InputError, match=word):
        make_worm_pair(args.pop("starts"), args.pop("wheel_teeth"), args.pop("module"), **args)


def test_speed_lowers_friction_and_raises_efficiency(khk):
    rest, running = analyse_worm_pair(khk), analyse_worm_pair(khk, worm_speed=1450)
    assert running.sliding_speed == pytest.approx(math.pi * 44 * 1450 / 60000 / math.cos(khk.lead_angle), rel=1e-14)
    assert running.efficiency > rest.efficiency
    assert any(f.check == "self-locking" and "not a brake" in f.message for f in rest.findings)
