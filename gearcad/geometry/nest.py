"""Nesting flat parts on sheets of stock: where each part goes, turned as the process allows.

Pure (numpy).  Each part is taken by the rectangle that holds its outer contour
in an orientation it may take.  The rectangles are packed by the maximal-rectangles
method (Jylanki, "A thousand ways to pack the bin", 2010): the free room of a
sheet is kept as the list of all maximal empty rectangles; the largest part
comes first and goes where it leaves the shortest leftover side (best short
side fit), on the first sheet with room, a new sheet when none has.  Every
rectangle is grown by ``spacing`` on its right and upper side and the sheet's
usable room starts ``spacing`` in from its lower-left edges, so the parts are
at least ``spacing`` apart and from every edge of the sheet.

Turning: a part marked ``free`` (a gear: its outline looks the same every
tooth, and the material has no grain that matters for it) may take 0 and 90
degrees and the turn (in 15 degree steps) with the smallest rectangle;
``quarter`` parts (plates, carriers) 0 and 90 degrees; ``none`` parts keep
their drawn orientation.  Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from .shape import Loop, Part

__all__ = ["NestItem", "Placement", "Sheet", "Nesting", "TURNS", "nest_parts", "turned_part", "placed_points", "MAX_SHEET_SIDE",
           "MIN_SHEET_SIDE"]

TURNS = ("free", "quarter", "none")
MIN_SHEET_SIDE = 10.0  # mm
MAX_SHEET_SIDE = 10000.0  # mm: no stock sheet is larger
_FREE_STEP = math.radians(15.0)


@dataclass(frozen=True)
class NestItem:
    """One part to lay on a sheet.

    Attributes
    ----------
    name : str
        The part's name.
    part : Part
        The part as cut (kerf applied), in its own coordinates, mm.
    turns : str
        ``free``, ``quarter`` or ``none`` (see the module docstring).
    """

    name: str
    part: Part
    turns: str = "quarter"

    def __post_init__(self) -> None:
        if self.turns not in TURNS:
            raise InputError(f"part {self.name!r}: turns must be one of {', '.join(TURNS)}, got {self.turns!r}")


@dataclass(frozen=True)
class Placement:
    """Where one part goes: turned by ``rotation`` (radians, about its own origin), then moved by ``(dx, dy)`` mm."""

    name: str
    rotation: float
    dx: float
    dy: float


@dataclass(frozen=True)
class Sheet:
    """One sheet of stock: its size (mm), its parts, and the parts' net area (mm²)."""

    width: float
    height: float
    placements: tuple[Placement, ...]
    part_area: float

    @property
    def used(self) -> float:
        """Share of the sheet's area that ends up in parts (0 to 1)."""
        return self.part_area / (self.width * self.height)


@dataclass(frozen=True)
class Nesting:
    """Sheets in order, and the parts too large for any sheet (left out)."""

    sheets: tuple[Sheet, ...]
    left_out: tuple[str, ...] = ()


def turned_part(part: Part, angle: float) -> Part:
    """``part`` turned by ``angle`` radians about its origin (outlines, holes and round holes)."""
    if angle == 0.0:
        return part
    c, s = math.cos(angle), math.sin(angle)

    def loop(lp: Loop) -> Loop:
        return Loop(tuple(cv.transformed(rotation=angle) for cv in lp.curves))

    circles = tuple((c * x - s * y, s * x + c * y, d) for x, y, d in part.circles)
    return Part(part.name, loop(part.outer), tuple(loop(h) for h in part.holes), circles, part.label, part.symmetry)


def _boxes(points: np.ndarray, angles) -> list[tuple[float, float, float, float, float]]:
    """(angle, x0, y0, x1, y1) of the outline's bounding box in each orientation."""
    found = []
    for a in angles:
        c, s = math.cos(a), math.sin(a)
        xy = points @ np.array([[c, -s], [s, c]]).T
        (x0, y0), (x1, y1) = xy.min(axis=0), xy.max(axis=0)
        found.append((float(a), float(x0), float(y0), float(x1), float(y1)))
    return found


def _orientations(points: np.ndarray, turns: str) -> list[tuple[float, float, float, float, float]]:
    """The boxes of the orientations a part may take (see the module docstring)."""
    if turns == "none":
        return _boxes(points, [0.0])
    boxes = _boxes(points, [0.0, math.pi / 2])
    if turns == "free":
        area = [(b[3] - b[1]) * (b[4] - b[2]) for b in _boxes(points, np.arange(0.0, math.pi / 2, _FREE_STEP))]
        best = float(np.arange(0.0, math.pi / 2, _FREE_STEP)[int(np.argmin(area))])
        if min(area) < 0.99 * area[0]:  # turning gains more than 1 % of the rectangle
            boxes += _boxes(points, [best, best + math.pi / 2])
    return boxes


@dataclass
class _Open:
    free: list[tuple[float, float, float, float]]  # maximal empty rectangles (x, y, w, h)
    placements: list[Placement]
    area: float


def _best_spot(free, w: float, h: float) -> tuple[float, float, int] | None:
    """(short leftover side, long leftover side, index) of the best free rectangle for w x h, or None."""
    best = None
    for k, (_, _, fw, fh) in enumerate(free):
        if w <= fw + 1e-9 and h <= fh + 1e-9:
            lw, lh = fw - w, fh - h
            score = (min(lw, lh), max(lw, lh), k)
            if best is None or score < best:
                best = score
    return best


