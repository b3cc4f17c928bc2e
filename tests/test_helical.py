"""Helical gears and pairs: ISO 21771 figures, a handbook example, and independent constructions."""

import math

import numpy as np
import pytest

from gearcad.meshes.checks import analyse_pair
from gearcad.errors import InputError
from gearcad.geometry import SpurGear, outline, tooth_profile
from gearcad.meshes import helical as hx
from gearcad.meshes.pair import make_pair
from gearcad.profiles import load_tooth_system

ISO53A = load_tooth_system("iso53-a")


# -- a handbook's worked example -------------------------------------------------------------------
# KHK Gear technical reference, "Calculations for helical gears in the normal system" (worked example
# table: m_n = 3, alpha_n = 20 deg, beta = 30 deg, z = 12 and 60, x_n1 = +0.09809, x_n2 = 0, a = 125 mm)
# (from memory: verify).  The printed figures, to the digits printed:
KHK = dict(teeth=(12, 60), module=3.0, helix=30.0, shifts=(0.09809, 0.0))


@pytest.fixture(scope="module")
def khk_pair():
    return hx.make_helical_pair(12, 60, 3.0, ISO53A, math.radians(30.0), "right", shifts=(0.09809, 0.0))


def test_khk_transverse_pressure_angle_and_module(khk_pair):
    g1 = khk_pair.gear1
    assert math.degrees(g1.pressure_angle) == pytest.approx(22.79588, abs=5e-6)  # alpha_t = 22.79588 deg (KHK, from memory)
    assert g1.module == pytest.approx(3.46410, abs=5e-6)  # m_t = 3 / cos 30 = 3.46410 (ISO 21771 formula)


def test_khk_working_pressure_angle_and_centre(khk_pair):
    p = khk_pair
    assert math.degrees(p.operating_pressure_angle) == pytest.approx(23.1126, abs=5e-5)  # alpha_wt = 23.1126 deg (KHK)
    assert p.centre_distance == pytest.approx(125.000, abs=5e-4)  # a = 125.000 mm (KHK)
    # y = 0.09744 printed (normal modules, KHK, from memory); (125 - 124.70766) / 3 = 0.097447, so the print
    # truncates: held to one unit of the last printed digit.
    assert p.centre_modification * p.module / 3.0 == pytest.approx(0.09744, abs=1e-5)


@pytest.mark.parametrize("index, reference, base, working, tip, root", [
    # KHK (from memory: verify): d, d_b, d_w, d_a, d_f in mm
    (0, 41.569, 38.322, 41.667, 48.154, 34.658),
    (1, 207.846, 191.611, 208.333, 213.842, 200.346),
])
def test_khk_diameters(khk_pair, index, reference, base, working, tip, root):
    g = (khk_pair.gear1, khk_pair.gear2)[index]
    assert g.reference_diameter == pytest.approx(reference, abs=5e-4)
    assert g.base_diameter == pytest.approx(base, abs=5e-4)
    assert khk_pair.working_diameters()[index] == pytest.approx(working, abs=5e-4)
    assert g.tip_diameter == pytest.approx(tip, abs=5e-4)
    assert g.root_diameter == pytest.approx(root, abs=5e-4)


# -- every figure a second way -------------------------------------------------------------------------

def test_working_angle_and_centre_by_the_normal_formulas(khk_pair):
    # ISO 21771's helical formulas (normal shifts, tan alpha_n) against the spur route on the transverse section.
    p = khk_pair
    alpha_wt = hx.working_transverse_pressure_angle(12, 60, ISO53A.pressure_angle, math.radians(30), 0.09809)
    assert alpha_wt == pytest.approx(p.operating_pressure_angle, rel=1e-13)
    a = hx.helical_centre_distance(12, 60, 3.0, ISO53A.pressure_angle, math.radians(30), 0.09809)
    assert a == pytest.approx(p.centre_distance, rel=1e-13)


@pytest.mark.parametrize("beta_deg", [8.0, 15.0, 22.5, 30.0, 44.0])
def test_base_helix_two_ways(beta_deg):
    # sin(beta_b) = sin(beta) cos(alpha_n)  and  tan(beta_b) = tan(beta) cos(alpha_t)  (ISO 21771): one angle.
    beta = math.radians(beta_deg)
    alpha_t = hx.transverse_pressure_angle(ISO53A.pressure_angle, beta)
    assert hx.base_helix_angle(beta, ISO53A.pressure_angle) == pytest.approx(math.atan(math.tan(beta) * math.cos(alpha_t)), rel=1e-13)


@pytest.mark.parametrize("beta_deg", [10.0, 25.0, 40.0])
def test_lead_is_the_same_on_every_cylinder(beta_deg):
    # A helix has one lead: pi d / tan(beta) at the reference cylinder = pi d_b / tan(beta_b) at the base (ISO 21771).
    g = hx.helical_gear(17, 2.0, ISO53A, math.radians(beta_deg), "left")
    assert g.lead == pytest.approx(math.pi * g.base_diameter / math.tan(g.base_helix_angle), rel=1e-13)


