"""Helical gears and pairs on parallel axes: the figures of ISO 21771:2007.

A helical gear is specified in its normal section (normal module ``m_n``, normal
pressure angle ``alpha_n`` of the basic rack, normal profile shift ``x_n``) and a
helix angle ``beta`` at the reference cylinder with a hand (left or right).  Its
transverse section, the plane normal to the axis, is an involute spur outline:

* transverse module ``m_t = m_n / cos(beta)``;
* transverse pressure angle ``tan(alpha_t) = tan(alpha_n) / cos(beta)``;
* the transverse section of the basic rack: addendum and dedendum unchanged in mm
  (``h cos(beta)`` in transverse modules), flanks at ``alpha_t``, and its tip round
  of radius ``rho`` becomes an ellipse with semi-axes ``rho / cos(beta)`` along
  the rack and ``rho`` across it (the rack's teeth are prisms; a plane cutting
  them at ``beta`` stretches the section along the rack by ``1 / cos(beta)``);
* transverse shift ``x_t = x_n cos(beta)`` (``x_t m_t = x_n m_n``: the same
  displacement in mm).

So the transverse section *is* a :class:`~gearcad.geometry.gear.SpurGear` of module
``m_t`` cut by the :class:`TransverseSystem`; every spur figure, check and outline
applies to it unchanged.  :class:`HelicalGear` is that spur gear with a hand and
the helical figures (lead, base helix angle, virtual tooth count).  The pair
figures (ISO 21771, clause 5; lengths mm, angles radians):

* ``inv(alpha_wt) = inv(alpha_t) + 2 tan(alpha_n) (x1 + x2) / (z1 + z2)``;
* ``a_w = m_n (z1 + z2) cos(alpha_t) / (2 cos(beta) cos(alpha_wt))``;
* lead ``p_z = pi d / tan(beta)``, base helix ``sin(beta_b) = sin(beta) cos(alpha_n)``;
* overlap ratio ``eps_beta = b sin(beta) / (pi m_n)``, total ``eps_gamma = eps_alpha + eps_beta``;
* virtual tooth count ``z_n = z / (cos²(beta_b) cos(beta))``;
* axial force ``F_a = F_t tan(beta)`` (on the reference cylinder).

Pure functions and frozen dataclasses; no I/O.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from ..errors import InputError
from ..geometry.gear import SHIFT_RANGE, SpurGear
from ..geometry.involute import inv, inv_inverse
from .pair import GearPair, make_pair
from ..profiles import ToothSystem
from ..validate import as_int, finite, in_range, positive

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

HANDS = ("right", "left")
MAX_HELIX_DEGREES = 45.0  # exclusive: beyond it the teeth are closer to a worm's thread than a gear's
MIN_OVERLAP_RATIO = 1.0  # common practice: at least one axial pitch in the face for quiet running


# -- the helix and its hand ---------------------------------------------------------------

def check_helix(degrees: float, what: str = "helix angle") -> float:
    """Helix angle in degrees from 0 to below 45, returned in radians; one-line error otherwise."""
    value = finite(degrees, what)
    if not 0.0 <= value < MAX_HELIX_DEGREES:
        raise InputError(f"{what} must be from 0 to below {MAX_HELIX_DEGREES:g} degrees, got {degrees!r}")
    return math.radians(value)


def check_hand(hand: str) -> str:
    """``"left"`` or ``"right"``; one-line error otherwise."""
    if hand not in HANDS:
        raise InputError(f"hand must be left or right, got {hand!r}")
    return hand


def opposite_hand(hand: str) -> str:
    """The other hand: an external mate's."""
    return "left" if check_hand(hand) == "right" else "right"


# -- single figures ------------------------------------------------------------------------

def transverse_module(normal_module: float, helix: float) -> float:
    """Transverse module ``m_t = m_n / cos(beta)``, mm (``helix`` in radians)."""
    return normal_module / math.cos(helix)


def transverse_pressure_angle(normal_pressure_angle: float, helix: float) -> float:
    """Transverse pressure angle ``atan(tan(alpha_n) / cos(beta))``, radians."""
    return math.atan(math.tan(normal_pressure_angle) / math.cos(helix))


def base_helix_angle(helix: float, normal_pressure_angle: float) -> float:
    """Base helix angle ``asin(sin(beta) cos(alpha_n))``, radians (ISO 21771)."""
    return math.asin(math.sin(helix) * math.cos(normal_pressure_angle))


