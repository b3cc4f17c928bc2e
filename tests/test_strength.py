"""Load ratings: the Lewis form factor from the outline, Barth's velocity factor, Hertz contact, loads, findings.

Every check names its source beside it; "(from memory)" marks a recalled figure.
"""

import math

import mpmath
import numpy as np
import pytest
from shapely.geometry import Polygon

from gearcad.errors import InputError
from gearcad.geometry.gear import SpurGear
from gearcad.geometry.generate import tooth_profile
from gearcad.materials import load_material
from gearcad.meshes.pair import make_pair
from gearcad.profiles import load_tooth_system
from gearcad.meshes.strength import (
    CAUTION,
    PROCESS_CLASS,
    bending_stress,
    contact_stress,
    elastic_coefficient,
    lewis_form_factor,
    pitch_line_speed,
    rate_pair,
    tangential_load,
    torque_from_power,
    velocity_factor,
)

LBF = 4.4482216152605  # N per pound-force (exact definition)
INCH = 25.4  # mm (exact definition)
PSI = 0.00689475729  # MPa per psi
RACK = 10_000  # the largest tooth count a SpurGear takes stands in for the rack

# Shigley's Mechanical Engineering Design, Table 14-2: Lewis form factor Y, 20 degree full-depth
# teeth, load at the tip (from memory).  The rack is entered as z = RACK.
SHIGLEY_Y = {12: 0.245, 13: 0.261, 14: 0.277, 15: 0.290, 16: 0.296, 17: 0.303, 18: 0.309, 19: 0.314,
             20: 0.322, 21: 0.328, 22: 0.331, 24: 0.337, 26: 0.346, 28: 0.353, 30: 0.359, 34: 0.371,
             38: 0.384, 43: 0.397, 50: 0.409, 60: 0.422, 75: 0.435, 100: 0.447, 150: 0.460,
             300: 0.472, 400: 0.480, RACK: 0.485}

# The tooth system compared: iso53-b, 20 deg, addendum 1.0 m, dedendum 1.25 m, rack fillet 0.30 m,
# which is also the AGMA 201.02 20 degree full-depth basic rack (from memory).
# Deviation bands found (computed / table - 1), all on the low, conservative side:
#   z 12..16 (undercut by a rack cutter): -6.3 % .. -8.2 %;   z 17..22: -3.3 % .. -5.9 %;
#   z 24..150: -1.0 % .. -2.8 %;   z 300..rack (critical section on the straight flank): -2.9 % .. -4.5 %.
BANDS = [(16, -0.09), (22, -0.065), (150, -0.03), (RACK, -0.05)]


def band(z):
    return next(low for top, low in BANDS if z <= top)


@pytest.fixture(scope="module")
def b_rack():
    return load_tooth_system("iso53-b")


@pytest.mark.parametrize("z, table", sorted(SHIGLEY_Y.items()))
def test_lewis_y_against_shigley_table(b_rack, z, table):
    # Shigley Table 14-2 (from memory) against Y computed from the generated outline.
    y = lewis_form_factor(SpurGear(z, 1.0, b_rack)).form_factor
    deviation = y / table - 1
    assert band(z) <= deviation <= 0.0, f"z={z}: computed {y:.4f}, table {table}, deviation {deviation:+.2%}"


def test_lewis_y_closed_form_for_a_rack(b_rack):
    # Derived here: on a straight flank y(v) = pi/4 - v tan(a) (module 1, v from the datum line) the least
    # y²/(L - v) lies where 2 tan(a) (L - v) = y, so x = 4 tan²(a) (L - v) = pi tan(a) - 4 L tan²(a), with
    # the load point L = h_a - (pi/4 - h_a tan a) tan a where the tip normal crosses the centre line.
    a = b_rack.pressure_angle
    ha = b_rack.addendum
    t = math.tan(a)
    load = ha - (math.pi / 4 - ha * t) * t
    expected = 2 / 3 * (math.pi * t - 4 * load * t * t)
    result = lewis_form_factor(SpurGear(RACK, 1.0, b_rack))
    assert result.form_factor == pytest.approx(expected, rel=2e-3)
    assert result.critical_curve == "involute"  # touches the straight part of the flank, above the fillet
    assert math.degrees(result.load_angle) == pytest.approx(math.degrees(a), abs=0.05)  # rack: tip normal at alpha