def test_contact_ratio_formula_equals_the_transverse_spur_analysis(khk_pair):
    # ISO 21771's eps_alpha with the transverse base pitch built from the normal one,
    # p_bt = pi m_n cos(alpha_n) / cos(beta_b), against the spur analysis of the transverse section.
    p = khk_pair
    g1, g2 = p.gear1, p.gear2
    p_bt = math.pi * 3.0 * math.cos(ISO53A.pressure_angle) / math.cos(g1.base_helix_angle)
    eps = hx.transverse_contact_ratio((g1.tip_diameter, g2.tip_diameter), (g1.base_diameter, g2.base_diameter),
                                      p.centre_distance, p.operating_pressure_angle, p_bt)
    assert analyse_pair(p).contact_ratio == pytest.approx(eps, rel=1e-12)


def test_overlap_ratio_from_the_axial_pitch():
    # eps_beta = b / p_x with the axial pitch p_x = p_z / z (lead over teeth): a second derivation.
    g = hx.helical_gear(20, 1.5, ISO53A, math.radians(20), "right")
    b = 12.0
    assert hx.overlap_ratio(b, g.helix_angle, g.normal_module) == pytest.approx(b / (g.lead / g.teeth), rel=1e-13)


def test_virtual_teeth_from_the_curvature_of_the_normal_section():
    # The normal section of the reference cylinder is an ellipse with semi-axes r / cos(beta) and r; its
    # curvature radius at the pitch point is r / cos²(beta), so z_n ~ z / cos³(beta) (Shigley, from memory);
    # ISO 21771's z / (cos²(beta_b) cos(beta)) lies between z/cos(beta)... and that bound for any alpha_n.
    beta = math.radians(30)
    z_iso = hx.virtual_teeth(20, beta, ISO53A.pressure_angle)
    assert 20 / math.cos(beta) < z_iso < 20 / math.cos(beta) ** 3
    # and for alpha_n -> 0 the base helix becomes the helix itself: z / cos³(beta)
    assert hx.virtual_teeth(20, beta, 1e-9) == pytest.approx(20 / math.cos(beta) ** 3, rel=1e-12)


def test_axial_force():
    # F_a = F_t tan(beta): at 45 degrees equal to the tangential force (statics of the helix).
    assert hx.axial_force(100.0, math.radians(45)) == pytest.approx(100.0, rel=1e-13)
    assert hx.axial_force(100.0, 0.0) == 0.0


# -- beta = 0 is today's spur pair ------------------------------------------------------------------------

def test_zero_helix_is_exactly_the_spur_pair():
    spur = make_pair(13, 31, 1.5, ISO53A, shifts=(0.3, -0.1), backlash=0.05)
    same = hx.make_helical_pair(13, 31, 1.5, ISO53A, 0.0, shifts=(0.3, -0.1), backlash=0.05)
    assert same == spur
    assert np.array_equal(outline(same.gear1), outline(spur.gear1))


def test_transverse_system_at_zero_is_the_system():
    assert hx.transverse_system(ISO53A, 0.0) is ISO53A


# -- bad input ---------------------------------------------------------------------------------------------

@pytest.mark.parametrize("degrees", [45.0, 60.0, -1.0, math.nan, math.inf])
def test_helix_out_of_range(degrees):
    with pytest.raises(InputError, match="helix angle"):
        hx.check_helix(degrees)


def test_unknown_hand():
    with pytest.raises(InputError, match="hand must be left or right"):
        hx.check_hand("up")


def test_hands_that_cannot_mesh():
    assert hx.hand_findings("right", "right")[0].severity == "failure"
    assert hx.hand_findings("right", "left")[0].severity == "ok"
    assert hx.hand_findings("left", "left", internal=True)[0].severity == "ok"
    assert hx.hand_findings("left", "right", internal=True)[0].severity == "failure"


# -- the transverse outline, built a second way: the normal rack in 3D -------------------------------------
# The rack cutter's teeth are prisms along the tooth direction, which lies in the pitch plane at beta to the
# gear's axis.  A point's distance to a prism is its distance, in the prism's own cross-section (the normal
# section), to the normal basic rack: straight flanks at alpha_n, the tip line, circular tip rounds of
# rho_fP m_n.  Rolling is planar (the rack slides along x, the gear turns by s / r), so the transverse plane
# z = 0 keeps its points; an outline vertex is right when its least signed distance to the rack over all
# rolling positions is zero.  Nothing of the transverse rack (alpha_t, the elliptical round) is used.

