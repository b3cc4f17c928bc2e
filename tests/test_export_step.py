"""STEP and STL writers, checked by reading the files back with OCP (the reference kernel).

References: the solid's volume against shapely's polygon area (reference tool)
times thickness minus the bore's pi d^2 / 4; spline deviation measured with
OCP's GeomAPI_ProjectPointOnCurve; the binary STL layout (80-byte header,
uint32 count, 50 bytes per triangle, from the STL format definition); the
tip and root diameters from SpurGear.
"""

import json
import math
import struct
import subprocess
import sys

import numpy as np
import pytest
import shapely

from gearcad.errors import ExportError, InputError
from gearcad.geometry.gear import SpurGear
from gearcad.geometry.shape import Part, circle_loop, gear_loop

TOLERANCE = 1e-3  # mm
THICKNESS = 8.0  # mm
FREE_FORM = {"involute", "fillet"}
GEARS = {"z12": (12, 3.0, 0.6, 10.0), "z40": (40, 1.0, 0.0, 6.0)}  # teeth, module, shift, bore mm


def test_importing_step_does_not_import_the_kernel():
    code = ("import sys, gearcad.export.step, gearcad.export; "
            "print(sorted(m for m in ('cadquery', 'OCP') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], check=True, capture_output=True, text=True).stdout
    assert out.strip() == "[]"


# -- OCP helpers (reading back) --------------------------------------------------------------

def read_step(path):
    from OCP.IFSelect import IFSelect_ReturnStatus
    from OCP.STEPControl import STEPControl_Reader

    from gearcad.export.step import kernel_quiet

    with kernel_quiet():
        reader = STEPControl_Reader()
        assert reader.ReadFile(str(path)) == IFSelect_ReturnStatus.IFSelect_RetDone
        reader.TransferRoots()
        return reader.OneShape()


def sub_shapes(shape, kind):
    from OCP.TopAbs import TopAbs_ShapeEnum
    from OCP.TopExp import TopExp_Explorer

    explorer = TopExp_Explorer(shape, getattr(TopAbs_ShapeEnum, f"TopAbs_{kind}"))
    found = []
    while explorer.More():
        found.append(explorer.Current())
        explorer.Next()
    return found


def face_types(shape):
    from OCP.BRepAdaptor import BRepAdaptor_Surface
    from OCP.TopoDS import TopoDS

    return [BRepAdaptor_Surface(TopoDS.Face_s(f)).GetType().name for f in sub_shapes(shape, "FACE")]


def volume(shape):
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props)
    return props.Mass()


def bounding_box(shape):
    from OCP.Bnd import Bnd_Box
    from OCP.BRepBndLib import BRepBndLib

    box = Bnd_Box()
    BRepBndLib.AddOptimal_s(shape, box, False, False)
    return np.array(box.Get())


def is_valid(shape):
    from OCP.BRepCheck import BRepCheck_Analyzer

    return BRepCheck_Analyzer(shape).IsValid()


# -- fixtures ----------------------------------------------------------------------------------

@pytest.fixture(scope="module", params=sorted(GEARS))
def built(request, tmp_path_factory):
    from gearcad.export.step import build_solid, write_step

    teeth, module, shift, bore = GEARS[request.param]
    gear = SpurGear.make(teeth, module, shift=shift)
    loop = gear_loop(gear, TOLERANCE)
    part = Part(request.param, loop, circles=((0.0, 0.0, bore),))
    result = build_solid(part, THICKNESS, TOLERANCE)
    path = tmp_path_factory.mktemp("step") / f"{request.param}.step"
    write_step(result.solid, path, [request.param])
    return dict(gear=gear, loop=loop, part=part, bore=bore, result=result, path=path)


# -- STEP --------------------------------------------------------------------------------------

@pytest.mark.slow
def test_step_reads_back_as_one_valid_solid_of_the_right_volume(built):
    shape = read_step(built["path"])
    assert is_valid(shape)
    assert len(sub_shapes(shape, "SOLID")) == 1
    outline = shapely.Polygon(built["loop"].points()).area  # shapely as reference for the area
    expected = (outline - math.pi * built["bore"] ** 2 / 4) * THICKNESS
    assert volume(shape) == pytest.approx(expected, rel=1e-3)
    assert built["result"].volume == pytest.approx(expected, rel=1e-3)


