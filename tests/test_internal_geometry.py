"""The ring-gear outline against an independent construction of pinion-type cutting, and its figures.

Independent construction (shapely): a sector of the blank (an annulus from the tip circle
outward) minus the union of the cutter tooth placed at thousands of positions along the
generating motion.  The cutter is built as a polygon from its own definition (involute
flanks, tip rounds, tip land; flanks carried radially below the base circle); nothing of the
envelope formulas is used.  The outline's vertices must lie on the cut boundary and the cut
boundary within the chord tolerance of the outline.
"""

import math

import numpy as np
import pytest
import shapely
from shapely.geometry import Point, Polygon

from gearcad.errors import GeometryError, InputError
from gearcad.geometry.internal import RingGear, ring_loop, ring_part, ring_profile, to_ring_frame
from gearcad.geometry.ring_cutter import cutter_outline
from gearcad.geometry.involute import inv
from gearcad.profiles import load_tooth_system


def cutter_tooth_polygon(ring, count=400):
    """Cutter tooth 0 as a polygon (cutter frame), its flanks continued radially below the base circle."""
    c = ring.cutter
    pts = cutter_outline(c, count)
    half = len(pts) // 2
    upper, lower = pts[:half], pts[half:]
    core = 0.98 * min(c.base_radius, ring.tip_diameter / 2 - ring.cutting_centre_distance)
    foot = np.array([[core * math.cos(c.half_angle_at_base), core * math.sin(c.half_angle_at_base)]])
    return Polygon(np.concatenate([foot * (1, -1), lower, upper[::-1], foot]))


def stepped_cut(ring, steps):
    """Blank sector round the space on +x minus the cutter tooth at ``steps`` positions of its pass."""
    z, z0, a0 = ring.teeth, ring.cutter_teeth, ring.cutting_centre_distance
    pts = np.asarray(cutter_tooth_polygon(ring).exterior.coords)
    ra, rf = ring.tip_diameter / 2, ring.root_diameter / 2
    scan = np.linspace(-math.pi * z0 / z, math.pi * z0 / z, 20001)
    reach = np.hypot(*np.moveaxis(to_ring_frame(pts, z0, z, a0, scan), -1, 0)).max(axis=1)
    inside = scan[reach > ra]  # the pass: positions where the tooth is inside the tip circle
    chi = np.linspace(inside.min(), inside.max(), steps)
    cut = shapely.union_all(shapely.polygons(to_ring_frame(pts, z0, z, a0, chi)))
    pitch = 2 * math.pi / z
    wedge = Polygon([(0, 0)] + [(2 * rf * math.cos(t), 2 * rf * math.sin(t)) for t in np.linspace(-1.5 * pitch, 1.5 * pitch, 50)])
    blank = Point(0, 0).buffer(1.2 * rf, 2000).difference(Point(0, 0).buffer(ra, 4000)).intersection(wedge)
    return blank.difference(cut)


def turned(points, angle):
    c, s = math.cos(angle), math.sin(angle)
    return points @ np.array([[c, -s], [s, c]]).T


CASES = [  # (teeth, module, shift ISO sign, cutter teeth or None)
    (60, 1.0, 0.0, None),
    (30, 1.0, -0.5, None),
    (40, 1.0, -0.2, 24),
]


