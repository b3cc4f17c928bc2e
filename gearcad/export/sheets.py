"""The flat parts of a plan as they go to the cutter, and nested cut sheets of them.

Pure.  :func:`flat_parts` lists every gear and plate with its cut outline, how
it may be turned on a sheet and where its marking should go; :func:`plan_sheets`
groups the parts by material and thickness and lays each group on sheets of
stock (:mod:`gearcad.geometry.nest`); :func:`sheet_drawing` makes the cut
drawing of one sheet, in the writers' neutral form.  Lengths in mm.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from .neutral import CutDrawing, merged_drawing, moved_drawing
from .cutting import part_drawing
from ..geometry.nest import NestItem, Nesting, Sheet, nest_parts, turned_part
from ..geometry.shape import Part

__all__ = ["FlatPart", "SheetGroup", "MIN_SPACING", "GEAR_LABEL_HEIGHT", "flat_parts", "part_spacing",
           "plan_sheets", "sheet_name", "sheet_drawing", "sheets_summary"]

MIN_SPACING = 2.0  # mm between nested parts at the least: room for heat and for the web to hold (common practice)
GEAR_LABEL_HEIGHT = 2.5  # mm: largest marking on a gear (common practice)
PLATE_LABEL_HEIGHT = 3.0  # mm: largest marking on a plate (common practice)


@dataclass(frozen=True)
class FlatPart:
    """One flat part as it goes to the cutter.

    Attributes
    ----------
    name : str
        Part name (file names, sheets, report).
    part : Part
        The cut part (kerf applied) in its own coordinates, mm.
    turns : str
        How it may be turned on a sheet: ``free`` (gears) or ``quarter``.
    label_at : (float, float) or None
        Where its marking should go if it fits there, mm.
    label_height : float
        Largest cap height of its marking, mm.
    material : str
        Stock material (the fabrication profile's).
    thickness : float
        Stock thickness, mm.
    """

    name: str
    part: Part
    turns: str
    label_at: tuple[float, float] | None
    label_height: float
    material: str
    thickness: float


def _material(plan) -> str:
    fab = plan.fabrication
    return fab.material_profile or fab.material


def flat_parts(plan) -> tuple[FlatPart, ...]:
    """Every gear and plate of ``plan`` as it goes to the cutter, in the plan's order."""
    material, thickness = _material(plan), float(plan.spec.thickness)
    parts = []
    for g in plan.gears:
        at = g.label_at if g.label_at is not None else (0.0, -(g.bore / 2 + g.gear.root_diameter / 2) / 2)
        parts.append(FlatPart(g.name, g.cut_part, "free", at, GEAR_LABEL_HEIGHT, material, thickness))
    margin = plan.fabrication.plate_margin
    for p in plan.plates:
        parts.append(FlatPart(p.name, p.cut_part, "quarter", (plan.layout.width / 2, margin / 2),
                              min(PLATE_LABEL_HEIGHT, margin / 3), material, thickness))
    return tuple(parts)


def part_spacing(fabrication) -> float:
    """Least gap between nested parts, mm: two kerfs, the tool's diameter, or :data:`MIN_SPACING`, the largest."""
    return max(2 * fabrication.kerf, 2 * fabrication.tool_radius, MIN_SPACING)


@dataclass(frozen=True)
class SheetGroup:
    """The sheets of one material and thickness."""

    material: str
    thickness: float
    nesting: Nesting
    spacing: float
    width: float  # sheet size, mm
    height: float

    @property
    def slug(self) -> str:
        """The material as a file-name word: lower case, runs of other characters as one hyphen."""
        return re.sub(r"[^a-z0-9]+", "-", self.material.lower()).strip("-") or "stock"


def plan_sheets(plan, size: tuple[float, float] | None = None) -> tuple[SheetGroup, ...]:
    """The plan's flat parts nested on sheets, one group per material and thickness.

    Parameters
    ----------
    plan : Plan
        The plan.
    size : (float, float), optional
        Sheet width and height, mm.  Given: a part larger than the sheet is an
        error.  Not given: the fabrication profile's sheet, and a part larger
        than it is left off the sheets (named in the group's ``left_out``).

    Raises
    ------
    InputError
        Bad sheet size, or a part larger than the sheet the user gave.
    """
    fab = plan.fabrication
    width, height = size if size is not None else (fab.sheet_width, fab.sheet_height)
    spacing = part_spacing(fab)
    groups: dict[tuple[str, float], list[NestItem]] = {}
    for fp in flat_parts(plan):
        groups.setdefault((fp.material, fp.thickness), []).append(NestItem(fp.name, fp.part, fp.turns))
    return tuple(SheetGroup(material, thickness, nest_parts(items, width, height, spacing, strict=size is not None),
                            spacing, float(width), float(height))
                 for (material, thickness), items in groups.items())


def sheet_name(group: SheetGroup, index: int) -> str:
    """File stem of sheet ``index`` (from 1): ``sheet-<material>-<thickness>-<n>``."""
    return f"sheet-{group.slug}-{group.thickness:g}mm-{index}"


def sheet_drawing(sheet: Sheet, parts: dict[str, FlatPart], mode: str, tolerance: float,
                  unturned: dict[str, CutDrawing] | None = None) -> CutDrawing:
    """The cut drawing of one sheet: each part's drawing turned and moved to its place.

    Parameters
    ----------
    sheet : Sheet
        The sheet's placements.
    parts : dict
        Name to :class:`FlatPart`.
    mode, tolerance
        As for :func:`gearcad.export.cutting.part_drawing`.
    unturned : dict, optional
        Drawings already made of parts in their own orientation (reused for parts not turned).
    """
    drawings = []
    for place in sheet.placements:
        fp = parts[place.name]
        if place.rotation == 0.0 and unturned and place.name in unturned:
            drawing = unturned[place.name]
        else:
            at = None
            if fp.label_at is not None:
                c, s = math.cos(place.rotation), math.sin(place.rotation)
                at = (c * fp.label_at[0] - s * fp.label_at[1], s * fp.label_at[0] + c * fp.label_at[1])
            drawing = part_drawing(turned_part(fp.part, place.rotation), mode, tolerance, at, fp.label_height)
        drawings.append(moved_drawing(drawing, place.dx, place.dy))
    return merged_drawing(drawings)


def sheets_summary(groups: tuple[SheetGroup, ...]) -> list[dict]:
    """Report rows, one per sheet: file stem, material, thickness, size, spacing, parts and area used."""
    return [{
        "name": sheet_name(group, k),
        "material": group.material,
        "thickness_mm": group.thickness,
        "width_mm": sheet.width,
        "height_mm": sheet.height,
        "spacing_mm": group.spacing,
        "parts": [p.name for p in sheet.placements],
        "part_area_mm2": round(sheet.part_area, 1),
        "used_percent": round(100 * sheet.used, 1),
    } for group in groups for k, sheet in enumerate(group.nesting.sheets, start=1)]
