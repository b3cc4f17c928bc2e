"""File writers: DXF and SVG for cutting, STEP and STL for CAD and printing.

Writers only write what they are given (no gear geometry is computed here)
and every file is written atomically (:mod:`gearcad.export.atomic`).  The
kernel-backed writers live in :mod:`gearcad.export.step`, which imports the
CAD kernel only when a solid is built or written.

Dispatch on the file type is by table, keyed by the lower-case suffix:
:data:`DRAWING_WRITERS` for cut drawings, :data:`SOLID_WRITERS` for solids.
Lengths in mm.

Names load on first use (PEP 562): ``gearcad ratio --json`` takes
:mod:`gearcad.export.jsonable` without loading the drawing writers (numpy).
"""

from __future__ import annotations

from ..lazy import lazy_names

_HOMES = {"CutDrawing": "dxf", "Label": "dxf", "Layer": "dxf", "build_dxf": "dxf", "polyline_contour": "dxf",
          "write_dxf": "dxf", "build_svg": "svg", "write_svg": "svg", "atomic_path": "atomic", "atomic_write": "atomic",
          "DRAWING_WRITERS": "writers", "SOLID_WRITERS": "writers", "write_drawing": "writers", "write_solid": "writers"}

__all__ = ["CutDrawing", "Label", "Layer", "atomic_path", "atomic_write", "build_dxf", "build_svg", "polyline_contour",
           "write_dxf", "write_svg", "DRAWING_WRITERS", "SOLID_WRITERS", "write_drawing", "write_solid"]

__getattr__, __dir__ = lazy_names(__name__, _HOMES, __all__)
