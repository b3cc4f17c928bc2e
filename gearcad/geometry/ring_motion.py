"""The relative motion of a gear meshing inside a ring, and tooth depths in either frame.

The generating kinematics are set out in :mod:`gearcad.geometry.internal`.  Pure numpy; lengths mm,
angles radians.
"""

from __future__ import annotations

import math

import numpy as np

from .involute_curve import roll_angle_at

__all__ = ["to_ring_frame", "to_inner_frame", "ring_tooth_depth", "external_tooth_depth"]


def to_ring_frame(points: np.ndarray, inner_teeth: int, ring_teeth: int, centre_distance: float,
                  chi: np.ndarray) -> np.ndarray:
    """Ring-frame positions of inner-gear points over the meshing motion.

    Parameters
    ----------
    points : numpy.ndarray
        (N, 2) points in the inner gear's own frame (its tooth 0 on +x), mm.
    inner_teeth, ring_teeth : int
        Tooth counts of the inner gear (pinion or cutter) and of the ring.
    centre_distance : float
        Distance between the axes, mm.
    chi : numpy.ndarray
        (K,) positions of the inner gear's centre, polar angle about the ring's
        axis, radians; at ``chi = 0`` tooth 0 points along +x (see module docstring).

    Returns
    -------
    numpy.ndarray
        (K, N, 2) positions in the ring's space-centred frame (a tooth space on +x), mm.
    """
    chi = np.asarray(chi, dtype=float)[:, None]
    theta = -(ring_teeth - inner_teeth) / inner_teeth * chi
    c, s = np.cos(theta), np.sin(theta)
    x = centre_distance * np.cos(chi) + c * points[None, :, 0] - s * points[None, :, 1]
    y = centre_distance * np.sin(chi) + s * points[None, :, 0] + c * points[None, :, 1]
    return np.stack((x, y), axis=-1)


def to_inner_frame(points: np.ndarray, inner_teeth: int, ring_teeth: int, centre_distance: float,
                   chi: np.ndarray) -> np.ndarray:
    """Inverse of :func:`to_ring_frame`: ring points (N, 2) seen from the inner gear, (K, N, 2), mm."""
    chi = np.asarray(chi, dtype=float)[:, None]
    theta = -(ring_teeth - inner_teeth) / inner_teeth * chi
    dx = points[None, :, 0] - centre_distance * np.cos(chi)
    dy = points[None, :, 1] - centre_distance * np.sin(chi)
    c, s = np.cos(theta), np.sin(theta)
    return np.stack((c * dx + s * dy, -s * dx + c * dy), axis=-1)


def _inv_at(radius: np.ndarray, base_radius: float) -> np.ndarray:
    t = roll_angle_at(radius, base_radius)
    return t - np.arctan(t)


def _folded(points: np.ndarray, teeth: int, offset: float) -> tuple[np.ndarray, np.ndarray]:
    """Radius and angular distance (radians) to the nearest tooth centre (centres at ``offset + 2 pi k / z``)."""
    radius = np.hypot(points[..., 0], points[..., 1])
    pitch = 2 * math.pi / teeth
    angle = np.arctan2(points[..., 1], points[..., 0]) - offset
    return radius, np.abs(angle - pitch * np.round(angle / pitch))


def ring_tooth_depth(points: np.ndarray, teeth: int, base_radius: float, half_angle_at_base: float,
                     tip_radius: float, outer_radius: float) -> np.ndarray:
    """How deep ring-frame points lie inside the ring's involute teeth, mm (negative: outside).

    The teeth are centred at ``pi/z + 2 pi k / z`` (space-centred frame), bounded
    by the tip circle and the involutes, whose half angle at radius ``r`` is
    ``half_angle_at_base + inv(alpha_r)``; points beyond ``outer_radius`` (the
    form circle, where the fillet begins) count as outside.  Depth is the lesser
    of the distance past the tip circle and the arc past the flank times
    ``cos(alpha_r)`` (the flank's normal).
    """
    radius, off = _folded(points, teeth, math.pi / teeth)
    r = np.maximum(radius, base_radius)
    cos_a = base_radius / r
    flank = r * (half_angle_at_base + _inv_at(r, base_radius) - off) * cos_a
    depth = np.minimum(flank, radius - tip_radius)
    return np.where(radius <= outer_radius, depth, np.minimum(depth, outer_radius - radius))


def external_tooth_depth(points: np.ndarray, teeth: int, base_radius: float, half_angle_at_base: float,
                         tip_radius: float, round_centre: tuple[float, float] | None = None,
                         round_radius: float = 0.0) -> np.ndarray:
    """How deep points (the external gear's frame, tooth 0 on +x) lie inside its teeth, mm.

    The tooth is the involute region from the base circle to the tip circle,
    optionally with its tip corners rounded by a circle (``round_centre`` of the
    upper corner, radius ``round_radius``).  Inside the base circle the flanks
    are taken as radial lines (a real root flank is at least that wide where it
    is not undercut); the root circle is not modelled.
    """
    radius, off = _folded(points, teeth, 0.0)
    r = np.maximum(radius, base_radius)
    flank = r * (half_angle_at_base - _inv_at(r, base_radius) - off) * (base_radius / r)
    flank = np.where(radius < base_radius, radius * (half_angle_at_base - off), flank)
    depth = np.minimum(flank, tip_radius - radius)
    if round_centre is not None and round_radius > 0:
        # The round cuts away the corner seen from its centre between the radial direction
        # (where it meets the tip circle) and the flank's normal at the touch point.
        cx, cy = round_centre
        dx, dy = radius * np.cos(off) - cx, radius * np.sin(off) - cy
        rb = base_radius
        t_touch = float(roll_angle_at(math.hypot(cx, cy), rb)) + round_radius / rb
        normal = half_angle_at_base - t_touch + math.pi / 2
        direction = np.arctan2(dy, dx)
        wedge = (direction >= math.atan2(cy, cx)) & (direction <= normal)
        depth = np.where(wedge, np.minimum(depth, round_radius - np.hypot(dx, dy)), depth)
    return depth


