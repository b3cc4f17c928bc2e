"""Solids for CAD programs (STEP AP214) and printers (STL), built with the OCP kernel.

This is the only module that uses cadquery / OCP, and it imports them inside
functions: importing :mod:`gearcad.export.step` costs nothing until a solid is
built.  The kernel writes statistics to the process's standard output; every
kernel call that may print runs with file descriptor 1 pointed at standard
error (see :func:`kernel_quiet`), so a program printing JSON on stdout stays
parseable.

A :class:`~gearcad.geometry.shape.Part`'s curves become exact edges: circular
curves (``radius > 0``) exact circular arcs, ``"line"``/``"chamfer"`` curves
straight segments, every other curve (involute, fillet) one B-spline edge
interpolated through a subset of the curve's points with the curve's end
tangents, the subset grown until the spline passes within ``tolerance`` of
every given point.  Nothing is faceted.  Lengths in mm, angles in degrees at
the interface and radians inside.
"""

from __future__ import annotations

import math
import os
import sys
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from ..errors import ExportError, GeometryError, InputError
from .atomic import atomic_path
from .step_compact import share_geometry

if TYPE_CHECKING:
    from OCP.Geom import Geom_BSplineCurve
    from OCP.TopoDS import TopoDS_Edge, TopoDS_Face, TopoDS_Shape, TopoDS_Solid, TopoDS_Wire

    from ..geometry.generate import Curve
    from ..geometry.shape import Loop, Part

__all__ = [
    "SolidBuild",
    "AssemblyItem",
    "VOLUME_TOLERANCE",
    "STRAIGHT_KINDS",
    "kernel_quiet",
    "build_solid",
    "with_hub",
    "gear_solid",
    "spline_through",
    "write_step",
    "write_stl",
    "assembly_step",
    "assembly_document",
]

VOLUME_TOLERANCE = 1e-3  # relative: the solid's volume must match area x thickness this closely
STRAIGHT_KINDS = frozenset({"line", "chamfer"})
_FIXED_TIMESTAMP = "2000-01-01T00:00:00"  # STEP header time stamp, fixed so files are reproducible
_ORIGINATING_SYSTEM = "gearcad"


# -- keeping the kernel off stdout ---------------------------------------------------------

def _flush_c_stdio() -> None:
    import ctypes

    try:
        ctypes.CDLL(None).fflush(None)
    except (OSError, AttributeError):  # no C library handle on this platform
        pass


@contextmanager
def kernel_quiet() -> Iterator[None]:
    """Point file descriptor 1 at the null device for the duration, then restore it.

    The kernel writes transfer statistics to stdout, which would corrupt JSON
    output and mean nothing to a user; gearcad reports its own errors.  Python's
    and the C library's buffers are flushed on both sides so no kernel output is
    left to reach the real stdout afterwards.
    """
    sys.stdout.flush()
    _flush_c_stdio()
    saved = os.dup(1)
    sink = os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(sink, 1)
        os.close(sink)
        try:
            yield
        finally:
            sys.stdout.flush()
            _flush_c_stdio()
    finally:
        os.dup2(saved, 1)
        os.close(saved)


# -- edges ------------------------------------------------------------------------------------

def _pnt(xy: Sequence[float]) -> Any:
    from OCP.gp import gp_Pnt

    return gp_Pnt(float(xy[0]), float(xy[1]), 0.0)


