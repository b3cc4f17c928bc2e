"""Can the fabrication process make every gear of a plan?  One walk over the gear parts of any kind of train.

Pure.  Every toothed part of a plan, whatever planned it (compound, planetary or
summing train), is held against its fabrication profile: an external tooth outline
(gears, suns, planets, a ring's outside teeth) with
:func:`~gearcad.meshes.checks.process_findings`, a ring's internal teeth with
:func:`~gearcad.meshes.checks.ring_process_findings` (the end mill enters the ring's
tooth spaces from its centre).  A process that cannot make a part gives a failure
finding naming the part and the reason, which stops a build before any file is
written.  Lengths in mm.
"""

from __future__ import annotations

import dataclasses

from ..geometry.ring import RingGear
from ..meshes.checks import Finding
from ..meshes.outline_checks import process_findings, ring_process_findings

__all__ = ["process_check", "gear_process_findings"]


def _toothed(loop) -> bool:
    return any(c.kind == "involute" for c in loop.curves)


def _outside_teeth(plan, g):
    """The external gear whose teeth a ring carries on its outside (a summing train's ring), or None."""
    for m in plan.meshes:
        pair = m.pair
        gears = (pair.gear1, pair.gear2) if hasattr(pair, "gear1") else (pair.pinion, pair.ring)  # external, internal
        for name, gear in zip(m.names, gears):
            if name == g.name and not isinstance(gear, RingGear):
                return gear
    return None


def gear_process_findings(plan, g) -> list[Finding]:
    """The process findings of one planned gear ``g`` of ``plan`` (see the module docstring)."""
    fab = plan.fabrication
    if not isinstance(g.gear, RingGear):
        return process_findings(g.name, g.gear, g.part.outer.points(), fab.process, fab.tool_radius, fab.min_feature)
    out: list[Finding] = []
    for hole in g.part.holes:
        if _toothed(hole):
            out += ring_process_findings(g.name, g.gear, hole.points(), fab.process, fab.tool_radius, fab.min_feature)
    outside = _outside_teeth(plan, g)
    if outside is not None and _toothed(g.part.outer):
        out += process_findings(f"{g.name} (outside teeth)", outside, g.part.outer.points(), fab.process,
                                fab.tool_radius, fab.min_feature)
    return out


def process_check(plan):
    """``plan`` with the process findings of every gear part added to its findings (each names its gear)."""
    found = [f for g in plan.gears for f in gear_process_findings(plan, g)]
    return dataclasses.replace(plan, findings=tuple(plan.findings) + tuple(found))
