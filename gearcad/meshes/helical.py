"""Helical gears, rings and pairs on parallel axes: ISO 21771:2007 transverse sections with a hand.

The helix formulas live in :mod:`gearcad.meshes.helix`, the mesh's helical figures in
:mod:`gearcad.meshes.helical_mesh`, the stacked-sheet approximation in :mod:`gearcad.meshes.laminations`;
this module re-exports them, so ``gearcad.meshes.helical`` stays the one place to import from.

Pure functions and frozen dataclasses; no I/O.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from ..errors import InputError
from ..geometry.gear import SHIFT_RANGE, SpurGear
from .pair import GearPair, make_pair
from ..profiles import ToothSystem
from ..validate import as_int, finite, in_range, positive
from .helix import (HANDS, MAX_HELIX_DEGREES, MIN_OVERLAP_RATIO, TransverseSystem, axial_force, base_helix_angle,
                    check_hand, check_helix, helical_centre_distance, helix_angle_at, lead, opposite_hand, overlap_ratio,
                    transverse_contact_ratio, transverse_module, transverse_pressure_angle, transverse_system,
                    virtual_teeth, working_transverse_pressure_angle)
from .helical_mesh import (HelicalMesh, check_face_width, hand_findings, helical_mesh, in_normal_terms, overlap_finding,
                           shaft_axial_forces)
from .laminations import MAX_LAMINATIONS, lamination_parts, lamination_turns, section_turn

__all__ = [
    "HANDS",
    "MAX_HELIX_DEGREES",
    "MIN_OVERLAP_RATIO",
    "TransverseSystem",
    "HelicalGear",
    "HelicalRing",
    "as_helical_ring",
    "HelicalMesh",
    "check_helix",
    "check_hand",
    "opposite_hand",
    "transverse_module",
    "transverse_pressure_angle",
    "base_helix_angle",
    "lead",
    "helix_angle_at",
    "virtual_teeth",
    "overlap_ratio",
    "axial_force",
    "working_transverse_pressure_angle",
    "helical_centre_distance",
    "transverse_contact_ratio",
    "transverse_system",
    "helical_gear",
    "make_helical_pair",
    "make_helical_internal_pair",
    "helical_mesh",
    "hand_findings",
    "overlap_finding",
    "in_normal_terms",
    "section_turn",
    "lamination_turns",
    "lamination_parts",
    "MAX_LAMINATIONS",
    "check_face_width",
    "shaft_axial_forces",
]


class _HelixFigures:
    """Helical figures shared by :class:`HelicalGear` and :class:`HelicalRing` (needs ``system``, ``hand``)."""

    @property
    def helix_angle(self) -> float:
        """Helix angle at the reference cylinder, radians (>= 0; the hand says which way)."""
        return self.system.helix_angle

    @property
    def helix_sign(self) -> int:
        """+1 for a right hand, -1 for a left hand (the sign of the twist seen along +z)."""
        return 1 if self.hand == "right" else -1

    @property
    def normal_module(self) -> float:
        """Normal module ``m_n = m_t cos(beta)``, mm."""
        return self.module * math.cos(self.helix_angle)

    @property
    def normal_pressure_angle(self) -> float:
        """Normal pressure angle of the basic rack, radians."""
        return self.system.normal.pressure_angle

    @property
    def normal_shift(self) -> float:
        """Normal profile shift coefficient ``x_n = x_t / cos(beta)``."""
        return self.shift / math.cos(self.helix_angle)

    @property
    def lead(self) -> float:
        """Lead ``pi d / tan(beta)``, mm."""
        return lead(self.reference_diameter, self.helix_angle)

    def twist(self, face_width: float) -> float:
        """Turn of the transverse section over ``face_width`` (mm), radians: ``b tan(beta) / r``, signed by the hand.

        Positive (counter-clockwise seen from +z) for a right hand as z grows.
        """
        return self.helix_sign * face_width * math.tan(self.helix_angle) / (self.reference_diameter / 2)


@dataclass(frozen=True)
class HelicalGear(_HelixFigures, SpurGear):
    """A helical gear as its transverse section (a spur gear of module ``m_t``) with a hand.

    ``module``, ``shift``, ``thinning`` and ``tip_shortening`` are transverse figures
    (mm on the reference circle, coefficients of ``m_t``); :func:`helical_gear` builds
    one from the normal figures.  ``system`` is a :class:`TransverseSystem`.
    """

    hand: str = "right"

    def __post_init__(self) -> None:
        check_hand(self.hand)
        if not isinstance(self.system, TransverseSystem):
            raise InputError("a helical gear needs the transverse section of its tooth system (transverse_system)")
        super().__post_init__()

    @property
    def normal_tooth_thickness(self) -> float:
        """Normal tooth thickness at the reference cylinder ``s_n = s_t cos(beta)``, mm."""
        return self.tooth_thickness * math.cos(self.helix_angle)

    @property
    def base_helix_angle(self) -> float:
        """Base helix angle, radians."""
        return base_helix_angle(self.helix_angle, self.normal_pressure_angle)

    @property
    def virtual_teeth(self) -> float:
        """Virtual tooth count of the normal section."""
        return virtual_teeth(self.teeth, self.helix_angle, self.normal_pressure_angle)


def _ring_class():
    from ..geometry.internal import RingGear

    @dataclass(frozen=True)
    class HelicalRing(_HelixFigures, RingGear):
        """A helical ring (internal gear) as its transverse section with a hand; see :class:`HelicalGear`."""

        hand: str = "right"

        def __post_init__(self) -> None:
            check_hand(self.hand)
            if not isinstance(self.system, TransverseSystem):
                raise InputError("a helical ring needs the transverse section of its tooth system (transverse_system)")
            super().__post_init__()

    HelicalRing.__module__ = __name__
    HelicalRing.__qualname__ = "HelicalRing"
    return HelicalRing


HelicalRing = _ring_class()


def as_helical_ring(ring, hand: str):
    """The transverse-section ring ``ring`` (a RingGear cut with a :class:`TransverseSystem`) with a hand."""
    from ..geometry.internal import RingGear

    values = {f.name: getattr(ring, f.name) for f in dataclasses.fields(RingGear)}
    return HelicalRing(**values, hand=hand)


def helical_gear(teeth: int, normal_module: float, system: ToothSystem, helix: float, hand: str = "right", *,
                 shift: float = 0.0, thinning: float = 0.0, tip_shortening: float = 0.0) -> SpurGear:
    """A helical gear from its normal figures; a plain :class:`SpurGear` when ``helix`` is 0.

    Parameters
    ----------
    teeth : int
        Tooth count.
    normal_module : float
        Normal module ``m_n``, mm.
    system : ToothSystem
        Basic rack in the normal section.
    helix : float
        Helix angle at the reference cylinder, radians, from 0 to below 45 degrees.
    hand : str
        ``"right"`` or ``"left"``.
    shift : float
        Normal profile shift coefficient ``x_n``.
    thinning : float
        Transverse arc tooth thickness removed at the reference circle, mm.
    tip_shortening : float
        Tip shortening coefficient in normal modules.
    """
    helix = check_helix(math.degrees(finite(helix, "helix angle")))
    check_hand(hand)
    shift = in_range(shift, "profile shift", *SHIFT_RANGE)
    if helix == 0:
        return SpurGear(teeth, normal_module, system, shift=shift, thinning=thinning, tip_shortening=tip_shortening)
    c = math.cos(helix)
    normal_module = positive(normal_module, "module", "mm")
    return HelicalGear(teeth, normal_module / c, transverse_system(system, helix), shift=shift * c, thinning=thinning,
                       tip_shortening=tip_shortening * c, hand=hand)


def _as_helical(gear: SpurGear, hand: str) -> HelicalGear:
    return HelicalGear(gear.teeth, gear.module, gear.system, gear.shift, gear.thinning, gear.tip_shortening, hand=hand)


def make_helical_pair(teeth1: int, teeth2: int, normal_module: float, system: ToothSystem, helix: float,
                      hand: str = "right", *, shifts: tuple[float, float] | None = None, centre: float | None = None,
                      backlash: float = 0.0, centre_allowance: float = 0.0, shorten_tips: bool = True) -> GearPair:
    """An external helical pair (opposite hands) from its normal figures; see :func:`gearcad.meshes.pair.make_pair`.

    Parameters
    ----------
    teeth1, teeth2 : int
        Tooth counts.
    normal_module : float
        Normal module, mm.
    system : ToothSystem
        Basic rack in the normal section.
    helix : float
        Helix angle, radians (0 to below 45 degrees); 0 gives exactly :func:`make_pair`'s spur pair.
    hand : str
        Hand of gear 1; gear 2 has the other.
    shifts : (float, float), optional
        Normal profile shift coefficients.
    centre : float, optional
        Required zero-backlash centre distance, mm (the shift sum is shared as for spur pairs).
    backlash : float
        Circumferential backlash on the working pitch circle in the transverse plane, mm.
    centre_allowance, shorten_tips
        As for :func:`make_pair`.
    """
    helix = check_helix(math.degrees(finite(helix, "helix angle")))
    check_hand(hand)
    teeth1, teeth2 = as_int(teeth1, "tooth count"), as_int(teeth2, "tooth count")
    if shifts is not None:
        shifts = (in_range(shifts[0], "profile shift", *SHIFT_RANGE), in_range(shifts[1], "profile shift", *SHIFT_RANGE))
    normal_module = positive(normal_module, "module", "mm")
    if helix == 0:
        return make_pair(teeth1, teeth2, normal_module, system, shifts=shifts, centre=centre, backlash=backlash,
                         centre_allowance=centre_allowance, shorten_tips=shorten_tips)
    c = math.cos(helix)
    t_shifts = None if shifts is None else (shifts[0] * c, shifts[1] * c)
    pair = make_pair(teeth1, teeth2, normal_module / c, transverse_system(system, helix), shifts=t_shifts, centre=centre,
                     backlash=backlash, centre_allowance=centre_allowance, shorten_tips=shorten_tips)
    return GearPair(_as_helical(pair.gear1, hand), _as_helical(pair.gear2, opposite_hand(hand)),
                    pair.centre_distance, pair.centre_allowance)


def make_helical_internal_pair(pinion_teeth: int, ring_teeth: int, normal_module: float, system: ToothSystem, helix: float,
                               hand: str = "right", *, shifts: tuple[float, float] | None = None, backlash: float = 0.0,
                               centre_allowance: float = 0.0, shorten_tips: bool = True, cutter_teeth: int | None = None,
                               cutter_shift: float = 0.0):
    """A helical pinion in a helical ring of the same hand, from the normal figures; see
    :func:`gearcad.meshes.internal.make_internal_pair` (shifts in ISO 21771's signs, normal section).

    The ring is the transverse section cut by a helical pinion-type cutter; its flanks are exact
    involutes of the transverse base circle, while the cutter's tip round is taken as a circle of the
    normal radius in the transverse plane (the shaper cutter's own tip, an approximation of the root
    fillet only).  ``helix`` 0 gives exactly the spur pair.
    """
    from .internal import InternalPair, make_internal_pair

    helix = check_helix(math.degrees(finite(helix, "helix angle")))
    check_hand(hand)
    normal_module = positive(normal_module, "module", "mm")
    if shifts is not None:
        shifts = (in_range(shifts[0], "profile shift", *SHIFT_RANGE), in_range(shifts[1], "profile shift", *SHIFT_RANGE))
    if helix == 0:
        return make_internal_pair(pinion_teeth, ring_teeth, normal_module, system, shifts=shifts, backlash=backlash,
                                  centre_allowance=centre_allowance, shorten_tips=shorten_tips,
                                  cutter_teeth=cutter_teeth, cutter_shift=cutter_shift)
    c = math.cos(helix)
    t_shifts = None if shifts is None else (shifts[0] * c, shifts[1] * c)
    pair = make_internal_pair(pinion_teeth, ring_teeth, normal_module / c, transverse_system(system, helix), shifts=t_shifts,
                              backlash=backlash, centre_allowance=centre_allowance, shorten_tips=shorten_tips,
                              cutter_teeth=cutter_teeth, cutter_shift=cutter_shift)
    return InternalPair(_as_helical(pair.pinion, hand), as_helical_ring(pair.ring, hand), pair.centre_distance,
                        pair.centre_allowance)