def lead(reference_diameter: float, helix: float) -> float:
    """Lead ``p_z = pi d / tan(beta)``, mm (infinite for a spur gear)."""
    return math.inf if helix == 0 else math.pi * reference_diameter / math.tan(helix)


def helix_angle_at(diameter: float, reference_diameter: float, helix: float) -> float:
    """Helix angle on the cylinder of ``diameter`` (mm): ``atan(tan(beta) d_y / d)``, radians (one lead)."""
    return math.atan(math.tan(helix) * diameter / reference_diameter)


def virtual_teeth(teeth: int, helix: float, normal_pressure_angle: float) -> float:
    """Virtual tooth count ``z_n = z / (cos²(beta_b) cos(beta))`` of the normal section (ISO 21771)."""
    beta_b = base_helix_angle(helix, normal_pressure_angle)
    return teeth / (math.cos(beta_b) ** 2 * math.cos(helix))


def overlap_ratio(face_width: float, helix: float, normal_module: float) -> float:
    """Overlap ratio ``eps_beta = b sin(beta) / (pi m_n)`` (face width ``b`` in mm)."""
    return face_width * math.sin(helix) / (math.pi * normal_module)


def axial_force(tangential_force: float, helix: float) -> float:
    """Axial force of a helical mesh on each shaft, ``F_a = F_t tan(beta)`` (N, tangential force on the reference circle)."""
    return tangential_force * math.tan(helix)


def working_transverse_pressure_angle(teeth1: int, teeth2: int, normal_pressure_angle: float, helix: float,
                                      shift_sum: float) -> float:
    """Working transverse pressure angle (radians) for the normal shift sum ``x1 + x2`` (ISO 21771).

    ``inv(alpha_wt) = inv(alpha_t) + 2 tan(alpha_n) (x1 + x2) / (z1 + z2)``; ``z2`` negative for a ring.
    """
    alpha_t = transverse_pressure_angle(normal_pressure_angle, helix)
    value = inv(alpha_t) + 2 * math.tan(normal_pressure_angle) * shift_sum / (teeth1 + teeth2)
    if value <= 0:
        raise InputError(f"profile shift sum {shift_sum:g} is too negative for {teeth1}+{teeth2} teeth: no centre distance exists")
    return inv_inverse(value)


def helical_centre_distance(teeth1: int, teeth2: int, normal_module: float, normal_pressure_angle: float,
                            helix: float, shift_sum: float) -> float:
    """Zero-backlash centre distance ``m_n (z1 + z2) cos(alpha_t) / (2 cos(beta) cos(alpha_wt))``, mm."""
    alpha_t = transverse_pressure_angle(normal_pressure_angle, helix)
    alpha_wt = working_transverse_pressure_angle(teeth1, teeth2, normal_pressure_angle, helix, shift_sum)
    return normal_module * (teeth1 + teeth2) * math.cos(alpha_t) / (2 * math.cos(helix) * math.cos(alpha_wt))


def transverse_contact_ratio(tip_diameters: tuple[float, float], base_diameters: tuple[float, float],
                             centre_distance: float, working_pressure_angle: float, transverse_base_pitch: float) -> float:
    """Transverse contact ratio of an external pair (ISO 21771).

    ``eps_alpha = (sqrt(r_a1² - r_b1²) + sqrt(r_a2² - r_b2²) - a_w sin(alpha_wt)) / p_bt``.
    """
    rolls = [math.sqrt((da / 2) ** 2 - (db / 2) ** 2) for da, db in zip(tip_diameters, base_diameters)]
    return (sum(rolls) - centre_distance * math.sin(working_pressure_angle)) / transverse_base_pitch


# -- the transverse section as a spur gear -----------------------------------------------------

@dataclass(frozen=True)
class TransverseSystem(ToothSystem):
    """The transverse section of a basic rack at helix angle ``helix_angle``, lengths in transverse modules.

    Built by :func:`transverse_system`; ``normal`` is the basic rack in its normal
    section.  The tip round (``fillet_radius``, its semi-axis across the rack) is
    an ellipse stretched along the rack by :attr:`fillet_stretch`.
    """

    helix_angle: float = 0.0
    normal: ToothSystem | None = None

    @property
    def fillet_stretch(self) -> float:
        """``1 / cos(beta)``: the tip round's semi-axis along the rack over its radius."""
        return 1.0 / math.cos(self.helix_angle)

    @property
    def max_fillet_radius(self) -> float:
        """The normal rack's largest tip round, in transverse modules (the ellipse maps to it)."""
        if self.normal is None:
            return super().max_fillet_radius
        return self.normal.max_fillet_radius * math.cos(self.helix_angle)

    @property
    def straight_flank_depth(self) -> float:
        """Depth of the straight flank below the reference line, transverse modules: the normal one in mm."""
        if self.normal is None:
            return super().straight_flank_depth
        return self.normal.straight_flank_depth * math.cos(self.helix_angle)


