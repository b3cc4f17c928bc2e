"""Worm stages in trains: train files, the plan with the worm across the plates, the report, design --worm.

Sources: DIN 3975-1 / ISO/TR 10828 for the pair's centre distance ``a = m_x (q + z2) / 2`` (no shift;
from memory), sympy's exact rationals for the ratio (an independent product of the stages), shapely for
the worm's footprint in the plate, OCP's checker for the solids.
"""

import json
import math
from pathlib import Path

import numpy as np
import pytest
import sympy

from gearcad.cli import main
from gearcad.trains.trainfile import parse_train, train_to_toml

TRAIN = """
name = "slider"
title = "Camera slider slow drive"
module = 1.5
thickness = 3.0
fabrication = "laser-3mm-acrylic"

[[stage]]
worm = { starts = 1, diameter_factor = 10, form = "ZA" }
driven = 30

[[stage]]
driver = 15
driven = 45
"""


def _write(tmp_path: Path, text: str, name: str = "train.toml") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _build(tmp_path: Path, text: str, formats: str = "dxf", *extra: str) -> tuple[int, Path]:
    out = tmp_path / "out"
    code = main(["build", str(_write(tmp_path, text)), "--out", str(out), "--formats", formats, "--no-sheets", *extra])
    return code, out


def test_a_worm_stage_parses_and_writes_back():
    spec = parse_train(TRAIN)
    worm = spec.stages[0].worm
    assert (worm.starts, worm.diameter_factor, worm.form) == (1, 10.0, "za")
    assert spec.stages[0].driven.teeth == 30 and spec.stages[0].driver.teeth == 1
    assert parse_train(train_to_toml(spec)) == spec
    assert 'worm = { starts = 1, diameter_factor = 10.0, form = "ZA" }' in train_to_toml(spec)


def test_every_worm_key_writes_back():
    text = TRAIN.replace('form = "ZA" }', 'form = "zi", pressure_angle = 25, friction = 0.2 }')
    spec = parse_train(text)
    worm = spec.stages[0].worm
    assert (worm.form, worm.pressure_angle, worm.friction) == ("zi", 25.0, 0.2)
    assert parse_train(train_to_toml(spec)) == spec


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("worm-train")
    code, out = _build(tmp, TRAIN)
    assert code == 0
    return json.loads((out / "report.json").read_text(encoding="utf-8")), out


def test_the_report_carries_the_worm(built):
    report, out = built
    worm = report["worm"]
    for key in ("centre_distance", "lead_angle", "lead", "axial_pitch", "efficiency", "self_locking", "axis",
                "input_end", "blocks", "findings"):
        assert key in worm
    # DIN 3975: a = m_x (q + z2) / 2 = 1.5 (10 + 30) / 2 = 30 mm; lead angle atan(z1 / q); lead z1 pi m_x.
    assert worm["centre_distance"] == pytest.approx(30.0, abs=1e-12)
    assert worm["lead_angle"] == pytest.approx(math.degrees(math.atan(1 / 10)), abs=1e-12)
    assert worm["lead"] == pytest.approx(math.pi * 1.5, abs=1e-12)
    assert report["kind"] == "worm"
    assert {f["check"] for f in worm["findings"]} >= {"efficiency", "self-locking"}
    assert any("not a brake" in f["message"] for f in worm["findings"] if f["check"] == "self-locking")
    assert worm["input_end"]["name"] == "worm input end"
    assert "## Worm stage" in (out / "report.md").read_text(encoding="utf-8")
    # The wheel's outline: fitted B-splines within the plan's tolerance (1 µm) of the generated section.
    fit = worm["wheel"]["outline"]
    assert 0 < fit["deviation"] <= fit["tolerance"] == pytest.approx(1e-3) and fit["curves_per_space"] == 5


def test_the_worm_axis_is_crossed_at_the_centre_distance(built):
    report, _ = built
    worm, wheel_shaft = report["worm"], report["shafts"][0]
    # The worm's axis lies parallel to the plates: its point nearest the wheel's axis is a from it, and the
    # axis is perpendicular to that radius (so the distance between the crossed axes is a).
    axis = worm["axis"]
    dx, dy = axis["x"] - wheel_shaft["x"], axis["y"] - wheel_shaft["y"]
    assert math.hypot(dx, dy) == pytest.approx(worm["centre_distance"], abs=1e-9)
    heading = math.radians(axis["heading"])
    assert dx * math.cos(heading) + dy * math.sin(heading) == pytest.approx(0.0, abs=1e-9)
    # At the wheel's mid-plane: the wheel's layer is centred on the worm's axis height.
    wheel = next(g for g in report["gears"] if g["name"] == worm["wheel"]["name"])
    assert wheel["z"] + wheel["thickness"] / 2 == pytest.approx(axis["z"], abs=1e-9)