def _tooth_polygon(gear, load_radius):
    """One tooth pitch closed through the gear body, in coordinates relative to the load point."""
    pts = tooth_profile(gear, 1e-5).points() - (load_radius, 0.0)
    deep = gear.root_diameter / 2 - 2 * gear.module
    a = math.pi / gear.teeth
    corner = (deep * math.cos(a) - load_radius, deep * math.sin(a))
    return Polygon(np.vstack([pts, [corner, (corner[0], -corner[1])]]))


@pytest.mark.parametrize("z", [12, 17, 30, 100, 400, RACK])
def test_lewis_parabola_is_the_largest_that_fits_inside_the_tooth(b_rack, z):
    # Independent check of the construction (the Lewis parabola of uniform strength inscribed in the
    # tooth): bisect on the parabola y² = k (r_L - u) with shapely containment; the largest k that
    # fits must be the Lewis x = t²/(4 l).
    gear = SpurGear(z, 1.0, b_rack)
    result = lewis_form_factor(gear)
    tooth = _tooth_polygon(gear, result.load_radius)
    depth = result.load_radius - result.critical_point[0] + 0.2

    def fits(k):
        y = np.linspace(-math.sqrt(k * depth), math.sqrt(k * depth), 4001)
        return tooth.contains(Polygon(np.column_stack((-y * y / k, y))))

    lo, hi = 0.5 * result.lewis_x, 1.5 * result.lewis_x
    assert fits(lo) and not fits(hi)
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if fits(mid) else (lo, mid)
    assert lo == pytest.approx(result.lewis_x, rel=1e-5)


@pytest.mark.parametrize("z", [12, 20, 50, 100])
def test_lewis_parabola_is_tangent_to_the_fillet(b_rack, z):
    # Graphical property of the Lewis construction: the parabola touches the fillet, and a parabola's
    # tangent meets its axis as far beyond the vertex as the touching point lies before it
    # (subtangent bisected by the vertex; any analytic geometry text).  The fillet's own tangent at
    # the nearest sampled point is used; it lies within a few micrometres of the touching point.
    gear = SpurGear(z, 1.0, b_rack)
    result = lewis_form_factor(gear)
    assert result.critical_curve == "fillet"
    fillet = next(c for c in tooth_profile(gear, 1e-5).curves if c.kind == "fillet" and c.points[:, 1].max() > 0)
    i = int(np.argmin(np.hypot(*(fillet.points - result.critical_point).T)))
    (u, y), (tu, ty) = fillet.points[i], fillet.tangents[i]
    crossing = u - y * tu / ty
    assert crossing - result.load_radius == pytest.approx(result.height, rel=0.03)


def test_lewis_result_is_consistent_and_scale_free(b_rack):
    # Lewis x = t²/(4 l) (Shigley eq. 14-3 derivation, from memory); Y on the module basis does not
    # depend on the module (similar teeth), lengths scale with it.
    one = lewis_form_factor(SpurGear(18, 1.0, b_rack))
    big = lewis_form_factor(SpurGear(18, 2.5, b_rack))
    assert one.lewis_x == pytest.approx(one.thickness ** 2 / (4 * one.height), rel=1e-9)
    assert big.form_factor == pytest.approx(one.form_factor, rel=1e-9)
    assert big.thickness == pytest.approx(2.5 * one.thickness, rel=1e-9)
    assert big.load_radius == pytest.approx(2.5 * one.load_radius, rel=1e-12)


