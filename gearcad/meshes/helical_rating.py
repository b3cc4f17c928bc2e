"""Load rating of a helical pair: Lewis bending of the virtual spur gear, Hertz contact in the normal section.

The spur rating of :mod:`gearcad.meshes.strength` carried over to helical teeth with the
factors ISO 6336 gives for the helix (from memory: verify against your copy):

* **Bending** (ISO 6336-3 idea, Lewis form): the tooth root is rated in the normal
  section on the virtual spur gear of ``z_n = z / (cos²(beta_b) cos(beta))`` teeth of
  module ``m_n`` (the form factor interpolated between the two whole tooth counts
  around ``z_n``), ``sigma_F = K_v F_t / (b m_n Y) * Y_beta`` with the helix factor
  ``Y_beta = 1 - eps_beta' beta' / 120 deg``, ``eps_beta' = min(eps_beta, 1)``,
  ``beta' = min(beta, 30 deg)`` (ISO 6336-3:2006, eq. for Y_beta, from memory).
* **Contact**: Hertz's line contact of the transverse section, turned into the
  normal section (load ``F_t / (cos(alpha_wt) cos(beta_b))`` on lines ``b / cos(beta_b)``
  long, curvature radii ``rho_t / cos(beta_b)``: a factor ``sqrt(cos(beta_b))``, the
  helical part of ISO 6336-2's zone factor Z_H) and the helix factor
  ``Z_beta = sqrt(cos(beta))`` (ISO 6336-2:1996 / DIN 3990-2, from memory).
* **Axial force** ``F_a = F_t tan(beta)`` on each shaft (the tangential force on the
  reference circle); a herringbone pair's halves cancel it on the shafts.

Units: mm, N, N·m, rpm, MPa.  Pure functions; estimates for light duty like the spur rating.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from .checks import Finding
from ..geometry.gear import SpurGear
from ..materials import Material
from .pair import GearPair
from .strength import (GearRating, PairRating, contact_stress, lewis_form_factor, pitch_line_speed, tangential_load,
                        velocity_factor)
from ..validate import positive
from .helical import HelicalGear, axial_force, overlap_ratio

__all__ = ["HelicalRating", "helix_factor_bending", "helix_factor_contact", "virtual_form_factor", "rate_helical_pair"]


def helix_factor_bending(overlap: float, helix: float) -> float:
    """``Y_beta = 1 - min(eps_beta, 1) min(beta, 30 deg) / 120 deg`` (ISO 6336-3, from memory); ``helix`` in radians."""
    return 1.0 - min(overlap, 1.0) * min(math.degrees(helix), 30.0) / 120.0


def helix_factor_contact(helix: float) -> float:
    """``Z_beta = sqrt(cos(beta))`` (ISO 6336-2:1996, DIN 3990-2, from memory); ``helix`` in radians."""
    return math.sqrt(math.cos(helix))


def _virtual_gear(gear: HelicalGear, teeth: int) -> SpurGear:
    c = math.cos(gear.helix_angle)
    return SpurGear(teeth, gear.normal_module, gear.system.normal, shift=gear.normal_shift, thinning=gear.thinning * c,
                    tip_shortening=gear.tip_shortening / c)


def virtual_form_factor(gear: HelicalGear):
    """Lewis result of the virtual spur gear, its form factor interpolated linearly at ``z_n`` (a LewisResult)."""
    z_n = gear.virtual_teeth
    low = max(3, math.floor(z_n))
    high = low + 1
    lo = lewis_form_factor(_virtual_gear(gear, low))
    hi = lewis_form_factor(_virtual_gear(gear, high))
    f = z_n - low
    return dataclasses.replace(lo, form_factor=(1 - f) * lo.form_factor + f * hi.form_factor,
                               normal_load_form_factor=(1 - f) * lo.normal_load_form_factor + f * hi.normal_load_form_factor)


@dataclass(frozen=True)
class HelicalRating(PairRating):
    """A :class:`~gearcad.strength.PairRating` of a helical pair plus the helix factors and the axial force.

    ``axial_force`` N on each shaft (the two gears' equal and opposite), 0 for a
    herringbone pair (``halves_axial_force`` is then each half's, balanced in the gear).
    """

    helix_angle: float = 0.0
    overlap_ratio: float = 0.0
    bending_helix_factor: float = 1.0
    contact_helix_factor: float = 1.0
    normal_section_factor: float = 1.0
    axial_force: float = 0.0
    herringbone: bool = False
    halves_axial_force: float = 0.0

    def findings(self) -> tuple[Finding, ...]:
        """The spur rating's findings and one about the axial force on the shafts."""
        if self.herringbone:
            note = (f"herringbone: each half pushes {self.halves_axial_force:.4g} N along the axis and the two cancel; "
                    "the shafts carry no axial force from the mesh, but one of them must float axially to let the halves centre")
        else:
            note = (f"axial force {self.axial_force:.4g} N on each shaft (F_a = F_t tan beta), opposite on the two; "
                    "each shaft needs a bearing that takes thrust (angular-contact or a thrust washer)")
        return (*super().findings(), Finding("axial force", "ok", self.axial_force, 0.0, note))

    def helical_data(self) -> dict:
        """The helical figures of the rating (N, degrees, dimensionless) for JSON."""
        return {"helix_angle": math.degrees(self.helix_angle), "overlap_ratio": self.overlap_ratio,
                "bending_helix_factor": self.bending_helix_factor, "contact_helix_factor": self.contact_helix_factor,
                "normal_section_factor": self.normal_section_factor, "axial_force": self.axial_force,
                "axial_forces": [self.axial_force, self.axial_force], "herringbone": self.herringbone,
                "halves_axial_force": self.halves_axial_force}


def rate_helical_pair(pair: GearPair, torque_Nm_on_gear1: float, speed_rpm_gear1: float, face_width_mm: float,
                      material1: Material, material2: Material, process: str = "cast", *,
                      herringbone: bool = False, gap_mm: float = 0.0) -> HelicalRating:
    """Rate an external helical pair for a steady torque on gear 1 (losses neglected); see the module docstring.

    Parameters
    ----------
    pair : GearPair
        A pair of :class:`HelicalGear`.
    torque_Nm_on_gear1, speed_rpm_gear1 : float
        Torque (N·m) and speed (rpm) of gear 1.
    face_width_mm : float
        Face width, mm (a herringbone's whole width, gap included).
    material1, material2 : Material
        Materials of gear 1 and gear 2.
    process : str
        Barth class or fabrication process.
    herringbone : bool
        Two halves of opposite hand: the overlap ratio counts one half (``(b - gap) / 2``,
        ISO 6336-1 for double helical gears, from memory) and the shafts carry no axial force.
    gap_mm : float
        Gap between a herringbone's halves, mm.
    """
    g1, g2 = pair.gear1, pair.gear2
    torque = positive(torque_Nm_on_gear1, "torque", "N·m")
    speed = positive(speed_rpm_gear1, "speed", "rpm")
    width = positive(face_width_mm, "face width", "mm")
    velocity_factor(0.0, process)
    beta = g1.helix_angle
    active = (width - gap_mm) if herringbone else width
    helix_width = active / 2 if herringbone else width
    eps_beta = overlap_ratio(helix_width, beta, g1.normal_module)
    y_beta = helix_factor_bending(eps_beta, beta)
    z_beta = helix_factor_contact(beta)
    normal = math.sqrt(math.cos(g1.base_helix_angle))
    d_w1, _ = pair.working_diameters()
    v = pitch_line_speed(speed, d_w1)
    kv = velocity_factor(v, process)
    ratio = g2.teeth / g1.teeth
    gears = []
    for label, gear, material, t, n in (("gear 1", g1, material1, torque, speed), ("gear 2", g2, material2, torque * ratio, speed / ratio)):
        load = tangential_load(t, gear.reference_diameter)
        lewis = virtual_form_factor(gear)
        stress = kv * load / (active * gear.normal_module * lewis.form_factor) * y_beta
        gears.append(GearRating(label, gear, material, t, n, load, lewis, stress, material.allowable_bending,
                                material.allowable_bending / stress, material.min_safety_factor))
    load_w = tangential_load(torque, d_w1)
    sigma_h = contact_stress(pair, load_w, active, material1.elastic_modulus, material1.poisson_ratio,
                             material2.elastic_modulus, material2.poisson_ratio, v, process) * normal * z_beta
    allowable = min(material1.allowable_contact, material2.allowable_contact)
    f_a = axial_force(gears[0].tangential_load, beta)
    return HelicalRating(torque, speed, width, process, v, kv, tuple(gears), load_w, sigma_h, allowable, allowable / sigma_h,
                         max(material1.min_safety_factor, material2.min_safety_factor),
                         helix_angle=beta, overlap_ratio=eps_beta, bending_helix_factor=y_beta, contact_helix_factor=z_beta,
                         normal_section_factor=normal, axial_force=0.0 if herringbone else f_a, herringbone=herringbone,
                         halves_axial_force=f_a / 2 if herringbone else 0.0)
