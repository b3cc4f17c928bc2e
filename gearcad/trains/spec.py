"""A gear train as the user describes it: frozen, validated values (mm, degrees at the edge).

A compound train is a chain of stages.  Stage ``k`` meshes its driver (on shaft
``k``) with its driven gear (on shaft ``k + 1``); an optional idler between them
reverses the direction without changing the ratio.  Gears of stage ``k`` run in
layer ``k``; a shaft carrying two gears carries them in two layers.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..errors import InputError
from ..validate import as_int, finite

__all__ = ["GearSpec", "WormSpec", "StageSpec", "TrainSpec", "Hub", "Keyway", "SolverSpec", "PlanetarySpec", "SummingSpec", "DIFFERENTIALS"]


@dataclass(frozen=True)
class Hub:
    """A boss on one face of a gear: diameter and length, mm (solid models only)."""

    diameter: float
    length: float


@dataclass(frozen=True)
class Keyway:
    """A rectangular keyway in the bore: width and depth beyond the bore's edge, mm."""

    width: float
    depth: float


@dataclass(frozen=True)
class GearSpec:
    """One gear of a stage.

    ``bore`` is the shaft diameter (mm, None: the train's default); ``flat`` the
    distance from the centre to a D-flat (mm), ``keyway`` a keyway; ``shift``
    the profile shift coefficient.
    """

    teeth: int
    shift: float = 0.0
    bore: float | None = None
    flat: float | None = None
    keyway: Keyway | None = None
    hub: Hub | None = None
    hand: str | None = None  # helical stages: the gear's hand, checked against the stage's (None: follow it)

    def __post_init__(self) -> None:
        object.__setattr__(self, "teeth", as_int(self.teeth, "tooth count"))
        if self.hand is not None and self.hand not in ("left", "right"):
            raise InputError(f"hand must be left or right, got {self.hand!r}")
        object.__setattr__(self, "shift", finite(self.shift, "profile shift"))
        if self.bore is not None and not (math.isfinite(self.bore) and self.bore > 0):
            raise InputError(f"bore must be greater than 0 mm, got {self.bore!r}")


WORM_FORMS = ("za", "zi", "zn", "zk")  # flank forms a worm stage takes (gearcad.meshes.worm.FLANK_FORMS)


@dataclass(frozen=True)
class WormSpec:
    """The worm of a worm stage: starts, diameter factor ``q``, flank form, and optionally the pressure
    angle (degrees; axial for ZA, normal for ZI, ZN and ZK; None: the train's) and a friction coefficient
    (None: from the worm (steel) and wheel (the fabrication profile's) materials).  A ZK worm names the
    diameter of the biconical disc that cuts it (``tool_diameter``, mm; bounded by the module in
    :func:`gearcad.meshes.worm.make_worm_pair`).  The figures,
    and the bounds that need the wheel and the module, are in :mod:`gearcad.trains.worm_stage`."""

    starts: int
    diameter_factor: float
    form: str = "za"
    pressure_angle: float | None = None
    friction: float | None = None
    tool_diameter: float | None = None

    def __post_init__(self) -> None:
        from ..meshes.worm import (DIAMETER_FACTOR_RANGE, FRICTION_RANGE, MAX_LEAD_ANGLE, PRESSURE_ANGLE_RANGE,
                                   STARTS_RANGE)

        starts = as_int(self.starts, "worm starts")
        if not STARTS_RANGE[0] <= starts <= STARTS_RANGE[1]:
            raise InputError(f"worm starts must be from {STARTS_RANGE[0]} to {STARTS_RANGE[1]}, got {self.starts!r}")
        q = finite(self.diameter_factor, "diameter factor")
        if not DIAMETER_FACTOR_RANGE[0] <= q <= DIAMETER_FACTOR_RANGE[1]:
            raise InputError(f"worm diameter_factor must be from {DIAMETER_FACTOR_RANGE[0]:g} to "
                             f"{DIAMETER_FACTOR_RANGE[1]:g}, got {self.diameter_factor!r}")
        form = str(self.form).lower()
        if form not in WORM_FORMS:
            raise InputError(f"worm form must be one of {', '.join(f.upper() for f in WORM_FORMS)}, got {self.form!r}")
        gamma = math.degrees(math.atan2(starts, q))
        if gamma > MAX_LEAD_ANGLE[form] + 1e-12:
            raise InputError(f"worm lead angle {gamma:.3f} degrees (atan({starts}/{q:g})) is beyond the {form.upper()} "
                             f"form's range (up to {MAX_LEAD_ANGLE[form]:g} degrees); allowed: fewer starts, a larger "
                             "diameter_factor" + (', or form = "ZI"' if form == "za" else ""))
        for key, (low, high), unit in (("pressure_angle", PRESSURE_ANGLE_RANGE, " degrees"), ("friction", FRICTION_RANGE, "")):
            value = getattr(self, key)
            if value is not None and not (isinstance(value, (int, float)) and low <= value <= high):
                raise InputError(f"worm {key} must be from {low:g} to {high:g}{unit}, got {value!r}")
        if form == "zk" and self.tool_diameter is None:
            raise InputError("worm tool_diameter is needed for a ZK worm (the diameter of the biconical disc that cuts "
                             "it, mm); allowed: give tool_diameter, or another form")
        if form != "zk" and self.tool_diameter is not None:
            raise InputError(f"worm tool_diameter belongs to a ZK worm, not {form.upper()}; allowed: leave it out")
        if self.tool_diameter is not None:
            d0 = finite(self.tool_diameter, "worm tool_diameter")
            if d0 <= 0:
                raise InputError(f"worm tool_diameter must be greater than 0 mm, got {self.tool_diameter!r}")
            object.__setattr__(self, "tool_diameter", d0)
        object.__setattr__(self, "starts", starts)
        object.__setattr__(self, "diameter_factor", q)
        object.__setattr__(self, "form", form)


