"""Checks of a meshing pair: each returns findings, never raises for a poor design.

A :class:`Finding` carries the check's name, the measured value, the limit it
was held against, a severity (``ok``, ``warning``, ``failure``) and a sentence
a practitioner understands.  Pure functions; lengths in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

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
    "process_findings",
    "ring_process_findings",
    "ring_tool_reach",
    "ring_largest_tool",
    "tool_reach",
    "largest_tool",
    "space_direction",
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

# -- can the process make the part? ---------------------------------------------------------------

def _distance(points: np.ndarray, centre: np.ndarray) -> float:
    """Distance from ``centre`` to the closed polygon through ``points`` (its segments, not only its vertices), mm."""
    a, b = points, np.roll(points, -1, axis=0)
    ab = b - a
    length2 = np.einsum("ij,ij->i", ab, ab)
    k = np.clip(np.einsum("ij,ij->i", centre - a, ab) / np.where(length2 > 0, length2, 1.0), 0.0, 1.0)
    return float(np.min(np.hypot(*(a + k[:, None] * ab - centre).T)))


def _clear(points: np.ndarray, direction: np.ndarray, bottom: float, radius: float) -> bool:
    """Whether a disc of ``radius`` whose lowest point on the ray ``direction`` is at ``bottom`` misses the outline."""
    return _distance(points, direction * (bottom + radius)) >= radius * (1 - 1e-9)


def space_direction(points: np.ndarray, internal: bool = False) -> np.ndarray:
    """Unit vector along the centre line of one tooth space of a gear outline centred at the origin.

    The space is the one holding the outline's point nearest the centre (``internal``: a
    ring's tooth loop, the point farthest from it); a flat root arc is split in its middle
    (the spaces of a generated gear are symmetric).
    """
    r = np.hypot(*points.T)
    i = int(np.argmax(r) if internal else np.argmin(r))
    n = len(points)
    near = lambda k: abs(r[k % n] - r[i]) <= 1e-6 * max(r[i], 1.0)  # noqa: E731
    first, last = i, i
    while near(first - 1) and i - first < n:  # the run of root points around the deepest one
        first -= 1
    while near(last + 1) and last - i < n:
        last += 1
    angle = np.arctan2(points[:, 1], points[:, 0])
    span = np.angle(np.exp(1j * (angle[last % n] - angle[first % n])))
    middle = angle[first % n] + 0.5 * span
    return np.array([math.cos(middle), math.sin(middle)])


def _last_clear(is_clear, clear: float, blocked: float) -> float:
    """Bisection (60 halvings) between a value where ``is_clear`` holds and one where it does not; the
    clear end of the last interval (the end mills' reach and size)."""
    for _ in range(60):
        mid = 0.5 * (clear + blocked)
        clear, blocked = (mid, blocked) if is_clear(mid) else (clear, mid)
    return clear


def tool_reach(points: np.ndarray, tool_radius: float) -> float:
    """Lowest radius (mm) an end mill of ``tool_radius`` mm reaches in the tooth spaces of a gear outline.

    The mill goes down the centre line of a space until it touches a flank
    (bisection; the distance is taken to the outline's segments, so the
    outline's chord error is the accuracy).  Parameters: ``points`` (N, 2) outline of a gear centred at the
    origin, mm.
    """
    direction = space_direction(points)
    r = np.hypot(*points.T)
    low, high = float(r.min()), float(r.max()) + 2 * tool_radius
    if _clear(points, direction, low, tool_radius):
        return low
    return _last_clear(lambda mid: _clear(points, direction, mid, tool_radius), clear=high, blocked=low)


def largest_tool(points: np.ndarray, depth_radius: float) -> float:
    """Radius (mm) of the largest end mill that reaches ``depth_radius`` mm on a space's centre line."""
    direction = space_direction(points)
    return _last_clear(lambda mid: _clear(points, direction, depth_radius, mid), clear=0.0,
                       blocked=float(np.hypot(*points.T).max()))


def _clear_out(points: np.ndarray, direction: np.ndarray, top: float, radius: float) -> bool:
    """Whether a disc of ``radius`` whose outermost point on the ray ``direction`` is at ``top`` misses the loop."""
    return _distance(points, direction * (top - radius)) >= radius * (1 - 1e-9)


def ring_tool_reach(points: np.ndarray, tool_radius: float) -> float:
    """Highest radius (mm) an end mill of ``tool_radius`` mm reaches in the tooth spaces of a ring's tooth loop.

    The mill comes from the ring's centre and goes out along the centre line of a
    space until it touches a flank (bisection; distances to the loop's segments).  A mill wider
    than the tip circle cannot enter the spaces: the tip radius is returned.
    Parameters: ``points`` (N, 2) tooth loop of a ring centred at the origin, mm.
    """
    direction = space_direction(points, internal=True)
    r = np.hypot(*points.T)
    low, high = float(r.min()), float(r.max())
    if not _clear_out(points, direction, max(low, tool_radius), tool_radius):
        return low
    low = max(low, tool_radius)
    if _clear_out(points, direction, high, tool_radius):
        return high
    return _last_clear(lambda mid: _clear_out(points, direction, mid, tool_radius), clear=low, blocked=high)


def ring_largest_tool(points: np.ndarray, reach_radius: float) -> float:
    """Radius (mm) of the largest end mill that reaches ``reach_radius`` mm on a ring space's centre line."""
    direction = space_direction(points, internal=True)
    return _last_clear(lambda mid: _clear_out(points, direction, reach_radius, mid), clear=0.0,
                       blocked=float(reach_radius))


def _tip_findings(name: str, tip: float, process: str, min_feature: float) -> list[Finding]:
    if tip < min_feature:
        return [Finding(f"tip width {name}", "failure", tip, min_feature,
                        f"{name}: the tip is {tip:.3f} mm thick, thinner than the {min_feature:g} mm the "
                        f"{process} process holds; reduce the profile shift or shorten the tips")]
    return [Finding(f"tip width {name}", "ok", tip, min_feature,
                    f"{name}: the tip ({tip:.3f} mm) is not thinner than the {min_feature:g} mm the "
                    f"{process} process holds")]


def _reach_finding(name: str, tool_radius: float, reach: float, form: float, blocked: bool, biggest: float | None,
                   inward: bool) -> Finding:
    """The end mill's finding.

    ``reach`` and ``form`` are radii (mm); ``biggest`` (the largest end mill that reaches, diameter mm) is given
    when the mill falls short, None when it reaches; ``inward`` for an external gear (the mill goes down towards
    the axis), outward for a ring; ``blocked`` when it cannot enter the spaces at all.
    """
    way, end = ("deeper", "begins") if inward else ("farther out", "ends")
    if biggest is not None:
        where = ("cannot enter the tooth spaces at all" if blocked else
                 f"goes no {way} than diameter {2 * reach:.3f} mm in the tooth spaces")
        return Finding(f"tool reach {name}", "failure", 2 * reach, 2 * form,
                       f"{name}: the {2 * tool_radius:g} mm end mill {where}, short of the form diameter "
                       f"{2 * form:.3f} mm where the involute {end}, so the flanks cannot be cut; use an "
                       f"end mill of at most {biggest:.2f} mm or a larger module")
    return Finding(f"tool reach {name}", "ok", 2 * reach, 2 * form,
                   f"{name}: the {2 * tool_radius:g} mm end mill reaches the whole involute flank "
                   f"({'down' if inward else 'out'} to diameter {2 * reach:.3f} mm)")


def ring_process_findings(name: str, ring, loop: np.ndarray, process: str, tool_radius: float,
                          min_feature: float) -> list[Finding]:
    """Whether the fabrication process can make a ring's internal teeth: failures name the reason.

    As :func:`process_findings` for an external gear, with the end mill entering the
    ring's tooth spaces from its centre: it must reach out to the ring's form circle
    (where the involute ends and the root fillet begins).

    Parameters
    ----------
    name : str
        The ring's name, for messages.
    ring : gearcad.geometry.internal.RingGear
        The ring (its tip thickness, tip and form circles), mm.
    loop : numpy.ndarray
        (N, 2) the ring's tooth loop at the origin as it is drawn, mm.
    process, tool_radius, min_feature
        As for :func:`process_findings` (mm).

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    if process == "cnc" and tool_radius > 0:
        form = ring.form_diameter / 2
        reach = ring_tool_reach(loop, tool_radius)
        short = reach < form - 1e-3
        out.append(_reach_finding(name, tool_radius, reach, form, reach <= ring.tip_diameter / 2 + 1e-6,
                                  2 * ring_largest_tool(loop, form) if short else None, inward=False))
    if min_feature > 0:
        out += _tip_findings(name, ring.tip_thickness, process, min_feature)
    return out


def process_findings(name: str, gear: SpurGear, outline: np.ndarray, process: str, tool_radius: float,
                     min_feature: float) -> list[Finding]:
    """Whether the fabrication process can make an external gear: failures name the reason.

    - ``cnc``: the end mill (``tool_radius`` mm) must reach down each tooth space
      to the form circle, where the cut involute begins; higher up it leaves part of
      the working flank standing and the mate's tips strike it.
    - every process: the tip must be at least ``min_feature`` mm thick, the thinnest
      wall the process holds (a laser burns a thinner tip away, a printer cannot lay
      a line narrower than its nozzle).

    Parameters
    ----------
    name : str
        The gear's name, for messages.
    gear : SpurGear
        The gear (its tip thickness and form circle), mm.
    outline : numpy.ndarray
        (N, 2) outline of the gear at the origin as it is drawn, mm.
    process : str
        ``laser``, ``fdm`` or ``cnc``.
    tool_radius : float
        Radius of the end mill, mm (0: none).
    min_feature : float
        Thinnest wall the process holds, mm (0: not checked).

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    if process == "cnc" and tool_radius > 0:
        from ..geometry.generate import tooth_profile

        form = tooth_profile(gear, tolerance=1e-3).form_diameter / 2
        reach = tool_reach(outline, tool_radius)
        short = reach > form + 1e-3
        out.append(_reach_finding(name, tool_radius, reach, form, reach >= gear.tip_diameter / 2 - 1e-6,
                                  2 * largest_tool(outline, form) if short else None, inward=True))
    if min_feature > 0:
        out += _tip_findings(name, gear.tip_thickness, process, min_feature)
    return out
