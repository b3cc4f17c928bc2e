"""The solids of a worm stage in a train: the worm and its bearing blocks, each alone and placed.

Kernel code (OCP through cadquery), imported inside the functions like every ``export/step*.py``.
The geometry comes from the plan (:class:`gearcad.trains.worm_stage.WormLayout`); this module
only builds and moves solids:

* the worm: :func:`gearcad.export.step_worm.worm_solid` (its thread along z over ``[0, length]``,
  plain shaft ends of the root diameter), laid along its heading at the axis height;
* a block: :func:`gearcad.export.step.build_solid` on its end-view profile (across, up), extruded
  along the worm's axis by its length and stood on the back plate's inner face.

Lengths in mm.
"""

from __future__ import annotations

import math
from typing import Any

__all__ = ["worm_part_solid", "block_solid", "placed", "worm_frame"]


def worm_frame(heading: float) -> tuple[tuple[float, float, float], ...]:
    """The columns of the rotation that takes a part's local axes (x across, y up, z along) to the plate's.

    ``n`` (across, left of the heading), the plate's ``z`` (up), ``d`` (the heading): a proper rotation,
    since ``z x d = n``.
    """
    d = (math.cos(heading), math.sin(heading), 0.0)
    n = (-d[1], d[0], 0.0)
    return n, (0.0, 0.0, 1.0), d


def placed(shape: Any, heading: float, origin: tuple[float, float, float], along: float = 0.0) -> Any:
    """``shape`` (an OCP shape or cadquery object) turned by :func:`worm_frame` and moved so that its local
    point ``(0, 0, along)`` lands on ``origin`` (mm)."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Trsf

    n, up, d = worm_frame(heading)
    t = [origin[i] - along * d[i] for i in range(3)]
    trsf = gp_Trsf()
    trsf.SetValues(n[0], up[0], d[0], t[0],
                   n[1], up[1], d[1], t[1],
                   n[2], up[2], d[2], t[2])
    wrapped = getattr(shape, "wrapped", shape)
    return BRepBuilderAPI_Transform(wrapped, trsf, True).Shape()


def worm_part_solid(worm: Any) -> Any:
    """The worm with its shaft ends, at its own origin (thread from z = 0 to its length), an OCP shape."""
    from ..geometry.worm_wheel import transverse_flank
    from .step_worm import worm_solid

    form = worm.form
    solid = worm_solid(form, transverse_flank(form), shaft=worm.shaft_end - worm.thread / 2)
    return solid.wrapped


def block_solid(block: Any, tolerance: float) -> Any:
    """A bearing block: its profile extruded by its length, at its own origin (foot centre at x = y = 0)."""
    from .step import build_solid

    return build_solid(block.part, block.length, tolerance).solid
