"""Load ratings of a spur gear pair: Lewis tooth-root bending and Hertz contact stress.

Units at the interface: lengths mm, forces N, stresses and moduli MPa, torque
N·m, shaft speed rpm, pitch-line speed m/s; angles in radians inside.  Pure
functions and frozen dataclasses; no printing, no file access.


The Lewis form factor is computed from the generated tooth outline itself, not looked up: the
construction is set out in :mod:`gearcad.meshes.lewis`, which this module re-exports.


Lewis's construction, the velocity factors of Barth and the Hertz line-contact
formula are as in Shigley's Mechanical Engineering Design, chapter 14 (from
memory).  These are estimates for light duty.
"""


from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

from .checks import Finding
from ..errors import InputError
from ..geometry.gear import SpurGear
from ..materials import Material
from .pair import GearPair

if TYPE_CHECKING:
    from .internal import InternalPair
from ..validate import finite, positive
from .lewis import LewisResult, lewis_form_factor

__all__ = [
    "LewisResult",
    "GearRating",
    "PairRating",
    "lewis_form_factor",
    "velocity_factor",
    "bending_stress",
    "elastic_coefficient",
    "contact_stress",
    "rate_internal_pair",
    "tangential_load",
    "torque_from_power",
    "pitch_line_speed",
    "rate_pair",
    "BARTH_CLASSES",
    "PROCESS_CLASS",
    "CAUTION",
]

CAUTION = ("These are estimates for light duty (Lewis bending, Hertz contact); powered machinery "
           "needs guarding and a rating by a qualified engineer to the applicable standard (ISO 6336, AGMA 2001).")

# Barth's velocity factor K_v, Shigley eqs. (14-4a) to (14-4d) in SI units (from memory):
# name -> (constant, form) with V the pitch-line speed in m/s.
BARTH_CLASSES: dict[str, tuple[float, str]] = {
    "cast": (3.05, "linear"),    # cast profile:            (3.05 + V) / 3.05
    "milled": (6.1, "linear"),   # cut or milled profile:   (6.1 + V) / 6.1
    "hobbed": (3.56, "root"),    # hobbed or shaped:        (3.56 + sqrt V) / 3.56
    "ground": (5.56, "root2"),   # shaved or ground:        sqrt((5.56 + sqrt V) / 5.56)
}

# Which Barth curve a fabrication process gets (common practice, our choice):
# - fdm: the profile is deposited, not cut; layer steps and +-0.1 to 0.2 mm form error make
#   it no better than a cast profile, the least accurate class.
# - laser: the profile is contour-cut, but kerf wander, taper and melt edge (+-0.05 mm and more)
#   are a large share of a small-module tooth; we treat it as cast too, the conservative side.
# - cnc: an end mill contours each tooth space: a cut (milled) profile.
PROCESS_CLASS: dict[str, str] = {"fdm": "cast", "laser": "cast", "cnc": "milled"}



# -- loads and speeds ------------------------------------------------------------------

def tangential_load(torque_Nm: float, pitch_diameter_mm: float) -> float:
    """Tangential load on a circle of diameter ``pitch_diameter_mm`` from a shaft torque.

    Parameters
    ----------
    torque_Nm : float
        Torque on the gear's shaft, N·m (> 0).
    pitch_diameter_mm : float
        Diameter of the circle the load acts on, mm (> 0).

    Returns
    -------
    float
        ``W_t = 2000 T / d``, N.
    """
    torque = positive(torque_Nm, "torque", "N·m")
    diameter = positive(pitch_diameter_mm, "pitch diameter", "mm")
    return 2000.0 * torque / diameter


def torque_from_power(power_W: float, speed_rpm: float) -> float:
    """Shaft torque that carries ``power_W`` at ``speed_rpm``.

    Returns
    -------
    float
        ``T = P / omega = 60 P / (2 pi n)``, N·m.
    """
    power = positive(power_W, "power", "W")
    speed = positive(speed_rpm, "speed", "rpm")
    return power * 60.0 / (2.0 * math.pi * speed)


def pitch_line_speed(speed_rpm: float, diameter_mm: float) -> float:
    """Speed of a point on a circle of ``diameter_mm`` turning at ``speed_rpm``.

    Returns
    -------
    float
        ``V = pi d n / 60000``, m/s.
    """
    speed = positive(speed_rpm, "speed", "rpm")
    diameter = positive(diameter_mm, "pitch diameter", "mm")
    return math.pi * diameter * speed / 60_000.0


# -- velocity factor ---------------------------------------------------------------------