def test_the_worm_shaft_has_its_two_blocks(built):
    report, _ = built
    row = next(s for s in report["shafts"] if s["name"] == "worm")
    assert row["supports"] == ["worm-block-1", "worm-block-2"] and row["crossed"] is True
    for s in report["shafts"]:
        assert len(s["supports"]) == 2, s
    blocks = report["worm"]["blocks"]
    # Both blocks on the worm's axis, one each side of the wheel, at equal distances.
    axis = report["worm"]["axis"]
    u = [(b["x"] - axis["x"]) * math.cos(math.radians(axis["heading"])) +
         (b["y"] - axis["y"]) * math.sin(math.radians(axis["heading"])) for b in blocks]
    assert u[0] == pytest.approx(-u[1], abs=1e-9) and u[1] > 0
    # Each block's bore takes the worm's shaft with the fabrication profile's clearance.
    assert all(b["bore"] > report["worm"]["worm"]["shaft_diameter"] for b in blocks)


def test_the_parts_list_has_the_worm_the_blocks_and_their_screws(built):
    report, out = built
    names = {p["name"]: p for p in report["parts"]}
    assert names["worm"]["kind"] == "made" and names["worm-block-1"]["kind"] == "made"
    assert any("worm-block-1.dxf" in f for f in names["worm-block-1"]["files"])
    screws = [p for p in report["parts"] if p["kind"] == "bought" and "worm-block-1-screw-1" in p["note"]]
    assert len(screws) == 1 and screws[0]["quantity"] == 4
    # The back plate has a clearance hole under every block screw (read back from its DXF).
    import ezdxf

    doc = ezdxf.readfile(out / "back-plate.dxf")
    circles = [(c.dxf.center.x, c.dxf.center.y) for c in doc.modelspace().query("CIRCLE")]
    for b in report["worm"]["blocks"]:
        for x, y in b["screws"]:
            assert min(math.hypot(x - cx, y - cy) for cx, cy in circles) < 1e-6
    assert "worm" in (out / "parts.csv").read_text(encoding="utf-8")


def test_the_ratio_is_the_product_of_the_stages(built):
    report, _ = built
    # sympy's exact product: worm starts / wheel teeth, then driver / driven of the spur stage.
    expected = sympy.Rational(1, 30) * sympy.Rational(15, 45)
    got = sympy.Rational(report["ratio"]["numerator"], report["ratio"]["denominator"])
    assert got == expected == sympy.Rational(1, 90)


def test_the_assembly_check_passes_and_names_the_designed_mesh(built):
    report, _ = built
    assert report["assembly"]["interference"] == []
    clearance = next(f for f in report["findings"] if f["check"] == "worm clearance")
    assert clearance["severity"] == "ok" and "designed mesh" in clearance["message"]


def test_a_part_in_the_worm_s_way_is_caught():
    # Move a pillar onto the worm's axis: the clearance check must report the overlap as a failure.
    import dataclasses

    from gearcad.trains.hardware import Rod
    from gearcad.trains.supports import complete_plan
    from gearcad.trains.worm_mount import finish_worm
    from gearcad.trains.worm_stage import plan_worm

    plan, wanted = plan_worm(parse_train(TRAIN), 1e-3, None)
    plan = complete_plan(plan, wanted)
    w = plan.worm
    x, y = w.at(-w.thread / 2 - 0.5)
    intruder = Rod("intruder", "pillar", x, y, 6.0, 3.4, 0.0, 40.0)
    plan = dataclasses.replace(plan, mechanism=dataclasses.replace(plan.mechanism, rods=plan.mechanism.rods + (intruder,)))
    done = finish_worm(plan)
    bad = [f for f in done.findings if f.check == "worm clearance" and f.severity == "failure"]
    assert bad and any("intruder" in f.message for f in bad)


def test_a_lone_worm_stage_builds(tmp_path):
    text = TRAIN.split("[[stage]]\ndriver")[0]
    code, out = _build(tmp_path, text)
    assert code == 0
    report = json.loads((out / "report.json").read_text(encoding="utf-8"))
    assert (report["ratio"]["numerator"], report["ratio"]["denominator"]) == (1, 30)
    assert report["shafts"][0]["name"] == "output"