@dataclass(frozen=True)
class StageSpec:
    """A driver/driven mesh; ``module`` overrides the train's; ``idler`` adds a gear between.

    Helical stages: ``helix`` is the helix angle in degrees (0: spur; the module and shifts
    are then the normal section's), ``hand`` the driver's hand (each mate has the other),
    ``herringbone`` two halves of opposite hand with a ``gap`` (mm) between them.

    Worm stages: ``worm`` drives the wheel ``driven`` (``driver`` then stands for the worm, its
    teeth the starts); ``module`` is the axial module.  No helix, no idler.
    """

    driver: GearSpec
    driven: GearSpec
    module: float | None = None
    idler: GearSpec | None = None
    helix: float = 0.0
    hand: str = "right"
    herringbone: bool = False
    gap: float = 0.0
    worm: WormSpec | None = None

    def __post_init__(self) -> None:
        if self.worm is not None:
            _check_worm_stage(self)
        helix = finite(self.helix, "helix angle")
        if not 0.0 <= helix < 45.0:
            raise InputError(f"helix angle must be from 0 to below 45 degrees, got {self.helix!r}")
        object.__setattr__(self, "helix", helix)
        if self.hand not in ("left", "right"):
            raise InputError(f"hand must be left or right, got {self.hand!r}")
        if self.herringbone and helix == 0:
            raise InputError("a herringbone stage needs a helix angle above 0 degrees")
        if not (math.isfinite(self.gap) and self.gap >= 0) or (self.gap and not self.herringbone):
            raise InputError(f"gap must be 0 mm or more and belongs to a herringbone stage, got {self.gap!r}")
        mates = [self.driver] + ([self.idler] if self.idler else []) + [self.driven]
        hand = self.hand
        for gear in mates:  # external meshes: the hands alternate along the stage
            if helix and gear.hand is not None and gear.hand != hand:
                raise InputError(f"hand {gear.hand} of the {gear.teeth}-tooth gear cannot mesh: on an external pair the "
                                 f"hands are opposite, so this gear must be {hand} (the stage's driver is {self.hand})")
            hand = "left" if hand == "right" else "right"
        if not helix and any(g.hand is not None for g in mates):
            raise InputError("a gear's hand needs a helical stage (helix = DEG)")


