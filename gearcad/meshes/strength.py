"""Load ratings of a spur gear pair: Lewis tooth-root bending and Hertz contact stress.

Units at the interface: lengths mm, forces N, stresses and moduli MPa, torque
N·m, shaft speed rpm, pitch-line speed m/s; angles in radians inside.  Pure
functions and frozen dataclasses; no printing, no file access.

The Lewis form factor is computed from the generated tooth outline itself (see
:func:`lewis_form_factor`), not looked up.  The construction, precisely:

1. The load acts at the tip corner, normal to the involute there: along the line
   tangent to the base circle.  Where that line crosses the tooth's centre line
   is the *load point*, at radius ``r_L = r_b / cos(phi_L)`` with the load angle
   ``phi_L = alpha_a - theta_a`` (``alpha_a`` the pressure angle at the tip,
   ``theta_a`` half the angular tip thickness).  ``phi_L`` is the angle between
   the load and the normal to the centre line.
2. The tooth is a cantilever fixed at a section normal to the centre line.  At a
   section at depth ``l`` below the load point with thickness ``t`` the bending
   stress from a force ``F`` normal to the centre line is ``6 F l / (b t²)``.
   The critical section is the one where that is largest, i.e. where
   ``x = t² / (4 l)`` is least.  Geometrically it is where the parabola with its
   vertex at the load point, symmetric about the centre line, inscribed in the
   tooth, touches the outline (the beam of uniform strength of the Lewis
   construction); for gears it touches the root fillets, for near-racks the
   straight part of the flank.  The section is sought from the root up to the
   cutter's datum line (reference radius plus shift), and is the first such
   touching point walking up: on a pointed or nearly pointed tooth the ratio
   ``t² / (4 l)`` falls towards zero again near the tip, which is the tip's
   strength (checked as tip thickness), not the tooth's as a beam (see
   :func:`_critical_section`).
3. The form factor on the module basis is ``Y = 2 x / (3 m)`` (with the
   diametral pitch ``P = 1/m`` this is the Lewis ``Y = 2 x P / 3``), and the
   Lewis stress is ``sigma = K_v W_t / (b m Y)``.  As in the textbook derivation
   the bending force at the load point is taken equal to ``W_t``, the tangential
   load on the reference circle; the radial component of the tip load is
   neglected.  This is conservative: the true normal component,
   ``W_t cos(phi_L) / cos(alpha)``, is smaller; the form factor that uses it is
   :attr:`LewisResult.normal_load_form_factor`.

Lewis's construction, the velocity factors of Barth and the Hertz line-contact
formula are as in Shigley's Mechanical Engineering Design, chapter 14 (from
memory).  These are estimates for light duty.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from .checks import Finding
from ..errors import GeometryError, InputError
from ..geometry.gear import SpurGear
from ..geometry.generate import tooth_profile
from ..materials import Material
from .pair import GearPair

if TYPE_CHECKING:
    from .internal import InternalPair
from ..validate import finite, positive

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

_LEWIS_TOLERANCE = 1e-5  # chord tolerance of the outline for the form factor, modules
_CHORD_SAMPLES = 257  # points per chord in the final search of the critical section


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


# -- Lewis form factor -------------------------------------------------------------------

@dataclass(frozen=True)
class LewisResult:
    """The Lewis construction on one gear's generated outline.

    Attributes
    ----------
    form_factor : float
        Lewis form factor ``Y = 2 x / (3 m)`` (module basis), dimensionless; for
        ``sigma = W_t / (b m Y)`` with ``W_t`` on the reference circle.
    normal_load_form_factor : float
        ``Y cos(alpha) / cos(phi_L)``: the same with the bending force taken as
        the tip load's true component normal to the centre line, dimensionless.
    lewis_x : float
        ``x = t² / (4 l)``, mm.
    thickness : float
        Chordal thickness ``t`` of the critical section, mm.
    height : float
        Height ``l`` from the critical section to the load point, mm.
    load_radius : float
        Radius of the load point on the tooth centre line, mm.
    load_angle : float
        Angle ``phi_L`` between the tip load and the normal to the centre line, radians.
    critical_radius : float
        Radius of the points where the parabola touches the outline, mm.
    critical_point : tuple of float
        The touching point on the upper side of tooth 0 (centred on +x), mm.
    critical_curve : str
        Kind of the outline curve touched (``"fillet"`` or ``"involute"``).
    """

    form_factor: float
    normal_load_form_factor: float
    lewis_x: float
    thickness: float
    height: float
    load_radius: float
    load_angle: float
    critical_radius: float
    critical_point: tuple[float, float]
    critical_curve: str


def _unit_module(gear: SpurGear) -> SpurGear:
    """The same gear at module 1: the construction is scale-free."""
    m = gear.module
    return SpurGear(gear.teeth, 1.0, gear.system, gear.shift, gear.thinning / m, gear.tip_shortening)


def _load_point(gear: SpurGear) -> tuple[float, float]:
    """Radius of the load point on the centre line (mm) and the load angle ``phi_L`` (radians)."""
    rb, ra = gear.base_diameter / 2, gear.tip_diameter / 2
    theta_a = gear.tip_thickness / gear.tip_diameter
    phi = math.acos(rb / ra) - theta_a
    return rb / math.cos(phi), phi


def _least_ratio(points: np.ndarray, load_radius: float) -> tuple[float, np.ndarray]:
    """Least ``y² / (r_L - u)`` along one curve's polyline (modules) and the point where it occurs.

    The least vertex is found first, then the two chords beside it are searched
    finely: the polyline is within the outline tolerance of the true curve, so
    the result is too (relative error about ``2 tolerance / y``).
    """
    ratio = points[:, 1] ** 2 / (load_radius - points[:, 0])
    i = int(np.argmin(ratio))
    lo, hi = max(i - 1, 0), min(i + 1, len(points) - 1)
    if lo == hi:
        return float(ratio[i]), points[i]
    f = np.linspace(0.0, 1.0, _CHORD_SAMPLES)[:, None]
    dense = np.concatenate([points[j] + f * (points[j + 1] - points[j]) for j in range(lo, hi)])
    dense_ratio = dense[:, 1] ** 2 / (load_radius - dense[:, 0])
    k = int(np.argmin(dense_ratio))
    return float(dense_ratio[k]), dense[k]


def _flank_from_root(curves, limit: float) -> tuple[np.ndarray, list[str]]:
    """The points of the upper flank (y > 0) within ``limit`` (mm) of the centre, in order from the root up."""
    pieces, kinds = [], []
    for curve in curves:
        keep = (curve.points[:, 1] > 0) & (np.hypot(*curve.points.T) <= limit)
        if keep.any():
            pieces.append(curve.points[keep])
            kinds += [curve.kind] * int(keep.sum())
    if not pieces:
        return np.empty((0, 2)), []
    # the outline runs counter-clockwise: the upper flank from the tip down to the root; turn it round
    return np.vstack(pieces)[::-1], kinds[::-1]


def _datum_radius(gear: SpurGear) -> float:
    """Radius of the cutter's datum line in the cut: the reference radius plus the shift, mm.

    The tooth below it is what the cutter's tip generated (dedendum, fillet); the
    Lewis section of every tooth in Shigley's table lies there, for the rack too
    (0.46 m below the datum line, from the closed form in the tests).
    """
    return gear.reference_diameter / 2 + gear.shift * gear.module


def _critical_section(points: np.ndarray, kinds: list[str], load_radius: float) -> tuple[float, np.ndarray, str]:
    """The Lewis critical section: the least ``y² / (r_L - u)`` met walking up the flank from the root.

    Up from the root the ratio falls through the fillet and rises again on the
    flank: its first minimum is where Lewis's parabola touches the tooth.  On a
    pointed or nearly pointed tooth the ratio falls once more towards the tip,
    where it tends to zero at the load point itself; that is no section of the
    tooth as a beam, so the walk stops at the first minimum wherever the tip is.
    """
    ratio = points[:, 1] ** 2 / (load_radius - points[:, 0])
    rising = np.nonzero(np.diff(ratio) > 1e-12 * ratio[1:])[0]  # joins repeat a point: not a rise
    k = int(rising[0]) if len(rising) else int(np.argmin(ratio))
    lo, hi = max(k - 1, 0), min(k + 2, len(points))
    value, where = _least_ratio(points[lo:hi], load_radius)
    return value, where, kinds[k]


def lewis_form_factor(gear: SpurGear, tolerance: float = _LEWIS_TOLERANCE) -> LewisResult:
    """Lewis form factor of ``gear`` from its generated outline (tip load; see module docstring).

    Parameters
    ----------
    gear : SpurGear
        The gear, with its shift, thinning and tip shortening; tip relief is
        not taken into account (the load acts at the unrelieved tip corner).
    tolerance : float
        Chord tolerance of the outline the construction runs on, in modules
        (the construction is done at module 1 and scaled).

    Returns
    -------
    LewisResult
        The form factor and the figures of the construction.
    """
    unit = _unit_module(gear)
    profile = tooth_profile(unit, tolerance)
    load_radius, phi = _load_point(unit)
    points, kinds = _flank_from_root(profile.curves, min(load_radius, _datum_radius(unit)))
    if len(points) == 0:
        raise GeometryError(f"no part of the {gear.teeth}-tooth outline lies below the Lewis load point")
    x, (u, y), kind = _critical_section(points, kinds, load_radius)
    m = gear.module
    form = 2.0 * x / 3.0
    return LewisResult(
        form_factor=form,
        normal_load_form_factor=form * math.cos(gear.pressure_angle) / math.cos(phi),
        lewis_x=x * m,
        thickness=2.0 * y * m,
        height=(load_radius - u) * m,
        load_radius=load_radius * m,
        load_angle=phi,
        critical_radius=math.hypot(u, y) * m,
        critical_point=(float(u * m), float(y * m)),
        critical_curve=kind,
    )


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