def test_lewis_y_responds_to_shift_thinning_and_tooth_count(b_rack):
    # Common practice: positive profile shift thickens the root of a small pinion (stronger), tooth
    # thinning for backlash weakens it; Y grows with tooth count (Shigley Table 14-2, from memory).
    base = lewis_form_factor(SpurGear(12, 1.0, b_rack)).form_factor
    assert lewis_form_factor(SpurGear(12, 1.0, b_rack, shift=0.4)).form_factor > base * 1.1
    assert lewis_form_factor(SpurGear(12, 1.0, b_rack, thinning=0.1)).form_factor < base
    ys = [lewis_form_factor(SpurGear(z, 1.0, b_rack)).form_factor for z in (12, 20, 40, 80, 160)]
    assert ys == sorted(ys)


def test_normal_load_form_factor_uses_the_load_angle(b_rack):
    # Resolving the tip normal load (W_t / cos a) normal to the centre line gives W_t cos(phi_L) / cos(a)
    # (statics); for a finite gear phi_L > a, so the normal-load Y is the larger (less conservative).
    r = lewis_form_factor(SpurGear(20, 1.0, b_rack))
    assert r.load_angle > b_rack.pressure_angle
    assert r.normal_load_form_factor == pytest.approx(
        r.form_factor * math.cos(b_rack.pressure_angle) / math.cos(r.load_angle), rel=1e-12)


# -- velocity factor -------------------------------------------------------------------------

@pytest.mark.parametrize("process, speed", [("cast", 3.05), ("milled", 6.1), ("hobbed", 3.56 ** 2)])
def test_barth_factors_double_at_their_constant(process, speed):
    # Shigley eqs. 14-4a to 14-4c in SI (from memory): (3.05 + V)/3.05, (6.1 + V)/6.1, (3.56 + sqrt V)/3.56.
    assert velocity_factor(0.0, process) == 1.0
    assert velocity_factor(speed, process) == pytest.approx(2.0, rel=1e-12)


def test_barth_factor_ground():
    # Shigley eq. 14-4d in SI (from memory): sqrt((5.56 + sqrt V)/5.56).
    assert velocity_factor(5.56 ** 2, "ground") == pytest.approx(math.sqrt(2.0), rel=1e-12)


def test_barth_si_matches_the_feet_per_minute_form():
    # Shigley eq. 14-4b in US units (from memory): K_v = (1200 + V)/1200 with V in ft/min; Example 14-1
    # (from memory): V = 628 ft/min gives K_v = 1.52.
    v_fpm = 628.0
    assert velocity_factor(v_fpm * 0.3048 / 60, "milled") == pytest.approx((1200 + v_fpm) / 1200, rel=2e-3)
    assert velocity_factor(v_fpm * 0.3048 / 60, "milled") == pytest.approx(1.52, abs=0.01)


def test_fabrication_processes_map_to_barth_classes():
    # Our choice (strength.PROCESS_CLASS, common practice): printed and laser-cut profiles as cast, CNC as milled.
    assert PROCESS_CLASS == {"fdm": "cast", "laser": "cast", "cnc": "milled"}
    assert velocity_factor(2.0, "laser") == velocity_factor(2.0, "cast")
    assert velocity_factor(2.0, "cnc") == velocity_factor(2.0, "milled")


def test_velocity_factor_refuses_bad_input():
    # Input rules of the project: the message names the value and what is allowed.
    with pytest.raises(InputError, match="process.*waterjet"):
        velocity_factor(1.0, "waterjet")
    with pytest.raises(InputError, match="pitch-line speed"):
        velocity_factor(-1.0, "cast")
    with pytest.raises(InputError, match="pitch-line speed"):
        velocity_factor(math.nan, "cast")


# -- loads -----------------------------------------------------------------------------------

def test_torque_and_tangential_load_round_trip():
    # Statics: W_t = T / r; power = force x velocity (P = W_t V); T[N·m] = 9549 P[kW] / n[rpm] (common practice).
    assert tangential_load(2.5, 40.0) == pytest.approx(125.0, rel=1e-12)
    assert tangential_load(2.5, 40.0) * 40.0 / 2000 == pytest.approx(2.5, rel=1e-12)
    power, rpm, d = 750.0, 1450.0, 36.0
    assert tangential_load(torque_from_power(power, rpm), d) * pitch_line_speed(rpm, d) == pytest.approx(power, rel=1e-12)
    assert torque_from_power(1000.0, 9549.2966) == pytest.approx(1.0, rel=1e-7)


