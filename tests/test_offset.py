"""Loop offsets (kerf / tool compensation) against shapely's buffer, closed-form areas and exact parallel curves."""

import math

import numpy as np
import pytest
import shapely
from shapely.geometry import Polygon

from gearcad.errors import GeometryError, InputError
from gearcad.geometry import SpurGear, TipRelief
from gearcad.geometry.arcfit import fit_loop
from gearcad.geometry.bore import d_flat_bore, keyway_bore
from gearcad.geometry.generate import Curve
from gearcad.geometry.offset import min_concave_radius, offset_loop
from gearcad.geometry.shape import Loop, circle_loop, gear_loop

TOL = 1e-4  # mm: chord tolerance of the input outlines and of the offset output in the shapely comparisons
TRUTH = 1e-5  # mm: the dense "true" outline
QUAD_SEGS = 64


def shapely_arc_error(d):
    """Sagitta of shapely's round joins: quad_segs segments per quarter circle (circle geometry)."""
    return abs(d) * (1 - math.cos(math.pi / (4 * QUAD_SEGS)))


def nearest_distances(points, ring):
    """Distance from each point to a closed polyline, via shapely's STRtree nearest query."""
    segments = shapely.linestrings(np.stack((ring, np.roll(ring, -1, axis=0)), axis=1))
    _, dist = shapely.STRtree(segments).query_nearest(shapely.points(points), return_distance=True, all_matches=False)
    return dist


def hausdorff(a, b):
    """Symmetric Hausdorff distance between two closed polylines (vertices against segments)."""
    return max(nearest_distances(a, b).max(), nearest_distances(b, a).max())


def ring(geometry):
    return np.asarray(geometry.exterior.coords)[:-1]


def polyline_loop(points):
    """A loop of straight curves through ``points`` (closed)."""
    pts = np.asarray(points, dtype=float)
    curves = []
    for a, b in zip(pts, np.roll(pts, -1, axis=0)):
        t = (b - a) / np.hypot(*(b - a))
        curves.append(Curve("line", np.array([a, b]), np.array([t, t]), np.array([0.0, 1.0])))
    return Loop(tuple(curves))


def assert_well_formed(loop):
    for a, b in zip(loop.curves, loop.curves[1:] + loop.curves[:1]):
        assert np.array_equal(a.points[-1], b.points[0])  # a closed chain (gearcad Loop definition)
    for c in loop.curves:
        assert len(c.points) >= 2 and np.allclose(np.hypot(*c.tangents.T), 1.0)
    assert Polygon(loop.points()).is_valid  # shapely as reference library: simple ring


# -- closed-form cases ---------------------------------------------------------------

@pytest.mark.parametrize("d", [0.2, -0.2, 1.5])
def test_circle_offsets_are_concentric_arcs(d):
    outer = offset_loop(circle_loop(1.0, -2.0, 10.0, clockwise=False), d)
    hole = offset_loop(circle_loop(1.0, -2.0, 10.0, clockwise=True), d)
    # Parallel curve of a circle: same centre, radius r + d outside, r - d for a hole (offset convention).
    for loop, radius, sign in ((outer, 5.0 + d, 1), (hole, 5.0 - d, -1)):
        assert_well_formed(loop)
        assert all(c.kind == "arc" and c.centre == (1.0, -2.0) for c in loop.curves)
        assert all(c.radius == pytest.approx(radius, abs=1e-14) for c in loop.curves)
        assert np.allclose(np.hypot(*(loop.points() - (1.0, -2.0)).T), radius, atol=1e-12)
        assert np.sign(loop.area()) == sign  # orientation kept


