"""An internal pair: an external pinion meshing inside a ring gear.  Figures and checks.

Sign convention (see :mod:`gearcad.geometry.internal`): tooth counts and
diameters are positive; profile shifts keep ISO 21771's sign (positive towards
each gear's tooth tips).  Writing the ring's teeth as ``-z2`` turns the formulas
below into the external-pair formulas of ISO 21771, clause 5.

Zero-backlash meshing (derivation).  On the working pitch circles the pinion's
tooth must fill the ring's space: ``s_w1 = e_w2``, so ``s_w1 + s_w2 = p_w``.
With ``s_w1 = d_w1 (s1/d1 + inv(alpha) - inv(alpha_w))``, the ring's tooth
``s_w2 = d_w2 (s2/d2 - inv(alpha) + inv(alpha_w))`` (a ring tooth is an external
tooth space), ``s_i = m (pi/2 + 2 x_i tan(alpha))`` and ``p_w = pi d_w / z``:

``inv(alpha_w) = inv(alpha) - 2 tan(alpha) (x1 + x2) / (z2 - z1)``,
``a_w = (z2 - z1) m cos(alpha) / (2 cos(alpha_w))``.

Handbooks that count the ring's shift away from the axis write the first as
``inv(alpha) + 2 tan(alpha) (x2 - x1) / (z2 - z1)``: the same with ``x2 -> -x2``.
Lengths in mm, angles in radians.  Pure functions; no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .checks import (MIN_CONTACT_RATIO, MIN_TIP_THICKNESS, Finding, backlash_finding, clearance_findings,
                     min_shift_without_undercut)
from ..errors import GeometryError, InputError
from ..geometry.gear import PointedTeethError, SpurGear
from ..geometry.generate import tooth_profile
from ..geometry.internal import RingGear, ring_profile, ring_tooth_depth, to_inner_frame, to_ring_frame
from ..geometry.involute import inv, inv_inverse
from ..profiles import ToothSystem
from ..validate import as_int, positive

__all__ = [
    "InternalPair",
    "InternalAnalysis",
    "RingFigures",
    "make_internal_pair",
    "analyse_internal_pair",
    "internal_standard_centre_distance",
    "internal_working_pressure_angle",
    "internal_centre_distance",
    "least_tooth_difference",
    "require_tooth_difference",
    "trochoid_depth",
    "TROCHOID_LIMIT",
    "MAX_TOOTH_DIFFERENCE",
]

TROCHOID_LIMIT = 1e-6  # modules: a tip path deeper than this inside the mate's tooth is interference
MAX_TOOTH_DIFFERENCE = 80  # search bound of least_tooth_difference


def internal_standard_centre_distance(pinion_teeth: int, ring_teeth: int, module: float) -> float:
    """Reference centre distance ``m (z2 - z1) / 2``, mm (ISO 21771: ``m (z1 + z2) / 2`` with ``z2 < 0``, negated)."""
    return module * (ring_teeth - pinion_teeth) / 2


def internal_working_pressure_angle(pinion_teeth: int, ring_teeth: int, pressure_angle: float, shift_sum: float) -> float:
    """Working pressure angle (radians): ``inv(alpha_w) = inv(alpha) - 2 tan(alpha) (x1 + x2) / (z2 - z1)``.

    Shifts with ISO 21771's sign (module docstring).
    """
    if ring_teeth <= pinion_teeth:
        raise InputError(f"ring tooth count {ring_teeth} must exceed the pinion's {pinion_teeth}")
    value = inv(pressure_angle) - 2 * math.tan(pressure_angle) * shift_sum / (ring_teeth - pinion_teeth)
    if value <= 0:
        raise InputError(f"profile shift sum {shift_sum:g} is too large for a {pinion_teeth}-tooth pinion in a "
                         f"{ring_teeth}-tooth ring: no centre distance exists")
    return inv_inverse(value)


def internal_centre_distance(pinion_teeth: int, ring_teeth: int, module: float, pressure_angle: float,
                             shift_sum: float) -> float:
    """Zero-backlash centre distance ``a_w = (z2 - z1) m cos(alpha) / (2 cos(alpha_w))``, mm."""
    alpha_w = internal_working_pressure_angle(pinion_teeth, ring_teeth, pressure_angle, shift_sum)
    return internal_standard_centre_distance(pinion_teeth, ring_teeth, module) * math.cos(pressure_angle) / math.cos(alpha_w)



def internal_shift_sum_for_centre(pinion_teeth: int, ring_teeth: int, module: float, pressure_angle: float,
                                  centre: float) -> float:
    """The shift sum ``x1 + x2`` that gives zero backlash at ``centre`` (mm): the inverse of
    :func:`internal_centre_distance`, ``x1 + x2 = -(z2 - z1) (inv(alpha_w) - inv(alpha)) / (2 tan(alpha))`` with
    ``cos(alpha_w) = m (z2 - z1) cos(alpha) / (2 a)``."""
    difference = ring_teeth - pinion_teeth
    base = module * difference * math.cos(pressure_angle) / 2
    if not centre > base:
        raise InputError(f"centre distance {centre:g} mm is out of reach of an internal pair of {difference} teeth "
                         f"difference and module {module:g}: it must exceed {base:.4f} mm")
    return -difference * (inv(math.acos(base / centre)) - inv(pressure_angle)) / (2 * math.tan(pressure_angle))

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


# -- interference -----------------------------------------------------------------------

def _pinion_pitch(pinion: SpurGear) -> tuple[np.ndarray, np.ndarray, float]:
    """Pinion tooth 0 as generated: flank-and-tip points, pitch outline (space centre to space centre), form radius."""
    profile = tooth_profile(pinion, tolerance=1e-3 * pinion.module)
    keep = [c.points for c in profile.curves if c.kind in ("involute", "tip", "tip-round", "chamfer")]
    return np.concatenate(keep), profile.points(), profile.form_diameter / 2


def _pitch_depth(points: np.ndarray, pitch: np.ndarray, teeth: int) -> np.ndarray:
    """Depth (mm, negative outside) of points inside an external gear given one pitch of its outline.

    Points are folded into the pitch's sector (``|angle| <= pi/z``); inside means
    inside the polygon closed through the centre; depth is the distance to the
    pitch's polyline.
    """
    step = 2 * math.pi / teeth
    angle = np.arctan2(points[..., 1], points[..., 0])
    turn = -step * np.round(angle / step)
    c, s = np.cos(turn), np.sin(turn)
    px = (c * points[..., 0] - s * points[..., 1]).ravel()
    py = (s * points[..., 0] + c * points[..., 1]).ravel()
    ax, ay = pitch[:-1, 0][None, :], pitch[:-1, 1][None, :]
    bx, by = pitch[1:, 0][None, :], pitch[1:, 1][None, :]
    dx, dy = bx - ax, by - ay
    t = np.clip(((px[:, None] - ax) * dx + (py[:, None] - ay) * dy) / (dx * dx + dy * dy), 0.0, 1.0)
    distance = np.hypot(ax + t * dx - px[:, None], ay + t * dy - py[:, None]).min(axis=1)
    ring_x = np.concatenate([[0.0], pitch[:, 0]])  # closed through the centre
    ring_y = np.concatenate([[0.0], pitch[:, 1]])
    x0, y0 = ring_x[None, :], ring_y[None, :]
    x1, y1 = np.roll(ring_x, -1)[None, :], np.roll(ring_y, -1)[None, :]
    crosses = ((y0 > py[:, None]) != (y1 > py[:, None])) & (
        px[:, None] < x0 + (py[:, None] - y0) * (x1 - x0) / np.where(y1 != y0, y1 - y0, 1.0))
    inside = np.count_nonzero(crosses, axis=1) % 2 == 1
    return np.where(inside, distance, -distance).reshape(points.shape[:-1])


def _ring_points(ring_teeth: int, ring_tip_radius: float, ring_base_radius: float, space_half_angle: float,
                 count: int = 24) -> np.ndarray:
    """Points of one ring tooth's tip arc, corner to corner (space-centred frame)."""
    below = ring_tip_radius <= ring_base_radius  # flank taken radial inside the base circle
    corner = space_half_angle - (0.0 if below else inv(math.acos(ring_base_radius / ring_tip_radius)))
    angles = np.linspace(corner, 2 * math.pi / ring_teeth - corner, count)
    return ring_tip_radius * np.column_stack((np.cos(angles), np.sin(angles)))


