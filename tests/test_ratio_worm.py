"""Trains ending in a worm stage: a sidereal drive checked by the kinematic model; optimality by brute force."""

import json
from fractions import Fraction
from itertools import product

import pytest

from gearcad.cli import main
from gearcad.errors import InputError
from gearcad.ratio.kinematics import Gear, Mesh, make_network, network_ratio
from gearcad.ratio.limits import make_limits
from gearcad.ratio.target import parse_target
from gearcad.ratio.worm import WormStage, make_worm_query, parse_worm_option, solve_worm, worm_train_ratio

#: A sidereal day is 86164.0905 s (IERS / the astronomical almanac's mean sidereal day; from memory), so an axis
#: turning once a sidereal day from a 1 rpm motor turns 60 / 86164.0905 times per motor turn.
SIDEREAL = "60/86164.0905"


def test_a_worm_mesh_in_the_kinematic_model():
    # A single-start worm advances its wheel one tooth per turn (DIN 3975: p_z = z1 p_x): a 360-tooth wheel turns
    # once in 360 worm turns; two starts, twice as fast.
    for starts, wheel in ((1, 360), (2, 144)):
        net = make_network([Gear("worm", "a", starts), Gear("wheel", "b", wheel)], [Mesh("worm", "wheel", worm=True)])
        assert network_ratio(net, (), "a", "b") == Fraction(starts, wheel)


def test_a_sidereal_drive_from_a_one_rpm_motor():
    target = parse_target(SIDEREAL)
    query = make_worm_query(target, WormStage(1, 270, 290), make_limits(), stages=3)
    best = solve_worm(query)[0]
    assert best.stages[-1][2] is True and best.stages[-1][:2] == (1, best.wheel)
    # The kinematic model's ratio, and the plain product of the stages (each stage driver/driven) agree.
    product_ratio = Fraction(1)
    for d, n, _ in best.stages:
        product_ratio *= Fraction(d, n)
    assert worm_train_ratio(best.spur, 1, best.wheel) == product_ratio == best.fraction
    error = product_ratio / Fraction("60") * Fraction("86164.0905") - 1
    assert best.relative_error == pytest.approx(float(error), rel=1e-12, abs=1e-18)
    # A practical drive: better than 0.1 s a day (1.2e-6 relative).
    assert abs(best.relative_error) < 1.2e-6


def test_the_search_is_the_best_there_is_by_brute_force():
    # Every one-stage spur train of 10-40 teeth (stage ratio <= 6) before a 2-start worm on a 20-60 tooth wheel.
    target = parse_target("0.0371")
    limits = make_limits(10, 40)
    found = solve_worm(make_worm_query(target, WormStage(2, 20, 60), limits, stages=2))[0]
    best = min((abs(Fraction(d, n) * Fraction(2, w) / target.rational - 1), d + n + 2 + w)
               for d, n, w in product(range(10, 41), range(10, 41), range(20, 61)) if 1 / 6 <= d / n <= 6)
    assert (abs(found.fraction / target.rational - 1), found.total_teeth) == best


@pytest.mark.parametrize("text, word", [("0", "worm starts"), ("1:5-10", "too few"), ("1:100-5000", "must lie"),
                                        ("one", "not STARTS"), ("1:90", "not STARTS")])
def test_bad_worm_options(text, word):
    with pytest.raises(InputError, match=word):
        parse_worm_option(text, make_limits())


def test_ratio_command_marks_the_worm_stage(capsys):
    code = main(["ratio", SIDEREAL, "--worm", "1:350-360", "--stages", "2", "--json"])
    out, _ = capsys.readouterr()
    assert code == 0
    result = json.loads(out)["results"][0]
    for key in ("numerator", "denominator", "ratio", "relative_error", "direction", "stages", "idler", "total_teeth"):
        assert key in result
    assert [s["worm"] for s in result["stages"]] == [False, True]
    assert result["stages"][1]["driver"] == 1


@pytest.mark.parametrize("argv, word", [(["--worm", "1", "--direction", "same"], "--direction"),
                                        (["--worm", "1", "--coaxial"], "--coaxial"),
                                        (["--worm", "1:10-20"], "too few"),
                                        (["--worm", "1", "--stages", "9"], "stages")])
def test_ratio_command_bad_worm_input_is_one_line(capsys, argv, word):
    code = main(["ratio", "0.01", *argv])
    out, err = capsys.readouterr()
    assert code == 2 and out == "" and err.count("\n") == 1 and word in err


def test_skipped_wheels_never_hold_a_better_train():
    # Wheels 20-80 after one spur stage of 10-40 teeth (reach 1/4 to 4) toward 0.004: below 63 teeth the spur part
    # would need less than 1/4, so those wheels start with an error floor and most are skipped.  The three best
    # distinct ratios equal brute force over every stage and wheel (fewest teeth among equal ratios).
    target = parse_target("0.004")
    limits = make_limits(10, 40)
    found = solve_worm(make_worm_query(target, WormStage(1, 20, 80), limits, stages=2, count=3))
    best: dict[Fraction, int] = {}
    for d, n, w in product(range(10, 41), range(10, 41), range(20, 81)):
        if Fraction(1, 4) <= Fraction(d, n) <= 4:
            r = Fraction(d, n) * Fraction(1, w)
            best[r] = min(best.get(r, 10**9), d + n + 1 + w)
    ranked = sorted(best.items(), key=lambda item: (abs(item[0] / target.rational - 1), item[1]))[:3]
    assert [(t.fraction, t.total_teeth) for t in found] == ranked


def test_an_unreachable_worm_target_is_said_at_once(capsys):
    # 1 turn a sidereal day from a 1 rps motor: 1/86164.0905.  Three spur stages of at most 6:1 (216) and a 120-tooth
    # wheel reach 1/25920: the line names the reach and a wheel range that would do (216 * 399 >= 86164.0905).
    code = main(["ratio", "1/86164.0905", "--worm", "1", "--stages", "4"])
    out, err = capsys.readouterr()
    assert code == 1 and err == "" and out.count("\n") == 1
    assert "cannot be reached" in out and "1/25920" in out and "--worm 1:18-399" in out
    code = main(["ratio", "1/86164.0905", "--worm", "1", "--stages", "4", "--json"])
    data = json.loads(capsys.readouterr()[0])
    assert code == 1 and data["results"] == [] and data["reach"]["min"] == pytest.approx(1 / 25920)


def test_worm_results_say_whether_they_meet_the_tolerance(capsys):
    code = main(["ratio", SIDEREAL, "--worm", "1:350-360", "--stages", "2", "--json", "--tolerance", "1e-3"])
    data = json.loads(capsys.readouterr()[0])
    assert code == 0 and data["tolerance"] == 1e-3 and set(data["reach"]) == {"min", "max"}
    assert all(r["within_tolerance"] is (abs(r["relative_error"]) <= 1e-3) for r in data["results"])
