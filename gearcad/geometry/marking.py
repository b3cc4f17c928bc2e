"""Where a part's marking text goes: inside the part, clear of every hole and cut.

Pure (numpy and shapely).  A line of text is taken as the box a wide sans-serif
face needs: each character advances :data:`WIDE_ADVANCE` cap heights (the
capitals and the wide letters of :data:`WIDE_LETTERS` :data:`WIDER_ADVANCE`),
glyphs reach :data:`ASCENT` cap heights above the baseline (ascenders stand
above the capitals) and :data:`DESCENT` below it (descenders).  The box must lie inside
the part's material shrunk by :data:`MARKING_MARGIN` from the outer contour and
from every hole, so a reader that draws the text in a wider face than gearcad
assumed still keeps the engraving off the cut lines.

The text is anchored at its left end on the baseline (the DXF ``TEXT``
default, SVG ``text-anchor: start``), so a program that ignores alignment
attributes still puts it where it belongs.  Lengths in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .shape import Part

__all__ = ["TextPlace", "WIDE_ADVANCE", "WIDER_ADVANCE", "WIDE_LETTERS", "text_advance", "ASCENT", "DESCENT", "MARKING_MARGIN", "MIN_TEXT_HEIGHT",
           "text_box", "material_region", "place_text"]

# Advance per character of a wide sans-serif face, in cap heights (common practice: size
# text for one cap height per character, half as much again for capitals and m, w; a bold
# wide face such as DejaVu Sans Bold stays within both, the test measures it).
WIDE_ADVANCE = 1.0
WIDER_ADVANCE = 1.6
WIDE_LETTERS = frozenset("mwMW@%")
# Top of the tallest glyph and bottom of descenders, in cap heights, with room for an SVG
# reader whose face has taller capitals per font size than assumed (common practice).
ASCENT = 1.2
DESCENT = 0.4
MARKING_MARGIN = 0.5  # mm of material kept between the text box and every cut; common practice
MIN_TEXT_HEIGHT = 0.5  # mm: smaller engraving is not legible (common practice)
_SHRINK_STEP = 0.85  # each try at a smaller height scales it by this
_GRID = 48  # candidate positions per side of the searched area
_SIMPLIFY = 0.02  # mm: the searched region is simplified within this (and shrunk by it first)


@dataclass(frozen=True)
class TextPlace:
    """One line of text, anchored at its left end on the baseline.

    Attributes
    ----------
    x, y : float
        Left end of the baseline, mm.
    height : float
        Cap height, mm.
    """

    x: float
    y: float
    height: float


def text_advance(text: str) -> float:
    """Width of ``text`` in a wide face, in cap heights."""
    return sum(WIDER_ADVANCE if c in WIDE_LETTERS or c.isupper() else WIDE_ADVANCE for c in text)


def text_box(text: str, x: float, y: float, height: float) -> tuple[float, float, float, float]:
    """The box ``(x0, y0, x1, y1)`` (mm) a wide face needs for ``text`` anchored at ``(x, y)``."""
    return (x, y - DESCENT * height, x + text_advance(text) * height, y + ASCENT * height)


def material_region(part: Part, margin: float = MARKING_MARGIN):
    """The part's material (outer minus holes and round holes) shrunk by ``margin`` mm, a shapely geometry."""
    import shapely
    from shapely.geometry import Point, Polygon

    region = shapely.make_valid(Polygon(part.outer.points()))
    for hole in part.holes:
        region = region.difference(shapely.make_valid(Polygon(hole.points())))
    for x, y, d in part.circles:
        region = region.difference(Point(x, y).buffer(d / 2, quad_segs=64))
    return region.buffer(-margin, quad_segs=16)


