"""A train's worm wheel: the generated mid-plane section fitted with one B-spline a tooth space.

Sources: the hob simulation's own whole section (:func:`gearcad.geometry.worm_wheel.wheel_slice`, the blank
minus every tooth space, an independent path from the fit's one space) measured with shapely (distances,
areas); ISO 21771 for the involute a straight-sided rack generates (in the mid-plane a ZA worm's axial
section is such a rack, DIN 3975 / ISO/TR 10828: the wheel's mid-plane is the spur gear of the axial module
and axial pressure angle; tooth thickness ``s = m (pi / 2 + 2 x tan alpha)``, involute ``inv a = tan a - a``);
the law of gearing for the root (the thread's tip line, ``a - r_a1`` from the wheel's axis, cuts the root
circle); OCP's checker and volume for the solid.
"""

import math

import numpy as np
import pytest
import shapely
from shapely.geometry import polygon as shapely_polygon

from gearcad.errors import GeometryError
from gearcad.geometry.shape import Part
from gearcad.geometry.worm_wheel import wheel_slice
from gearcad.meshes.worm import make_worm_pair, thread_form
from gearcad.trains.worm_wheel_outline import FIT_SHARE, fit_space, wheel_outline

TOLERANCE = 1e-3  # mm: the plan's tolerance in a build (min of --dxf-tolerance and 1 µm)

PAIRS = {
    "za-30": dict(starts=1, wheel_teeth=30, module=1.5, diameter_factor=10, flank="za"),  # the camera slider's
    "zi-40": dict(starts=2, wheel_teeth=40, module=1.0, diameter_factor=12, flank="zi"),
}


@pytest.fixture(scope="module", params=sorted(PAIRS))
def fitted(request):
    p = PAIRS[request.param]
    pair = make_worm_pair(p["starts"], p["wheel_teeth"], p["module"], diameter_factor=p["diameter_factor"],
                          pressure_angle=20.0, flank=p["flank"])
    form = thread_form(pair)
    outline = wheel_outline(form, TOLERANCE)
    section = shapely_polygon.orient(wheel_slice(form, 0.0, throated=False, positions=outline.positions), 1.0)
    return pair, form, outline, section


def _nearest(points, line):
    segments = shapely.linestrings(np.stack((line[:-1], line[1:]), axis=1))
    _, d = shapely.STRtree(segments).query_nearest(shapely.points(points), return_distance=True, all_matches=False)
    return d


def _outline_points(outline):
    pts = outline.loop.points()
    return np.vstack((pts, pts[:1]))


def test_the_fit_keeps_within_its_share_of_the_tolerance(fitted):
    _, _, outline, _ = fitted
    assert outline.deviation <= FIT_SHARE * TOLERANCE + 1e-12
    assert outline.vertex_deviation <= outline.deviation


def test_every_point_of_the_whole_section_is_within_the_tolerance(fitted):
    # The hob simulation's whole section (every tooth) against the fitted outline, both ways, with shapely.
    _, _, outline, section = fitted
    ring = np.asarray(section.exterior.coords)
    line = _outline_points(outline)
    assert _nearest(ring, line).max() <= TOLERANCE
    assert _nearest(line, ring).max() <= TOLERANCE


def test_the_areas_agree(fitted):
    # A band of the tolerance round the perimeter bounds the area between two outlines that keep within it.
    _, _, outline, section = fitted
    fitted_area = shapely.Polygon(outline.loop.points()).area
    assert abs(fitted_area - section.area) <= TOLERANCE * section.length


def test_the_root_is_the_circle_the_thread_s_tip_cuts(fitted):
    _, form, outline, _ = fitted
    r = np.hypot(*outline.loop.points().T)
    assert r.min() == pytest.approx(form.centre_distance - form.tip_radius, abs=TOLERANCE)
    assert r.max() == pytest.approx(form.wheel_throat_radius, abs=1e-9)  # the lands are the blank's arcs