def _arc_edge(curve: "Curve") -> "TopoDS_Edge":
    """An exact arc of the curve's circle from its first to its last point."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
    from OCP.GC import GC_MakeArcOfCircle
    from OCP.gp import gp_Ax2, gp_Circ, gp_Dir

    cx, cy = curve.centre
    p0, t0 = curve.points[0], curve.tangents[0]
    ccw = (p0[0] - cx) * t0[1] - (p0[1] - cy) * t0[0] > 0
    axis = gp_Ax2(_pnt((cx, cy)), gp_Dir(0.0, 0.0, 1.0 if ccw else -1.0))
    arc = GC_MakeArcOfCircle(gp_Circ(axis, curve.radius), _pnt(p0), _pnt(curve.points[-1]), True)
    if not arc.IsDone():
        raise GeometryError(f"cannot build the arc of radius {curve.radius:g} mm at ({cx:g}, {cy:g}) mm")
    return BRepBuilderAPI_MakeEdge(arc.Value()).Edge()


def _segment_edge(curve: "Curve") -> "TopoDS_Edge":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge

    return BRepBuilderAPI_MakeEdge(_pnt(curve.points[0]), _pnt(curve.points[-1])).Edge()


def _interpolate(points: np.ndarray, params: np.ndarray, t0: np.ndarray, t1: np.ndarray) -> "Geom_BSplineCurve":
    """The cubic B-spline through ``points`` at ``params`` (mm of chord) with unit end tangents."""
    from OCP.GeomAPI import GeomAPI_Interpolate
    from OCP.gp import gp_Vec
    from OCP.TColgp import TColgp_HArray1OfPnt
    from OCP.TColStd import TColStd_HArray1OfReal

    pts = TColgp_HArray1OfPnt(1, len(points))
    par = TColStd_HArray1OfReal(1, len(points))
    for i, (p, u) in enumerate(zip(points, params), start=1):
        pts.SetValue(i, _pnt(p))
        par.SetValue(i, float(u))
    try:
        interp = GeomAPI_Interpolate(pts, par, False, 1e-9)
        # Unit tangents with a chord-length parameter: the curve runs at about unit speed, so no scaling.
        interp.Load(gp_Vec(float(t0[0]), float(t0[1]), 0.0), gp_Vec(float(t1[0]), float(t1[1]), 0.0), False)
        interp.Perform()
    except Exception as exc:  # the kernel's Standard_Failure (e.g. coincident points)
        raise GeometryError(f"B-spline interpolation through {len(points)} points failed: {exc}") from exc
    if not interp.IsDone():
        raise GeometryError(f"B-spline interpolation through {len(points)} points failed")
    return interp.Curve()


def _deviations(spline: "Geom_BSplineCurve", points: np.ndarray, params: np.ndarray) -> np.ndarray:
    """Distance from each point to the spline point found by one Newton step from its parameter, mm.

    Each value is the distance to an actual point of the spline, so it bounds the
    true point-to-curve distance from above.
    """
    from OCP.gp import gp_Pnt, gp_Vec

    lo, hi = spline.FirstParameter(), spline.LastParameter()
    p, v = gp_Pnt(), gp_Vec()
    out = np.empty(len(points))
    for i, (xy, u) in enumerate(zip(points, params)):
        spline.D1(float(u), p, v)
        dx, dy = xy[0] - p.X(), xy[1] - p.Y()
        speed2 = v.X() ** 2 + v.Y() ** 2
        u2 = min(hi, max(lo, u + (dx * v.X() + dy * v.Y()) / speed2)) if speed2 > 0 else u
        q = spline.Value(u2)
        out[i] = min(math.hypot(dx, dy), math.hypot(xy[0] - q.X(), xy[1] - q.Y()))
    return out


def _refined(chosen: np.ndarray, dev: np.ndarray, tolerance: float) -> np.ndarray:
    """Add, in every span between chosen points that strays too far, its worst point."""
    extra = []
    for a, b in zip(chosen[:-1], chosen[1:]):
        if b - a > 1:
            k = a + 1 + int(np.argmax(dev[a + 1:b]))
            if dev[k] > tolerance:
                extra.append(k)
    return np.union1d(chosen, np.array(extra, dtype=int))


def spline_through(points: np.ndarray, tangents: np.ndarray, tolerance: float) -> tuple["Geom_BSplineCurve", int, float]:
    """A cubic B-spline within ``tolerance`` of every point, interpolating a growing subset of them.

    Starts from 4 points spread evenly (by index) and adds, in each span that
    strays too far, its worst point, until every point is within ``tolerance``.

    Parameters
    ----------
    points : numpy.ndarray
        (N, 2) points on the curve in travel order, mm.
    tangents : numpy.ndarray
        (N, 2) unit tangents; the first and last are imposed at the ends.
    tolerance : float
        Largest allowed distance from a given point to the spline, mm.

    Returns
    -------
    spline : OCP.Geom.Geom_BSplineCurve
        Passes exactly through the first and last point.
    used : int
        Number of points interpolated.
    worst : float
        Largest distance of a given point from the spline (upper bound), mm.
    """
    steps = np.hypot(*np.diff(points, axis=0).T)
    params = np.concatenate(([0.0], np.cumsum(steps)))  # chord length, mm
    n = len(points)
    chosen = np.unique(np.linspace(0, n - 1, min(n, 4)).round().astype(int))
    while True:
        spline = _interpolate(points[chosen], params[chosen], tangents[0], tangents[-1])
        dev = _deviations(spline, points, params)
        worst = float(dev.max())
        if worst <= tolerance or len(chosen) == n:
            return spline, len(chosen), worst
        more = _refined(chosen, dev, tolerance)
        chosen = more if len(more) > len(chosen) else np.arange(n)  # no span to split: take every point


@dataclass
class _Stats:
    splines: int = 0
    poles: int = 0
    worst: float = 0.0


def _curve_edge(curve: "Curve", tolerance: float, stats: _Stats) -> "TopoDS_Edge":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge

    if curve.radius > 0:
        return _arc_edge(curve)
    if curve.kind in STRAIGHT_KINDS:
        return _segment_edge(curve)
    spline, _, worst = spline_through(curve.points, curve.tangents, tolerance)
    stats.splines += 1
    stats.poles += spline.NbPoles()
    stats.worst = max(stats.worst, worst)
    return BRepBuilderAPI_MakeEdge(spline).Edge()


def _loop_wire(loop: "Loop", tolerance: float, stats: _Stats, what: str) -> "TopoDS_Wire":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeWire

    maker = BRepBuilderAPI_MakeWire()
    for curve in loop.curves:
        maker.Add(_curve_edge(curve, tolerance, stats))
        if not maker.IsDone():
            raise GeometryError(f"{what}: the {curve.kind} curve starting at {tuple(curve.points[0])} mm "
                                "does not join the previous one")
    wire = maker.Wire()
    if not wire.Closed():
        raise GeometryError(f"{what}: the loop of {len(loop.curves)} curves is not closed")
    return wire


def _circle_wire(x: float, y: float, diameter: float) -> "TopoDS_Wire":
    """A clockwise full circle (a hole in a face whose normal is +z)."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.gp import gp_Ax2, gp_Circ, gp_Dir

    circ = gp_Circ(gp_Ax2(_pnt((x, y)), gp_Dir(0.0, 0.0, -1.0)), diameter / 2)
    return BRepBuilderAPI_MakeWire(BRepBuilderAPI_MakeEdge(circ).Edge()).Wire()


