"""``gearcad build``: files read back by the reference libraries (ezdxf, OCP, shapely) agree with the geometry."""

import json
import math

import ezdxf
import numpy as np
import pytest
import shapely
from ezdxf import path as dxfpath

from gearcad.cli import main
from gearcad.geometry import SpurGear
from gearcad.profiles import load_fabrication

TRAIN = """name = "{name}"
title = "Test train"
target = "1/15"
module = 1.5
thickness = 3.0
fabrication = "{fab}"
bore = 3.0

[[stage]]
driver = {{ teeth = 12, shift = 0.3 }}
driven = {{ teeth = 60, shift = -0.3 }}

[[stage]]
driver = 15
driven = {{ teeth = 45, flat = 1.2 }}
"""


def build(tmp_path_factory, fab, formats="dxf,svg,step", extra=()):
    folder = tmp_path_factory.mktemp(fab)
    train = folder / "train.toml"
    train.write_text(TRAIN.format(name="t", fab=fab), encoding="utf-8")
    out = folder / "out"
    code = main(["build", str(train), "--out", str(out), "--formats", formats, *extra])
    assert code in (0, 1)
    return out, json.loads((out / "report.json").read_text())


@pytest.fixture(scope="module")
def printed(tmp_path_factory):
    return build(tmp_path_factory, "fdm-pla-0.4mm")


@pytest.fixture(scope="module")
def lasered(tmp_path_factory):
    return build(tmp_path_factory, "laser-3mm-acrylic", "dxf,svg")


def dxf_outline(path):
    """Outer contour of a gear DXF, flattened by ezdxf's path tools to 0.1 µm, and its circles."""
    doc = ezdxf.readfile(path)
    assert not doc.audit().has_errors  # ezdxf's own audit
    assert doc.header["$INSUNITS"] == 4  # millimetres
    outer = [e for e in doc.modelspace() if e.dxftype() == "LWPOLYLINE" and e.dxf.layer == "CUT_OUTER"]
    assert len(outer) == 1 and outer[0].closed
    pts = np.array([(v.x, v.y) for v in dxfpath.make_path(outer[0]).flattening(1e-4)])
    circles = [(e.dxf.center.x, e.dxf.center.y, 2 * e.dxf.radius) for e in doc.modelspace() if e.dxftype() == "CIRCLE"]
    return pts, circles, doc


def gear_of(report, name):
    g = next(g for g in report["gears"] if g["name"] == name)
    return g, SpurGear.make(g["teeth"], g["module"], shift=g["shift"], thinning=g["thinning"],
                            tip_shortening=(g["reference_diameter"] + 2 * g["module"] * (1 + g["shift"]) - g["tip_diameter"]) / (2 * g["module"]))


@pytest.mark.slow
@pytest.mark.parametrize("name", ["s1-driver", "s1-driven", "s2-driver", "s2-driven"])
def test_dxf_outline_matches_the_geometry(printed, name):
    out, report = printed
    g, gear = gear_of(report, name)
    pts, _, _ = dxf_outline(out / g["files"]["dxf"])
    r = np.hypot(pts[:, 0], pts[:, 1])
    assert r.max() == pytest.approx(g["tip_diameter"] / 2, abs=1e-3 * 1e-0)  # within 1 µm
    assert r.min() == pytest.approx(g["root_diameter"] / 2, abs=1e-3)
    # z teeth: runs of points near the tip circle.
    near = r > g["tip_diameter"] / 2 - 0.05
    assert np.count_nonzero(near & ~np.roll(near, 1)) == g["teeth"]
    # Arc tooth thickness at the reference circle (ISO 21771 formula, thinning included): shapely intersection.
    ring = shapely.Point(0, 0).buffer(g["reference_diameter"] / 2, quad_segs=4096).exterior
    poly = shapely.Polygon(pts)
    inside = poly.intersection(ring)
    arcs = [line.length for line in getattr(inside, "geoms", [inside])]
    assert np.median(arcs) == pytest.approx(gear.tooth_thickness, abs=3e-3)