def test_a_space_is_five_curves_and_the_outline_is_its_turned_copies(fitted):
    pair, _, outline, _ = fitted
    z = pair.wheel_teeth
    curves = outline.loop.curves
    assert outline.pieces == 5 and len(curves) == z * 6
    assert [c.radius > 0 for c in curves[:6]] == [False] * 5 + [True]
    turn = 2 * math.pi / z
    rot = np.array([[math.cos(turn), -math.sin(turn)], [math.sin(turn), math.cos(turn)]])
    for a, b in zip(curves[:6], curves[6:12]):
        assert np.allclose(a.points @ rot.T, b.points, atol=1e-9)
    for a, b in zip(curves, curves[1:] + curves[:1]):  # a closed chain
        assert np.allclose(a.points[-1], b.points[0], atol=1e-12)


@pytest.mark.parametrize("fitted", ["za-30"], indirect=True)  # a ZI worm's axial section is curved, no rack
def test_the_za_wheel_s_flanks_are_the_involute_of_the_axial_rack(fitted):
    # ISO 21771: the straight-sided rack of pressure angle alpha_x cuts the involute of the base circle
    # r cos(alpha_x); the tooth's half angle at radius R is s / (2 r) + inv(alpha_x) - inv(alpha_R).
    pair, form, outline, _ = fitted
    alpha = pair.axial_pressure_angle
    r = form.wheel_reference_radius
    rb = r * math.cos(alpha)
    s = pair.module * (math.pi / 2 + 2 * pair.wheel_shift * math.tan(alpha))
    land = outline.loop.curves[5]
    centre = math.atan2(*(land.points[0] + land.points[-1])[::-1])  # the tooth after the first space
    inv = lambda a: math.tan(a) - a  # noqa: E731
    checked = 0
    for curve in outline.loop.curves[:5] + outline.loop.curves[6:11]:
        for x, y in curve.points[::4]:
            radius = math.hypot(x, y)
            if not r - 0.2 * pair.module <= radius <= form.wheel_throat_radius - 0.05:
                continue  # the involute part, clear of the fillet and the tip corner
            half = s / (2 * r) + inv(alpha) - inv(math.acos(rb / radius))
            off = abs((math.atan2(y, x) - centre + math.pi) % (2 * math.pi) - math.pi)
            if abs(off - half) * radius < 0.5:  # a flank of this tooth
                assert abs(off - half) * radius <= TOLERANCE
                checked += 1
    assert checked >= 20


def test_a_limit_the_fit_cannot_reach_is_a_geometry_error():
    rng = np.random.default_rng(1)
    chain = np.column_stack((np.linspace(0.0, 5.0, 400), 1e-3 * rng.standard_normal(400)))
    with pytest.raises(GeometryError, match="cannot fit"):
        fit_space(chain, 1e-6)


@pytest.mark.parametrize("fitted", ["za-30"], indirect=True)  # one solid: the OCP build is the slow part
def test_the_solid_has_six_faces_a_tooth(fitted):
    # The prism through the writers' own path: OCP's checker and its volume against area x thickness (0.1 %).
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer

    from gearcad.export.step_solid import build_solid

    pair, _, outline, _ = fitted
    part = Part("wheel", outline.loop, (), ((0.0, 0.0, 3.0),), "", symmetry=pair.wheel_teeth)
    build = build_solid(part, 3.0, TOLERANCE)
    faces, explorer = 0, TopExp_Explorer(build.solid, TopAbs_FACE)
    while explorer.More():
        faces += 1
        explorer.Next()
    assert faces == 6 * pair.wheel_teeth + 3  # per tooth 5 space faces and the land; the two ends; the bore
    assert build.volume == pytest.approx(part.area() * 3.0, rel=1e-4)


def test_a_large_fine_wheel_keeps_its_five_curves():
    # The sidereal drive's wheel (277 teeth, module 0.5): flanks so nearly straight that the fit's wobble flips
    # the sign of their curvature; the fillet is still found, and the fit keeps within its share of the tolerance.
    form = thread_form(make_worm_pair(1, 277, 0.5, diameter_factor=10, pressure_angle=20.0, flank="za"))
    outline = wheel_outline(form, TOLERANCE)
    assert outline.pieces == 5 and outline.deviation <= FIT_SHARE * TOLERANCE
    r = np.hypot(*outline.loop.points().T)
    assert r.min() == pytest.approx(form.centre_distance - form.tip_radius, abs=TOLERANCE)
