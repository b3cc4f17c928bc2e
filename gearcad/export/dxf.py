"""DXF drawings for laser cutters and CNC routers, written with ezdxf.

Machine software reads lines and circular arcs reliably and splines often not,
so every contour is one closed polyline whose segments are straight or circular
(DXF *bulge*: ``tan(included angle / 4)``, positive for counter-clockwise arcs).
The writer only writes: contours arrive already fitted (see
:class:`CutDrawing`), the writer never computes gear geometry.

In the spline mode contours are cubic B-splines (``SPLINE`` with control
points and knots, fitted in :mod:`gearcad.geometry.bspline`) and straight
edges are ``LINE`` entities.

Laser order: entities are written marking first, then inner cuts (holes), then
outer contours, so a cutter that follows the file's order never cuts a part
free before its holes.  ``$EXTMIN``/``$EXTMAX`` hold the bounding box of the
cut geometry.

Versions: R2010 by default (closed LWPOLYLINE, ``$INSUNITS`` = 4 mm,
``$MEASUREMENT`` = 1 metric).  R12 for old controllers has no LWPOLYLINE and no
SPLINE: contours become closed 2D POLYLINEs with bulges.  R12 defines no
drawing-unit variable; the file says millimetres in the ways R12 has:
``$LUNITS`` = 2 (decimal, not the inch-based engineering or architectural
formats), ``$LIMMIN``/``$LIMMAX`` round the drawing, and the later
``$INSUNITS`` = 4 and ``$MEASUREMENT`` = 1 written into the header too: header
variables are read by name, R12 readers skip the ones they do not know, and
importers that look for them (whatever the file's version) take millimetres
instead of their inch default.  The writer still warns that an R12 reader may
have to be told the unit.

Output is deterministic: the same input gives byte-identical files.  ezdxf's
option ``write_fixed_meta_data_for_testing`` is switched on while a document is
created and written (then restored); it fixes ``$TDCREATE``, ``$TDUPDATE``,
``$VERSIONGUID``, ``$FINGERPRINTGUID`` and the ezdxf marker, and handles are
numbered in creation order.  Lengths in mm.
"""

from __future__ import annotations

import io
import os
from collections.abc import Iterator, Mapping
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING

import numpy as np

from ..errors import ExportError, InputError
from .neutral import CutDrawing, Label, MIN_SEGMENT, drawing_extents, polyline_contour
from .atomic import atomic_write

if TYPE_CHECKING:
    from ezdxf.document import Drawing

__all__ = [
    "Label",
    "Layer",
    "CutDrawing",
    "DEFAULT_LAYERS",
    "DXF_VERSIONS",
    "MIN_SEGMENT",
    "polyline_contour",
    "resolve_layers",
    "build_dxf",
    "write_dxf",
    "dxf_warnings",
]

R12_NO_UNITS = ("DXF R12 defines no drawing-unit setting (the file is marked as millimetres in the ways R12 allows): "
                "check that the reading program takes it as millimetres")


# -- layers --------------------------------------------------------------------------

@dataclass(frozen=True)
class Layer:
    """A DXF layer: name and AutoCAD Color Index (1 to 255)."""

    name: str
    colour: int


DEFAULT_LAYERS: Mapping[str, Layer] = MappingProxyType({
    "outer": Layer("CUT_OUTER", 5),  # blue
    "inner": Layer("CUT_INNER", 6),  # magenta
    "marking": Layer("MARKING", 3),  # green
})


def _layer(role: str, value: Layer | tuple[str, int]) -> Layer:
    from ezdxf.lldxf.validator import is_valid_layer_name

    layer = value if isinstance(value, Layer) else Layer(*value)
    if not isinstance(layer.name, str) or not is_valid_layer_name(layer.name) or layer.name == "0":
        raise InputError(f"layer for {role!r}: {layer.name!r} is not a usable DXF layer name")
    if not isinstance(layer.colour, int) or not 1 <= layer.colour <= 255:
        raise InputError(f"layer for {role!r}: colour must be an AutoCAD Color Index from 1 to 255, got {layer.colour!r}")
    return layer


def resolve_layers(layers: Mapping[str, Layer | tuple[str, int]] | None = None) -> dict[str, Layer]:
    """The default layers with the caller's remapping applied.

    Parameters
    ----------
    layers : mapping, optional
        Role (``"outer"``, ``"inner"``, ``"marking"``) to :class:`Layer` or
        ``(name, colour)``; roles not given keep their default.

    Returns
    -------
    dict
        Role to :class:`Layer`.

    Raises
    ------
    InputError
        Unknown role, invalid name or colour, or the marking layer sharing a
        name with a cut layer (text must never land on a cut layer).
    """
    given = dict(layers or {})
    unknown = sorted(set(given) - set(DEFAULT_LAYERS))
    if unknown:
        raise InputError(f"unknown layer role(s) {unknown}; the roles are {sorted(DEFAULT_LAYERS)}")
    result = {role: _layer(role, given.get(role, default)) for role, default in DEFAULT_LAYERS.items()}
    marking = result["marking"].name.upper()
    if marking in (result["outer"].name.upper(), result["inner"].name.upper()):
        raise InputError(f"the marking layer {result['marking'].name!r} must differ from the cut layers")
    cut = {result["outer"].name.upper(): result["outer"], result["inner"].name.upper(): result["inner"]}
    if len(cut) == 1 and result["outer"].colour != result["inner"].colour:
        raise InputError(f"outer and inner share layer {result['outer'].name!r} but give it two colours")
    return result