# -- face and solid ---------------------------------------------------------------------------

def _check_inputs(part: "Part", thickness: float, tolerance: float) -> None:
    if not (math.isfinite(thickness) and thickness > 0):
        raise InputError(f"thickness must be greater than 0 mm, got {thickness!r}")
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InputError(f"tolerance must be greater than 0 mm, got {tolerance!r}")
    if part.outer.area() <= 0:
        raise InputError(f"part {part.name!r}: the outer loop must run counter-clockwise")
    for k, hole in enumerate(part.holes):
        if hole.area() >= 0:
            raise InputError(f"part {part.name!r}: hole {k} must run clockwise")


def _face(part: "Part", tolerance: float, stats: _Stats) -> "TopoDS_Face":
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace

    maker = BRepBuilderAPI_MakeFace(_loop_wire(part.outer, tolerance, stats, f"{part.name} outer"), True)
    for k, hole in enumerate(part.holes):
        maker.Add(_loop_wire(hole, tolerance, stats, f"{part.name} hole {k}"))
    for x, y, d in part.circles:
        maker.Add(_circle_wire(x, y, d))
    if not maker.IsDone():
        raise GeometryError(f"part {part.name!r}: cannot make a planar face of its loops")
    return maker.Face()


def _volume(shape: "TopoDS_Shape") -> float:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props)
    return props.Mass()


def _check_solid(solid: "TopoDS_Solid", part: "Part", thickness: float) -> float:
    from OCP.BRepCheck import BRepCheck_Analyzer

    if not BRepCheck_Analyzer(solid).IsValid():
        raise GeometryError(f"part {part.name!r}: the kernel rejects the solid as invalid")
    volume = _volume(solid)
    expected = part.area() * thickness
    if abs(volume - expected) > VOLUME_TOLERANCE * expected:
        raise GeometryError(f"part {part.name!r}: solid volume {volume:.6g} mm³ differs from "
                            f"area x thickness {expected:.6g} mm³ by more than {VOLUME_TOLERANCE:.1%}")
    return volume


