"""Lathe change gears: pitches, machine files, the swing frame, the thread table.

Sources: the inch is exactly 25.4 mm = 127/5 mm (international yard and pound
agreement, 1959); ISO 261 coarse pitches (from memory); the lead-screw rule
"pitch cut = leadscrew pitch x leadscrew turns per spindle turn", whence for a
metric pitch p on an 8 TPI leadscrew driver/driven = p x 8 x 5/127 = 40p/127 and
for n TPI on a P mm leadscrew driver/driven = 127/(5 n P) (common textbook
relations of screw cutting, e.g. the change-gear sections of machinists'
handbooks; from memory); the axial pitch of a worm is pi m (module m) or pi/P inch
(diametral pitch P) (DIN 3975; from memory); mpmath for pi; shapely for the
distances between placed circles.
"""

from __future__ import annotations

import math
from fractions import Fraction
from pathlib import Path

import mpmath
import pytest
from hypothesis import given, strategies as st
from shapely.geometry import Point

from gearcad.errors import InputError, ProfileError
from gearcad.lathe.frame import Frame, Setup, place
from gearcad.lathe.machine import load_machine, machine_names, parse_machine
from gearcad.lathe.table import arrangements, can_cut, thread_table
from gearcad.lathe.threads import ISO_COARSE, SERIES, parse_pitch, parse_threads

BENCH = Path(__file__).resolve().parent.parent / "profiles" / "lathes" / "bench-8tpi.toml"


# -- pitches ------------------------------------------------------------------

@pytest.mark.parametrize("text, exact", [
    ("1.5", Fraction(3, 2)), ("1.5mm", Fraction(3, 2)), ("0.75 mm", Fraction(3, 4)),
    ("11tpi", Fraction(127, 55)),     # 25.4/11 mm, the inch being 127/5 mm exactly
    ("4.5tpi", Fraction(254, 45)),    # 25.4/4.5
    ("8TPI", Fraction(127, 40)),      # 25.4/8
    ("M10", Fraction(3, 2)),          # ISO 261 coarse: M10 x 1.5 (from memory)
    ("M64", Fraction(6)),             # ISO 261 coarse: M64 x 6 (from memory)
])
def test_screw_pitches_are_exact(text, exact):
    pitch = parse_pitch(text)
    assert pitch.coefficient == exact and pitch.pi_power == 0


@pytest.mark.parametrize("text, value", [
    ("1mod", mpmath.pi),                       # pi m, m = 1
    ("2.5module", 2.5 * mpmath.pi),
    ("24dp", mpmath.pi * mpmath.mpf("25.4") / 24),  # pi / P inch
])
def test_worm_pitches_carry_pi(text, value):
    pitch = parse_pitch(text)
    assert pitch.pi_power == 1
    assert pitch.mm == pytest.approx(float(value), rel=1e-15)


@pytest.mark.parametrize("text", ["1.5furlong", "11 tpx", "abc", "0", "0mm", "M11.5", "-1.5", "1e3", "500mm",
                                  "0.001mm"])
def test_bad_pitches_name_the_value(text):
    with pytest.raises(InputError, match="allowed"):
        parse_pitch(text)


def test_a_list_mixes_pitches_and_series_and_is_bounded():
    pitches = parse_threads("1.5, 11tpi, bsw")
    assert pitches[0].mm == 1.5 and pitches[1].kind == "tpi" and len(pitches) > 10
    with pytest.raises(InputError, match="at most"):
        parse_threads(",".join(f"{0.1 + i / 1000:.3f}" for i in range(300)))
    with pytest.raises(InputError):
        parse_threads(" , ")


def test_iso_coarse_series_holds_the_iso_261_pitches():
    # ISO 261 coarse pitch column (from memory): 23 distinct pitches from 0.25 to 6 mm.
    pitches = sorted(p.coefficient for p in SERIES["iso-coarse"].pitches())
    assert pitches[0] == Fraction(1, 4) and pitches[-1] == 6 and len(pitches) == 23
    assert set(pitches) == {Fraction(v) for v in {t[:-2] for t in ISO_COARSE.values()}}


