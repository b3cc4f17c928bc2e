"""Every kind's ``ratio --json`` says, per result, whether it meets the tolerance (the issue's contract key)."""

import json

import pytest

from gearcad.cli import main


@pytest.mark.parametrize("argv", [["--kind", "planetary", "--stepped"], ["--kind", "summing"]])
def test_results_carry_within_tolerance(capsys, argv):
    # 1/40 is reached exactly by a stepped set and by a summing train (both listed by `ratio 1/40 --kind any`).
    code = main(["ratio", "1/40", *argv, "--json", "--tolerance", "1e-3"])
    data = json.loads(capsys.readouterr()[0])
    assert code == 0 and data["tolerance"] == 1e-3 and data["results"]
    assert all(r["within_tolerance"] is (abs(r["relative_error"]) <= 1e-3) for r in data["results"])


def test_a_planetary_miss_is_marked_and_exits_1(capsys):
    # A simple set of 10-120 teeth cannot give 1/40 (its best is far off): nothing within 1e-3, exit 1.
    code = main(["ratio", "1/40", "--kind", "planetary", "--json", "--tolerance", "1e-3"])
    data = json.loads(capsys.readouterr()[0])
    assert code == 1 and data["results"] == [] and data["best"]["within_tolerance"] is False
