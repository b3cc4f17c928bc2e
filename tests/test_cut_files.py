"""Cut files as independent readers take them: splines, extents, R12 units, marking text, laser order.

References: ezdxf (reading the files back, its B-spline evaluation and its bounding
boxes), shapely (distances and containment), matplotlib's text paths in DejaVu Sans
Bold (a wide face) for the room the marking text takes, and the DXF reference's
header variables ($EXTMIN/$EXTMAX: the drawing's extents; $INSUNITS 4 = millimetres;
$MEASUREMENT 1 = metric; $LUNITS 2 = decimal).
"""

import json
import math
import re
import xml.etree.ElementTree as ET
from importlib import resources

import ezdxf
import numpy as np
import pytest
import shapely
from ezdxf import bbox
from ezdxf import path as dxfpath
from ezdxf.math import BSpline

from gearcad.cli import main
from gearcad.export.neutral import CutDrawing, LinePiece, SplinePiece
from gearcad.export.cutting import part_drawing
from gearcad.export.dxf import write_dxf
from gearcad.export.svg import write_svg
from gearcad.geometry.bspline import evaluate, loop_pieces
from gearcad.geometry.gear import SpurGear
from gearcad.geometry.marking import MARKING_MARGIN
from gearcad.geometry.shape import Part, gear_loop, rounded_rectangle

SVG = "{http://www.w3.org/2000/svg}"

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


@pytest.fixture(scope="module")
def demo_files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("demo")
    (folder / "train.toml").write_text(demo_text(), encoding="utf-8")
    assert main(["build", str(folder / "train.toml"), "--out", str(folder / "out"), "--formats", "dxf,svg"]) in (0, 1)
    return folder / "out"


@pytest.fixture(scope="module")
def planetary_files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("epi")
    (folder / "train.toml").write_text(PLANETARY, encoding="utf-8")
    assert main(["build", str(folder / "train.toml"), "--out", str(folder / "out"), "--formats", "dxf,svg"]) in (0, 1)
    return folder / "out"


def part_files(folder):
    return sorted(p for p in folder.glob("*.dxf") if not p.name.startswith("sheet-"))


# -- reading the cut geometry back ------------------------------------------------------

def flattened(entity, distance=1e-4):
    return np.array([(v.x, v.y) for v in dxfpath.make_path(entity).flattening(distance)])


def dxf_material(doc):
    """The material of a one-part DXF (outer minus holes), rebuilt by shapely from ezdxf's flattened paths."""
    msp = doc.modelspace()
    outer = [shapely.Polygon(flattened(e)) for e in msp if e.dxf.layer == "CUT_OUTER"]
    holes = [shapely.Polygon(flattened(e)) for e in msp if e.dxf.layer == "CUT_INNER"]
    assert len(outer) == 1
    return outer[0].difference(shapely.union_all(holes)) if holes else outer[0]


# -- marking text: measured in a wide face ----------------------------------------------

def wide_box(text, x, y, cap_height=None, font_size=None):
    """The ink box of ``text`` in DejaVu Sans Bold with its baseline's left end at (x, y), mm.

    Either the cap height (a DXF TEXT's height) or the font size (SVG) gives the scale.
    """
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import TextPath

    prop = FontProperties(family="DejaVu Sans", weight="bold")
    cap = TextPath((0, 0), "H", size=100, prop=prop).get_extents().height / 100  # cap height per font size
    size = font_size if font_size is not None else cap_height / cap
    e = TextPath((0, 0), text, size=size, prop=prop).get_extents()
    return shapely.box(x + min(e.x0, 0.0), y + e.y0, x + e.x1, y + e.y1)


def check_inside(box, material, what):
    assert material.contains(box), f"{what}: text box leaves the part"
    clear = material.boundary.distance(box)
    assert clear >= MARKING_MARGIN - 1e-6, f"{what}: text {clear:.3f} mm from a cut, margin {MARKING_MARGIN} mm"


@pytest.mark.parametrize("files", ["demo_files", "planetary_files"])
def test_every_dxf_text_lies_inside_its_part_clear_of_every_cut(files, request):
    folder = request.getfixturevalue(files)
    names = []
    for path in part_files(folder):
        doc = ezdxf.readfile(path)
        material = dxf_material(doc)
        texts = doc.modelspace().query("TEXT")
        assert len(texts) == 1, path.name  # every part keeps a marking
        for t in texts:
            # left-aligned on the baseline: an importer that ignores alignment places it at the insert point
            assert t.dxf.halign == 0 and t.dxf.valign == 0
            x, y = t.dxf.insert.x, t.dxf.insert.y
            check_inside(wide_box(t.dxf.text, x, y, cap_height=t.dxf.height), material, path.name)
        names.append(path.stem)
    if files == "planetary_files":
        assert {"carrier", "ring"} <= set(names)


