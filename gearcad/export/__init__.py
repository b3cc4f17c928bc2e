"""File writers: DXF and SVG for cutting, STEP and STL for CAD and printing.

Writers only write what they are given (no gear geometry is computed here)
and every file is written atomically (:mod:`gearcad.export.atomic`).  The
kernel-backed writers live in :mod:`gearcad.export.step`, which imports the
CAD kernel only when a solid is built or written.

Dispatch on the file type is by table, keyed by the lower-case suffix:
:data:`DRAWING_WRITERS` for cut drawings, :data:`SOLID_WRITERS` for solids.
Lengths in mm.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Mapping
from pathlib import Path
from types import MappingProxyType
from typing import Any

from ..errors import InputError
from .atomic import atomic_path, atomic_write
from .dxf import CutDrawing, Label, Layer, build_dxf, polyline_contour, write_dxf
from .svg import build_svg, write_svg

__all__ = [
    "CutDrawing",
    "Label",
    "Layer",
    "atomic_path",
    "atomic_write",
    "build_dxf",
    "build_svg",
    "polyline_contour",
    "write_dxf",
    "write_svg",
    "DRAWING_WRITERS",
    "SOLID_WRITERS",
    "write_drawing",
    "write_solid",
]


def _step(solid: Any, path: Path, **options: Any) -> Any:
    from .step import write_step

    return write_step(solid, path, **options)


def _stl(solid: Any, path: Path, **options: Any) -> Any:
    from .step import write_stl

    return write_stl(solid, path, **options)


DRAWING_WRITERS: Mapping[str, Callable[..., Any]] = MappingProxyType({
    ".dxf": write_dxf,
    ".svg": write_svg,
})

SOLID_WRITERS: Mapping[str, Callable[..., Any]] = MappingProxyType({
    ".step": _step,
    ".stp": _step,
    ".stl": _stl,
})


def _writer(table: Mapping[str, Callable[..., Any]], path: Path, what: str) -> Callable[..., Any]:
    try:
        return table[path.suffix.lower()]
    except KeyError:
        raise InputError(f"cannot write {what} to {path}: the file name must end in "
                         f"{', '.join(sorted(table))}") from None


def write_drawing(drawing: CutDrawing, path: str | os.PathLike[str], **options: Any) -> Any:
    """Write a cut drawing; the writer is chosen by the suffix of ``path`` (``.dxf``, ``.svg``).

    ``options`` go to :func:`~gearcad.export.dxf.write_dxf` or
    :func:`~gearcad.export.svg.write_svg`; the writer's result is returned.
    """
    target = Path(path)
    return _writer(DRAWING_WRITERS, target, "a drawing")(drawing, target, **options)


def write_solid(solid: Any, path: str | os.PathLike[str], **options: Any) -> Any:
    """Write a solid; the writer is chosen by the suffix of ``path`` (``.step``, ``.stp``, ``.stl``).

    ``options`` go to :func:`~gearcad.export.step.write_step` or
    :func:`~gearcad.export.step.write_stl`; the writer's result is returned.
    """
    target = Path(path)
    return _writer(SOLID_WRITERS, target, "a solid")(solid, target, **options)
