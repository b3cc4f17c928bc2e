"""Internal (ring) spur gears as a pinion-type cutter generates them.

Sign convention.  ISO 21771 writes an internal gear with a negative tooth
count, so that its reference, base, tip and root diameters and the centre
distance of an internal pair come out negative and the external-pair formulas
hold unchanged.  Here :class:`RingGear` takes the tooth count as a positive
count and gives every diameter as a positive length; ``iso_teeth`` is the
standard's ``-z``.  The profile shift coefficient ``x`` keeps the standard's
meaning: positive ``x`` moves the ring's datum line towards its tooth tips
(towards the axis), so the teeth grow thicker and the tip (inner) diameter
smaller, exactly as positive ``x`` thickens an external gear's teeth.  Some
handbooks count the ring's shift the other way (positive away from the axis);
their ``x2`` is this ``-x``.

Cutting.  The cutter is an external involute gear of ``z0`` teeth, the same
module and pressure angle, its own shift ``x0``, an addendum equal to the tooth
system's dedendum and tip corners rounded with the system's fillet radius (or,
where that does not fit on the cutter's narrower tip, the largest round that
does: a full round, ``RingGear.cutter.rho``).  It
turns inside the ring at the gear ratio about an axis at the cutting centre
distance ``a0`` (zero backlash between cutter and ring):

``inv(alpha_0w) = inv(alpha) - 2 tan(alpha) (x0 + x_E) / (z - z0)``,
``a0 = (z - z0) m cos(alpha) / (2 cos(alpha_0w))``

(the zero-backlash condition of an internal mesh, derived in ``gearcad/meshes/internal.py``).
The cutter's tip land traces the root circle ``d_f = 2 a0 + d_a0``; its tip
rounds trace the fillets; its involute flanks cut the ring's involutes.

Frames: the ring's centre is the origin; tooth 0 is centred on the +x axis; the
outline runs clockwise (a hole in the blank).  Lengths in mm, angles in radians.

Generating kinematics (the base of everything below).  Fix the ring.  The
cutter's centre sits at ``a0 (cos chi, sin chi)`` and the cutter is turned by
``theta0 = -(z - z0) chi / z0`` (its reference circle rolls inside the ring's),
so a cutter point ``p`` is at ``O0(chi) + R(theta0) p``.  At ``chi = 0`` cutter
tooth 0 points along +x into the ring's tooth space centred on +x.  The pitch
point, the instantaneous centre of the motion, is ``r_w2 (cos chi, sin chi)``
with ``r_w2 = a0 z / (z - z0)``; seen from the cutter it lies on the cutter's
working pitch circle ``r_w0 = a0 z0 / (z - z0)`` at polar angle ``z chi / z0``.
A cutter point cuts the ring when its normal passes through the pitch point.

The topic lives in four modules: :mod:`.ring` (the ring and its figures), :mod:`.ring_cutter`,
:mod:`.ring_motion` and this one (the outline); this module re-exports the others' public names.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from .generate import DEFAULT_TOLERANCE, MIN_TOLERANCE, Curve
from .involute_curve import involute_points, involute_tangents, roll_angle_at
from .ring import CUTTER_SHIFT_RANGE, DEFAULT_CUTTER_TEETH, MIN_CUTTER_TEETH, RIM_FACTOR, TRIM_LIMIT, RingGear
from .ring_cutter import Cutter
from .ring_motion import external_tooth_depth, ring_tooth_depth, to_inner_frame, to_ring_frame
from .sampling import arc_step, sample_curve
from .shape import Loop, Part, circle_loop

__all__ = [
    "RingGear",
    "RingProfile",
    "ring_profile",
    "ring_loop",
    "ring_part",
    "to_ring_frame",
    "to_inner_frame",
    "ring_tooth_depth",
    "external_tooth_depth",
    "DEFAULT_CUTTER_TEETH",
    "MIN_CUTTER_TEETH",
    "CUTTER_SHIFT_RANGE",
    "RIM_FACTOR",
    "TRIM_LIMIT",
]

# -- the outline ------------------------------------------------------------------------

@dataclass(frozen=True)
class RingProfile:
    """The curves of one pitch of a ring, clockwise from the space centre at ``+pi/z`` to ``-pi/z``.

    Tooth 0 (its tip arc) is centred on +x.  ``form_diameter`` is where each
    involute meets its fillet (mm).
    """

    ring: RingGear
    curves: tuple[Curve, ...]
    form_diameter: float
    tolerance: float

    def points(self) -> np.ndarray:
        """The pitch as one (N, 2) polyline, both ends included."""
        parts = [self.curves[0].points] + [c.points[1:] for c in self.curves[1:]]
        return np.concatenate(parts)


def _fillet_points(ring: RingGear, cutter: Cutter, beta: np.ndarray) -> np.ndarray:
    """Space-centred points cut by the cutter's upper tip round at cutter-frame normal angles ``beta``.

    The round's normal at angle ``beta`` must pass through the pitch point, which
    the cutter sees on its working pitch circle: intersect the normal line
    through the round's centre with that circle, at the crossing nearer the tooth.
    """
    z, z0, a0 = ring.teeth, cutter.teeth, ring.cutting_centre_distance
    r_w0 = a0 * z0 / (z - z0)
    cx, cy = cutter.centre
    n = np.column_stack((np.cos(beta), np.sin(beta)))
    cn = cx * n[:, 0] + cy * n[:, 1]
    c2 = cx * cx + cy * cy
    s = -cn + np.sqrt(np.maximum(cn * cn - c2 + r_w0 * r_w0, 0.0))  # behind the centre, or ahead if it is inside
    lam = np.arctan2(cy + s * n[:, 1], cx + s * n[:, 0])
    chi = lam * z0 / z
    local = np.column_stack((cx + cutter.rho * n[:, 0], cy + cutter.rho * n[:, 1]))
    theta = -(z - z0) / z0 * chi
    c, si = np.cos(theta), np.sin(theta)
    return np.column_stack((a0 * np.cos(chi) + c * local[:, 0] - si * local[:, 1],
                            a0 * np.sin(chi) + si * local[:, 0] + c * local[:, 1]))


def _fillet_tangents(ring: RingGear, cutter: Cutter, beta: np.ndarray) -> np.ndarray:
    h = 1e-7
    d = _fillet_points(ring, cutter, beta + h) - _fillet_points(ring, cutter, beta - h)
    return d / np.hypot(d[:, 0], d[:, 1])[:, None]


def _arc(kind: str, radius: float, start: float, stop: float, tolerance: float) -> Curve:
    n = max(2, math.ceil(abs(stop - start) / arc_step(radius, tolerance)) + 1)
    angles = np.linspace(start, stop, n)
    sign = 1.0 if stop >= start else -1.0
    pts = radius * np.column_stack((np.cos(angles), np.sin(angles)))
    return Curve(kind, pts, sign * np.column_stack((-np.sin(angles), np.cos(angles))), angles, radius)


def _half_space(ring: RingGear, tolerance: float) -> list[Curve]:
    """Upper half of the space centred on +x, counter-clockwise: root, fillet, involute, half tip."""
    cutter = ring.cutter
    z, z0 = ring.teeth, cutter.teeth
    rb2, ra2 = ring.base_diameter / 2, ring.tip_diameter / 2
    eta = ring.space_half_angle_at_base
    t_form = float(roll_angle_at(ring.form_diameter / 2, rb2))
    t_tip = float(roll_angle_at(ra2, rb2))
    join = involute_points(rb2, eta, np.array([t_form]))[0]
    root = _arc("root", ring.root_diameter / 2, 0.0, cutter.land * z0 / z, tolerance)  # length 0 for a full round
    beta_end = cutter.half_angle_at_base - cutter.touch_roll + math.pi / 2
    fillet_fn = lambda b: _fillet_points(ring, cutter, b)  # noqa: E731
    betas = sample_curve(fillet_fn, cutter.land, beta_end, tolerance)
    pts = fillet_fn(betas)
    pts[0], pts[-1] = root.points[-1], join
    fillet = Curve("fillet", pts, _fillet_tangents(ring, cutter, betas), betas)
    flank_fn = lambda t: involute_points(rb2, eta, t)  # noqa: E731
    rolls = sample_curve(flank_fn, t_tip, t_form, tolerance)[::-1]  # the sampler sorts its parameters
    pts = flank_fn(rolls)
    pts[0] = join
    flank = Curve("involute", pts, -involute_tangents(eta, rolls), rolls)
    corner = math.atan2(pts[-1, 1], pts[-1, 0])
    tip = _arc("tip", ra2, corner, math.pi / z, tolerance)
    return ([root] if cutter.land > 0 else []) + [fillet, flank, tip]


def _reverse(c: Curve) -> Curve:
    return Curve(c.kind, c.points[::-1], -c.tangents[::-1], c.params[::-1], c.radius, c.centre)


def _join(first: Curve, second: Curve) -> Curve:
    return Curve(first.kind, np.concatenate([first.points, second.points[1:]]),
                 np.concatenate([first.tangents, second.tangents[1:]]),
                 np.concatenate([first.params, second.params[1:]]), first.radius, first.centre)


def _check_tolerance(tolerance: float) -> float:
    if not (math.isfinite(tolerance) and MIN_TOLERANCE <= tolerance <= 1.0):
        raise InputError(f"tolerance must be from {MIN_TOLERANCE:g} to 1 mm, got {tolerance!r}")
    return float(tolerance)


def ring_profile(ring: RingGear, tolerance: float = DEFAULT_TOLERANCE) -> RingProfile:
    """The true curves of one pitch of ``ring``, clockwise.

    Parameters
    ----------
    ring : RingGear
        The ring.
    tolerance : float
        Largest distance between each curve's polyline and the true curve, mm.
    """
    tolerance = _check_tolerance(tolerance)
    upper = _half_space(ring, tolerance)  # space on +x, counter-clockwise up to the tooth centre at +pi/z
    pitch = 2 * math.pi / ring.teeth
    # Clockwise from the space centred on 2 pi/z down to the space centred on 0, tooth on pi/z between.
    lower_next = [c.transformed(rotation=pitch, mirror=True) for c in upper]  # space 2 pi/z, clockwise to pi/z
    back = [_reverse(c) for c in reversed(upper)]  # pi/z down to 0
    curves = lower_next[:-1] + [_join(lower_next[-1], back[0])] + back[1:]
    curves = [c.transformed(rotation=-pitch / 2) for c in curves]  # tooth 0 on +x
    return RingProfile(ring, tuple(curves), ring.form_diameter, tolerance)


def ring_loop(ring: RingGear, tolerance: float = DEFAULT_TOLERANCE) -> Loop:
    """The ring's toothed inner contour as a clockwise loop of true curves (mm)."""
    profile = ring_profile(ring, tolerance)
    z = ring.teeth
    curves: list[Curve] = []
    for k in range(z):
        for c in profile.curves:
            c = c.transformed(rotation=-2 * math.pi * k / z)
            if curves and c.kind == "root" and curves[-1].kind == "root":
                c = _join(curves.pop(), c)
            curves.append(c)
    if len(curves) > 1 and curves[0].kind == "root" and curves[-1].kind == "root":
        curves.insert(0, _join(curves.pop(), curves.pop(0)))
    return Loop(tuple(curves))


def ring_part(ring: RingGear, tolerance: float = DEFAULT_TOLERANCE, name: str = "ring") -> Part:
    """The ring blank: its outer circle (counter-clockwise) with the toothed contour as a hole."""
    outer = circle_loop(0.0, 0.0, ring.outer_diameter, tolerance, clockwise=False)
    return Part(name, outer, holes=(ring_loop(ring, tolerance),), label=f"{ring.teeth}T ring m{ring.module:g}")