@pytest.mark.slow
def test_kerf_offsets_outlines_out_and_holes_in(lasered):
    kerf = load_fabrication("laser-3mm-acrylic").kerf
    out_l, rep_l = lasered
    g_l = next(g for g in rep_l["gears"] if g["name"] == "s1-driven")
    pts, circles, _ = dxf_outline(out_l / g_l["files"]["dxf"])
    r = np.hypot(pts[:, 0], pts[:, 1])
    assert r.max() == pytest.approx(g_l["tip_diameter"] / 2 + kerf / 2, abs=1e-3)
    assert r.min() == pytest.approx(g_l["root_diameter"] / 2 + kerf / 2, abs=1e-3)
    bore_clearance = load_fabrication("laser-3mm-acrylic").bore_clearance
    assert circles[0][2] == pytest.approx(g_l["bore"] + bore_clearance - kerf, abs=1e-9)


@pytest.mark.slow
def test_step_solids_are_valid_with_the_expected_volume(printed):
    # OCP as reference: BRepCheck validity, one solid, volume = outline area x thickness minus the bore (0.1 %).
    from OCP.BRepCheck import BRepCheck_Analyzer
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps
    from OCP.STEPControl import STEPControl_Reader
    from OCP.TopAbs import TopAbs_SOLID
    from OCP.TopExp import TopExp_Explorer

    out, report = printed
    # s1-driven: a round bore (the input's gear has a D-flat to take the drive).
    g = next(g for g in report["gears"] if g["name"] == "s1-driven")
    pts, circles, _ = dxf_outline(out / g["files"]["dxf"])
    reader = STEPControl_Reader()
    assert reader.ReadFile(str(out / g["files"]["step"])) == 1
    reader.TransferRoots()
    shape = reader.OneShape()
    assert BRepCheck_Analyzer(shape).IsValid()
    explorer, solids = TopExp_Explorer(shape, TopAbs_SOLID), 0
    while explorer.More():
        solids += 1
        explorer.Next()
    assert solids == 1
    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props)
    area = shapely.Polygon(pts).area - sum(math.pi * d * d / 4 for _, _, d in circles)
    assert props.Mass() == pytest.approx(area * g["thickness"], rel=1e-3)


@pytest.mark.slow
def test_plate_holes_sit_at_the_centre_distances(printed):
    out, report = printed
    shafts = {s["name"]: s for s in report["shafts"]}
    gears = {g["name"]: g for g in report["gears"]}
    for plate in report["plates"]:
        if plate["name"] not in ("back-plate", "front-plate"):  # bridges hold one shaft each (tests/test_mechanism.py)
            continue
        _, circles, _ = dxf_outline_any(out / plate["files"]["dxf"])
        for s in report["shafts"]:
            on_plate = s["back_plate"] if plate["name"] == "back-plate" else s["front_plate"]
            found = any(math.hypot(x - s["x"], y - s["y"]) < 1e-9 for x, y, _ in circles)
            assert found is on_plate
    for m in report["meshes"]:
        a, b = (shafts[gears[n]["shaft"]] for n in m["gears"])
        assert math.hypot(a["x"] - b["x"], a["y"] - b["y"]) == pytest.approx(m["centre_distance"], abs=1e-6)


def dxf_outline_any(path):
    doc = ezdxf.readfile(path)
    assert not doc.audit().has_errors
    circles = [(e.dxf.center.x, e.dxf.center.y, 2 * e.dxf.radius) for e in doc.modelspace() if e.dxftype() == "CIRCLE"]
    return None, circles, doc


@pytest.mark.slow
def test_no_two_gears_of_a_layer_overlap_unless_they_mesh(printed):
    # shapely: the tip circles of non-meshing gears in one layer are disjoint.
    _, report = printed
    shafts = {s["name"]: s for s in report["shafts"]}
    meshing = {frozenset(m["gears"]) for m in report["meshes"]}
    gears = report["gears"]
    for i, a in enumerate(gears):
        for b in gears[i + 1:]:
            if a["layer"] != b["layer"] or frozenset((a["name"], b["name"])) in meshing:
                continue
            pa, pb = shafts[a["shaft"]], shafts[b["shaft"]]
            ca = shapely.Point(pa["x"], pa["y"]).buffer(a["tip_diameter"] / 2)
            cb = shapely.Point(pb["x"], pb["y"]).buffer(b["tip_diameter"] / 2)
            assert not ca.intersects(cb)


