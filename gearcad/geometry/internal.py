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

(the zero-backlash condition of an internal mesh, derived in ``gearcad/internal.py``).
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
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError, InputError
from ..profiles import ToothSystem
from ..validate import as_int, finite, in_range
from .gear import MAX_TEETH, ToothedFigures
from .generate import DEFAULT_TOLERANCE, MIN_TOLERANCE, Curve
from .involute import inv, inv_inverse, involute_points, involute_tangents, roll_angle_at
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

DEFAULT_CUTTER_TEETH = 20  # the default cutter has the tooth count nearest this that cuts the ring cleanly
MIN_CUTTER_TEETH = 8
CUTTER_SHIFT_RANGE = (-1.0, 1.0)
RIM_FACTOR = 1.2  # rim under the roots, in tooth depths (common practice; ISO 6336-3 backup ratio, from memory)
TRIM_LIMIT = 1e-6  # modules: a cutter point deeper than this inside the designed tooth trims it


# -- the relative motion of a gear meshing inside the ring ------------------------

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


# -- the pinion-type cutter ---------------------------------------------------------

@dataclass(frozen=True)
class _Cutter:
    """Pinion-type cutter figures, mm and radians, cutter frame (tooth 0 on +x)."""

    teeth: int
    base_radius: float
    tip_radius: float
    half_angle_at_base: float  # s0/d0 + inv(alpha)
    rho: float  # tip round radius
    centre: tuple[float, float]  # upper tip round's centre
    touch_roll: float  # roll angle where the round meets the involute
    land: float  # polar angle of the round's centre: half angle of the tip land


def _round_on(rb: float, ra: float, psi: float, rho: float) -> tuple[float, np.ndarray, float]:
    """Touch roll angle, centre and centre polar angle of a tip round of radius ``rho`` (upper corner)."""
    t_touch = float(roll_angle_at(ra - rho, rb)) + rho / rb  # the inward parallel of an involute is an involute
    phi = psi - t_touch
    touch = involute_points(rb, psi, np.array([t_touch]))[0]
    centre = touch - rho * np.array([-math.sin(phi), math.cos(phi)])
    return t_touch, centre, math.atan2(centre[1], centre[0])


def _make_cutter(teeth: int, shift: float, module: float, system: ToothSystem) -> _Cutter:
    """The cutter; its tip round is the system's fillet radius, or a full round where that does not fit."""
    alpha = system.pressure_angle
    r0 = teeth * module / 2
    rb = r0 * math.cos(alpha)
    ra = r0 + module * (system.dedendum + shift)
    psi = (math.pi / 2 + 2 * shift * math.tan(alpha)) / teeth + inv(alpha)
    if ra <= rb or psi - inv(math.acos(rb / ra)) <= 0:
        raise GeometryError(f"a {teeth}-tooth cutter with shift {shift:g} has pointed teeth or tips inside its base "
                            "circle; use a cutter with more teeth or a smaller cutter shift")
    rho = system.fillet_radius * module
    if rho > 0:
        lo, hi = 0.0, min(rho, ra - rb)
        if _round_on(rb, ra, psi, hi)[2] > 0:
            lo = hi
        else:  # full round: the largest radius whose centre stays on this side of the tooth's centre line
            for _ in range(100):
                mid = 0.5 * (lo + hi)
                if mid in (lo, hi):
                    break
                lo, hi = (mid, hi) if _round_on(rb, ra, psi, mid)[2] > 0 else (lo, mid)
        rho = lo
    t_touch, centre, land = _round_on(rb, ra, psi, rho)
    if land < 1e-9:
        centre, land = np.array([math.hypot(*centre), 0.0]), 0.0
    return _Cutter(teeth, rb, ra, psi, rho, (float(centre[0]), float(centre[1])), t_touch, land)


def _cutter_outline(cutter: _Cutter, count: int = 24) -> np.ndarray:
    """Points of cutter tooth 0 above the base circle: both flanks, both rounds, the land (cutter frame)."""
    rb, rho = cutter.base_radius, cutter.rho
    flank = involute_points(rb, cutter.half_angle_at_base, np.linspace(0.0, cutter.touch_roll, count))
    phi = cutter.half_angle_at_base - cutter.touch_roll
    normals = np.linspace(phi + math.pi / 2, cutter.land, count)
    corner = np.asarray(cutter.centre) + rho * np.column_stack((np.cos(normals), np.sin(normals)))
    land = cutter.tip_radius * np.column_stack((np.cos(np.linspace(cutter.land, 0, 6)), np.sin(np.linspace(cutter.land, 0, 6))))
    upper = np.concatenate([flank, corner, land])
    return np.concatenate([upper, upper * (1.0, -1.0)])


