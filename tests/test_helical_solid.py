"""Helical and herringbone solids: OCP's checker, volume, end-face sections, symmetry, the bore straight."""

import math

import numpy as np
import pytest

from gearcad.geometry.shape import Part, gear_loop
from gearcad.meshes import helical as hx
from gearcad.profiles import load_tooth_system

pytestmark = pytest.mark.slow

ISO53A = load_tooth_system("iso53-a")
TOL = 5e-4  # chord tolerance of the outline and of its B-spline edges, mm


def on_boundary(d):
    """Within the spline tolerance of the section everywhere (measured at TOL = 1e-4: 4e-5 mm at most, 5e-6 median)."""
    return d.max() < TOL


def gear(teeth=12, beta=20.0, hand="right"):
    return hx.helical_gear(teeth, 1.0, ISO53A, math.radians(beta), hand)


def turned(points, angle):
    c, s = math.cos(angle), math.sin(angle)
    return points @ np.array([[c, -s], [s, c]]).T


def distances(shape, points, z):
    """Distance (mm) from each point (x, y) to the solid's section by the plane at height z (OCP's section
    and BRepExtrema as reference): the section's edges are the outline the solid has there."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Section
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeVertex
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape
    from OCP.gp import gp_Dir, gp_Pln, gp_Pnt

    section = BRepAlgoAPI_Section(shape, gp_Pln(gp_Pnt(0.0, 0.0, float(z)), gp_Dir(0.0, 0.0, 1.0)))
    section.Build()
    edges = section.Shape()
    out = []
    for x, y in points:
        v = BRepBuilderAPI_MakeVertex(gp_Pnt(float(x), float(y), float(z))).Vertex()
        d = BRepExtrema_DistShapeShape(v, edges)
        d.Perform()
        out.append(d.Value())
    return np.array(out)


def outline_points(g, count=24):
    pts = gear_loop(g, TOL).points()
    return pts[np.linspace(0, len(pts) - 1, count).astype(int)]



@pytest.mark.parametrize("beta, hand", [(20.0, "right"), (35.0, "left")])
def test_helical_volume_validity_and_end_faces(beta, hand):
    from gearcad.export.step import helical_solid

    g = gear(beta=beta, hand=hand)
    b = 8.0
    twist = g.twist(b)
    built = helical_solid(Part("g", gear_loop(g, TOL)), b, twist, TOL)
    # volume = transverse area x face width within 1e-6 (Cavalieri: every section is the same outline)
    # is checked inside helical_solid against the kernel's face area; here against the polyline area too:
    assert built.volume == pytest.approx(Part("g", gear_loop(g, TOL)).area() * b, rel=1e-4)
    pts = outline_points(g)
    # the end faces are the mid-face section turned by -/+ b tan(beta) / r / 2 (signed by the hand)
    assert on_boundary(distances(built.solid, turned(pts, -twist / 2), 0.0))
    assert on_boundary(distances(built.solid, turned(pts, twist / 2), b))
    # and not the other way round (the hand is right): a wrong turn puts points off the boundary
    assert distances(built.solid, turned(pts, twist / 2), 0.0).max() > 1e-2
    # inside the face the kernel's sweep surface approximates the screw motion: within the tolerance
    assert on_boundary(distances(built.solid, turned(pts, twist * (0.25 - 0.5)), b / 4))


def test_twist_is_face_width_times_tan_beta_over_r():
    # ISO 21771: over the face width b the section turns by b tan(beta) / r (the lead: 2 pi r / tan(beta) per turn)
    g = gear(beta=30.0)
    assert abs(g.twist(10.0)) == pytest.approx(2 * math.pi * 10.0 / g.lead, rel=1e-13)
    assert gear(beta=30.0, hand="left").twist(10.0) == -g.twist(10.0)


def test_herringbone_is_symmetric_about_mid_face():
    from gearcad.export.step import helical_solid

    g = gear(beta=25.0)
    b, gap = 10.0, 2.0
    built = helical_solid(Part("g", gear_loop(g, TOL)), b, g.twist(b), TOL, herringbone=True, gap=gap,
                          gap_diameter=g.root_diameter)
    half = (b - gap) / 2
    rate = g.twist(b) / b
    pts = outline_points(g)
    # both end faces are the mid-face section turned the same way, by one half's twist; sections at the same
    # distance below and above mid-face are the same outline (mirror symmetry about z = b/2)
    for z in (0.0,):
        turn = -rate * (half - z)
        assert on_boundary(distances(built.solid, turned(pts, turn), z))
        assert on_boundary(distances(built.solid, turned(pts, turn), b - z))
    assert distances(built.solid, turned(pts, rate * half), 0.0).max() > 1e-2  # the lower half has gear's hand


def test_bore_stays_straight():
    from OCP.BRepClass3d import BRepClass3d_SolidClassifier
    from OCP.gp import gp_Pnt
    from OCP.TopAbs import TopAbs_IN, TopAbs_OUT

    from gearcad.export.step import helical_solid

    g = gear(beta=30.0)
    b = 6.0
    part = Part("g", gear_loop(g, TOL), circles=((0.0, 0.0, 5.0),))
    built = helical_solid(part, b, g.twist(b), TOL)
    # OCP's point classifier: just inside the bore radius is out of the solid, just outside is in, at every height
    for z in (0.5, 3.0, 5.5):
        for angle in np.linspace(0, 6, 7):
            for radius, state in ((2.5 - 1e-3, TopAbs_OUT), (2.5 + 1e-3, TopAbs_IN)):
                p = gp_Pnt(radius * math.cos(angle), radius * math.sin(angle), z)
                assert BRepClass3d_SolidClassifier(built.solid, p, 1e-7).State() == state


@pytest.mark.parametrize("bad", [0.0, math.nan, 7.0])
def test_twist_out_of_range(bad):
    from gearcad.errors import InputError
    from gearcad.export.step import helical_solid

    with pytest.raises(InputError, match="twist"):
        helical_solid(Part("g", gear_loop(gear(), TOL)), 5.0, bad, TOL)


def _placed_solid(plan, name, flip_hand=False):
    from gearcad.export.step import _placed, helical_solid

    g = plan.gear(name)
    b = plan.spec.thickness
    twist = -g.gear.twist(b) if flip_hand else g.gear.twist(b)
    solid = helical_solid(g.part, b, twist, plan.tolerance).solid
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Trsf, gp_Vec

    turned = _placed(solid, g.rotation, 0.0)
    move = gp_Trsf()
    shaft = plan.shafts[g.shaft]
    move.SetTranslation(gp_Vec(shaft.x, shaft.y, 0.0))
    return BRepBuilderAPI_Transform(turned, move, True).Shape()


def test_meshing_helical_solids_do_not_overlap_at_any_height():
    # The assembly is phased at mid-face; opposite hands twisting by b tan(beta) / r keep the teeth in mesh over the
    # whole face: OCP's boolean common of the two placed solids is empty.  With equal hands it is not (the check bites).
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Common

    from gearcad.export.step import _adaptive_volume
    from gearcad.trains.planner import plan_train
    from gearcad.trains.trainfile import parse_train

    text = 'name = "m"\nmodule = 1.0\nthickness = 5.0\nbore = 2.0\n[[stage]]\ndriver = 12\ndriven = 18\nhelix = 30\n'
    plan = plan_train(parse_train(text), tolerance=1e-3)
    a, b = _placed_solid(plan, "s1-driver"), _placed_solid(plan, "s1-driven")
    assert _adaptive_volume(BRepAlgoAPI_Common(a, b).Shape()) < 1e-6
    wrong = _placed_solid(plan, "s1-driven", flip_hand=True)
    assert _adaptive_volume(BRepAlgoAPI_Common(a, wrong).Shape()) > 0.1