def test_square_grows_with_round_corners_and_steiner_area():
    a, d = 4.0, 0.3
    loop = offset_loop(polyline_loop([(0, 0), (a, 0), (a, a), (0, a)]), d, tolerance=1e-6)
    assert_well_formed(loop)
    joins = [c for c in loop.curves if c.kind == "arc"]
    assert len(joins) == 4 and all(c.radius == d for c in joins)
    assert {c.centre for c in joins} == {(0.0, 0.0), (a, 0.0), (a, a), (0.0, a)}  # centred on the corners
    # Steiner's formula for a convex polygon (from memory): A + P d + pi d^2; polyline chords lose < tol x perimeter.
    expected = a * a + 4 * a * d + math.pi * d * d
    assert abs(loop.area() - expected) <= 1e-6 * (4 * a + 2 * math.pi * d)
    assert loop.area() < expected


def test_square_shrinks_with_sharp_corners_exactly():
    loop = offset_loop(polyline_loop([(0, 0), (4, 0), (4, 4), (0, 4)]), -0.5)
    assert_well_formed(loop)
    # Inset of a square: the square of side a - 2 |d| (elementary geometry), corners trimmed to points.
    assert sorted(map(tuple, np.round(loop.points(), 12))) == [(0.5, 0.5), (0.5, 3.5), (3.5, 0.5), (3.5, 3.5)]
    assert loop.area() == pytest.approx(9.0, abs=1e-12)


@pytest.mark.parametrize("d", [0.25, -0.25, 0.9, -0.9])
def test_l_shape_against_shapely_buffer(d):
    pts = [(0, 0), (6, 0), (6, 2), (2, 2), (2, 6), (0, 6)]  # one concave corner at (2, 2)
    loop = offset_loop(polyline_loop(pts), d, tolerance=TOL)
    assert_well_formed(loop)
    reference = Polygon(pts).buffer(d, quad_segs=QUAD_SEGS, join_style="round")  # shapely as reference library
    assert hausdorff(loop.points(), ring(reference)) <= TOL + shapely_arc_error(d) + 1e-9
    assert loop.area() == pytest.approx(reference.area, abs=(TOL + shapely_arc_error(d)) * reference.length)


# -- gear outlines ------------------------------------------------------------------

# kerf 0.1 to 0.3 mm (offsets of half of it), modules 1 to 3; 6, 12 and 17 teeth are undercut.
GEAR_CASES = [(20, 1.0, 0.0, 0.05), (20, 1.0, 0.0, -0.15), (12, 2.0, 0.0, 0.15), (12, 2.0, 0.0, -0.1),
              (6, 1.0, 0.0, 0.1), (17, 1.0, 0.0, -0.05), (30, 3.0, 0.5, 0.15), (30, 3.0, 0.5, -0.15)]


@pytest.mark.parametrize("z,m,x,d", GEAR_CASES)
def test_gear_offset_matches_shapely_buffer(z, m, x, d):
    outline = gear_loop(SpurGear.make(z, m, shift=x), TOL)
    loop = offset_loop(outline, d, tolerance=TOL)
    assert_well_formed(loop)
    assert loop.area() > 0
    reference = Polygon(outline.points()).buffer(d, quad_segs=QUAD_SEGS, join_style="round")
    # The input polyline is within TOL of the true outline and the output chords within TOL of the true offset.
    assert hausdorff(loop.points(), ring(reference)) <= 2 * TOL + shapely_arc_error(d)


@pytest.mark.parametrize("z,m,x,d", [(8, 0.5, 0.0, 0.3), (20, 1.0, 0.0, -0.3)])
def test_folds_are_removed(z, m, x, d):
    # 0.3 mm exceeds the 0.19 mm root fillet of m = 0.5 (outward) and the 0.2 mm tip round (inward).
    relief = TipRelief("round", 0.2) if d < 0 else None
    outline = gear_loop(SpurGear.make(z, m, shift=x), TOL, relief)
    assert min_concave_radius(outline) < d or d < 0
    loop = offset_loop(outline, d, tolerance=TOL)
    assert_well_formed(loop)
    reference = Polygon(outline.points()).buffer(d, quad_segs=QUAD_SEGS, join_style="round")
    assert hausdorff(loop.points(), ring(reference)) <= 2 * TOL + shapely_arc_error(d)