# -- machine files ------------------------------------------------------------------

def test_shipped_machines_load():
    names = machine_names()
    assert {"bench-8tpi", "metric-3mm"} <= set(names)
    bench = load_machine("bench-8tpi")
    assert bench.leadscrew.coefficient == Fraction(127, 40) and 127 in bench.shelf.teeth
    metric = load_machine("metric-3mm")
    assert metric.leadscrew.coefficient == 3


def _edited(old: str, new: str) -> str:
    text = BENCH.read_text()
    assert old in text
    return text.replace(old, new)


@pytest.mark.parametrize("old, new, message", [
    ("farthest = 145.0", "farthest = 40.0", "slot would be -10 mm long"),
    ('unit = "teeth"', 'unit = "cogs"', "largest_gear.unit"),
    ('[stud_to_leadscrew]\nvalue = 120.0\nunit = "mm"', '[stud_to_leadscrew]\nvalue = 120.0\nunit = "furlong"',
     "stud_to_leadscrew.unit"),
    ('pitch = "8tpi"', 'pitch = "8 furlongs"', "leadscrew.pitch"),
    ('shelf = "20x2, 25-80/5, 127"', 'shelf = "20x2, 25-80/5, 127, 150"', "largest_gear"),
    ('source = "invented example machine (the guard', 'source = "" # (', "largest_gear.source"),
    ("tumbler_reverse = true", "tumbler = true", "unknown key"),
])
def test_bad_machine_files_name_the_key(old, new, message):
    with pytest.raises(ProfileError, match=message.replace("(", r"\(")):
        parse_machine(_edited(old, new), "edited", "edited.toml")


def test_unknown_machine_lists_the_choices():
    with pytest.raises(ProfileError, match="bench-8tpi"):
        load_machine("no-such-lathe")


# -- the swing frame ------------------------------------------------------------------

FRAME = Frame(stud_to_leadscrew=100.0, slot=(40.0, 80.0), swing=(0.0, math.pi), module=2.0, addendum=1.0,
              centre_allowance=0.0, gear_gap=1.0, boss_diameter=10.0)
COMPOUND = Setup(20, (30, 20), 40)  # a1 = 2 (20 + 30) / 2 = 50 mm, a2 = 2 (20 + 40) / 2 = 60 mm


def test_compound_train_lands_where_the_triangle_puts_it():
    fit = place(COMPOUND, FRAME)
    assert fit.fits and fit.slot_position == pytest.approx(60.0)
    # Hand placement: L at the origin, S on +x at 100 mm, I at 60 mm from L at the reported angle;
    # then |SI| must be the first centre distance, 50 mm.
    i = (60 * math.cos(fit.angle), 60 * math.sin(fit.angle))
    assert math.dist(i, (100.0, 0.0)) == pytest.approx(50.0, abs=1e-9)
    # The least slack: the gears reach 50 + 60 = 110 mm against 100 mm, 10 mm to spare.
    assert fit.margin == pytest.approx(10.0)


@pytest.mark.parametrize("far, fits", [(60.1, True), (59.9, False)])
def test_slot_end_by_a_tenth(far, fits):
    fit = place(COMPOUND, Frame(**{**FRAME.__dict__, "slot": (40.0, far)}))
    assert fit.fits is fits
    assert fit.margin == pytest.approx(0.1 if fits else -0.1, abs=1e-9)
    assert fits or "beyond the slot's end" in fit.problem


@pytest.mark.parametrize("distance, fits", [(109.9, True), (110.1, False)])
def test_triangle_by_a_tenth(distance, fits):
    fit = place(COMPOUND, Frame(**{**FRAME.__dict__, "stud_to_leadscrew": distance}))
    assert fit.fits is fits and fit.margin == pytest.approx(0.1 if fits else -0.1, abs=1e-9)
    assert fits or ("do not reach" in fit.problem and fit.angle is None)


