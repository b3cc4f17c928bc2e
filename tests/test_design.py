"""``gearcad design`` and ``gearcad demo``: solve, shift against undercut, build, and write a train file that rebuilds."""

import json
import math

import pytest

from gearcad.meshes.checks import min_shift_without_undercut
from gearcad.cli import main
from gearcad.meshes.shifts import balanced_shifts
from gearcad.profiles import load_tooth_system
from gearcad.trains.trainfile import read_train

A = load_tooth_system("iso53-a")


@pytest.mark.parametrize("z1, z2", [(12, 57), (10, 40), (14, 14), (37, 13), (20, 60)])
def test_balanced_shifts_leave_no_undercut(z1, z2):
    # x_min = h - z sin^2(alpha) / 2 (rack generation, ISO 21771): both gears at or above it.
    x1, x2 = balanced_shifts(z1, z2, A)
    for z, x in ((z1, x1), (z2, x2)):
        assert x >= min_shift_without_undercut(z, A.pressure_angle, A.straight_flank_depth) - 1e-12
    if min(z1, z2) >= 18:  # 18 teeth and up need no shift (2 / sin^2 20 deg = 17.1)
        assert (x1, x2) == (0.0, 0.0)


def test_design_builds_the_best_train_and_its_train_file_rebuilds(tmp_path, capsys):
    out = tmp_path / "d"
    code = main(["design", "127/20", "--stages", "2", "--module", "1", "--max-teeth", "127",
                 "--out", str(out), "--formats", "dxf", "--json"])
    report = json.loads(capsys.readouterr().out)
    assert code == 0
    assert (report["ratio"]["numerator"], report["ratio"]["denominator"]) == (127, 20)  # exact: 25.4 = 127/5
    spec = read_train(out / "train.toml")
    ratio = math.prod(s.driver.teeth for s in spec.stages) / math.prod(s.driven.teeth for s in spec.stages)
    assert ratio == pytest.approx(127 / 20, rel=1e-15)
    again = tmp_path / "again"
    assert main(["build", str(out / "train.toml"), "--out", str(again), "--formats", "dxf", "--json"]) == 0
    rebuilt = json.loads(capsys.readouterr().out)
    assert [g["teeth"] for g in rebuilt["gears"]] == [g["teeth"] for g in report["gears"]]


def test_design_coaxial_keeps_input_and_output_on_one_axis(tmp_path, capsys):
    out = tmp_path / "c"
    assert main(["design", "3", "--coaxial", "--module", "1", "--max-teeth", "60", "--out", str(out),
                 "--formats", "dxf", "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    shafts = {s["name"]: s for s in report["shafts"]}
    assert math.dist((shafts["input"]["x"], shafts["input"]["y"]), (shafts["output"]["x"], shafts["output"]["y"])) < 1e-6
    a, b = (m["centre_distance"] for m in report["meshes"])
    assert a == pytest.approx(b, abs=1e-9)


@pytest.mark.parametrize("argv, needle", [
    (["design", "0", "--module", "1"], "target"),
    (["design", "2", "--module", "1", "--profile", "waterjet"], "unknown fabrication profile"),
    (["design", "2", "--module", "1", "--min-teeth", "50", "--max-teeth", "20"], "min teeth"),
    (["design", "2", "--module", "1", "--shift-limit", "0.3"], "--coaxial"),
    (["design", "2"], "--module"),
])
def test_design_bad_input(tmp_path, capsys, argv, needle):
    assert main(argv + ["--out", str(tmp_path / "x")]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1
    assert not (tmp_path / "x").exists()


@pytest.mark.slow
def test_the_demo_runs_end_to_end(tmp_path, capsys):
    out = tmp_path / "demo"
    assert main(["demo", "--out", str(out)]) == 0
    report = json.loads((out / "report.json").read_text())
    # Target: 12 h per turn of the hour wheel, one turn per mean synodic month of 29.530588853 days.
    assert report["ratio"]["target_value"] == pytest.approx(12 / (24 * 29.530588853), rel=1e-15)
    assert abs(report["ratio"]["relative_error"]) < 1e-6
    for name in ("report.md", "report.json", "preview.png", "assembly.step", "train.toml",
                 "back-plate.dxf", "front-plate.dxf", "s1-driver.dxf", "s1-driver.step", "s1-driver.stl", "s1-driver.svg"):
        assert (out / name).stat().st_size > 0
    assert "never cut PVC or vinyl" in (out / "report.md").read_text()
