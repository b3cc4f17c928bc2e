"""The ``worm`` command: the contract keys, the handbook figures, exit codes, bad input as one line."""

import json

import pytest

from gearcad.cli import main


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_handbook_worm_as_json(capsys):
    # KHK Gear Technical Reference, axial-module cylindrical worm gear pair (m_x 3, z1 2, z2 30, d1 44; from memory).
    code, out, _ = run(capsys, "worm", "2", "30", "--module", "3", "--worm-diameter", "44", "--json")
    assert code == 0
    data = json.loads(out)
    for key in ("centre_distance", "lead_angle", "lead", "axial_pitch", "efficiency", "self_locking", "worm",
                "wheel", "findings"):
        assert key in data
    assert set(data["worm"]) >= {"reference_diameter", "tip_diameter", "root_diameter", "length"}
    assert set(data["wheel"]) >= {"teeth", "reference_diameter", "throat_diameter", "outside_diameter",
                                  "root_diameter", "face_width"}
    assert data["centre_distance"] == 67.0
    assert data["lead_angle"] == pytest.approx(7.76517, abs=5e-6)
    assert (data["worm"]["tip_diameter"], data["worm"]["root_diameter"]) == (50.0, 36.5)
    assert (data["wheel"]["throat_diameter"], data["wheel"]["outside_diameter"], data["wheel"]["root_diameter"]) == (96.0, 99.0, 82.5)
    assert isinstance(data["self_locking"], bool) and 0 < data["efficiency"] < 1
    for f in data["findings"]:
        assert set(f) == {"check", "severity", "message", "value", "limit"}


def test_table_carries_the_self_locking_caution(capsys):
    code, out, _ = run(capsys, "worm", "1", "40", "-m", "2", "--diameter-factor", "10")
    assert code == 0
    assert "self-locking is not a brake" in out and "Caution: gears are machinery" in out
    assert "centre distance" in out and "50.0000 mm" in out


def test_plastic_wheel_without_friction_figures_and_the_override(capsys):
    code, _, err = run(capsys, "worm", "1", "40", "-m", "2", "--diameter-factor", "10", "--worm-material", "pla",
                       "--wheel-material", "bronze")
    assert code == 2 and err.count("\n") == 1 and "allowed pairs" in err
    code, out, _ = run(capsys, "worm", "1", "40", "-m", "2", "--diameter-factor", "10", "--friction", "0.05", "--json")
    assert code == 0 and json.loads(out)["friction"]["low"] == 0.05


@pytest.mark.parametrize("argv, word", [
    (["4", "30", "-m", "3", "--diameter-factor", "10"], "lead angle 21.801 degrees"),
    (["1", "17", "-m", "3", "--diameter-factor", "10"], "wheel teeth 17 is too few"),
    (["1", "30", "-m", "1e300", "--diameter-factor", "10"], "module must be from"),
    (["1", "99999999", "-m", "1", "--diameter-factor", "10"], "wheel teeth must be from"),
    (["1", "30", "-m", "1", "--diameter-factor", "10", "--worm-speed", "1e12"], "worm speed"),
    (["1", "30", "-m", "1", "--worm-diameter", "1e9"], "worm reference diameter"),
    (["x", "30", "-m", "1", "--diameter-factor", "10"], "worm starts must be a whole number"),
    (["1", "30", "-m", "1"], "--diameter-factor --worm-diameter is required"),
    (["1", "30", "-m", "1", "--diameter-factor", "10", "--flank", "zx"], "invalid choice"),
])
def test_bad_input_is_one_line_exit_2(capsys, argv, word):
    code, out, err = run(capsys, "worm", *argv)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and word in err


def test_out_writes_the_midplane_drawing(capsys, tmp_path):
    import ezdxf

    code, out, _ = run(capsys, "worm", "1", "30", "-m", "2", "--diameter-factor", "10", "--out", str(tmp_path), "--json")
    assert code == 0
    files = json.loads(out)["files"]
    assert sorted(p.rsplit(".", 1)[1] for p in files) == ["dxf", "svg"]
    doc = ezdxf.readfile(tmp_path / "worm-wheel-midplane.dxf")
    auditor = doc.audit()  # ezdxf's own checker
    assert not auditor.has_errors
    assert (tmp_path / "worm-wheel-midplane.svg").read_text().startswith("<?xml")


def test_solids_need_out(capsys, tmp_path):
    code, out, err = run(capsys, "worm", "1", "30", "-m", "2", "--diameter-factor", "10", "--solids")
    assert code == 2 and err.count("\n") == 1 and "--out" in err
    assert list(tmp_path.iterdir()) == []


@pytest.mark.slow
def test_solids_write_the_worm_the_wheel_and_the_pair(capsys, tmp_path):
    # A straight-faced wheel of 20 teeth (quick); the solids' own checks are in test_worm_wheel_solid.py.
    from gearcad.export.step_worm import is_valid

    code, out, _ = run(capsys, "worm", "2", "20", "-m", "1", "--diameter-factor", "10", "--out", str(tmp_path),
                       "--solids", "--straight-face", "--json")
    assert code == 0
    names = sorted(p.rsplit("/", 1)[1] for p in json.loads(out)["files"])
    assert names == ["worm-pair.step", "worm-wheel-midplane.dxf", "worm-wheel-midplane.svg", "worm-wheel.step",
                     "worm-wheel.stl", "worm-worm.step", "worm-worm.stl"]
    import cadquery as cq

    wheel = cq.importers.importStep(str(tmp_path / "worm-wheel.step")).val()
    assert is_valid(wheel)  # OCP's checker, on the solid read back
    bounds = wheel.BoundingBox()
    assert max(bounds.xmax, bounds.ymax) < 11.0 + 1e-3  # the straight face stops at the throat radius, z2 m / 2 + m
    assert (tmp_path / "worm-wheel.stl").stat().st_size > 84
