"""``gearcad ratio --kind planetary`` through ``gearcad.cli.main`` with captured output.

Sources: the library search (itself checked against an exhaustive search in
tests/test_planetary.py), Dudley's table of epicyclic arrangements (from
memory: ring fixed, sun in, carrier out gives 1 / (1 + R/S)), and the issue's
JSON layout and bad-input rule.
"""

from __future__ import annotations

import json
from fractions import Fraction

import pytest

from gearcad.cli import main
from gearcad.ratio.planetary_set import make_arrangement
from gearcad.ratio.planetary import make_query, solve_planetary
from gearcad.ratio import make_limits, parse_target

KEYS = {"numerator", "denominator", "ratio", "relative_error", "direction", "stages", "idler", "total_teeth"}
MEMBER_KEYS = {"sun", "planet", "planet_ring", "ring", "planets", "fixed", "input", "output"}


def run_json(capsys, *argv):
    code = main(["ratio", *argv, "--json"])
    return code, json.loads(capsys.readouterr().out)


def test_json_keeps_the_contract_and_adds_the_set(capsys):
    # source: the JSON layout; Dudley's table for the ratio of each result (from memory)
    code, out = run_json(capsys, "0.2371", "--kind", "planetary", "--count", "3")
    assert code == 0 and out["target"] == {"expression": "0.2371", "value": 0.2371}
    assert len(out["results"]) == 3
    for r in out["results"]:
        assert set(r) >= KEYS | {"kind", "members", "conditions"} and r["kind"] == "planetary"
        m = r["members"]
        assert set(m) == MEMBER_KEYS and (m["fixed"], m["input"], m["output"]) == ("ring", "sun", "carrier")
        assert Fraction(r["numerator"], r["denominator"]) == 1 / (1 + Fraction(m["ring"], m["sun"]))
        assert m["ring"] == m["sun"] + 2 * m["planet"] and m["planets"] == 3
        assert r["total_teeth"] == m["sun"] + m["ring"] + 3 * m["planet"]
        assert {c["severity"] for c in r["conditions"].values()} == {"ok"}
        assert r["direction"] == "same" and r["stages"] == [] and r["idler"] is None
    errors = [abs(r["relative_error"]) for r in out["results"]]
    assert errors == sorted(errors)


def test_cli_gives_the_library_optimum(capsys):
    # source: the library search (checked exhaustively in tests/test_planetary.py)
    code, out = run_json(capsys, "1/7.3", "--kind", "planetary", "--stepped", "--planets", "4", "--fixed", "sun",
                         "--input", "carrier", "--max-teeth", "60", "--max-ring-teeth", "150", "--count", "2")
    query = make_query(parse_target("1/7.3"), make_limits(10, 60), make_arrangement("sun", "carrier"), 4, True, 150,
                       count=2)
    expected = solve_planetary(query)
    assert code == 0 and out["results"]
    # the table leaves out sets far worse than the best (more than 1 % and 10x its error): a prefix of the library's
    shown = len(out["results"])
    assert [(r["members"]["sun"], r["members"]["planet"], r["members"]["planet_ring"], r["members"]["ring"])
            for r in out["results"]] == [(e.set.sun, e.set.planet, e.set.planet_ring, e.set.ring) for e in expected][:shown]
    assert all(abs(e.relative_error) > abs(expected[0].relative_error) for e in expected[shown:])
    assert all(r["members"]["output"] == "ring" for r in out["results"])


def test_shift_limit_applies_without_coaxial(capsys):
    # source: the coaxial condition with shift; every reported set's shifts stay within the limit
    code, out = run_json(capsys, "0.2222", "--kind", "planetary", "--shift-limit", "0.5", "--max-teeth", "24",
                         "--count", "4")
    assert code == 0
    assert any(r["members"]["ring"] != r["members"]["sun"] + 2 * r["members"]["planet"] for r in out["results"])
    assert all(abs(x) <= 0.5 + 1e-9 for r in out["results"] for x in r["shifts"].values())


def test_table_layout(capsys):
    # source: the layout of this tool (heading, then one row per set)
    code = main(["ratio", "1/100", "--kind", "planetary", "--stepped", "--planets", "2", "--max-teeth", "150"])
    text = capsys.readouterr().out
    assert code == 0
    assert "planetary set, stepped planets" in text and "ring fixed, sun in, carrier out" in text
    row = next(line for line in text.splitlines() if line.strip().startswith("1 "))
    assert row.split()[:6] == ["1", "12", "132/18", "162", "2", "1/100"]  # 1 + 162*132/(12*18) = 100


def test_help_defaults_are_the_library_defaults():
    # source: gearcad.ratio.planetary_set's constants (the parser repeats them to stay light)
    import gearcad.cli.ratio as cli
    import gearcad.ratio.planetary_set as lib

    assert (cli.MEMBERS, cli.DEFAULT_PLANETS, cli.MAX_PLANETS, cli.DEFAULT_MAX_RING_TEETH, cli.NEIGHBOUR_MARGIN) == (
        lib.MEMBERS, lib.DEFAULT_PLANETS, lib.MAX_PLANETS, lib.DEFAULT_MAX_RING_TEETH, lib.NEIGHBOUR_MARGIN)


def test_tolerance_miss_exits_1(capsys):
    # source: the compound command's contract: nothing within --tolerance is exit 1 with the best shown
    code, out = run_json(capsys, "1/100", "--kind", "planetary", "--tolerance", "1e-3")
    assert code == 1 and out["results"] == [] and out["best"]["kind"] == "planetary"


@pytest.mark.parametrize("argv, words", [
    (["--kind", "planetary", "--planets", "30"], "planets must be from 1 to 24, got 30"),
    (["--kind", "planetary", "--planets", "12", "--max-ring-teeth", "50"], "cannot hold 12 planets"),
    (["--kind", "planetary", "--max-ring-teeth", "25"], "max ring teeth 25 is fewer than"),
    (["--kind", "planetary", "--fixed", "sun", "--input", "sun"], "input member 'sun' is the fixed member"),
    (["--kind", "planetary", "--stages", "2"], "--stages does not apply to --kind planetary"),
    (["--kind", "planetary", "--inventory", "20,30"], "--inventory does not apply"),
    (["--planets", "3"], "--planets does not apply to --kind compound"),
    (["--kind", "planetary", "--shift-limit", "3"], "shift limit must be from 0 to 1"),
    (["--kind", "planetary", "--neighbour-margin", "-1"], "neighbour margin must be 0 or more"),
])
def test_bad_input_exit_2_one_line_nothing_written(capsys, argv, words):
    # source: the bad-input rule: one line naming the value and what is allowed, exit 2, nothing written
    code = main(["ratio", "5", *argv])
    captured = capsys.readouterr()
    assert code == 2 and captured.out == ""
    assert captured.err.count("\n") == 1 and words in captured.err
    assert "allowed" in captured.err or " must " in captured.err


def test_no_padding_rows_and_stepped_named(capsys):
    # 1/40 with simple planets and the ring fixed is 1/(1 + z_r/z_s) >= 1/(1 + 200/10) = 1/21: the best simple set is far off
    # (Willis, ring fixed: sun to carrier 1 + z_r/z_s); stepped planets reach 1/40 exactly within the same teeth.
    code, out = run_json(capsys, "1/40", "--kind", "planetary", "--count", "8")
    assert code == 0 and len(out["results"]) == 1 and abs(out["results"][0]["relative_error"]) > 1
    assert "--stepped" in out["alternatives"] and "error +0.00e+00" in out["alternatives"]