@pytest.mark.slow
def test_step_faces_are_splines_and_exact_cylinders(built):
    types = face_types(read_step(built["path"]))
    curves = built["loop"].curves
    n = len(curves)
    free = sum(c.kind in FREE_FORM for c in curves)
    arcs = sum(c.radius > 0 for c in curves)
    # a tooth space's bottom (fillet, root arc, fillet) is one face; every other curve a face of its own
    bottoms = sum(c.radius > 0 and curves[i - 1].kind == curves[(i + 1) % n].kind == "fillet" for i, c in enumerate(curves))
    assert bottoms > 0
    assert free - bottoms == built["result"].splines > 0
    spline_faces = types.count("GeomAbs_SurfaceOfExtrusion") + types.count("GeomAbs_BSplineSurface")
    assert spline_faces == free - bottoms  # extruded B-spline faces, no facets
    assert types.count("GeomAbs_Cylinder") == arcs - bottoms + 1  # tip arcs and the bore
    assert types.count("GeomAbs_Plane") == 2  # bottom and top
    # economy: far fewer control points than sampled points
    assert built["result"].poles < 0.5 * sum(len(c.points) for c in curves if c.kind in FREE_FORM)


@pytest.mark.slow
def test_joined_faces_keep_the_outline_and_the_volume(built):
    # Every point of one tooth pitch lies within the tolerance of the solid's edges (OCP's
    # BRepExtrema distance), and the kernel's default volume, the one CAD programs show, agrees
    # with the face's adaptively integrated area x thickness (OCP's BRepGProp) within 2e-4.
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeVertex
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape
    from OCP.BRepGProp import BRepGProp
    from OCP.gp import gp_Pnt
    from OCP.GProp import GProp_GProps
    from OCP.TopoDS import TopoDS_Compound
    from OCP.BRep import BRep_Builder

    from gearcad.export.step_edges import _Stats
    from gearcad.export.step_solid import _face

    shape = read_step(built["path"])
    builder, bottom = BRep_Builder(), TopoDS_Compound()
    builder.MakeCompound(bottom)
    for edge in sub_shapes(shape, "EDGE"):
        builder.Add(bottom, edge)
    curves = built["loop"].curves[:8]
    worst = 0.0
    for x, y in np.vstack([c.points for c in curves]):
        dist = BRepExtrema_DistShapeShape(BRepBuilderAPI_MakeVertex(gp_Pnt(x, y, 0.0)).Vertex(), bottom)
        worst = max(worst, dist.Value())
    assert worst <= TOLERANCE + 1e-8  # the file's reals are rounded to 1e-9
    props = GProp_GProps()
    BRepGProp.SurfaceProperties_s(_face(built["part"], TOLERANCE, _Stats(), join=True), props, 1e-12)
    assert volume(shape) == pytest.approx(props.Mass() * THICKNESS, rel=2e-4)


@pytest.mark.slow
def test_step_size_matches_the_gear(built):
    xmin, ymin, zmin, xmax, ymax, zmax = bounding_box(read_step(built["path"]))
    tip = built["gear"].tip_diameter
    assert (zmin, zmax) == pytest.approx((0.0, THICKNESS), abs=1e-6)
    # a tooth sits on +x, so the x extent reaches the tip radius there (within the spline tolerance)
    assert xmax == pytest.approx(tip / 2, abs=2 * TOLERANCE)
    assert max(xmax - xmin, ymax - ymin) <= tip + 2 * TOLERANCE


@pytest.mark.slow
def test_splines_stay_within_tolerance_of_every_point(built):
    from OCP.GeomAPI import GeomAPI_ProjectPointOnCurve
    from OCP.gp import gp_Pnt

    from gearcad.export.step import spline_through

    pitch = [c for c in built["loop"].curves if c.kind in FREE_FORM][:4]  # one tooth's worth
    for curve in pitch:
        spline, used, worst = spline_through(curve.points, curve.tangents, TOLERANCE)
        assert used < len(curve.points)
        measured = max(GeomAPI_ProjectPointOnCurve(gp_Pnt(x, y, 0), spline).LowerDistance()
                       for x, y in curve.points)
        assert measured <= worst + 1e-12  # the writer's figure bounds the kernel's projection
        assert measured <= TOLERANCE
        for u, t in ((spline.FirstParameter(), curve.tangents[0]), (spline.LastParameter(), curve.tangents[-1])):
            d = spline.DN(u, 1)
            assert (d.X() / d.Magnitude(), d.Y() / d.Magnitude()) == pytest.approx(tuple(t), abs=1e-9)
    assert built["result"].worst_deviation <= TOLERANCE


@pytest.mark.slow
def test_step_is_reproducible_and_names_the_product(built, tmp_path):
    from gearcad.export.step import write_step

    solid = built["result"].solid
    again = tmp_path / built["path"].name  # same file name, other folder, later moment
    write_step(solid, again, [built["part"].name])
    assert again.read_bytes() == built["path"].read_bytes()  # no time stamp in the way
    second = again.read_text()
    assert f"PRODUCT('{built['part'].name}'" in second
    assert "AUTOMOTIVE_DESIGN" in second  # the AP214 schema name
    assert ".tmp-" not in second  # the header names the final file, not the temporary one


