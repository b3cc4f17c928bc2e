"""Cylindrical worm gearing: the figures of a worm and its wheel, friction, efficiency, self-locking.

Geometry after DIN 3975-1 / ISO/TR 10828 (terms and symbols of cylindrical worm gear pairs with
a 90 degree shaft angle; clause numbers not quoted, the definitions are the standards' own, from
memory):

* the worm has ``z1`` starts, axial module ``m_x`` (= the wheel's transverse module), diameter
  factor ``q = d1 / m_x`` and reference diameter ``d1 = q m_x``;
* lead angle ``gamma = atan(z1 / q)`` on the reference cylinder, axial pitch ``p_x = pi m_x``,
  lead ``p_z = z1 p_x``, normal module ``m_n = m_x cos(gamma)``;
* flank forms: **ZA** straight in the axial section (the pressure angle given is the axial one,
  ``alpha_x``), **ZI** an involute helicoid (the pressure angle given is the normal one at the
  reference cylinder, ``alpha_n``; the base cylinder ``d_b1 = d1 tan(gamma) / tan(gamma_b)`` with
  ``cos(gamma_b) = cos(gamma) cos(alpha_n)``); ``tan(alpha_n) = tan(alpha_x) cos(gamma)`` on the
  reference cylinder for both;
* the wheel: reference diameter ``d2 = z2 m_x``, throat (tip) diameter ``d_a2 = d2 + 2 m_x (h_a* + x2)``,
  root diameter ``d_f2 = d2 - 2 m_x (h_f* - x2)``, outside diameter ``d_e2 = d_a2 + m_x`` (the
  axial-module example of KHK's Gear Technical Reference prints 99 mm for a 96 mm throat at
  m_x 3, from memory), throat surface radius ``r_g = d1 / 2 - h_a* m_x``;
* centre distance with the wheel's profile shift ``a = (d1 + d2) / 2 + x2 m_x``;
* the worm: tip diameter ``d_a1 = d1 + 2 h_a* m_x``, root diameter ``d_f1 = d1 - 2 h_f* m_x``.

Basic rack ``h_a* = 1``, ``h_f* = 1.25`` (ISO 53 profile A proportions, the same as the example
quoted above, whose root diameters 36.5 and 82.5 mm follow from 1.25).

Face widths (our rules; each named where it is used):

* worm threaded length ``b1 = 2 sqrt(r_a2^2 - (a - r_a1)^2)``: the chord of the wheel's throat
  circle cut off by the worm's tip line in the mid-plane, i.e. the whole length over which a wheel
  tooth is inside the worm's tip cylinder (geometry);
* wheel face width ``b2 = 0.45 (d_a1 + 4 m_x)`` (a handbook rule for bronze wheels, from memory),
  no wider than the chord of the worm's tip circle at the wheel's throat,
  ``2 sqrt(r_a1^2 - (a - r_a2)^2)`` (geometry: wheel face beyond it meets no thread).

Contact ratio in the mid-plane: the worm's axial section acts as a rack (straight for ZA; for ZI
the tangent at the reference cylinder is used), so ISO 21771's rack-and-gear path of contact
applies with ``alpha_x`` and the rack's addendum ``h_a* m_x - x2 m_x`` beyond the wheel's pitch circle.

Friction and efficiency: :mod:`gearcad.meshes.worm_friction` (re-exported here).

Sliding speed ``v_g = pi d1 n1 / (60000 cos(gamma))`` m/s.  Pure computation: mm and radians
inside, no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..validate import as_int, finite, in_range, positive
from .checks import Finding
from .worm_friction import (COPPER_ALLOYS, FRICTION_PAIRS, SELF_LOCKING_CAUTION, Friction, copper_alloy_friction,
                            efficiency_wheel_driving, efficiency_worm_driving, friction_angle, worm_friction)

__all__ = [
    "WormPair", "WormAnalysis", "Friction", "make_worm_pair", "analyse_worm_pair", "worm_friction",
    "efficiency_worm_driving", "efficiency_wheel_driving", "friction_angle", "copper_alloy_friction",
    "min_wheel_teeth", "FLANK_FORMS", "FRICTION_PAIRS", "COPPER_ALLOYS", "SELF_LOCKING_CAUTION",
    "ADDENDUM", "DEDENDUM", "thread_form",
]

#: Flank forms built (ISO/TR 10828 letters): straight axial section, involute helicoid.
FLANK_FORMS = ("za", "zi")
#: Basic rack of the worm and wheel, modules (ISO 53 profile A proportions).
ADDENDUM, DEDENDUM = 1.0, 1.25
#: Bounds on the inputs (sizes a workshop meets; beyond them the figures lose meaning).
STARTS_RANGE = (1, 12)
WHEEL_TEETH_RANGE = (4, 2000)
MODULE_RANGE = (0.05, 50.0)  # mm
DIAMETER_FACTOR_RANGE = (3.0, 40.0)
PRESSURE_ANGLE_RANGE = (10.0, 30.0)  # degrees
SHIFT_RANGE = (-1.0, 1.0)
SPEED_RANGE = (0.0, 20000.0)  # rpm
FRICTION_RANGE = (0.005, 1.0)
#: Lead angle limits by flank form, degrees.  ZA: a lathe tool set in the axial plane loses side
#: clearance on the trailing flank beyond about 15 degrees, so steeper worms are made ZN or ZI
#: (common practice).  Every form: beyond 45 degrees the "worm" is a crossed helical gear (ISO/TR 10828's
#: scope ends there; from memory).  ZI is further bounded by its base cylinder: it must lie within the
#: worm's working depth, ``d_b1 <= d1 - 2 h_a* m_x``, where the wheel's throat reaches (geometry).
MAX_LEAD_ANGLE = {"za": 15.0, "zi": 45.0}
#: Least efficiency before a warning: more than half the power becomes heat (common practice).
MIN_EFFICIENCY = 0.5
#: Least diameter factor before a warning: a slenderer worm bends under the tooth load (common practice).
MIN_DIAMETER_FACTOR = 6.0

@dataclass(frozen=True)
class WormPair:
    """A cylindrical worm and its wheel, shaft angle 90 degrees.

    Attributes
    ----------
    starts : int
        Number of starts (threads) of the worm, ``z1``.
    wheel_teeth : int
        Teeth of the wheel, ``z2``.
    module : float
        Axial module of the worm = transverse module of the wheel, mm.
    diameter_factor : float
        ``q = d1 / m_x``.
    pressure_angle : float
        The pressure angle as given, radians: axial for ZA, normal for ZI.
    flank : str
        ``"za"`` or ``"zi"``.
    wheel_shift : float
        Profile shift coefficient of the wheel, ``x2``.
    """

    starts: int
    wheel_teeth: int
    module: float
    diameter_factor: float
    pressure_angle: float
    flank: str = "za"
    wheel_shift: float = 0.0

    @property
    def ratio(self) -> float:
        """Worm turns per wheel turn, ``z2 / z1``."""
        return self.wheel_teeth / self.starts

    @property
    def lead_angle(self) -> float:
        """``gamma = atan(z1 / q)`` on the reference cylinder, radians."""
        return math.atan2(self.starts, self.diameter_factor)

    @property
    def axial_pitch(self) -> float:
        """``p_x = pi m_x``, mm."""
        return math.pi * self.module

    @property
    def lead(self) -> float:
        """``p_z = z1 p_x``: the axial advance of one thread in one turn, mm."""
        return self.starts * self.axial_pitch

    @property
    def normal_module(self) -> float:
        """``m_n = m_x cos(gamma)``, mm."""
        return self.module * math.cos(self.lead_angle)

    @property
    def axial_pressure_angle(self) -> float:
        """``alpha_x`` on the reference cylinder, radians."""
        if self.flank == "za":
            return self.pressure_angle
        return math.atan(math.tan(self.pressure_angle) / math.cos(self.lead_angle))

    @property
    def normal_pressure_angle(self) -> float:
        """``alpha_n`` on the reference cylinder, radians."""
        if self.flank == "za":
            return math.atan(math.tan(self.pressure_angle) * math.cos(self.lead_angle))
        return self.pressure_angle

    @property
    def reference_diameter(self) -> float:
        """Worm reference diameter ``d1 = q m_x``, mm."""
        return self.diameter_factor * self.module

    @property
    def tip_diameter(self) -> float:
        """Worm tip diameter ``d_a1 = d1 + 2 h_a* m_x``, mm."""
        return self.reference_diameter + 2 * ADDENDUM * self.module

    @property
    def root_diameter(self) -> float:
        """Worm root diameter ``d_f1 = d1 - 2 h_f* m_x``, mm."""
        return self.reference_diameter - 2 * DEDENDUM * self.module

    @property
    def base_diameter(self) -> float | None:
        """ZI: the base cylinder ``d_b1 = d1 tan(gamma) / tan(gamma_b)``, mm; None for ZA."""
        if self.flank != "zi":
            return None
        gamma = self.lead_angle
        gamma_b = math.acos(math.cos(gamma) * math.cos(self.pressure_angle))
        return self.reference_diameter * math.tan(gamma) / math.tan(gamma_b)

    @property
    def wheel_reference_diameter(self) -> float:
        """``d2 = z2 m_x``, mm."""
        return self.wheel_teeth * self.module

    @property
    def throat_diameter(self) -> float:
        """The wheel's tip diameter in the mid-plane ``d_a2 = d2 + 2 m_x (h_a* + x2)``, mm."""
        return self.wheel_reference_diameter + 2 * self.module * (ADDENDUM + self.wheel_shift)

    @property
    def outside_diameter(self) -> float:
        """The wheel's largest diameter, at the edges of its face ``d_e2 = d_a2 + m_x``, mm."""
        return self.throat_diameter + self.module

    @property
    def wheel_root_diameter(self) -> float:
        """``d_f2 = d2 - 2 m_x (h_f* - x2)``, mm."""
        return self.wheel_reference_diameter - 2 * self.module * (DEDENDUM - self.wheel_shift)

    @property
    def throat_radius(self) -> float:
        """Radius of the wheel's concave rim (throat surface), ``r_g = a - d_a2 / 2``, mm."""
        return self.centre_distance - self.throat_diameter / 2

    @property
    def centre_distance(self) -> float:
        """``a = (d1 + d2) / 2 + x2 m_x``, mm."""
        return (self.reference_diameter + self.wheel_reference_diameter) / 2 + self.wheel_shift * self.module

    @property
    def worm_length(self) -> float:
        """Least threaded length: the chord of the wheel's throat circle outside the worm's tip line, mm."""
        r_a2, depth = self.throat_diameter / 2, self.centre_distance - self.tip_diameter / 2
        return 2 * math.sqrt(max(r_a2 ** 2 - depth ** 2, 0.0))

    @property
    def wheel_face_width(self) -> float:
        """``0.45 (d_a1 + 4 m_x)``, capped by the chord of the worm's tip circle at the throat, mm."""
        rule = 0.45 * (self.tip_diameter + 4 * self.module)
        r_a1, depth = self.tip_diameter / 2, self.centre_distance - self.throat_diameter / 2
        return min(rule, 2 * math.sqrt(max(r_a1 ** 2 - depth ** 2, 0.0)))

    @property
    def midplane_contact_ratio(self) -> float:
        """Contact ratio in the wheel's mid-plane (worm's axial section as the rack), dimensionless."""
        alpha = self.axial_pressure_angle
        r2 = self.wheel_reference_diameter / 2
        r_b2 = r2 * math.cos(alpha)
        r_a2 = self.throat_diameter / 2
        rack = (ADDENDUM - self.wheel_shift) * self.module  # the worm's tip line beyond the wheel's pitch circle
        path = math.sqrt(r_a2 ** 2 - r_b2 ** 2) - r2 * math.sin(alpha) + rack / math.sin(alpha)
        return path / (self.axial_pitch * math.cos(alpha))

    def sliding_speed(self, worm_speed: float) -> float:
        """Sliding speed at the worm's reference cylinder for ``worm_speed`` rpm, m/s."""
        return math.pi * self.reference_diameter * worm_speed / (60_000.0 * math.cos(self.lead_angle))


