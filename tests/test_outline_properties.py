"""Invariants of the generated outline over the valid domain (hypothesis), and its tolerance."""

import math

import numpy as np
import pytest
import shapely
from hypothesis import assume, given
from hypothesis import strategies as st

from gearcad.errors import GearcadError
from gearcad.geometry import SpurGear, TipRelief, outline, tooth_profile
from gearcad.geometry.generate import _cutter, _fillet_points
from gearcad.geometry.involute_curve import involute_points
from gearcad.profiles import load_tooth_system

SYSTEMS = {a: load_tooth_system(n) for a, n in ((14.5, "full-14.5"), (20.0, "iso53-a"), (25.0, "full-25"))}


def make(teeth, shift, angle, module=1.0):
    try:
        return SpurGear(teeth, module, SYSTEMS[angle], shift=shift)
    except GearcadError:
        return None


def thickness_on_polygon(points, radius):
    """Arc tooth thickness of tooth 0 at ``radius``, measured where the polygon's edges cross that circle."""
    r = np.hypot(points[:, 0], points[:, 1])
    nxt = np.roll(np.arange(len(points)), -1)
    crossing = (r - radius) * (r[nxt] - radius) < 0
    angles = []
    for i in np.nonzero(crossing)[0]:
        p, q = points[i], points[nxt[i]]
        # Solve |p + t (q - p)| = radius for t in (0, 1).
        d = q - p
        a, b, c = d @ d, 2 * p @ d, p @ p - radius ** 2
        t = (-b + math.copysign(math.sqrt(b * b - 4 * a * c), 1.0)) / (2 * a)
        if not 0 <= t <= 1:
            t = (-b - math.sqrt(b * b - 4 * a * c)) / (2 * a)
        x = p + t * d
        angles.append(math.atan2(x[1], x[0]))
    angles = np.array(angles)
    near = angles[np.abs(angles) < math.pi / 4]
    upper, lower = near[near > 0].min(), near[near < 0].max()
    return (upper - lower) * radius


@given(teeth=st.integers(6, 300), shift=st.floats(-0.5, 1.0), angle=st.sampled_from([14.5, 20.0, 25.0]))
def test_outline_is_a_valid_gear(teeth, shift, angle):
    gear = make(teeth, shift, angle)
    assume(gear is not None and gear.tip_thickness > 0.05 * gear.module)
    try:
        pts = outline(gear)
    except GearcadError:  # e.g. undercut reaching the tip: refused, never bad geometry
        assume(False)
    poly = shapely.Polygon(pts)
    # shapely (GEOS) as reference: a valid simple polygon, counter-clockwise.
    assert poly.is_valid and poly.exterior.is_simple and poly.exterior.is_ccw
    r = np.hypot(pts[:, 0], pts[:, 1])
    assert r.max() == pytest.approx(gear.tip_diameter / 2, abs=1e-9)
    assert r.min() == pytest.approx(gear.root_diameter / 2, abs=1e-9)
    # z teeth: the tip circle is touched in z separate runs.
    at_tip = np.abs(r - gear.tip_diameter / 2) < 1e-9
    assert np.count_nonzero(at_tip & ~np.roll(at_tip, 1)) == teeth
    # Arc thickness at the reference circle (ISO 21771: s = m (pi/2 + 2 x tan alpha)) when it is on the involute.
    if gear.reference_diameter / 2 > tooth_profile(gear).form_diameter / 2 + 1e-3:
        assert thickness_on_polygon(pts, gear.reference_diameter / 2) == pytest.approx(gear.tooth_thickness, abs=2e-3)


