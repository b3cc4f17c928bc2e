"""Pair figures against a handbook worked example, Shigley's interference limits and ISO 21771 formulas."""

import math

import pytest

from gearcad.meshes.checks import analyse_pair, min_shift_without_undercut, min_teeth_without_undercut
from gearcad.errors import GeometryError, InputError
from gearcad.meshes.pair import (centre_distance_for_shift, make_pair, split_shift, standard_centre_distance,
                          total_shift_for_centre)
from gearcad.profiles import load_tooth_system

A = load_tooth_system("iso53-a")


def finding(analysis, check):
    return next(f for f in analysis.findings if f.check == check)


# KHK Gear Technical Reference, table "calculations of profile shifted spur gears"
# (m 3, 20 deg, z 12 and 24, x +0.6 and +0.36; from memory: verify).
KHK = dict(alpha_w=26.0886, a_w=56.4999, da=(44.840, 79.400), df=(32.100, 66.660), d=(36.0, 72.0), db=(33.8289, 67.6579))


def test_khk_profile_shifted_pair():
    pair = make_pair(12, 24, 3, A, shifts=(0.6, 0.36))
    assert math.degrees(pair.working_pressure_angle) == pytest.approx(KHK["alpha_w"], abs=5e-5)
    assert pair.centre_distance == pytest.approx(KHK["a_w"], abs=5e-5)
    for gear, da, df, d, db in zip((pair.gear1, pair.gear2), KHK["da"], KHK["df"], KHK["d"], KHK["db"]):
        assert gear.tip_diameter == pytest.approx(da, abs=5e-4)
        assert gear.root_diameter == pytest.approx(df, abs=5e-4)
        assert gear.reference_diameter == pytest.approx(d, abs=1e-12)
        assert gear.base_diameter == pytest.approx(db, abs=5e-5)
    # Same table: centre-distance modification coefficient y = 0.8333.
    assert pair.centre_modification == pytest.approx(0.8333, abs=5e-5)


def test_khk_inverse_centre_distance_gives_the_shift_sum():
    # KHK's centre-distance-given variant of the same example: a_w 56.4999 mm needs x1 + x2 = 0.96 (from memory).
    total = total_shift_for_centre(12, 24, 3, math.radians(20), 56.4999)
    assert total == pytest.approx(0.96, abs=2e-4)


def test_shift_and_centre_distance_are_inverse_functions():
    # Internal consistency of ISO 21771's two formulas: a_w(x1+x2) and x1+x2(a_w).
    for total in (-0.8, -0.2, 0.0, 0.37, 1.5):
        a_w = centre_distance_for_shift(17, 43, 2.5, math.radians(20), total)
        assert total_shift_for_centre(17, 43, 2.5, math.radians(20), a_w) == pytest.approx(total, abs=1e-12)


def test_split_rule_keeps_the_sum_and_favours_the_pinion():
    # Niemann & Winter rule (from memory): the pinion's share grows with the ratio u.
    x1, x2 = split_shift(0.5, 15, 60)
    assert x1 + x2 == pytest.approx(0.5, abs=1e-15)
    assert x1 > x2
    assert split_shift(0.5, 60, 15) == pytest.approx((x2, x1))
    assert split_shift(0.4, 30, 30) == pytest.approx((0.2, 0.2))


def test_required_centre_distance_is_met():
    pair = make_pair(15, 42, 2, A, centre=58.0)
    assert pair.centre_distance == pytest.approx(58.0, abs=1e-9)


def test_unreachable_centre_distance_is_refused():
    with pytest.raises(InputError, match="base radii"):
        make_pair(12, 24, 3, A, centre=40.0)


@pytest.mark.parametrize("alpha, expected", [(14.5, 32), (20.0, 18), (25.0, 12)])
def test_least_teeth_without_undercut(alpha, expected):
    # 2 / sin^2(alpha) = 31.9, 17.1, 11.2 (every gear text; a rack with addendum 1 m).
    assert min_teeth_without_undercut(math.radians(alpha)) == expected


def test_least_shift_formula():
    # x_min = 1 - z sin^2(alpha) / 2; at 20 deg and 12 teeth: 0.2982 (KHK table of undercut, from memory).
    assert min_shift_without_undercut(12, math.radians(20)) == pytest.approx(0.2982, abs=1e-4)


# Shigley's Mechanical Engineering Design, section on interference (20 deg full depth, k = 1; from memory):
# smallest pinion with a rack 18 teeth, for 1:1 13 teeth, a 16-tooth pinion runs with at most 101 teeth.
@pytest.mark.parametrize("z1, z2, interferes", [
    (13, 13, False), (12, 12, True), (16, 101, False), (16, 102, True), (18, 2000, False), (17, 2000, True)])
def test_shigley_interference_limits(z1, z2, interferes):
    pair = make_pair(z1, z2, 1, A, shorten_tips=False)
    result = finding(analyse_pair(pair), "interference gear 1")
    # value: how far the mate's tip stays short of the interference point along the line of action (mm).
    assert (result.value < 0) is interferes
    assert (result.severity != "ok") is interferes


def test_generated_pinions_that_a_rack_leaves_uncut_never_interfere():
    # Rack generation (ISO 21771): a pinion cut without undercut has an involute down to where any mate
    # with the basic addendum reaches, whatever the mate's size.
    for z2 in (18, 60, 400, 2000):
        pair = make_pair(18, z2, 1, A, shorten_tips=False)
        assert finding(analyse_pair(pair), "interference gear 1").severity == "ok"