def test_pitch_line_speed_of_shigley_example_14_1():
    # Shigley Example 14-1 (from memory): d = 2 in at 1200 rev/min gives V = 628 ft/min.
    assert pitch_line_speed(1200.0, 2 * INCH) * 60 / 0.3048 == pytest.approx(628.3, abs=0.1)


@pytest.mark.parametrize("bad", [0.0, -1.0, math.nan, math.inf])
def test_loads_refuse_bad_values(bad):
    # Input rules of the project: torque, power and speed must be > 0 and finite; the message names the value.
    with pytest.raises(InputError, match="torque.*greater than 0|torque.*finite"):
        tangential_load(bad, 40.0)
    with pytest.raises(InputError, match="power"):
        torque_from_power(bad, 100.0)
    with pytest.raises(InputError, match="speed"):
        torque_from_power(100.0, bad)
    with pytest.raises(InputError, match="speed"):
        pitch_line_speed(bad, 40.0)


# -- stresses --------------------------------------------------------------------------------

def test_bending_stress_of_shigley_example_14_1(b_rack):
    # Shigley Example 14-1 (from memory): 16 teeth, P = 8 teeth/in, F = 1.5 in, 1200 rev/min, Y = 0.296,
    # allowable 10 kpsi (Sy 30 kpsi / n_d 3) gives W_t = 364 lbf.  Back: 364 lbf must give about 10 kpsi.
    gear = SpurGear(16, INCH / 8, b_rack)
    v = pitch_line_speed(1200.0, gear.reference_diameter)
    sigma = bending_stress(gear, 364 * LBF, 1.5 * INCH, v, "milled", form_factor=0.296)
    assert sigma / PSI == pytest.approx(10_000, rel=5e-3)


def test_bending_stress_is_lewis_with_the_velocity_factor(b_rack):
    # Lewis: sigma = K_v W_t / (b m Y) (Shigley eq. 14-7 form, from memory), Y computed from the outline.
    gear = SpurGear(24, 1.5, b_rack)
    y = lewis_form_factor(gear).form_factor
    assert bending_stress(gear, 200.0, 8.0, 0.0) == pytest.approx(200.0 / (8.0 * 1.5 * y), rel=1e-12)
    assert bending_stress(gear, 200.0, 8.0, 3.05, "cast") == pytest.approx(2 * 200.0 / (8.0 * 1.5 * y), rel=1e-12)
    with pytest.raises(InputError, match="face width"):
        bending_stress(gear, 200.0, 0.0, 1.0)


def test_elastic_coefficient_steel_on_steel():
    # Shigley Table 14-5 (from memory): steel on steel (30 Mpsi, nu 0.30) C_p = 2300 sqrt(psi), 191 sqrt(MPa).
    assert elastic_coefficient(30e6, 0.30, 30e6, 0.30) == pytest.approx(2300, rel=0.01)
    assert elastic_coefficient(30e6 * PSI, 0.30, 30e6 * PSI, 0.30) == pytest.approx(191, rel=0.01)
    with pytest.raises(InputError, match="Poisson"):
        elastic_coefficient(2e5, 0.5, 2e5, 0.3)


def test_contact_stress_of_shigley_example_14_3(b_rack):
    # Shigley Example 14-3 (from memory): the 16-tooth P = 8 steel pinion (30 Mpsi, nu 0.292) with a 50-tooth
    # cast-iron gear (14.5 Mpsi, nu 0.211), F = 1.5 in, W_t = 382 lbf, K_v = 1.52: C_p = 1817 sqrt(psi),
    # r1 = 0.342 in, r2 = 1.069 in, sigma_C = 72.4 kpsi.
    assert elastic_coefficient(30e6, 0.292, 14.5e6, 0.211) == pytest.approx(1817, rel=2e-3)
    pair = make_pair(16, 50, INCH / 8, b_rack, shifts=(0.0, 0.0))
    v = pitch_line_speed(1200.0, 2 * INCH)
    sigma = contact_stress(pair, 382 * LBF, 1.5 * INCH, 30e6 * PSI, 0.292, 14.5e6 * PSI, 0.211, v, "milled")
    assert sigma / PSI == pytest.approx(72_400, rel=5e-3)


