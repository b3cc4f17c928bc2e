"""SVG writer, checked by parsing with xml.etree (the standard library's XML reader).

References: the SVG 1.1 path grammar (M/L/A/Z, arc flags), the chord formula
of a circular arc r = c / (2 sin(theta / 2)) against exact circles of known
radius, the DXF bulge definition theta = 4 atan(b), and the shoelace area.
"""

import math
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

from gearcad.errors import ExportError, InputError
from gearcad.export import CutDrawing, Label, build_svg, polyline_contour, write_drawing, write_svg
from gearcad.export.svg import HAIRLINE, bulge_radius
from gearcad.geometry.gear import SpurGear
from gearcad.geometry.shape import gear_loop

NS = {"svg": "http://www.w3.org/2000/svg"}
QUARTER = math.tan(math.pi / 8)  # bulge of a 90-degree arc
TOKEN = re.compile(r"[MLAZ]|-?\d+(?:\.\d+)?")


def circle_contour(cx, cy, r, ccw=True):
    b = QUARTER if ccw else -QUARTER
    pts = [(cx + r, cy), (cx, cy + r), (cx - r, cy), (cx, cy - r)]
    if not ccw:
        pts = pts[::-1]
    return np.array([(x, y, b) for x, y in pts])


# An "L" shape: not symmetric about any axis, so a mirrored drawing cannot pass.
ELL = np.array([(0, 0, 0), (30, 0, 0), (30, 10, 0), (10, 10, 0), (10, 25, 0), (0, 25, 0)], dtype=float)


def parse_path(d):
    """Segments of an SVG path as (command, end point in drawing coordinates, arc fields)."""
    tokens = TOKEN.findall(d)
    assert tokens[0] == "M" and tokens[-1] == "Z"
    start = (float(tokens[1]), -float(tokens[2]))
    segments, i = [], 3
    while tokens[i] != "Z":
        if tokens[i] == "L":
            segments.append(("L", (float(tokens[i + 1]), -float(tokens[i + 2])), None))
            i += 3
        else:
            assert tokens[i] == "A"
            rx, ry, rot, large, sweep, x, y = tokens[i + 1:i + 8]
            segments.append(("A", (float(x), -float(y)), (float(rx), float(ry), float(rot), int(large), int(sweep))))
            i += 8
    return start, segments


def parse(text):
    return ET.fromstring(text.encode("utf-8"))


def viewbox(root):
    return [float(v) for v in root.get("viewBox").split()]


def test_page_is_in_millimetres_with_matching_viewbox():
    root = parse(build_svg(CutDrawing(outer=(ELL,)), margin=2.0))
    x, y, w, h = viewbox(root)
    assert root.get("width") == f"{w:g}mm" and root.get("height") == f"{h:g}mm"
    # the L spans x 0..30, y 0..25; y is negated so the top edge is -25
    assert (x, y, w, h) == pytest.approx((-2, -27, 34, 29))


def test_polygon_endpoints_equal_the_vertices_not_mirrored():
    root = parse(build_svg(CutDrawing(outer=(ELL,))))
    (path,) = root.findall(".//svg:path", NS)
    start, segments = parse_path(path.get("d"))
    got = np.array([start] + [end for _, end, _ in segments])
    np.testing.assert_allclose(got, ELL[:, :2], atol=1e-6)  # last side is closed by Z
    assert all(cmd == "L" for cmd, _, _ in segments)
    x, y = got[:, 0], got[:, 1]
    area = 0.5 * np.sum(x * np.roll(y, -1) - y * np.roll(x, -1))  # shoelace
    assert area == pytest.approx(30 * 10 + 10 * 15)  # positive: orientation kept, no mirror


@pytest.mark.parametrize("ccw", [True, False])
def test_arcs_reproduce_an_exact_circle(ccw):
    r = 7.5
    contour = circle_contour(3, -4, r, ccw)
    root = parse(build_svg(CutDrawing(outer=(contour,))))
    (path,) = root.findall(".//svg:path", NS)
    start, segments = parse_path(path.get("d"))
    assert start == pytest.approx(tuple(contour[0, :2]), abs=1e-6)
    assert len(segments) == 4  # the closing arc is written, then Z
    ends = np.array([end for _, end, _ in segments])
    np.testing.assert_allclose(ends, np.roll(contour[:, :2], -1, axis=0), atol=1e-6)
    for cmd, _, (rx, ry, rot, large, sweep) in segments:
        chord = r * math.sqrt(2)  # 90-degree chord of the exact circle
        assert cmd == "A" and rx == ry == pytest.approx(r, abs=1e-6)
        assert rx == pytest.approx(chord / (2 * math.sin(math.radians(90) / 2)), abs=1e-6)
        assert large == 0 and rot == 0
        # y is negated, so a counter-clockwise arc turns the negative SVG way (sweep 0)
        assert sweep == (0 if ccw else 1)
    x, y, w, h = viewbox(root)
    assert (x, y, w, h) == pytest.approx((3 - r - 1, 4 - r - 1, 2 * r + 2, 2 * r + 2), abs=1e-6)


