"""Nesting flat parts on sheets of stock: where each part goes, turned as the process allows.

Pure (numpy).  Each part is taken by the rectangle that holds its outer contour
in the orientation chosen for it; the rectangles are packed in shelves (rows),
tallest first, each placed on the first shelf of the first sheet with room
(first-fit decreasing height), a new shelf or a new sheet opened when none has.
Neighbouring rectangles, and the rectangles and the sheet's edges, are kept
``spacing`` apart, so the parts themselves are at least that far apart.

Turning: a part marked ``free`` (a gear: its outline looks the same every
tooth, and the material has no grain that matters for it) is tried at every
15 degrees for its smallest rectangle; ``quarter`` parts (plates, carriers) at
0 and 90 degrees; ``none`` parts keep their drawn orientation.  Lengths in mm,
angles in radians.
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


def _angles(turns: str) -> np.ndarray:
    if turns == "free":
        return np.arange(0.0, math.pi, _FREE_STEP)
    if turns == "quarter":
        return np.array([0.0, math.pi / 2])
    return np.array([0.0])


def _boxes(points: np.ndarray, angles: np.ndarray) -> list[tuple[float, float, float, float, float]]:
    """(angle, x0, y0, x1, y1) of the outline's bounding box in each orientation."""
    found = []
    for a in angles:
        c, s = math.cos(a), math.sin(a)
        xy = points @ np.array([[c, -s], [s, c]]).T
        (x0, y0), (x1, y1) = xy.min(axis=0), xy.max(axis=0)
        found.append((float(a), float(x0), float(y0), float(x1), float(y1)))
    return found


def _orientation(points: np.ndarray, turns: str, room: tuple[float, float]):
    """The orientation that fits ``room`` with the smallest height (then area), or None."""
    fitting = [b for b in _boxes(points, _angles(turns)) if b[3] - b[1] <= room[0] and b[4] - b[2] <= room[1]]
    if not fitting:
        return None
    # heights within 0.1 mm count as equal, so a gear keeps its drawn orientation unless turning gains
    return min(fitting, key=lambda b: (round(b[4] - b[2], 1), round((b[3] - b[1]) * (b[4] - b[2])), b[0]))


@dataclass
class _Shelf:
    y: float
    height: float
    x: float  # next free x


@dataclass
class _Open:
    shelves: list[_Shelf]
    top: float  # next free y
    placements: list[Placement]
    area: float


def _check_size(width: float, height: float, spacing: float) -> None:
    for what, v in (("width", width), ("height", height)):
        if not (isinstance(v, (int, float)) and math.isfinite(v) and MIN_SHEET_SIDE <= v <= MAX_SHEET_SIDE):
            raise InputError(f"sheet {what} must be from {MIN_SHEET_SIDE:g} to {MAX_SHEET_SIDE:g} mm, got {v!r}")
    if not (math.isfinite(spacing) and 0 <= spacing < min(width, height) / 4):
        raise InputError(f"part spacing must be 0 mm or more and well below the sheet size, got {spacing!r}")


def nest_parts(items: list[NestItem] | tuple[NestItem, ...], width: float, height: float, spacing: float,
               strict: bool = True) -> Nesting:
    """Lay ``items`` on as few ``width`` x ``height`` sheets as the shelf packing needs.

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
        points = item.part.outer.points()
        box = _orientation(points, item.turns, room)
        if box is None:
            need = min(_boxes(points, _angles(item.turns)), key=lambda b: (b[3] - b[1]) * (b[4] - b[2]))
            message = (f"part {item.name!r} ({need[3] - need[1]:.1f} x {need[4] - need[2]:.1f} mm) does not fit a "
                       f"{width:g} x {height:g} mm sheet with {spacing:g} mm kept clear at its edges")
            if strict:
                raise InputError(message + "; give a larger sheet with --sheet WxH")
            left_out.append(item.name)
            continue
        sized.append((item, box))
    sized.sort(key=lambda ib: (-(ib[1][4] - ib[1][2]), -(ib[1][3] - ib[1][1]), ib[0].name))
    sheets: list[_Open] = []
    for item, (angle, x0, y0, x1, y1) in sized:
        w, h = x1 - x0, y1 - y0
        sheet, shelf = _find_room(sheets, w, h, width, height, spacing)
        if sheet is None:
            sheet = _Open([], spacing, [], 0.0)
            sheets.append(sheet)
        if shelf is None:
            shelf = _Shelf(sheet.top, h, spacing)
            sheet.shelves.append(shelf)
            sheet.top += h + spacing
        sheet.placements.append(Placement(item.name, angle, shelf.x - x0, shelf.y - y0))
        sheet.area += item.part.area()
        shelf.x += w + spacing
    done = tuple(Sheet(float(width), float(height), tuple(s.placements), s.area) for s in sheets)
    return Nesting(done, tuple(left_out))


def _find_room(sheets: list[_Open], w: float, h: float, width: float, height: float, spacing: float):
    """The first (sheet, shelf) with room for a ``w`` x ``h`` box; shelf None: open one on that sheet."""
    for sheet in sheets:
        for shelf in sheet.shelves:
            if h <= shelf.height + 1e-9 and shelf.x + w <= width - spacing + 1e-9:
                return sheet, shelf
        if sheet.top + h <= height - spacing + 1e-9:
            return sheet, None
    return None, None


def placed_points(points: np.ndarray, placement: Placement) -> np.ndarray:
    """Points (N, 2, mm) of a part's own coordinates moved to their place on the sheet."""
    c, s = math.cos(placement.rotation), math.sin(placement.rotation)
    return points @ np.array([[c, -s], [s, c]]).T + (placement.dx, placement.dy)

