"""How a planetary set's turning members reach the outside: the centre shaft and a pipe around it.

Pure.  With the ring fixed (bolted between the plates), the sun and the carrier turn about one axis and
one of them is the input, the other the output.  Both cannot be fixed to one shaft, so (as in every
coaxial drive, common practice):

- the **sun** is fixed to the centre shaft by a D-flat in its bore; the shaft turns in the back plate
  and stands out behind it;
- the **carrier**'s front disc is glued to a **pipe** that turns on the centre shaft, passes the front
  plate (which holds it at a running fit) and stands out in front of it; the carrier's back disc turns
  on the shaft (the planet pins join the two discs);
- whichever of sun and carrier is the input, the drive enters at its end and leaves at the other's.

The shaft's front end turns inside the pipe, so it is held at two points: the back plate and (through
the pipe) the front plate.  A set whose ring turns (fixed sun or fixed carrier) needs a web joining the
ring to its own pipe; gearcad does not make one, and says so with a failure finding naming the ring.
"""

from __future__ import annotations

import dataclasses

from ..geometry.shape import Part
from ..meshes.checks import Finding
from .hardware import PIPE_WALL, REACH, Rod, ShaftSupport, spacers_of

__all__ = ["PIPE_SUFFIX", "planetary_centre", "ring_drive_finding"]

#: The carrier's pipe is named after the centre shaft: ``centre-pipe``.
PIPE_SUFFIX = "-pipe"


def planetary_centre(w, s, support: ShaftSupport) -> ShaftSupport:
    """The centre shaft of a ring-fixed set (already held by both plates in ``support``): its carrier pipe.

    Adds the pipe (a bought tube from the carrier's front disc through the front plate), moves the spacers
    above the carrier disc from the shaft onto the pipe, ends the shaft at the pipe's outer end and makes the
    carrier's centre hole fit the pipe.  Returns the shaft's support with the pipe named.
    """
    from .epicyclic import kerf_cut
    from .plan import PlannedPlate
    from .rods import add_spacers, plate_named

    plan, t, fab = w.plan, w.t, w.fab
    carrier = plate_named(plan, "carrier")
    if carrier is None or plan.spec.planetary.fixed != "ring":
        return support
    outside = s.diameter + 2 * PIPE_WALL
    bore = s.diameter + fab.bore_clearance
    top = w.front_z + t + REACH * outside
    name = s.name + PIPE_SUFFIX
    w.rods.append(Rod(name, "pipe", s.x, s.y, outside, bore, carrier.z, top, ("front-plate", s.name), ("carrier",)))
    shaft = next(r for r in w.rods if r.name == s.name)
    w.rods[w.rods.index(shaft)] = dataclasses.replace(shaft, z1=top)
    above = {r.name for r in spacers_of(w.rods, s.name) if r.z0 >= carrier.z - 1e-9}
    w.rods[:] = [r for r in w.rods if r.name not in above]
    add_spacers(w, name, s.x, s.y, outside, [(carrier.z, carrier.z + t)], carrier.z + t, w.front_z)
    circles = tuple((x, y, outside + fab.bore_clearance) if (abs(x - s.x) < 1e-9 and abs(y - s.y) < 1e-9)
                    else (x, y, d) for x, y, d in carrier.part.circles)
    part = Part(carrier.part.name, carrier.part.outer, carrier.part.holes, circles, carrier.part.label)
    plates = tuple(PlannedPlate(p.name, part, kerf_cut(part, fab, plan.tolerance), p.z) if p.name == "carrier" else p
                   for p in plan.plates)
    w.plan = dataclasses.replace(plan, plates=plates)
    return dataclasses.replace(support, pipe=name)


def ring_drive_finding(plan) -> Finding | None:
    """A failure when the set's ring turns (it is the input or the output): nothing of gearcad's carries it."""
    spec = plan.spec.planetary
    if spec is None or spec.fixed == "ring":
        return None
    return Finding("ring drive", "failure", 0.0, 0.0,
                   f"ring: it turns ({spec.fixed} fixed), but gearcad makes no web joining a turning ring to a shaft or "
                   "pipe, so the set cannot be driven or loaded through it as built; allowed: fixed = \"ring\" (the "
                   "sun and the carrier then meet the outside on the centre shaft and its pipe)")