BAD = [
    ("worm = { starts = 1, diameter_factor = 10 }\ndriven = 30\nhelix = 15", "helix"),
    ("worm = { starts = 1, diameter_factor = 10 }\ndriven = 30\nidler = 20", "idler"),
    ("worm = { starts = 1, diameter_factor = 10 }\ndriver = 12\ndriven = 30", "driver"),
    ("worm = { starts = 4, diameter_factor = 10 }\ndriven = 40", "lead angle"),  # atan(4/10) = 21.8 > ZA's 15
    ("worm = { starts = 1, diameter_factor = 10, form = \"ZK\" }\ndriven = 30", "tool_diameter"),
    ("worm = { starts = 1, diameter_factor = 10, form = \"ZK\", tool_diameter = 1 }\ndriven = 30", "tool diameter"),
    ("worm = { starts = 1, diameter_factor = 10, tool_diameter = 80 }\ndriven = 30", "tool_diameter"),
    ("worm = { starts = 1, diameter_factor = 10, form = \"ZQ\" }\ndriven = 30", "form"),
    ("worm = { starts = 1, diameter_factor = 10 }\ndriven = 15", "too few"),  # undercut below 18 at 20 degrees
    ("worm = { starts = 0, diameter_factor = 10 }\ndriven = 30", "starts"),
    ("worm = { starts = 1, diameter_factor = 50 }\ndriven = 30", "diameter_factor"),
    ("worm = { starts = 1, diameter_factor = 10, lead = 3 }\ndriven = 30", "unknown key"),
    ("worm = { starts = 1, diameter_factor = 10, friction = 2.0 }\ndriven = 30", "friction"),
    ("worm = { starts = 1, diameter_factor = 10 }\ndriven = { teeth = 30, flat = 1.2 }", "flat"),
    ("driver = 12\ndriven = 30\n\n[[stage]]\nworm = { starts = 1, diameter_factor = 10 }\ndriven = 30", "first"),
]


@pytest.mark.parametrize("stage, word", BAD)
def test_bad_worm_stages_exit_2_and_write_nothing(tmp_path, capsys, stage, word):
    text = "name = \"bad\"\nmodule = 1.5\nthickness = 3\n\n[[stage]]\n" + stage + "\n"
    code, out = _build(tmp_path, text)
    err = capsys.readouterr().err.strip()
    assert code == 2 and not out.exists()
    assert len(err.splitlines()) == 1 and word in err, err


def test_a_load_is_refused_with_a_worm(tmp_path, capsys):
    code, out = _build(tmp_path, TRAIN, "dxf", "--torque", "0.1", "--speed", "10")
    assert code == 2 and not out.exists()
    assert "worm" in capsys.readouterr().err


def test_design_with_a_worm(tmp_path):
    out = tmp_path / "d"
    code = main(["design", "1/90", "--worm", "1:20-60", "-m", "1.5", "--out", str(out), "--formats", "dxf",
                 "--no-sheets", "--name", "wormdesign"])
    assert code == 0
    spec = parse_train((out / "train.toml").read_text(encoding="utf-8"))
    assert spec.stages[0].worm is not None and spec.stages[0].worm.starts == 1
    product = sympy.Rational(1)
    for stage in spec.stages:
        product *= sympy.Rational(stage.driver.teeth, stage.driven.teeth)
    assert product == sympy.Rational(1, 90)
    report = json.loads((out / "report.json").read_text(encoding="utf-8"))
    assert sympy.Rational(report["ratio"]["numerator"], report["ratio"]["denominator"]) == product


def test_design_with_a_worm_matches_ratio_worm(capsys):
    # design keeps the train `gearcad ratio --worm` ranks first (the same search).
    from gearcad.trains.design import design

    assert main(["ratio", "1/137", "--worm", "1:20-80", "--json"]) == 0
    best = json.loads(capsys.readouterr().out)["results"][0]
    chosen = design("1/137", module=1.5, worm="1:20-80", tolerance=0.05)
    teeth = [(s["driver"], s["driven"]) for s in best["stages"]]
    got = [(s.driver.teeth, s.driven.teeth) for s in chosen.spec.stages[1:]] + [
        (chosen.spec.stages[0].worm.starts, chosen.spec.stages[0].driven.teeth)]
    assert got == teeth


