"""An internal pair: an external pinion meshing inside a ring gear.  Figures and checks.

Sign convention (see :mod:`gearcad.geometry.internal`): tooth counts and
diameters are positive; profile shifts keep ISO 21771's sign (positive towards
each gear's tooth tips).  Writing the ring's teeth as ``-z2`` turns the formulas
of :mod:`.internal_centre` into the external-pair formulas of ISO 21771, clause 5.

The zero-backlash centre distance and its derivation are in :mod:`.internal_centre`, the
interference checks in :mod:`.internal_interference`; this module re-exports both.
Lengths in mm, angles in radians.  Pure functions; no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .checks import (MIN_CONTACT_RATIO, MIN_TIP_THICKNESS, Finding, backlash_finding, clearance_findings,
                     min_shift_without_undercut)
from ..errors import GeometryError, InputError
from ..geometry.gear import PointedTeethError, SpurGear
from ..geometry.generate import tooth_profile
from ..geometry.internal import RingGear, ring_profile
from ..geometry.involute import inv
from ..profiles import ToothSystem
from ..validate import as_int, positive
from .internal_centre import (internal_centre_distance, internal_shift_sum_for_centre, internal_standard_centre_distance,
                              internal_working_pressure_angle)
from .internal_interference import (MAX_TOOTH_DIFFERENCE, TROCHOID_LIMIT, involute_clearance, least_tooth_difference,
                                    require_tooth_difference, trochoid_depth)

__all__ = [
    "InternalPair",
    "InternalAnalysis",
    "RingFigures",
    "make_internal_pair",
    "analyse_internal_pair",
    "internal_standard_centre_distance",
    "internal_working_pressure_angle",
    "internal_centre_distance",
    "internal_shift_sum_for_centre",
    "least_tooth_difference",
    "require_tooth_difference",
    "trochoid_depth",
    "TROCHOID_LIMIT",
    "MAX_TOOTH_DIFFERENCE",
]

@dataclass(frozen=True)
class InternalPair:
    """A pinion inside a ring gear on parallel axes.

    Attributes
    ----------
    pinion : SpurGear
        The external gear (rack-cut).
    ring : RingGear
        The internal gear (pinion-cutter-cut).
    centre_distance : float
        Centre distance as built, mm.
    centre_allowance : float
        How much closer the axes are set than the zero-backlash distance, mm
        (for an internal pair, moving the pinion towards the ring's axis opens backlash).
    """

    pinion: SpurGear
    ring: RingGear
    centre_distance: float
    centre_allowance: float = 0.0

    @property
    def module(self) -> float:
        """Common module, mm."""
        return self.pinion.module

    @property
    def pressure_angle(self) -> float:
        """Reference pressure angle, radians."""
        return self.pinion.pressure_angle

    @property
    def shift_sum(self) -> float:
        """``x1 + x2`` (ISO 21771 signs)."""
        return self.pinion.shift + self.ring.shift

    @property
    def tooth_difference(self) -> int:
        """``z2 - z1``."""
        return self.ring.teeth - self.pinion.teeth

    @property
    def standard_centre_distance(self) -> float:
        """Reference centre distance ``m (z2 - z1) / 2``, mm."""
        return internal_standard_centre_distance(self.pinion.teeth, self.ring.teeth, self.module)

    @property
    def nominal_centre_distance(self) -> float:
        """Zero-backlash centre distance of the nominal (unthinned) teeth, mm."""
        return self.centre_distance + self.centre_allowance

    @property
    def working_pressure_angle(self) -> float:
        """Working pressure angle at the nominal centre distance, radians."""
        return internal_working_pressure_angle(self.pinion.teeth, self.ring.teeth, self.pressure_angle, self.shift_sum)

    @property
    def operating_pressure_angle(self) -> float:
        """Pressure angle at the centre distance as built, radians."""
        return math.acos(self.standard_centre_distance * math.cos(self.pressure_angle) / self.centre_distance)

    @property
    def centre_modification(self) -> float:
        """Centre-distance modification coefficient ``y = (a_w - a) / m`` (positive lengths)."""
        return (self.nominal_centre_distance - self.standard_centre_distance) / self.module

    @property
    def tip_shortening(self) -> float:
        """Coefficient ``k = (x1 + x2) + y`` that keeps the basic rack's bottom clearance (ISO 21771's ``x1 + x2 - y`` with signed y)."""
        return self.shift_sum + self.centre_modification

    def working_diameters(self) -> tuple[float, float]:
        """Working pitch diameters at the centre distance as built: ``2 a z_i / (z2 - z1)``, mm."""
        scale = 2 * self.centre_distance / self.tooth_difference
        return scale * self.pinion.teeth, scale * self.ring.teeth


def make_internal_pair(pinion_teeth: int, ring_teeth: int, module: float, system: ToothSystem, *,
                       shifts: tuple[float, float] | None = None, backlash: float = 0.0, centre_allowance: float = 0.0,
                       shorten_tips: bool = True, cutter_teeth: int | None = None, cutter_shift: float = 0.0) -> InternalPair:
    """Build an internal pair from tooth counts and profile shifts.

    Parameters
    ----------
    pinion_teeth, ring_teeth : int
        Tooth counts, both positive; the ring must have more.
    module : float
        Module, mm.
    system : ToothSystem
        Tooth system of both gears.
    shifts : (float, float), optional
        Profile shift coefficients of pinion and ring, ISO 21771 signs; default (0, 0).
    backlash : float
        Circumferential backlash from tooth thinning, mm on the working pitch
        circle; each gear is thinned by half of it (converted to its reference
        circle by ``cos(alpha_w) / cos(alpha)``).
    centre_allowance : float
        Set the axes this much closer than the zero-backlash distance, mm (more backlash).
    shorten_tips : bool
        Shorten both gears' tips by ``k m`` when ``k = x1 + x2 + y > 0`` to keep the bottom clearance.
    cutter_teeth, cutter_shift
        The ring's pinion-type cutter (see :class:`~gearcad.geometry.internal.RingGear`).
    """
    z1, z2 = as_int(pinion_teeth, "pinion tooth count"), as_int(ring_teeth, "ring tooth count")
    if z2 < 0:
        raise InputError(f"ring tooth count is a positive count here, got {z2}; give {-z2}")
    if z2 <= z1:
        raise InputError(f"ring tooth count must exceed the pinion's {z1}, got {z2}")
    module = positive(module, "module", "mm")
    if backlash < 0 or not math.isfinite(backlash):
        raise InputError(f"backlash must be 0 mm or more, got {backlash!r}")
    if centre_allowance < 0 or not math.isfinite(centre_allowance):
        raise InputError(f"centre-distance allowance must be 0 mm or more, got {centre_allowance!r}")
    x1, x2 = shifts if shifts is not None else (0.0, 0.0)
    try:
        SpurGear(z1, module, system, shift=x1)
    except PointedTeethError:
        if not shorten_tips:
            raise
    nominal = internal_centre_distance(z1, z2, module, system.pressure_angle, x1 + x2)
    y = (nominal - internal_standard_centre_distance(z1, z2, module)) / module
    k = max(x1 + x2 + y, 0.0) if shorten_tips else 0.0
    alpha_w = internal_working_pressure_angle(z1, z2, system.pressure_angle, x1 + x2)
    thinning = backlash / 2 * math.cos(alpha_w) / math.cos(system.pressure_angle)
    pinion = SpurGear(z1, module, system, shift=x1, thinning=thinning, tip_shortening=k)
    ring = RingGear(z2, module, system, shift=x2, thinning=thinning, tip_shortening=k,
                    cutter_teeth=cutter_teeth, cutter_shift=cutter_shift)
    built = nominal - centre_allowance
    if built <= internal_standard_centre_distance(z1, z2, module) * math.cos(system.pressure_angle):
        raise InputError(f"centre-distance allowance {centre_allowance:g} mm brings the axes inside the difference "
                         "of the base radii: the teeth no longer mesh")
    return InternalPair(pinion, ring, built, centre_allowance)


# -- analysis ----------------------------------------------------------------------------

@dataclass(frozen=True)
class RingFigures:
    """Figures of one gear of an internal pair, mm unless stated.

    ``form_diameter``: where the cut involute begins (pinion: above its root;
    ring: below its root, the outer end of the flank).  ``active_diameter``: the
    farthest point of the flank the mate's tip reaches (pinion: lowest; ring: outermost).
    """

    gear: SpurGear | RingGear
    undercut: bool
    min_shift: float
    form_diameter: float
    active_diameter: float
    working_diameter: float


@dataclass(frozen=True)
class InternalAnalysis:
    """Every figure and finding of an internal pair."""

    pair: InternalPair
    gears: tuple[RingFigures, RingFigures]
    contact_ratio: float
    backlash: float  # circumferential, on the working pitch circle, mm
    normal_backlash: float  # along the line of action, mm
    clearances: tuple[float, float]  # bottom clearance under the pinion's tip and under the ring's tip, mm
    involute_margin: float  # ring tip outside the pinion's interference point, mm
    trochoid_depth: float  # deepest tip overlap with the mate's involute teeth over the motion, mm
    fillet_depth: float  # deepest overlap of the ring's tips with the pinion's root fillet, mm
    least_difference: int | None  # least z2 - z1 for these shifts (None: none found)
    findings: tuple[Finding, ...]

    @property
    def worst(self) -> str:
        """The worst severity among the findings."""
        order = ("ok", "warning", "failure")
        return max((f.severity for f in self.findings), key=order.index, default="ok")


def _roll_length(tip_radius: float, base_radius: float) -> float:
    return math.sqrt(tip_radius ** 2 - base_radius ** 2)


def _backlash(pair: InternalPair) -> float:
    """Circumferential backlash on the working pitch circle at the built centre distance, mm."""
    alpha_op = pair.operating_pressure_angle
    d_w1, d_w2 = pair.working_diameters()
    p, r = pair.pinion, pair.ring
    s1 = d_w1 * (p.tooth_thickness / p.reference_diameter + inv(p.pressure_angle) - inv(alpha_op))
    s2 = d_w2 * (r.tooth_thickness / r.reference_diameter - inv(r.pressure_angle) + inv(alpha_op))
    return math.pi * d_w1 / p.teeth - s1 - s2


def analyse_internal_pair(pair: InternalPair) -> InternalAnalysis:
    """All figures and checks of ``pair``."""
    p, r = pair.pinion, pair.ring
    a, alpha_op = pair.centre_distance, pair.operating_pressure_angle
    rb1, ra1, rb2, ra2 = p.base_diameter / 2, p.tip_diameter / 2, r.base_diameter / 2, r.tip_diameter / 2
    along = a * math.sin(alpha_op)  # ring base tangent point to pinion base tangent point
    contact = (_roll_length(ra1, rb1) - _roll_length(ra2, rb2) + along) / p.base_pitch
    profile = tooth_profile(p, tolerance=1e-3)
    ring_reach = _roll_length(ra2, rb2) - along  # ring tip contact, from the pinion's base tangent point
    pinion_active = 2 * math.hypot(rb1, ring_reach) if ring_reach > 0 else p.base_diameter
    ring_active = 2 * math.hypot(rb2, along + _roll_length(ra1, rb1))
    d_w1, d_w2 = pair.working_diameters()
    x_min = min_shift_without_undercut(p.teeth, p.pressure_angle, p.system.straight_flank_depth)
    figures = (RingFigures(p, profile.undercut, x_min, profile.form_diameter, pinion_active, d_w1),
               RingFigures(r, False, math.nan, ring_profile(r, 1e-3).form_diameter, ring_active, d_w2))
    backlash = _backlash(pair)
    clearances = (r.root_diameter / 2 - a - ra1, ra2 - a - p.root_diameter / 2)
    margin = involute_clearance(a, alpha_op, r.tip_diameter, r.base_diameter)
    depth, fillet = trochoid_depth(p, r.teeth, r.tip_diameter, r.tooth_thickness, figures[1].form_diameter, a)
    try:
        least: int | None = least_tooth_difference(p, r.shift, limit=pair.tooth_difference + 20)
    except GeometryError:
        least = None
    findings = [_contact_finding(contact)]
    findings += _pinion_findings(figures[0])
    findings += _tip_finding(r, "gear 2 (ring)")
    findings.append(_involute_finding(margin, p, r))
    findings.append(_trochoid_finding(depth, pair))
    findings.append(_fillet_finding(fillet, pair))
    findings.append(_difference_finding(pair, least))
    findings += _active_findings(figures)
    findings += clearance_findings(pair.pinion.system.clearance * pair.module, clearances,
                                   (("gear 1", "the ring"), ("gear 2", "the pinion")))
    findings.append(backlash_finding(backlash, pair.operating_pressure_angle))
    return InternalAnalysis(pair, figures, contact, backlash, backlash * math.cos(alpha_op), clearances, margin, depth,
                            fillet, least, tuple(findings))


def _contact_finding(contact: float) -> Finding:
    if contact < 1.0:
        return Finding("contact-ratio", "failure", contact, 1.0,
                       f"contact ratio {contact:.3f} is below 1: the next tooth pair is not yet engaged when one lets go")
    if contact < MIN_CONTACT_RATIO:
        return Finding("contact-ratio", "warning", contact, MIN_CONTACT_RATIO,
                       f"contact ratio {contact:.3f} is below {MIN_CONTACT_RATIO} (common practice): little overlap, rough running")
    return Finding("contact-ratio", "ok", contact, MIN_CONTACT_RATIO,
                   f"contact ratio {contact:.3f}: {contact:.2f} tooth pairs in mesh on average")


def _tip_finding(gear: SpurGear | RingGear, label: str) -> list[Finding]:
    tip, m = gear.tip_thickness, gear.module
    limit = MIN_TIP_THICKNESS * m
    if tip < limit:
        return [Finding(f"tip thickness {label}", "warning", tip, limit,
                        f"{label} tip thickness {tip:.3f} mm ({tip / m:.3f} m) is under 0.25 m (common practice): thin tips chip and wear")]
    return [Finding(f"tip thickness {label}", "ok", tip, limit, f"{label} tip thickness {tip:.3f} mm ({tip / m:.3f} m)")]


def _pinion_findings(fig: RingFigures) -> list[Finding]:
    gear = fig.gear
    if fig.undercut:
        under = Finding("undercut gear 1", "warning", gear.shift, fig.min_shift,
                        f"the {gear.teeth}-tooth pinion is undercut by its rack cutter; a shift of at least "
                        f"{fig.min_shift:+.3f} avoids it")
    else:
        under = Finding("undercut gear 1", "ok", gear.shift, fig.min_shift,
                        f"the {gear.teeth}-tooth pinion is not undercut (least shift without undercut {fig.min_shift:+.3f})")
    return [under] + _tip_finding(gear, "gear 1")


def _involute_finding(margin: float, p: SpurGear, r: RingGear) -> Finding:
    if margin < 0:
        return Finding("involute interference", "failure", margin, 0.0,
                       f"the ring's tip circle lies {-margin:.4f} mm inside the pinion's interference point: the ring's "
                       f"tips dig into the pinion's flanks below its base circle; give the pinion more teeth, lower the "
                       "ring's shift (ISO sign) or shorten the ring's tips")
    return Finding("involute interference", "ok", margin, 0.0,
                   f"the ring's tip circle stays {margin:.4f} mm outside the pinion's interference point "
                   "(the line of action's tangent point on the pinion's base circle)")


def _trochoid_finding(depth: float, pair: InternalPair) -> Finding:
    limit = TROCHOID_LIMIT * pair.module
    if depth > limit:
        return Finding("trochoid interference", "failure", depth, limit,
                       f"as teeth pass in and out of mesh the tips overlap the mate's teeth by up to {depth:.4f} mm: "
                       "more ring teeth, a lower ring shift (ISO sign) or a larger working pressure angle clears them")
    return Finding("trochoid interference", "ok", depth, limit,
                   "the tip paths clear the mate's teeth all the way in and out of the mesh")


def _fillet_finding(depth: float, pair: InternalPair) -> Finding:
    limit = TROCHOID_LIMIT * pair.module
    if depth > limit:
        return Finding("fillet interference gear 1", "failure", depth, limit,
                       f"the ring's tip corners sweep {depth:.4f} mm into the pinion's root fillets below its form circle; "
                       "backlash (--backlash), a larger pinion shift or a lower ring shift (ISO sign) clears them")
    return Finding("fillet interference gear 1", "ok", depth, limit, "the ring's tip corners clear the pinion's root fillets")


def _difference_finding(pair: InternalPair, least: int | None) -> Finding:
    diff = pair.tooth_difference
    if least is None:
        return Finding("tooth-count difference", "failure", diff, math.nan,
                       f"no ring of up to {diff + 20} teeth more than the {pair.pinion.teeth}-tooth pinion clears its "
                       "tip paths with these shifts")
    if diff < least:
        return Finding("tooth-count difference", "failure", diff, least,
                       f"the ring has {diff} teeth more than the pinion; with these shifts it needs at least {least} "
                       f"({pair.pinion.teeth + least} teeth) for its teeth to clear the pinion's tip paths")
    return Finding("tooth-count difference", "ok", diff, least,
                   f"the ring has {diff} teeth more than the pinion; with these shifts {least} is the least whose "
                   "teeth clear the pinion's tip paths")


def _active_findings(figures: tuple[RingFigures, RingFigures]) -> list[Finding]:
    pin, ring = figures
    out = []
    if pin.active_diameter < pin.form_diameter - 1e-9:
        out.append(Finding("active flank gear 1", "warning", pin.active_diameter, pin.form_diameter,
                           f"the ring's tip reaches down to diameter {pin.active_diameter:.3f} mm on the pinion, below its "
                           f"form diameter {pin.form_diameter:.3f} mm: it meets undercut or fillet there"))
    else:
        out.append(Finding("active flank gear 1", "ok", pin.active_diameter, pin.form_diameter,
                           f"the ring's tip stays on the pinion's involute (down to diameter {pin.active_diameter:.3f} mm; "
                           f"form diameter {pin.form_diameter:.3f} mm)"))
    if ring.active_diameter > ring.form_diameter + 1e-9:
        out.append(Finding("active flank gear 2", "warning", ring.active_diameter, ring.form_diameter,
                           f"the pinion's tip reaches out to diameter {ring.active_diameter:.3f} mm in the ring, past its "
                           f"form diameter {ring.form_diameter:.3f} mm where the cut involute ends: it meets the fillet there"))
    else:
        out.append(Finding("active flank gear 2", "ok", ring.active_diameter, ring.form_diameter,
                           f"the pinion's tip stays on the ring's involute (out to diameter {ring.active_diameter:.3f} mm; "
                           f"form diameter {ring.form_diameter:.3f} mm)"))
    return out
