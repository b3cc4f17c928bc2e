"""Arc fitting: bulge chains against the dense true curves, exact arc areas and shapely as reference."""

import math

import numpy as np
import pytest
import shapely
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from shapely.geometry import LinearRing, Polygon

from gearcad.errors import GearcadError, InputError
from gearcad.geometry import SpurGear, TipRelief, tooth_profile
from gearcad.geometry.arcfit import fit_arcs, fit_loop, smooth_pieces
from gearcad.geometry.generate import Curve
from gearcad.geometry.involute_curve import involute_points, involute_tangents
from gearcad.geometry.shape import circle_loop, gear_loop

TOL = 1e-3  # mm: the fit tolerance under test (1 µm)
TRUTH = 1e-5  # mm: chord tolerance of the dense "true" curves (tooth_profile at its finest tolerance)
DENSE_ARC = 1e-7  # mm: sagitta used to turn the fitted arcs back into points

# z 6..200, shifts -0.5..+1, modules 0.5..5; 6, 8, 12 and 17 teeth are undercut (17: marginally, with a cusp).
GEARS = [(6, 1.0, 0.0), (6, 0.5, 0.4), (8, 0.5, -0.5), (12, 2.0, 0.0), (17, 1.0, 0.0), (20, 1.0, 0.0),
         (25, 3.0, 0.3), (40, 5.0, 1.0), (100, 1.0, -0.5), (200, 0.5, -0.5), (200, 5.0, 1.0)]
FREE_FORM = ("fillet", "involute")


def segment_geometry(rows, closed):
    """Start, end, included angle of each bulge segment (DXF definition: bulge = tan(angle / 4))."""
    a = rows[:, :2]
    b = np.roll(a, -1, axis=0) if closed else a[1:]
    bulge = rows[:, 2] if closed else rows[:-1, 2]
    a = a if closed else a[:-1]
    return a, b, 4 * np.arctan(bulge)


def cross(a, b):
    """z component of the cross product of 2-D vectors."""
    a, b = np.asarray(a), np.asarray(b)
    return a[..., 0] * b[..., 1] - a[..., 1] * b[..., 0]


def rotate(v, angle):
    c, s = np.cos(angle), np.sin(angle)
    return np.column_stack((c * v[:, 0] - s * v[:, 1], s * v[:, 0] + c * v[:, 1]))


def segment_tangents(rows, closed):
    """Unit tangents at each segment's start and end: the chord turned by -+ half the included angle
    (circle geometry)."""
    a, b, theta = segment_geometry(rows, closed)
    chord = (b - a) / np.hypot(*(b - a).T)[:, None]
    return rotate(chord, -theta / 2), rotate(chord, theta / 2)


def densify(rows, closed, sagitta=DENSE_ARC):
    """Points along the bulge chain: each arc sampled so that its chords stay within ``sagitta`` (circle geometry)."""
    a, b, theta = segment_geometry(rows, closed)
    out = []
    for p, q, th in zip(a, b, theta):
        if th == 0:
            out.append(p[None])
            continue
        length = math.hypot(*(q - p))
        radius = length / (2 * math.sin(abs(th) / 2))
        normal = np.array([-(q - p)[1], (q - p)[0]]) / length
        centre = 0.5 * (p + q) + normal * math.copysign(radius * math.cos(th / 2), th)
        step = 2 * math.acos(max(1 - sagitta / radius, -1.0))
        n = max(2, math.ceil(abs(th) / step) + 1)
        start = math.atan2(*(p - centre)[::-1])
        ang = start + np.linspace(0, th, n)[:-1]
        pts = centre + radius * np.column_stack((np.cos(ang), np.sin(ang)))
        pts[0] = p
        out.append(pts)
    if not closed:
        out.append(rows[-1:, :2])
    return np.concatenate(out)


def bulge_area(rows):
    """Signed area of a closed bulge polygon: shoelace of the vertices plus each arc's circular-segment area
    ``L^2 (theta - sin theta) / (8 sin^2(theta / 2))`` (exact arc-segment formula)."""
    a, b, theta = segment_geometry(rows, closed=True)
    shoelace = 0.5 * np.sum(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0])
    length2 = np.sum((b - a) ** 2, axis=1)
    nonzero = theta != 0
    seg = np.zeros_like(theta)
    th = theta[nonzero]
    seg[nonzero] = length2[nonzero] * (th - np.sin(th)) / (8 * np.sin(th / 2) ** 2)
    return float(shoelace + seg.sum())


def deviation(rows, truth_points):
    """Two-sided distance between a fitted open chain and the dense true curve."""
    return hausdorff(densify(rows, closed=False), truth_points, closed=False)


def nearest_distances(points, polyline, closed):
    """Distance from each point to a polyline, via shapely's STRtree nearest query (shapely as reference library)."""
    ends = np.roll(polyline, -1, axis=0) if closed else polyline[1:]
    starts = polyline if closed else polyline[:-1]
    segments = shapely.linestrings(np.stack((starts, ends), axis=1))
    tree = shapely.STRtree(segments)
    _, dist = tree.query_nearest(shapely.points(points), return_distance=True, all_matches=False)
    return dist