@pytest.mark.parametrize("teeth, module, shift, cutter", CASES)
def test_outline_matches_the_stepped_cutter(teeth, module, shift, cutter):
    ring = RingGear.make(teeth, module, shift=shift, cutter_teeth=cutter)
    cut = stepped_cut(ring, steps=3000).boundary
    z = ring.teeth
    pts = turned(ring_loop(ring, 1e-3).points(), -math.pi / z)  # loop has a tooth on +x; the cut, a space
    window = np.abs(np.arctan2(pts[:, 1], pts[:, 0])) < 0.98 * math.pi / z
    # Outline vertices lie on the true curves: on the stepped boundary up to its scallops (about 2 nm here).
    assert shapely.distance(shapely.points(pts[window]), cut).max() < 1e-5
    # The stepped boundary lies within the chord tolerance (1 µm) of the outline polyline.
    bp = shapely.get_coordinates(cut)
    radius = np.hypot(bp[:, 0], bp[:, 1])
    keep = (np.abs(np.arctan2(bp[:, 1], bp[:, 0])) < 0.98 * math.pi / z) & (radius < 1.01 * ring.root_diameter / 2)
    keep &= radius > ring.tip_diameter / 2 + 1e-9
    assert shapely.distance(shapely.points(bp[keep]), shapely.LinearRing(pts)).max() <= 1e-3


def test_loop_is_a_clockwise_closed_chain_of_true_curves():
    ring = RingGear.make(36, 2.0, shift=-0.3)
    loop = ring_loop(ring, 1e-3)
    assert loop.area() < 0  # clockwise: a hole in the blank
    for a, b in zip(loop.curves, loop.curves[1:] + loop.curves[:1]):
        assert np.allclose(a.points[-1], b.points[0], atol=1e-9)
    kinds = {c.kind for c in loop.curves}
    assert kinds <= {"root", "fillet", "involute", "tip"}
    for c in loop.curves:
        r = np.hypot(c.points[:, 0], c.points[:, 1])
        if c.kind == "tip":
            assert np.allclose(r, ring.tip_diameter / 2)
        if c.kind == "root":
            assert np.allclose(r, ring.root_diameter / 2)
        assert np.all(r >= ring.tip_diameter / 2 - 1e-9) and np.all(r <= ring.root_diameter / 2 + 1e-9)
    # Area between the outline and the tip circle: z spaces, each between tip and root.
    annulus = math.pi * ((ring.root_diameter / 2) ** 2 - (ring.tip_diameter / 2) ** 2)
    assert 0 < -loop.area() - math.pi * (ring.tip_diameter / 2) ** 2 < annulus


def test_tooth_thickness_on_the_outline():
    # ISO 21771 (from memory): s = m (pi/2 + 2 x tan(alpha)); ring tooth at radius r: d_y (s/d - inv a + inv a_y).
    ring = RingGear.make(48, 1.5, shift=-0.25)
    profile = ring_profile(ring, 1e-4)
    invs = [c for c in profile.curves if c.kind == "involute"]
    for d in (ring.reference_diameter, 0.5 * (ring.tip_diameter + ring.form_diameter)):
        angles = []
        for c in invs:
            r = np.hypot(c.points[:, 0], c.points[:, 1])
            angles.append(np.interp(d / 2, r[::-1] if r[0] > r[-1] else r,
                                    np.arctan2(c.points[:, 1], c.points[:, 0])[::-1] if r[0] > r[-1] else
                                    np.arctan2(c.points[:, 1], c.points[:, 0])))
        thickness = abs(angles[0] - angles[1]) * d / 2
        assert thickness == pytest.approx(ring.thickness_at(d), abs=2e-4)
    assert ring.thickness_at(ring.reference_diameter) == pytest.approx(1.5 * (math.pi / 2 - 0.5 * math.tan(math.radians(20))))


def test_diameters_iso_21771():
    # ISO 21771 (from memory) with d < 0 for internal gears: d_a = d + 2 m (h_a + x), written here with |d|.
    sys_ = load_tooth_system("iso53-a")
    ring = RingGear(50, 2.0, sys_, shift=-0.4, cutter_teeth=20)
    assert ring.iso_teeth == -50
    assert ring.reference_diameter == 100.0
    assert ring.base_diameter == pytest.approx(100 * math.cos(math.radians(20)))
    assert ring.tip_diameter == pytest.approx(100 - 2 * 2 * (1.0 - 0.4))
    assert ring.nominal_root_diameter == pytest.approx(100 + 2 * 2 * (1.25 + 0.4))
    # Cut root from the generating geometry: 2 a0 + d_a0, a0 from the internal zero-backlash relation.
    a = math.radians(20)
    from gearcad.geometry.involute import inv_inverse

    alpha0 = inv_inverse(inv(a) - 2 * math.tan(a) * (0 - 0.4) / 30)
    a0 = 30 * 2 * math.cos(a) / (2 * math.cos(alpha0))
    assert ring.root_diameter == pytest.approx(2 * a0 + 2 * (20 + 2.5))
    # Unshifted ring and cutter: the cut root is the rack form d + 2 h_f m exactly.
    plain = RingGear(50, 2.0, sys_, cutter_teeth=30)
    assert plain.root_diameter == pytest.approx(plain.nominal_root_diameter, abs=1e-12)