def test_large_arc_flag_and_radius_formula():
    # a 270-degree arc closed by a straight chord: bulge tan(270 deg / 4) > 1
    b = math.tan(math.radians(270) / 4)
    r = 5.0
    p0, p1 = (r, 0.0), (0.0, -r)  # from angle 0 counter-clockwise round to 270 degrees
    contour = np.array([(*p0, b), (*p1, 0.0)])
    root = parse(build_svg(CutDrawing(outer=(contour,)), margin=0))
    (path,) = root.findall(".//svg:path", NS)
    _, segments = parse_path(path.get("d"))
    (cmd, end, (rx, _, _, large, sweep)), = segments
    assert cmd == "A" and large == 1 and sweep == 0
    assert rx == pytest.approx(r, abs=1e-6) == pytest.approx(bulge_radius(r * math.sqrt(2), b), abs=1e-6)
    # page bounds: the arc reaches x = -r, y = +r (top) and y = -r; x max is the start point
    assert viewbox(root) == pytest.approx((-r, -r, 2 * r, 2 * r), abs=1e-6)


def test_circles_text_groups_and_stroke():
    drawing = CutDrawing(outer=(circle_contour(0, 0, 20),), circles=((5, 6, 4.0),),
                         labels=(Label("z 40 <m 1>", 0, -8, 2.1),))
    root = parse(build_svg(drawing))
    outer, inner, marking = (root.find(f"svg:g[@id='{i}']", NS) for i in ("cut-outer", "cut-inner", "marking"))
    for group in (outer, inner):
        assert group.get("fill") == "none"
        assert float(group.get("stroke-width")) == HAIRLINE
        assert group.findall("svg:text", NS) == []
    (circle,) = inner.findall("svg:circle", NS)
    assert (float(circle.get("cx")), -float(circle.get("cy")), float(circle.get("r"))) == (5, 6, 2)
    (text,) = marking.findall("svg:text", NS)
    assert text.text == "z 40 <m 1>"  # escaped in the file, restored by the parser
    assert (float(text.get("x")), float(text.get("y"))) == (0, 8)
    assert marking.findall("svg:path", NS) == [] and marking.get("stroke") == "none"
    assert len(root.findall(".//svg:text", NS)) == 1


def test_deterministic_and_atomic(tmp_path):
    drawing = CutDrawing(outer=(polyline_contour(gear_loop(SpurGear.make(12, 3.0, shift=0.6)).points()),),
                         circles=((0, 0, 8.0),), labels=(Label("A", 0, 5, 2),))
    write_svg(drawing, tmp_path / "a.svg")
    write_drawing(drawing, tmp_path / "b.svg")
    assert (tmp_path / "a.svg").read_bytes() == (tmp_path / "b.svg").read_bytes()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.svg", "b.svg"]
    with pytest.raises(ExportError):
        write_svg(drawing, tmp_path / "missing" / "c.svg")


def test_gear_reconstructed_from_svg_has_tip_and_root_radius():
    gear = SpurGear.make(40, 1.0)
    contour = polyline_contour(gear_loop(gear).points())
    (path,) = parse(build_svg(CutDrawing(outer=(contour,)))).findall(".//svg:path", NS)
    start, segments = parse_path(path.get("d"))
    pts = np.array([start] + [end for _, end, _ in segments])
    r = np.hypot(pts[:, 0], pts[:, 1])
    assert r.max() == pytest.approx(gear.tip_diameter / 2, abs=1e-6)  # 6 decimals written
    assert r.min() == pytest.approx(gear.root_diameter / 2, abs=1e-6)


def test_refusals():
    from gearcad.export.neutral import SplinePiece

    control = np.array([(0, 0), (1, 0), (1, 1), (0, 0)], dtype=float)
    piece = SplinePiece(control, np.array([0, 0, 0, 0, 1, 1, 1, 1], dtype=float), closed=True)
    with pytest.raises(InputError, match="spline"):
        build_svg(CutDrawing(outer_splines=((piece,),)))
    with pytest.raises(InputError):
        build_svg(CutDrawing(outer=(ELL,)), colours={"engrave": "red"})
    with pytest.raises(InputError):
        build_svg(CutDrawing(outer=(ELL,)), stroke_width=0)
