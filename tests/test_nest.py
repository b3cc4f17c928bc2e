"""Nested cut sheets: no two parts overlap, every part inside its sheet, spacing at least two kerfs.

Reference: shapely (distances, containment and areas of the placed outlines), and
ezdxf reading the sheet files back.
"""

import json
import math
from importlib import resources

import ezdxf
import numpy as np
import pytest
import shapely
from ezdxf import path as dxfpath
from hypothesis import given, settings
from hypothesis import strategies as st

from gearcad.cli import main
from gearcad.errors import InputError
from gearcad.geometry.nest import NestItem, nest_parts, placed_points, turned_part
from gearcad.geometry.shape import Part, circle_loop, rounded_rectangle
from gearcad.trains.planner import plan_train
from gearcad.export.sheets import flat_parts, part_spacing, plan_sheets
from gearcad.trains.trainfile import parse_train

PLANETARY = """name = "epi"
module = 1.0
thickness = 3.0
fabrication = "laser-3mm-acrylic"
[planetary]
sun = 18
planet = 24
ring = 66
planets = 3
fixed = "ring"
"""


def demo_text() -> str:
    return resources.files("gearcad.demo").joinpath("moon-phase.toml").read_text(encoding="utf-8")


@pytest.fixture(scope="module", params=["demo", "planetary"])
def plan(request):
    from gearcad.trains.stages import solve_train_spec

    if request.param == "planetary":
        return plan_train(parse_train(PLANETARY))
    spec, _ = solve_train_spec(parse_train(demo_text()))
    return plan_train(spec)


def placed_polygons(parts, sheet):
    """Each placed part as a shapely polygon with its holes (outer minus holes and round holes)."""
    out = {}
    for place in sheet.placements:
        part = parts[place.name]
        outer = shapely.Polygon(placed_points(part.outer.points(), place))
        holes = [shapely.Polygon(placed_points(h.points(), place)) for h in part.holes]
        c, s = math.cos(place.rotation), math.sin(place.rotation)
        holes += [shapely.Point(c * x - s * y + place.dx, s * x + c * y + place.dy).buffer(d / 2, quad_segs=32)
                  for x, y, d in part.circles]
        out[place.name] = (outer, holes)
    return out


def check_sheet(polygons, sheet, spacing):
    box = shapely.box(0, 0, sheet.width, sheet.height)
    names = sorted(polygons)
    for name in names:
        outer, holes = polygons[name]
        assert box.contains(outer), name
        assert box.exterior.distance(outer) >= spacing - 1e-9, name  # clear of the sheet's edges
        for hole in holes:
            assert outer.buffer(1e-9).contains(hole), name  # holes inside their parts
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            assert polygons[a][0].intersection(polygons[b][0]).area <= 1e-9, (a, b)  # no overlap
            assert polygons[a][0].distance(polygons[b][0]) >= spacing - 1e-9, (a, b)


@pytest.mark.parametrize("size", [None, (300.0, 200.0), (230.0, 130.0)])
def test_plan_parts_nest_without_overlap_inside_their_sheets(plan, size):
    if size is not None and size[1] < 130 and plan.spec.name == "epi":
        size = (200.0, 200.0)
    groups = plan_sheets(plan, size)
    spacing = part_spacing(plan.fabrication)
    assert spacing >= 2 * plan.fabrication.kerf
    parts = {fp.name: fp.part for fp in flat_parts(plan)}
    placed = []
    for group in groups:
        assert group.spacing == spacing
        for sheet in group.nesting.sheets:
            check_sheet(placed_polygons(parts, sheet), sheet, spacing)
            placed += [p.name for p in sheet.placements]
            assert sheet.part_area == pytest.approx(sum(parts[p.name].area() for p in sheet.placements))
    assert sorted(placed) == sorted(parts)  # every part once


def test_gears_turn_freely_plates_by_quarters(plan):
    kinds = {fp.name: fp.turns for fp in flat_parts(plan)}
    assert {kinds[g.name] for g in plan.gears} == {"free"}
    assert {kinds[p.name] for p in plan.plates} == {"quarter"}
    for group in plan_sheets(plan, (400.0, 300.0)):
        for sheet in group.nesting.sheets:
            for place in sheet.placements:
                if kinds[place.name] == "quarter":
                    assert place.rotation in (0.0, math.pi / 2)


