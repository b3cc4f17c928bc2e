"""The outline of an external spur gear as a rack-type cutter generates it.

One tooth pitch is built from four kinds of true curve, each sampled to a chord
tolerance: the root circle (traced by the cutter's flat tip), the root fillet
(the envelope of the cutter's tip round: an offset of a curtate trochoid), the
involute flank (the envelope of the cutter's straight flank) and the tip circle.
Where the tip round removes the foot of the involute (undercut) the fillet and
the involute are cut at their intersection, found to full double precision.

Frames: the gear's centre is the origin; tooth 0 is centred on the +x axis; the
outline runs counter-clockwise.  Lengths in mm, angles in radians.

The generating kinematics (derivation kept here because everything rests on it):
rack coordinates ``(u, v)``, ``v`` measured outward from the rolling line, which
touches the reference circle (radius ``r``) at the pitch point ``P = (0, r)``.
The rack's reference line is at ``v = x_E m``.  With the rack displaced by ``s``
along +x, a rack point sits at ``(u + s, r + v)``; rolling without slip turns the
gear by ``-s / r``, so the point's gear-frame position is ``R(s / r) (u + s, r + v)``.
A rack point with unit normal ``n`` touches the gear when its normal passes
through ``P`` (Willis's law of gearing): ``s = v n_u / n_v - u``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import GeometryError, InputError
from .gear import SpurGear
from .involute_curve import involute_points, involute_tangents, roll_angle_at
from .sampling import arc_step, sample_curve

__all__ = [
    "Curve",
    "ToothProfile",
    "TipRelief",
    "tooth_profile",
    "outline",
    "DEFAULT_TOLERANCE",
    "MIN_TOLERANCE",
]

DEFAULT_TOLERANCE = 1e-3  # mm (1 µm)
MIN_TOLERANCE = 1e-5  # mm: below this the double-precision curves stop being the limit


@dataclass(frozen=True)
class Curve:
    """One true curve of a tooth outline, sampled to a tolerance.

    Attributes
    ----------
    kind : str
        ``"root"``, ``"fillet"``, ``"involute"``, ``"tip"``, ``"tip-round"`` or ``"chamfer"``.
    points : numpy.ndarray
        (N, 2) points on the true curve, mm, in travel order (counter-clockwise
        round the gear).
    tangents : numpy.ndarray
        (N, 2) unit tangents in travel order.
    params : numpy.ndarray
        (N,) the curve's own parameter: roll angle for an involute, the tip
        round's normal angle for a fillet, polar angle for an arc (radians).
    radius : float
        Radius of a circular arc, mm (0 for other kinds); arcs of the root and
        tip circle are centred on the origin, a tip round on ``centre``.
    centre : tuple of float
        Centre of a circular arc, mm.
    """

    kind: str
    points: np.ndarray
    tangents: np.ndarray
    params: np.ndarray
    radius: float = 0.0
    centre: tuple[float, float] = (0.0, 0.0)

    def transformed(self, rotation: float = 0.0, mirror: bool = False) -> "Curve":
        """This curve mirrored in the x axis (point order kept) and/or rotated by ``rotation`` radians."""
        pts, tan, params = self.points, self.tangents, self.params
        cx, cy = self.centre
        if mirror:
            pts = pts * (1.0, -1.0)
            tan = tan * (1.0, -1.0)
            cy = -cy
        if rotation:
            c, s = math.cos(rotation), math.sin(rotation)
            rot = np.array([[c, -s], [s, c]])
            pts, tan = pts @ rot.T, tan @ rot.T
            cx, cy = c * cx - s * cy, s * cx + c * cy
        return Curve(self.kind, pts, tan, params, self.radius, (cx, cy))


@dataclass(frozen=True)
class TipRelief:
    """Optional rounding or chamfer of the tooth tip corners.

    Parameters
    ----------
    kind : str
        ``"round"`` (a circle tangent to the flank and the tip circle) or
        ``"chamfer"`` (a straight cut).
    size : float
        Rounding radius, or the chamfer's leg measured radially down the flank
        and along the tip circle, mm.
    """

    kind: str
    size: float

    def __post_init__(self) -> None:
        if self.kind not in ("round", "chamfer"):
            raise InputError(f"tip relief must be 'round' or 'chamfer', got {self.kind!r}")
        if not (math.isfinite(self.size) and self.size > 0):
            raise InputError(f"tip relief size must be greater than 0 mm, got {self.size!r}")


@dataclass(frozen=True)
class ToothProfile:
    """The curves of one tooth pitch, from the space centre at ``-pi/z`` to ``+pi/z``.

    ``undercut`` tells whether the cutter removed part of the involute;
    ``form_diameter`` is where the involute begins (mm), ``fillet_join`` the
    join of fillet and involute.
    """

    gear: SpurGear
    curves: tuple[Curve, ...]
    undercut: bool
    form_diameter: float
    tolerance: float
    relief: TipRelief | None = field(default=None)

    def points(self) -> np.ndarray:
        """The pitch as one (N, 2) polyline from ``-pi/z`` to ``+pi/z``, both ends included."""
        parts = [self.curves[0].points] + [c.points[1:] for c in self.curves[1:]]
        return np.concatenate(parts)


# -- the cutter ---------------------------------------------------------------------

@dataclass(frozen=True)
class _Cutter:
    """Rack cutter figures in mm, rack coordinates (see module docstring)."""

    tip_line: float  # v of the cutter's flat tip (gives the root circle)
    round_u: float  # u of the tip round's centre (right flank)
    round_v: float  # v of the tip round's centre
    radius: float  # tip round radius (its semi-axis across the rack)
    alpha: float
    stretch: float = 1.0  # semi-axis along the rack over ``radius``: 1 a circle, 1/cos(beta) a helical gear's transverse rack

    def round_offset(self, beta: np.ndarray | float) -> tuple:
        """Offset (du, dv) from the round's centre of its point whose outward normal has angle ``beta`` (radians).

        A circle: ``rho (cos b, sin b)``.  An ellipse with semi-axes ``(a_u, a_v)``:
        ``(a_u² cos b, a_v² sin b) / sqrt(a_u² cos² b + a_v² sin² b)``.
        """
        if self.stretch == 1.0:
            return self.radius * np.cos(beta), self.radius * np.sin(beta)
        a_u, a_v = self.radius * self.stretch, self.radius
        c, s = np.cos(beta), np.sin(beta)
        norm = np.sqrt((a_u * c) ** 2 + (a_v * s) ** 2)
        return a_u * a_u * c / norm, a_v * a_v * s / norm


def _cutter(gear: SpurGear) -> _Cutter:
    m, sys_ = gear.module, gear.system
    alpha = sys_.pressure_angle
    datum = gear.generating_shift * m
    tip_line = datum - sys_.dedendum * m
    rho = sys_.fillet_radius * m
    round_v = tip_line + rho
    stretch = sys_.fillet_stretch
    if stretch == 1.0:
        round_u = math.pi * m / 4 + (round_v - datum) * math.tan(alpha) - rho / math.cos(alpha)
    else:  # the round's point with normal angle -alpha lies on the flank
        du, dv = _Cutter(tip_line, 0.0, round_v, rho, alpha, stretch).round_offset(-alpha)
        round_u = math.pi * m / 4 + (round_v + dv - datum) * math.tan(alpha) - du
    return _Cutter(tip_line, max(round_u, 0.0), round_v, rho, alpha, stretch)


def _fillet_points(gear: SpurGear, cutter: _Cutter, beta: np.ndarray) -> np.ndarray:
    """Gear-frame points cut by the tip round at normal angles ``beta`` (radians)."""
    r = gear.reference_diameter / 2
    beta = np.asarray(beta, dtype=float)
    if cutter.stretch == 1.0:
        u = cutter.round_u + cutter.radius * np.cos(beta)
        v = cutter.round_v + cutter.radius * np.sin(beta)
        s = cutter.round_v * np.cos(beta) / np.sin(beta) - cutter.round_u
    else:  # law of gearing at the ellipse's point: s = v n_u / n_v - u
        du, dv = cutter.round_offset(beta)
        u, v = cutter.round_u + du, cutter.round_v + dv
        s = v * np.cos(beta) / np.sin(beta) - u
    return _to_gear_frame(gear, u + s, r + v, s / r)


def _to_gear_frame(gear: SpurGear, x: np.ndarray, y: np.ndarray, turn: np.ndarray) -> np.ndarray:
    """Rotate generation-frame points by ``turn`` and move the space centre from +y to +pi/z."""
    angle = turn + (math.pi / gear.teeth - math.pi / 2)
    c, s = np.cos(angle), np.sin(angle)
    return np.column_stack((c * x - s * y, s * x + c * y))


def _fillet_tangents(gear: SpurGear, cutter: _Cutter, beta: np.ndarray) -> np.ndarray:
    """Unit tangents of the fillet in the direction of growing ``beta`` (central differences)."""
    h = 1e-7
    d = _fillet_points(gear, cutter, beta + h) - _fillet_points(gear, cutter, beta - h)
    return d / np.hypot(d[:, 0], d[:, 1])[:, None]


# -- the flank ----------------------------------------------------------------------

def _polar_angle(points: np.ndarray) -> np.ndarray:
    return np.arctan2(points[:, 1], points[:, 0])


def _involute_angle(gear: SpurGear, radius: np.ndarray) -> np.ndarray:
    rb = gear.base_diameter / 2
    t = roll_angle_at(radius, rb)
    return gear.half_angle_at_base - (t - np.arctan(t))


def _flank_start_roll(gear: SpurGear, cutter: _Cutter) -> float:
    """Signed roll angle (radians) of the involute point cut by the flank's lowest point.

    The cutter's straight flank ends where it meets the tip round, at depth
    ``d`` below the rolling line.  It touches the gear on the line of action,
    ``d / sin(alpha)`` from the pitch point; the base circle's tangent point is
    ``r sin(alpha)`` from it.  Negative: the contact lies past the tangent point
    (the interference point), the flank cuts the involute's second branch and
    the gear is undercut.
    """
    r = gear.reference_diameter / 2
    rb = gear.base_diameter / 2
    a = cutter.alpha
    if cutter.stretch == 1.0:
        depth = -(cutter.round_v - cutter.radius * math.sin(a))
    else:
        depth = -(cutter.round_v + float(cutter.round_offset(-a)[1]))
    return (r * math.sin(a) - depth / math.sin(a)) / rb


def _undercut_crossing(gear: SpurGear, cutter: _Cutter) -> float | None:
    """Tip-round angle where the fillet crosses the involute's first branch, if it does.

    Without a crossing the undercut is marginal: the fillet meets the second
    branch, which runs down to the cusp on the base circle, where the first
    branch begins; that path is the true outline as it stands.
    """
    rb = gear.base_diameter / 2

    def gap(b: np.ndarray) -> np.ndarray:
        pts = _fillet_points(gear, cutter, b)
        radius = np.hypot(pts[:, 0], pts[:, 1])
        g = (_polar_angle(pts) - _involute_angle(gear, radius)) * radius
        return np.where(radius > rb, g, np.nan)

    betas = np.linspace(-math.pi / 2 + 1e-9, -cutter.alpha, 2001)
    values = gap(betas)
    inside = values < 0
    if not inside.any():
        return None
    first = int(np.argmax(inside))
    crossing = np.nonzero((values[first:-1] < 0) & (values[first + 1:] >= 0))[0]
    if crossing.size == 0:
        raise GeometryError(f"undercut removes the whole involute flank of the {gear.teeth}-tooth gear; raise the profile shift")
    lo, hi = float(betas[first + crossing[0]]), float(betas[first + crossing[0] + 1])
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if mid in (lo, hi):
            break
        if gap(np.array([mid]))[0] < 0:
            lo = mid
        else:
            hi = mid
    return hi


def _base_circle_crossing(gear: SpurGear, cutter: _Cutter) -> float:
    """Tip-round angle where the fillet last rises through the base circle (bisection)."""
    rb = gear.base_diameter / 2
    betas = np.linspace(-math.pi / 2, -cutter.alpha, 2001)
    pts = _fillet_points(gear, cutter, betas)
    below = np.nonzero(np.hypot(pts[:, 0], pts[:, 1]) < rb)[0]
    lo, hi = float(betas[below[-1]]), float(betas[min(below[-1] + 1, len(betas) - 1)])
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if mid in (lo, hi):
            break
        if np.hypot(*_fillet_points(gear, cutter, np.array([mid]))[0]) < rb:
            lo = mid
        else:
            hi = mid
    return lo


def _upper_flank(gear: SpurGear, tolerance: float, relief: TipRelief | None) -> tuple[list[Curve], bool, float]:
    """Curves of the upper flank of tooth 0 from the space centre (+pi/z) up to the tip corner."""
    cutter = _cutter(gear)
    rb = gear.base_diameter / 2
    ra = gear.tip_diameter / 2
    t_flank = _flank_start_roll(gear, cutter)
    undercut = t_flank < 0
    beta_cross = _undercut_crossing(gear, cutter) if undercut else None
    marginal = undercut and beta_cross is None
    if beta_cross is not None:  # the fillet cuts into the involute: meet at the intersection
        beta_end = beta_cross
        join = _fillet_points(gear, cutter, np.array([beta_end]))[0]
        t_start = float(roll_angle_at(np.hypot(*join), rb))
        form_radius = float(np.hypot(*join))
    elif marginal:
        # The fillet rises through the base circle just beside the involute's cusp; the bit of it
        # above the base circle is cut away by the flank.  End it on the base circle and join the
        # involute at its cusp.  The sliver this leaves out is under 1e-7 m deep (tests/test_outline_reference.py),
        # far below any tolerance.
        beta_end = _base_circle_crossing(gear, cutter)
        join = involute_points(rb, gear.half_angle_at_base, np.array([0.0]))[0]
        t_start, form_radius = 0.0, rb
    else:  # no undercut: fillet and involute meet tangentially where the round meets the flank
        beta_end = -cutter.alpha
        join = _fillet_points(gear, cutter, np.array([beta_end]))[0]
        t_start, form_radius = t_flank, float(np.hypot(*join))
    if form_radius >= ra:
        raise GeometryError(f"undercut reaches the tip of the {gear.teeth}-tooth gear; raise the profile shift")

    curves: list[Curve] = []
    root_angle = _polar_angle(_fillet_points(gear, cutter, np.array([-math.pi / 2])))[0]
    curves.append(_circle_arc("root", gear.root_diameter / 2, math.pi / gear.teeth, root_angle, tolerance))
    if cutter.radius > 0:
        fillet = lambda b: _fillet_points(gear, cutter, b)  # noqa: E731
        betas = sample_curve(fillet, -math.pi / 2, beta_end, tolerance)
        pts = fillet(betas)
        pts[-1] = join
        curves.append(Curve("fillet", pts, _fillet_tangents(gear, cutter, betas), betas))

    t_end, tip_curves = _tip_corner(gear, relief, tolerance)
    if t_end <= t_start:
        raise GeometryError("the tip relief is larger than the involute flank")
    start_angle = gear.half_angle_at_base
    involute = lambda t: involute_points(rb, start_angle, t)  # noqa: E731
    rolls = sample_curve(involute, t_start, t_end, tolerance)
    pts = involute(rolls)
    pts[0] = join  # the exact junction, so that the curves meet without a gap
    curves.append(Curve("involute", pts, involute_tangents(start_angle, rolls), rolls))
    curves.extend(tip_curves)
    return curves, undercut, 2 * form_radius


def _tip_corner(gear: SpurGear, relief: TipRelief | None, tolerance: float) -> tuple[float, list[Curve]]:
    """Roll angle where the involute ends, and the relief curve (tip corner to tip circle)."""
    rb, ra = gear.base_diameter / 2, gear.tip_diameter / 2
    psi = gear.half_angle_at_base
    if relief is None:
        return float(roll_angle_at(ra, rb)), []
    if relief.kind == "chamfer":
        c = relief.size
        t0 = float(roll_angle_at(ra - c, rb))
        p0 = involute_points(rb, psi, np.array([t0]))[0]
        tip_angle = float(_involute_angle(gear, np.array([ra]))[0]) - c / ra
        if ra - c <= rb or tip_angle <= 0:
            raise InputError(f"tip chamfer {c:g} mm is larger than the tooth allows")
        p1 = ra * np.array([math.cos(tip_angle), math.sin(tip_angle)])
        direction = (p1 - p0) / np.hypot(*(p1 - p0))
        curve = Curve("chamfer", np.array([p0, p1]), np.array([direction, direction]), np.array([0.0, 1.0]))
        return t0, [curve]
    rho = relief.size
    rc = ra - rho
    if rc <= rb:
        raise InputError(f"tip rounding radius {rho:g} mm is larger than the tooth allows")
    t_centre = float(roll_angle_at(rc, rb))
    t_touch = t_centre + rho / rb  # the inward parallel of an involute is an involute
    phi = psi - t_touch
    touch = involute_points(rb, psi, np.array([t_touch]))[0]
    centre = touch - rho * np.array([-math.sin(phi), math.cos(phi)])
    top = centre / np.hypot(*centre) * ra
    if np.hypot(*touch) >= ra or _polar_angle(top[None])[0] <= 0:
        raise InputError(f"tip rounding radius {rho:g} mm is larger than the tooth allows")
    a0 = math.atan2(touch[1] - centre[1], touch[0] - centre[0])
    a1 = math.atan2(top[1] - centre[1], top[0] - centre[0])
    # Up the upper flank the round turns towards the tooth's centre line: clockwise about its centre.
    if a1 > a0:
        a1 -= 2 * math.pi
    n = max(2, math.ceil((a0 - a1) / arc_step(rho, tolerance)) + 1)
    angles = np.linspace(a0, a1, n)
    pts = centre + rho * np.column_stack((np.cos(angles), np.sin(angles)))
    tans = np.column_stack((np.sin(angles), -np.cos(angles)))
    return t_touch, [Curve("tip-round", pts, tans, angles, rho, (float(centre[0]), float(centre[1])))]


def _circle_arc(kind: str, radius: float, start: float, stop: float, tolerance: float) -> Curve:
    """Arc of a circle centred on the origin from polar angle ``start`` to ``stop``."""
    n = max(2, math.ceil(abs(stop - start) / arc_step(radius, tolerance)) + 1)
    angles = np.linspace(start, stop, n)
    pts = radius * np.column_stack((np.cos(angles), np.sin(angles)))
    sign = 1.0 if stop >= start else -1.0
    tans = sign * np.column_stack((-np.sin(angles), np.cos(angles)))
    return Curve(kind, pts, tans, angles, radius)


def _check_tolerance(tolerance: float) -> float:
    if not (math.isfinite(tolerance) and MIN_TOLERANCE <= tolerance <= 1.0):
        raise InputError(f"tolerance must be from {MIN_TOLERANCE:g} to 1 mm, got {tolerance!r}")
    return float(tolerance)


def tooth_profile(gear: SpurGear, tolerance: float = DEFAULT_TOLERANCE,
                  relief: TipRelief | None = None) -> ToothProfile:
    """The true curves of one tooth pitch of ``gear``.

    Parameters
    ----------
    gear : SpurGear
        The gear.
    tolerance : float
        Largest distance between each curve's polyline and the true curve, mm.
    relief : TipRelief, optional
        Rounding or chamfer of the tip corners.
    """
    tolerance = _check_tolerance(tolerance)
    upper, undercut, form_diameter = _upper_flank(gear, tolerance, relief)
    # ``upper`` runs from the space centre at +pi/z to the tip corner (clockwise).
    # Its mirror image runs from -pi/z to the lower tip corner: counter-clockwise.
    lower = [c.transformed(mirror=True) for c in upper]
    top = upper[-1].points[-1]
    tip_angle = math.atan2(top[1], top[0])
    tip = _circle_arc("tip", gear.tip_diameter / 2, -tip_angle, tip_angle, tolerance)
    upper_ccw = [_reverse(c) for c in reversed(upper)]
    curves = tuple(lower + [tip] + upper_ccw)
    return ToothProfile(gear, curves, undercut, form_diameter, tolerance, relief)


def _reverse(curve: Curve) -> Curve:
    return Curve(curve.kind, curve.points[::-1], -curve.tangents[::-1], curve.params[::-1], curve.radius, curve.centre)


def outline(gear: SpurGear, tolerance: float = DEFAULT_TOLERANCE, relief: TipRelief | None = None) -> np.ndarray:
    """Closed outline of ``gear`` as an (N, 2) array in mm, counter-clockwise.

    The polyline's vertices lie on the true curves and its chords stay within
    ``tolerance`` (mm) of them.  The first point is not repeated at the end.
    """
    pitch = tooth_profile(gear, tolerance, relief).points()[:-1]
    z = gear.teeth
    angles = 2 * math.pi * np.arange(z) / z
    c, s = np.cos(angles)[:, None], np.sin(angles)[:, None]
    x = c * pitch[None, :, 0] - s * pitch[None, :, 1]
    y = s * pitch[None, :, 0] + c * pitch[None, :, 1]
    return np.column_stack((x.ravel(), y.ravel()))
