"""Bore shapes: areas against closed-form circle-segment formulas, shapely as reference for validity."""

import math

import numpy as np
import pytest
import shapely
from shapely.geometry import Polygon

from gearcad.errors import InputError
from gearcad.geometry.arcfit import fit_loop
from gearcad.geometry.bore import bore_loop, d_flat_bore, keyway_bore, plain_bore

FINE = 1e-5  # mm: arc sampling tolerance for the area checks


def segment_area(radius, distance):
    """Area of the circular segment cut off by a chord at ``distance`` from the centre (closed-form formula)."""
    return radius ** 2 * math.acos(distance / radius) - distance * math.sqrt(radius ** 2 - distance ** 2)


def polyline_area_bound(loop, tolerance):
    """The polyline of a loop sampled to ``tolerance`` lies within tolerance x perimeter of the true area."""
    pts = loop.points()
    perimeter = float(np.hypot(*(np.roll(pts, -1, axis=0) - pts).T).sum())
    return tolerance * perimeter


def test_plain_bore_is_a_circle_triple():
    # Source: the Part.circles convention (x, y, diameter) in gearcad.geometry.shape.
    assert plain_bore(8.0) == (0.0, 0.0, 8.0)
    assert bore_loop(8.0) is None


@pytest.mark.parametrize("diameter,flat", [(5.0, 2.0), (8.0, 3.5), (10.0, 2.0), (6.35, 3.1)])
def test_d_flat_area_matches_circle_minus_segment(diameter, flat):
    loop = d_flat_bore(diameter, flat, tolerance=FINE)
    r = diameter / 2
    expected = math.pi * r * r - segment_area(r, flat)  # circle area minus circular-segment area
    assert loop.area() < 0  # clockwise hole (gearcad loop convention)
    assert abs(-loop.area() - expected) <= polyline_area_bound(loop, FINE)


@pytest.mark.parametrize("diameter,width,depth",
                         [(10.0, 3.0, 1.4), (20.0, 6.0, 2.8), (8.0, 2.0, 1.0), (12.0, 11.0, 0.5)])
def test_keyway_area_matches_circle_plus_slot(diameter, width, depth):
    loop = keyway_bore(diameter, width, depth, tolerance=FINE)
    r = diameter / 2
    foot = math.sqrt(r * r - width * width / 4)
    # Circle + rectangle from the chord at ``foot`` up to r + depth, minus the circular segment above that chord.
    expected = math.pi * r * r + width * (r + depth - foot) - segment_area(r, foot)
    assert loop.area() < 0
    assert abs(-loop.area() - expected) <= polyline_area_bound(loop, FINE)


def test_keyway_depth_is_measured_from_the_bore_edge():
    # Definition used here (hub keyway depth on the key's centre line, from the bore's edge): bottom at D/2 + t.
    loop = keyway_bore(10.0, 3.0, 1.4)
    assert loop.points()[:, 1].max() == pytest.approx(5.0 + 1.4, abs=1e-12)
    assert loop.points()[:, 0].max() == pytest.approx(5.0, abs=1e-3)  # the arc still reaches the bore's side


@pytest.mark.parametrize("loop", [d_flat_bore(8.0, 3.0), keyway_bore(10.0, 3.0, 1.4), d_flat_bore(5.0, 1.0)],
                         ids=["flat", "keyway", "deep-flat"])
def test_bore_loops_are_valid_closed_clockwise_chains(loop):
    poly = Polygon(loop.points())
    assert poly.is_valid  # shapely as reference library: simple, non-degenerate ring
    assert not shapely.LinearRing(loop.points()).is_ccw  # clockwise (hole convention)
    curves = loop.curves
    for a, b in zip(curves, curves[1:] + curves[:1]):
        assert np.array_equal(a.points[-1], b.points[0])  # each curve ends where the next begins
    for c in curves:
        assert np.allclose(np.hypot(*c.tangents.T), 1.0)
        chord = np.diff(c.points, axis=0)
        assert (np.einsum("ij,ij->i", chord, c.tangents[:-1]) > 0).all()  # tangents follow the travel order


def test_bore_arc_lies_on_the_bore_circle():
    # Definition: the arc of a D-flat bore is part of the bore circle, centred on the origin.
    loop = d_flat_bore(8.0, 3.0)
    arc = loop.curves[0]
    assert arc.radius == 4.0 and arc.centre == (0.0, 0.0)
    assert np.allclose(np.hypot(*arc.points.T), 4.0, atol=1e-12)
    assert np.allclose(loop.curves[1].points[:, 1], 3.0)  # the flat is the chord y = flat


def test_bore_loops_convert_to_arcs_exactly():
    # Exact-arc rule of arcfit: one circle arc becomes bulge segments of at most 90 degrees on the same circle.
    rows = fit_loop(keyway_bore(10.0, 3.0, 1.4))
    arcs = rows[rows[:, 2] != 0]
    assert len(rows) == len(arcs) + 3  # three straight sides
    assert (np.abs(arcs[:, 2]) <= math.tan(math.pi / 8) + 1e-12).all()
    assert (arcs[:, 2] < 0).all()  # clockwise arcs carry negative bulge (DXF convention)


@pytest.mark.parametrize("call,message", [
    (lambda: d_flat_bore(8.0, 1.5), "flat distance"),  # below 0.2 D
    (lambda: d_flat_bore(8.0, 4.0), "flat distance"),  # at D/2: no flat left
    (lambda: d_flat_bore(-8.0, 3.0), "bore diameter"),
    (lambda: d_flat_bore(float("nan"), 3.0), "bore diameter"),
    (lambda: keyway_bore(10.0, 10.0, 1.0), "keyway width"),
    (lambda: keyway_bore(10.0, 0.0, 1.0), "keyway width"),
    (lambda: keyway_bore(10.0, 3.0, 0.0), "keyway depth"),
    (lambda: keyway_bore(10.0, 3.0, 11.0), "keyway depth"),
    (lambda: bore_loop(10.0, flat=4.0, keyway=(3.0, 1.4)), "not both"),
    (lambda: plain_bore(0.0), "bore diameter"),
])
def test_invalid_bores_raise_one_line_input_errors(call, message):
    # Source: gearcad.errors contract (message names the value and what is allowed).
    with pytest.raises(InputError, match=message) as info:
        call()
    assert "\n" not in str(info.value)


def test_bore_loop_dispatches_to_shapes():
    flat = bore_loop(8.0, flat=3.0)
    keyed = bore_loop(10.0, keyway=(3.0, 1.4))
    assert [c.kind for c in flat.curves] == ["arc", "line"]
    assert [c.kind for c in keyed.curves] == ["arc", "line", "line", "line"]