def hausdorff(a, b, closed):
    """Symmetric Hausdorff distance of two dense polylines (vertices of each against segments of the other)."""
    return max(nearest_distances(a, b, closed).max(), nearest_distances(b, a, closed).max())


def profiles(z, m, x, relief=None):
    gear = SpurGear.make(z, m, shift=x)
    coarse, fine = tooth_profile(gear, TOL, relief), tooth_profile(gear, TRUTH, relief)
    assert [c.kind for c in coarse.curves] == [c.kind for c in fine.curves]
    return coarse, fine


@pytest.mark.parametrize("z,m,x", GEARS)
def test_free_form_fits_stay_within_tolerance_of_the_true_curve(z, m, x):
    coarse, fine = profiles(z, m, x)
    for curve, truth in zip(coarse.curves, fine.curves):
        if curve.kind in FREE_FORM:
            # True curve: tooth_profile sampled at 1e-5 mm; its chords add at most TRUTH to the measured distance.
            assert deviation(fit_arcs(curve, TOL), truth.points) <= TOL + TRUTH, (z, m, x, curve.kind)


@settings(max_examples=25)
@given(z=st.integers(6, 200), m=st.sampled_from([0.5, 0.8, 1.0, 1.5, 2.5, 4.0, 5.0]),
       x=st.floats(-0.5, 1.0, allow_nan=False))
def test_fits_stay_within_tolerance_over_the_gear_range(z, m, x):
    try:
        coarse, fine = profiles(z, m, x)
    except GearcadError:
        assume(False)
    for curve, truth in zip(coarse.curves, fine.curves):
        if curve.kind in FREE_FORM:
            assert deviation(fit_arcs(curve, TOL), truth.points) <= TOL + TRUTH


@pytest.mark.parametrize("tolerance", [1e-2, 1e-4])
def test_other_tolerances_are_honoured(tolerance):
    coarse, fine = profiles(12, 2.0, 0.0)
    for curve, truth in zip(coarse.curves, fine.curves):
        if curve.kind in FREE_FORM:
            assert deviation(fit_arcs(curve, tolerance), truth.points) <= tolerance + TRUTH


@pytest.mark.parametrize("z,m,x", GEARS)
def test_arcs_are_tangent_continuous_along_free_form_curves(z, m, x):
    coarse, _ = profiles(z, m, x)
    for curve in coarse.curves:
        if curve.kind not in FREE_FORM:
            continue
        rows = fit_arcs(curve, TOL)
        starts, ends = segment_tangents(rows, closed=False)
        # First and last arcs follow the curve's own end tangents (definition of a G1 fit).
        assert abs(cross(starts[0], curve.tangents[0])) < 1e-6 and starts[0] @ curve.tangents[0] > 0
        assert abs(cross(ends[-1], curve.tangents[-1])) < 1e-6 and ends[-1] @ curve.tangents[-1] > 0
        if len(smooth_pieces(curve)) == 1:  # a cusp (marginal undercut) is a real corner
            turn = np.arctan2(cross(ends[:-1], starts[1:]), np.einsum("ij,ij->i", ends[:-1], starts[1:]))
            assert np.abs(turn).max(initial=0.0) < 1e-6


@pytest.mark.parametrize("z,m,x", [(12, 2.0, 0.0), (20, 1.0, 0.0), (40, 5.0, 1.0)])
def test_far_fewer_arcs_than_polyline_points(z, m, x):
    gear = SpurGear.make(z, m, shift=x)
    loop = gear_loop(gear, TOL)
    rows = fit_loop(loop, TOL)
    ratio = len(rows) / len(loop.points())
    print(f"z={z} m={m} x={x}: {len(rows)} bulge vertices for {len(loop.points())} polyline points ({ratio:.2f})")
    assert ratio < 0.5  # project target: well under half the vertices of the 1 µm polyline
    free = [c for c in loop.curves[:8] if c.kind in FREE_FORM]
    free_points = sum(len(c.points) - 1 for c in free)
    free_arcs = sum(len(fit_arcs(c, TOL)) - 1 for c in free)
    assert free_arcs < 0.5 * free_points


@pytest.mark.parametrize("z,m,x", [(8, 1.0, 0.0), (17, 1.0, 0.0), (30, 2.0, 0.2)])
def test_bulge_polygon_area_matches_the_true_outline(z, m, x):
    gear = SpurGear.make(z, m, shift=x)
    rows = fit_loop(gear_loop(gear, TOL), TOL)
    dense = gear_loop(gear, TRUTH).points()
    perimeter = LinearRing(dense).length
    # Exact arc-segment area vs the dense outline: each boundary lies within its tolerance of the true one.
    assert abs(bulge_area(rows) - Polygon(dense).area) <= (TOL + TRUTH) * perimeter


