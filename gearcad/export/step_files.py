"""STEP AP214 files (single parts and assemblies, repeated solids placed once) and binary STL files.

The writers take solids built by :mod:`gearcad.export.step_solid` (or any OCP
shape); each file is written under a temporary name and renamed into place
(:mod:`gearcad.export.atomic`), and the STEP text is compacted by
:mod:`gearcad.export.step_compact`.  Lengths in mm, angles in degrees.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..errors import ExportError, InputError
from .atomic import atomic_path
from .step_compact import share_geometry
from .step_edges import kernel_quiet
from .step_solid import _shape

__all__ = ["AssemblyItem", "write_step", "write_stl", "assembly_step", "assembly_document"]

_FIXED_TIMESTAMP = "2000-01-01T00:00:00"  # STEP header time stamp, fixed so files are reproducible
_ORIGINATING_SYSTEM = "gearcad"


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
        _normals_from_vertices(Path(tmp))
    return target


def _normals_from_vertices(path: Path) -> None:
    """Make each facet's normal the one its stored (single-precision) vertices give by the right-hand rule.

    The kernel's writer takes normals from the exact triangles; on micrometre facets (a tight fillet turn)
    rounding the vertices to single precision turns them enough that mesh checkers re-derive ("fix") them.
    The binary STL layout: 80-byte header, uint32 count, then per facet 12 float32 and a uint16 (the STL
    format's own definition, from memory).
    """
    import numpy as np

    data = bytearray(path.read_bytes())
    count = int.from_bytes(data[80:84], "little")
    facet = np.dtype([("normal", "<f4", (3,)), ("vertices", "<f4", (3, 3)), ("attribute", "<u2")])
    if len(data) != 84 + count * facet.itemsize:
        raise ExportError(f"cannot write {path.name}: the STL writer left {len(data)} bytes for {count} facets")
    facets = np.frombuffer(data, dtype=facet, count=count, offset=84).copy()
    v = facets["vertices"].astype(np.float64)
    normal = np.cross(v[:, 1] - v[:, 0], v[:, 2] - v[:, 0])
    length = np.linalg.norm(normal, axis=1)
    facets["normal"] = np.where(length[:, None] > 0, normal / np.where(length > 0, length, 1.0)[:, None], 0.0)
    path.write_bytes(bytes(data[:84]) + facets.tobytes())
