"""The helical figures of a mesh (ISO 21771:2007, clause 5): contact and overlap ratios, normal backlash,
hand and overlap findings, the spur analysis restated in normal shifts, axial forces on shafts.

Pure functions and frozen dataclasses; no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from .helix import MIN_OVERLAP_RATIO, axial_force, lead, overlap_ratio, virtual_teeth
from .pair import GearPair
from ..validate import positive

__all__ = [
    "HelicalMesh",
    "helical_mesh",
    "hand_findings",
    "overlap_finding",
    "in_normal_terms",
    "shaft_axial_forces",
    "check_face_width",
]


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