def transverse_system(system: ToothSystem, helix: float) -> ToothSystem:
    """The basic rack ``system`` (normal section) seen in the transverse plane at ``helix`` radians.

    At ``helix == 0`` the system itself is returned, so a spur gear stays exactly a spur gear.
    """
    if helix == 0:
        return system
    if isinstance(system, TransverseSystem):
        raise InputError("the tooth system is already a transverse section")
    c = math.cos(helix)
    return TransverseSystem(
        name=system.name, title=system.title,
        pressure_angle=transverse_pressure_angle(system.pressure_angle, helix),
        addendum=system.addendum * c, dedendum=system.dedendum * c, fillet_radius=system.fillet_radius * c,
        standard=system.standard, note=system.note, sources=system.sources, helix_angle=helix, normal=system)


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


# -- the mesh's helical figures ----------------------------------------------------------------

@dataclass(frozen=True)
class HelicalMesh:
    """The helical figures of a pair of face width ``face_width``; lengths mm, angles radians.

    ``transverse_contact_ratio`` is the spur analysis' contact ratio of the transverse
    section; ``axial_forces`` (N, one per gear's shaft, equal and opposite on the two)
    are given when a tangential load is.
    """

    helix_angle: float
    hands: tuple[str, str]
    normal_module: float
    transverse_module: float
    normal_pressure_angle: float
    transverse_pressure_angle: float
    working_transverse_pressure_angle: float
    base_helix_angle: float
    leads: tuple[float, float]
    virtual_teeth: tuple[float, float]
    normal_shifts: tuple[float, float]
    face_width: float
    transverse_contact_ratio: float
    overlap_ratio: float
    normal_backlash: float

    @property
    def total_contact_ratio(self) -> float:
        """``eps_gamma = eps_alpha + eps_beta``."""
        return self.transverse_contact_ratio + self.overlap_ratio

    @property
    def axial_pitch(self) -> float:
        """Axial pitch ``pi m_n / sin(beta)``, mm."""
        return math.pi * self.normal_module / math.sin(self.helix_angle)

    def axial_force(self, tangential_force: float) -> float:
        """``F_a = F_t tan(beta)``, N, for a tangential force (N) on the reference circle."""
        return axial_force(tangential_force, self.helix_angle)


def helical_mesh(pair: GearPair, transverse_contact: float, transverse_backlash: float, face_width: float) -> HelicalMesh:
    """The helical figures of an external or internal ``pair`` of :class:`HelicalGear` (see :class:`HelicalMesh`).

    Parameters
    ----------
    pair : GearPair or InternalPair
        The pair; its gears (``gear1``/``gear2`` or ``pinion``/``ring``) are helical.
    transverse_contact : float
        Transverse contact ratio from the analysis of the transverse section.
    transverse_backlash : float
        Circumferential backlash on the working pitch circle, transverse plane, mm.
    face_width : float
        Face width in mesh, mm.
    """
    internal = not hasattr(pair, "gear1")
    g1, g2 = (pair.pinion, pair.ring) if internal else (pair.gear1, pair.gear2)
    width = positive(face_width, "face width", "mm")
    beta = g1.helix_angle
    alpha_wt = pair.operating_pressure_angle
    beta_b = g1.base_helix_angle
    alpha_n = g1.normal_pressure_angle
    return HelicalMesh(
        helix_angle=beta, hands=(g1.hand, g1.hand if internal else g2.hand), normal_module=g1.normal_module,
        transverse_module=g1.module, normal_pressure_angle=alpha_n, transverse_pressure_angle=g1.pressure_angle,
        working_transverse_pressure_angle=alpha_wt, base_helix_angle=beta_b,
        leads=(g1.lead, lead(g2.reference_diameter, beta)),
        virtual_teeth=(g1.virtual_teeth, virtual_teeth(g2.teeth, beta, alpha_n)),
        normal_shifts=(g1.normal_shift, g2.shift / math.cos(beta)), face_width=width,
        transverse_contact_ratio=transverse_contact, overlap_ratio=overlap_ratio(width, beta, g1.normal_module),
        normal_backlash=transverse_backlash * math.cos(alpha_wt) * math.cos(beta_b))


