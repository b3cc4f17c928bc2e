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

import math
from dataclasses import dataclass

from ..errors import InputError
from ..geometry.involute import inv, inv_inverse
from ..profiles import ToothSystem
from ..validate import finite

__all__ = [
    "HANDS",
    "MAX_HELIX_DEGREES",
    "MIN_OVERLAP_RATIO",
    "TransverseSystem",
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

