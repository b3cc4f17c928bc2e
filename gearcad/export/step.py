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
    "helical_solid",
    "HELICAL_VOLUME_TOLERANCE",
    "fuse_placed",
    "tube_solid",
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


def tube_solid(diameter: float, bore: float, length: float) -> Any:
    """An exact cylinder (``bore`` 0) or tube along +z from z = 0, mm: shafts, pipes, spacers, pillars, screws."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder

    if not (diameter > bore >= 0 and length > 0):
        raise InputError(f"a tube needs diameter > bore >= 0 and length > 0 mm, got {diameter!r}, {bore!r}, {length!r}")
    with kernel_quiet():
        shape = BRepPrimAPI_MakeCylinder(diameter / 2, length).Shape()
        if bore > 0:
            shape = BRepAlgoAPI_Cut(shape, BRepPrimAPI_MakeCylinder(bore / 2, length).Shape()).Shape()
    return shape


def fuse_placed(items: Sequence["AssemblyItem"], x: float, y: float, hub_z: float, hub_length: float, hub_diameter: float,
                hole: float, tolerance: float) -> Any:
    """One solid of placed parts (a compound pair) and a hub (``hub_diameter`` with a ``hole`` bore, mm) between them.

    The result sits in the part's own frame: the axis at (0, 0), the lowest face at z = 0.
    """
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec

    low = min(it.z for it in items)
    shapes = []
    for it in items:
        turn, move = gp_Trsf(), gp_Trsf()
        turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), math.radians(it.rotation_deg))
        move.SetTranslation(gp_Vec(0.0, 0.0, float(it.z - low)))
        shapes.append(BRepBuilderAPI_Transform(_shape(it.solid), move.Multiplied(turn), True).Shape())
    if hub_length > 1e-9:
        move = gp_Trsf()
        move.SetTranslation(gp_Vec(0.0, 0.0, float(hub_z - low)))
        shapes.append(BRepBuilderAPI_Transform(tube_solid(hub_diameter, hole, hub_length), move, True).Shape())
    with kernel_quiet():
        fused = shapes[0]
        for other in shapes[1:]:
            fused = BRepAlgoAPI_Fuse(fused, other).Shape()
    return fused


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


# -- helical and herringbone solids ---------------------------------------------------------------

HELICAL_VOLUME_TOLERANCE = 1e-6  # relative: a swept solid's volume against the transverse area x face width


def _adaptive_volume(shape: "TopoDS_Shape") -> float:
    """Kernel volume by adaptive integration (relative error 1e-10), mm³."""
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props, 1e-10, False)
    return props.Mass()


def _adaptive_area(face: "TopoDS_Face") -> float:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.SurfaceProperties_s(face, props, 1e-12)
    return props.Mass()


def _placed(shape: "TopoDS_Shape", turn: float = 0.0, z: float = 0.0) -> "TopoDS_Shape":
    """``shape`` turned by ``turn`` radians about the z axis, then moved up by ``z`` mm."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec

    move = gp_Trsf()
    move.SetTranslation(gp_Vec(0.0, 0.0, float(z)))
    rot = gp_Trsf()
    rot.SetRotation(gp_Ax1(gp_Pnt(0.0, 0.0, 0.0), gp_Dir(0.0, 0.0, 1.0)), float(turn))
    move.Multiply(rot)
    return BRepBuilderAPI_Transform(shape, move, True).Shape()


def _twisted(wire: "TopoDS_Wire", z0: float, length: float, start_turn: float, twist: float) -> "TopoDS_Shape":
    """The solid swept by ``wire`` (in z = 0) turned by ``start_turn`` and lifted to ``z0``, rising ``length`` mm
    while it turns by ``twist`` radians (positive counter-clockwise seen from +z): a pipe shell along the axis
    steered by an auxiliary helix, the exact screw motion."""
    import cadquery as cq
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.BRepOffsetAPI import BRepOffsetAPI_MakePipeShell
    from OCP.gp import gp_Pnt
    from OCP.TopoDS import TopoDS

    placed = TopoDS.Wire_s(_placed(wire, start_turn, z0))
    spine = BRepBuilderAPI_MakeWire(BRepBuilderAPI_MakeEdge(gp_Pnt(0.0, 0.0, z0), gp_Pnt(0.0, 0.0, z0 + length)).Edge()).Wire()
    pitch = 2 * math.pi * length / abs(twist)
    helix = cq.Wire.makeHelix(pitch, length, 1.0, center=cq.Vector(0.0, 0.0, z0), lefthand=twist < 0).wrapped
    shell = BRepOffsetAPI_MakePipeShell(spine)
    shell.SetMode(helix, False)
    shell.Add(placed)
    shell.SetTolerance(1e-7, 1e-7, 1e-6)
    shell.Build()
    if not shell.IsDone() or not shell.MakeSolid():
        raise GeometryError("the kernel could not sweep the outline along the helix")
    return shell.Shape()


