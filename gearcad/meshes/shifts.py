"""Profile shifts of a pair: the tooth thinning as a shift, and shifts that keep both gears free of undercut.

Pure.  Undercut pinions get the least profile shift that avoids undercut
(rounded up to 0.01); the mate takes the opposite shift where it can without
undercut of its own, so the centre distance stays the reference one (a
zero-sum shift pair, common practice), and otherwise keeps zero shift.
"""

from __future__ import annotations

import math

from ..profiles import ToothSystem
from .checks import min_shift_without_undercut

__all__ = ["balanced_shifts", "least_shift", "thinning_shift"]


def thinning_shift(backlash: float, module: float, system: ToothSystem) -> float:
    """The tooth thinning of each gear as a shift coefficient: half the backlash (mm, as gearcad.pair.make_pair
    shares it), ``thinning_mm / (2 m tan(alpha))``."""
    return backlash / 2 / (2 * module * math.tan(system.pressure_angle))


def least_shift(teeth: int, system: ToothSystem, thinning: float) -> float:
    """The least profile shift (rounded up to 0.01, never negative) that keeps ``teeth`` free of undercut."""
    need = min_shift_without_undercut(teeth, system.pressure_angle, system.straight_flank_depth) + thinning
    return max(0.0, math.ceil(need * 100 - 1e-9) / 100)


def balanced_shifts(driver: int, driven: int, system: ToothSystem, thinning: float = 0.0) -> tuple[float, float]:
    """Profile shifts (driver, driven) that keep both gears free of undercut, summing to zero where possible.

    ``thinning`` is the tooth-thinning allowance per gear as a shift coefficient
    (``thinning_mm / (2 m tan(alpha))``): the cutter feeds that much deeper.
    """
    depth, alpha = system.straight_flank_depth, system.pressure_angle
    need = [least_shift(z, system, thinning) for z in (driver, driven)]
    if need == [0.0, 0.0]:
        return 0.0, 0.0
    small, big = (0, 1) if driver <= driven else (1, 0)
    shifts = [0.0, 0.0]
    shifts[small] = need[small]
    mate_least = min_shift_without_undercut((driver, driven)[big], alpha, depth) + thinning
    shifts[big] = -need[small] if -need[small] >= mate_least + 0.01 else need[big]
    return shifts[0], shifts[1]
