"""Helical stages in train files: parsing, hands, the plan (phased at mid-face), the report, bad input."""

import json
import math

import pytest
import shapely

from gearcad.cli import main
from gearcad.errors import InputError
from gearcad.meshes.helical import HelicalGear
from gearcad.trains.plan import placed_outline
from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train, train_to_toml

HEAD = 'name = "hx"\nmodule = 1.0\nthickness = 6.0\nbore = 3.0\n'
TWO_STAGES = HEAD + '''
[[stage]]
driver = { teeth = 15, shift = 0.2 }
driven = 40
helix = 20
hand = "right"

[[stage]]
driver = 14
idler = 17
driven = { teeth = 30, hand = "left" }
helix = 25
hand = "left"
herringbone = true
gap = 1.0
'''


def test_parse_and_round_trip():
    spec = parse_train(TWO_STAGES)
    s1, s2 = spec.stages
    assert (s1.helix, s1.hand, s1.herringbone) == (20.0, "right", False)
    assert (s2.helix, s2.hand, s2.herringbone, s2.gap) == (25.0, "left", True, 1.0)
    assert parse_train(train_to_toml(spec)) == spec


def test_plan_alternates_the_hands_and_phases_at_mid_face():
    plan = plan_train(parse_train(TWO_STAGES))
    hands = {g.name: g.gear.hand for g in plan.gears}
    assert all(isinstance(g.gear, HelicalGear) for g in plan.gears)
    assert hands == {"s1-driver": "right", "s1-driven": "left", "s2-driver": "left", "s2-idler": "right",
                     "s2-driven": "left"}
    for m in plan.meshes:
        assert {f.check: f.severity for f in m.findings}["hands"] == "ok"
        # the drawn outlines (the transverse section at mid-face) of meshing gears, placed and turned as in the
        # assembly, touch without overlapping (shapely as reference): the mesh is phased at mid-face
        a, b = (shapely.Polygon(placed_outline(plan.gear(n), plan)) for n in m.names)
        assert a.intersection(b).area < 1e-6
        assert a.distance(b) < 0.3 + 1e-6  # no further apart than the backlash allows


def test_zero_helix_stage_is_the_spur_stage():
    spur = plan_train(parse_train(HEAD + "[[stage]]\ndriver = 15\ndriven = 40\n"))
    zero = plan_train(parse_train(HEAD + "[[stage]]\ndriver = 15\ndriven = 40\nhelix = 0\n"))
    assert [g.gear for g in spur.gears] == [g.gear for g in zero.gears]
    assert [g.part.outer.points().tolist() for g in spur.gears] == [g.part.outer.points().tolist() for g in zero.gears]


@pytest.mark.parametrize("stage, words", [
    ('driver = 15\ndriven = 40\nhelix = 45\n', "below 45 degrees"),
    ('driver = { teeth = 15, hand = "right" }\ndriven = { teeth = 40, hand = "right" }\nhelix = 20\n', "cannot mesh"),
    ('driver = 15\ndriven = 40\nhelix = 20\nhand = "up"\n', "left or right"),
    ('driver = { teeth = 15, hand = "left" }\ndriven = 40\n', "needs a helical stage"),
    ('driver = 15\ndriven = 40\nhelix = 20\nherringbone = true\ngap = 6\n', "narrower than the face width"),
    ('driver = 15\ndriven = 40\nherringbone = true\n', "above 0 degrees"),
])
def test_bad_helical_stages(stage, words):
    with pytest.raises(InputError, match=words):
        parse_train(HEAD + "[[stage]]\n" + stage)


def test_helix_on_a_planetary_train_is_refused():
    text = HEAD + "[planetary]\nsun = 18\nplanet = 18\nring = 54\n[[stage]]\ndriver = 15\ndriven = 40\nhelix = 20\n"
    # refused by the contradiction rule (a [planetary] table takes no [[stage]] tables) before the helix rule
    with pytest.raises(InputError, match=r"compound trains|no \[\[stage\]\] tables"):
        parse_train(text)


