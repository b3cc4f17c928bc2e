"""Reach of the limits, targets near and beyond it, bounded target expressions, tolerance marks.

Sources: the exhaustive reference of tests/test_ratio_optimality.py (every train
listed and ranked exactly), the rule that a stage obeys 1/R <= d/n <= R (so k
stages reach R^-k..R^k: 6^4 = 1296, 6^3 = 216), the general network model of
gearcad.kinematics for ratios, and Python's fractions module.
"""

from __future__ import annotations

import json
import subprocess
import sys
from fractions import Fraction

import pytest

from gearcad.cli import main
from gearcad.errors import InputError
from gearcad.ratio.kinematics import compound_ratio
from gearcad.ratio import make_limits, parse_target, solve_compound
from gearcad.ratio.reach import largest_stage_ratio, reach_of
from gearcad.ratio.train import chain_ratio
from test_ratio_optimality import exhaustive


def solved(target, k, limits, count):
    return [(t.numerator, t.denominator, t.total_teeth) for t in solve_compound(target, k, limits, count)]


@pytest.mark.parametrize("low, high, ratio, hunting, expected", [
    (10, 120, 6, False, Fraction(6)),          # 60/10
    (10, 120, 6, True, Fraction(119, 20)),     # the largest coprime pair within 6 (hand check: 119 = 7*17, 20 = 2^2*5)
    (20, 30, 6, False, Fraction(3, 2)),        # the tooth range binds: 30/20
    (10, 200, 2.5, False, Fraction(5, 2)),
])
def test_largest_stage_ratio(low, high, ratio, hunting, expected):
    assert largest_stage_ratio(make_limits(low, high, ratio, hunting)) == expected


def test_reach_is_the_power_of_the_largest_stage():
    reach = reach_of(make_limits(10, 120), (1, 2, 3))
    assert (reach.low, reach.high) == (Fraction(1, 216), Fraction(216))  # 6^3


@pytest.mark.parametrize("value", ["35.9", "36", "1/36", "0.02778", "37", "100", "1/40", "0.001"])
def test_targets_near_and_beyond_reach_match_exhaustive(value):
    limits = make_limits(10, 30, 3)  # 2 stages reach 1/9..9 (3^2)
    target = parse_target(value)
    assert solved(target, 2, limits, 3) == exhaustive(target, 2, limits, 3)  # exhaustive reference


@pytest.mark.parametrize("value", ["26.9", "27", "1/27", "30", "1/1000"])
def test_three_stages_near_and_beyond_reach_match_exhaustive(value):
    limits = make_limits(10, 18, 3)  # 3 stages reach 1/27..27, the tooth range binds at 18/10 first: 1.8^3
    target = parse_target(value)
    assert solved(target, 3, limits, 2) == exhaustive(target, 3, limits, 2)  # exhaustive reference


@pytest.mark.parametrize("stages, idler", [([(40, 10), (50, 10), (50, 10)], None), ([(17, 91), (23, 29)], 15),
                                           ([(55, 10), (64, 11), (65, 12), (75, 13)], None), ([(12, 60)], 10)])
def test_chain_ratio_agrees_with_the_network_model(stages, idler):
    assert chain_ratio(stages, idler) == compound_ratio(stages, idler)  # gearcad.kinematics (Willis, linear system)


def test_unreachable_target_is_one_line_exit_1(capsys):
    assert main(["ratio", "1/1436.0682", "--stages", "4"]) == 1
    out = capsys.readouterr().out.strip()
    assert "\n" not in out
    assert "1/1436.0682" in out and "1/1296 to 1296" in out and "--max-stage-ratio 6.16" in out  # 1436^(1/4) = 6.156
    assert "--kind planetary" in out and "--kind summing" in out


def test_unreachable_suggests_more_stages(capsys):
    assert main(["ratio", "0.001"]) == 1
    out = capsys.readouterr().out
    assert "1/216 to 216" in out and "--stages 4" in out


def test_unreachable_json_names_reach(capsys):
    assert main(["ratio", "100", "--stages", "2", "--json"]) == 1
    out = json.loads(capsys.readouterr().out)
    assert out["results"] == [] and out["reach"] == {"min": 1 / 36, "max": 36.0} and "36" in out["unreachable"]


def test_stage_counts_beyond_reach_are_left_out(capsys):
    assert main(["ratio", "100", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["reach"] == {"min": 1 / 216, "max": 216.0}
    assert out["stage_counts_beyond_reach"] == [1, 2] and [len(r["stages"]) for r in out["results"]] == [3]
    assert out["results"][0]["relative_error"] == 0  # 40/10 * 50/10 * 50/10 = 100


def test_within_tolerance_marks(capsys):
    assert main(["ratio", "pi", "--stages", "2", "--count", "3", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["tolerance"] is None and all(r["within_tolerance"] is True for r in out["results"])
    assert main(["ratio", "pi", "--stages", "2", "--tolerance", "1e-9", "--json"]) == 1
    out = json.loads(capsys.readouterr().out)
    assert out["results"] == [] and out["best"]["within_tolerance"] is False
    assert abs(out["best"]["relative_error"]) > 1e-9


@pytest.mark.parametrize("text, words", [
    ("pi**1000", r"10\^497"), ("exp(1000)", "beyond"), ("1e400", "exponent"), ("1e-400", "exponent"),
    ("2^2^2^2^2", "exponent"), ("((999^999)^999)^999", "beyond"), ("exp(exp(exp(10)))", "beyond"),
    ("1e10", "outside what gear trains express"), ("1e-10", "outside"), ("9" * 501, "at most 500"),
    ("(" * 60 + "2" + ")" * 60, "nests deeper"), ("sin(1e300)", "greater than 0"),
])
def test_bounded_expressions_refused_in_one_line(text, words):
    with pytest.raises(InputError, match=words) as info:
        parse_target(text)
    assert "\n" not in str(info.value) and len(str(info.value)) < 400


def test_limits_of_the_range_are_accepted():
    assert parse_target("1e9").rational == 10 ** 9 and parse_target("1e-9").rational == Fraction(1, 10 ** 9)
    assert parse_target("2^990/2^981").rational == 512  # parts within 10^+-300 (2^990 ~ 1.0e298)


def test_plain_targets_do_not_load_sympy():
    code = ("import sys; from gearcad.cli import main; main(['ratio', '29.530588853', '--stages', '2']); "
            "assert 'sympy' not in sys.modules, 'sympy loaded'")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr
