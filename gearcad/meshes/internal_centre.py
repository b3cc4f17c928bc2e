"""The centre distance of an internal pair and the shift sum that gives a centre distance.

Sign convention (see :mod:`gearcad.geometry.internal`): tooth counts and
diameters are positive; profile shifts keep ISO 21771's sign (positive towards
each gear's tooth tips).  Writing the ring's teeth as ``-z2`` turns the formulas
below into the external-pair formulas of ISO 21771, clause 5.

Zero-backlash meshing (derivation).  On the working pitch circles the pinion's
tooth must fill the ring's space: ``s_w1 = e_w2``, so ``s_w1 + s_w2 = p_w``.
With ``s_w1 = d_w1 (s1/d1 + inv(alpha) - inv(alpha_w))``, the ring's tooth
``s_w2 = d_w2 (s2/d2 - inv(alpha) + inv(alpha_w))`` (a ring tooth is an external
tooth space), ``s_i = m (pi/2 + 2 x_i tan(alpha))`` and ``p_w = pi d_w / z``:

``inv(alpha_w) = inv(alpha) - 2 tan(alpha) (x1 + x2) / (z2 - z1)``,
``a_w = (z2 - z1) m cos(alpha) / (2 cos(alpha_w))``.

Handbooks that count the ring's shift away from the axis write the first as
``inv(alpha) + 2 tan(alpha) (x2 - x1) / (z2 - z1)``: the same with ``x2 -> -x2``.
Lengths in mm, angles in radians.  Pure functions; no I/O.
"""

from __future__ import annotations

import math

from ..errors import InputError
from ..geometry.involute import inv, inv_inverse

__all__ = ["internal_standard_centre_distance", "internal_working_pressure_angle", "internal_centre_distance",
           "internal_shift_sum_for_centre"]


def internal_standard_centre_distance(pinion_teeth: int, ring_teeth: int, module: float) -> float:
    """Reference centre distance ``m (z2 - z1) / 2``, mm (ISO 21771: ``m (z1 + z2) / 2`` with ``z2 < 0``, negated)."""
    return module * (ring_teeth - pinion_teeth) / 2


def internal_working_pressure_angle(pinion_teeth: int, ring_teeth: int, pressure_angle: float, shift_sum: float) -> float:
    """Working pressure angle (radians): ``inv(alpha_w) = inv(alpha) - 2 tan(alpha) (x1 + x2) / (z2 - z1)``.

    Shifts with ISO 21771's sign (module docstring).
    """
    if ring_teeth <= pinion_teeth:
        raise InputError(f"ring tooth count {ring_teeth} must exceed the pinion's {pinion_teeth}")
    value = inv(pressure_angle) - 2 * math.tan(pressure_angle) * shift_sum / (ring_teeth - pinion_teeth)
    if value <= 0:
        raise InputError(f"profile shift sum {shift_sum:g} is too large for a {pinion_teeth}-tooth pinion in a "
                         f"{ring_teeth}-tooth ring: no centre distance exists")
    return inv_inverse(value)


def internal_centre_distance(pinion_teeth: int, ring_teeth: int, module: float, pressure_angle: float,
                             shift_sum: float) -> float:
    """Zero-backlash centre distance ``a_w = (z2 - z1) m cos(alpha) / (2 cos(alpha_w))``, mm."""
    alpha_w = internal_working_pressure_angle(pinion_teeth, ring_teeth, pressure_angle, shift_sum)
    return internal_standard_centre_distance(pinion_teeth, ring_teeth, module) * math.cos(pressure_angle) / math.cos(alpha_w)



def internal_shift_sum_for_centre(pinion_teeth: int, ring_teeth: int, module: float, pressure_angle: float,
                                  centre: float) -> float:
    """The shift sum ``x1 + x2`` that gives zero backlash at ``centre`` (mm): the inverse of
    :func:`internal_centre_distance`, ``x1 + x2 = -(z2 - z1) (inv(alpha_w) - inv(alpha)) / (2 tan(alpha))`` with
    ``cos(alpha_w) = m (z2 - z1) cos(alpha) / (2 a)``."""
    difference = ring_teeth - pinion_teeth
    base = module * difference * math.cos(pressure_angle) / 2
    if not centre > base:
        raise InputError(f"centre distance {centre:g} mm is out of reach of an internal pair of {difference} teeth "
                         f"difference and module {module:g}: it must exceed {base:.4f} mm")
    return -difference * (inv(math.acos(base / centre)) - inv(pressure_angle)) / (2 * math.tan(pressure_angle))
