"""Writers chosen by the file's suffix: :data:`DRAWING_WRITERS` for cut drawings, :data:`SOLID_WRITERS` for solids."""

from __future__ import annotations

import os
from collections.abc import Callable, Mapping
from pathlib import Path
from types import MappingProxyType
from typing import Any

from ..errors import InputError
from .dxf import CutDrawing, write_dxf
from .svg import write_svg

__all__ = ["DRAWING_WRITERS", "SOLID_WRITERS", "write_drawing", "write_solid"]


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