def _zi_base_fits(pair: WormPair) -> bool:
    return pair.base_diameter <= pair.reference_diameter - 2 * ADDENDUM * pair.module + 1e-12


def min_wheel_teeth(axial_pressure_angle: float, wheel_shift: float = 0.0) -> float:
    """Fewest wheel teeth the worm (as a hob) generates without undercut in the mid-plane.

    The rack-generation limit of ISO 21771 with the rack's addendum ``h_a* - x2``:
    ``z2 >= 2 (h_a* - x2) / sin^2(alpha_x)`` (17.1 for 20 degrees and no shift).
    """
    return 2 * (ADDENDUM - wheel_shift) / math.sin(axial_pressure_angle) ** 2


def make_worm_pair(starts: object, wheel_teeth: object, module: object, *, diameter_factor: object = None,
                   worm_diameter: object = None, pressure_angle: float = 20.0, flank: str = "za",
                   wheel_shift: object = 0.0) -> WormPair:
    """Validate the inputs and build a :class:`WormPair`.

    Parameters
    ----------
    starts, wheel_teeth : int
        ``z1`` and ``z2``.
    module : float
        Axial module, mm.
    diameter_factor : float, optional
        ``q``; give this or ``worm_diameter``.
    worm_diameter : float, optional
        Worm reference diameter ``d1``, mm.
    pressure_angle : float
        Degrees: axial for ZA, normal for ZI.
    flank : str
        ``"za"`` or ``"zi"``.
    wheel_shift : float
        Profile shift coefficient of the wheel.

    Raises
    ------
    InputError
        A value out of range (named with the allowed range), a lead angle beyond the flank form's
        range, or too few wheel teeth for the pressure angle (undercut in the mid-plane).
    """
    z1 = as_int(starts, "worm starts")
    if not STARTS_RANGE[0] <= z1 <= STARTS_RANGE[1]:
        raise InputError(f"worm starts must be from {STARTS_RANGE[0]} to {STARTS_RANGE[1]}, got {starts!r}")
    z2 = as_int(wheel_teeth, "wheel teeth")
    if not WHEEL_TEETH_RANGE[0] <= z2 <= WHEEL_TEETH_RANGE[1]:
        raise InputError(f"wheel teeth must be from {WHEEL_TEETH_RANGE[0]} to {WHEEL_TEETH_RANGE[1]}, got {wheel_teeth!r}")
    m = in_range(module, "module", *MODULE_RANGE, unit="mm")
    if (diameter_factor is None) == (worm_diameter is None):
        raise InputError("give exactly one of the diameter factor q and the worm reference diameter d1")
    if diameter_factor is not None:
        q = in_range(diameter_factor, "diameter factor q", *DIAMETER_FACTOR_RANGE)
    else:
        d1 = positive(worm_diameter, "worm reference diameter", "mm")
        low, high = (f * m for f in DIAMETER_FACTOR_RANGE)
        if not low <= d1 <= high:
            raise InputError(f"worm reference diameter must be from {low:g} to {high:g} mm at module {m:g} "
                             f"(diameter factor {DIAMETER_FACTOR_RANGE[0]:g} to {DIAMETER_FACTOR_RANGE[1]:g}), got {worm_diameter!r}")
        q = d1 / m
    if flank not in FLANK_FORMS:
        raise InputError(f"flank form must be one of {', '.join(FLANK_FORMS)}, got {flank!r}")
    alpha = in_range(pressure_angle, "pressure angle", *PRESSURE_ANGLE_RANGE, unit="degrees")
    x2 = in_range(finite(wheel_shift, "wheel shift"), "wheel shift", *SHIFT_RANGE)
    pair = WormPair(z1, z2, m, q, math.radians(alpha), flank, x2)
    gamma = math.degrees(pair.lead_angle)
    if gamma > MAX_LEAD_ANGLE[flank] + 1e-12:
        raise InputError(f"lead angle {gamma:.3f} degrees (atan({z1}/{q:g})) is beyond the {flank.upper()} flank "
                         f"form's range (up to {MAX_LEAD_ANGLE[flank]:g} degrees); allowed: fewer starts, a larger "
                         f"diameter factor{', or --flank zi' if flank == 'za' else ''}")
    if flank == "zi" and not _zi_base_fits(pair):
        raise InputError(f"lead angle {gamma:.3f} degrees puts the ZI worm's base cylinder ({pair.base_diameter:.4g} mm) "
                         f"above where the wheel's throat reaches ({pair.reference_diameter - 2 * m:.4g} mm); allowed: "
                         "a smaller lead angle (fewer starts or a larger diameter factor) or a larger pressure angle")
    least = min_wheel_teeth(pair.axial_pressure_angle, x2)
    if z2 < least:
        raise InputError(f"wheel teeth {z2} is too few for an axial pressure angle of "
                         f"{math.degrees(pair.axial_pressure_angle):.3f} degrees with wheel shift {x2:g}: the worm "
                         f"undercuts the wheel below {math.ceil(least - 1e-9)} teeth; allowed: at least "
                         f"{math.ceil(least - 1e-9)} teeth, a larger pressure angle or a positive wheel shift")
    if pair.root_diameter <= 0:
        raise InputError(f"diameter factor {q:g} leaves no worm core (root diameter {pair.root_diameter:.4g} mm); "
                         f"allowed: q above {2 * DEDENDUM:g}")
    return pair