@pytest.mark.parametrize("z,m,x,d", [(20, 1.0, 0.0, 0.15), (40, 2.0, 0.5, 0.1), (25, 1.0, 0.0, -0.1)])
def test_free_form_offsets_are_exact_parallel_involutes(z, m, x, d):
    gear = SpurGear.make(z, m, shift=x)
    rb = gear.base_diameter / 2
    # Input sampled at 1e-4 mm, output at 1e-3 mm: no interpolated points are needed, every point is p + d n.
    loop = offset_loop(gear_loop(gear, 1e-4), d, tolerance=1e-3)
    involutes = [c for c in loop.curves if c.kind == "involute"]
    assert len(involutes) == 2 * z
    for c in involutes:
        p = c.points[1:-1]  # the ends may be trim points (on chords)
        radius = np.hypot(*p.T)
        t = np.sqrt(radius ** 2 / rb ** 2 - 1)
        polar = np.unwrap(np.arctan2(p[:, 1], p[:, 0]))
        # A parallel of an involute is an involute of the same base circle (from memory): the start angle
        # psi = polar -+ (atan t - t) is the same for all its points (involute_points: polar = psi - t + atan t).
        spread = min(np.ptp(polar - np.arctan(t) + t), np.ptp(polar + np.arctan(t) - t))
        assert spread * rb < 1e-7  # mm; the polyline itself is only good to 1e-3 mm


@pytest.mark.parametrize("z,m,x,d", [(20, 1.0, 0.0, 0.15), (40, 3.0, 0.5, 0.1), (12, 2.0, 0.0, -0.1)])
def test_offset_points_lie_at_the_offset_distance_from_the_true_outline(z, m, x, d):
    gear = SpurGear.make(z, m, shift=x)
    loop = offset_loop(gear_loop(gear, 1e-3), d)
    truth = gear_loop(gear, TRUTH).points()
    # Definition of the offset: distance |d| to the outline (TRUTH for the dense outline, 1e-3 for trim points).
    error = np.abs(nearest_distances(loop.points(), truth) - abs(d))
    assert error.max() <= 1e-3 + TRUTH
    assert np.median(error) <= 2 * TRUTH


@pytest.mark.parametrize("z,m,x", [(30, 1.0, 0.5), (50, 2.0, 0.0)])
def test_outward_area_follows_steiner_formula(z, m, x):
    # No undercut and d below the fillet radius: every corner is convex, so A(d) = A + P d + pi d^2
    # (Steiner's formula for parallel curves, from memory) holds for the true curves.
    gear = SpurGear.make(z, m, shift=x)
    d = 0.15
    dense = gear_loop(gear, TRUTH)
    ring_ = shapely.LinearRing(dense.points())
    loop = offset_loop(gear_loop(gear, TOL), d, tolerance=TOL)
    expected = dense.area() + ring_.length * d + math.pi * d * d
    assert abs(loop.area() - expected) <= (TOL + TRUTH) * (ring_.length + 2 * math.pi * d)


def test_arc_fit_of_an_offset_gear_matches_shapely():
    outline = gear_loop(SpurGear.make(12, 2.0), TOL)
    loop = offset_loop(outline, 0.1, tolerance=TOL)
    rows = fit_loop(loop, 1e-3)
    assert len(rows) < 0.5 * len(loop.points())
    # Arcs are tangent to the polyline's true curve: all vertices within 1e-3 of shapely's buffer.
    reference = Polygon(outline.points()).buffer(0.1, quad_segs=QUAD_SEGS, join_style="round")
    assert nearest_distances(rows[:, :2], ring(reference)).max() <= 1e-3 + TOL + shapely_arc_error(0.1)


# -- holes ---------------------------------------------------------------------------

@pytest.mark.parametrize("make", [lambda: keyway_bore(10.0, 3.0, 1.4, TOL), lambda: d_flat_bore(8.0, 3.0, TOL)],
                         ids=["keyway", "d-flat"])