@st.composite
def shapes(draw):
    count = draw(st.integers(1, 14))
    items = []
    for k in range(count):
        if draw(st.booleans()):
            w, h = draw(st.floats(5, 120)), draw(st.floats(5, 80))
            r = draw(st.floats(0, min(w, h) / 2))
            part = Part(f"r{k}", rounded_rectangle(w, h, r), circles=((w / 2, h / 2, min(w, h) / 3),))
            items.append(NestItem(part.name, part, draw(st.sampled_from(["quarter", "none"]))))
        else:
            d = draw(st.floats(4, 90))
            part = Part(f"c{k}", circle_loop(0.0, 0.0, d, clockwise=False), circles=((0.0, 0.0, d / 4),))
            items.append(NestItem(part.name, part, "free"))
    return items


@settings(deadline=None, max_examples=25)
@given(shapes(), st.floats(130, 400), st.floats(100, 300), st.floats(0, 4))
def test_random_parts_never_overlap_and_stay_on_their_sheets(items, width, height, spacing):
    nesting = nest_parts(items, width, height, spacing)
    parts = {i.name: i.part for i in items}
    placed = [p.name for s in nesting.sheets for p in s.placements]
    assert sorted(placed) == sorted(parts) and not nesting.left_out
    for sheet in nesting.sheets:
        check_sheet(placed_polygons(parts, sheet), sheet, spacing)


def test_a_part_larger_than_the_sheet_is_refused_or_left_out():
    big = Part("big", rounded_rectangle(300.0, 100.0, 5.0))
    small = Part("small", rounded_rectangle(20.0, 20.0, 2.0))
    items = [NestItem("big", big), NestItem("small", small)]
    with pytest.raises(InputError, match="big.*does not fit a 200 x 200 mm sheet"):
        nest_parts(items, 200.0, 200.0, 2.0)
    nesting = nest_parts(items, 200.0, 200.0, 2.0, strict=False)
    assert nesting.left_out == ("big",) and [p.name for p in nesting.sheets[0].placements] == ["small"]
    # turned a quarter, the long plate fits a tall sheet
    nesting = nest_parts(items, 120.0, 320.0, 2.0)
    assert nesting.sheets[0].placements[0].rotation == pytest.approx(math.pi / 2)


def test_turned_part_turns_holes_with_the_outline():
    part = Part("p", rounded_rectangle(40.0, 20.0, 3.0), circles=((30.0, 10.0, 4.0),))
    turned = turned_part(part, math.pi / 2)
    assert turned.circles[0][:2] == pytest.approx((-10.0, 30.0))
    assert turned.area() == pytest.approx(part.area())


# -- the sheet files ----------------------------------------------------------------------

def flattened(entity):
    return np.array([(v.x, v.y) for v in dxfpath.make_path(entity).flattening(1e-3)])


@pytest.fixture(scope="module")
def sheet_build(tmp_path_factory):
    folder = tmp_path_factory.mktemp("sheets")
    (folder / "t.toml").write_text(demo_text(), encoding="utf-8")
    out = folder / "out"
    assert main(["build", str(folder / "t.toml"), "--out", str(out), "--formats", "dxf,svg", "--sheet", "300x200"]) in (0, 1)
    return out, json.loads((out / "report.json").read_text())


def test_sheet_files_read_back_hold_every_part_apart_and_inside(sheet_build):
    out, report = sheet_build
    sheets = report["sheets"]
    assert [s["name"] for s in sheets] == [f"sheet-acrylic-3mm-{k}" for k in range(1, len(sheets) + 1)]
    kerf = report["fabrication"]["kerf"]
    names = []
    for row in sheets:
        doc = ezdxf.readfile(out / f"{row['name']}.dxf")
        assert not doc.audit().has_errors
        msp = doc.modelspace()
        outers = [shapely.Polygon(flattened(e)) for e in msp if e.dxf.layer == "CUT_OUTER"]
        inners = [shapely.Polygon(flattened(e)) for e in msp if e.dxf.layer == "CUT_INNER"]
        assert len(outers) == len(row["parts"])
        sheet = shapely.box(0, 0, row["width_mm"], row["height_mm"])
        for i, a in enumerate(outers):
            assert sheet.contains(a)
            for b in outers[i + 1:]:
                assert a.distance(b) >= 2 * kerf  # at least two kerfs apart
        for hole in inners:
            assert sum(a.contains(hole) for a in outers) == 1  # every hole inside one part
        material = shapely.union_all(outers).difference(shapely.union_all(inners))
        assert row["used_percent"] == pytest.approx(100 * material.area / sheet.area, abs=0.2)
        roles = [{"MARKING": 0, "CUT_INNER": 1, "CUT_OUTER": 2}[e.dxf.layer] for e in msp]
        assert roles == sorted(roles)  # laser order kept on the sheet
        names += row["parts"]
    assert sorted(names) == sorted(report_part_names(report))
    assert "Cut sheets" in (out / "report.md").read_text(encoding="utf-8")