def test_a_sidereal_drive_from_a_1_rpm_motor(tmp_path, capsys):
    # One sidereal day is 86164.0905 s (IERS mean sidereal day, from memory): from a 1 rpm motor the output
    # turns 60 / 86164.0905 times a motor turn.  The search lists the worm last; design builds it first (the
    # input); the kinematic model's ratio of the built train is sympy's product of the search's stages, and the
    # assembly's interference check passes.
    target = "60/86164.0905"
    assert main(["ratio", target, "--worm", "1:90-360", "--json"]) == 0
    best = json.loads(capsys.readouterr().out)["results"][0]
    assert best["stages"][-1]["worm"] is True and not any(s["worm"] for s in best["stages"][:-1])
    out = tmp_path / "sidereal"
    assert main(["design", target, "--worm", "1:90-360", "-m", "0.5", "--tolerance", "1e-6", "--out", str(out),
                 "--formats", "dxf", "--no-sheets", "--name", "sidereal"]) == 0
    capsys.readouterr()
    text = (out / "train.toml").read_text(encoding="utf-8")
    spec = parse_train(text)
    assert spec.stages[0].worm is not None and all(s.worm is None for s in spec.stages[1:])
    assert "the worm is the input" in text.split("[[stage]]", 1)[1].splitlines()[0]
    product = sympy.prod(sympy.Rational(s["driver"], s["driven"]) for s in best["stages"])
    report = json.loads((out / "report.json").read_text(encoding="utf-8"))
    built_ratio = sympy.Rational(report["ratio"]["numerator"], report["ratio"]["denominator"])
    assert built_ratio == product
    period = 60 / built_ratio  # seconds a turn of the output, the motor at 1 turn a minute
    assert abs(float(period) / 86164.0905 - 1) < 1e-6
    assert report["assembly"]["interference"] == []
    assert not [f for f in report["findings"] if f["severity"] == "failure"]
    assert report["worm"]["place"]["stage"] == 1 and "bevel" in report["worm"]["place"]["why"]
    assert "where the worm sits" in (out / "report.md").read_text(encoding="utf-8")


@pytest.mark.parametrize("args, word", [(["--worm", "0"], "starts"), (["--worm", "1", "--kind", "planetary"], "compound"),
                                        (["--worm", "1", "--direction", "same"], "direction"),
                                        (["--worm", "1", "--helix", "15"], "helix")])
def test_design_bad_worm_options_exit_2(tmp_path, capsys, args, word):
    out = tmp_path / "d"
    assert main(["design", "1/90", "-m", "1.5", "--out", str(out), *args]) == 2
    assert not out.exists() and word in capsys.readouterr().err


def test_design_shapes_the_worm_zk(tmp_path):
    # --worm-flank, --worm-diameter-factor and --worm-tool-diameter reach the train file's worm table, and the
    # planned pair is the ZK pair gearcad worm makes from the same figures (DIN 3975's forms).
    from gearcad.meshes.worm import make_worm_pair
    from gearcad.trains.worm_stage import worm_pair_of

    out = tmp_path / "zk"
    assert main(["design", "1/40", "--worm", "1", "--worm-flank", "zk", "--worm-tool-diameter", "60",
                 "--worm-diameter-factor", "12", "-m", "1", "--stages", "1", "--out", str(out), "--formats", "dxf",
                 "--no-sheets"]) == 0
    spec = parse_train((out / "train.toml").read_text(encoding="utf-8"))
    worm = spec.stages[0].worm
    assert (worm.form, worm.tool_diameter, worm.diameter_factor) == ("zk", 60.0, 12.0)
    assert spec.stages[0].driven.teeth == 40
    pair = worm_pair_of(spec)
    alone = make_worm_pair(1, 40, 1.0, diameter_factor=12.0, flank="zk", tool_diameter=60.0)
    assert pair.centre_distance == pytest.approx(alone.centre_distance) == pytest.approx((12 + 40) / 2)


@pytest.mark.parametrize("args, words", [
    (["--worm-flank", "zn"], "need"), (["--worm", "1", "--worm-flank", "zk"], "--worm-tool-diameter"),
    (["--worm", "1", "--worm-tool-diameter", "50"], "ZK"), (["--worm", "4", "--worm-diameter-factor", "3"], "lead angle"),
    (["--worm", "1", "--worm-diameter-factor", "nan"], "--worm-diameter-factor")])
def test_design_bad_worm_shape_exit_2(tmp_path, capsys, args, words):
    out = tmp_path / "d"
    assert main(["design", "1/90", "-m", "1.5", "--out", str(out), *args]) == 2
    err = capsys.readouterr().err
    assert not out.exists() and words in err and len(err.strip().splitlines()) == 1


