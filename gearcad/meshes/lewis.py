"""The Lewis form factor of a spur gear, computed from its generated tooth outline.

Lengths mm, angles radians.  Pure functions and frozen dataclasses; no I/O.

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

Lewis's construction is as in Shigley's Mechanical Engineering Design, chapter 14 (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError
from ..geometry.gear import SpurGear
from ..geometry.generate import tooth_profile

__all__ = ["LewisResult", "lewis_form_factor"]

_LEWIS_TOLERANCE = 1e-5  # chord tolerance of the outline for the form factor, modules
_CHORD_SAMPLES = 257  # points per chord in the final search of the critical section

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
