"""``gearcad ratio`` through ``gearcad.cli.main`` with captured output.

Sources: the exhaustive reference of tests/test_ratio_optimality.py, the
exact lathe identity 25.4 mm = 127/5 mm, and the issue's JSON layout.
"""

from __future__ import annotations

import json
from fractions import Fraction

import pytest

from gearcad.cli import main
from gearcad.ratio import make_limits, parse_target
from test_ratio_optimality import exhaustive

KEYS = {"numerator", "denominator", "ratio", "relative_error", "direction", "stages", "idler", "total_teeth"}


def run_json(capsys, *argv):
    code = main(["ratio", *argv, "--json"])
    return code, json.loads(capsys.readouterr().out)


def test_json_layout_and_optimum(capsys):
    code, out = run_json(capsys, "29.530588853", "--stages", "2", "--count", "4")
    assert code == 0
    assert out["target"] == {"expression": "29.530588853", "value": 29.530588853}
    assert all(set(r) >= KEYS for r in out["results"])
    reference = exhaustive(parse_target("29.530588853"), 2, make_limits(), 4)  # exhaustive reference
    ratios = [(r["numerator"], r["denominator"]) for r in out["results"]]
    assert ratios[0] == reference[0][:2]  # the best ratio first
    # distinct trains, one ratio may come several times: the ratios listed are the best ones, in their order
    assert list(dict.fromkeys(ratios)) == [(p, q) for p, q, _ in reference][:len(set(ratios))]
    assert len({tuple((s["driver"], s["driven"]) for s in r["stages"]) for r in out["results"]}) == 4
    for r in out["results"]:
        assert Fraction(r["numerator"], r["denominator"]) == Fraction(
            eval_product([(s["driver"], s["driven"]) for s in r["stages"]]))


def eval_product(stages):
    value = Fraction(1)
    for d, n in stages:
        value *= Fraction(d, n)
    return value


def test_default_searches_one_to_three_stages(capsys):
    code, out = run_json(capsys, "pi")
    assert code == 0
    assert sorted(len(r["stages"]) for r in out["results"]) == [1, 2, 3]
    errors = [abs(r["relative_error"]) for r in out["results"]]
    assert errors == sorted(errors)


def test_direction_and_idler(capsys):
    # from 20 teeth up every mesh passes without a warning, so the fewest teeth decide: 60/20 and a 20-tooth idler
    code, out = run_json(capsys, "3", "--stages", "1", "--direction", "same", "--count", "1", "--min-teeth", "20")
    assert code == 0
    best = out["results"][0]
    assert best["direction"] == "same" and best["idler"] == 20  # 1 mesh + idler = 2 meshes: same sense
    assert best["total_teeth"] == sum(s["driver"] + s["driven"] for s in best["stages"]) + 20
    assert best["meshes_clean"] is True


def test_inventory_127_exact(capsys):
    code, out = run_json(capsys, "1.5*8/25.4", "--inventory", "20x2,25-60/5,65,70,75,80,127", "--stages", "2")
    assert code == 0
    best = out["results"][0]
    assert (best["numerator"], best["denominator"]) == (60, 127) and best["relative_error"] == 0


def test_table_output_states_convention(capsys):
    assert main(["ratio", "127/20", "--stages", "2", "--count", "2"]) == 0
    text = capsys.readouterr().out
    assert "127/20" in text and "output turns per input turn" in text


def test_coaxial_with_shift_reports_shifts(capsys):
    code, out = run_json(capsys, "7.77", "--coaxial", "--shift-limit", "0.4", "--max-teeth", "30", "--count", "2")
    assert code == 0
    assert all(len(r["shifts"]) == 2 for r in out["results"])


def test_nothing_within_tolerance_exits_1_and_names_the_binding_limit(capsys):
    code = main(["ratio", "5.3530588853", "--stages", "1", "--max-teeth", "120", "--tolerance", "0.00001"])
    text = capsys.readouterr().out
    assert code == 1
    assert "no train within tolerance" in text and "binding" in text


def test_tolerance_lists_only_trains_within(capsys):
    code, out = run_json(capsys, "pi", "--stages", "2", "--tolerance", "1e-6", "--count", "10")
    assert code == 0
    assert out["results"] and all(abs(r["relative_error"]) <= 1e-6 for r in out["results"])


def test_fractions_listing(capsys):
    code, out = run_json(capsys, "pi", "--fractions", "--stages", "2")
    assert code == 0
    marked = {(a["numerator"], a["denominator"]): a["train"] for a in out["approximations"]}
    assert marked[(355, 113)] is not None and marked[(179, 57)] is None  # 179 prime > 120 teeth


@pytest.mark.parametrize("argv, words", [
    (["0"], "greater than 0"),
    (["sqrt(-2)"], "not a real"),
    (["2+"], "cannot be read"),
    (["2", "--stages", "5"], "stages must be from 1 to 4"),
    (["2", "--stages", "0"], "stages must be from 1 to 4"),
    (["2", "--min-teeth", "50", "--max-teeth", "20"], "min teeth 50 is more than max teeth 20"),
    (["2", "--max-stage-ratio", "1"], "max stage ratio must be greater than 1"),
    (["2", "--inventory", ""], "lists no gear"),
    (["2", "--inventory", "20,x3"], "malformed"),
    (["2", "--tolerance", "0"], "tolerance"),
    (["2", "--count", "0"], "count"),
    (["2", "--shift-limit", "0.3"], "only with --coaxial"),
    (["2", "--coaxial", "--stages", "3"], "2 or 4 stages"),
])
def test_bad_input_is_one_line_exit_2(capsys, argv, words):
    assert main(["ratio", *argv]) == 2
    captured = capsys.readouterr()
    assert words in captured.err and captured.err.count("\n") == 1 and "Traceback" not in captured.err
    assert captured.out == ""
