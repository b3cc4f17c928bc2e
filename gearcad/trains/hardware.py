"""The bought hardware of a mechanism and its sizes: shafts, pipes, spacers, pillars, screws (mm).

Pure values and small sizing rules, shared by the planners (which leave room for them) and by
:mod:`gearcad.trains.supports` (which places them).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..meshes.checks import Finding

__all__ = ["NUTS", "WASHERS", "PITCHES", "PROTRUSION_THREADS", "through_screw_length", "END_SHAKE", "REACH", "STUD_PIPE", "PIPE_WALL", "SPACER_WALL", "EDGE_RULE", "FRAME", "Rod", "Sweep",
           "ShaftSupport", "Mechanism", "screw_size", "screw_length", "bridge_room", "SHIM", "spacer_word",
           "spacer_name", "spacers_of"]


END_SHAKE = 0.2  # axial play left on every shaft, mm; common practice for small clockwork (0.1-0.2 mm, from memory)


REACH = 3.0  # input and output shafts stand out of their plate by this many diameters (a collar and a hand); our choice


STUD_PIPE = 1.5  # least length of a stud's pipe, in bore diameters (the rule; common practice for a bush)


PIPE_WALL = 0.5  # wall of pipes and spacer tubes, mm (telescoping brass tube); common practice


SPACER_WALL = 1.0  # wall of the spacers on a shaft, mm; common practice


SHIM = 0.5  # a washer this thin or thinner is a shim washer (DIN 988 shim rings run 0.1-0.5 mm and up, from memory)


EDGE_RULE = 1.0  # no hole nearer a plate edge than this many of its own diameters (the rule)


FRAME = ("back-plate", "front-plate")


# ISO 273 medium clearance holes (from memory): hole diameter -> thread.
_CLEARANCE = ((2.4, "M2", 2.0), (2.9, "M2.5", 2.5), (3.4, "M3", 3.0), (4.5, "M4", 4.0), (5.5, "M5", 5.0),
              (6.6, "M6", 6.0), (9.0, "M8", 8.0), (11.0, "M10", 10.0), (13.5, "M12", 12.0))


#: Hex nuts (ISO 4032: width across flats s, height m) and plain washers (ISO 7089: bore, outside diameter,
#: thickness) by thread, mm (from memory).
NUTS = {"M2": (4.0, 1.6), "M2.5": (5.0, 2.0), "M3": (5.5, 2.4), "M4": (7.0, 3.2), "M5": (8.0, 4.7), "M6": (10.0, 5.2),
        "M8": (13.0, 6.8), "M10": (16.0, 8.4), "M12": (18.0, 10.8)}
WASHERS = {"M2": (2.2, 5.0, 0.3), "M2.5": (2.7, 6.0, 0.5), "M3": (3.2, 7.0, 0.5), "M4": (4.3, 9.0, 0.8),
           "M5": (5.3, 10.0, 1.0), "M6": (6.4, 12.0, 1.6), "M8": (8.4, 16.0, 1.6), "M10": (10.5, 20.0, 2.0),
           "M12": (13.0, 24.0, 2.5)}


#: ISO 261 coarse pitches of the frame's screw sizes, mm (from memory; ``tests/test_mechanism.py`` holds them equal
#: to the lathe's thread table).
PITCHES = {"M2": 0.4, "M2.5": 0.45, "M3": 0.5, "M4": 0.7, "M5": 0.8, "M6": 1.0, "M8": 1.25, "M10": 1.5, "M12": 1.75}
#: Threads a through screw stands out beyond its nut (common practice: the nut then bears on full threads).
PROTRUSION_THREADS = 2

_SCREW_LENGTHS = (6, 8, 10, 12, 16, 20, 25, 30, 35, 40, 45, 50, 55, 60, 65, 70, 80, 90, 100, 110, 120, 130, 140, 150,
                  160, 180, 200)  # ISO 4762 preferred lengths, mm (from memory)


@dataclass(frozen=True)
class Rod:
    """A round bought part placed in the assembly: shaft, axle, pin, stud, pipe, spacer, pillar or screw.

    ``diameter`` outside and ``bore`` inside (0: solid), ``z0`` to ``z1`` along the axis, mm.
    """

    name: str
    kind: str
    x: float
    y: float
    diameter: float
    bore: float
    z0: float
    z1: float
    supports: tuple[str, ...] = ()
    carries: tuple[str, ...] = ()
    thread: str = ""

    @property
    def length(self) -> float:
        """Length along the axis, mm."""
        return self.z1 - self.z0


@dataclass(frozen=True)
class Sweep:
    """The space a part sweeps: an annulus (``inner`` 0: a disc) about ``(x, y)`` from ``z0`` to ``z1``, mm."""

    name: str
    x: float
    y: float
    outer: float
    inner: float
    z0: float
    z1: float


@dataclass(frozen=True)
class ShaftSupport:
    """How one shaft of the plan is held: its kind, supports, length and free span (mm), its pipe if any."""

    name: str
    kind: str  # arbor (turns in two supports), axle (fixed; tubes turn on it), pin, stud, pipe
    supports: tuple[str, ...]
    length: float
    free_span: float
    pipe: str | None = None
    around: str | None = None  # a pipe: the shaft it turns on


@dataclass(frozen=True)
class Mechanism:
    """Supports, bought parts, sweeps and findings of a plan; ``width`` and ``height`` of the (grown) frame plates."""

    shafts: tuple[ShaftSupport, ...]
    rods: tuple[Rod, ...]
    sweeps: tuple[Sweep, ...]
    bridges: tuple[str, ...]
    margin: float
    width: float
    height: float
    findings: tuple[Finding, ...]
    screw: str
    joins: tuple = ()  # gearcad.trains.joins.Join, one per compound pair
    solids: int = 0  # solids the interference check saw
    overlaps: tuple = ()  # (part, part, depth mm) it found; empty when clean

    @property
    def pillars(self) -> tuple[Rod, ...]:
        """The pillars (plate to plate, plate to bridge, ring sleeves)."""
        return tuple(r for r in self.rods if r.kind == "pillar")


def spacer_word(length: float, shaft: float) -> str:
    """What the trade calls a spacer ``length`` mm long on a ``shaft`` mm shaft: a shim, a washer or a spacer tube.

    One shorter than the shaft's diameter is a washer (it is bought as one, not cut from tube; common practice),
    a shim washer when no thicker than ``SHIM``.
    """
    if length <= SHIM + 1e-9:
        return "shim washer"
    return "washer" if length < shaft - 1e-9 else "spacer tube"


def spacer_name(shaft_name: str, k: int, length: float, shaft: float) -> str:
    """The name of the ``k``-th spacer on a shaft: ``<shaft>-washer-<k>`` or ``<shaft>-spacer-<k>``."""
    return f"{shaft_name}-{'spacer' if spacer_word(length, shaft) == 'spacer tube' else 'washer'}-{k}"


def spacers_of(rods, shaft_name: str) -> list:
    """The spacers and washers (kind ``spacer``) on the shaft or pipe called ``shaft_name``."""
    return [r for r in rods if r.kind == "spacer"
            and (r.name.startswith(f"{shaft_name}-spacer-") or r.name.startswith(f"{shaft_name}-washer-"))]


def screw_size(hole: float) -> tuple[str, float]:
    """The thread (name, nominal diameter in mm) whose ISO 273 medium clearance hole fits ``hole`` mm."""
    fits = [(name, d) for clearance, name, d in _CLEARANCE if clearance <= hole + 1e-9]
    if not fits:
        raise InputError(f"spacer_hole {hole:g} mm is too small for an M2 screw (2.4 mm clearance hole at least)")
    return fits[-1]


def through_screw_length(grip: float, thread: str) -> float:
    """The stock length (mm) of a through screw over ``grip`` mm: its plain washer, its hex nut and
    :data:`PROTRUSION_THREADS` threads beyond, rounded up to a preferred length."""
    return screw_length(grip + WASHERS[thread][2] + NUTS[thread][1] + PROTRUSION_THREADS * PITCHES[thread])


def screw_length(length: float) -> float:
    return float(next((L for L in _SCREW_LENGTHS if L >= length - 1e-9), math.ceil(length)))


def bridge_room(thickness: float, gap: float) -> float:
    """Room a bridge takes between two layers: its thickness and one layer gap, mm."""
    return thickness + gap