def normal_rack_distance(w, v, m_n, system, datum):
    """Signed distance (mm, negative inside) to the periodic normal rack; w across the teeth, v up from the rolling line."""
    a = system.pressure_angle
    rho = system.fillet_radius * m_n
    vc = datum - system.dedendum * m_n + rho
    uc = math.pi * m_n / 4 + (vc - datum) * math.tan(a) - rho / math.cos(a)
    pitch = math.pi * m_n
    u = np.abs(w - pitch * np.round(w / pitch))
    rel_u, rel_v = u - uc, v - vc
    along = rel_u * math.sin(a) + rel_v * math.cos(a)
    across = rel_u * math.cos(a) - rel_v * math.sin(a)
    corner = np.hypot(rel_u, rel_v)
    to_flank = np.where(along >= 0, np.abs(across), corner)
    to_tip = np.where(u <= uc, np.abs(rel_v), corner)
    nearest = np.minimum(to_flank, to_tip)
    inside = (rel_v >= 0) & (across <= 0)
    return np.where(inside, -nearest, nearest) - rho


def least_distance_3d(points, gear, m_n, beta, system, shift_n):
    r = gear.reference_diameter / 2
    z = gear.teeth
    turn = math.pi / 2 - math.pi / z
    c, s = math.cos(turn), math.sin(turn)
    q = points @ np.array([[c, -s], [s, c]]).T
    theta = np.arctan2(q[:, 1], q[:, 0])
    centre = r * (theta - math.pi / 2)
    span = 6 * gear.module / math.sin(gear.pressure_angle)
    datum = shift_n * m_n

    def f(shift):
        ang = -shift / r
        x = np.cos(ang) * q[:, :1] - np.sin(ang) * q[:, 1:]
        y = np.sin(ang) * q[:, :1] + np.cos(ang) * q[:, 1:]
        # rack frame (X along the pitch line, Y up from the rolling line, Z = 0): the normal section's
        # coordinate across the teeth is X cos(beta) (the tooth direction is (sin beta, 0, cos beta)).
        return normal_rack_distance((x - shift) * math.cos(beta), y - r, m_n, system, datum)

    grid = centre[:, None] + np.linspace(-span, span, 1201)[None, :]
    values = f(grid)
    best = np.argmin(values, axis=1)
    step = grid[0, 1] - grid[0, 0]
    lo = grid[np.arange(len(q)), best] - step
    hi = lo + 2 * step
    golden = (math.sqrt(5) - 1) / 2
    for _ in range(60):
        m1 = hi - golden * (hi - lo)
        m2 = lo + golden * (hi - lo)
        left = f(m1[:, None])[:, 0] < f(m2[:, None])[:, 0]
        hi = np.where(left, m2, hi)
        lo = np.where(left, lo, m1)
    return f((0.5 * (lo + hi))[:, None])[:, 0]


@pytest.mark.parametrize("teeth, beta_deg, shift_n, system", [
    (20, 20.0, 0.0, "iso53-a"),
    (12, 30.0, 0.09809, "iso53-a"),   # the KHK pinion
    (8, 35.0, 0.0, "iso53-a"),        # undercut
    (30, 15.0, -0.2, "iso53-c"),
    (15, 40.0, 0.3, "full-25"),
])
def test_transverse_outline_against_the_normal_rack_in_3d(teeth, beta_deg, shift_n, system):
    normal = load_tooth_system(system)
    beta = math.radians(beta_deg)
    gear = hx.helical_gear(teeth, 1.0, normal, beta, "right", shift=shift_n)
    profile = tooth_profile(gear, tolerance=1e-3)
    for curve in profile.curves:
        on_curve = least_distance_3d(curve.points, gear, 1.0, beta, normal, shift_n)
        if curve.kind == "tip":
            assert on_curve.min() > -1e-9
        else:  # every cut vertex touches the 3D rack: asked within 1 µm, held to 1e-9 mm (measured ~1e-15)
            assert np.max(np.abs(on_curve)) < 1e-9, curve.kind


def test_undercut_limit_in_the_normal_section():
    # Without shift a helical gear is free of undercut from z = z_min cos³(beta) on (rack-generation condition on
    # the transverse section; Niemann and Winter vol. II, from memory): z_min = 2 h / sin²(alpha_n) for spur.
    beta = math.radians(30)
    g = hx.helical_gear(14, 1.0, ISO53A, beta)
    spur = SpurGear(14, 1.0, ISO53A)
    assert tooth_profile(spur).undercut
    # 14 cos^3(30 deg)-scale: x_min in the normal section = h - z sin²(alpha_t) / (2 cos beta) < 0 here
    x_min_n = ISO53A.straight_flank_depth - 14 * math.sin(g.pressure_angle) ** 2 / (2 * math.cos(beta))
    assert x_min_n < 0
    assert not tooth_profile(g).undercut
