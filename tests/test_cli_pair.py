"""The ``pair`` and ``profiles`` commands: the contract keys, the handbook figures, exit codes, bad input."""

import json
import subprocess
import sys

import pytest

from gearcad.cli import main


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_handbook_pair_as_json(capsys):
    # KHK Gear Technical Reference, profile-shifted spur gears (from memory: verify).
    code, out, _ = run(capsys, "pair", "12", "24", "--module", "3", "--shift", "0.6", "0.36", "--json")
    assert code == 0
    data = json.loads(out)
    for key in ("standard_centre_distance", "centre_distance", "working_pressure_angle", "contact_ratio", "findings", "gears"):
        assert key in data
    assert data["standard_centre_distance"] == 54.0
    assert data["centre_distance"] == pytest.approx(56.4999, abs=5e-5)
    assert data["working_pressure_angle"] == pytest.approx(26.0886, abs=5e-5)
    g1, g2 = data["gears"]
    for gear in (g1, g2):
        for key in ("teeth", "shift", "reference_diameter", "base_diameter", "tip_diameter", "root_diameter",
                    "tooth_thickness", "tip_thickness", "undercut", "min_shift"):
            assert key in gear
    assert (g1["tip_diameter"], g2["tip_diameter"]) == pytest.approx((44.840, 79.400), abs=5e-4)
    assert (g1["root_diameter"], g2["root_diameter"]) == pytest.approx((32.100, 66.660), abs=5e-4)
    for f in data["findings"]:
        assert set(f) == {"check", "severity", "message", "value", "limit"}
        assert f["severity"] in ("ok", "warning", "failure")


def test_table_shows_the_figures_and_the_caution(capsys):
    code, out, _ = run(capsys, "pair", "12", "24", "--module", "3", "--shift", "0.6", "0.36")
    assert code == 0
    assert "56.4999 mm" in out and "26.0886 deg" in out and "44.8397" in out
    assert "Caution" in out and "qualified engineer" in out


def test_a_failing_check_exits_1(capsys):
    # Shifts of +2 on both gears push the working pressure angle to 35.7 deg: the contact ratio
    # falls below 1 (ISO 21771 closed form), a failure.
    code, out, _ = run(capsys, "pair", "12", "24", "--module", "3", "--shift", "2", "2")
    assert code == 1
    assert "FAIL" in out


def test_required_centre_distance(capsys):
    code, out, _ = run(capsys, "pair", "15", "42", "-m", "2", "--centre", "58", "--json")
    data = json.loads(out)
    assert data["centre_distance"] == pytest.approx(58.0, abs=1e-9)
    assert sum(g["shift"] for g in data["gears"]) > 0


@pytest.mark.parametrize("argv, needle", [
    (["pair", "2", "24", "-m", "1"], "tooth count must be from 3"),
    (["pair", "12.5", "24", "-m", "1"], "whole number"),
    (["pair", "12", "24", "-m", "0"], "module must be greater than 0"),
    (["pair", "12", "24", "-m", "-2"], "module must be greater than 0"),
    (["pair", "12", "24", "-m", "1e6"], "module must be from"),
    (["pair", "12", "24", "-m", "1", "--pressure-angle", "40"], "pressure angle must be from 10 to 35"),
    (["pair", "12", "24", "-m", "1", "--pressure-angle", "25"], "use --system full-25"),
    (["pair", "12", "24", "-m", "1", "--shift", "3.9", "0"], "pointed"),
    (["pair", "6", "24", "-m", "1", "--shift", "-1.9", "0"], "root diameter"),
    (["pair", "12", "24", "-m", "1", "--shift", "-1.9", "0"], "inside the base circle"),
    (["pair", "12", "24", "-m", "3", "--centre", "40"], "base radii"),
    (["pair", "12", "24", "-m", "1", "--system", "iso53-q"], "unknown tooth profile"),
    (["pair", "12", "24", "-m", "1", "--backlash", "-0.1"], "backlash"),
    (["pair", "12", "24"], "--module"),
    (["pair", "12", "24", "-m", "nan"], "finite"),
    (["pair", "12", "24", "-m", "1", "--shift", "0.1"], "expected 2 arguments"),
])
def test_bad_input_is_one_line_and_exit_2(capsys, argv, needle):
    code, out, err = run(capsys, *argv)
    assert code == 2
    assert needle in err
    assert len(err.strip().splitlines()) == 1
    assert "Traceback" not in err and out == ""


def test_profiles_lists_the_systems(capsys):
    code, out, _ = run(capsys, "profiles")
    assert code == 0
    assert "iso53-a" in out and "full-14.5" in out


def test_python_dash_m_runs_the_command():
    result = subprocess.run([sys.executable, "-m", "gearcad", "pair", "20", "40", "-m", "2", "--json"],
                            capture_output=True, text=True, check=False)
    assert result.returncode == 0
    assert json.loads(result.stdout)["standard_centre_distance"] == 60.0