@pytest.mark.parametrize("files", ["demo_files", "planetary_files"])
def test_every_svg_text_lies_inside_its_part_and_its_page(files, request):
    folder = request.getfixturevalue(files)
    for path in part_files(folder):
        material = dxf_material(ezdxf.readfile(path))
        root = ET.parse(path.with_suffix(".svg")).getroot()
        vx, vy, vw, vh = (float(v) for v in root.get("viewBox").split())
        page = shapely.box(vx, -(vy + vh), vx + vw, -vy)  # back to y up
        group = root.find(f"{SVG}g[@id='marking']")
        assert group.get("text-anchor") == "start"
        for t in group.iter(f"{SVG}text"):
            box = wide_box(t.text, float(t.get("x")), -float(t.get("y")), font_size=float(t.get("font-size")))
            check_inside(box, material, path.name)
            assert page.contains(box)


# -- laser order -------------------------------------------------------------------------

def dxf_roles(doc):
    role = {"MARKING": 0, "CUT_INNER": 1, "CUT_OUTER": 2}
    return [role[e.dxf.layer] for e in doc.modelspace()]


@pytest.mark.parametrize("files", ["demo_files", "planetary_files"])
def test_files_list_marking_then_holes_then_outlines(files, request):
    folder = request.getfixturevalue(files)
    for path in sorted(folder.glob("*.dxf")):
        roles = dxf_roles(ezdxf.readfile(path))
        assert roles == sorted(roles) and set(roles) >= {1, 2}, path.name
        groups = [g.get("id") for g in ET.parse(path.with_suffix(".svg")).getroot() if g.tag == f"{SVG}g"]
        assert groups == [g for g in ("marking", "cut-inner", "cut-outer") if g in groups], path.name
        assert groups[-1] == "cut-outer"


# -- extents and units -------------------------------------------------------------------

def gear_part(teeth=15, module=1.0, shift=0.0):
    return Part("g", gear_loop(SpurGear.make(teeth, module, shift=shift)), circles=((0.0, 0.0, 4.0),),
                label=f"g  z{teeth}", symmetry=teeth)


def plate_part():
    return Part("plate", rounded_rectangle(80.0, 50.0, 4.0), circles=((20.0, 25.0, 6.0), (60.0, 25.0, 3.4)),
                label="plate")


@pytest.mark.parametrize("mode,version", [("arcs", "R2010"), ("segments", "R2010"), ("splines", "R2010"),
                                          ("arcs", "R12"), ("segments", "R12"), ("splines", "R2000")])
@pytest.mark.parametrize("make", [gear_part, plate_part])
def test_extents_are_the_entities_bounding_box(tmp_path, mode, version, make):
    write_dxf(part_drawing(make(), mode), tmp_path / "a.dxf", version=version)
    doc = ezdxf.readfile(tmp_path / "a.dxf")
    cut = [e for e in doc.modelspace() if e.dxftype() != "TEXT"]
    box = bbox.extents(cut, fast=False)  # ezdxf's own bounding box of the entities
    assert tuple(doc.header["$EXTMIN"])[:2] == pytest.approx(tuple(box.extmin)[:2], abs=1e-4)
    assert tuple(doc.header["$EXTMAX"])[:2] == pytest.approx(tuple(box.extmax)[:2], abs=1e-4)


def test_r12_says_millimetres_in_every_header_variable_a_reader_looks_for(tmp_path):
    write_dxf(part_drawing(plate_part()), tmp_path / "r12.dxf", version="R12")
    doc = ezdxf.readfile(tmp_path / "r12.dxf")
    assert doc.dxfversion == "AC1009" and not doc.audit().has_errors
    assert doc.header["$MEASUREMENT"] == 1  # metric: importers that default to inches read it
    assert doc.header["$INSUNITS"] == 4  # millimetres
    assert doc.header["$LUNITS"] == 2  # decimal: R12's own linear-unit format
    assert tuple(doc.header["$LIMMAX"])[:2] == pytest.approx(tuple(doc.header["$EXTMAX"])[:2])


# -- splines -----------------------------------------------------------------------------

def distances(points, line_points, closed):
    """Distance from each point to a polyline (shapely's nearest segment through an STRtree)."""
    ends = np.vstack((line_points, line_points[:1])) if closed else line_points
    segments = shapely.linestrings(np.stack((ends[:-1], ends[1:]), axis=1))
    _, dist = shapely.STRtree(segments).query_nearest(shapely.points(points), return_distance=True, all_matches=False)
    return dist