def place_text(part: Part, text: str, height: float, prefer: tuple[float, float] | None = None,
               margin: float = MARKING_MARGIN) -> TextPlace | None:
    """The largest text up to ``height`` that fits the part, nearest to ``prefer``.

    Parameters
    ----------
    part : Part
        The part as cut (kerf applied), mm.
    text : str
        One line of text.
    height : float
        Largest cap height wanted, mm.
    prefer : (float, float), optional
        Where the middle of the text should be if it fits there, mm; default the
        middle of the part's bounding box.
    margin : float
        Least material between the text box and any cut, mm.

    Returns
    -------
    TextPlace or None
        None when not even :data:`MIN_TEXT_HEIGHT` fits anywhere.
    """
    import shapely

    if not text or height <= 0:
        return None
    region = material_region(part, margin + _SIMPLIFY).simplify(_SIMPLIFY)
    if region.is_empty:
        return None
    shapely.prepare(region)
    x0, y0, x1, y1 = region.bounds
    if prefer is None:
        prefer = ((x0 + x1) / 2, (y0 + y1) / 2)
    h = float(height)
    while h >= MIN_TEXT_HEIGHT - 1e-12:
        found = _best_fit(region, (x0, y0, x1, y1), text, h, prefer)
        if found is not None:
            return found
        h *= _SHRINK_STEP
    return None


def _best_fit(region, bounds: tuple[float, float, float, float], text: str, h: float,
              prefer: tuple[float, float]) -> TextPlace | None:
    """The fitting anchor for height ``h`` whose box centre is nearest ``prefer``, or None."""
    import shapely

    bx0, by0, bx1, by1 = text_box(text, 0.0, 0.0, h)
    w, top, bottom = bx1 - bx0, by1, -by0
    x0, y0, x1, y1 = bounds
    if w > x1 - x0 or top + bottom > y1 - y0:
        return None
    step = max(min(h / 4, w / 4), max(x1 - x0, y1 - y0) / _GRID)
    xs = np.arange(x0, x1 - w + 1e-12, step)
    ys = np.arange(y0 + bottom, y1 - top + 1e-12, step)
    # candidates ordered by the distance of their box centre from the preferred point
    gx, gy = (a.ravel() for a in np.meshgrid(xs, ys))
    cx, cy = gx + w / 2, gy + (top - bottom) / 2
    order = np.argsort(np.hypot(cx - prefer[0], cy - prefer[1]), kind="stable")
    gx, gy = gx[order], gy[order]
    for start in range(0, len(gx), 512):
        chunk = slice(start, start + 512)
        boxes = shapely.box(gx[chunk], gy[chunk] - bottom, gx[chunk] + w, gy[chunk] + top)
        inside = np.flatnonzero(shapely.contains_properly(region, boxes))
        if inside.size:
            k = start + int(inside[0])
            return _refined(region, text, h, (float(gx[k]), float(gy[k])), prefer, step)
    return None


def _refined(region, text: str, h: float, anchor: tuple[float, float], prefer: tuple[float, float],
             step: float) -> TextPlace:
    """Move a fitting anchor towards the preferred centre in smaller steps while it still fits."""
    import shapely

    bx0, by0, bx1, by1 = text_box(text, 0.0, 0.0, h)
    x, y = anchor
    for _ in range(4):
        step /= 2
        offsets = np.array([(dx, dy) for dx in (-step, 0.0, step) for dy in (-step, 0.0, step)])
        cand = np.array([x, y]) + offsets
        boxes = shapely.box(cand[:, 0] + bx0, cand[:, 1] + by0, cand[:, 0] + bx1, cand[:, 1] + by1)
        ok = shapely.contains_properly(region, boxes)
        centre = cand + ((bx0 + bx1) / 2, (by0 + by1) / 2)
        dist = np.where(ok, np.hypot(centre[:, 0] - prefer[0], centre[:, 1] - prefer[1]), math.inf)
        k = int(np.argmin(dist))
        if math.isfinite(dist[k]):
            x, y = float(cand[k, 0]), float(cand[k, 1])
    return TextPlace(x, y, h)
