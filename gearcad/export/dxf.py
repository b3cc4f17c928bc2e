"""DXF drawings for laser cutters and CNC routers, written with ezdxf.

Machine software reads lines and circular arcs reliably and splines often not,
so every contour is one closed polyline whose segments are straight or circular
(DXF *bulge*: ``tan(included angle / 4)``, positive for counter-clockwise arcs).
The writer only writes: contours arrive already fitted (see
:class:`CutDrawing`), the writer never computes gear geometry.

Versions: R2010 by default (closed LWPOLYLINE, ``$INSUNITS`` = 4 mm,
``$MEASUREMENT`` = 1 metric).  R12 for old controllers has no LWPOLYLINE, no
SPLINE and no units: contours become closed 2D POLYLINEs with bulges and the
writer reports that the file carries no units.

Output is deterministic: the same input gives byte-identical files.  ezdxf's
option ``write_fixed_meta_data_for_testing`` is switched on while a document is
created and written (then restored); it fixes ``$TDCREATE``, ``$TDUPDATE``,
``$VERSIONGUID``, ``$FINGERPRINTGUID`` and the ezdxf marker, and handles are
numbered in creation order.  Lengths in mm.
"""

from __future__ import annotations

import math
import os
from collections.abc import Iterator, Mapping
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING

import numpy as np

from ..errors import InputError
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

MIN_SEGMENT = 1e-9  # mm: shorter segments count as a repeated vertex

R12_NO_UNITS = "DXF R12 carries no drawing units: the reading program must be told the file is in millimetres"


# -- the neutral input --------------------------------------------------------------

@dataclass(frozen=True)
class Label:
    """One line of marking text.

    Attributes
    ----------
    text : str
        The text, one line.
    x, y : float
        Centre of the text (middle of its height and width), mm.
    height : float
        Capital height, mm.
    """

    text: str
    x: float
    y: float
    height: float

    def __post_init__(self) -> None:
        if not self.text or any(c in self.text for c in "\r\n"):
            raise InputError(f"label text must be one non-empty line, got {self.text!r}")
        if not all(math.isfinite(v) for v in (self.x, self.y, self.height)):
            raise InputError(f"label {self.text!r}: position and height must be finite numbers (mm)")
        if self.height <= 0:
            raise InputError(f"label {self.text!r}: height must be greater than 0 mm, got {self.height!r}")


def _frozen(array: np.ndarray) -> np.ndarray:
    array.setflags(write=False)
    return array


def _check_vertices(xy: np.ndarray, what: str) -> None:
    """Reject non-finite values and repeated neighbours (closing pair included)."""
    if not np.isfinite(xy).all():
        raise InputError(f"{what}: coordinates must be finite numbers (mm)")
    gaps = np.hypot(*(np.roll(xy, -1, axis=0) - xy).T)
    bad = np.flatnonzero(gaps <= MIN_SEGMENT)
    if bad.size:
        k = int(bad[0])
        raise InputError(f"{what}: vertices {k} and {(k + 1) % len(xy)} coincide "
                         "(a closed contour lists each vertex once, the first is not repeated at the end)")


def _contour(data: object, what: str) -> np.ndarray:
    """An (N, 3) read-only copy of ``x, y, bulge`` rows, checked."""
    arr = np.array(data, dtype=float)
    if arr.ndim != 2 or arr.shape[1] != 3 or len(arr) < 2:
        raise InputError(f"{what}: expected (N, 3) rows of x, y, bulge with N >= 2, got shape {arr.shape}")
    if len(arr) == 2 and not np.all(arr[:, 2]):
        raise InputError(f"{what}: a straight-sided contour needs at least 3 vertices")
    if not np.isfinite(arr[:, 2]).all():
        raise InputError(f"{what}: bulges must be finite numbers")
    _check_vertices(arr[:, :2], what)
    return _frozen(arr)


def _fit_points(data: object, what: str) -> np.ndarray:
    """An (N, 2) read-only copy of spline fit points, checked."""
    arr = np.array(data, dtype=float)
    if arr.ndim != 2 or arr.shape[1] != 2 or len(arr) < 3:
        raise InputError(f"{what}: expected (N, 2) fit points with N >= 3, got shape {arr.shape}")
    _check_vertices(arr, what)
    return _frozen(arr)


def _circle(data: object, k: int) -> tuple[float, float, float]:
    try:
        x, y, d = (float(v) for v in data)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise InputError(f"circle {k}: expected (x, y, diameter) in mm, got {data!r}") from None
    if not all(math.isfinite(v) for v in (x, y, d)) or d <= 0:
        raise InputError(f"circle {k}: needs finite x, y and a diameter greater than 0 mm, got {data!r}")
    return (x, y, d)