def velocity_factor(pitch_line_speed_m_s: float, process: str = "cast") -> float:
    """Barth's velocity factor ``K_v`` (>= 1) for a pitch-line speed.

    Parameters
    ----------
    pitch_line_speed_m_s : float
        Pitch-line speed V, m/s (>= 0; 0 gives 1).
    process : str
        A Barth class, ``"cast"`` ((3.05 + V)/3.05), ``"milled"`` ((6.1 + V)/6.1),
        ``"hobbed"`` ((3.56 + sqrt V)/3.56) or ``"ground"`` (sqrt((5.56 + sqrt V)/5.56)),
        or a fabrication process, ``"laser"``, ``"fdm"`` (both cast) or ``"cnc"``
        (milled); see :data:`PROCESS_CLASS`.

    Returns
    -------
    float
        The factor the Lewis load is multiplied by, dimensionless.
    """
    speed = finite(pitch_line_speed_m_s, "pitch-line speed")
    if speed < 0:
        raise InputError(f"pitch-line speed must be 0 m/s or more, got {pitch_line_speed_m_s!r}")
    name = PROCESS_CLASS.get(process, process)
    if name not in BARTH_CLASSES:
        choices = ", ".join([*BARTH_CLASSES, *PROCESS_CLASS])
        raise InputError(f"process for the velocity factor must be one of {choices}, got {process!r}")
    constant, form = BARTH_CLASSES[name]
    if form == "linear":
        return (constant + speed) / constant
    if form == "root":
        return (constant + math.sqrt(speed)) / constant
    return math.sqrt((constant + math.sqrt(speed)) / constant)


# -- stresses ---------------------------------------------------------------------------

def bending_stress(gear: SpurGear, tangential_load_N: float, face_width_mm: float, speed_m_s: float,
                   process: str = "cast", form_factor: float | None = None) -> float:
    """Lewis tooth-root bending stress with Barth's velocity factor.

    Parameters
    ----------
    gear : SpurGear
        The gear whose teeth bend.
    tangential_load_N : float
        Tangential load ``W_t`` on the gear's reference circle ``d = z m``, N (> 0).
    face_width_mm : float
        Face width ``b``, mm (> 0).
    speed_m_s : float
        Pitch-line speed, m/s (>= 0), for :func:`velocity_factor`.
    process : str
        Barth class or fabrication process (see :func:`velocity_factor`).
    form_factor : float, optional
        Lewis form factor ``Y`` to use instead of computing it from the outline.

    Returns
    -------
    float
        ``sigma = K_v W_t / (b m Y)``, MPa.
    """
    load = positive(tangential_load_N, "tangential load", "N")
    width = positive(face_width_mm, "face width", "mm")
    kv = velocity_factor(speed_m_s, process)
    y = lewis_form_factor(gear).form_factor if form_factor is None else positive(form_factor, "Lewis form factor")
    return kv * load / (width * gear.module * y)


def elastic_coefficient(E1: float, nu1: float, E2: float, nu2: float) -> float:
    """Elastic coefficient ``C_p = sqrt(1 / (pi ((1 - nu1²)/E1 + (1 - nu2²)/E2)))``.

    Parameters
    ----------
    E1, E2 : float
        Young's moduli, MPa (> 0); any stress unit works, the result follows it.
    nu1, nu2 : float
        Poisson's ratios, from 0 to below 0.5.

    Returns
    -------
    float
        ``C_p``, sqrt(MPa).
    """
    compliance = 0.0
    for e, nu, label in ((E1, nu1, "1"), (E2, nu2, "2")):
        e = positive(e, f"elastic modulus of gear {label}", "MPa")
        nu = finite(nu, f"Poisson's ratio of gear {label}")
        if not 0.0 <= nu < 0.5:
            raise InputError(f"Poisson's ratio of gear {label} must be from 0 to below 0.5, got {nu!r}")
        compliance += (1.0 - nu * nu) / e
    return math.sqrt(1.0 / (math.pi * compliance))