# -- STL ----------------------------------------------------------------------------------------

def read_binary_stl(path):
    data = path.read_bytes()
    (count,) = struct.unpack_from("<I", data, 80)
    assert len(data) == 84 + 50 * count
    rows = np.frombuffer(data, dtype=np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("a", "<u2")]),
                         count=count, offset=84)
    return rows["v"].reshape(-1, 3)


@pytest.mark.slow
def test_stl_has_triangles_spanning_the_gear(built, tmp_path):
    from OCP.RWStl import RWStl

    from gearcad.export.step import write_stl

    linear = 0.02
    write_stl(built["result"].solid, tmp_path / "g.stl", linear_tolerance=linear, angular_tolerance=10.0)
    vertices = read_binary_stl(tmp_path / "g.stl")
    assert len(vertices) > 0
    tip = built["gear"].tip_diameter
    lo, hi = vertices.min(axis=0), vertices.max(axis=0)
    assert hi[2] - lo[2] == pytest.approx(THICKNESS, abs=1e-5)
    assert hi[0] == pytest.approx(tip / 2, abs=linear + TOLERANCE)  # the tooth on +x
    r = np.hypot(vertices[:, 0], vertices[:, 1])
    assert r.max() <= tip / 2 + TOLERANCE and r.max() >= tip / 2 - linear - TOLERANCE
    assert r.min() == pytest.approx(built["bore"] / 2, abs=linear + 1e-6)
    triangulation = RWStl.ReadFile_s(str(tmp_path / "g.stl"))
    assert triangulation.NbTriangles() == len(vertices) // 3


@pytest.mark.slow
def test_stl_normals_are_those_of_the_stored_vertices_and_point_out(built, tmp_path):
    # The STL format: each facet's unit normal follows its vertices by the right-hand rule, outward (from memory).
    # Checked against the stored single-precision vertices, and outwardness by the divergence theorem: the
    # volume sum(area * (n . centroid)) / 3 equals OCP's own volume of the solid (GProp).
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    from gearcad.export.step import write_stl

    solid = built["result"].solid
    write_stl(solid, tmp_path / "g.stl", linear_tolerance=0.02, angular_tolerance=10.0)
    data = (tmp_path / "g.stl").read_bytes()
    rows = np.frombuffer(data, dtype=np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("a", "<u2")]),
                         count=int.from_bytes(data[80:84], "little"), offset=84)
    v = rows["v"].astype(float)
    cross = np.cross(v[:, 1] - v[:, 0], v[:, 2] - v[:, 0])
    area2 = np.linalg.norm(cross, axis=1)
    assert np.allclose(rows["n"], cross / area2[:, None], atol=1e-6)
    volume = float(np.sum(area2 / 2 * np.einsum("ij,ij->i", rows["n"], v.mean(axis=1))) / 3)
    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(solid.wrapped if hasattr(solid, "wrapped") else solid, props)
    assert volume == pytest.approx(props.Mass(), rel=2e-3)


# -- assembly, stdout, failures ------------------------------------------------------------------

def plate(name="plate"):
    """A 40 x 20 mm rectangle of four straight curves with two round holes."""
    from gearcad.geometry.generate import Curve

    corners = np.array([(0, 0), (40, 0), (40, 20), (0, 20)], dtype=float)
    curves = []
    for a, b in zip(corners, np.roll(corners, -1, axis=0)):
        t = (b - a) / np.hypot(*(b - a))
        curves.append(Curve("line", np.array([a, b]), np.array([t, t]), np.array([0.0, 1.0])))
    from gearcad.geometry.shape import Loop

    return Part(name, Loop(tuple(curves)), holes=(circle_loop(30, 10, 6),), circles=((10, 10, 5.0),))


@pytest.mark.slow
def test_plate_with_loop_hole_and_circle(tmp_path):
    from gearcad.export.step import build_solid

    part = plate()
    result = build_solid(part, 3.0, TOLERANCE)
    assert result.splines == 0
    expected = (800 - math.pi * 9 - math.pi * 6.25) * 3  # rectangle minus two exact circles
    assert result.volume == pytest.approx(expected, rel=1e-9)  # exact arcs, no polygon loss
    assert is_valid(result.solid)