def report_part_names(report):
    return [g["name"] for g in report["gears"]] + [p["name"] for p in report["plates"]]


def test_sheet_svg_page_is_the_sheet(sheet_build):
    import xml.etree.ElementTree as ET

    out, report = sheet_build
    root = ET.parse(out / f"{report['sheets'][0]['name']}.svg").getroot()
    assert root.get("width") == "300mm" and root.get("height") == "200mm"
    assert [float(v) for v in root.get("viewBox").split()] == [0, -200, 300, 200]


def test_a_sheet_smaller_than_a_part_is_refused_before_any_file(tmp_path, capsys):
    (tmp_path / "t.toml").write_text(demo_text(), encoding="utf-8")
    code = main(["build", str(tmp_path / "t.toml"), "--out", str(tmp_path / "out"), "--sheet", "150x100"])
    assert code == 2 and not (tmp_path / "out").exists()
    err = capsys.readouterr().err.strip()
    assert "does not fit a 150 x 100 mm sheet" in err and "\n" not in err


@pytest.mark.parametrize("text", ["abc", "300", "300x", "5x300", "300x1e9", "nanxnan", "-300x200"])
def test_bad_sheet_sizes_are_refused(tmp_path, capsys, text):
    (tmp_path / "t.toml").write_text(demo_text(), encoding="utf-8")
    code = main(["build", str(tmp_path / "t.toml"), "--out", str(tmp_path / "out"), f"--sheet={text}"])
    assert code == 2 and not (tmp_path / "out").exists()
    assert "--sheet" in capsys.readouterr().err


def test_parts_larger_than_the_profiles_sheet_are_left_off_with_a_warning(tmp_path):
    shipped = resources.files("gearcad.profile_data").joinpath("fabrication", "laser-3mm-acrylic.toml")
    text = shipped.read_text(encoding="utf-8").replace("value = 600.0", "value = 120.0").replace(
        "value = 400.0", "value = 100.0")
    (tmp_path / "small-sheet.toml").write_text(text, encoding="utf-8")
    train = demo_text().replace('fabrication = "laser-3mm-acrylic"', f'fabrication = "{tmp_path / "small-sheet.toml"}"')
    assert str(tmp_path) in train
    (tmp_path / "t.toml").write_text(train, encoding="utf-8")
    out = tmp_path / "out"
    assert main(["build", str(tmp_path / "t.toml"), "--out", str(out), "--formats", "dxf"]) in (0, 1)
    report = json.loads((out / "report.json").read_text())
    on_sheets = {p for s in report["sheets"] for p in s["parts"]}
    assert {"back-plate", "front-plate"}.isdisjoint(on_sheets)
    assert {g["name"] for g in report["gears"]} <= on_sheets
    assert any("back-plate" in w and "120 x 100 mm" in w for w in report["warnings"])


def test_a_rectangle_rounded_to_half_its_height_is_a_stadium_without_empty_straights():
    # Radius = half the short side: the corner arcs meet, so the short sides have no straight (once a zero-length
    # line with a NaN tangent).  Area against the closed form w h - (4 - pi) r^2, within the arcs' chord sampling.
    loop = rounded_rectangle(40.0, 20.0, 10.0)
    assert all(np.isfinite(c.tangents).all() for c in loop.curves)
    assert [c.kind for c in loop.curves].count("line") == 2
    assert Part("s", loop).area() == pytest.approx(40 * 20 - (4 - math.pi) * 100, rel=1e-3)