@dataclass(frozen=True)
class CutDrawing:
    """What a cut file holds, in the form the writers take it (mm).

    Attributes
    ----------
    outer : tuple of numpy.ndarray
        Outer contours, each (N, 3) rows ``x, y, bulge``: segment ``i`` runs from
        vertex ``i`` to ``i + 1`` and the last closes to the first; the first
        vertex is not repeated.  Bulge is ``tan(included angle / 4)``, positive
        for a counter-clockwise arc, 0 for a straight segment.
    inner : tuple of numpy.ndarray
        Inner contours (holes that are not plain circles), same form.
    circles : tuple of (x, y, diameter)
        Round holes, mm.
    outer_splines, inner_splines : tuple of numpy.ndarray
        Contours given as (N, 2) spline fit points instead (first point not
        repeated), for the SPLINE mode; R2000 and later only.
    labels : tuple of Label
        Marking texts.
    """

    outer: tuple[np.ndarray, ...] = ()
    inner: tuple[np.ndarray, ...] = ()
    circles: tuple[tuple[float, float, float], ...] = ()
    outer_splines: tuple[np.ndarray, ...] = ()
    inner_splines: tuple[np.ndarray, ...] = ()
    labels: tuple[Label, ...] = ()

    def __post_init__(self) -> None:
        put = object.__setattr__
        put(self, "outer", tuple(_contour(c, f"outer contour {k}") for k, c in enumerate(self.outer)))
        put(self, "inner", tuple(_contour(c, f"inner contour {k}") for k, c in enumerate(self.inner)))
        put(self, "circles", tuple(_circle(c, k) for k, c in enumerate(self.circles)))
        put(self, "outer_splines", tuple(_fit_points(c, f"outer spline {k}") for k, c in enumerate(self.outer_splines)))
        put(self, "inner_splines", tuple(_fit_points(c, f"inner spline {k}") for k, c in enumerate(self.inner_splines)))
        put(self, "labels", tuple(self.labels))
        if not (self.outer or self.inner or self.circles or self.outer_splines or self.inner_splines):
            raise InputError("a cut drawing needs at least one contour or circle")


def polyline_contour(points: np.ndarray) -> np.ndarray:
    """A straight-segment contour: (N, 2) vertices mm with bulge 0 appended.

    Parameters
    ----------
    points : numpy.ndarray
        (N, 2) vertices of a closed polyline, first not repeated at the end, mm.

    Returns
    -------
    numpy.ndarray
        (N, 3) rows ``x, y, 0``.
    """
    pts = np.asarray(points, dtype=float)
    return np.column_stack((pts, np.zeros(len(pts))))


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
    units: bool  # carries $INSUNITS / $MEASUREMENT
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
        return Drawing.new(version.code)  # R12 has no units to set (ezdxf.new would warn)
    doc = ezdxf.new(version.code, units=4)  # 4: millimetres
    doc.header["$INSUNITS"] = 4
    doc.header["$MEASUREMENT"] = 1  # metric
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


def _add_spline(msp, fit: np.ndarray, layer: str) -> None:
    """Fit points with the first repeated at the end, so every reader closes the curve."""
    points = np.vstack((fit, fit[:1])).tolist()
    msp.add_spline(points, dxfattribs={"layer": layer})


def _add_label(msp, label: Label, layer: str) -> None:
    from ezdxf.enums import TextEntityAlignment

    text = msp.add_text(label.text, height=label.height, dxfattribs={"layer": layer})
    text.set_placement((label.x, label.y), align=TextEntityAlignment.MIDDLE_CENTER)


def _set_extents(doc: "Drawing") -> None:
    from ezdxf import bbox

    msp = doc.modelspace()
    box = bbox.extents(msp, fast=True)
    if box.has_data:
        msp.dxf.extmin, msp.dxf.extmax = box.extmin, box.extmax


def _fill(doc: "Drawing", drawing: CutDrawing, layers: Mapping[str, Layer], version: _Version) -> None:
    msp = doc.modelspace()
    outer, inner, marking = layers["outer"].name, layers["inner"].name, layers["marking"].name
    for contour in drawing.outer:
        _add_contour(msp, contour, outer, version)
    for contour in drawing.inner:
        _add_contour(msp, contour, inner, version)
    for x, y, d in drawing.circles:
        msp.add_circle((x, y), d / 2, dxfattribs={"layer": inner})
    for fit in drawing.outer_splines:
        _add_spline(msp, fit, outer)
    for fit in drawing.inner_splines:
        _add_spline(msp, fit, inner)
    for label in drawing.labels:
        _add_label(msp, label, marking)


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
        _set_extents(doc)
    return doc


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
        with _fixed_metadata():
            doc.saveas(tmp)

    atomic_write(path, save)
    name = _version_name(doc)
    return dxf_warnings(name) if name in DXF_VERSIONS else ()