@dataclass(frozen=True)
class SolidBuild:
    """A solid and how it was made.

    Attributes
    ----------
    solid : OCP.TopoDS.TopoDS_Solid
        The part extruded from z = 0 to z = thickness, mm.
    splines : int
        B-spline edges in the outline.
    poles : int
        Control points of all B-spline edges together.
    worst_deviation : float
        Largest distance of a given curve point from its spline, mm.
    volume : float
        Kernel volume, mm³.
    """

    solid: Any
    splines: int
    poles: int
    worst_deviation: float
    volume: float


def build_solid(part: "Part", thickness: float, tolerance: float) -> SolidBuild:
    """Extrude ``part`` into a checked solid; see :func:`gear_solid`.

    Returns
    -------
    SolidBuild
    """
    from OCP.BRepPrimAPI import BRepPrimAPI_MakePrism
    from OCP.gp import gp_Vec
    from OCP.TopoDS import TopoDS

    _check_inputs(part, thickness, tolerance)
    stats = _Stats()
    with kernel_quiet():
        face = _face(part, tolerance, stats)
        prism = BRepPrimAPI_MakePrism(face, gp_Vec(0.0, 0.0, float(thickness)))
        solid = TopoDS.Solid_s(prism.Shape())
        volume = _check_solid(solid, part, thickness)
    return SolidBuild(solid, stats.splines, stats.poles, stats.worst, volume)


def with_hub(build: SolidBuild, hub: "Part", thickness: float, length: float, tolerance: float) -> SolidBuild:
    """Fuse a hub (the flat part ``hub`` extruded by ``length`` mm) onto the top face of a built solid.

    The hub stands on z = ``thickness``; the result is checked for validity and
    for the volume of both pieces (0.1 %).
    """
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Trsf, gp_Vec
    from OCP.ShapeUpgrade import ShapeUpgrade_UnifySameDomain

    boss = build_solid(hub, length, tolerance)
    with kernel_quiet():
        move = gp_Trsf()
        move.SetTranslation(gp_Vec(0.0, 0.0, float(thickness)))
        placed = BRepBuilderAPI_Transform(boss.solid, move, True).Shape()
        fused = BRepAlgoAPI_Fuse(build.solid, placed).Shape()
        unify = ShapeUpgrade_UnifySameDomain(fused, True, True, False)
        unify.Build()
        shape = unify.Shape()
        volume = _volume(shape)
    expected = build.volume + boss.volume
    if abs(volume - expected) > 1e-3 * expected:
        raise GeometryError(f"{hub.name}: the gear with its hub has volume {volume:.4g} mm³, expected {expected:.4g}")
    return SolidBuild(shape, build.splines, build.poles, build.worst_deviation, volume)


def gear_solid(part: "Part", thickness: float, tolerance: float) -> "TopoDS_Solid":
    """The solid of a flat part: its face extruded from z = 0 to z = ``thickness``.

    Parameters
    ----------
    part : Part
        Outer loop (counter-clockwise), holes (clockwise) and round holes, mm.
    thickness : float
        Extrusion length along +z, mm.
    tolerance : float
        Largest distance of a given curve point from its B-spline edge, mm.

    Returns
    -------
    OCP.TopoDS.TopoDS_Solid

    Raises
    ------
    InputError
        Thickness or tolerance not positive, loops running the wrong way.
    GeometryError
        Curves that do not join, an invalid solid, or a volume off
        ``part.area() * thickness`` by more than 0.1 %.
    """
    return build_solid(part, thickness, tolerance).solid


# -- STEP ------------------------------------------------------------------------------------

def _shape(obj: Any) -> "TopoDS_Shape":
    """An OCP shape from an OCP shape or a cadquery object (``.wrapped``)."""
    return getattr(obj, "wrapped", obj)


def _step_settings() -> None:
    from OCP.Interface import Interface_Static

    Interface_Static.SetCVal_s("write.step.schema", "AP214IS")
    Interface_Static.SetCVal_s("write.step.unit", "MM")
    Interface_Static.SetCVal_s("xstep.cascade.unit", "MM")
    # No trim curves (pcurves): every face is a plane, a cylinder or a linear extrusion, whose edges a
    # reader rebuilds from the 3D curves; the pcurves more than doubled the file.
    Interface_Static.SetIVal_s("write.surfacecurve.mode", 0)


