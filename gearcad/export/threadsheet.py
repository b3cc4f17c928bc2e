"""The printable thread sheet: A4 pages laid out by :mod:`gearcad.lathe.sheet`, written as SVG or PDF.

The writers place what they are given (no position is computed here).  SVG
pages are sized in mm with a ``viewBox`` in mm (one user unit per mm); a sheet
of more than one page is written as one file per page, ``NAME.svg``,
``NAME-2.svg``, ...  PDF (through matplotlib, no display needed) holds every page
in one file.  Dispatch is by a table keyed by the suffix.  Files are written
atomically.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Callable, Sequence
from xml.sax.saxutils import escape, quoteattr

from ..errors import InputError
from .atomic import atomic_write

__all__ = ["build_sheet_svg", "write_sheet", "SHEET_WRITERS", "sheet_paths"]

POINTS_PER_MM = 72 / 25.4


def _num(value: float) -> str:
    text = f"{value:.3f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def build_sheet_svg(page) -> str:
    """One page (a :class:`gearcad.lathe.sheet.SheetPage`) as SVG text."""
    from ..lathe.sheet import SheetLine

    w, h = _num(page.width), _num(page.height)
    out = ['<?xml version="1.0" encoding="UTF-8"?>',
           f'<svg xmlns="http://www.w3.org/2000/svg" width="{w}mm" height="{h}mm" viewBox="0 0 {w} {h}">',
           f'<rect x="0" y="0" width="{w}" height="{h}" fill="white"/>',
           '<g font-family="DejaVu Sans, Arial, Helvetica, sans-serif" fill="black">']
    lines = []
    for item in page.items:
        if isinstance(item, SheetLine):
            lines.append(f'<line x1="{_num(item.x1)}" y1="{_num(item.y1)}" x2="{_num(item.x2)}" y2="{_num(item.y2)}" '
                         f'stroke="black" stroke-width="{_num(item.width)}"/>')
        else:
            weight = ' font-weight="bold"' if item.bold else ""
            out.append(f'<text x="{_num(item.x)}" y="{_num(item.y)}" font-size="{_num(item.size)}" '
                       f'text-anchor={quoteattr(item.anchor)}{weight}>{escape(item.text)}</text>')
    out.append("</g>")
    out += lines
    out.append("</svg>")
    return "\n".join(out) + "\n"


def sheet_paths(path: str | os.PathLike[str], pages: int) -> list[Path]:
    """The files a sheet of ``pages`` pages is written to (SVG: one per page; PDF: one)."""
    target = Path(path)
    if target.suffix.lower() != ".svg" or pages <= 1:
        return [target]
    return [target] + [target.with_name(f"{target.stem}-{n}{target.suffix}") for n in range(2, pages + 1)]


def _write_svg(pages: Sequence, path: Path) -> list[Path]:
    written = []
    for page, target in zip(pages, sheet_paths(path, len(pages))):
        text = build_sheet_svg(page)
        written.append(atomic_write(target, lambda tmp, text=text: tmp.write_text(text, encoding="utf-8")))
    return written


def _write_pdf(pages: Sequence, path: Path) -> list[Path]:
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt
    from matplotlib.backends.backend_pdf import PdfPages

    from ..lathe.sheet import SheetLine

    def writer(tmp: Path) -> None:
        with PdfPages(tmp) as pdf:
            for page in pages:
                fig = plt.figure(figsize=(page.width / 25.4, page.height / 25.4))
                try:
                    for item in page.items:
                        if isinstance(item, SheetLine):
                            fig.add_artist(matplotlib.lines.Line2D(
                                [item.x1 / page.width, item.x2 / page.width],
                                [1 - item.y1 / page.height, 1 - item.y2 / page.height],
                                linewidth=item.width * POINTS_PER_MM, color="black"))
                        else:
                            align = {"start": "left", "middle": "center", "end": "right"}[item.anchor]
                            fig.text(item.x / page.width, 1 - item.y / page.height, item.text, ha=align,
                                     va="baseline", fontsize=item.size * POINTS_PER_MM,
                                     fontweight="bold" if item.bold else "normal")
                    pdf.savefig(fig)
                finally:
                    plt.close(fig)

    return [atomic_write(path, writer)]


#: Sheet writers by lower-case suffix.
SHEET_WRITERS: dict[str, Callable[[Sequence, Path], list[Path]]] = {".svg": _write_svg, ".pdf": _write_pdf}


def write_sheet(pages: Sequence, path: str | os.PathLike[str]) -> list[Path]:
    """Write the pages of a thread sheet to ``path`` (``.svg`` or ``.pdf``); the files written."""
    target = Path(path)
    writer = SHEET_WRITERS.get(target.suffix.lower())
    if writer is None:
        raise InputError(f"sheet file {str(target)!r} must end in {' or '.join(SHEET_WRITERS)}")
    return writer(list(pages), target)