def dense_truth(gear):
    """The true curves of the upper flank sampled 200 times finer than needed."""
    c = _cutter(gear)
    profile = tooth_profile(gear, 1e-5)
    curves = {k.kind: k for k in profile.curves[len(profile.curves) // 2 + 1:]}
    beta = np.linspace(curves["fillet"].params[-1], curves["fillet"].params[0], 20001)
    rb = gear.base_diameter / 2
    roll = np.linspace(curves["involute"].params[-1], curves["involute"].params[0], 20001)
    return np.concatenate([_fillet_points(gear, c, beta), involute_points(rb, gear.half_angle_at_base, roll)])


@pytest.mark.parametrize("tolerance", [1e-3, 1e-4])
@pytest.mark.parametrize("teeth, shift, module", [(12, 0.6, 3.0), (10, 0.0, 1.0), (60, -0.2, 5.0), (24, 0.3, 0.5)])
def test_polyline_stays_within_the_tolerance(teeth, shift, module, tolerance):
    # Reference: shapely distance from a dense sampling of the true curves to our polyline.
    gear = SpurGear.make(teeth, module, shift=shift)
    pts = tooth_profile(gear, tolerance).points()
    line = shapely.LineString(pts)
    truth = dense_truth(gear)
    distance = shapely.distance(shapely.points(truth), line)
    assert distance.max() <= tolerance


def test_tolerance_of_a_tenth_of_a_micron_is_honoured():
    # 0.1 µm = 1e-4 mm; reference: shapely distance from the dense true curves.
    gear = SpurGear.make(30, 2.0, shift=0.1)
    coarse = tooth_profile(gear, 1e-3).points()
    fine = tooth_profile(gear, 1e-4).points()
    assert len(fine) > 2 * len(coarse)  # chord sag ~ step^2: ten times finer needs ~3x the points
    assert shapely.distance(shapely.points(dense_truth(gear)), shapely.LineString(fine)).max() <= 1e-4


@pytest.mark.parametrize("teeth, shift", [(12, 0.0), (17, 0.0), (30, -0.4), (8, 0.3)])
def test_undercut_appears_exactly_below_the_least_shift(teeth, shift):
    # x_min = h - z sin^2(alpha) / 2 (the interference-point condition of rack generation).
    from gearcad.meshes.checks import min_shift_without_undercut

    sys_a = load_tooth_system("iso53-a")
    x_min = min_shift_without_undercut(teeth, sys_a.pressure_angle, sys_a.straight_flank_depth)
    assert tooth_profile(SpurGear(teeth, 1.0, sys_a, shift=x_min - 1e-4)).undercut
    assert not tooth_profile(SpurGear(teeth, 1.0, sys_a, shift=x_min + 1e-4)).undercut


@pytest.mark.parametrize("teeth, shift", [(20, 0.0), (11, 0.525), (30, 0.2), (60, -0.3)])
@pytest.mark.parametrize("kind, size", [("round", 0.2), ("chamfer", 0.15)])
def test_tip_relief_keeps_a_valid_outline_and_removes_the_corner(kind, size, teeth, shift):
    gear = SpurGear.make(teeth, 1.0, shift=shift)
    plain = shapely.Polygon(outline(gear))
    try:
        relieved = shapely.Polygon(outline(gear, relief=TipRelief(kind, size)))
    except GearcadError:  # refused only where the relief is wider than half the tip land
        assert gear.tip_thickness / 2 <= size
        return
    assert relieved.is_valid
    assert relieved.area < plain.area
    assert plain.difference(relieved).area > 0
    # Outside the plain outline only by the two polylines' chord tolerance (1 µm each way).
    assert relieved.difference(plain).area < 1e-3 * plain.length


def test_tip_round_is_tangent_to_flank_and_tip_circle():
    # The rounding circle touches the tip circle (centre at ra - rho) and the involute (normal through centre).
    gear = SpurGear.make(20, 1.0)
    profile = tooth_profile(gear, relief=TipRelief("round", 0.2))
    arc = next(c for c in profile.curves if c.kind == "tip-round")
    assert math.hypot(*arc.centre) == pytest.approx(gear.tip_diameter / 2 - 0.2, abs=1e-12)
    inv_curve = next(c for c in profile.curves if c.kind == "involute")
    joint = inv_curve.points[-1] if np.allclose(inv_curve.points[-1], arc.points[0]) else inv_curve.points[0]
    assert np.hypot(*(joint - arc.centre)) == pytest.approx(0.2, abs=1e-12)


def test_bad_tolerance_is_refused():
    with pytest.raises(GearcadError, match="tolerance"):
        outline(SpurGear.make(20, 1.0), tolerance=0.0)