def test_contact_stress_against_hertz_half_width_and_pressure_integral(b_rack):
    # Independent path: Hertz line contact (Johnson, Contact Mechanics, ch. 4, from memory):
    # half-width a = sqrt(4 w R / (pi E*)) for a load w per unit length, the pressure p0 sqrt(1 - (s/a)²)
    # integrates to w; p0 found from that integral with mpmath.  Shifted pair, unlike materials.
    mpmath.mp.dps = 30
    pair = make_pair(14, 37, 2.0, b_rack, shifts=(0.45, 0.1))
    e1, nu1, e2, nu2 = 2900.0, 0.35, 207000.0, 0.29
    wt, width = 150.0, 10.0
    alpha_w = math.acos(pair.standard_centre_distance * math.cos(b_rack.pressure_angle) / pair.centre_distance)
    r1 = pair.centre_distance * 14 / 51 * math.sin(alpha_w)  # flank radii at the pitch point
    r2 = pair.centre_distance * 37 / 51 * math.sin(alpha_w)
    w = mpmath.mpf(wt) / mpmath.cos(alpha_w) / width  # normal load per mm of face
    radius = 1 / (1 / mpmath.mpf(r1) + 1 / mpmath.mpf(r2))
    e_star = 1 / ((1 - nu1 ** 2) / mpmath.mpf(e1) + (1 - nu2 ** 2) / mpmath.mpf(e2))
    a = mpmath.sqrt(4 * w * radius / (mpmath.pi * e_star))
    p0 = w / mpmath.quad(lambda s: mpmath.sqrt(1 - (s / a) ** 2), [-a, a])
    assert contact_stress(pair, wt, width, e1, nu1, e2, nu2) == pytest.approx(float(p0), rel=1e-9)


# -- rating of a pair ---------------------------------------------------------------------------

@pytest.fixture(scope="module")
def acetal():
    return load_material("acetal")


@pytest.fixture(scope="module")
def pair20_40(b_rack):
    return make_pair(20, 40, 1.5, b_rack, shifts=(0.0, 0.0))


def test_rate_pair_figures(pair20_40, acetal):
    # Statics of a mesh: gear 2 carries T z2/z1 at n z1/z2, the same tangential load on the reference
    # circles (equal modules); the contact allowable is the weaker flank's (rule of this project).
    steel = load_material("mild-steel")
    r = rate_pair(pair20_40, 0.8, 300.0, 6.0, acetal, steel, "laser")
    g1, g2 = r.gears
    assert g2.torque == pytest.approx(1.6, rel=1e-12) and g2.speed == pytest.approx(150.0, rel=1e-12)
    assert g1.tangential_load == pytest.approx(g2.tangential_load, rel=1e-12)
    assert g1.tangential_load == pytest.approx(2000 * 0.8 / 30.0, rel=1e-12)
    assert r.pitch_line_speed == pytest.approx(math.pi * 30.0 * 300.0 / 60000, rel=1e-12)
    assert r.velocity_factor == pytest.approx(velocity_factor(r.pitch_line_speed, "cast"), rel=1e-12)
    assert g1.bending_stress == pytest.approx(
        bending_stress(pair20_40.gear1, g1.tangential_load, 6.0, r.pitch_line_speed, "laser"), rel=1e-12)
    assert g1.safety_factor == pytest.approx(acetal.allowable_bending / g1.bending_stress, rel=1e-12)
    assert r.contact_allowable == acetal.allowable_contact
    assert r.contact_min_safety == max(acetal.min_safety_factor, steel.min_safety_factor)
    assert r.contact_safety == pytest.approx(r.contact_allowable / r.contact_stress, rel=1e-12)


def _severity(rating, check):
    return next(f.severity for f in rating.findings() if f.check == check)