# -- versions -------------------------------------------------------------------------

@dataclass(frozen=True)
class _Version:
    """How one DXF version is written."""

    code: str
    units: bool  # defines $INSUNITS / $MEASUREMENT
    lwpolyline: bool  # has LWPOLYLINE (else POLYLINE)
    splines: bool  # has SPLINE


DXF_VERSIONS: Mapping[str, _Version] = MappingProxyType({
    "R12": _Version("AC1009", units=False, lwpolyline=False, splines=False),
    "R2000": _Version("AC1015", units=True, lwpolyline=True, splines=True),
    "R2010": _Version("AC1024", units=True, lwpolyline=True, splines=True),
    "R2013": _Version("AC1027", units=True, lwpolyline=True, splines=True),
    "R2018": _Version("AC1032", units=True, lwpolyline=True, splines=True),
})


def _version(name: str) -> _Version:
    try:
        return DXF_VERSIONS[name]
    except KeyError:
        raise InputError(f"DXF version {name!r} is not offered; choose one of {', '.join(DXF_VERSIONS)}") from None


def dxf_warnings(version: str) -> tuple[str, ...]:
    """Warnings that come with writing ``version`` (one line each)."""
    return () if _version(version).units else (R12_NO_UNITS,)


@contextmanager
def _fixed_metadata() -> Iterator[None]:
    """Switch on ezdxf's fixed dates, GUIDs and marker for the duration."""
    import ezdxf

    before = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    try:
        yield
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = before


# -- building -------------------------------------------------------------------------

def _new_document(version: _Version) -> "Drawing":
    import ezdxf
    from ezdxf.document import Drawing

    if not version.units:
        doc = Drawing.new(version.code)  # ezdxf.new would warn that R12 has no units
    else:
        doc = ezdxf.new(version.code, units=4)  # 4: millimetres
    doc.header["$INSUNITS"] = 4  # millimetres (R2000 on; R12 readers skip it)
    doc.header["$MEASUREMENT"] = 1  # metric (R14 on; R12 readers skip it)
    doc.header["$LUNITS"] = 2  # decimal linear units (R12's only unit-related setting)
    return doc


def _add_layers(doc: "Drawing", layers: Mapping[str, Layer]) -> None:
    for layer in layers.values():
        if layer.name not in doc.layers:
            doc.layers.add(layer.name, color=layer.colour)


def _add_contour(msp, contour: np.ndarray, layer: str, version: _Version) -> None:
    rows = contour.tolist()
    if version.lwpolyline:
        msp.add_lwpolyline(rows, format="xyb", close=True, dxfattribs={"layer": layer})
    else:
        msp.add_polyline2d(rows, format="xyb", close=True, dxfattribs={"layer": layer})


def _add_spline_contour(msp, pieces, layer: str) -> None:
    """Lines as LINE, B-splines as SPLINE with control points and knots (degree 3, planar, closed flag if whole)."""
    from .neutral import LinePiece

    for piece in pieces:
        attribs = {"layer": layer}
        if isinstance(piece, LinePiece):
            msp.add_line(tuple(piece.start), tuple(piece.end), dxfattribs=attribs)
            continue
        spline = msp.add_spline(dxfattribs={**attribs, "degree": 3})
        spline.control_points = piece.control.tolist()
        spline.knots = piece.knots.tolist()
        spline.dxf.flags = spline.PLANAR | (spline.CLOSED if piece.closed else 0)


def _add_label(msp, label: Label, layer: str) -> None:
    """Left-aligned on the baseline: the insert point alone places it (no alignment point)."""
    msp.add_text(label.text, height=label.height, dxfattribs={"layer": layer, "insert": (label.x, label.y)})


def _set_extents(doc: "Drawing", drawing: CutDrawing) -> None:
    """$EXTMIN/$EXTMAX and the drawing limits $LIMMIN/$LIMMAX from the cut geometry.

    ezdxf copies the model space's own extents and limits into the header when it
    saves, so both are set.
    """
    x0, y0, x1, y1 = drawing_extents(drawing)
    msp = doc.modelspace()
    for target in (doc.header, None):
        if target is None:
            msp.dxf.extmin, msp.dxf.extmax = (x0, y0, 0.0), (x1, y1, 0.0)
            msp.dxf.limmin, msp.dxf.limmax = (x0, y0), (x1, y1)
        else:
            target["$EXTMIN"], target["$EXTMAX"] = (x0, y0, 0.0), (x1, y1, 0.0)
            target["$LIMMIN"], target["$LIMMAX"] = (x0, y0), (x1, y1)