def _set_header(writer: Any, file_name: str) -> None:
    """Final file name, fixed time stamp, no author and our system name in the STEP header."""
    from OCP.APIHeaderSection import APIHeaderSection_MakeHeader
    from OCP.TCollection import TCollection_HAsciiString

    header = APIHeaderSection_MakeHeader(writer.ChangeWriter().Model())
    header.SetName(TCollection_HAsciiString(file_name))
    header.SetTimeStamp(TCollection_HAsciiString(_FIXED_TIMESTAMP))
    header.SetAuthorValue(1, TCollection_HAsciiString(""))
    header.SetOrganizationValue(1, TCollection_HAsciiString(""))
    header.SetOriginatingSystem(TCollection_HAsciiString(_ORIGINATING_SYSTEM))
    header.SetPreprocessorVersion(TCollection_HAsciiString(_ORIGINATING_SYSTEM))


def _write_caf(doc: Any, path: str | os.PathLike[str]) -> Path:
    """Write an XCAF document as STEP AP214 through :func:`atomic_path`."""
    from OCP.IFSelect import IFSelect_ReturnStatus
    from OCP.STEPCAFControl import STEPCAFControl_Writer
    from OCP.STEPControl import STEPControl_StepModelType

    target = Path(path)
    with atomic_path(target) as tmp, kernel_quiet():
        writer = STEPCAFControl_Writer()
        _step_settings()  # after the writer: making the first one sets the translator's defaults
        writer.SetNameMode(True)
        writer.SetColorMode(False)
        writer.SetLayerMode(False)
        if not writer.Transfer(doc, STEPControl_StepModelType.STEPControl_AsIs):
            raise ExportError(f"cannot write {target}: the kernel could not translate the shapes to STEP")
        _set_header(writer, target.name)
        if writer.Write(str(tmp)) != IFSelect_ReturnStatus.IFSelect_RetDone:
            raise ExportError(f"cannot write {target}: the STEP writer failed")
        tmp.write_text(share_geometry(tmp.read_text(encoding="latin-1")), encoding="latin-1")
    return target


def _new_caf() -> tuple[Any, Any]:
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDocStd import TDocStd_Document
    from OCP.XCAFDoc import XCAFDoc_DocumentTool

    doc = TDocStd_Document(TCollection_ExtendedString("XmlOcaf"))
    return doc, XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())


def write_step(shapes: Any, path: str | os.PathLike[str], names: Sequence[str] | None = None) -> Path:
    """Write one or more solids to a STEP AP214 file (mm), each a named product.

    Parameters
    ----------
    shapes : OCP shape, cadquery object, or a sequence of them
        The solids, placed as they are.
    path : str or os.PathLike
        The ``.step`` file to create or replace.
    names : sequence of str, optional
        Product names, one per shape (default ``part-1``, ``part-2``, ...).

    Returns
    -------
    pathlib.Path

    Raises
    ------
    InputError
        As many names as shapes are needed.
    ExportError
        The file could not be written.
    """
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name

    items = list(shapes) if isinstance(shapes, (list, tuple)) else [shapes]
    labels = list(names) if names is not None else [f"part-{k + 1}" for k in range(len(items))]
    if len(labels) != len(items) or not items:
        raise InputError(f"write_step needs one name per shape: {len(items)} shape(s), {len(labels)} name(s)")
    doc, tool = _new_caf()
    for shape, name in zip(items, labels):
        label = tool.AddShape(_shape(shape), False)
        TDataStd_Name.Set_s(label, TCollection_ExtendedString(str(name)))
    return _write_caf(doc, path)


@dataclass(frozen=True)
class AssemblyItem:
    """One placed part of an assembly: a solid turned about z, then moved.

    Attributes
    ----------
    name : str
        The instance's name (distinct in an assembly).
    solid : OCP shape or cadquery object
        The part's solid at its own origin.  Items that pass the very same shape
        object share it: the file holds it once and places it once per item.
    x, y, z : float
        Where its origin goes, mm.
    rotation_deg : float
        Turn about the z axis, degrees, applied before the move.
    part : str or None
        The name of the shared part (the product); default the first item's name.
    """

    name: str
    solid: Any
    x: float = 0.0
    y: float = 0.0
    z: float = 0.0
    rotation_deg: float = 0.0
    part: str | None = None


def _placement(item: AssemblyItem) -> Any:
    """The kernel location of an item: turn about z, then move (mm, degrees)."""
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec
    from OCP.TopLoc import TopLoc_Location

    turn, move = gp_Trsf(), gp_Trsf()
    turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), math.radians(float(item.rotation_deg)))
    move.SetTranslation(gp_Vec(float(item.x), float(item.y), float(item.z)))
    return TopLoc_Location(move.Multiplied(turn))


