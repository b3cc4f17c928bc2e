"""An external spur gear cut by a rack-type cutter: its specification and dimensions.

Formulas follow ISO 21771:2007 (cylindrical involute gears, concepts and
geometry); lengths in mm, angles in radians.  The tooth-thinning allowance for
backlash is applied the way a hobbing machine applies it, by feeding the cutter
deeper: the generating profile shift ``x_E = x - thinning / (2 m tan(alpha))``
(ISO 21771, generating profile shift coefficient) sets the flanks and the root,
while the tip is turned from the nominal shift ``x``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import GeometryError, InputError
from ..profiles import ToothSystem, load_tooth_system
from ..validate import as_int, finite, in_range, positive
from .involute import inv

__all__ = ["SpurGear", "ToothedFigures", "PointedTeethError", "MIN_TEETH", "MODULE_RANGE", "SHIFT_RANGE", "PRESSURE_ANGLE_RANGE"]

class PointedTeethError(GeometryError):
    """The teeth come to a point (tip thickness <= 0) before any tip shortening."""


MIN_TEETH = 3
MAX_TEETH = 10_000
MODULE_RANGE = (0.01, 100.0)  # mm: watch wheels to heavy machinery
SHIFT_RANGE = (-2.0, 4.0)
PRESSURE_ANGLE_RANGE = (10.0, 35.0)  # degrees


class ToothedFigures:
    """Figures every involute gear shares (external or internal): needs ``teeth``, ``module``, ``system``,
    ``shift``, ``thinning`` and ``tip_shortening``.  Lengths in mm, angles in radians."""

    @classmethod
    def make(cls, teeth: int, module: float, system: str | ToothSystem = "iso53-a", **kwargs: float):
        """Build a gear naming the tooth system by name (``iso53-a``) or object."""
        if isinstance(system, str):
            system = load_tooth_system(system)
        return cls(teeth=teeth, module=module, system=system, **kwargs)

    def _validate_common(self, shift_name: str) -> None:
        """Check and normalise module, shift, thinning and tip shortening (frozen dataclasses call it)."""
        module = positive(self.module, "module", "mm")
        object.__setattr__(self, "module", in_range(module, "module", *MODULE_RANGE, unit="mm"))
        object.__setattr__(self, "shift", in_range(self.shift, shift_name, *SHIFT_RANGE))
        thinning = finite(self.thinning, "tooth thinning")
        if thinning < 0 or thinning >= 0.5 * self.pitch:
            raise InputError(f"tooth thinning must be from 0 to below half the pitch ({0.5 * self.pitch:.4g} mm), "
                             f"got {self.thinning!r}")
        object.__setattr__(self, "thinning", thinning)
        shortening = finite(self.tip_shortening, "tip shortening")
        if shortening < 0:
            raise InputError(f"tip shortening must be >= 0 modules, got {self.tip_shortening!r}")
        object.__setattr__(self, "tip_shortening", shortening)

    @property
    def pressure_angle(self) -> float:
        """Reference pressure angle, radians."""
        return self.system.pressure_angle

    @property
    def reference_diameter(self) -> float:
        """Reference (standard pitch) diameter ``d = z m``, mm."""
        return self.teeth * self.module

    @property
    def base_diameter(self) -> float:
        """Base diameter ``d_b = d cos(alpha)``, mm."""
        return self.reference_diameter * math.cos(self.pressure_angle)

    @property
    def pitch(self) -> float:
        """Reference circular pitch ``p = pi m``, mm."""
        return math.pi * self.module

    @property
    def base_pitch(self) -> float:
        """Base pitch ``p_b = pi m cos(alpha)``, mm."""
        return self.pitch * math.cos(self.pressure_angle)

    @property
    def generating_shift(self) -> float:
        """Generating profile shift coefficient ``x_E = x - thinning / (2 m tan(alpha))``."""
        return self.shift - self.thinning / (2 * self.module * math.tan(self.pressure_angle))


@dataclass(frozen=True)
class SpurGear(ToothedFigures):
    """An external spur gear, validated on creation.

    Parameters
    ----------
    teeth : int
        Number of teeth, 3 or more.
    module : float
        Module, mm.
    system : ToothSystem
        Basic rack of the cutter; its pressure angle is the gear's.
    shift : float
        Profile shift coefficient x (a fraction of the module).
    thinning : float
        Tooth-thinning allowance for backlash: the arc tooth thickness removed
        at the reference circle, mm (>= 0).
    tip_shortening : float
        Tip shortening coefficient k (modules, >= 0): the tip diameter is
        reduced by ``2 k m`` to keep the bottom clearance (ISO 21771).
    """

    teeth: int
    module: float
    system: ToothSystem
    shift: float = 0.0
    thinning: float = 0.0
    tip_shortening: float = 0.0

    def __post_init__(self) -> None:
        teeth = as_int(self.teeth, "tooth count")
        if not MIN_TEETH <= teeth <= MAX_TEETH:
            raise InputError(f"tooth count must be from {MIN_TEETH} to {MAX_TEETH}, got {self.teeth!r}")
        object.__setattr__(self, "teeth", teeth)
        self._validate_common("profile shift")
        self._check_feasible()

    # -- validation ---------------------------------------------------------------
    def _check_feasible(self) -> None:
        if self.root_diameter <= 0:
            raise GeometryError(
                f"profile shift {self.shift:g} gives a root diameter of {self.root_diameter:.4g} mm for "
                f"{self.teeth} teeth; the shift must be above {self.system.dedendum - self.teeth / 2:.3f}")
        if self.tip_diameter <= self.base_diameter:
            raise GeometryError(
                f"profile shift {self.shift:g} puts the tip inside the base circle for {self.teeth} teeth; "
                "raise the shift or the tooth count")
        if self.tip_diameter <= self.root_diameter:
            raise GeometryError(f"tip shortening {self.tip_shortening:g} leaves no tooth height")
        if self.tip_thickness <= 0:
            raise PointedTeethError(
                f"profile shift {self.shift:g} makes the teeth of a {self.teeth}-tooth gear pointed "
                f"(tip thickness {self.tip_thickness:.4g} mm); use a smaller shift or shorten the tips")

    @property
    def tip_diameter(self) -> float:
        """Tip diameter ``d + 2 m (h_a + x - k)``, mm."""
        m = self.module
        return self.reference_diameter + 2 * m * (self.system.addendum + self.shift - self.tip_shortening)

    @property
    def root_diameter(self) -> float:
        """Root diameter ``d - 2 m (h_f - x_E)``, mm (the cutter's tip line)."""
        return self.reference_diameter - 2 * self.module * (self.system.dedendum - self.generating_shift)

    @property
    def tooth_thickness(self) -> float:
        """Arc tooth thickness at the reference circle, mm: ``m (pi/2 + 2 x_E tan(alpha))``."""
        return self.module * (math.pi / 2 + 2 * self.generating_shift * math.tan(self.pressure_angle))

    def thickness_at(self, diameter: float) -> float:
        """Arc tooth thickness at ``diameter`` (mm, at or above the base circle), mm.

        ``s_y = d_y (s/d + inv(alpha) - inv(alpha_y))`` with ``cos(alpha_y) = d_b / d_y``.
        """
        if diameter < self.base_diameter:
            raise InputError(f"diameter {diameter:g} mm is inside the base circle ({self.base_diameter:.4f} mm)")
        alpha_y = math.acos(self.base_diameter / diameter)
        return diameter * (self.tooth_thickness / self.reference_diameter + inv(self.pressure_angle) - inv(alpha_y))

    @property
    def tip_thickness(self) -> float:
        """Arc tooth thickness at the tip circle, mm."""
        return self.thickness_at(self.tip_diameter)

    @property
    def half_angle_at_base(self) -> float:
        """Half the angular tooth thickness at the base circle, radians: ``s/d + inv(alpha)``."""
        return self.tooth_thickness / self.reference_diameter + inv(self.pressure_angle)