def test_bending_findings_flip_at_the_allowable_and_the_minimum(pair20_40, acetal):
    # Rule of this project: failure below a safety factor of 1, warning below the material's minimum.
    # Lewis stress is proportional to the torque, so the safety factor scales as 1 / torque.
    probe = rate_pair(pair20_40, 1.0, 100.0, 6.0, acetal, acetal, "cnc")
    at_allowable = probe.gears[0].safety_factor  # torque (N·m) at which gear 1's stress equals the allowable
    at_minimum = at_allowable / acetal.min_safety_factor
    assert _severity(rate_pair(pair20_40, at_allowable * 1.001, 100.0, 6.0, acetal, acetal, "cnc"), "bending gear 1") == "failure"
    assert _severity(rate_pair(pair20_40, at_allowable * 0.999, 100.0, 6.0, acetal, acetal, "cnc"), "bending gear 1") == "warning"
    assert _severity(rate_pair(pair20_40, at_minimum * 1.001, 100.0, 6.0, acetal, acetal, "cnc"), "bending gear 1") == "warning"
    assert _severity(rate_pair(pair20_40, at_minimum * 0.999, 100.0, 6.0, acetal, acetal, "cnc"), "bending gear 1") == "ok"


def test_contact_findings_flip_at_the_allowable(pair20_40, acetal):
    # Hertz stress grows with the square root of the load, so the torque at the allowable is T S_H².
    probe = rate_pair(pair20_40, 1.0, 100.0, 6.0, acetal, acetal, "fdm")
    at_allowable = probe.contact_safety ** 2
    over = rate_pair(pair20_40, at_allowable * 1.001, 100.0, 6.0, acetal, acetal, "fdm")
    under = rate_pair(pair20_40, at_allowable * 0.999, 100.0, 6.0, acetal, acetal, "fdm")
    assert _severity(over, "contact") == "failure"
    assert _severity(under, "contact") == "warning"


def test_findings_read_like_a_practitioner_and_end_with_the_caution(pair20_40, acetal):
    # Project rule: messages name the gear, the stress, the allowable and end with the light-duty caution.
    rating = rate_pair(pair20_40, 0.2, 100.0, 6.0, acetal, acetal)
    findings = rating.findings()
    assert [f.check for f in findings] == ["bending gear 1", "bending gear 2", "contact"]
    assert all(f.message.endswith(CAUTION) for f in findings)
    assert "ISO 6336" in CAUTION and "AGMA 2001" in CAUTION and "light duty" in CAUTION
    first = findings[0]
    assert "gear 1" in first.message and "MPa" in first.message and first.value == rating.gears[0].safety_factor


@pytest.mark.parametrize("args, word", [((0.0, 100.0, 6.0), "torque"), ((1.0, -5.0, 6.0), "speed"),
                                        ((1.0, 100.0, math.inf), "face width"), ((math.nan, 100.0, 6.0), "torque")])
def test_rate_pair_refuses_bad_values(pair20_40, acetal, args, word):
    # Input rules of the project: > 0 and finite, the message names the value.
    with pytest.raises(InputError, match=word):
        rate_pair(pair20_40, *args, acetal, acetal)


@pytest.mark.parametrize("z, shift", [(12, 0.6), (12, 0.7), (12, 0.78), (20, 0.95), (20, 1.05)])
def test_lewis_section_of_a_nearly_pointed_tooth_stays_at_the_root(b_rack, z, shift):
    # A positive shift thickens the tooth at the root: its Lewis Y is at least the unshifted tooth's
    # (Shigley Table 14-2, from memory, within the bands above), however thin the tip; the section lies
    # below the cutter's datum line (reference radius + x m), not just under the tip as a bare minimum
    # of t²/(4 l) would put it (Y near 0.01 to 0.1 for these teeth).
    gear = SpurGear(z, 1.0, b_rack, shift=shift)
    assert gear.tip_thickness < 0.25  # thinner than common practice's 0.25 m: nearly pointed
    result = lewis_form_factor(gear)
    assert result.form_factor >= SHIGLEY_Y[z] * (1 + band(z))
    assert result.critical_radius <= gear.reference_diameter / 2 + shift + 1e-6
    assert result.height > gear.module  # over a module below the load point, not just under the tip