@pytest.mark.parametrize("d", [0.1, -0.1])
def test_hole_offsets_move_away_from_the_material(make, d):
    hole = make()
    loop = offset_loop(hole, d, tolerance=TOL)
    assert_well_formed(loop)
    assert loop.area() < 0  # still clockwise
    # A positive kerf offset shrinks the hole: the hole region buffered by -d (shapely as reference library).
    reference = Polygon(hole.points()).buffer(-d, quad_segs=QUAD_SEGS, join_style="round")
    assert hausdorff(loop.points(), ring(reference)) <= 2 * TOL + shapely_arc_error(d)
    assert (-loop.area() < -hole.area()) == (d > 0)


# -- the CNC check -----------------------------------------------------------------------

def circumradii(points):
    """Signed radius of the circle through each three consecutive points (circumscribed-circle formula);
    negative where the points turn right."""
    a, b, c = points[:-2], points[1:-1], points[2:]
    ab, bc, ca = np.hypot(*(b - a).T), np.hypot(*(c - b).T), np.hypot(*(a - c).T)
    twice_area = (b - a)[:, 0] * (c - a)[:, 1] - (b - a)[:, 1] * (c - a)[:, 0]
    return ab * bc * ca / (2 * twice_area)


@pytest.mark.parametrize("z,m,x", [(20, 1.0, 0.0), (40, 2.0, 0.5), (200, 0.5, 0.0), (6, 1.0, 0.0)])
def test_min_concave_radius_matches_dense_circumradii(z, m, x):
    gear = SpurGear.make(z, m, shift=x)
    dense = gear_loop(gear, TRUTH)
    right = [-r for c in dense.curves if c.kind == "fillet" for r in circumradii(c.points) if r < 0]
    measured = min_concave_radius(gear_loop(gear, 1e-3))
    assert measured == pytest.approx(min(right), rel=2e-3)


def test_min_concave_radius_of_plain_shapes():
    # A hole's circle bends round the tool (radius r); an outer circle never does; the corners of a D-flat
    # and the bottom corners of a keyway are sharp corners of the hole that a round tool cannot reach.
    assert min_concave_radius(circle_loop(0, 0, 10.0, clockwise=True)) == pytest.approx(5.0)
    assert min_concave_radius(circle_loop(0, 0, 10.0, clockwise=False)) == math.inf
    assert min_concave_radius(d_flat_bore(8.0, 3.0)) == 0.0
    assert min_concave_radius(keyway_bore(10.0, 3.0, 1.4)) == 0.0
    assert min_concave_radius(polyline_loop([(0, 0), (4, 0), (4, 4), (0, 4)])) == math.inf  # convex outline


def test_outward_offset_tightens_the_concave_radius_by_the_distance():
    # The parallel curve's radius of curvature on the concave side is rho - d (from memory).
    outline = gear_loop(SpurGear.make(30, 2.0), 1e-3)
    before = min_concave_radius(outline)
    after = min_concave_radius(offset_loop(outline, 0.2))
    assert after == pytest.approx(before - 0.2, rel=5e-3)


# -- errors ---------------------------------------------------------------------------

def test_offsets_that_remove_the_loop_raise():
    with pytest.raises(GeometryError, match="removes the whole loop"):
        offset_loop(circle_loop(0, 0, 10.0, clockwise=False), -6.0)
    with pytest.raises(GeometryError, match="removes the whole loop"):
        offset_loop(circle_loop(0, 0, 10.0, clockwise=True), 5.5)


def test_offset_that_splits_the_loop_raises():
    dumbbell = [(0, 0), (4, 0), (4, 1.8), (6, 1.8), (6, 0), (10, 0), (10, 4), (6, 4), (6, 2.2), (4, 2.2),
                (4, 4), (0, 4)]
    with pytest.raises(GeometryError, match="splits the loop into 2"):
        offset_loop(polyline_loop(dumbbell), -0.5)


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), "0.1", True])
def test_bad_distance_is_an_input_error(bad):
    with pytest.raises(InputError, match="offset distance"):
        offset_loop(circle_loop(0, 0, 10.0), bad)


def test_zero_distance_returns_the_loop():
    loop = circle_loop(0, 0, 10.0)
    assert offset_loop(loop, 0.0) is loop