def contact_stress(pair: "GearPair | InternalPair", tangential_load_N: float, face_width_mm: float,
                   E1: float, nu1: float, E2: float, nu2: float,
                   speed_m_s: float = 0.0, process: str = "cast") -> float:
    """Hertz line-contact stress at the pitch point of ``pair``.

    ``sigma_H = C_p sqrt(K_v W_t / (b cos(alpha_w)) (1/rho1 + 1/rho2))`` with
    ``rho_i = r_wi sin(alpha_w)`` the flank radii of curvature at the pitch point
    (Shigley eq. 14-14, from memory); for an internal pair (``pair`` has a
    ``ring``) the ring's flank is concave and its term is subtracted.

    Parameters
    ----------
    pair : GearPair
        The pair, at its centre distance as built (operating pressure angle
        ``alpha_w`` and working pitch radii ``r_wi``).
    tangential_load_N : float
        Tangential load on the working pitch circles, N (> 0).
    face_width_mm : float
        Face width in contact, mm (> 0).
    E1, nu1, E2, nu2 : float
        Young's modulus (MPa) and Poisson's ratio of gear 1 and gear 2.
    speed_m_s : float
        Pitch-line speed, m/s (>= 0); ``K_v`` multiplies the load as in the bending rating.
    process : str
        Barth class or fabrication process (see :func:`velocity_factor`).

    Returns
    -------
    float
        Largest contact pressure, MPa.
    """
    load = positive(tangential_load_N, "tangential load", "N")
    width = positive(face_width_mm, "face width", "mm")
    kv = velocity_factor(speed_m_s, process)
    alpha_w = pair.operating_pressure_angle
    d_w1, d_w2 = pair.working_diameters()
    concave = -1.0 if hasattr(pair, "ring") else 1.0  # an internal pair: the ring's flank is hollow
    curvature = 2.0 / (d_w1 * math.sin(alpha_w)) + concave * 2.0 / (d_w2 * math.sin(alpha_w))
    cp = elastic_coefficient(E1, nu1, E2, nu2)
    return cp * math.sqrt(kv * load / (width * math.cos(alpha_w)) * curvature)


# -- rating of a pair ----------------------------------------------------------------------

@dataclass(frozen=True)
class GearRating:
    """Bending rating of one gear of a pair.

    Attributes: ``torque`` N·m on its shaft, ``speed`` rpm, ``tangential_load`` N
    on its reference circle, ``lewis`` the construction, ``bending_stress`` and
    ``allowable`` MPa, ``safety_factor`` (allowable / stress) and ``min_safety``
    from the material, dimensionless.
    """

    label: str
    gear: SpurGear
    material: Material
    torque: float
    speed: float
    tangential_load: float
    lewis: LewisResult
    bending_stress: float
    allowable: float
    safety_factor: float
    min_safety: float

    @property
    def form_factor(self) -> float:
        """Lewis form factor Y, dimensionless."""
        return self.lewis.form_factor


@dataclass(frozen=True)
class PairRating:
    """Load rating of a pair: Lewis bending per gear and Hertz contact of the mesh.

    Attributes: ``torque`` N·m and ``speed`` rpm on gear 1, ``face_width`` mm,
    ``process`` (Barth class or fabrication process), ``pitch_line_speed`` m/s,
    ``velocity_factor``, ``gears`` the two :class:`GearRating`, ``contact_load``
    N on the working pitch circles, ``contact_stress`` and ``contact_allowable``
    (the weaker material's) MPa, ``contact_safety`` (allowable / stress) and
    ``contact_min_safety`` (the stricter material's).
    """

    torque: float
    speed: float
    face_width: float
    process: str
    pitch_line_speed: float
    velocity_factor: float
    gears: tuple[GearRating, GearRating]
    contact_load: float
    contact_stress: float
    contact_allowable: float
    contact_safety: float
    contact_min_safety: float

    def findings(self) -> tuple[Finding, ...]:
        """One finding per gear for bending and one for contact (failure below 1, warning below the minimum)."""
        out = [_bending_finding(g) for g in self.gears]
        out.append(_contact_finding(self))
        return tuple(out)


def _severity(safety: float, minimum: float) -> str:
    if safety < 1.0:
        return "failure"
    return "warning" if safety < minimum else "ok"


def _bending_finding(g: GearRating) -> Finding:
    severity = _severity(g.safety_factor, g.min_safety)
    head = (f"{g.label} ({g.gear.teeth} teeth, {g.material.title}): Lewis root bending stress {g.bending_stress:.3g} MPa "
            f"against an allowable {g.allowable:.3g} MPa, safety factor {g.safety_factor:.2f}")
    advice = {
        "failure": ": the teeth are expected to break at the root; widen the face, raise the module or use a stronger material",
        "warning": f", below the minimum {g.min_safety:g} for this material; widen the face, raise the module or lower the load",
        "ok": f" (minimum {g.min_safety:g})",
    }[severity]
    return Finding(f"bending {g.label}", severity, g.safety_factor, g.min_safety, f"{head}{advice}. {CAUTION}")


def _contact_finding(r: PairRating) -> Finding:
    severity = _severity(r.contact_safety, r.contact_min_safety)
    head = (f"flank contact (Hertz) stress at the pitch point {r.contact_stress:.3g} MPa against an allowable "
            f"{r.contact_allowable:.3g} MPa (the weaker flank), safety factor {r.contact_safety:.2f}")
    advice = {
        "failure": ": the flanks are expected to pit or wear fast; widen the face, enlarge the gears or use harder materials",
        "warning": f", below the minimum {r.contact_min_safety:g}; widen the face or enlarge the gears",
        "ok": f" (minimum {r.contact_min_safety:g})",
    }[severity]
    return Finding("contact", severity, r.contact_safety, r.contact_min_safety, f"{head}{advice}. {CAUTION}")