def helical_solid(part: "Part", thickness: float, twist: float, tolerance: float, *, herringbone: bool = False,
                  gap: float = 0.0, gap_diameter: float = 0.0, twist_holes: bool = False) -> SolidBuild:
    """A helical or herringbone gear: the outer loop swept along the helix, holes straight through.

    The part's outer loop is the transverse section at mid-face (z = thickness / 2), so
    gears phased in the flat plan stay phased in mesh at mid-face.  A single helix turns
    the section by ``twist`` over the face (``b tan(beta) / r``, positive for a right
    hand: counter-clockwise seen from +z as z grows): the face at z = 0 is the section
    turned by ``-twist / 2``, the face at z = thickness by ``+twist / 2``.  A herringbone
    is two halves of opposite hand, each ``(thickness - gap) / 2`` long and turning at the
    same rate, meeting mid-face (where the section is the given one); a gap between them
    is a disc of ``gap_diameter`` (at most the root diameter).  Holes and round holes
    are cut straight through.  The solid is checked with OCP's BRepCheck and its volume
    against the transverse area times the face width (relative 1e-6).

    Parameters
    ----------
    part : Part
        Transverse section at mid-face, mm.
    thickness : float
        Face width, mm.
    twist : float
        Turn of a single helix over the whole face width, radians (signed by the hand).
    tolerance : float
        Largest distance of a given curve point from its B-spline edge, mm.
    herringbone : bool
        Two halves of opposite hand (the lower half turns with ``twist``'s sign).
    gap, gap_diameter : float
        Herringbone: the gap's length along the axis and the diameter of the disc filling it, mm.
    twist_holes : bool
        A ring gear: its teeth are the part's hole loops, which are swept along the helix (the gap of a
        herringbone ring is a disc of ``gap_diameter`` removed); the outer loop and round holes stay straight.
    """
    if twist_holes:
        return _helical_ring_solid(part, thickness, twist, tolerance, herringbone, gap, gap_diameter)
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut, BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder, BRepPrimAPI_MakePrism
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt, gp_Vec

    _check_inputs(part, thickness, tolerance)
    if not (math.isfinite(twist) and 0 < abs(twist) < 2 * math.pi):
        raise InputError(f"helix twist over the face must be above 0 and below one turn, got {twist!r} rad")
    if herringbone and not (math.isfinite(gap) and 0 <= gap < thickness):
        raise InputError(f"herringbone gap must be from 0 to below the face width {thickness:g} mm, got {gap!r}")
    if herringbone and gap > 0 and not (math.isfinite(gap_diameter) and gap_diameter > 0):
        raise InputError(f"herringbone gap needs a disc diameter above 0 mm, got {gap_diameter!r}")
    stats = _Stats()
    rate = twist / thickness
    with kernel_quiet():
        wire = _loop_wire(part.outer, tolerance, stats, f"{part.name} outer")
        area = _adaptive_area(BRepBuilderAPI_MakeFace(wire, True).Face())
        if not herringbone:
            shape = _twisted(wire, 0.0, thickness, -twist / 2, twist)
            expected = area * thickness
        else:
            half = (thickness - gap) / 2
            lower = _twisted(wire, 0.0, half, -rate * half, rate * half)
            upper = _twisted(wire, half + gap, half, 0.0, -rate * half)
            shape = BRepAlgoAPI_Fuse(lower, upper).Shape()
            expected = 2 * area * half
            if gap > 0:
                disc = BRepPrimAPI_MakeCylinder(gp_Ax2(gp_Pnt(0.0, 0.0, half), gp_Dir(0.0, 0.0, 1.0)), gap_diameter / 2, gap).Shape()
                shape = BRepAlgoAPI_Fuse(shape, disc).Shape()
                expected += math.pi * gap_diameter ** 2 / 4 * gap
        for k, hole in enumerate(part.holes):  # straight through: a bore is not twisted
            hole_face = BRepBuilderAPI_MakeFace(_loop_wire(hole, tolerance, stats, f"{part.name} hole {k}"), True).Face()
            hole_area = abs(_adaptive_area(hole_face))
            prism = BRepPrimAPI_MakePrism(hole_face, gp_Vec(0.0, 0.0, float(thickness))).Shape()
            shape = BRepAlgoAPI_Cut(shape, prism).Shape()
            expected -= hole_area * thickness
        for x, y, d in part.circles:
            axis = gp_Ax2(gp_Pnt(float(x), float(y), 0.0), gp_Dir(0.0, 0.0, 1.0))
            shape = BRepAlgoAPI_Cut(shape, BRepPrimAPI_MakeCylinder(axis, d / 2, float(thickness)).Shape()).Shape()
            expected -= math.pi * d * d / 4 * thickness
    return _checked_helical(shape, part.name, expected, stats, "helical solid", "the transverse area x face width")