@pytest.mark.parametrize("distance, fits", [(85.1, True), (84.9, False)])
def test_stud_and_leadscrew_gears_of_a_simple_train_by_a_tenth(distance, fits):
    # Stud gear 40 and leadscrew gear 40 (tip radius 2 (20 + 1) = 42 mm each) share a plane with the idler:
    # their tip circles, placed by hand, must stand 1 mm (the gap) apart; shapely measures the gap.
    setup = Setup(40, (20,), 40)
    fit = place(setup, Frame(**{**FRAME.__dict__, "stud_to_leadscrew": distance}))
    gap = Point(0, 0).buffer(42.0, quad_segs=512).distance(Point(distance, 0).buffer(42.0, quad_segs=512))
    assert gap - 1.0 == pytest.approx(0.1 if fits else -0.1, abs=1e-3)
    assert fit.fits is fits and fit.margin == pytest.approx(0.1 if fits else -0.1, abs=1e-9)
    assert fits or "hit each other" in fit.problem


def test_a_gear_that_would_hit_the_leadscrew_end():
    # Driven gear 30 of the pair (tip radius 32 mm) at 60 mm from the leadscrew: the leadscrew's end
    # (radius 5 mm) and the gap (1 mm) leave 22 mm; a 40 mm boss (radius 20) leaves 60 - 32 - 21 = 7 mm
    # and a 70 mm boss 60 - 32 - 36 = -8 mm.
    assert place(COMPOUND, Frame(**{**FRAME.__dict__, "boss_diameter": 40.0})).fits
    fit = place(COMPOUND, Frame(**{**FRAME.__dict__, "boss_diameter": 70.0}))
    assert not fit.fits and fit.margin == pytest.approx(-8.0) and "leadscrew's end" in fit.problem


def test_arrangements_use_each_gear_of_the_shelf_once():
    from collections import Counter

    shelf = Counter({20: 2, 40: 1, 127: 1})
    found = set(arrangements(Fraction(40, 127), shelf))
    assert Setup(40, (20,), 127) in found and Setup(20, (20, 40), 127) in found
    assert all(s.ratio == Fraction(40, 127) for s in found)
    assert Setup(20, (20, 20), 127) not in found  # three 20s are not on the shelf


# -- the thread table ------------------------------------------------------------------

@pytest.fixture(scope="module")
def bench():
    return load_machine("bench-8tpi")


@pytest.fixture(scope="module")
def coarse_table(bench):
    return thread_table(bench, SERIES["iso-coarse"].pitches())


def test_iso_coarse_on_an_8_tpi_leadscrew_is_exact(coarse_table):
    # Every ISO 261 coarse pitch, with the 127-tooth gear: the train's ratio is exactly p / (25.4/8).
    assert len(coarse_table.rows) == 23
    for row in coarse_table.rows:
        wanted = row.pitch.coefficient / (Fraction(127, 5) / 8)
        assert row.best.setup.ratio == wanted, row.pitch.name
        assert row.best.relative_error == 0.0 and row.best.fit.fits and row.within_tolerance


# Textbook simple trains for metric pitches on an 8 TPI leadscrew with the 127-tooth gear on the
# leadscrew: stud gear = 40 p teeth (driver/driven = 40p/127; from memory, a common handbook table).
TEXTBOOK_8TPI = {"0.5": 20, "0.75": 30, "1": 40, "1.25": 50, "1.5": 60, "1.75": 70, "2": 80, "2.5": 100, "3": 120}


def test_textbook_table_for_an_8_tpi_leadscrew_is_reproduced(bench):
    # A roomy frame where the simple trains fit: the table's simplest train is the textbook's.
    machine = parse_machine(_edited('shelf = "20x2, 25-80/5, 127"', 'shelf = "20x2, 25-120/5, 127"')
                            .replace("value = 120.0", "value = 200.0").replace("farthest = 145.0", "farthest = 210.0")
                            .replace("to = 150.0", "to = 180.0"), "roomy", "roomy.toml")
    table = thread_table(machine, [parse_pitch(p) for p in TEXTBOOK_8TPI])
    for row, (pitch, stud) in zip(table.rows, TEXTBOOK_8TPI.items()):
        s = row.best.setup
        assert (s.stud, s.leadscrew, s.compound) == (stud, 127, False), pitch
        assert Fraction(s.stud, s.leadscrew) == Fraction(pitch) * 8 * 5 / 127  # driver/driven = 40p/127


