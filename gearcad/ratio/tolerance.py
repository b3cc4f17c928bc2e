"""Tolerance and result-count values shared by every solver (light: no numpy, no sympy).

A tolerance is the largest |relative error| of a train's ratio against the
target that the user accepts: ``|ratio / target - 1| <= tolerance``.
"""

from __future__ import annotations

from ..errors import InputError
from ..validate import as_int, finite

__all__ = ["tolerance_value", "count_value", "DESIGN_TOLERANCE", "is_within"]

#: Default tolerance of ``gearcad design`` (a practitioner's choice, README "Tolerance"): 1e-3 is 0.1 %,
#: below the slip of a belt or the error of a hand-set dial, yet it refuses a train that is plainly another
#: ratio; clock and instrument work asks for tighter with ``--tolerance``.
DESIGN_TOLERANCE = 1e-3


def tolerance_value(value: object) -> float:
    """A tolerance > 0 and < 1, else :class:`InputError`."""
    number = finite(value, "tolerance")
    if not 0 < number < 1:
        raise InputError(f"tolerance must be greater than 0 and less than 1 (a relative error), got {value!r}")
    return number


def count_value(value: object) -> int:
    """A result count from 1 to 1000, else :class:`InputError`."""
    number = as_int(value, "count")
    if not 1 <= number <= 1000:
        raise InputError(f"count must be from 1 to 1000, got {value!r}")
    return number


def is_within(relative_error: float, tolerance: float | None) -> bool:
    """Whether a relative error meets the tolerance (always, without one)."""
    return tolerance is None or abs(relative_error) <= tolerance
