"""A meshing pair of external spur gears: centre distance, working pressure angle, shifts.

Formulas of ISO 21771:2007 (clause 5, gear pairs); lengths in mm, angles in
radians.  Pure functions and a frozen :class:`GearPair`; no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..geometry.gear import PointedTeethError, SpurGear
from ..geometry.involute import inv, inv_inverse
from ..profiles import ToothSystem
from ..validate import as_int, positive

__all__ = [
    "GearPair",
    "make_pair",
    "standard_centre_distance",
    "working_pressure_angle",
    "centre_distance_for_shift",
    "total_shift_for_centre",
    "split_shift",
]


def standard_centre_distance(teeth1: int, teeth2: int, module: float) -> float:
    """Reference centre distance ``a = m (z1 + z2) / 2``, mm."""
    return module * (teeth1 + teeth2) / 2


def working_pressure_angle(teeth1: int, teeth2: int, pressure_angle: float, shift_sum: float) -> float:
    """Working pressure angle (radians) of a pair with shift sum ``x1 + x2``.

    ``inv(alpha_w) = inv(alpha) + 2 tan(alpha) (x1 + x2) / (z1 + z2)`` (ISO 21771, eq. for
    zero-backlash meshing).
    """
    if shift_sum == 0:
        return pressure_angle
    value = inv(pressure_angle) + 2 * math.tan(pressure_angle) * shift_sum / (teeth1 + teeth2)
    if value <= 0:
        raise InputError(f"profile shift sum {shift_sum:g} is too negative for {teeth1}+{teeth2} teeth: no centre distance exists")
    return inv_inverse(value)


def centre_distance_for_shift(teeth1: int, teeth2: int, module: float, pressure_angle: float, shift_sum: float) -> float:
    """Zero-backlash centre distance ``a_w = a cos(alpha) / cos(alpha_w)``, mm."""
    alpha_w = working_pressure_angle(teeth1, teeth2, pressure_angle, shift_sum)
    return standard_centre_distance(teeth1, teeth2, module) * math.cos(pressure_angle) / math.cos(alpha_w)


def total_shift_for_centre(teeth1: int, teeth2: int, module: float, pressure_angle: float, centre: float) -> float:
    """Shift sum ``x1 + x2`` that gives zero backlash at centre distance ``centre`` (mm).

    The inverse of :func:`centre_distance_for_shift`:
    ``cos(alpha_w) = a cos(alpha) / a_w`` and
    ``x1 + x2 = (z1 + z2) (inv(alpha_w) - inv(alpha)) / (2 tan(alpha))``.
    Raises :class:`InputError` when ``centre`` is at or inside the sum of the base radii.
    """
    a = standard_centre_distance(teeth1, teeth2, module)
    base = a * math.cos(pressure_angle)
    if not (math.isfinite(centre) and centre > base):
        raise InputError(
            f"centre distance {centre:g} mm cannot be reached by {teeth1} and {teeth2} teeth of module {module:g}: "
            f"it must exceed the sum of the base radii, {base:.4f} mm")
    alpha_w = math.acos(base / centre)
    return (teeth1 + teeth2) * (inv(alpha_w) - inv(pressure_angle)) / (2 * math.tan(pressure_angle))


def split_shift(shift_sum: float, teeth1: int, teeth2: int) -> tuple[float, float]:
    """Share a shift sum between pinion and wheel.

    Rule for speed-reducing pairs after Niemann and Winter, Maschinenelemente
    vol. II (from memory):
    ``x1 = (x1+x2)/2 + (0.5 - (x1+x2)/2) lg(u) / lg(z1 z2 / 100)``, ``u = z2/z1 >= 1``,
    which gives the pinion the larger share.  Where the rule does not apply
    (u = 1, or z1 z2 <= 100 where its logarithm changes sign) the sum is shared
    equally.  The returned pair is in the order of the arguments.
    """
    small, large = sorted((teeth1, teeth2))
    u = large / small
    half = shift_sum / 2
    spread = math.log10(small * large / 100) if small * large > 100 else 0.0
    if u == 1 or spread <= 0:
        x_small = half
    else:
        x_small = half + (0.5 - half) * math.log10(u) / spread
    x_large = shift_sum - x_small
    return (x_small, x_large) if teeth1 <= teeth2 else (x_large, x_small)


@dataclass(frozen=True)
class GearPair:
    """Two external spur gears on parallel axes at a centre distance.

    Attributes
    ----------
    gear1, gear2 : SpurGear
        Pinion and wheel (any order); tips already shortened if asked.
    centre_distance : float
        Centre distance as built, mm (zero-backlash distance plus any allowance).
    centre_allowance : float
        How much ``centre_distance`` exceeds the zero-backlash distance of the
        unthinned teeth, mm.
    """

    gear1: SpurGear
    gear2: SpurGear
    centre_distance: float
    centre_allowance: float = 0.0

    @property
    def module(self) -> float:
        """Common module, mm."""
        return self.gear1.module

    @property
    def pressure_angle(self) -> float:
        """Reference pressure angle, radians."""
        return self.gear1.pressure_angle

    @property
    def shift_sum(self) -> float:
        """Sum of the nominal profile shift coefficients."""
        return self.gear1.shift + self.gear2.shift

    @property
    def standard_centre_distance(self) -> float:
        """Reference centre distance ``m (z1 + z2) / 2``, mm."""
        return standard_centre_distance(self.gear1.teeth, self.gear2.teeth, self.module)

    @property
    def nominal_centre_distance(self) -> float:
        """Zero-backlash centre distance of the nominal (unthinned) teeth, mm."""
        return self.centre_distance - self.centre_allowance

    @property
    def working_pressure_angle(self) -> float:
        """Working pressure angle at the nominal centre distance, radians."""
        return working_pressure_angle(self.gear1.teeth, self.gear2.teeth, self.pressure_angle, self.shift_sum)

    @property
    def operating_pressure_angle(self) -> float:
        """Pressure angle at the centre distance as built, radians."""
        a = self.standard_centre_distance
        return math.acos(a * math.cos(self.pressure_angle) / self.centre_distance)

    @property
    def centre_modification(self) -> float:
        """Centre-distance modification coefficient ``y = (a_w - a) / m``."""
        return (self.nominal_centre_distance - self.standard_centre_distance) / self.module

    @property
    def tip_shortening(self) -> float:
        """Tip shortening coefficient ``k = (x1 + x2) - y`` (ISO 21771), modules (>= 0)."""
        return self.shift_sum - self.centre_modification

    def working_diameters(self) -> tuple[float, float]:
        """Working pitch diameters at the centre distance as built, mm."""
        z1, z2 = self.gear1.teeth, self.gear2.teeth
        d1 = 2 * self.centre_distance * z1 / (z1 + z2)
        return d1, 2 * self.centre_distance - d1


def make_pair(teeth1: int, teeth2: int, module: float, system: ToothSystem, *,
              shifts: tuple[float, float] | None = None, centre: float | None = None,
              backlash: float = 0.0, centre_allowance: float = 0.0, shorten_tips: bool = True) -> GearPair:
    """Build a pair from tooth counts and either shifts or a required centre distance.

    Parameters
    ----------
    teeth1, teeth2 : int
        Tooth counts.
    module : float
        Module, mm.
    system : ToothSystem
        Tooth system of both gears.
    shifts : (float, float), optional
        Profile shift coefficients.  Without ``shifts`` or ``centre``: (0, 0).
    centre : float, optional
        Required zero-backlash centre distance, mm; the shift sum that gives it
        is shared by :func:`split_shift`.
    backlash : float
        Circumferential backlash wanted from tooth thinning, mm on the working
        pitch circle; each gear is thinned by half of it (converted to its
        reference circle by ``cos(alpha_w) / cos(alpha)``).
    centre_allowance : float
        Extra centre distance beyond the zero-backlash one, mm (more backlash).
    shorten_tips : bool
        Shorten the tips to keep the basic rack's bottom clearance (default).
    """
    teeth1, teeth2 = as_int(teeth1, "tooth count"), as_int(teeth2, "tooth count")
    module = positive(module, "module", "mm")
    if shifts is not None and centre is not None:
        raise InputError("give either profile shifts or a centre distance, not both")
    if backlash < 0 or not math.isfinite(backlash):
        raise InputError(f"backlash must be 0 mm or more, got {backlash!r}")
    if centre_allowance < 0 or not math.isfinite(centre_allowance):
        raise InputError(f"centre-distance allowance must be 0 mm or more, got {centre_allowance!r}")
    if centre is not None:
        x1, x2 = split_shift(total_shift_for_centre(teeth1, teeth2, module, system.pressure_angle, centre), teeth1, teeth2)
    else:
        x1, x2 = shifts if shifts is not None else (0.0, 0.0)
    for teeth, x in ((teeth1, x1), (teeth2, x2)):  # each gear must exist before the pair is solved
        try:
            SpurGear(teeth, module, system, shift=x)
        except PointedTeethError:
            if not shorten_tips:  # shortened tips may still leave a land: decided below
                raise
    shift_sum = x1 + x2
    nominal = centre_distance_for_shift(teeth1, teeth2, module, system.pressure_angle, shift_sum)
    y = (nominal - standard_centre_distance(teeth1, teeth2, module)) / module
    k = max(shift_sum - y, 0.0) if shorten_tips else 0.0
    alpha_w = working_pressure_angle(teeth1, teeth2, system.pressure_angle, shift_sum)
    thinning = backlash / 2 * math.cos(alpha_w) / math.cos(system.pressure_angle)
    g1 = SpurGear(teeth1, module, system, shift=x1, thinning=thinning, tip_shortening=k)
    g2 = SpurGear(teeth2, module, system, shift=x2, thinning=thinning, tip_shortening=k)
    return GearPair(g1, g2, nominal + centre_allowance, centre_allowance)