def trochoid_depth(pinion: SpurGear, ring_teeth: int, ring_tip_diameter: float, ring_thickness: float,
                   ring_outer_diameter: float, centre_distance: float, samples: int = 3001) -> tuple[float, float]:
    """Deepest overlaps (mm) of pinion and ring teeth as the pinion rolls inside the ring.

    Each pinion tooth point (flanks and tip) is carried through one full turn
    relative to the line of centres and tested against the ring's involute teeth,
    and each ring tip point against the pinion's teeth as generated (fillet and
    undercut included).  Returns ``(tips, fillet)``: the greatest depth of a tip
    inside the mate's involute teeth (trochoid interference as teeth enter and
    leave the mesh), and of the ring's tips inside the pinion's root fillet
    (below its form circle).  0 for conjugate flanks touching, negative for clearance.

    Parameters
    ----------
    pinion : SpurGear
        The pinion.
    ring_teeth : int
        Ring tooth count.
    ring_tip_diameter, ring_thickness : float
        Ring tip (inner) diameter and arc tooth thickness at its reference circle, mm.
    ring_outer_diameter : float
        Diameter up to which the ring's flank is involute (its form diameter), mm.
    centre_distance : float
        Centre distance, mm.
    samples : int
        Positions over the turn.
    """
    z1, z2, m = pinion.teeth, ring_teeth, pinion.module
    alpha = pinion.pressure_angle
    rb2 = z2 * m * math.cos(alpha) / 2
    psi2 = ring_thickness / (z2 * m) - inv(alpha)
    space = (math.pi * m - ring_thickness) / (z2 * m) + inv(alpha)
    chi = np.linspace(-math.pi * z1 / z2, math.pi * z1 / z2, samples)
    flank, pitch, form_radius = _pinion_pitch(pinion)
    world = to_ring_frame(flank, z1, z2, centre_distance, chi)
    into_ring = float(ring_tooth_depth(world, z2, rb2, psi2, ring_tip_diameter / 2, ring_outer_diameter / 2).max())
    local = to_inner_frame(_ring_points(z2, ring_tip_diameter / 2, rb2, space), z1, z2, centre_distance, chi)
    radius = np.hypot(local[..., 0], local[..., 1])
    near = radius < pinion.tip_diameter / 2  # only these can be inside
    depth = _pitch_depth(local[near], pitch, z1) if near.any() else np.array([-m])
    low = radius[near] < form_radius
    tips = max(into_ring, float(depth[~low].max(initial=-m)))
    return tips, float(depth[low].max(initial=-m))


