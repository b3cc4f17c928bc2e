"""Checks of a meshing pair: each returns findings, never raises for a poor design.

A :class:`Finding` carries the check's name, the measured value, the limit it
was held against, a severity (``ok``, ``warning``, ``failure``) and a sentence
a practitioner understands.  Pure functions; lengths in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..geometry.gear import SpurGear
from .pair import GearPair

__all__ = [
    "Finding",
    "GearFigures",
    "PairAnalysis",
    "analyse_pair",
    "min_shift_without_undercut",
    "clearance_findings",
    "backlash_finding",
    "min_teeth_without_undercut",
    "SEVERITIES",
    "MIN_CONTACT_RATIO",
    "MIN_TIP_THICKNESS",
]

SEVERITIES = ("ok", "warning", "failure")
MIN_CONTACT_RATIO = 1.2  # common practice: below 1.2 the load passes with little overlap
MIN_TIP_THICKNESS = 0.25  # modules; common practice for hardened or small teeth


@dataclass(frozen=True)
class Finding:
    """The result of one check."""

    check: str
    severity: str
    value: float
    limit: float
    message: str

    def __post_init__(self) -> None:
        if self.severity not in SEVERITIES:
            raise ValueError(f"severity must be one of {SEVERITIES}, got {self.severity!r}")


@dataclass(frozen=True)
class GearFigures:
    """Figures of one gear of a pair, mm unless stated."""

    gear: SpurGear
    undercut: bool
    min_shift: float  # least nominal profile shift without undercut, with this gear's thinning (coefficient)
    form_diameter: float  # where the generated involute begins
    active_root_diameter: float  # lowest point the mate's tip reaches
    working_diameter: float


@dataclass(frozen=True)
class PairAnalysis:
    """Every figure and finding of a pair."""

    pair: GearPair
    gears: tuple[GearFigures, GearFigures]
    contact_ratio: float
    backlash: float  # circumferential, on the working pitch circle, mm
    normal_backlash: float  # along the line of action, mm
    clearances: tuple[float, float]  # bottom clearance under the tips of gear 1 and gear 2, mm
    findings: tuple[Finding, ...]

    @property
    def worst(self) -> str:
        """The worst severity among the findings."""
        return max((f.severity for f in self.findings), key=SEVERITIES.index, default="ok")


def min_shift_without_undercut(teeth: int, pressure_angle: float, flank_depth: float = 1.0) -> float:
    """Least profile shift coefficient that avoids undercut by a rack cutter.

    ``x_min = h - z sin²(alpha) / 2`` where ``h`` (modules) is the depth of the
    cutter's straight flank below its reference line (ISO 53 profile A: 1.0).
    Source: the interference-point condition of generating by a rack, as in
    ISO 21771 and every gear text (e.g. Niemann and Winter vol. II).
    """
    return flank_depth - teeth * math.sin(pressure_angle) ** 2 / 2


def min_teeth_without_undercut(pressure_angle: float, flank_depth: float = 1.0) -> int:
    """Least tooth count cut by a rack without undercut, for zero shift: ``2 h / sin²(alpha)`` rounded up."""
    limit = 2 * flank_depth / math.sin(pressure_angle) ** 2
    return math.floor(limit) + 1 if limit == math.floor(limit) else math.ceil(limit)


def _roll_length(tip_radius: float, base_radius: float) -> float:
    return math.sqrt(tip_radius ** 2 - base_radius ** 2)


def _gear_figures(pair: GearPair, index: int, working_diameter: float) -> GearFigures:
    gear = (pair.gear1, pair.gear2)[index]
    mate = (pair.gear2, pair.gear1)[index]
    from ..geometry.generate import tooth_profile  # here: importing the checks stays light

    profile = tooth_profile(gear, tolerance=1e-3)
    rb = gear.base_diameter / 2
    reach = pair.centre_distance * math.sin(pair.operating_pressure_angle) - _roll_length(mate.tip_diameter / 2, mate.base_diameter / 2)
    active_root = 2 * math.sqrt(rb ** 2 + reach ** 2) if reach >= 0 else gear.base_diameter
    # The least nominal shift without undercut: the cutter feeds deeper by the thinning, so the
    # generating shift x_E = x - thinning / (2 m tan alpha) must reach x_min.
    x_min = (min_shift_without_undercut(gear.teeth, gear.pressure_angle, gear.system.straight_flank_depth)
             + gear.shift - gear.generating_shift)
    return GearFigures(gear, profile.undercut, x_min, profile.form_diameter, active_root, working_diameter)


def _backlash(pair: GearPair) -> float:
    """Exact circumferential backlash on the working pitch circle at the built centre distance."""
    alpha_op = pair.operating_pressure_angle
    d_w1, d_w2 = pair.working_diameters()
    from ..geometry.involute import inv

    def thickness(gear: SpurGear, d_w: float) -> float:
        return d_w * (gear.tooth_thickness / gear.reference_diameter + inv(gear.pressure_angle) - inv(alpha_op))

    return math.pi * d_w1 / pair.gear1.teeth - thickness(pair.gear1, d_w1) - thickness(pair.gear2, d_w2)


def analyse_pair(pair: GearPair) -> PairAnalysis:
    """All figures and checks of ``pair``."""
    g1, g2 = pair.gear1, pair.gear2
    d_w1, d_w2 = pair.working_diameters()
    figures = (_gear_figures(pair, 0, d_w1), _gear_figures(pair, 1, d_w2))
    a, alpha_op = pair.centre_distance, pair.operating_pressure_angle
    contact = (_roll_length(g1.tip_diameter / 2, g1.base_diameter / 2) + _roll_length(g2.tip_diameter / 2, g2.base_diameter / 2)
               - a * math.sin(alpha_op)) / g1.base_pitch
    backlash = _backlash(pair)
    clearances = (a - g1.tip_diameter / 2 - g2.root_diameter / 2, a - g2.tip_diameter / 2 - g1.root_diameter / 2)
    findings: list[Finding] = [_contact_finding(contact)]
    for i, fig in enumerate(figures):
        findings += _gear_findings(fig, ("gear 1", "gear 2")[i], (figures[1], figures[0])[i], pair)
    findings += clearance_findings(pair.gear1.system.clearance * pair.module, clearances)
    findings.append(backlash_finding(backlash, alpha_op))
    return PairAnalysis(pair, figures, contact, backlash, backlash * math.cos(alpha_op), clearances, tuple(findings))


def _contact_finding(contact: float) -> Finding:
    if contact < 1.0:
        return Finding("contact-ratio", "failure", contact, 1.0,
                       f"contact ratio {contact:.3f} is below 1: one tooth pair lets go before the next takes over")
    if contact < MIN_CONTACT_RATIO:
        return Finding("contact-ratio", "warning", contact, MIN_CONTACT_RATIO,
                       f"contact ratio {contact:.3f} is below {MIN_CONTACT_RATIO} (common practice): rough running, little margin for centre-distance error")
    return Finding("contact-ratio", "ok", contact, MIN_CONTACT_RATIO, f"contact ratio {contact:.3f}: on average {contact:.2f} tooth pairs share the load")


def _gear_findings(fig: GearFigures, label: str, mate: GearFigures, pair: GearPair) -> list[Finding]:
    gear = fig.gear
    m = gear.module
    out: list[Finding] = []
    z = gear.teeth
    if fig.undercut:
        out.append(Finding(f"undercut {label}", "warning", gear.shift, fig.min_shift,
                           f"{label} ({z} teeth) is undercut: the cutter removes the foot of the involute; "
                           f"a profile shift of at least {fig.min_shift:+.3f} avoids it"))
    else:
        out.append(Finding(f"undercut {label}", "ok", gear.shift, fig.min_shift,
                           f"{label} ({z} teeth) is not undercut (least shift without undercut {fig.min_shift:+.3f})"))
    tip = gear.tip_thickness
    limit = MIN_TIP_THICKNESS * m
    severity = "warning" if tip < limit else "ok"
    note = "thin tips chip and wear (common practice: at least 0.25 m)" if tip < limit else "tip is thick enough"
    out.append(Finding(f"tip thickness {label}", severity, tip, limit, f"{label} tip thickness {tip:.3f} mm ({tip / m:.3f} m): {note}"))
    # Interference: the mate's tip must not reach past the interference point (the tangent
    # point of the line of action on this gear's base circle), nor below the form circle.
    mate_gear = mate.gear
    reach = pair.centre_distance * math.sin(pair.operating_pressure_angle) - _roll_length(mate_gear.tip_diameter / 2, mate_gear.base_diameter / 2)
    if reach < 0 and fig.undercut:
        out.append(Finding(f"interference {label}", "warning", reach, 0.0,
                           f"the tip of the mate ({mate_gear.teeth} teeth) runs {-reach:.3f} mm past the interference point of {label}; "
                           "the cutter's undercut clears its path, but the teeth lose contact there"))
    elif reach < 0:
        out.append(Finding(f"interference {label}", "failure", reach, 0.0,
                           f"the tip of the mate ({mate_gear.teeth} teeth) runs {-reach:.3f} mm past the interference point of {label} "
                           "and strikes its root fillet: raise the shift of this gear or shorten the mate's tips"))
    else:
        out.append(Finding(f"interference {label}", "ok", reach, 0.0,
                           f"the mate's tip stays outside the interference point of {label} "
                           f"(the line-of-action tangent point on its base circle)"))
    # Active flank: the mate's tip should meet this gear where the cut involute exists.
    if fig.active_root_diameter < fig.form_diameter - 1e-9:
        out.append(Finding(f"active flank {label}", "warning", fig.active_root_diameter, fig.form_diameter,
                           f"the mate's tip reaches down to diameter {fig.active_root_diameter:.3f} mm on {label}, below its "
                           f"form diameter {fig.form_diameter:.3f} mm where the cut involute ends: there it meets "
                           "undercut or fillet instead of flank, and the real contact ratio is lower"))
    else:
        out.append(Finding(f"active flank {label}", "ok", fig.active_root_diameter, fig.form_diameter,
                           f"the mate's tip stays on the involute of {label} (down to diameter {fig.active_root_diameter:.3f} mm; "
                           f"form diameter {fig.form_diameter:.3f} mm)"))
    return out


def clearance_findings(limit: float, clearances: tuple[float, float],
                       sides: tuple[tuple[str, str], tuple[str, str]] = (("gear 1", "gear 2"), ("gear 2", "gear 1"))
                       ) -> list[Finding]:
    """Bottom clearance under each gear's tip against the basic rack's ``limit`` (mm), external or internal.

    ``sides`` names, for each clearance, the gear whose tip it is under and the mate whose root it faces.
    """
    out = []
    for (label, other), c in zip(sides, clearances):
        if c <= 0:
            sev, note = "failure", "the tip touches the mate's root"
        elif c < limit - 1e-9:
            sev, note = "warning", f"less than the basic rack's {limit:.3f} mm; shorten the tips (leave out --full-tips)"
        else:
            sev, note = "ok", "as the basic rack gives"
        out.append(Finding(f"bottom clearance {label}", sev, c, limit,
                           f"clearance between the tip of {label} and the root of {other}: {c:.4f} mm; {note}"))
    return out


def backlash_finding(backlash: float, operating_pressure_angle: float) -> Finding:
    """Circumferential backlash (mm, working pitch circle) of any pair at its built centre distance."""
    if backlash < -1e-9:
        return Finding("backlash", "failure", backlash, 0.0, f"the teeth overlap by {-backlash:.4f} mm: the pair cannot turn at this centre distance")
    if backlash <= 1e-9:
        return Finding("backlash", "warning", 0.0, 0.0,
                       "no backlash: any error of making or mounting binds the pair; allow some with --backlash (common practice)")
    return Finding("backlash", "ok", backlash, 0.0,
                   f"circumferential backlash {backlash:.4f} mm on the working pitch circle "
                   f"({backlash * math.cos(operating_pressure_angle):.4f} mm normal)")
