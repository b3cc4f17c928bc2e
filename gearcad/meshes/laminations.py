"""A helical gear stacked from flat sheets (laser-cut laminations): the turn of each sheet.

Pure functions; no I/O.
"""

from __future__ import annotations

import math

from ..errors import InputError
from ..validate import as_int

__all__ = [
    "MAX_LAMINATIONS",
    "section_turn",
    "lamination_turns",
    "lamination_parts",
]


MAX_LAMINATIONS = 200


def section_turn(z: float, thickness: float, twist: float, herringbone: bool = False, gap: float = 0.0) -> float:
    """Turn (radians) of the transverse section at height ``z`` (mm, 0 to ``thickness``) from the mid-face one.

    A single helix turns uniformly, ``twist (z / b - 1/2)`` (``twist`` = ``b tan(beta) / r``, signed by the
    hand); a herringbone's halves turn back towards mid-face, ``-(twist / b) max(0, |z - b/2| - gap/2)``,
    and the gap is not turned (the layout of :func:`gearcad.export.step.helical_solid`).
    """
    if herringbone:
        return -(twist / thickness) * max(0.0, abs(z - thickness / 2) - gap / 2)
    return twist * (z / thickness - 0.5)


def lamination_turns(count: int, thickness: float, twist: float, herringbone: bool = False, gap: float = 0.0) -> tuple[float, ...]:
    """Turn (radians) of each of ``count`` equal laminations, bottom first: the section at its middle height.

    Stacked in order, the laminations approximate the helical tooth by steps of ``twist / count``.
    """
    count = as_int(count, "lamination count")
    if not 2 <= count <= MAX_LAMINATIONS:
        raise InputError(f"lamination count must be from 2 to {MAX_LAMINATIONS}, got {count}")
    step = thickness / count
    return tuple(section_turn((k + 0.5) * step, thickness, twist, herringbone, gap) for k in range(count))


def lamination_parts(part, count: int, thickness: float, twist: float, herringbone: bool = False, gap: float = 0.0,
                     turn_holes: bool = False) -> tuple:
    """The ``count`` laminations of a helical gear drawn as ``part`` (its mid-face section), bottom first.

    Each lamination's outer loop is the section turned by its share of the twist (:func:`lamination_turns`);
    holes and round holes stay where they are (the bore runs straight through the stack).  Lamination ``k``
    is named ``<name>-lam<k>`` (from 1) and labelled with its place and turn.
    """
    from ..geometry.shape import Loop, Part

    turns = lamination_turns(count, thickness, twist, herringbone, gap)
    out = []
    for k, turn in enumerate(turns, start=1):
        label = f"{part.label}  lamination {k}/{count} (bottom first), turned {math.degrees(turn):+.3f} deg"
        if turn_holes:  # a ring: its teeth are the hole; the blank and its bolt holes stay
            holes = tuple(Loop(tuple(c.transformed(rotation=turn) for c in h.curves)) for h in part.holes)
            out.append(Part(f"{part.name}-lam{k}", part.outer, holes, part.circles, label.strip(), part.symmetry))
            continue
        outer = Loop(tuple(c.transformed(rotation=turn) for c in part.outer.curves))
        out.append(Part(f"{part.name}-lam{k}", outer, part.holes, part.circles, label.strip(), part.symmetry))
    return tuple(out)