@pytest.mark.parametrize("z,m,x", [(8, 1.0, 0.0), (17, 1.0, 0.0)])
def test_bulge_polygon_matches_the_true_outline_in_shapely(z, m, x):
    gear = SpurGear.make(z, m, shift=x)
    rows = fit_loop(gear_loop(gear, TOL), TOL)
    dense = densify(rows, closed=True, sagitta=1e-6)
    fitted = Polygon(dense)
    truth = gear_loop(gear, TRUTH).points()
    assert fitted.is_valid  # shapely as reference library
    assert fitted.exterior.is_ccw
    assert hausdorff(dense, truth, closed=True) <= TOL + TRUTH + 1e-6


@pytest.mark.parametrize("z,m,x", [(6, 1.0, 0.0), (17, 1.0, 0.0), (40, 1.0, -0.5)])
def test_closed_polyline_has_no_repeats_or_empty_segments(z, m, x):
    rows = fit_loop(gear_loop(SpurGear.make(z, m, shift=x), TOL), TOL)
    step = np.hypot(*(np.roll(rows[:, :2], -1, axis=0) - rows[:, :2]).T)
    assert step.min() > 1e-9  # DXF LWPOLYLINE rule (common practice): no zero-length segments, no closing repeat
    assert rows.shape[1] == 3 and np.isfinite(rows).all()


@pytest.mark.parametrize("z,m,x", [(20, 1.0, 0.0), (6, 1.0, 0.0)])
def test_circular_curves_become_exact_arcs_of_at_most_90_degrees(z, m, x):
    coarse, _ = profiles(z, m, x, relief=TipRelief("round", 0.2 * m))
    for curve in coarse.curves:
        if curve.radius <= 0:
            continue
        rows = fit_arcs(curve, TOL)
        centre = np.asarray(curve.centre)
        # Definition of an exact arc: every vertex on the curve's circle, every bulge of the circle's sense.
        assert np.allclose(np.hypot(*(rows[:, :2] - centre).T), curve.radius, rtol=1e-12, atol=1e-12)
        assert (np.abs(rows[:-1, 2]) <= math.tan(math.pi / 8) + 1e-15).all()
        sense = np.sign(cross(curve.points[0] - centre, curve.tangents[0]))
        assert (np.sign(rows[:-1, 2]) == sense).all()
        assert np.array_equal(rows[0, :2], curve.points[0]) and np.array_equal(rows[-1, :2], curve.points[-1])


def test_full_circle_is_four_quarter_arcs_of_exact_area():
    loop = circle_loop(1.0, 2.0, 10.0, clockwise=False)
    rows = fit_loop(loop)
    assert len(rows) == 4
    assert np.allclose(rows[:, 2], math.tan(math.pi / 8))  # bulge of a 90 degree arc: tan(90deg / 4)
    assert bulge_area(rows) == pytest.approx(math.pi * 25.0, rel=1e-13)  # circle area pi r^2
    assert bulge_area(fit_loop(circle_loop(0.0, 0.0, 10.0))) == pytest.approx(-math.pi * 25.0, rel=1e-13)


def test_chamfer_is_one_straight_segment():
    coarse, _ = profiles(20, 1.0, 0.0, relief=TipRelief("chamfer", 0.2))
    chamfers = [c for c in coarse.curves if c.kind == "chamfer"]
    assert chamfers
    for c in chamfers:
        rows = fit_arcs(c, TOL)
        assert rows.shape == (2, 3) and (rows[:, 2] == 0).all()


def test_a_cusp_inside_a_curve_becomes_a_short_line():
    # An involute sampled across its turning point on the base circle (roll angle 0): the tangent of growing
    # roll angle reverses there (involute_tangents); the span across the cusp is the sampler's chord.
    rb, start = 10.0, 0.3
    rolls = np.array([-0.004, 0.05, 0.1, 0.15, 0.2])
    curve = Curve("involute", involute_points(rb, start, rolls), involute_tangents(start, rolls), rolls)
    pieces = smooth_pieces(curve)
    assert [p.kind for p in pieces] == ["line", "involute"]
    assert np.array_equal(pieces[0].points, curve.points[:2]) and np.array_equal(pieces[1].points, curve.points[1:])
    rows = fit_arcs(curve, TOL)
    assert rows[0, 2] == 0.0 and np.array_equal(rows[1, :2], curve.points[1])
    # Beyond the cusp the fit is as good as anywhere: the first involute branch sampled densely (involute_points).
    truth = involute_points(rb, start, np.linspace(0.05, 0.2, 2001))
    assert deviation(rows[1:], truth) <= TOL + 1e-6


@pytest.mark.parametrize("tolerance", [0.0, -1e-3, float("nan"), 5.0])
def test_bad_tolerance_is_an_input_error(tolerance):
    curve = tooth_profile(SpurGear.make(20, 1.0)).curves[1]
    with pytest.raises(InputError, match="tolerance"):
        fit_arcs(curve, tolerance)