def _check_worm_stage(stage: "StageSpec") -> None:
    """A worm stage takes no helix (the worm's lead angle is its helix), no idler, and its driver is the worm."""
    if stage.helix or stage.herringbone or stage.gap:
        raise InputError(f"helix {stage.helix!r} cannot stand with a worm: the wheel's helix is the worm's lead angle; "
                         "allowed: leave out helix (and herringbone, gap) on a worm stage")
    if stage.idler is not None:
        raise InputError(f"idler {stage.idler.teeth} cannot stand with a worm: the worm meshes with its wheel directly; "
                         "allowed: leave out idler on a worm stage")
    if stage.driver.teeth != stage.worm.starts:
        raise InputError(f"driver {stage.driver.teeth} cannot stand with a worm: the worm is the driver; allowed: leave "
                         "out driver on a worm stage")
    wheel = stage.driven
    if wheel.hand is not None or wheel.hub is not None or wheel.flat is not None or wheel.keyway is not None:
        raise InputError("driven: hand, hub, flat and keyway are not taken on a worm wheel (the wheel is the worm's "
                         "generated section, with a round bore); allowed: teeth, shift, bore")


@dataclass(frozen=True)
class SolverSpec:
    """A ratio to solve for when the train file lists no stages (the solver's options)."""

    ratio: str
    stages: int | None = None
    min_teeth: int | None = None
    max_teeth: int | None = None
    max_stage_ratio: float | None = None
    direction: str | None = None
    hunting: bool = False
    coaxial: bool = False
    exclude: tuple[int, ...] = ()


@dataclass(frozen=True)
class PlanetarySpec:
    """A planetary set: teeth of sun, planet (at the sun), ring, planet gear at the ring (stepped), the planets,
    the fixed and input members (the third is the output), and the largest profile shift allowed."""

    sun: int
    planet: int
    ring: int
    planets: int = 3
    planet_ring: int | None = None
    fixed: str = "ring"
    input: str | None = None
    shift_limit: float | None = None
    helix: float = 0.0  # degrees; the sun's hand is ``hand``, planets and ring take the other
    hand: str = "right"
    herringbone: bool = False
    gap: float = 0.0
    worm: WormSpec | None = None

    def __post_init__(self) -> None:
        if self.worm is not None:
            _check_worm_stage(self)
        helix = finite(self.helix, "helix angle")
        if not 0.0 <= helix < 45.0:
            raise InputError(f"helix angle must be from 0 to below 45 degrees, got {self.helix!r}")
        if self.hand not in ("left", "right"):
            raise InputError(f"hand must be left or right, got {self.hand!r}")
        if self.herringbone and helix == 0:
            raise InputError("a herringbone set needs a helix angle above 0 degrees")
        if not (math.isfinite(self.gap) and self.gap >= 0) or (self.gap and not self.herringbone):
            raise InputError(f"gap must be 0 mm or more and belongs to a herringbone set, got {self.gap!r}")


DIFFERENTIALS = ("mean", "planetary")
JOINS = ("fused", "pinned", "flat")  # how the gears of a compound shaft are joined (gearcad.trains.joins)


@dataclass(frozen=True)
class SummingSpec:
    """The differential of a summing train; its two paths are the train's two stages (A, then B).

    ``differential``: ``mean`` (a spur differential: two equal suns, ``planets``
    pairs of meshing planets; the carrier turns at the mean of the suns) or
    ``planetary`` (sun driven by path A, ring by path B through teeth on its
    outside, carrier the output).  ``module``: the differential's module, mm
    (None: the train's).  ``tube``: outer diameter of the tubes that join each
    side's gears on the differential axle, mm (None: the bore plus 1 mm).
    ``axis_distance``: input shaft to differential axle, mm, needed only when
    both paths carry idlers (None: the least that clears).
    """

    differential: str = "mean"
    sun: int = 18  # 18/13 with 3 pairs: no undercut, contact ratios above 1.2, neighbours clear (checked in tests)
    planet: int = 13
    planets: int = 3
    ring: int | None = None
    module: float | None = None
    tube: float | None = None
    axis_distance: float | None = None
    shift_limit: float | None = None

    def __post_init__(self) -> None:
        if self.differential not in DIFFERENTIALS:
            raise InputError(f"differential must be one of {', '.join(DIFFERENTIALS)}, got {self.differential!r}")
        for key in ("sun", "planet", "planets"):
            object.__setattr__(self, key, as_int(getattr(self, key), key))
        if self.differential == "planetary" and self.ring is None:
            raise InputError("a planetary differential needs its ring's tooth count (ring = ...)")
        if self.differential == "mean" and self.ring is not None:
            raise InputError("a mean differential has no ring; leave out ring, or use differential = \"planetary\"")
        for key in ("module", "tube", "axis_distance"):
            value = getattr(self, key)
            if value is not None and not (math.isfinite(value) and value > 0):
                raise InputError(f"summing {key} must be greater than 0 mm, got {value!r}")
        if self.module is not None and not 0.01 <= self.module <= 100:
            raise InputError(f"summing module must be from 0.01 to 100 mm, got {self.module!r}")


