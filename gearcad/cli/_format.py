"""Printing helpers shared by the commands: JSON to stdout, plain tables."""

from __future__ import annotations

import sys
from typing import Any, Iterable, Sequence


__all__ = ["print_json", "table", "fmt", "help_width"]


def print_json(obj: Any) -> None:
    """Print ``obj`` as indented JSON on stdout (the only thing on stdout with --json)."""
    import json

    from ..export.jsonable import jsonable  # here, not at the top: building the parser must stay light

    sys.stdout.write(json.dumps(jsonable(obj), indent=2, ensure_ascii=False) + "\n")


def help_width() -> int:
    """The width argparse would wrap help to (``COLUMNS``, else the terminal's, else 80; less 2), found
    without importing :mod:`shutil`, which argparse loads for it (with its compression modules) on every start."""
    import os

    try:
        columns = int(os.environ.get("COLUMNS", "0"))
    except ValueError:
        columns = 0
    if columns <= 0:
        try:
            columns = os.get_terminal_size(sys.__stdout__.fileno()).columns
        except (AttributeError, ValueError, OSError):
            columns = 0
    return (columns or 80) - 2


def fmt(value: float, digits: int = 4) -> str:
    """A float with ``digits`` decimals, trailing zeros kept for alignment."""
    return f"{value:.{digits}f}"


def table(rows: Sequence[Sequence[str]], header: Sequence[str] | None = None, indent: str = "  ",
          left: Sequence[int] = (0,)) -> str:
    """Columns in ``left`` left-aligned (default the first), the others right-aligned; returns the text."""
    allrows: list[Sequence[str]] = ([header] if header else []) + list(rows)
    if not allrows:
        return ""
    widths = [max(len(str(r[i])) for r in allrows if i < len(r)) for i in range(max(len(r) for r in allrows))]
    lines = []
    for n, r in enumerate(allrows):
        cells = [str(c).ljust(widths[i]) if i in left else str(c).rjust(widths[i]) for i, c in enumerate(r)]
        lines.append(indent + "  ".join(cells).rstrip())
        if header and n == 0:
            lines.append(indent + "  ".join("-" * w for w in widths))
    return "\n".join(lines)


def lines(items: Iterable[str]) -> str:
    """Join lines."""
    return "\n".join(items)