def _gear_rating(label: str, gear: SpurGear, material: Material, torque: float, speed: float,
                 width: float, pitch_speed: float, process: str, lewis: LewisResult | None = None) -> GearRating:
    load = tangential_load(torque, gear.reference_diameter)
    lewis = lewis or lewis_form_factor(gear)
    stress = bending_stress(gear, load, width, pitch_speed, process, form_factor=lewis.form_factor)
    allowable = material.allowable_bending
    return GearRating(label, gear, material, torque, speed, load, lewis, stress, allowable,
                      allowable / stress, material.min_safety_factor)


def rate_pair(pair: GearPair, torque_Nm_on_gear1: float, speed_rpm_gear1: float, face_width_mm: float,
              material1: Material, material2: Material, process: str = "cast") -> PairRating:
    """Rate ``pair`` for a steady torque on gear 1 (losses neglected).

    Parameters
    ----------
    pair : GearPair
        The pair as built.
    torque_Nm_on_gear1 : float
        Torque on gear 1's shaft, N·m (> 0); gear 2 carries ``T z2 / z1``.
    speed_rpm_gear1 : float
        Speed of gear 1, rpm (> 0).
    face_width_mm : float
        Face width of both gears, mm (> 0).
    material1, material2 : Material
        Materials of gear 1 and gear 2.
    process : str
        Barth class or fabrication process for the velocity factor
        (see :func:`velocity_factor`).

    Returns
    -------
    PairRating
        Stresses (MPa), allowables (MPa) and safety factors; ``findings()`` for the checks.
    """
    return _rate(pair, pair.gear1, pair.gear2, ("gear 1", "gear 2"), torque_Nm_on_gear1, speed_rpm_gear1, face_width_mm,
                 material1, material2, process)


def _rate(pair, gear1, gear2, labels: tuple[str, str], torque: float, speed: float, width: float,
          material1: Material, material2: Material, process: str, lewis2: LewisResult | None = None) -> PairRating:
    """The rating of a pair whose gear 1 carries ``torque`` (N·m) at ``speed`` (rpm): both gears' bending, contact."""
    torque = positive(torque, "torque", "N·m")
    speed = positive(speed, "speed", "rpm")
    width = positive(width, "face width", "mm")
    velocity_factor(0.0, process)  # refuses an unknown process before any work
    d_w1, _ = pair.working_diameters()
    v = pitch_line_speed(speed, d_w1)
    ratio = gear2.teeth / gear1.teeth
    gears = (_gear_rating(labels[0], gear1, material1, torque, speed, width, v, process),
             _gear_rating(labels[1], gear2, material2, torque * ratio, speed / ratio, width, v, process, lewis=lewis2))
    load_w = tangential_load(torque, d_w1)
    sigma_h = contact_stress(pair, load_w, width, material1.elastic_modulus, material1.poisson_ratio,
                             material2.elastic_modulus, material2.poisson_ratio, v, process)
    allowable = min(material1.allowable_contact, material2.allowable_contact)
    return PairRating(torque, speed, width, process, v, velocity_factor(v, process), gears, load_w, sigma_h,
                      allowable, allowable / sigma_h, max(material1.min_safety_factor, material2.min_safety_factor))


RACK_TEETH = 400  # a spur gear this large stands in for the basic rack (the tooth count's limit in gearcad)


def rate_internal_pair(pair: "InternalPair", torque_Nm_on_pinion: float, speed_rpm_pinion: float, face_width_mm: float,
                       pinion_material: Material, ring_material: Material, process: str = "cast") -> PairRating:
    """Rate an internal pair for a steady torque on the pinion (losses neglected); see :func:`rate_pair`.

    The pinion is rated as in :func:`rate_pair`.  The ring's teeth widen towards
    their roots more than a rack's, so the ring is rated with the form factor
    of the basic rack (measured on a 400-tooth gear of the same system), a
    lower bound for internal teeth (common practice).  Contact is Hertz's with
    the ring's flank concave (:func:`contact_stress`).
    """
    r = pair.ring
    rack = lewis_form_factor(SpurGear(RACK_TEETH, r.module, r.system, thinning=r.thinning))
    return _rate(pair, pair.pinion, r, ("pinion", "ring"), torque_Nm_on_pinion, speed_rpm_pinion, face_width_mm,
                 pinion_material, ring_material, process, lewis2=rack)