def test_inch_threads_on_a_metric_leadscrew_follow_the_textbook_relation():
    metric = load_machine("metric-3mm")
    table = thread_table(metric, SERIES["bsw"].pitches())
    for row in table.rows:
        tpi = Fraction(127, 5) / row.pitch.coefficient
        wanted = Fraction(127, 5) / (tpi * 3)  # 127 / (5 n P) with P = 3 mm
        got = row.best.setup.ratio
        assert row.best.relative_error == pytest.approx(float(got / wanted - 1), abs=1e-15)
        assert row.best.fit.fits
    assert all(r.best.exact for r in table.rows)


def test_worm_errors_against_mpmath(bench):
    mpmath.mp.dps = 50
    table = thread_table(bench, parse_threads("module"))
    for row in table.rows:
        modules = row.pitch.coefficient
        wanted = mpmath.pi * mpmath.mpf(modules.numerator) / modules.denominator * 40 / 127
        ratio = row.best.setup.ratio
        error = mpmath.mpf(ratio.numerator) / ratio.denominator / wanted - 1
        assert row.best.relative_error == pytest.approx(float(error), rel=1e-9, abs=1e-18)
        assert abs(row.best.relative_error) < 1e-3 and not row.best.exact


def test_a_train_that_does_not_fit_is_passed_over(bench):
    # With the slot ending at 135 mm the exact 5.5 mm train (80 > 20 / 55 > 127, its intermediate stud at
    # 1.5 (55 + 127) / 2 + 0.1 = 136.6 mm) cannot be mounted: the best that fits is taken instead.
    short = parse_machine(_edited("farthest = 145.0", "farthest = 135.0"), "short", "short.toml")
    row = thread_table(short, [parse_pitch("5.5")]).rows[0]
    assert row.best.fit.fits and not row.best.exact
    assert row.better_unfit is not None and row.better_unfit.exact and not row.better_unfit.fit.fits
    assert row.better_unfit.fit.slot_position == pytest.approx(1.5 * (55 + 127) / 2 + 0.1)
    assert row.better_unfit.fit.slot_position > 135.0
    assert row.with_missing is not None and row.with_missing.setup.ratio == Fraction(55 * 40, 10 * 127)


def test_a_missing_gear_is_named(bench):
    # 19 TPI on 8 TPI: ratio 8/19 exactly; 19 is prime, so some gear must carry a multiple of 19.
    row = thread_table(bench, [parse_pitch("19tpi")]).rows[0]
    assert not row.best.exact
    extra = row.with_missing
    assert extra.setup.ratio == Fraction(8, 19) and extra.fit.fits
    assert len(extra.missing) == 1 and extra.missing[0] % 19 == 0 and extra.missing[0] not in bench.shelf.teeth


def test_what_the_shelf_can_cut(bench):
    result, missed = can_cut(bench, SERIES["bsp"].pitches())
    cut = {round(r.pitch.mm, 6) for r in result.rows}
    assert round(25.4 / 11, 6) in cut and round(25.4 / 14, 6) in cut and round(25.4 / 28, 6) in cut
    assert [round(p.mm, 6) for p in missed] == [round(25.4 / 19, 6)]  # 19 TPI needs a 19n-tooth gear
    assert all(r.within_tolerance for r in result.rows)


@pytest.mark.parametrize("text", ["100mm", "0.03mm"])
def test_a_pitch_out_of_reach_is_bad_input(bench, text):
    with pytest.raises(InputError, match="out of reach.*allowed: pitches from"):
        thread_table(bench, [parse_pitch(text)])


# -- invariants ------------------------------------------------------------------


@given(stud=st.integers(12, 127), driven=st.integers(12, 127), driver=st.integers(12, 127),
       lead=st.integers(12, 127), distance=st.floats(40.0, 250.0), module=st.sampled_from([1.0, 1.5, 2.0]))
