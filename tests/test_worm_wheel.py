"""The worm's thread form and the wheel it generates as a hob, against involute theory and by their own overlap."""

import math

import numpy as np
import pytest
from shapely.geometry import Point

from gearcad.geometry.worm_wheel import axial_section, half_thickness, interference, wheel_slice, wheel_slices
from gearcad.meshes.worm import make_worm_pair, thread_form


@pytest.fixture(scope="module")
def khk():
    # The handbook pair of tests/test_worm.py (m_x 3, z1 2, z2 30, d1 44).
    return thread_form(make_worm_pair(2, 30, 3, worm_diameter=44))


def test_thread_and_space_are_equal_on_the_reference_cylinder(khk):
    # DIN 3975: the axial thread thickness on the reference cylinder is half the axial pitch (no backlash).
    assert 2 * half_thickness(khk, khk.reference_radius) == pytest.approx(khk.axial_pitch / 2, rel=1e-15)


@pytest.mark.parametrize("z1, q, alpha_n", [(1, 10, 20), (2, 9, 20), (4, 11, 25)])
def test_zi_axial_flank_slope_is_the_axial_pressure_angle(z1, q, alpha_n):
    # The involute helicoid's axial section has tan(alpha_x) = tan(alpha_n) / cos(gamma) at the reference cylinder
    # (ISO/TR 10828, from memory): a central difference of h(r) must give that slope.
    pair = make_worm_pair(z1, 40, 2, diameter_factor=q, pressure_angle=alpha_n, flank="zi")
    form = thread_form(pair)
    r1, d = form.reference_radius, 1e-5
    slope = -(half_thickness(form, r1 + d) - half_thickness(form, r1 - d)) / (2 * d)
    assert slope == pytest.approx(math.tan(math.radians(alpha_n)) / math.cos(pair.lead_angle), rel=1e-8)


def test_axial_section_is_closed_and_counter_clockwise(khk):
    pts = axial_section(khk, 32)
    area = 0.5 * np.sum(pts[:, 0] * np.roll(pts[:, 1], -1) - np.roll(pts[:, 0], -1) * pts[:, 1])
    # The trapezoid's area: mean thickness times depth.
    h = half_thickness(khk, np.array([khk.root_radius, khk.tip_radius]))
    assert area == pytest.approx((h[0] + h[1]) * (khk.tip_radius - khk.root_radius), rel=1e-12)


def test_midplane_slice_has_involute_flanks(khk):
    # In the mid-plane a ZA worm is a rack of the axial pressure angle, so the wheel it cuts has involute flanks
    # of base radius r2 cos(alpha_x), with ISO 21771's tooth thickness s(r) = r (s2 / r2 + 2 (inv a2 - inv a_r)),
    # s2 = p_x / 2 (no shift).  Measured as the arc a circle cuts from the tooth on the +y axis.
    wheel = wheel_slice(khk, 0.0)
    r2, alpha = khk.wheel_reference_radius, khk.axial_pressure_angle
    rb = r2 * math.cos(alpha)
    inv = lambda a: math.tan(a) - a
    worst = 0.0
    for r in np.linspace(r2 - 0.6 * khk.module, khk.wheel_throat_radius - 0.1 * khk.module, 7):
        a_r = math.acos(rb / r)
        expected = r * (khk.axial_pitch / 2 / r2 + 2 * (inv(alpha) - inv(a_r)))
        # A tooth next to the +y axis (a tooth space is centred on it): the two crossings of the circle with the
        # outline that bracket material.
        circle = Point(0, 0).buffer(r, quad_segs=4096).exterior
        crossings = circle.intersection(wheel.exterior)
        thetas = sorted(math.atan2(p.y, p.x) for p in getattr(crossings, "geoms", [crossings]))
        near = [t for t in thetas if abs(t - math.pi / 2) < 2.5 * math.pi / khk.wheel_teeth]
        # the two crossings that bracket a tooth (material between them)
        best = None
        for t0, t1 in zip(near[:-1], near[1:]):
            mid = (t0 + t1) / 2
            if wheel.contains(Point(r * math.cos(mid), r * math.sin(mid))):
                if best is None or abs(mid - math.pi / 2) < abs(sum(best) / 2 - math.pi / 2):
                    best = (t0, t1)
        worst = max(worst, abs(r * (best[1] - best[0]) - expected))
    # The circle is drawn with 4096 segments a quarter (chord error ~1e-6 mm at these radii).
    print("worst involute thickness deviation, mm", worst)
    assert worst < 2e-3


def test_the_generated_wheel_leaves_no_interference_over_a_full_turn(khk):
    # The worm turned through a full turn in 36 positions that fall between the generating positions, and the
    # wheel with it: the overlap of their sections in 3 slices stays at the scale of the hob simulation's scallops.
    slices = wheel_slices(khk, 3)
    found = interference(khk, slices, positions=36)
    assert found.depth < 5e-3
    assert found.area < 1e-3


def test_more_generating_positions_leave_less_overlap(khk):
    # The hob simulation converges: more positions, smaller scallops (measured 2.9 um -> 0.8 um).
    coarse = interference(khk, [(0.0, wheel_slice(khk, 0.0, positions=150))], positions=24)
    fine = interference(khk, [(0.0, wheel_slice(khk, 0.0, positions=900))], positions=24)
    assert fine.depth < coarse.depth


def test_a_wheel_cut_too_deep_would_be_caught(khk):
    # The check can fail: a blank of the outside radius with no teeth overlaps the worm badly.
    blank = Point(0, 0).buffer(khk.wheel_throat_radius, quad_segs=64)
    assert interference(khk, [(0.0, blank)], positions=4).depth > 0.1


def test_throated_rim_and_straight_face(khk):
    # Off the mid-plane the throated blank grows towards the outside radius; the straight face does not.
    c = 0.8 * khk.face_width / 2
    throated, straight = wheel_slice(khk, c), wheel_slice(khk, c, throated=False)
    far = lambda g: max(math.hypot(x, y) for x, y in g.exterior.coords)
    expected = min(khk.centre_distance - math.sqrt(khk.throat_surface_radius ** 2 - c * c), khk.wheel_outside_radius)
    assert far(throated) == pytest.approx(expected, abs=1e-3)
    assert far(straight) == pytest.approx(khk.wheel_throat_radius, abs=1e-3)


def test_flank_runs_share_their_points_between_the_bottom_and_the_flank(khk):
    # Each flank run of a tooth's slice (gearcad.geometry.worm_wheel_sections) puts half its points below a fifth
    # of its depth and half above, in every slice: the n-th point stays on the same feature across the face.
    from gearcad.geometry.worm_wheel_sections import BOTTOM_DEPTH, BOTTOM_POINTS, tooth_section

    for c in (0.0, 0.45 * khk.face_width):
        up, _, down = tooth_section(khk, c).runs
        for run in (up, down[::-1]):
            r = np.hypot(run[:, 0], run[:, 1])
            split = r.min() + BOTTOM_DEPTH * (r.max() - r.min())
            assert np.all(np.diff(r[len(r) // 2:]) > 0)  # the flank part rises
            assert np.sum(r <= split + 1e-4) == round(BOTTOM_POINTS * len(r))  # the split point itself included
