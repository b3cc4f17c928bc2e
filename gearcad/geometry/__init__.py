"""Pure geometry: involutes, spur gears and their generated outlines (numpy, no I/O).

Names load on first use (PEP 562), so importing :mod:`gearcad.geometry.gear` does not
load the outline generator (``gearcad ratio`` judges meshes without it).
"""

from __future__ import annotations

from ..lazy import lazy_names

_HOMES = {"SpurGear": "gear", "inv": "involute", "inv_inverse": "involute", "Curve": "generate",
          "TipRelief": "generate", "ToothProfile": "generate", "outline": "generate", "tooth_profile": "generate"}

__all__ = ["SpurGear", "inv", "inv_inverse", "Curve", "TipRelief", "ToothProfile", "outline", "tooth_profile"]

__getattr__, __dir__ = lazy_names(__name__, _HOMES, __all__)
