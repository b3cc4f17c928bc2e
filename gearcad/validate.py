"""Small validators shared by the dataclasses: strict integers, finite ranges."""

from __future__ import annotations

import math
import numbers

from .errors import InputError

__all__ = ["as_int", "finite", "in_range", "positive"]


def as_int(value: object, name: str) -> int:
    """Return ``value`` as an int, refusing anything that is not exactly integral.

    Like sympy's ``as_int``: ``12`` and ``12.0`` pass, ``12.0000001`` and
    ``True`` do not.
    """
    if isinstance(value, bool):
        raise InputError(f"{name} must be a whole number, got {value!r}")
    if isinstance(value, numbers.Integral):
        return int(value)
    if isinstance(value, numbers.Real) and math.isfinite(float(value)) and float(value).is_integer():
        return int(value)
    if isinstance(value, str):
        try:
            return int(value.strip())
        except ValueError:
            pass
    raise InputError(f"{name} must be a whole number, got {value!r}")


def finite(value: object, name: str) -> float:
    """Return ``value`` as a finite float or raise :class:`InputError`."""
    try:
        number = float(value)  # type: ignore[arg-type]
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number, got {value!r}") from None
    if isinstance(value, bool) or not math.isfinite(number):
        raise InputError(f"{name} must be a finite number, got {value!r}")
    return number


def positive(value: object, name: str, unit: str = "") -> float:
    """Return ``value`` as a float > 0 or raise :class:`InputError`."""
    number = finite(value, name)
    if number <= 0:
        raise InputError(f"{name} must be greater than 0{(' ' + unit) if unit else ''}, got {value!r}")
    return number


def in_range(value: object, name: str, low: float, high: float, unit: str = "") -> float:
    """Return ``value`` as a float within [low, high] or raise :class:`InputError`."""
    number = finite(value, name)
    if not low <= number <= high:
        suffix = f" {unit}" if unit else ""
        raise InputError(f"{name} must be from {low:g} to {high:g}{suffix}, got {value!r}")
    return number
