"""Internal pairs: the handbook example, the sign convention, the checks against independent constructions, the CLI."""

import json
import math

import mpmath
import numpy as np
import pytest
import shapely
from shapely.geometry import LineString, Point, Polygon

from gearcad.cli import main
from gearcad.geometry import SpurGear, outline
from gearcad.geometry.internal import ring_loop, to_ring_frame
from gearcad.meshes.internal import (analyse_internal_pair, internal_centre_distance, internal_working_pressure_angle,
                              least_tooth_difference, make_internal_pair, require_tooth_difference, trochoid_depth)
from gearcad.meshes.pair import centre_distance_for_shift, working_pressure_angle
from gearcad.profiles import load_tooth_system

SYS = load_tooth_system("iso53-a")
A20 = math.radians(20)


def test_handbook_internal_example():
    # KHK Gear Technical Reference / Elements of Metric Gear Technology (SDP/SI), internal gear
    # calculation example (from memory: verify): m 3, 20 deg, z1 16, z2 24, x1 0, x2 +0.516 in the
    # handbook's sign (away from the axis), which is x2 = -0.516 in ISO 21771's sign used here.
    # Expected values are derived from the handbook's own formulas, not copied:
    # inv(aw) = inv(20 deg) + 2 tan(20 deg) 0.516 / 8 -> aw = 31.3209 deg; a = 12 cos(20)/cos(aw) = 13.2000 mm;
    # d_a1 = 48 + 6 = 54.000; d_a2 = 72 - 2*3*(1 - 0.516) = 69.096; d_f1 = 48 - 7.5 = 40.500;
    # rack-form ring root d_a2 + 2*2.25*3 = 82.596.  (A recalled 13.1683 mm does not follow from them.)
    pair = make_internal_pair(16, 24, 3.0, SYS, shifts=(0.0, -0.516))
    assert math.degrees(pair.working_pressure_angle) == pytest.approx(31.3209, abs=5e-5)
    assert pair.centre_distance == pytest.approx(13.2000, abs=5e-5)
    assert pair.standard_centre_distance == 12.0
    assert pair.pinion.tip_diameter == pytest.approx(54.000, abs=5e-4)
    assert pair.ring.tip_diameter == pytest.approx(69.096, abs=5e-4)
    assert pair.pinion.root_diameter == pytest.approx(40.500, abs=5e-4)
    assert pair.ring.nominal_root_diameter == pytest.approx(82.596, abs=5e-4)
    # The ring's root as cut depends on the cutter (2 a0 + d_a0); here it is shallower than the rack form.
    assert pair.ring.root_diameter < pair.ring.nominal_root_diameter


def test_zero_backlash_condition_solved_independently():
    # Derivation in gearcad/internal.py: s_w1 + s_w2 = p_w on the working circles.  Solve that condition
    # for the centre distance with mpmath (50 digits) and compare with the closed form.
    z1, z2, m, x1, x2 = 13, 41, 2.0, 0.35, -0.2
    mpmath.mp.dps = 50
    alpha = mpmath.radians(20)
    s1, s2 = m * (mpmath.pi / 2 + 2 * x1 * mpmath.tan(alpha)), m * (mpmath.pi / 2 + 2 * x2 * mpmath.tan(alpha))
    invf = lambda a: mpmath.tan(a) - a  # noqa: E731

    def gap(a_w):
        aw = mpmath.acos((z2 - z1) * m * mpmath.cos(alpha) / (2 * a_w))
        dw1, dw2 = 2 * a_w * z1 / (z2 - z1), 2 * a_w * z2 / (z2 - z1)
        sw1 = dw1 * (s1 / (z1 * m) + invf(alpha) - invf(aw))
        sw2 = dw2 * (s2 / (z2 * m) - invf(alpha) + invf(aw))
        return mpmath.pi * dw1 / z1 - sw1 - sw2

    exact = mpmath.findroot(gap, (z2 - z1) * m / 2 * 1.01)
    assert internal_centre_distance(z1, z2, m, A20, x1 + x2) == pytest.approx(float(exact), abs=1e-12)


def test_iso_sign_convention_gives_the_external_formulas():
    # ISO 21771: an internal gear has z < 0; the external-pair formulas then hold unchanged (signed a).
    for z1, z2, xs in [(16, 24, -0.516), (13, 41, 0.15), (20, 90, 0.0)]:
        assert internal_working_pressure_angle(z1, z2, A20, xs) == pytest.approx(working_pressure_angle(z1, -z2, A20, xs), abs=1e-15)
        assert internal_centre_distance(z1, z2, 1.0, A20, xs) == pytest.approx(-centre_distance_for_shift(z1, -z2, 1.0, A20, xs), abs=1e-12)


