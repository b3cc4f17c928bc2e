"""The ring (internal spur gear) and its figures, cut by a pinion-type cutter.

Sign convention, cutting and frames: see :mod:`gearcad.geometry.internal`.  Validated on creation;
lengths mm, angles radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError, InputError
from ..profiles import ToothSystem
from ..validate import as_int, finite, in_range
from .gear import MAX_TEETH, ToothedFigures
from .involute import inv, inv_inverse
from .ring_cutter import Cutter, cutter_outline, make_cutter
from .ring_motion import external_tooth_depth, ring_tooth_depth, to_inner_frame, to_ring_frame

__all__ = ["RingGear", "DEFAULT_CUTTER_TEETH", "MIN_CUTTER_TEETH", "CUTTER_SHIFT_RANGE", "RIM_FACTOR", "TRIM_LIMIT"]

DEFAULT_CUTTER_TEETH = 20  # the default cutter has the tooth count nearest this that cuts the ring cleanly
MIN_CUTTER_TEETH = 8
CUTTER_SHIFT_RANGE = (-1.0, 1.0)
RIM_FACTOR = 1.2  # rim under the roots, in tooth depths (common practice; ISO 6336-3 backup ratio, from memory)
TRIM_LIMIT = 1e-6  # modules: a cutter point deeper than this inside the designed tooth trims it

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

    def _trimming_depth(self, cutter: Cutter) -> float:
        """Deepest overlap (mm) of the cutter and the designed ring teeth over the generating motion."""
        z, z0, a0 = self.teeth, self.cutter_teeth, self.cutting_centre_distance
        chi = np.linspace(-math.pi * z0 / z, math.pi * z0 / z, 2401)
        rb2 = self.base_diameter / 2
        psi2 = self.tooth_thickness / self.reference_diameter - inv(self.pressure_angle)
        world = to_ring_frame(cutter_outline(cutter), z0, z, a0, chi)
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
    def cutter(self) -> Cutter:
        """The pinion-type cutter's figures."""
        return make_cutter(self.cutter_teeth, self.cutter_shift, self.module, self.system)

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


