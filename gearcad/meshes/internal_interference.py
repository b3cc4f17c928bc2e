"""Interference of an internal pair: the tip paths (trochoids) of pinion and ring, and the least tooth-count
difference a pinion needs in a ring.  Lengths in mm, angles in radians.  Pure functions; no I/O.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import GeometryError, InputError
from ..geometry.gear import SpurGear
from ..geometry.generate import tooth_profile
from ..geometry.internal import ring_tooth_depth, to_inner_frame, to_ring_frame
from ..geometry.involute import inv
from ..profiles import ToothSystem
from ..validate import as_int
from .internal_centre import internal_centre_distance

__all__ = ["TROCHOID_LIMIT", "MAX_TOOTH_DIFFERENCE", "trochoid_depth", "least_tooth_difference",
           "require_tooth_difference", "involute_clearance"]

TROCHOID_LIMIT = 1e-6  # modules: a tip path deeper than this inside the mate's tooth is interference
MAX_TOOTH_DIFFERENCE = 80  # search bound of least_tooth_difference

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


def involute_clearance(centre: float, alpha_w: float, ring_tip: float, ring_base: float) -> float:
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