def _helical_ring_solid(part: "Part", thickness: float, twist: float, tolerance: float, herringbone: bool,
                        gap: float, gap_diameter: float) -> SolidBuild:
    """A helical ring: the straight blank less its tooth loops swept along the helix (see :func:`helical_solid`)."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut, BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder, BRepPrimAPI_MakePrism
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt, gp_Vec

    from ..geometry.shape import Part as _Part

    _check_inputs(part, thickness, tolerance)
    if not (math.isfinite(twist) and 0 < abs(twist) < 2 * math.pi):
        raise InputError(f"helix twist over the face must be above 0 and below one turn, got {twist!r} rad")
    if herringbone and not (math.isfinite(gap) and 0 <= gap < thickness):
        raise InputError(f"herringbone gap must be from 0 to below the face width {thickness:g} mm, got {gap!r}")
    stats = _Stats()
    rate = twist / thickness
    with kernel_quiet():
        blank = _face(_Part(part.name, part.outer, (), part.circles), tolerance, stats)
        expected = _adaptive_area(blank) * thickness
        shape = BRepPrimAPI_MakePrism(blank, gp_Vec(0.0, 0.0, float(thickness))).Shape()
        for k, hole in enumerate(part.holes):
            wire = _loop_wire(hole.reversed(), tolerance, stats, f"{part.name} hole {k}")
            area = abs(_adaptive_area(BRepBuilderAPI_MakeFace(wire, True).Face()))
            if not herringbone:
                cutter = _twisted(wire, 0.0, thickness, -twist / 2, twist)
                expected -= area * thickness
            else:
                half = (thickness - gap) / 2
                cutter = BRepAlgoAPI_Fuse(_twisted(wire, 0.0, half, -rate * half, rate * half),
                                          _twisted(wire, half + gap, half, 0.0, -rate * half)).Shape()
                expected -= 2 * area * half
                if gap > 0:
                    axis = gp_Ax2(gp_Pnt(0.0, 0.0, half), gp_Dir(0.0, 0.0, 1.0))
                    cutter = BRepAlgoAPI_Fuse(cutter, BRepPrimAPI_MakeCylinder(axis, gap_diameter / 2, gap).Shape()).Shape()
                    expected -= math.pi * gap_diameter ** 2 / 4 * gap
            shape = BRepAlgoAPI_Cut(shape, cutter).Shape()
    return _checked_helical(shape, part.name, expected, stats, "helical ring",
                            "the blank less the transverse tooth area x face width")


def _checked_helical(shape: Any, name: str, expected: float, stats: "_Stats", what: str, reference: str) -> SolidBuild:
    """A swept helical shape unified, checked valid by BRepCheck and its volume against ``expected`` (mm³)."""
    from OCP.BRepCheck import BRepCheck_Analyzer
    from OCP.ShapeUpgrade import ShapeUpgrade_UnifySameDomain

    with kernel_quiet():
        unify = ShapeUpgrade_UnifySameDomain(shape, True, True, False)
        unify.Build()
        shape = unify.Shape()
        if not BRepCheck_Analyzer(shape).IsValid():
            raise GeometryError(f"part {name!r}: the kernel rejects the {what} as invalid")
        volume = _adaptive_volume(shape)
    if abs(volume - expected) > HELICAL_VOLUME_TOLERANCE * expected:
        raise GeometryError(f"part {name!r}: {what} volume {volume:.9g} mm³ differs from {reference} "
                            f"{expected:.9g} mm³ by more than {HELICAL_VOLUME_TOLERANCE:g}")
    return SolidBuild(shape, stats.splines, stats.poles, stats.worst, volume)