@pytest.mark.slow
def test_assembly_has_named_placed_parts(tmp_path):
    from gearcad.export.step import AssemblyItem, assembly_step, build_solid

    solid = build_solid(plate(), 3.0, TOLERANCE).solid
    path = assembly_step([("left", solid, 0, 0, 0, 0), AssemblyItem("right", solid, 100, 0, 5, 90)],
                         tmp_path / "pair.step", name="bench")
    shape = read_step(path)
    assert len(sub_shapes(shape, "SOLID")) == 2
    text = path.read_text()
    for name in ("bench", "left", "right"):
        assert f"'{name}'" in text
    # the right plate turned 90 degrees about z and moved by (100, 0, 5): x -20..0 -> 80..100, y 0..40
    xmin, ymin, zmin, xmax, ymax, zmax = bounding_box(shape)
    assert (xmin, ymin, zmin, xmax, ymax, zmax) == pytest.approx((0, 0, 0, 100, 40, 8), abs=1e-6)
    with pytest.raises(InputError):
        assembly_step([("a", solid, 0, 0, 0, 0), ("a", solid, 1, 0, 0, 0)], tmp_path / "bad.step")


@pytest.mark.slow
def test_kernel_output_never_reaches_stdout(tmp_path):
    script = f"""
import json
from gearcad.export.step import build_solid, write_step, write_stl
from gearcad.geometry.gear import SpurGear
from gearcad.geometry.shape import Part, gear_loop
solid = build_solid(Part("g", gear_loop(SpurGear.make(12, 2.0))), 4.0, 1e-3).solid
write_step(solid, {str(tmp_path / "g.step")!r})
write_stl(solid, {str(tmp_path / "g.stl")!r}, 0.05, 10.0)
print(json.dumps({{"ok": True}}))
"""
    run = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, check=True)
    assert json.loads(run.stdout) == {"ok": True}
    # Without the redirection the same kernel call prints its transfer statistics on stdout,
    # so the check above can fail:
    raw = f"""
from OCP.STEPControl import STEPControl_AsIs, STEPControl_Writer
from gearcad.export.step import build_solid
from gearcad.geometry.gear import SpurGear
from gearcad.geometry.shape import Part, gear_loop
writer = STEPControl_Writer()
writer.Transfer(build_solid(Part("g", gear_loop(SpurGear.make(12, 2.0))), 4.0, 1e-3).solid, STEPControl_AsIs)
writer.Write({str(tmp_path / "raw.step")!r})
"""
    loud = subprocess.run([sys.executable, "-c", raw], capture_output=True, text=True, check=True)
    assert "Statistics on Transfer" in loud.stdout


def test_bad_inputs_and_unwritable_paths(tmp_path):
    from gearcad.export import write_solid
    from gearcad.export.step import build_solid, write_step

    part = Part("g", gear_loop(SpurGear.make(12, 2.0)))
    with pytest.raises(InputError):
        build_solid(part, 0.0, TOLERANCE)
    with pytest.raises(InputError):
        build_solid(part, 3.0, -1.0)
    with pytest.raises(InputError, match="counter-clockwise"):
        build_solid(Part("g", part.outer.reversed()), 3.0, TOLERANCE)
    with pytest.raises(InputError, match=".step"):
        write_solid(None, tmp_path / "g.iges")
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox

    box = BRepPrimAPI_MakeBox(10.0, 10.0, 10.0).Shape()
    with pytest.raises(ExportError, match="does not exist"):
        write_step(box, tmp_path / "missing" / "g.step")
    with pytest.raises(InputError, match="one name per shape"):
        write_step([box, box], tmp_path / "g.step", names=["only one"])
    assert list(tmp_path.iterdir()) == []


def test_facet_normals_are_remade_from_the_stored_vertices(tmp_path):
    # A micrometre facet whose stored normal (as a writer working on exact coordinates may give it) is off its
    # single-precision vertices by a few degrees, and a zero-area facet: the first gets the right-hand-rule normal
    # of what is stored, the second a zero normal (the STL format's own rule, from memory).
    from gearcad.export.step_files import _normals_from_vertices

    facet = np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("a", "<u2")])
    rows = np.zeros(2, dtype=facet)
    rows["v"][0] = [(70.0, 0.0, 0.0), (70.000004, 0.0, 0.0), (70.0, 0.000004, 0.0)]
    rows["n"][0] = (0.1, 0.0, 0.995)
    rows["v"][1] = [(1.0, 1.0, 1.0), (1.0, 1.0, 1.0), (2.0, 2.0, 2.0)]
    path = tmp_path / "t.stl"
    path.write_bytes(b"\0" * 80 + (2).to_bytes(4, "little") + rows.tobytes())
    _normals_from_vertices(path)
    back = np.frombuffer(path.read_bytes(), dtype=facet, count=2, offset=84)
    assert np.allclose(back["n"][0], (0.0, 0.0, 1.0), atol=1e-6) and np.all(back["n"][1] == 0)
    path.write_bytes(path.read_bytes()[:-10])
    with pytest.raises(ExportError, match="bytes"):
        _normals_from_vertices(path)