def _fill(doc: "Drawing", drawing: CutDrawing, layers: Mapping[str, Layer], version: _Version) -> None:
    """Entities in laser order: marking, inner cuts, outer contours."""
    msp = doc.modelspace()
    outer, inner, marking = layers["outer"].name, layers["inner"].name, layers["marking"].name
    for label in drawing.labels:
        _add_label(msp, label, marking)
    for contour in drawing.inner:
        _add_contour(msp, contour, inner, version)
    for pieces in drawing.inner_splines:
        _add_spline_contour(msp, pieces, inner)
    for x, y, d in drawing.circles:
        msp.add_circle((x, y), d / 2, dxfattribs={"layer": inner})
    for contour in drawing.outer:
        _add_contour(msp, contour, outer, version)
    for pieces in drawing.outer_splines:
        _add_spline_contour(msp, pieces, outer)


def build_dxf(drawing: CutDrawing, *, version: str = "R2010",
              layers: Mapping[str, Layer | tuple[str, int]] | None = None) -> "Drawing":
    """The DXF document of ``drawing``, in memory.

    Parameters
    ----------
    drawing : CutDrawing
        Contours, circles and labels, mm.
    version : str
        A key of :data:`DXF_VERSIONS`; ``"R12"`` writes POLYLINE and no units.
    layers : mapping, optional
        Layer remapping, see :func:`resolve_layers`.

    Returns
    -------
    ezdxf.document.Drawing

    Raises
    ------
    InputError
        Unknown version or layer, or splines asked of R12.
    """
    ver = _version(version)
    if not ver.splines and (drawing.outer_splines or drawing.inner_splines):
        raise InputError(f"DXF {version} has no SPLINE entity; give the contours as bulge polylines")
    resolved = resolve_layers(layers)
    with _fixed_metadata():
        doc = _new_document(ver)
        _add_layers(doc, resolved)
        _fill(doc, drawing, resolved, ver)
        _set_extents(doc, drawing)
    return doc


_R12_UNIT_TAGS = "  9\n$INSUNITS\n 70\n4\n  9\n$MEASUREMENT\n 70\n1\n"  # millimetres; metric


def _with_r12_units(text: str) -> str:
    """An R12 file's text with ``$INSUNITS`` and ``$MEASUREMENT`` added before ``$LUNITS``."""
    mark = "  9\n$LUNITS\n"
    if mark not in text:
        raise ExportError("DXF R12 header without $LUNITS: cannot mark the file as millimetres")
    return text.replace(mark, _R12_UNIT_TAGS + mark, 1)


def _register_classes_in_order(doc: "Drawing") -> None:
    """Register the CLASSES of the entity types in use, sorted by name, before ezdxf does.

    ezdxf adds them while iterating over a set of type names, whose order
    changes with Python's per-process string hashing; classes already present
    keep their place, so registering them here first fixes the section's order.
    """
    if doc.dxfversion <= "AC1009":
        return  # R12 has no CLASSES section
    for name in sorted(doc.entitydb.dxf_types_in_use()):
        doc.classes.add_class(name)


def _version_name(doc: "Drawing") -> str:
    return next((name for name, v in DXF_VERSIONS.items() if v.code == doc.dxfversion), doc.dxfversion)


def write_dxf(source: "CutDrawing | Drawing", path: str | os.PathLike[str], *, version: str = "R2010",
              layers: Mapping[str, Layer | tuple[str, int]] | None = None) -> tuple[str, ...]:
    """Write a DXF file atomically.

    Parameters
    ----------
    source : CutDrawing or ezdxf.document.Drawing
        A drawing (built with ``version`` and ``layers``) or a document from
        :func:`build_dxf` (``version`` and ``layers`` then unused).
    path : str or os.PathLike
        The ``.dxf`` file to create or replace.
    version, layers
        See :func:`build_dxf`.

    Returns
    -------
    tuple of str
        Warnings for the user (for R12: the file carries no units).

    Raises
    ------
    ExportError
        The file could not be written.
    """
    doc = build_dxf(source, version=version, layers=layers) if isinstance(source, CutDrawing) else source

    def save(tmp: Path) -> None:
        _register_classes_in_order(doc)
        with _fixed_metadata():
            if doc.dxfversion > "AC1009":
                doc.saveas(tmp)
                return
            stream = io.StringIO()
            doc.write(stream)
        text = _with_r12_units(stream.getvalue())
        tmp.write_bytes(text.encode(doc.output_encoding, errors="dxfreplace"))

    atomic_write(path, save)
    name = _version_name(doc)
    return dxf_warnings(name) if name in DXF_VERSIONS else ()