def test_build_bad_hands_exit_2_nothing_written(tmp_path, capsys):
    path = tmp_path / "bad.toml"
    path.write_text(HEAD + '[[stage]]\ndriver = { teeth = 15, hand = "left" }\ndriven = 40\nhelix = 20\n')
    out = tmp_path / "out"
    assert main(["build", str(path), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and "cannot mesh" in err
    assert not out.exists()


def test_build_report_carries_the_helical_keys(tmp_path, capsys):
    path = tmp_path / "hx.toml"
    path.write_text(TWO_STAGES)
    out = tmp_path / "out"
    # a torque this acrylic train carries: a failed rating writes nothing (issue 12's rule)
    code = main(["build", str(path), "--out", str(out), "--formats", "dxf,svg", "--torque", "0.02", "--speed", "60"])
    assert code == 0
    data = json.loads((out / "report.json").read_text())
    g = data["gears"][0]
    assert g["helix_angle"] == pytest.approx(20.0) and g["hand"] == "right" and g["module"] == pytest.approx(1.0)
    assert g["lead"] == pytest.approx(math.pi * 15 / math.cos(math.radians(20)) / math.tan(math.radians(20)))
    m1, m2 = data["meshes"][:2]
    assert m1["axial_force"] > 0 and m1["overlap_ratio"] == pytest.approx(6 * math.sin(math.radians(20)) / math.pi)
    assert "Helical gears" in (out / "report.md").read_text()
    # the drawing says what it is where its gear holds the words (the 15-tooth pinion holds only its name)
    assert "transverse section" in (out / "s1-driven.svg").read_text() and "transverse section" in (out / "s1-driven.dxf").read_text()
    assert "transverse section at mid-face" in (out / "report.md").read_text()


@pytest.mark.slow
def test_build_writes_helical_solids(tmp_path, capsys):
    # A herringbone stage built into STEP: bundle sweeps each gear (helical_solid checks BRepCheck and volume).
    path = tmp_path / "hb.toml"
    path.write_text(HEAD + '[[stage]]\ndriver = 12\ndriven = 18\nhelix = 30\nherringbone = true\n')
    out = tmp_path / "out"
    assert main(["build", str(path), "--out", str(out), "--formats", "step", "--no-assembly"]) in (0, 1)
    assert (out / "s1-driver.step").stat().st_size > 10_000


def test_design_helix_writes_helical_stages_free_of_undercut(tmp_path, capsys):
    out = tmp_path / "d"
    code = main(["design", "0.1", "-m", "1", "--helix", "20", "--thickness", "10", "--out", str(out), "--formats", "dxf"])
    assert code in (0, 1)
    spec = parse_train((out / "train.toml").read_text())
    assert all(s.helix == 20.0 for s in spec.stages)
    # the countershaft's two gears share a hand, so their axial forces oppose (common practice)
    assert spec.stages[1].hand == "left"
    data = json.loads((out / "report.json").read_text())
    for m in data["meshes"]:
        checks = {f["check"]: f["severity"] for f in m["findings"]}
        assert checks["undercut gear 1"] == "ok" and checks["undercut gear 2"] == "ok"


@pytest.mark.parametrize("argv, words", [
    (["--helix", "50"], "below 45"),
    (["--herringbone"], "needs a helix angle"),
    (["--helix", "20", "--kind", "planetary"], "compound trains only"),
])
def test_design_bad_helix(tmp_path, capsys, argv, words):
    out = tmp_path / "d"
    assert main(["design", "0.1", "-m", "1", "--out", str(out), *argv]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and words in err and not out.exists()


# -- laminations ---------------------------------------------------------------------------------------------

def test_lamination_turns_share_the_twist():
    from gearcad.meshes.helical import lamination_turns

    twist = 0.3
    turns = lamination_turns(6, 6.0, twist)
    # each lamination is the section at its middle height: steps of twist / N, symmetric about mid-face
    assert all(b - a == pytest.approx(twist / 6, rel=1e-12) for a, b in zip(turns, turns[1:]))
    assert sum(turns) == pytest.approx(0.0, abs=1e-15)
    herring = lamination_turns(6, 6.0, twist, herringbone=True)
    assert herring == pytest.approx(herring[::-1], abs=1e-15) and max(herring) <= 0


def test_lamination_parts_turn_only_the_teeth():
    import numpy as np

    from gearcad.meshes.helical import lamination_parts

    plan = plan_train(parse_train(TWO_STAGES))
    g = plan.gear("s1-driver")
    laminations = lamination_parts(g.part, 3, 6.0, g.gear.twist(6.0))
    turn = g.gear.twist(6.0) / 3
    for lam, k in zip(laminations, (-1, 0, 1)):
        assert lam.circles == g.part.circles and lam.holes == g.part.holes
        c, s = math.cos(k * turn), math.sin(k * turn)
        expected = g.part.outer.points() @ np.array([[c, -s], [s, c]]).T
        assert np.allclose(lam.outer.points(), expected, atol=1e-12)
    assert [lam.name for lam in laminations] == ["s1-driver-lam1", "s1-driver-lam2", "s1-driver-lam3"]


def test_build_writes_laminations(tmp_path, capsys):
    path = tmp_path / "hx.toml"
    path.write_text(HEAD + '[[stage]]\ndriver = 15\ndriven = 40\nhelix = 20\n')
    out = tmp_path / "out"
    assert main(["build", str(path), "--out", str(out), "--formats", "dxf", "--laminations", "3"]) in (0, 1)
    assert sorted(p.name for p in out.glob("s1-driver-lam*.dxf")) == [f"s1-driver-lam{k}.dxf" for k in (1, 2, 3)]
    assert main(["build", str(path), "--out", str(tmp_path / "bad"), "--laminations", "1"]) == 2
    assert not (tmp_path / "bad").exists()


def test_zero_helix_files_are_todays_files(tmp_path, capsys):
    # beta = 0 gives exactly the spur files: every DXF, SVG and the report byte for byte
    spur, zero = tmp_path / "spur.toml", tmp_path / "zero.toml"
    spur.write_text(HEAD + "[[stage]]\ndriver = 15\ndriven = 40\n")
    zero.write_text(HEAD + "[[stage]]\ndriver = 15\ndriven = 40\nhelix = 0\n")
    for path in (spur, zero):
        assert main(["build", str(path), "--out", str(tmp_path / path.stem), "--formats", "dxf,svg"]) in (0, 1)
    names = sorted(p.name for p in (tmp_path / "spur").iterdir() if p.suffix in (".dxf", ".svg", ".md", ".json"))
    assert names and names == sorted(p.name for p in (tmp_path / "zero").iterdir() if p.suffix in (".dxf", ".svg", ".md", ".json"))
    for name in names:
        assert (tmp_path / "spur" / name).read_bytes() == (tmp_path / "zero" / name).read_bytes(), name


# -- planetary sets ------------------------------------------------------------------------------------------

PLANETARY = HEAD + '''
[planetary]
sun = 15
planet = 15
ring = 45
planets = 3
shift_limit = 0.5
helix = 20
hand = "right"
'''


def test_helical_planetary_hands_sun_planets_ring():
    from gearcad.meshes.helical import HelicalRing

    spec = parse_train(PLANETARY)
    assert parse_train(train_to_toml(spec)) == spec
    plan = plan_train(spec)
    hands = {g.name: g.gear.hand for g in plan.gears}
    # external sun/planet: opposite hands; internal planet/ring: the same hand
    assert hands["sun"] == "right" and hands["planet-1"] == hands["planet-3"] == hands["ring"] == "left"
    assert isinstance(plan.gear("ring").gear, HelicalRing)
    for m in plan.meshes:
        assert {f.check: f.severity for f in m.findings}["hands"] == "ok"
    # every planet meshes sun and ring at mid-face: placed outlines touch without overlapping (shapely)
    sun = shapely.Polygon(placed_outline(plan.gear("sun"), plan))
    ring_hole = shapely.Polygon([tuple(p) for p in _placed_ring_hole(plan)])
    for k in (1, 2, 3):
        planet = shapely.Polygon(placed_outline(plan.gear(f"planet-{k}"), plan))
        assert sun.intersection(planet).area < 1e-6
        assert planet.difference(ring_hole).area < 1e-6


def _placed_ring_hole(plan):
    from gearcad.trains.plan import placed_holes

    return placed_holes(plan.gear("ring"), plan)[0]


def test_helical_planetary_centre_by_iso_formula():
    # the common centre distance of sun/planet and planet/ring pairs is ISO 21771's helical one
    from gearcad.meshes.helical import helical_centre_distance
    from gearcad.profiles import load_tooth_system

    plan = plan_train(parse_train(PLANETARY))
    sun, planet = plan.gear("sun").gear, plan.gear("planet-1").gear
    expected = helical_centre_distance(15, 15, 1.0, load_tooth_system("iso53-a").pressure_angle, math.radians(20),
                                       sun.normal_shift + planet.normal_shift)
    assert plan.meshes[0].pair.centre_distance == pytest.approx(expected, rel=1e-12)


def test_zero_helix_planetary_is_the_spur_set():
    spur = plan_train(parse_train(PLANETARY.replace("helix = 20\n", "").replace('hand = "right"\n', "")))
    zero = plan_train(parse_train(PLANETARY.replace("helix = 20", "helix = 0")))
    assert [g.gear for g in spur.gears] == [g.gear for g in zero.gears]


def test_helical_planetary_refusals(tmp_path, capsys):
    with pytest.raises(InputError, match="below 45"):
        parse_train(PLANETARY.replace("helix = 20", "helix = 50"))
    path = tmp_path / "p.toml"
    path.write_text(PLANETARY)
    assert main(["build", str(path), "--out", str(tmp_path / "o"), "--torque", "0.1", "--speed", "10"]) == 2
    assert "not available yet" in capsys.readouterr().err


def test_ring_laminations_turn_the_teeth_not_the_blank():
    import numpy as np

    from gearcad.meshes.helical import lamination_parts

    plan = plan_train(parse_train(PLANETARY))
    g = plan.gear("ring")
    lams = lamination_parts(g.part, 2, 6.0, g.gear.twist(6.0), turn_holes=True)
    for lam in lams:
        assert np.array_equal(lam.outer.points(), g.part.outer.points()) and lam.circles == g.part.circles
    assert not np.allclose(lams[0].holes[0].points(), lams[1].holes[0].points())


@pytest.mark.slow
def test_helical_ring_solid():
    # the ring's teeth (its hole) swept along the helix: BRepCheck and the volume (blank less tooth area x face
    # width, 1e-6) are checked inside helical_solid
    from gearcad.export.step import helical_solid

    plan = plan_train(parse_train(PLANETARY), tolerance=1e-3)
    g = plan.gear("ring")
    built = helical_solid(g.part, 6.0, g.gear.twist(6.0), 1e-3, twist_holes=True)
    assert built.volume > 0


def test_face_width_longer_than_a_lead_is_refused(tmp_path, capsys):
    path = tmp_path / "long.toml"
    path.write_text(HEAD.replace("thickness = 6.0", "thickness = 200.0") + "[[stage]]\ndriver = 12\ndriven = 20\nhelix = 40\n")
    assert main(["build", str(path), "--out", str(tmp_path / "o")]) == 2
    assert "lead" in capsys.readouterr().err and not (tmp_path / "o").exists()


def test_shaft_axial_forces_statics():
    # Statics of the helix (F_a = F_t tan beta, sense by hand and by driving/driven): same-hand gears on one
    # shaft, one driven and one driving, push opposite ways; an idler's two meshes cancel; opposite hands add.
    from gearcad.meshes.helical import shaft_axial_forces

    same = shaft_axial_forces([("s", "left", False, 3.0), ("s", "left", True, 5.0)])
    assert same["s"] == pytest.approx(2.0)
    idler = shaft_axial_forces([("i", "right", False, 4.0), ("i", "right", True, 4.0)])
    assert idler["i"] == pytest.approx(0.0)
    opposite = shaft_axial_forces([("s", "right", False, 3.0), ("s", "left", True, 5.0)])
    assert opposite["s"] == pytest.approx(8.0)


def test_report_lists_thrust_per_shaft(tmp_path, capsys):
    path = tmp_path / "hx.toml"
    path.write_text(TWO_STAGES.replace("herringbone = true\ngap = 1.0\n", ""))
    out = tmp_path / "out"
    assert main(["build", str(path), "--out", str(out), "--formats", "dxf", "--torque", "0.02", "--speed", "60"]) == 0
    data = json.loads((out / "report.json").read_text())
    forces = data["shaft_axial_forces"]
    f1, f2 = (m["axial_force"] for m in data["meshes"][:2])
    assert forces["input"] == pytest.approx(f1)
    # shaft-1 carries stage 1's driven gear (left) and stage 2's driver (left): the thrusts oppose
    assert forces["shaft-1"] == pytest.approx(abs(f1 - f2))
    # the idler (right) sits between two meshes of the same load: no net thrust
    assert forces["shaft-2"] == pytest.approx(0.0, abs=1e-9)