def _occupy(free, x: float, y: float, w: float, h: float) -> list[tuple[float, float, float, float]]:
    """The maximal free rectangles left once the rectangle (x, y, w, h) is taken."""
    out = []
    for fx, fy, fw, fh in free:
        if x >= fx + fw - 1e-9 or x + w <= fx + 1e-9 or y >= fy + fh - 1e-9 or y + h <= fy + 1e-9:
            out.append((fx, fy, fw, fh))
            continue
        if x > fx:
            out.append((fx, fy, x - fx, fh))
        if x + w < fx + fw:
            out.append((x + w, fy, fx + fw - x - w, fh))
        if y > fy:
            out.append((fx, fy, fw, y - fy))
        if y + h < fy + fh:
            out.append((fx, y + h, fw, fy + fh - y - h))
    out = [r for r in out if r[2] > 1e-9 and r[3] > 1e-9]
    return [r for i, r in enumerate(out)
            if not any(j != i and _contains(o, r) and (o != r or j < i) for j, o in enumerate(out))]


def _contains(outer, inner) -> bool:
    return (inner[0] >= outer[0] - 1e-9 and inner[1] >= outer[1] - 1e-9
            and inner[0] + inner[2] <= outer[0] + outer[2] + 1e-9 and inner[1] + inner[3] <= outer[1] + outer[3] + 1e-9)


def _check_size(width: float, height: float, spacing: float) -> None:
    for what, v in (("width", width), ("height", height)):
        if not (isinstance(v, (int, float)) and math.isfinite(v) and MIN_SHEET_SIDE <= v <= MAX_SHEET_SIDE):
            raise InputError(f"sheet {what} must be from {MIN_SHEET_SIDE:g} to {MAX_SHEET_SIDE:g} mm, got {v!r}")
    if not (math.isfinite(spacing) and 0 <= spacing < min(width, height) / 4):
        raise InputError(f"part spacing must be 0 mm or more and well below the sheet size, got {spacing!r}")


def nest_parts(items: list[NestItem] | tuple[NestItem, ...], width: float, height: float, spacing: float,
               strict: bool = True) -> Nesting:
    """Lay ``items`` on as few ``width`` x ``height`` sheets as the packing needs.

    Parameters
    ----------
    items : sequence of NestItem
        The parts, each in its own coordinates, mm.
    width, height : float
        Sheet size, mm (10 to 10000).
    spacing : float
        Least distance between two parts and between a part and the sheet's edge, mm.
    strict : bool
        If True a part that fits no sheet in any allowed orientation is an
        error; otherwise it is left out and named in :attr:`Nesting.left_out`.

    Returns
    -------
    Nesting

    Raises
    ------
    InputError
        Bad sheet size or spacing, or (``strict``) a part larger than the sheet.
    """
    _check_size(width, height, spacing)
    room = (width - 2 * spacing, height - 2 * spacing)
    sized, left_out = [], []
    for item in items:
        boxes = _orientations(item.part.outer.points(), item.turns)
        fitting = [b for b in boxes if b[3] - b[1] <= room[0] + 1e-9 and b[4] - b[2] <= room[1] + 1e-9]
        if not fitting:
            need = min(boxes, key=lambda b: (b[3] - b[1]) * (b[4] - b[2]))
            message = (f"part {item.name!r} ({need[3] - need[1]:.1f} x {need[4] - need[2]:.1f} mm) does not fit a "
                       f"{width:g} x {height:g} mm sheet with {spacing:g} mm kept clear at its edges")
            if strict:
                raise InputError(message + "; give a larger sheet with --sheet WxH")
            left_out.append(item.name)
            continue
        sized.append((item, fitting))
    # largest first: by the rectangle's area, then its longer side, then name (a stable order)
    sized.sort(key=lambda it: (-min((b[3] - b[1]) * (b[4] - b[2]) for b in it[1]),
                               -min(max(b[3] - b[1], b[4] - b[2]) for b in it[1]), it[0].name))
    sheets: list[_Open] = []
    for item, boxes in sized:
        for sheet in sheets + [None]:
            if sheet is None:
                sheet = _Open([(spacing, spacing, width - spacing, height - spacing)], [], 0.0)
                sheets.append(sheet)
            choice = None
            for box in boxes:
                w, h = box[3] - box[1] + spacing, box[4] - box[2] + spacing
                spot = _best_spot(sheet.free, w, h)
                if spot is not None and (choice is None or spot[:2] < choice[0][:2]):
                    choice = (spot, box, w, h)
            if choice is None:
                continue
            (_, _, k), (angle, x0, y0, _, _), w, h = choice
            fx, fy = sheet.free[k][0], sheet.free[k][1]
            sheet.placements.append(Placement(item.name, angle, fx - x0, fy - y0))
            sheet.area += item.part.area()
            sheet.free = _occupy(sheet.free, fx, fy, w, h)
            break
    done = tuple(Sheet(float(width), float(height), tuple(s.placements), s.area) for s in sheets)
    return Nesting(done, tuple(left_out))


def placed_points(points: np.ndarray, placement: Placement) -> np.ndarray:
    """Points (N, 2, mm) of a part's own coordinates moved to their place on the sheet."""
    c, s = math.cos(placement.rotation), math.sin(placement.rotation)
    return points @ np.array([[c, -s], [s, c]]).T + (placement.dx, placement.dy)