def test_contact_ratio_from_the_drawn_line_of_action():
    # Independent: intersect the line of action with the tip circles (shapely) and divide the
    # length between them by the base pitch.
    pair = make_internal_pair(18, 64, 2.0, SYS, shifts=(0.2, -0.3), backlash=0.05)
    a, aw = pair.centre_distance, pair.operating_pressure_angle
    rb2 = pair.ring.base_diameter / 2
    # Ring centre at the origin, pinion centre at (a, 0); the line of action is tangent to both base circles.
    t2 = np.array([rb2 * math.cos(aw), rb2 * math.sin(aw)])  # tangent point seen from the pitch point
    direction = np.array([-math.sin(aw), math.cos(aw)])
    line = LineString([t2 - 200 * direction, t2 + 200 * direction])
    ring_tip = Point(0, 0).buffer(pair.ring.tip_diameter / 2, 20000).exterior
    pin_tip = Point(a, 0).buffer(pair.pinion.tip_diameter / 2, 20000).exterior
    pitch_point = np.array([a * pair.ring.teeth / pair.tooth_difference, 0.0])
    offset = pitch_point - t2
    assert abs(direction[0] * offset[1] - direction[1] * offset[0]) < 1e-9  # the line passes through the pitch point
    near = lambda g: min(shapely.get_parts(line.intersection(g)), key=lambda p: p.distance(Point(*pitch_point)))  # noqa: E731
    length = near(ring_tip).distance(near(pin_tip))
    assert analyse_internal_pair(pair).contact_ratio == pytest.approx(length / pair.pinion.base_pitch, abs=1e-4)


def test_involute_interference_matches_the_closed_form():
    # Closed form (KHK Gear Technical Reference, internal gears, from memory): no involute interference
    # when z1 / z2 >= 1 - tan(alpha_a2) / tan(alpha_w).  Checked over a grid of standard pairs.
    for z1 in (12, 18, 24):
        for z2 in (48, 80, 120):
            pair = make_internal_pair(z1, z2, 1.0, SYS)
            alpha_a2 = math.acos(pair.ring.base_diameter / pair.ring.tip_diameter)
            ok = z1 / z2 >= 1 - math.tan(alpha_a2) / math.tan(pair.operating_pressure_angle)
            finding = next(f for f in analyse_internal_pair(pair).findings if f.check == "involute interference")
            assert (finding.severity == "ok") == ok, (z1, z2)


def rolled_overlap(pair, steps=500):
    """Largest overlap (mm, inscribed-circle diameter) of the real outlines over one tooth period (shapely)."""
    p, r = pair.pinion, pair.ring
    z1, z2, a = p.teeth, r.teeth, pair.centre_distance
    pin = outline(p, 1e-4)
    hole = ring_loop(r, 1e-4).points()
    t = -math.pi / z2  # ring loop: tooth on +x; the motion: a space on +x
    hole = hole @ np.array([[math.cos(t), -math.sin(t)], [math.sin(t), math.cos(t)]]).T
    ring = Point(0, 0).buffer(r.outer_diameter / 2, 400).difference(Polygon(hole))
    worst = 0.0
    for chi in np.linspace(-math.pi / z2, math.pi / z2, steps):
        over = Polygon(to_ring_frame(pin, z1, z2, a, np.array([chi]))[0]).intersection(ring)
        if not over.is_empty and over.area > 0:
            worst = max(worst, 2 * shapely.length(shapely.maximum_inscribed_circle(over)))
    return worst


@pytest.mark.parametrize("z1, z2, backlash, clash", [
    (30, 60, 0.05, False),
    (54, 60, 0.05, True),  # six teeth apart: the tips strike
])
def test_trochoid_check_against_rolled_outlines(z1, z2, backlash, clash):
    pair = make_internal_pair(z1, z2, 1.0, SYS, backlash=backlash)
    r = pair.ring
    tips, fillet = trochoid_depth(pair.pinion, z2, r.tip_diameter, r.tooth_thickness, r.form_diameter, pair.centre_distance)
    overlap = rolled_overlap(pair)
    if clash:
        assert tips > 0.01 and overlap > 0.01
    else:
        assert tips < 0 and fillet < 0 and overlap < 1e-9


def test_zero_backlash_fillet_graze_seen_by_both():
    # Standard 21 : 60 at zero backlash: the ring's tip corners sweep about 13 µm into the pinion's
    # fillets; the rolled outlines (shapely) show an overlap of the same size.
    pair = make_internal_pair(21, 60, 1.0, SYS)
    r = pair.ring
    tips, fillet = trochoid_depth(pair.pinion, 60, r.tip_diameter, r.tooth_thickness, r.form_diameter, pair.centre_distance)
    assert tips < 1e-6
    overlap = rolled_overlap(pair, steps=200)
    assert fillet == pytest.approx(overlap, rel=0.3) and overlap > 0.005