def assembly_document(items: Sequence[AssemblyItem | tuple], name: str = "assembly") -> Any:
    """An XCAF document: one top assembly placing every item; shared solids held once.

    Parameters
    ----------
    items : sequence of AssemblyItem or (name, solid, x, y, z, rotation_deg[, part])
        The placements.  More kinds of part (shafts, pillars, spacers) join by
        adding items; nothing else changes.
    name : str
        Name of the top assembly.

    Returns
    -------
    OCP.TDocStd.TDocStd_Document

    Raises
    ------
    InputError
        No items, or repeated names.
    """
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name

    parts = [it if isinstance(it, AssemblyItem) else AssemblyItem(*it) for it in items]
    seen = [p.name for p in parts]
    if not parts or len(set(seen)) != len(seen):
        raise InputError(f"an assembly needs at least one part and distinct names, got {seen}")
    doc, tool = _new_caf()
    top = tool.NewShape()
    TDataStd_Name.Set_s(top, TCollection_ExtendedString(str(name)))
    prototypes: list[tuple[Any, Any]] = []  # (shape, label): one product per distinct solid
    for p in parts:
        shape = _shape(p.solid)
        label = next((lab for proto, lab in prototypes if proto.IsSame(shape)), None)
        if label is None:
            label = tool.AddShape(shape, False)
            TDataStd_Name.Set_s(label, TCollection_ExtendedString(str(p.part or p.name)))
            prototypes.append((shape, label))
        component = tool.AddComponent(top, label, _placement(p))
        TDataStd_Name.Set_s(component, TCollection_ExtendedString(str(p.name)))
    tool.UpdateAssemblies()
    return doc


def assembly_step(items: Sequence[AssemblyItem | tuple], path: str | os.PathLike[str], name: str = "assembly") -> Path:
    """Write an assembly of named, placed solids to a STEP AP214 file.

    Solids shared by several items (the planets of a set, say) are written once
    and placed once per item (see :func:`assembly_document`).

    Parameters
    ----------
    items : sequence of AssemblyItem or (name, solid, x, y, z, rotation_deg[, part])
        Each solid is placed by a turn of ``rotation_deg`` degrees about the z
        axis, then moved by ``(x, y, z)`` mm.
    path : str or os.PathLike
        The ``.step`` file.
    name : str
        Name of the top assembly.

    Returns
    -------
    pathlib.Path

    Raises
    ------
    InputError
        No items, or repeated names.
    ExportError
        The file could not be written.
    """
    with kernel_quiet():
        doc = assembly_document(items, name)
    return _write_caf(doc, path)


# -- STL -------------------------------------------------------------------------------------

def write_stl(solid: Any, path: str | os.PathLike[str], linear_tolerance: float = 0.01,
              angular_tolerance: float = 5.0) -> Path:
    """Mesh a solid and write it as binary STL (mm).

    Parameters
    ----------
    solid : OCP shape or cadquery object
        The solid.
    path : str or os.PathLike
        The ``.stl`` file.
    linear_tolerance : float
        Largest distance of the mesh from the surface (absolute), mm.
    angular_tolerance : float
        Largest angle between neighbouring facet normals, degrees.

    Returns
    -------
    pathlib.Path

    Raises
    ------
    InputError
        Tolerances not positive.
    ExportError
        The file could not be written.
    """
    from OCP.BRepMesh import BRepMesh_IncrementalMesh
    from OCP.StlAPI import StlAPI_Writer

    if not (math.isfinite(linear_tolerance) and linear_tolerance > 0):
        raise InputError(f"STL linear tolerance must be greater than 0 mm, got {linear_tolerance!r}")
    if not (math.isfinite(angular_tolerance) and 0 < angular_tolerance < 180):
        raise InputError(f"STL angular tolerance must be between 0 and 180 degrees, got {angular_tolerance!r}")
    shape = _shape(solid)
    target = Path(path)
    with atomic_path(target) as tmp, kernel_quiet():
        BRepMesh_IncrementalMesh(shape, float(linear_tolerance), False, math.radians(angular_tolerance), True)
        writer = StlAPI_Writer()
        writer.ASCIIMode = False
        if not writer.Write(shape, str(tmp)):
            raise ExportError(f"cannot write {target}: the STL writer failed (no triangulation?)")
    return target