def _involute_clearance(centre: float, alpha_w: float, ring_tip: float, ring_base: float) -> float:
    """Radial margin (mm) of the ring's tip outside the pinion's interference point.

    The interference point is where the line of action touches the pinion's
    base circle, ``a sin(alpha_w)`` along the line from the ring's base tangent
    point: radius ``sqrt(r_b2² + (a sin(alpha_w))²)`` about the ring's axis.
    """
    return ring_tip / 2 - math.hypot(ring_base / 2, centre * math.sin(alpha_w))


def _clears_trochoid(pinion: SpurGear, ring_teeth: int, shift2: float) -> bool:
    """Whether a ring of ``ring_teeth`` with shift ``shift2`` (nominal teeth) clears the pinion's tip paths."""
    m, alpha, sys_ = pinion.module, pinion.pressure_angle, pinion.system
    try:
        a_w = internal_centre_distance(pinion.teeth, ring_teeth, m, alpha, pinion.shift + shift2)
    except InputError:
        return False
    d2 = ring_teeth * m
    tip = d2 - 2 * m * (sys_.addendum + shift2 - pinion.tip_shortening)
    thickness = m * (math.pi / 2 + 2 * shift2 * math.tan(alpha))
    base = d2 * math.cos(alpha)
    tip_half_angle = thickness / d2 - inv(alpha) + (inv(math.acos(base / tip)) if tip > base else 0.0)
    if tip_half_angle <= 0:  # pointed ring teeth
        return False
    outer = d2 + 2 * m * (sys_.dedendum - shift2)
    return trochoid_depth(pinion, ring_teeth, tip, thickness, outer, a_w, samples=901)[0] <= TROCHOID_LIMIT * m


def least_tooth_difference(pinion: SpurGear, ring_shift: float = 0.0, limit: int = MAX_TOOTH_DIFFERENCE) -> int:
    """Least ``z2 - z1`` for which a ring's teeth clear the tip paths of ``pinion`` (no trochoid interference).

    The ring has the same module and tooth system, the shift ``ring_shift``
    (ISO sign), nominal tips (shortened as much as the pinion's) and involute
    flanks out to the rack-form root; each difference from 1 upward is tried
    with :func:`trochoid_depth`, up to ``limit``.  Common
    practice quotes about 10 to 12 for 20 degree full-depth teeth without shift;
    this computes it.  Involute interference (the ring's tip against the
    pinion's interference point) is a separate condition.
    """
    for difference in range(1, limit + 1):
        if _clears_trochoid(pinion, pinion.teeth + difference, ring_shift):
            return difference
    raise GeometryError(f"no ring of up to {pinion.teeth + limit} teeth clears the tip paths of the "
                        f"{pinion.teeth}-tooth pinion (shift {pinion.shift:g}) at ring shift {ring_shift:g}")


def require_tooth_difference(pinion_teeth: int, ring_teeth: int, module: float, system: ToothSystem,
                             shifts: tuple[float, float] = (0.0, 0.0)) -> int:
    """Raise :class:`InputError` unless the ring has enough teeth for the pinion; return the least difference.

    For callers that must refuse such a ring outright (a planetary layout);
    ``gearcad pair`` reports it as a failed check instead.
    """
    pinion = SpurGear(as_int(pinion_teeth, "pinion tooth count"), module, system, shift=shifts[0])
    least = least_tooth_difference(pinion, shifts[1])
    if ring_teeth - pinion_teeth < least:
        raise InputError(f"ring tooth count {ring_teeth} is too few for a {pinion_teeth}-tooth pinion with shifts "
                         f"{shifts[0]:g}, {shifts[1]:g}: the tips would strike, so the ring needs at least "
                         f"{pinion_teeth + least} teeth (tooth-count difference {least} or more)")
    return least


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
    margin = _involute_clearance(a, alpha_op, r.tip_diameter, r.base_diameter)
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