def sample(entity, per_span=64):
    """Points of a SPLINE by ezdxf's own B-spline (from the file's control points and knots), per knot span."""
    tool = entity.construction_tool()
    breaks = np.unique(np.asarray(entity.knots))
    f = np.linspace(0.0, 1.0, per_span, endpoint=False)
    t = np.append((breaks[:-1, None] + f * np.diff(breaks)[:, None]).ravel(), breaks[-1])
    return np.array([(p.x, p.y) for p in tool.points(t)])


@pytest.mark.parametrize("teeth,module,shift", [(12, 1.0, 0.0), (91, 1.0, 0.0), (8, 0.5, 0.4), (40, 2.0, -0.3)])
def test_gear_splines_lie_within_a_micrometre_of_the_true_outline(tmp_path, teeth, module, shift):
    gear = SpurGear.make(teeth, module, shift=shift)
    part = Part("g", gear_loop(gear, 1e-3), circles=((0.0, 0.0, 3.0),), symmetry=teeth)
    write_dxf(part_drawing(part, "splines", 1e-3), tmp_path / "g.dxf")
    doc = ezdxf.readfile(tmp_path / "g.dxf")
    assert not doc.audit().has_errors
    (spline,) = doc.modelspace().query("SPLINE")
    assert spline.dxf.degree == 3 and spline.closed and spline.dxf.n_fit_points == 0
    assert len(spline.knots) == len(spline.control_points) + 4
    _, counts = np.unique(spline.knots, return_counts=True)
    assert counts[0] == counts[-1] == 4 and set(counts[1:-1]) == {3}  # Bezier form: readers convert it exactly
    assert np.allclose(spline.control_points[0], spline.control_points[-1], atol=0)
    true = gear_loop(gear, 1e-5).points()  # the outline sampled to 0.01 µm
    points = sample(spline)
    assert distances(points, true, closed=True).max() <= 1e-3
    # and the other way: no part of the outline is missed
    assert distances(true, points, closed=False).max() <= 1e-3 + 1e-5


def test_plate_edges_are_lines_and_its_corners_splines_on_the_arcs(tmp_path):
    write_dxf(part_drawing(plate_part(), "splines", 1e-3), tmp_path / "p.dxf")
    msp = ezdxf.readfile(tmp_path / "p.dxf").modelspace()
    lines = [e for e in msp.query("LINE") if e.dxf.layer == "CUT_OUTER"]
    assert len(lines) == 4
    for line in lines:
        a, b = np.array(line.dxf.start)[:2], np.array(line.dxf.end)[:2]
        on_edge = (np.isclose(a[0], b[0]) and a[0] in (0.0, 80.0)) or (np.isclose(a[1], b[1]) and a[1] in (0.0, 50.0))
        assert on_edge, (a, b)  # exactly on the rectangle's sides: no bowing
    splines = [e for e in msp.query("SPLINE") if e.dxf.layer == "CUT_OUTER"]
    assert len(splines) == 4
    centres = np.array([(76, 4), (76, 46), (4, 46), (4, 4)], dtype=float)
    for spline in splines:
        pts = sample(spline)
        r = np.min(np.hypot(*(pts[:, None, :] - centres[None]).transpose(2, 0, 1)), axis=1)
        assert np.abs(r - 4.0).max() <= 1e-3


def test_de_boor_and_the_basis_agree_with_ezdxf_bspline():
    rng = np.random.default_rng(7)
    control = rng.uniform(-5, 5, (9, 2))
    inner = np.sort(rng.uniform(0, 10, 5))
    knots = np.concatenate(([0.0] * 4, inner, [10.0] * 4))
    reference = BSpline(control, order=4, knots=knots)  # ezdxf.math
    u = np.linspace(0, 10, 101)
    expected = np.array([(p.x, p.y) for p in reference.points(u)])
    np.testing.assert_allclose(evaluate(SplinePiece(control, knots), u), expected, atol=1e-12)


def test_knot_insertion_keeps_the_curve_that_ezdxf_evaluates():
    from gearcad.geometry.bspline import bezier_form

    rng = np.random.default_rng(3)
    control = rng.uniform(-5, 5, (12, 2))
    knots = np.concatenate(([0.0] * 4, np.sort(rng.uniform(0, 10, 8)), [10.0] * 4))
    reference = BSpline(control, order=4, knots=knots)  # ezdxf.math
    piece = bezier_form(SplinePiece(control, knots))
    assert len(piece.control) == 4 + 3 * 8  # one cubic Bezier segment per knot span
    u = np.linspace(0, 10, 301)
    expected = np.array([(p.x, p.y) for p in reference.points(u)])
    np.testing.assert_allclose(evaluate(piece, u), expected, atol=1e-12)