def test_part_has_the_rim_and_the_toothed_hole():
    ring = RingGear.make(40, 1.0, rim_diameter=60.0)
    part = ring_part(ring)
    assert part.outer.area() == pytest.approx(math.pi * 900, rel=1e-4)  # inscribed polygon, 1 µm chords
    assert len(part.holes) == 1 and part.holes[0].area() < 0
    default = RingGear.make(40, 1.0)
    assert default.outer_diameter == pytest.approx(default.root_diameter + 2 * 1.2 * default.tooth_depth)


def test_a_cutter_too_large_trims_the_ring_and_is_refused():
    # Independent check (shapely): the 55-tooth cutter's tooth overlaps the designed ring teeth
    # (tip circle to form circle, involute flanks) somewhere on its pass; the 50-tooth one does not.
    sys_ = load_tooth_system("iso53-a")
    with pytest.raises(GeometryError, match="trims the tips"):
        RingGear(60, 1.0, sys_, cutter_teeth=55)
    ok = RingGear(60, 1.0, sys_, cutter_teeth=50)

    def overlap(ring, z0):
        object.__setattr__(ring, "cutter_teeth", z0)  # look at a cutter the ring refused
        rb, ra = ring.base_diameter / 2, ring.tip_diameter / 2
        from gearcad.geometry.involute_curve import involute_points, roll_angle_at

        t = np.linspace(float(roll_angle_at(ra, rb)), float(roll_angle_at(ring.form_diameter / 2, rb)), 200)
        flank = involute_points(rb, ring.space_half_angle_at_base, t)
        other = turned(flank * (1, -1), 2 * math.pi / 60)
        tooth = Polygon(np.concatenate([flank, other[::-1]]))
        teeth = shapely.union_all([shapely.affinity.rotate(tooth, k * 6.0, origin=(0, 0)) for k in range(-3, 4)])
        pts = np.asarray(cutter_tooth_polygon(ring).exterior.coords)
        chi = np.linspace(-math.pi * z0 / 60, math.pi * z0 / 60, 1500)
        polys = shapely.polygons(to_ring_frame(pts, z0, 60, ring.cutting_centre_distance, chi))
        return shapely.area(shapely.intersection(polys, teeth)).max()

    assert overlap(ok, 50) < 1e-7
    trimmed = RingGear(60, 1.0, sys_, cutter_teeth=50)
    assert overlap(trimmed, 55) > 1e-3


@pytest.mark.parametrize("kwargs, needle", [
    (dict(teeth=-60), "ISO 21771 writes an internal gear's teeth as negative: give 60"),
    (dict(teeth=60, cutter_teeth=60), "cutter tooth count must be from 8 to 59"),
    (dict(teeth=60, rim_diameter=60.0), "rim diameter must exceed the root diameter"),
    (dict(teeth=40, shift=0.3), "inside its base circle"),
    (dict(teeth=60, cutter_shift=2.0), "cutter profile shift must be from -1 to 1"),
])
def test_bad_input_names_the_value_and_the_limit(kwargs, needle):
    with pytest.raises((InputError, GeometryError), match=needle) as info:
        RingGear.make(module=1.0, **kwargs)
    assert "\n" not in str(info.value)