def test_shigley_closed_forms_agree_with_the_geometric_check():
    # Shigley eq. for the largest gear a pinion of N_P teeth meets without interference:
    # N_G = (N_P^2 sin^2 phi - 4 k^2) / (4 k - 2 N_P sin^2 phi)
    s2 = math.sin(math.radians(20)) ** 2
    n_g = (16 ** 2 * s2 - 4) / (4 - 2 * 16 * s2)
    assert math.floor(n_g) == 101


def test_tip_shortening_keeps_the_basic_rack_clearance():
    # ISO 21771: with k = (x1 + x2) - y the bottom clearance equals c_P = 0.25 m on both sides.
    analysis = analyse_pair(make_pair(12, 24, 3, A, shifts=(0.6, 0.36)))
    assert analysis.clearances == pytest.approx((0.75, 0.75), abs=1e-9)
    full = analyse_pair(make_pair(12, 24, 3, A, shifts=(0.6, 0.36), shorten_tips=False))
    assert full.clearances[0] == pytest.approx(0.75 - 3 * (0.96 - 0.8333), abs=2e-4)
    assert finding(full, "bottom clearance gear 1").severity == "warning"


def test_contact_ratio_of_a_standard_pair():
    # Closed form (ISO 21771): eps = (sqrt(ra1^2 - rb1^2) + sqrt(ra2^2 - rb2^2) - a sin alpha) / (pi m cos alpha);
    # for 20/40 teeth, m 2, standard: the tabulated 1.64 (KHK contact ratio example, from memory).
    analysis = analyse_pair(make_pair(20, 40, 2, A))
    assert analysis.contact_ratio == pytest.approx(1.64, abs=0.01)


def test_backlash_from_thinning_and_centre_allowance():
    # Thinning by j/2 per gear gives circumferential backlash j on the working pitch circle (exact here),
    # and a centre allowance da adds about 2 da tan(alpha_w) (first-order rule, ISO/TR 10064-2, from memory).
    thinned = analyse_pair(make_pair(20, 40, 2, A, backlash=0.1))
    assert thinned.backlash == pytest.approx(0.1, abs=1e-12)
    moved = analyse_pair(make_pair(20, 40, 2, A, centre_allowance=0.05))
    assert moved.backlash == pytest.approx(2 * 0.05 * math.tan(math.radians(20)), rel=1e-2)


def _angular_play(pair, tolerance=2e-5):
    """Rotate gear 2's outline polygon (shapely) both ways until it touches gear 1; the free angle, radians."""
    import shapely
    from shapely import affinity

    from gearcad.geometry import outline

    g1 = shapely.Polygon(outline(pair.gear1, tolerance))
    base2 = shapely.Polygon(outline(pair.gear2, tolerance))
    # Put a space of gear 2 facing tooth 0 of gear 1 (tooth 0 lies on +x; gear 2 sits on +x at distance a).
    phase = math.pi if pair.gear2.teeth % 2 == 0 else 0.0
    base2 = affinity.translate(affinity.rotate(base2, phase + math.pi / pair.gear2.teeth, origin=(0, 0), use_radians=True),
                               pair.centre_distance, 0)

    def overlaps(angle):
        g2 = affinity.rotate(base2, angle, origin=(pair.centre_distance, 0), use_radians=True)
        return g1.intersection(g2).area > 1e-12

    def limit(sign):
        lo, hi = 0.0, sign * 2 * math.pi / pair.gear2.teeth
        for _ in range(50):
            mid = 0.5 * (lo + hi)
            lo, hi = (lo, mid) if overlaps(mid) else (mid, hi)
        return lo

    assert not overlaps(0.0)
    return limit(1.0) - limit(-1.0)


@pytest.mark.parametrize("kwargs", [dict(backlash=0.08), dict(centre_allowance=0.05), dict(shifts=(0.4, -0.1), backlash=0.05)])
def test_backlash_agrees_with_rotating_the_polygons_into_contact(kwargs):
    # Independent construction: shapely polygons of the generated outlines, gear 2 turned both ways until it
    # touches gear 1; the free angle times the working pitch radius of gear 2 is the circumferential backlash.
    pair = make_pair(20, 40, 2, A, **kwargs)
    play = _angular_play(pair)
    measured = play * pair.working_diameters()[1] / 2
    assert measured == pytest.approx(analyse_pair(pair).backlash, abs=2e-4)


@pytest.mark.parametrize("kwargs", [dict(shifts=(3.5, 0.0)), dict(shifts=(-1.9, 0.0))])
def test_impossible_teeth_are_refused(kwargs):
    with pytest.raises((GeometryError, InputError)):
        make_pair(6, 20, 1, A, **kwargs)


def test_reference_centre_distance():
    assert standard_centre_distance(12, 24, 3) == 54.0


def test_least_shift_accounts_for_the_tooth_thinning():
    # The cutter feeds deeper by the thinning: x_E = x - s_thin / (2 m tan alpha) (ISO 21771 generating shift),
    # so the nominal shift that avoids undercut rises by the same amount; the outline agrees.
    from gearcad.geometry import SpurGear, tooth_profile

    pair = make_pair(12, 40, 2, A, shifts=(0.3, 0.0), backlash=0.2)
    fig = analyse_pair(pair).gears[0]
    x_min = min_shift_without_undercut(12, A.pressure_angle, A.straight_flank_depth)
    thinning = pair.gear1.thinning / (2 * 2 * math.tan(A.pressure_angle))
    assert fig.min_shift == pytest.approx(x_min + thinning, abs=1e-12)
    for x, undercut in ((fig.min_shift - 1e-4, True), (fig.min_shift + 1e-4, False)):
        gear = SpurGear(12, 2, A, shift=x, thinning=pair.gear1.thinning)
        assert tooth_profile(gear).undercut is undercut