def test_joined_splines_meet_tangentially_where_the_curves_do():
    loop = gear_loop(SpurGear.make(20, 1.0))
    (piece,) = loop_pieces(loop, 1e-3, 20)
    breaks, counts = np.unique(piece.knots, return_counts=True)
    joints = [0] + [int(np.sum(counts[:k])) - 1 for k in np.flatnonzero(counts == 3)]  # control points on the curve
    smooth = [c.points[-1] for c, n in zip(loop.curves, loop.curves[1:] + loop.curves[:1])
              if c.tangents[-1] @ n.tangents[0] > 1 - 1e-9]  # where the true curves meet tangentially
    assert len(smooth) >= 40
    for point in smooth:
        i = min(joints, key=lambda j: np.hypot(*(piece.control[j] - point)))
        assert np.hypot(*(piece.control[i] - point)) < 1e-9
        previous = piece.control[i - 1] if i else piece.control[-2]  # the closed spline's start is its end
        before, after = piece.control[i] - previous, piece.control[i + 1] - piece.control[i]
        cross = before[0] * after[1] - before[1] * after[0]
        assert abs(cross) <= 1e-6 * np.hypot(*before) * np.hypot(*after) and before @ after > 0


def test_spline_chains_that_do_not_close_are_refused():
    line = LinePiece(np.array([0.0, 0.0]), np.array([1.0, 0.0]))
    from gearcad.errors import InputError

    with pytest.raises(InputError, match="join"):
        CutDrawing(outer_splines=((line,),))


# -- the spline mode in a build -------------------------------------------------------------

def test_spline_mode_with_the_default_cut_formats_writes_dxf_splines_and_svg_arcs(tmp_path):
    (tmp_path / "t.toml").write_text(demo_text(), encoding="utf-8")
    out = tmp_path / "out"
    assert main(["build", str(tmp_path / "t.toml"), "--out", str(out), "--formats", "dxf,svg",
                 "--dxf-mode", "splines"]) in (0, 1)
    for path in sorted(out.glob("*.dxf")):
        doc = ezdxf.readfile(path)
        assert doc.modelspace().query("SPLINE"), path.name
        assert not doc.modelspace().query("LWPOLYLINE")
        d = " ".join(p.get("d") for p in ET.parse(path.with_suffix(".svg")).getroot().iter(f"{SVG}path"))
        assert re.search(r"\bA ", d), path.name  # SVG keeps its arcs
    report = json.loads((out / "report.json").read_text())
    assert report["sheets"]


def test_splines_in_r12_are_refused_before_anything_is_written(tmp_path, capsys):
    (tmp_path / "t.toml").write_text(demo_text(), encoding="utf-8")
    out = tmp_path / "out"
    code = main(["build", str(tmp_path / "t.toml"), "--out", str(out), "--dxf-mode", "splines", "--dxf-version", "R12"])
    assert code == 2 and not out.exists()
    err = capsys.readouterr().err.strip()
    assert "R12" in err and "\n" not in err


def test_svg_page_holds_the_whole_drawing(tmp_path):
    part = plate_part()
    drawing = part_drawing(part)
    write_svg(drawing, tmp_path / "p.svg", margin=1.0)
    root = ET.parse(tmp_path / "p.svg").getroot()
    vx, vy, vw, vh = (float(v) for v in root.get("viewBox").split())
    assert (vx, -(vy + vh), vx + vw, -vy) == pytest.approx((-1.0, -1.0, 81.0, 51.0), abs=1e-6)
    assert math.isclose(float(root.get("width")[:-2]), vw)


SUMMING = """name = "sum-planetary"
module = 1.0
thickness = 3.0
target = "127/200"
[summing]
differential = "planetary"
sun = 15
planet = 21
ring = 57
planets = 3
[[stage]]
driver = 29
driven = { teeth = 15, shift = 0.23 }
idler = 30
[[stage]]
driver = 22
driven = 75
idler = 30
"""


def test_every_part_of_a_summing_train_is_marked_inside_its_material():
    from gearcad.geometry.marking import material_region
    from gearcad.trains.planner import plan_train
    from gearcad.export.sheets import flat_parts
    from gearcad.trains.trainfile import parse_train

    plan = plan_train(parse_train(SUMMING))
    parts = flat_parts(plan)
    assert any("carrier" in fp.name for fp in parts) and any(fp.name.startswith("ring") for fp in parts)
    for fp in parts:
        drawing = part_drawing(fp.part, "arcs", 1e-3, fp.label_at, fp.label_height)
        (label,) = drawing.labels
        check_inside(wide_box(label.text, label.x, label.y, cap_height=label.height),
                     material_region(fp.part, 0.0), fp.name)