@dataclass(frozen=True)
class TrainSpec:
    """A whole train: defaults for every gear and the stages.

    Lengths in mm; ``pressure_angle`` in degrees (None: the tooth system's).
    """

    name: str
    module: float
    thickness: float
    stages: tuple[StageSpec, ...]
    title: str = ""
    target: str | None = None
    tooth_system: str = "iso53-a"
    pressure_angle: float | None = None
    fabrication: str = "laser-3mm-acrylic"
    bore: float = 3.0
    coaxial: bool = False
    solver: SolverSpec | None = field(default=None, compare=False)
    planetary: PlanetarySpec | None = None
    summing: SummingSpec | None = None
    join: str | None = None  # how compound pairs are joined: fused, pinned or flat (None: the process's default)
    studs: tuple[str, ...] = ()  # shafts to hold as fixed studs in one plate, their gears on a pipe (by shaft name)
    target_tolerance: float | None = None

    def __post_init__(self) -> None:
        if self.join is not None and self.join not in JOINS:
            raise InputError(f"join must be one of {', '.join(JOINS)}, got {self.join!r}")
        if self.target_tolerance is not None and not (math.isfinite(self.target_tolerance)
                                                      and 0 < self.target_tolerance < 1):
            raise InputError(f"target_tolerance must be greater than 0 and less than 1 (a relative error), "
                             f"got {self.target_tolerance!r}")
        from ..inputfiles import plain_file_name

        plain_file_name(self.name, "train name")
        if not (math.isfinite(self.thickness) and self.thickness > 0):
            raise InputError(f"face width (thickness) must be greater than 0 mm, got {self.thickness!r}")
        if not (math.isfinite(self.module) and self.module > 0):
            raise InputError(f"module must be greater than 0 mm, got {self.module!r}")
        if not (math.isfinite(self.bore) and self.bore > 0):
            raise InputError(f"bore must be greater than 0 mm, got {self.bore!r}")
        if self.summing is not None and len(self.stages) != 2:
            raise InputError(f"a summing train needs exactly two [[stage]] tables (path A, path B), got {len(self.stages)}")
        for stage in self.stages:
            if stage.gap >= self.thickness:
                raise InputError(f"herringbone gap {stage.gap:g} mm must be narrower than the face width (thickness) {self.thickness:g} mm")
        if (self.summing is not None or self.planetary is not None) and any(s.helix for s in self.stages):
            raise InputError("helix is available on the stages of compound trains and in a [planetary] table; "
                             "summing trains take spur gears only (remove helix from their stages)")
        if self.planetary is not None and self.planetary.gap >= self.thickness:
            raise InputError(f"herringbone gap {self.planetary.gap:g} mm must be narrower than the face width "
                             f"(thickness) {self.thickness:g} mm")
        if self.summing is not None and (self.planetary is not None or self.coaxial):
            raise InputError("a summing train cannot also be planetary or coaxial")
        worms = [k for k, s in enumerate(self.stages) if s.worm is not None]
        if worms and (worms != [0] or self.coaxial or self.planetary is not None or self.summing is not None):
            raise InputError(f"worm on stage {worms[-1] + 1}: a worm stage must be the first [[stage]] (the input), one "
                             "worm a train, in a compound train that is not coaxial: the worm lies parallel to the "
                             "plates and is driven from outside the frame, so no spur gear can drive it")
        if not self.stages and self.solver is None and self.planetary is None:
            raise InputError("a train needs at least one [[stage]], or a [solve] table to find them")