def test_least_tooth_difference():
    # Common practice: about 10 to 12 for 20 deg full depth without shift; computed here from the
    # trochoid check.  The answer must be the first difference that clears and the one below must not.
    pinion = SpurGear(30, 1.0, SYS)
    least = least_tooth_difference(pinion)
    assert 8 <= least <= 12
    for diff, clears in ((least - 1, False), (least, True)):
        z2 = 30 + diff
        a_w = internal_centre_distance(30, z2, 1.0, A20, 0.0)
        tips, _ = trochoid_depth(pinion, z2, z2 - 2.0, math.pi / 2, z2 + 2.5, a_w)
        assert (tips <= 1e-6) == clears
    with pytest.raises(Exception, match="needs at least"):
        require_tooth_difference(30, 30 + least - 1, 1.0, SYS)
    assert require_tooth_difference(30, 30 + least, 1.0, SYS) == least


def test_backlash_and_centre_allowance():
    # Thinning each gear by j/2 cos(aw)/cos(a) on the reference circle gives j on the working circle.
    pair = make_internal_pair(20, 70, 1.5, SYS, shifts=(0.3, 0.1), backlash=0.1)
    assert analyse_internal_pair(pair).backlash == pytest.approx(0.1, abs=1e-9)
    # Internal pair: setting the pinion's axis closer to the ring's opens backlash.
    moved = make_internal_pair(20, 70, 1.5, SYS, shifts=(0.3, 0.1), centre_allowance=0.05)
    assert moved.centre_distance < moved.nominal_centre_distance
    assert analyse_internal_pair(moved).backlash > 0


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_cli_internal_pair_json(capsys):
    code, out, _ = run(capsys, "pair", "16", "-24", "--module", "3", "--shift", "0", "-0.516", "--json")
    data = json.loads(out)
    assert data["internal"] is True
    for key in ("standard_centre_distance", "centre_distance", "working_pressure_angle", "contact_ratio", "findings", "gears"):
        assert key in data
    assert data["centre_distance"] == pytest.approx(13.2000, abs=5e-5)
    assert data["working_pressure_angle"] == pytest.approx(31.3209, abs=5e-5)
    for gear in data["gears"]:
        for key in ("teeth", "shift", "reference_diameter", "base_diameter", "tip_diameter", "root_diameter",
                    "tooth_thickness", "tip_thickness", "undercut", "min_shift"):
            assert key in gear
    assert data["gears"][1]["teeth"] == 24 and data["gears"][1]["iso_teeth"] == -24
    for f in data["findings"]:
        assert set(f) == {"check", "severity", "message", "value", "limit"}
    assert code == (1 if data["verdict"] == "failure" else 0)


def test_cli_internal_table_and_failure(capsys):
    code, out, _ = run(capsys, "pair", "54", "-60", "-m", "1", "--backlash", "0.05")
    assert code == 1 and "Internal pair 54 : 60" in out and "FAIL" in out and "trochoid interference" in out
    code, out, _ = run(capsys, "pair", "30", "-60", "-m", "1", "--backlash", "0.05")
    assert code == 0 and "qualified engineer" in out


@pytest.mark.parametrize("argv, needle", [
    (["30", "-25"], "ring tooth count must exceed the pinion's 30, got 25"),
    (["-16", "24"], "tooth count z1 must be positive"),
    (["16", "-60", "--centre", "23"], "--centre is not available for an internal pair"),
    (["16", "-60", "--cutter-teeth", "60"], "cutter tooth count must be from 8 to 59"),
    (["16", "60", "--cutter-teeth", "20"], "apply to a ring gear only"),
    (["16", "-60", "--torque", "-1", "--speed", "100"], "torque must be greater than 0"),
])
def test_cli_internal_bad_input(capsys, argv, needle):
    code, _, err = run(capsys, "pair", *argv, "-m", "1")
    assert code == 2
    assert needle in err and len(err.strip().splitlines()) == 1


def test_cli_internal_pair_takes_a_load_rating(capsys):
    # The ring carries the pinion's tangential load at z_r / z_p times its torque (one mesh, one force).
    import json

    code, out, _ = run(capsys, "pair", "20", "-66", "-m", "1", "--torque", "0.2", "--speed", "100", "--json")
    data = json.loads(out)
    rating = data["rating"]
    pinion, ring = rating["gears"]
    assert code == (1 if data["verdict"] == "failure" else 0)  # the geometry's checks (no backlash here) still count
    assert {"bending pinion", "bending ring", "contact"} <= {f["check"] for f in data["findings"]}
    assert ring["torque"] == pytest.approx(0.2 * 66 / 20)
    assert ring["tangential_load"] == pytest.approx(pinion["tangential_load"])
    assert rating["contact_stress"] > 0 and ring["safety_factor"] > pinion["safety_factor"]
