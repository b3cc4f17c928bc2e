"""The printable thread sheet's layout: A4 pages of text and rules, positions in mm.

Pure: turns a :class:`gearcad.lathe.table.ThreadTable` into pages of
:class:`SheetText` and :class:`SheetLine` items (origin at the top left, y down,
mm); :mod:`gearcad.export.threadsheet` writes them as SVG or PDF without
computing any position.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .report import CAUTION, intermediate_text
from .table import ThreadRow, ThreadTable, error_um

__all__ = ["SheetText", "SheetLine", "SheetPage", "sheet_pages", "A4", "ROWS_PER_PAGE"]

#: A4 portrait, mm (ISO 216).
A4 = (210.0, 297.0)
MARGIN = 12.0
ROW_HEIGHT = 5.2
TEXT_SIZE = 2.6
HEADER_TOP = 43.0
ROWS_PER_PAGE = int((A4[1] - HEADER_TOP - 2 * ROW_HEIGHT - 26.0) // ROW_HEIGHT)
#: Columns: (title, x of the anchor in mm, anchor "start" / "middle" / "end", most characters).
COLUMNS = (("Thread", MARGIN, "start", 30), ("Pitch mm", 72.0, "end", 9), ("Stud", 83.0, "end", 4),
           ("Intermediate", 99.0, "middle", 11), ("Leadscrew", 129.0, "end", 4), ("µm/25mm", 146.0, "end", 7),
           ("Slot mm", 160.0, "end", 6), ("Angle", 171.0, "end", 6), ("Note", 174.0, "start", 18))


@dataclass(frozen=True)
class SheetText:
    """A line of text: position of its baseline anchor (mm), size (mm), anchor, weight."""

    x: float
    y: float
    text: str
    size: float = TEXT_SIZE
    anchor: str = "start"
    bold: bool = False


@dataclass(frozen=True)
class SheetLine:
    """A rule from (x1, y1) to (x2, y2), mm, of ``width`` mm."""

    x1: float
    y1: float
    x2: float
    y2: float
    width: float = 0.2


@dataclass(frozen=True)
class SheetPage:
    """One A4 page: its size (mm) and its items."""

    width: float
    height: float
    items: tuple[SheetText | SheetLine, ...]


def _clip(text: str, most: int) -> str:
    return text if len(text) <= most else text[: most - 1] + "~"


def _note(row: ThreadRow) -> str:
    b = row.best
    if not b.fit.fits:
        return "NO FIT on the frame"
    if row.with_missing:
        s = row.with_missing.setup
        return f"needs {','.join(map(str, row.with_missing.missing))}: {s.describe().replace(' ', '')}"
    if abs(b.relative_error) > row.tolerance:
        return "outside tolerance"
    if row.alternative:
        return "alt " + row.alternative.setup.describe().replace(" ", "")
    return ""


def _cells(row: ThreadRow) -> tuple[str, ...]:
    b = row.best
    um = "exact" if b.exact else f"{error_um(b.relative_error):+.1f}"
    angle = "-" if b.fit.angle is None else f"{math.degrees(b.fit.angle):.0f}"
    return (row.pitch.name, f"{row.pitch.mm:.4f}", str(b.setup.stud), intermediate_text(b.setup),
            str(b.setup.leadscrew), um, f"{b.fit.slot_position:.1f}", angle, _note(row))


def _header(table: ThreadTable, page: int, pages: int) -> list[SheetText | SheetLine]:
    m = table.machine
    width = A4[0]
    items: list[SheetText | SheetLine] = [
        SheetText(MARGIN, 16.0, _clip(f"Change gears: {m.title}", 92), 3.4, bold=True),
        SheetText(MARGIN, 25.0, _clip(f"Leadscrew {m.leadscrew.name}; spindle to stud "
                                      f"{m.fixed_ratio.numerator}:{m.fixed_ratio.denominator}; change gears module "
                                      f"{m.module:g} mm; stud to leadscrew {m.stud_to_leadscrew:g} mm; slot "
                                      f"{m.slot[0]:g} to {m.slot[1]:g} mm", 110), 3.0),
        SheetText(MARGIN, 30.0, "Train: stud gear > intermediate stud (driven / driver of the pair, or idler) > "
                                "leadscrew gear.", 2.4),
        SheetText(MARGIN, 33.5, "Slot: intermediate stud from the leadscrew, mm. Angle: frame from the line "
                                "leadscrew-to-stud, degrees. Error: µm over 25 mm of thread.", 2.4),
        SheetText(width - MARGIN, 37.5, f"page {page} of {pages}", 2.4, "end"),
    ]
    y = HEADER_TOP
    for title, x, anchor, _ in COLUMNS:
        items.append(SheetText(x, y, title, TEXT_SIZE, anchor, bold=True))
    items.append(SheetLine(MARGIN, y + 1.5, width - MARGIN, y + 1.5, 0.4))
    return items


def _footer(table: ThreadTable) -> list[SheetText | SheetLine]:
    words, lines, line = CAUTION.split(), [], ""
    for word in words:
        if len(line) + len(word) + 1 > 120:
            lines.append(line)
            line = word
        else:
            line = f"{line} {word}".strip()
    lines.append(line)
    top = A4[1] - MARGIN - 3.2 * len(lines)
    items: list[SheetText | SheetLine] = [SheetLine(MARGIN, top - 4.0, A4[0] - MARGIN, top - 4.0, 0.2)]
    items += [SheetText(MARGIN, top + 3.2 * i, text, 2.2) for i, text in enumerate(lines)]
    return items


def sheet_pages(table: ThreadTable) -> list[SheetPage]:
    """The sheet of ``table``: A4 pages of :data:`ROWS_PER_PAGE` rows, with header and caution."""
    rows = list(table.rows)
    chunks = [rows[i:i + ROWS_PER_PAGE] for i in range(0, len(rows), ROWS_PER_PAGE)] or [[]]
    pages = []
    for number, chunk in enumerate(chunks, start=1):
        items = _header(table, number, len(chunks))
        y = HEADER_TOP + ROW_HEIGHT + 1.0
        for index, row in enumerate(chunk):
            for (title, x, anchor, most), cell in zip(COLUMNS, _cells(row)):
                items.append(SheetText(x, y, _clip(cell, most), TEXT_SIZE, anchor, bold=(title == "Thread")))
            if index % 2 == 1 or index == len(chunk) - 1:
                items.append(SheetLine(MARGIN, y + 1.6, A4[0] - MARGIN, y + 1.6, 0.1))
            y += ROW_HEIGHT
        items += _footer(table)
        pages.append(SheetPage(A4[0], A4[1], tuple(items)))
    return pages
