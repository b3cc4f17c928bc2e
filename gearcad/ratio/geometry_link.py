"""The one link of the ratio package to the tooth-system profiles."""

from __future__ import annotations

from functools import lru_cache

__all__ = ["pressure_angle"]


@lru_cache(maxsize=1)
def pressure_angle() -> float:
    """Pressure angle (radians) of the default tooth system."""
    from ..profiles import load_tooth_system

    return load_tooth_system().pressure_angle