# -- the ring -------------------------------------------------------------------------

@dataclass(frozen=True)
class RingGear(ToothedFigures):
    """An internal spur gear cut by a pinion-type cutter, validated on creation.

    Parameters
    ----------
    teeth : int
        Number of teeth, a positive count (ISO 21771 writes ``-teeth``).
    module : float
        Module, mm.
    system : ToothSystem
        Tooth system (basic rack); its pressure angle is the ring's.
    shift : float
        Profile shift coefficient x, ISO 21771 sign: positive towards the tooth
        tips (the axis), thickening the teeth.
    thinning : float
        Tooth-thinning allowance for backlash, arc at the reference circle, mm
        (>= 0); the cutter is fed outward by it: ``x_E = x - thinning / (2 m tan(alpha))``.
    tip_shortening : float
        Tip shortening coefficient k (modules, >= 0): the tip (inner) diameter is
        enlarged by ``2 k m``.
    cutter_teeth : int, optional
        Teeth of the pinion-type cutter, from 8 to below ``teeth``.  Default: the
        count nearest 20 (ties: fewer) with which the cutter cuts the ring
        cleanly: too few teeth leave the involute near the ring's tips uncut
        (the ring's tip lies inside the cutter's interference point), too many
        trim the ring's tips as the cutter enters and leaves the cut.
    cutter_shift : float
        The cutter's profile shift coefficient x0 (default 0), from -1 to 1.
    rim_diameter : float, optional
        Outer diameter of the blank, mm.  Default: the root diameter plus
        1.2 tooth depths each side (common practice).
    """

    teeth: int
    module: float
    system: ToothSystem
    shift: float = 0.0
    thinning: float = 0.0
    tip_shortening: float = 0.0
    cutter_teeth: int | None = None
    cutter_shift: float = 0.0
    rim_diameter: float | None = None

    def __post_init__(self) -> None:
        teeth = as_int(self.teeth, "ring tooth count")
        if teeth < 0:
            raise InputError(f"ring tooth count is a positive count here, got {self.teeth!r}; ISO 21771 writes an "
                             f"internal gear's teeth as negative: give {-teeth}")
        if not MIN_CUTTER_TEETH + 1 <= teeth <= MAX_TEETH:
            raise InputError(f"ring tooth count must be from {MIN_CUTTER_TEETH + 1} to {MAX_TEETH}, got {self.teeth!r}")
        object.__setattr__(self, "teeth", teeth)
        self._validate_common("ring profile shift")
        object.__setattr__(self, "cutter_shift", in_range(self.cutter_shift, "cutter profile shift", *CUTTER_SHIFT_RANGE))
        self._check_teeth()
        if self.cutter_teeth is None:
            object.__setattr__(self, "cutter_teeth", self._default_cutter())
        else:
            z0 = as_int(self.cutter_teeth, "cutter tooth count")
            if not MIN_CUTTER_TEETH <= z0 < teeth:
                raise InputError(f"cutter tooth count must be from {MIN_CUTTER_TEETH} to {teeth - 1} (below the ring's), "
                                 f"got {self.cutter_teeth!r}")
            object.__setattr__(self, "cutter_teeth", z0)
            self._check_cutting()
        if self.rim_diameter is not None:
            rim = finite(self.rim_diameter, "rim diameter")
            if rim <= self.root_diameter:
                raise InputError(f"rim diameter must exceed the root diameter {self.root_diameter:.4f} mm, got {self.rim_diameter!r}")
            object.__setattr__(self, "rim_diameter", rim)

    # -- validation ---------------------------------------------------------------------
    def _check_teeth(self) -> None:
        if self.tip_diameter <= self.base_diameter:
            raise GeometryError(f"ring profile shift {self.shift:g} puts the tips of the {self.teeth}-tooth ring inside its "
                                f"base circle ({self.base_diameter:.4f} mm): lower the shift (ISO sign) or shorten the tips")
        if self.tip_thickness <= 0:
            raise GeometryError(f"ring profile shift {self.shift:g} makes the teeth of the {self.teeth}-tooth ring pointed "
                                f"(tip thickness {self.tip_thickness:.4g} mm): lower the shift or shorten the tips")

    def _default_cutter(self) -> int:
        """The cutter nearest :data:`DEFAULT_CUTTER_TEETH` teeth (ties: fewer) that cuts the ring cleanly."""
        candidates = sorted(range(MIN_CUTTER_TEETH, self.teeth), key=lambda z0: (abs(z0 - DEFAULT_CUTTER_TEETH), z0))
        for z0 in candidates:
            object.__setattr__(self, "cutter_teeth", z0)
            try:
                self._check_cutting()
                return z0
            except GeometryError:
                continue
        raise GeometryError(f"no pinion-type cutter of {MIN_CUTTER_TEETH} to {self.teeth - 1} teeth cuts the "
                            f"{self.teeth}-tooth ring with shift {self.shift:g} cleanly; give the ring more teeth, "
                            "a lower shift (ISO sign) or shortened tips")

    def _check_cutting(self) -> None:
        cutter = self.cutter
        z, z0 = self.teeth, self.cutter_teeth
        value = inv(self.pressure_angle) - 2 * math.tan(self.pressure_angle) * (self.cutter_shift + self.generating_shift) / (z - z0)
        if value <= 0:
            raise GeometryError(f"cutter shift {self.cutter_shift:g} and ring shift {self.shift:g} leave no cutting centre "
                                f"distance for a {z0}-tooth cutter")
        rb2, ra2 = self.base_diameter / 2, self.tip_diameter / 2
        reach = self.cutting_centre_distance * math.sin(self.cutting_pressure_angle)
        if ra2 ** 2 < rb2 ** 2 + reach ** 2:
            raise GeometryError(f"a {z0}-tooth cutter cannot cut the involute near the tips of the {z}-tooth ring: its tip "
                                f"diameter {2 * ra2:.4f} mm lies inside the cutter's interference point "
                                f"(diameter {2 * math.hypot(rb2, reach):.4f} mm); use a cutter with more teeth, or shorten the ring's tips")
        if self.form_diameter <= self.tip_diameter:
            raise GeometryError(f"the {z0}-tooth cutter leaves no involute on the {z}-tooth ring")
        depth = self._trimming_depth(cutter)
        if depth > TRIM_LIMIT * self.module:
            raise GeometryError(f"a {z0}-tooth cutter trims the tips of the {z}-tooth ring by {depth:.4g} mm as it "
                                "enters and leaves the cut; use a cutter with fewer teeth")

    def _trimming_depth(self, cutter: _Cutter) -> float:
        """Deepest overlap (mm) of the cutter and the designed ring teeth over the generating motion."""
        z, z0, a0 = self.teeth, self.cutter_teeth, self.cutting_centre_distance
        chi = np.linspace(-math.pi * z0 / z, math.pi * z0 / z, 2401)
        rb2 = self.base_diameter / 2
        psi2 = self.tooth_thickness / self.reference_diameter - inv(self.pressure_angle)
        world = to_ring_frame(_cutter_outline(cutter), z0, z, a0, chi)
        into_ring = ring_tooth_depth(world, z, rb2, psi2, self.tip_diameter / 2, self.form_diameter / 2)
        ring_pts = self._tip_points()
        local = to_inner_frame(ring_pts, z0, z, a0, chi)
        into_cutter = external_tooth_depth(local, z0, cutter.base_radius, cutter.half_angle_at_base, cutter.tip_radius,
                                           cutter.centre, cutter.rho)
        return float(max(into_ring.max(), into_cutter.max()))

    def _tip_points(self, count: int = 12) -> np.ndarray:
        """Points of the ring's tooth tips and tip corners (space-centred frame), mm."""
        ra = self.tip_diameter / 2
        corner = self.space_half_angle_at_base - inv(math.acos(self.base_diameter / self.tip_diameter))
        angles = np.linspace(corner, 2 * math.pi / self.teeth - corner, count)
        return ra * np.column_stack((np.cos(angles), np.sin(angles)))

    # -- figures ----------------------------------------------------------------------
    @property
    def iso_teeth(self) -> int:
        """The tooth count with ISO 21771's sign: ``-teeth``."""
        return -self.teeth

    @property
    def tip_diameter(self) -> float:
        """Tip (inner) diameter ``d - 2 m (h_a + x - k)``, mm (ISO 21771 ``d_a = d + 2 h_a`` with negative d)."""
        return self.reference_diameter - 2 * self.module * (self.system.addendum + self.shift - self.tip_shortening)

    @property
    def nominal_root_diameter(self) -> float:
        """Root (outer) diameter as a rack would give it, ``d + 2 m (h_f - x_E)``, mm.

        The real root comes from the cutter: :attr:`root_diameter`.
        """
        return self.reference_diameter + 2 * self.module * (self.system.dedendum - self.generating_shift)

    @property
    def tooth_thickness(self) -> float:
        """Arc tooth thickness at the reference circle ``m (pi/2 + 2 x_E tan(alpha))``, mm."""
        return self.module * (math.pi / 2 + 2 * self.generating_shift * math.tan(self.pressure_angle))

    @property
    def space_width(self) -> float:
        """Arc space width at the reference circle, ``pi m`` less the tooth thickness, mm."""
        return self.pitch - self.tooth_thickness

    def thickness_at(self, diameter: float) -> float:
        """Arc tooth thickness at ``diameter`` (mm, at or outside the base circle), mm.

        ``s_y = d_y (s/d - inv(alpha) + inv(alpha_y))``: a ring tooth is an
        external gear's tooth space, widening outward.
        """
        if diameter < self.base_diameter:
            raise InputError(f"diameter {diameter:g} mm is inside the base circle ({self.base_diameter:.4f} mm)")
        alpha_y = math.acos(self.base_diameter / diameter)
        return diameter * (self.tooth_thickness / self.reference_diameter - inv(self.pressure_angle) + inv(alpha_y))

    @property
    def tip_thickness(self) -> float:
        """Arc tooth thickness at the tip (inner) circle, mm."""
        return self.thickness_at(self.tip_diameter)

    @property
    def space_half_angle_at_base(self) -> float:
        """Half the angular space width at the base circle, radians: ``e/d + inv(alpha)``."""
        return self.space_width / self.reference_diameter + inv(self.pressure_angle)

    @property
    def cutter(self) -> _Cutter:
        """The pinion-type cutter's figures."""
        return _make_cutter(self.cutter_teeth, self.cutter_shift, self.module, self.system)

    @property
    def cutter_tip_diameter(self) -> float:
        """Tip diameter of the cutter ``m (z0 + 2 (h_f + x0))``, mm."""
        return self.module * (self.cutter_teeth + 2 * (self.system.dedendum + self.cutter_shift))

    @property
    def cutting_pressure_angle(self) -> float:
        """Working pressure angle of cutter and ring, radians (module docstring)."""
        z, z0 = self.teeth, self.cutter_teeth
        a = self.pressure_angle
        return inv_inverse(inv(a) - 2 * math.tan(a) * (self.cutter_shift + self.generating_shift) / (z - z0))

    @property
    def cutting_centre_distance(self) -> float:
        """Centre distance of cutter and ring while cutting, ``(z - z0) m cos(alpha) / (2 cos(alpha_0w))``, mm."""
        z, z0 = self.teeth, self.cutter_teeth
        return (z - z0) * self.module * math.cos(self.pressure_angle) / (2 * math.cos(self.cutting_pressure_angle))

    @property
    def root_diameter(self) -> float:
        """Root (outer) diameter traced by the cutter's tip, ``2 a0 + d_a0``, mm."""
        return 2 * self.cutting_centre_distance + self.cutter_tip_diameter

    @property
    def form_diameter(self) -> float:
        """Diameter where the cut involute ends and the fillet begins (outer end of the flank), mm.

        The cutter's round meets its involute at roll angle ``t`` on the cutting
        line of action, ``a0 sin(alpha_0w) + r_b0 t`` from the ring's base tangent point.
        """
        cutter = self.cutter
        length = self.cutting_centre_distance * math.sin(self.cutting_pressure_angle) + cutter.base_radius * cutter.touch_roll
        return 2 * math.hypot(self.base_diameter / 2, length)

    @property
    def tooth_depth(self) -> float:
        """Radial depth from tip to root, mm."""
        return (self.root_diameter - self.tip_diameter) / 2

    @property
    def outer_diameter(self) -> float:
        """Outer diameter of the blank: ``rim_diameter`` or the root plus 1.2 tooth depths each side, mm."""
        if self.rim_diameter is not None:
            return self.rim_diameter
        return self.root_diameter + 2 * RIM_FACTOR * self.tooth_depth


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


def _fillet_points(ring: RingGear, cutter: _Cutter, beta: np.ndarray) -> np.ndarray:
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


def _fillet_tangents(ring: RingGear, cutter: _Cutter, beta: np.ndarray) -> np.ndarray:
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