@pytest.mark.slow
def test_the_solids_of_a_worm_train(tmp_path):
    # The worm and the blocks as STEP files, valid in OCP's checker; the worm placed across the plates.
    from OCP.Bnd import Bnd_Box
    from OCP.BRepBndLib import BRepBndLib

    from gearcad.export.step_worm import is_valid
    from gearcad.export.step_worm_stage import placed, worm_part_solid
    from gearcad.trains.planner import plan_train

    code, out = _build(tmp_path, TRAIN, "step")
    assert code == 0
    for name in ("worm", "worm-block-1", "worm-block-2", "s1-wheel", "assembly"):
        assert (out / f"{name}.step").stat().st_size > 1000
    plan = plan_train(parse_train(TRAIN))
    w = plan.worm
    shape = placed(worm_part_solid(w), w.direction, (w.x, w.y, w.z), w.thread / 2)
    assert is_valid(shape)
    box = Bnd_Box()
    BRepBndLib.AddOptimal_s(shape, box, False, False)  # the exact box of the surfaces, not of their control points
    x0, y0, z0, x1, y1, z1 = box.Get()
    r_a1 = w.pair.tip_diameter / 2
    # Across the plates' normal: the tip cylinder about the axis height; in the plate: from one shaft end to the
    # other (the plan's heading), the tip diameter wide.
    assert (z0 + z1) / 2 == pytest.approx(w.z, abs=1e-3) and z1 - z0 == pytest.approx(2 * r_a1, abs=1e-3)
    ends = np.array([w.at(-w.shaft_end), w.at(w.shaft_end)])
    corners = np.vstack([ends + r_a1 * np.array([-math.sin(w.direction), math.cos(w.direction)]) * k for k in (-1, 1)])
    assert (x0, y0) == pytest.approx(tuple(corners.min(axis=0)), abs=1e-3)
    assert (x1, y1) == pytest.approx(tuple(corners.max(axis=0)), abs=1e-3)


def test_the_example_train_file_reaches_its_target():
    # gearcad/demo/camera-slider.toml: the kinematic model's ratio against sympy's product and the file's target.
    from importlib.resources import files

    from gearcad.trains.planner import plan_train

    spec = parse_train(files("gearcad.demo").joinpath("camera-slider.toml").read_text(encoding="utf-8"))
    plan = plan_train(spec)
    assert sympy.Rational(plan.ratio.numerator, plan.ratio.denominator) == sympy.Rational(1, 30) * sympy.Rational(15, 45)
    assert sympy.Rational(plan.ratio.numerator, plan.ratio.denominator) == sympy.sympify(spec.target)
    assert not [f for f in plan.findings if f.severity == "failure"]


def test_a_zn_worm_stage_plans_with_its_own_wheel():
    # A ZN worm (straight in the thread's normal section, DIN 3975) cuts a wheel of its own: the stage's wheel is the
    # hob simulation of the ZN thread (geometry.worm_flanks), its fitted outline within the tolerance, and it differs
    # from the ZA wheel's (the two forms' axial sections differ away from the reference line).
    from gearcad.trains.planner import plan_train

    za = plan_train(parse_train(TRAIN))
    zn = plan_train(parse_train(TRAIN.replace('form = "ZA"', 'form = "ZN"')))
    fit = next(f for f in zn.findings if f.check == "worm wheel outline")
    assert zn.spec.stages[0].worm.form == "zn" and fit.severity == "ok" and fit.value <= fit.limit
    a, n = za.gear("s1-wheel").part.outer.points(), zn.gear("s1-wheel").part.outer.points()
    assert not (a.shape == n.shape and np.allclose(a, n, atol=1e-6))


def test_a_zk_worm_stage_names_its_tool_and_writes_it_back():
    # ZK (DIN 3975: cut by a biconical disc) needs the disc's diameter; the stage plans with the ZK thread's own wheel
    # and the train file keeps the key.
    from gearcad.trains.planner import plan_train

    text = TRAIN.replace('form = "ZA" }', 'form = "ZK", tool_diameter = 80 }')
    spec = parse_train(text)
    assert (spec.stages[0].worm.form, spec.stages[0].worm.tool_diameter) == ("zk", 80.0)
    assert parse_train(train_to_toml(spec)) == spec
    plan = plan_train(spec)
    fit = next(f for f in plan.findings if f.check == "worm wheel outline")
    assert fit.severity == "ok" and plan.worm.pair.tool_diameter == 80.0