def test_report_json_keys_are_the_contract(lasered):
    _, report = lasered
    assert set(report["ratio"]) >= {"target", "numerator", "denominator", "value", "relative_error", "direction"}
    assert (report["ratio"]["numerator"], report["ratio"]["denominator"]) == (1, 15)
    assert report["ratio"]["relative_error"] == 0.0
    for g in report["gears"]:
        assert set(g) >= {"name", "teeth", "module", "pressure_angle", "shift", "reference_diameter", "tip_diameter",
                          "root_diameter", "bore", "thickness", "shaft", "layer", "files"}
        assert set(g["files"]) == {"dxf", "step", "stl", "svg"}
    for m in report["meshes"]:
        assert set(m) >= {"gears", "centre_distance", "working_pressure_angle", "contact_ratio", "findings"}
    assert all(set(s) >= {"name", "x", "y", "diameter"} for s in report["shafts"])
    names = [p["name"] for p in report["plates"]]
    assert names[:2] == ["back-plate", "front-plate"] and all(n.startswith("bridge-") for n in names[2:])
    assert report["fabrication"] == {**report["fabrication"], "profile": "laser-3mm-acrylic", "kerf": 0.15}
    assert any("PVC" in c for c in report["cautions"])


def test_json_output_parses_after_a_step_export(tmp_path, capsys):
    train = tmp_path / "one.toml"
    train.write_text('name = "one"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n')
    code = main(["build", str(train), "--out", str(tmp_path / "o"), "--formats", "step", "--json"])
    out = capsys.readouterr().out
    assert code == 0
    assert json.loads(out)["gears"][0]["files"]["step"] == "s1-driver.step"


def test_a_rebuild_may_reuse_its_folder_but_foreign_folders_are_refused(tmp_path, capsys):
    train = tmp_path / "one.toml"
    train.write_text('name = "one"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n')
    out = tmp_path / "o"
    assert main(["build", str(train), "--out", str(out), "--formats", "dxf"]) == 0
    assert main(["build", str(train), "--out", str(out), "--formats", "dxf"]) == 0
    foreign = tmp_path / "foreign"
    foreign.mkdir()
    (foreign / "mine.txt").write_text("keep")
    capsys.readouterr()
    assert main(["build", str(train), "--out", str(foreign), "--formats", "dxf"]) == 2
    err = capsys.readouterr().err
    assert "not made by gearcad" in err and len(err.strip().splitlines()) == 1
    assert sorted(p.name for p in foreign.iterdir()) == ["mine.txt"]


@pytest.mark.parametrize("edit, needle", [
    (lambda t: t + "colour = 1\n", "unknown key"),
    (lambda t: t.replace("thickness = 2", "thickness = 0"), "thickness"),
    (lambda t: t.replace('driver = 20', 'driver = { teeth = 20, bore = 30 }'), "bore 30 mm is too large"),
    (lambda t: t.replace('module = 1', 'module = 1\nfabrication = "plasma"'), "unknown fabrication profile"),
    (lambda t: t.replace('module = 1', 'module = 1\ntooth_system = "iso53-z"'), "unknown tooth profile"),
    (lambda t: t.replace("[[stage]]", "[[stage]"), "TOML syntax error"),
    (lambda t: t.replace("driver = 20", "driver = 2"), "tooth count must be from 3"),
])
def test_bad_train_files_are_one_line_errors_and_write_nothing(tmp_path, capsys, edit, needle):
    text = 'name = "one"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n'
    train = tmp_path / "bad.toml"
    train.write_text(edit(text))
    out = tmp_path / "o"
    assert main(["build", str(train), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert not out.exists()


def test_an_unwritable_output_path_is_refused(tmp_path, capsys):
    train = tmp_path / "one.toml"
    train.write_text('name = "one"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n')
    blocker = tmp_path / "file"
    blocker.write_text("x")
    assert main(["build", str(train), "--out", str(blocker / "sub"), "--formats", "dxf"]) == 2
    assert "cannot create output folder" in capsys.readouterr().err


def test_dxf_layers_can_be_renamed_for_the_cutter(tmp_path):
    train = tmp_path / "one.toml"
    train.write_text('name = "one"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n')
    out = tmp_path / "o"
    assert main(["build", str(train), "--out", str(out), "--formats", "dxf", "--dxf-layers", "outer=CUT:1,marking=ENGRAVE:2"]) == 0
    doc = ezdxf.readfile(out / "s1-driver.dxf")  # ezdxf reads the layer table back
    layers = {layer.dxf.name: layer.dxf.color for layer in doc.layers}
    assert layers["CUT"] == 1 and layers["ENGRAVE"] == 2
    kinds = {(e.dxftype(), e.dxf.layer) for e in doc.modelspace()}
    assert ("LWPOLYLINE", "CUT") in kinds and ("TEXT", "ENGRAVE") in kinds