def test_the_reported_place_reproduces_both_centre_distances(stud, driven, driver, lead, distance, module):
    # Whatever the train, when the triangle exists the intermediate stud placed at the reported slot
    # position and angle (leadscrew at the origin, stud on +x) is one centre distance from each axis.
    frame = Frame(distance, (0.0, 1000.0), (0.0, math.pi), module, 1.0, 0.05, 0.5, 1.0)
    setup = Setup(stud, (driven, driver), lead)
    fit = place(setup, frame)
    a1, a2 = frame.centre(stud, driven), frame.centre(driver, lead)
    exists = abs(a1 - a2) <= distance <= a1 + a2
    assert (fit.angle is not None) == exists
    if exists:
        point = (fit.slot_position * math.cos(fit.angle), fit.slot_position * math.sin(fit.angle))
        assert math.dist(point, (0.0, 0.0)) == pytest.approx(a2, rel=1e-9)
        assert math.dist(point, (distance, 0.0)) == pytest.approx(a1, rel=1e-6, abs=1e-6)
    else:
        assert not fit.fits and fit.margin < 0


def test_diametral_pitch_gears_and_inch_lengths():
    # 20 DP is a module of 25.4/20 = 1.27 mm; 4.75 inch is 120.65 mm (the inch being 25.4 mm).
    text = _edited('[module]\nvalue = 1.5\nunit = "mm"', '[diametral_pitch]\nvalue = 20\nunit = "per inch"')
    text = text.replace('[stud_to_leadscrew]\nvalue = 120.0\nunit = "mm"', '[stud_to_leadscrew]\nvalue = 4.75\nunit = "inch"')
    machine = parse_machine(text, "dp", "dp.toml")
    assert machine.module == pytest.approx(1.27) and machine.diametral_pitch == 20
    assert machine.stud_to_leadscrew == pytest.approx(120.65)
    with pytest.raises(ProfileError, match="exactly one"):
        parse_machine(text.replace("[diametral_pitch]", "[module]\nvalue = 1.5\nunit = \"mm\"\nsource = \"x\"\n"
                                   "[diametral_pitch]"), "both", "both.toml")


def test_fixed_gearing_to_the_stud_enters_the_ratio():
    # Stud at half the spindle's speed (20 driving 40): the change gears must turn twice as fast,
    # R = p / (P_ls f) with f = 1/2 (the lead-screw rule).
    machine = parse_machine(_edited("gears = [[40, 40]]", "gears = [[20, 40]]"), "half", "half.toml")
    assert machine.fixed_ratio == Fraction(1, 2)
    row = thread_table(machine, [parse_pitch("1")]).rows[0]
    assert row.best.setup.ratio == Fraction(1) / (Fraction(127, 40) * Fraction(1, 2))


@pytest.mark.parametrize("high, fits", [(None, True), (0.0, False)])
def test_the_frame_swing_limits_the_angle(high, fits):
    # COMPOUND stands at acos(0.925) = 22.33 degrees (law of cosines, worked by hand above);
    # the slack of the swing is the arc at the intermediate stud, 60 mm x the angle left.
    angle = math.acos((60 ** 2 + 100 ** 2 - 50 ** 2) / (2 * 60 * 100))
    top = angle + math.radians(0.1) if high is None else angle - math.radians(0.1)
    fit = place(COMPOUND, Frame(**{**FRAME.__dict__, "swing": (0.0, top)}))
    assert fit.fits is fits and fit.angle == pytest.approx(angle)
    assert fit.margin == pytest.approx((1 if fits else -1) * 60 * math.radians(0.1))
    assert fits or "beyond its swing" in fit.problem


def test_when_nothing_fits_the_nearest_miss_is_shown():
    # Stud and leadscrew 1000 mm apart: no pair of the shelf's gears reaches (the largest centre
    # distances are 1.5 (127 + 80) / 2 mm and so on, far below 1000 mm).
    far = parse_machine(_edited("value = 120.0", "value = 1000.0").replace("farthest = 145.0", "farthest = 1000.0"),
                        "far", "far.toml")
    row = thread_table(far, [parse_pitch("1.5")]).rows[0]
    assert not row.best.fit.fits and not row.within_tolerance and row.best.fit.angle is None
    assert "do not reach" in row.best.fit.problem and row.better_unfit is None