@dataclass(frozen=True)
class WormAnalysis:
    """A worm pair's running figures and checks.

    Attributes
    ----------
    pair : WormPair
    worm_speed : float
        Worm speed the friction was taken at, rpm (0: starting from rest).
    sliding_speed : float
        m/s.
    friction : Friction
    friction_angle_low, friction_angle_high : float
        ``rho'`` for the low and high friction, radians.
    efficiency : float
        Worm driving, with the high friction (the figure to size a motor by).
    efficiency_best : float
        Worm driving, with the low friction.
    wheel_driving_efficiency : float
        Wheel driving, with the low friction (0 when self-locking).
    self_locking : bool
        ``gamma <= rho'`` with the low friction.
    findings : tuple of Finding
    """

    pair: WormPair
    worm_speed: float
    sliding_speed: float
    friction: Friction
    friction_angle_low: float
    friction_angle_high: float
    efficiency: float
    efficiency_best: float
    wheel_driving_efficiency: float
    self_locking: bool
    findings: tuple[Finding, ...]

    @property
    def worst(self) -> str:
        """The worst severity of the findings."""
        order = ("ok", "warning", "failure")
        return max((f.severity for f in self.findings), key=order.index, default="ok")


def analyse_worm_pair(pair: WormPair, *, worm_speed: object = 0.0, worm_material: str = "mild-steel",
                      wheel_material: str = "bronze", friction: object = None) -> WormAnalysis:
    """Friction, efficiency, self-locking and the checks of a worm pair.

    Parameters
    ----------
    pair : WormPair
    worm_speed : float
        Worm speed, rpm (0: judged from rest).
    worm_material, wheel_material : str
        Material profile names, for the friction table.
    friction : float, optional
        A friction coefficient that replaces the table (used for low and high alike).
    """
    n1 = in_range(worm_speed, "worm speed", *SPEED_RANGE, unit="rpm")
    v = pair.sliding_speed(n1)
    if friction is not None:
        mu = in_range(friction, "friction coefficient", *FRICTION_RANGE)
        fr = Friction(mu, mu, "given by the user")
    else:
        fr = worm_friction(worm_material, wheel_material, v)
    alpha_n, gamma = pair.normal_pressure_angle, pair.lead_angle
    rho_low, rho_high = friction_angle(fr.low, alpha_n), friction_angle(fr.high, alpha_n)
    eta = efficiency_worm_driving(gamma, rho_high)
    best = efficiency_worm_driving(gamma, rho_low)
    back = efficiency_wheel_driving(gamma, rho_low)
    locking = gamma <= rho_low
    findings = _findings(pair, eta, locking, back, gamma, rho_low, rho_high)
    return WormAnalysis(pair, n1, v, fr, rho_low, rho_high, eta, best, back, locking, tuple(findings))


