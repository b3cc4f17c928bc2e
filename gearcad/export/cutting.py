"""Cut drawings of a plan: each part's contours as bulge rows, in the writers' neutral form.

Pure: arcs are fitted here (``geometry.arcfit``) so that the writers only write.
Modes: ``arcs`` (tangent arcs within the tolerance; what laser and CNC software
read best), ``segments`` (the polyline), ``splines`` (cubic B-splines with control
points and knots, straight edges as lines: ``geometry.bspline``).
Gear drawings are centred on the gear's own axis; plate drawings use plate coordinates.
The marking text is placed inside the part, clear of every cut (``geometry.marking``).
"""

from __future__ import annotations

import numpy as np

from .neutral import CutDrawing, Label, polyline_contour
from ..errors import InputError
from ..geometry.arcfit import fit_loop
from ..geometry.bspline import loop_pieces
from ..geometry.marking import place_text
from ..geometry.shape import Loop, Part

__all__ = ["part_drawing", "plate_scene", "Scene", "DRAWING_MODES", "DEFAULT_LABEL_HEIGHT"]

DRAWING_MODES = ("arcs", "segments", "splines")


def _symmetric_arcs(loop: Loop, copies: int, tolerance: float) -> np.ndarray | None:
    """Arcs of a loop made of ``copies`` turned copies: fit one copy and turn its rows, or None."""
    count = len(loop.curves)
    if copies < 2 or count % copies:
        return None
    per = count // copies
    turn = 2 * np.pi / copies
    c, s = np.cos(turn), np.sin(turn)
    first, second = loop.curves[0].points, loop.curves[per].points
    if first.shape != second.shape or not np.allclose(first @ np.array([[c, -s], [s, c]]).T, second, atol=1e-9):
        return None
    pitch = fit_loop(Loop(loop.curves[:per]), tolerance)
    rows = []
    for k in range(copies):
        ck, sk = np.cos(k * turn), np.sin(k * turn)
        xy = pitch[:, :2] @ np.array([[ck, -sk], [sk, ck]]).T
        rows.append(np.column_stack((xy, pitch[:, 2])))
    return np.concatenate(rows)


def _contour(loop: Loop, mode: str, tolerance: float, copies: int = 1) -> np.ndarray:
    if mode == "arcs":
        rows = _symmetric_arcs(loop, copies, tolerance)
        return rows if rows is not None else fit_loop(loop, tolerance)
    return polyline_contour(loop.points())


DEFAULT_LABEL_HEIGHT = 2.5  # mm: largest cap height of a part's marking (common practice)


def _label(part: Part, at: tuple[float, float] | None, height: float) -> tuple[Label, ...]:
    """The marking inside the part (the largest up to ``height`` that fits, nearest ``at``).

    When the whole label does not fit: the part's name with the label's closing phrase where that is
    words alone (a helical gear's "transverse section"), then the name alone; none if not even that fits.
    The label's fields are separated by two spaces.
    """
    if not part.label:
        return ()
    fields = part.label.split("  ")
    name = part.label.split()[0]
    tries = [part.label]
    if len(fields) > 2 and not any(c.isdigit() for c in fields[-1]):
        tries.append(f"{name}  {fields[-1]}")
    tries.append(name)
    for text in dict.fromkeys(tries):
        place = place_text(part, text, height, at)
        if place is not None:
            return (Label(text, place.x, place.y, place.height),)
    return ()


def part_drawing(part: Part, mode: str = "arcs", tolerance: float = 1e-3,
                 label_at: tuple[float, float] | None = None,
                 label_height: float = DEFAULT_LABEL_HEIGHT) -> CutDrawing:
    """The cut drawing of one part.

    Parameters
    ----------
    part : Part
        The part as it is to be cut (kerf already applied).
    mode : str
        ``arcs``, ``segments`` or ``splines``.
    tolerance : float
        Arc-fitting tolerance, mm.
    label_at : (float, float), optional
        Where the middle of the marking text should go if it fits there, mm
        (default: the middle of the part's bounding box).
    label_height : float
        Largest cap height of the marking text, mm; smaller text is used where
        it does not fit, none where not even 0.5 mm fits.
    """
    if mode not in DRAWING_MODES:
        raise InputError(f"drawing mode must be one of {', '.join(DRAWING_MODES)}, got {mode!r}")
    labels = _label(part, label_at, label_height)
    if mode == "splines":
        return CutDrawing(outer_splines=(loop_pieces(part.outer, tolerance, part.symmetry),),
                          inner_splines=tuple(loop_pieces(h, tolerance) for h in part.holes),
                          circles=part.circles, labels=labels)
    return CutDrawing(outer=(_contour(part.outer, mode, tolerance, part.symmetry),),
                      inner=tuple(_contour(h, mode, tolerance) for h in part.holes), circles=part.circles, labels=labels)


from dataclasses import dataclass  # noqa: E402


@dataclass(frozen=True)
class Scene:
    """Everything a preview draws, placed in plate coordinates (mm).

    ``gears``: (name, layer, (N, 2) outline, (x, y) centre, tip radius); ``gear_holes``: each gear's
    shaped holes (a ring's teeth) placed the same way;
    ``plate``: (N, 2) outline; ``holes``: (x, y, diameter); ``links``: centre
    lines of the meshing pairs.
    """

    plate: np.ndarray
    holes: tuple[tuple[float, float, float], ...]
    gears: tuple[tuple[str, int, np.ndarray, tuple[float, float], float], ...]
    links: tuple[tuple[tuple[float, float], tuple[float, float]], ...]
    title: str
    gear_holes: tuple[tuple[np.ndarray, ...], ...] = ()


def plate_scene(plan) -> Scene:
    """The plate with every gear drawn in place (turned to its assembly phase)."""
    from ..trains.plan import placed_holes, placed_outline

    gears = tuple((g.name, g.layer, placed_outline(g, plan), (plan.shafts[g.shaft].x, plan.shafts[g.shaft].y),
                   g.gear.tip_diameter / 2) for g in plan.gears)
    centre = {g.name: (plan.shafts[g.shaft].x, plan.shafts[g.shaft].y) for g in plan.gears}
    links = tuple((centre[a], centre[b]) for a, b in (m.names for m in plan.meshes))
    holes = tuple(dict.fromkeys(plan.plates[0].part.circles + plan.plates[1].part.circles))
    title = f"{plan.spec.title or plan.spec.name}: ratio {plan.ratio.numerator}/{plan.ratio.denominator}"
    gear_holes = tuple(tuple(placed_holes(g, plan)) for g in plan.gears)
    return Scene(plan.plates[0].part.outer.points(), holes, gears, links, title, gear_holes)