# -- findings ---------------------------------------------------------------------------------------

def hand_findings(hand1: str, hand2: str, internal: bool = False) -> list:
    """The hands of a pair: opposite on an external pair, the same on an internal one."""
    from .checks import Finding

    meshes = (hand1 == hand2) if internal else (hand1 != hand2)
    rule = "the same hand (internal pair)" if internal else "opposite hands (external pair)"
    if not meshes:
        return [Finding("hands", "failure", 0.0, 1.0,
                        f"hands {hand1} and {hand2} cannot mesh: parallel axes need {rule}")]
    return [Finding("hands", "ok", 1.0, 1.0, f"hands {hand1} and {hand2}: {rule}")]


def overlap_finding(mesh: HelicalMesh) -> "object":
    """Overlap ratio against :data:`MIN_OVERLAP_RATIO` (common practice): a warning below 1."""
    from .checks import Finding

    e = mesh.overlap_ratio
    if e < MIN_OVERLAP_RATIO:
        return Finding("overlap ratio", "warning", e, MIN_OVERLAP_RATIO,
                       f"overlap ratio {e:.3f} is below {MIN_OVERLAP_RATIO:g} (common practice): the face holds less than one "
                       f"axial pitch ({mesh.axial_pitch:.3f} mm), so the helix smooths the mesh only in part; "
                       "widen the face or raise the helix angle")
    return Finding("overlap ratio", "ok", e, MIN_OVERLAP_RATIO,
                   f"overlap ratio {e:.3f}, total contact ratio {mesh.total_contact_ratio:.3f}")


def in_normal_terms(analysis):
    """A spur analysis of a helical pair's transverse section with its undercut findings restated in normal shifts.

    The spur checks speak of transverse shifts ``x_t``; a helical gear is specified by
    ``x_n = x_t / cos(beta)``.  Every other finding holds in the transverse section as it stands.
    """
    import dataclasses

    def restate(finding):
        if not finding.check.startswith("undercut"):
            return finding
        label = finding.check[len("undercut "):]
        fig = analysis.gears[0 if label in ("gear 1", "pinion") else 1]
        gear = fig.gear
        from .checks import min_shift_without_undercut

        # least transverse shift by the rack-generation condition, the thinning's deeper feed included
        x_min_t = (min_shift_without_undercut(gear.teeth, gear.pressure_angle, gear.system.straight_flank_depth)
                   + gear.shift - gear.generating_shift)
        x_min = x_min_t / math.cos(gear.helix_angle)
        if fig.undercut:
            text = (f"{label} ({gear.teeth} teeth) is undercut: the cutter removes the foot of the involute; "
                    f"a normal profile shift of at least {x_min:+.3f} avoids it")
        else:
            text = f"{label} ({gear.teeth} teeth) is not undercut (least normal shift without undercut {x_min:+.3f})"
        return dataclasses.replace(finding, value=gear.normal_shift, limit=x_min, message=text)

    return dataclasses.replace(analysis, findings=tuple(restate(f) for f in analysis.findings))


def shaft_axial_forces(loads) -> dict[str, float]:
    """Net axial force (N, magnitude) on each shaft from the helical meshes of its gears.

    ``loads``: ``(shaft, hand, drives, force)`` per gear per mesh, ``force`` the mesh's ``F_t tan(beta)``
    (N) and ``drives`` whether the gear drives its mate in that mesh.  The mate pushes a driven tooth with
    the rotation and a driving tooth against it; the tooth's helix turns that push into an axial one whose
    sense follows the hand.  So on one shaft the thrusts of a driven and a driving gear of the same hand
    oppose (a countershaft's common practice), an idler's two meshes cancel, and opposite hands add.
    """
    net: dict[str, float] = {}
    for shaft, hand, drives, force in loads:
        sign = (1 if hand == "right" else -1) * (-1 if drives else 1)
        net[shaft] = net.get(shaft, 0.0) + sign * force
    return {shaft: abs(value) for shaft, value in net.items()}


def check_face_width(gears, face_width: float) -> None:
    """Refuse a face width (mm) over which a helical gear's section would turn a whole turn or more (a lead)."""
    for gear in gears:
        if hasattr(gear, "hand") and abs(gear.twist(face_width)) >= 2 * math.pi:
            raise InputError(f"face width {face_width:g} mm is as long as the lead of the {gear.teeth}-tooth helical gear "
                             f"({gear.lead:.4g} mm): use a narrower face or a smaller helix angle")


# -- laminations: a helical gear stacked from flat sheets -------------------------------------------

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