def _findings(pair: WormPair, eta: float, locking: bool, back: float, gamma: float, rho_low: float,
              rho_high: float) -> list[Finding]:
    out = []
    eps = pair.midplane_contact_ratio
    from .checks import MIN_CONTACT_RATIO

    if eps < 1.0:
        out.append(Finding("contact ratio", "failure", eps, 1.0,
                           f"mid-plane contact ratio {eps:.3f} is below 1: the drive is not continuous"))
    elif eps < MIN_CONTACT_RATIO:
        out.append(Finding("contact ratio", "warning", eps, MIN_CONTACT_RATIO,
                           f"mid-plane contact ratio {eps:.3f} is below {MIN_CONTACT_RATIO} (common practice)"))
    else:
        out.append(Finding("contact ratio", "ok", eps, MIN_CONTACT_RATIO, f"mid-plane contact ratio {eps:.3f}"))
    if eta < MIN_EFFICIENCY:
        out.append(Finding("efficiency", "warning", eta, MIN_EFFICIENCY,
                           f"worm-driving efficiency {eta:.1%}: more than half the input power becomes heat; "
                           "size the motor and the cooling for it"))
    else:
        out.append(Finding("efficiency", "ok", eta, MIN_EFFICIENCY, f"worm-driving efficiency {eta:.1%}"))
    if locking:
        out.append(Finding("self-locking", "warning", math.degrees(gamma), math.degrees(rho_low),
                           f"self-locking from rest (lead angle {math.degrees(gamma):.2f} <= friction angle "
                           f"{math.degrees(rho_low):.2f} deg); {SELF_LOCKING_CAUTION}"))
    else:
        partly = " with the higher friction it may hold," if gamma <= rho_high else ""
        out.append(Finding("self-locking", "ok", math.degrees(gamma), math.degrees(rho_low),
                           f"not self-locking: the wheel can drive the worm back ({back:.1%} efficiency);{partly} "
                           "a load on the wheel needs a brake or a holding motor"))
    q = pair.diameter_factor
    if q < MIN_DIAMETER_FACTOR:
        out.append(Finding("diameter factor", "warning", q, MIN_DIAMETER_FACTOR,
                           f"diameter factor {q:.3g}: a slender worm bends under the tooth load and the mesh opens; "
                           f"support it close to the thread or take q >= {MIN_DIAMETER_FACTOR:g} (common practice)"))
    return out


def thread_form(pair: WormPair) -> "ThreadForm":
    """The pair as the hob simulation and the solids take it (:class:`gearcad.geometry.worm_wheel.ThreadForm`)."""
    from ..geometry.worm_wheel import ThreadForm

    return ThreadForm(pair.starts, pair.wheel_teeth, pair.module, pair.reference_diameter / 2, pair.tip_diameter / 2,
                      pair.root_diameter / 2, pair.flank, pair.axial_pressure_angle,
                      (pair.base_diameter or 0.0) / 2, pair.centre_distance, pair.worm_length,
                      pair.throat_diameter / 2, pair.outside_diameter / 2, pair.throat_radius, pair.wheel_face_width)
