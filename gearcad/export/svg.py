"""SVG drawings for laser software.

The page is sized in millimetres (``width``/``height`` in mm) and its
``viewBox`` is in millimetres too, so one user unit is one millimetre.  The
drawing's y axis points up and SVG's points down, so every y coordinate is
written negated: the drawing is not mirrored and no transform is needed (some
laser programs ignore transforms).  Each contour is one closed ``<path>`` of
line (``L``) and arc (``A``) commands made from the contour's bulges; round
holes are ``<circle>`` elements; both are stroke-only with a hairline stroke.
Labels are ``<text>`` in their own group, anchored at the left end of their
baseline.  Laser order: the marking group comes first, then the inner cuts,
then the outer contours, so a cutter that follows the file's order engraves
and cuts the holes before it cuts the part free.  The same input gives the same bytes.

Bulge ``b`` of a segment with chord length ``c``: included angle
``theta = 4 atan(b)``, radius ``r = c / (2 sin(|theta| / 2))``; the arc is the
large one when ``|theta| > pi`` (``|b| > 1``).  Lengths in mm.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping
from pathlib import Path
from types import MappingProxyType
from xml.sax.saxutils import escape, quoteattr

import numpy as np

from ..errors import InputError
from .atomic import atomic_write
from .neutral import CutDrawing, Label, drawing_extents

__all__ = ["DEFAULT_COLOURS", "HAIRLINE", "CAP_HEIGHT_PER_EM", "build_svg", "write_svg", "bulge_radius"]

HAIRLINE = 0.01  # mm: stroke width laser software treats as "cut, do not fill" (common practice)
CAP_HEIGHT_PER_EM = 0.7  # capital height of a sans-serif face per font size (common practice)

DEFAULT_COLOURS: Mapping[str, str] = MappingProxyType({
    "outer": "#0000ff",
    "inner": "#ff00ff",
    "marking": "#00ff00",
})


def _num(value: float) -> str:
    """A coordinate in mm with 6 decimals (1 nm), trailing zeros dropped."""
    text = f"{value:.6f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def bulge_radius(chord: float, bulge: float) -> float:
    """Radius of the arc with chord length ``chord`` (mm) and bulge ``bulge``, mm.

    ``r = c / (2 sin(2 atan|b|))``: half the included angle is ``2 atan|b|``.
    """
    return chord / (2.0 * math.sin(2.0 * math.atan(abs(bulge))))


def _bounds(drawing: CutDrawing) -> tuple[float, float, float, float]:
    return drawing_extents(drawing)


def _segment(p1: np.ndarray, chord: float, bulge: float) -> str:
    end = f"{_num(p1[0])} {_num(-p1[1])}"
    if not bulge:
        return f"L {end}"
    r = _num(bulge_radius(chord, bulge))
    large = 1 if abs(bulge) > 1 else 0
    sweep = 0 if bulge > 0 else 1  # y is negated: a counter-clockwise arc turns the negative SVG way
    return f"A {r} {r} 0 {large} {sweep} {end}"


def _path_data(contour: np.ndarray) -> str:
    xy, bulges = contour[:, :2], contour[:, 2]
    n = len(xy)
    parts = [f"M {_num(xy[0][0])} {_num(-xy[0][1])}"]
    for i in range(n):
        p0, p1 = xy[i], xy[(i + 1) % n]
        if i == n - 1 and not bulges[i]:
            break  # Z draws the closing line
        parts.append(_segment(p1, float(np.hypot(*(p1 - p0))), float(bulges[i])))
    parts.append("Z")
    return " ".join(parts)


def _group(ident: str, colour: str, stroke_width: float, items: list[str]) -> list[str]:
    if not items:
        return []
    head = (f'<g id="{ident}" fill="none" stroke={quoteattr(colour)} stroke-width="{_num(stroke_width)}" '
            'stroke-linejoin="round">')
    return [head, *(f"  {item}" for item in items), "</g>"]


def _text(label: Label) -> str:
    size = _num(label.height / CAP_HEIGHT_PER_EM)
    return (f'<text x="{_num(label.x)}" y="{_num(-label.y)}" font-size="{size}">'
            f"{escape(label.text)}</text>")


def _label_group(labels: tuple[Label, ...], colour: str) -> list[str]:
    if not labels:
        return []
    head = (f'<g id="marking" fill={quoteattr(colour)} stroke="none" font-family="sans-serif" '
            'text-anchor="start">')
    return [head, *(f"  {_text(label)}" for label in labels), "</g>"]


def _colours(colours: Mapping[str, str] | None) -> dict[str, str]:
    given = dict(colours or {})
    unknown = sorted(set(given) - set(DEFAULT_COLOURS))
    if unknown:
        raise InputError(f"unknown colour role(s) {unknown}; the roles are {sorted(DEFAULT_COLOURS)}")
    return {**DEFAULT_COLOURS, **given}


def _check(drawing: CutDrawing, margin: float, stroke_width: float) -> None:
    if drawing.outer_splines or drawing.inner_splines:
        raise InputError("SVG takes contours as bulge polylines (lines and arcs); B-spline contours are for DXF only")
    if not (math.isfinite(margin) and margin >= 0):
        raise InputError(f"SVG margin must be 0 mm or more, got {margin!r}")
    if not (math.isfinite(stroke_width) and stroke_width > 0):
        raise InputError(f"SVG stroke width must be greater than 0 mm, got {stroke_width!r}")


def build_svg(drawing: CutDrawing, *, margin: float = 1.0, stroke_width: float = HAIRLINE,
              colours: Mapping[str, str] | None = None,
              page: tuple[float, float, float, float] | None = None) -> str:
    """The SVG document of ``drawing`` as text.

    Parameters
    ----------
    drawing : CutDrawing
        Contours (bulge form), circles and labels, mm.  Spline contours are refused.
    margin : float
        Empty border round the contours, mm (labels are not counted).
    stroke_width : float
        Stroke width of cut lines, mm.
    colours : mapping, optional
        Role (``"outer"``, ``"inner"``, ``"marking"``) to an SVG colour.
    page : (x0, y0, x1, y1), optional
        The page in drawing coordinates, mm (a nested sheet: the stock sheet);
        default the drawing's extents with ``margin`` round them.

    Returns
    -------
    str
        The document, UTF-8 ready.
    """
    _check(drawing, margin, stroke_width)
    col = _colours(colours)
    if page is None:
        x0, y0, x1, y1 = _bounds(drawing)
    else:
        x0, y0, x1, y1 = (float(v) for v in page)
        margin = 0.0
        if not (all(math.isfinite(v) for v in (x0, y0, x1, y1)) and x1 > x0 and y1 > y0):
            raise InputError(f"SVG page must be (x0, y0, x1, y1) with x1 > x0 and y1 > y0 in mm, got {page!r}")
    width, height = x1 - x0 + 2 * margin, y1 - y0 + 2 * margin
    view = f"{_num(x0 - margin)} {_num(-y1 - margin)} {_num(width)} {_num(height)}"
    outer = [f'<path d="{_path_data(c)}"/>' for c in drawing.outer]
    inner = [f'<path d="{_path_data(c)}"/>' for c in drawing.inner]
    inner += [f'<circle cx="{_num(x)}" cy="{_num(-y)}" r="{_num(d / 2)}"/>' for x, y, d in drawing.circles]
    lines = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        f'<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="{_num(width)}mm" '
        f'height="{_num(height)}mm" viewBox={quoteattr(view)}>',
        *_label_group(drawing.labels, col["marking"]),
        *_group("cut-inner", col["inner"], stroke_width, inner),
        *_group("cut-outer", col["outer"], stroke_width, outer),
        "</svg>",
    ]
    return "\n".join(lines) + "\n"


def write_svg(drawing: CutDrawing, path: str | os.PathLike[str], *, margin: float = 1.0,
              stroke_width: float = HAIRLINE, colours: Mapping[str, str] | None = None,
              page: tuple[float, float, float, float] | None = None) -> Path:
    """Write the SVG of ``drawing`` atomically; see :func:`build_svg` for the parameters.

    Returns
    -------
    pathlib.Path
        ``path``.

    Raises
    ------
    ExportError
        The file could not be written.
    """
    data = build_svg(drawing, margin=margin, stroke_width=stroke_width, colours=colours, page=page).encode("utf-8")
    return atomic_write(path, lambda tmp: tmp.write_bytes(data))
