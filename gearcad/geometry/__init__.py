"""Pure geometry: involutes, spur gears and their generated outlines (numpy, no I/O).

Names load on first use (PEP 562), so importing :mod:`gearcad.geometry.gear` does not
load the outline generator (``gearcad ratio`` judges meshes without it).
"""

from __future__ import annotations

import importlib
from typing import Any

_HOMES = {"SpurGear": "gear", "inv": "involute", "inv_inverse": "involute", "Curve": "generate",
          "TipRelief": "generate", "ToothProfile": "generate", "outline": "generate", "tooth_profile": "generate"}

__all__ = ["SpurGear", "inv", "inv_inverse", "Curve", "TipRelief", "ToothProfile", "outline", "tooth_profile"]


def __getattr__(name: str) -> Any:
    if name not in _HOMES:
        raise AttributeError(f"module 'gearcad.geometry' has no attribute {name!r}")
    value = getattr(importlib.import_module(f".{_HOMES[name]}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
