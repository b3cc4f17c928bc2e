"""gearcad: from a ratio to gears that mesh and files a machine accepts.

The public API (names load on first use, so ``import gearcad`` stays light and
never loads the CAD kernel):

- ratios: :func:`parse_target`, :func:`make_limits`, :class:`RatioQuery`, :func:`solve_ratio`,
  :func:`read_inventory`, :class:`Train`
- gears: :class:`SpurGear`, :func:`load_tooth_system`, :func:`outline`, :func:`tooth_profile`,
  :class:`TipRelief`, :func:`make_pair`, :func:`analyse_pair`, :class:`Finding`
- trains and files: :func:`read_train`, :func:`parse_train`, :func:`plan_train`, :func:`write_plan`,
  :class:`BuildOptions`, :func:`load_fabrication`
- epicyclic and summing trains: :func:`make_network`, :func:`solve_network`, :func:`network_ratio`,
  :func:`make_set`, :func:`check_set`, :func:`solve_planetary`, :func:`solve_summing`, :class:`RingGear`,
  :func:`make_internal_pair`, :func:`analyse_internal_pair`, :class:`SummingSpec`, :func:`summing_train_spec`
- load ratings: :func:`load_material`, :func:`rate_pair`, :func:`lewis_form_factor`
- design: :func:`design` (solve, choose within tolerance, return the train description), :class:`Design`
- errors: :class:`GearcadError` and its subclasses

Lengths are in mm and angles in radians inside the API; files and reports use mm and degrees.
"""

from __future__ import annotations

import importlib
from typing import Any

from .errors import ExportError, GearcadError, GeometryError, InputError, ProfileError, ToleranceError

__version__ = "0.1.0"

_LAZY = {
    "parse_target": "gearcad.ratio.target",
    "make_limits": "gearcad.ratio.limits",
    "RatioQuery": "gearcad.ratio.solve",
    "solve_ratio": "gearcad.ratio.solve",
    "read_inventory": "gearcad.ratio.inventory",
    "Train": "gearcad.ratio.train",
    "SpurGear": "gearcad.geometry.gear",
    "outline": "gearcad.geometry.generate",
    "tooth_profile": "gearcad.geometry.generate",
    "TipRelief": "gearcad.geometry.generate",
    "inv": "gearcad.geometry.involute",
    "inv_inverse": "gearcad.geometry.involute",
    "load_tooth_system": "gearcad.profiles",
    "load_fabrication": "gearcad.profiles",
    "make_pair": "gearcad.meshes.pair",
    "GearPair": "gearcad.meshes.pair",
    "analyse_pair": "gearcad.meshes.checks",
    "Finding": "gearcad.meshes.checks",
    "read_train": "gearcad.trains.trainfile",
    "parse_train": "gearcad.trains.trainfile",
    "TrainSpec": "gearcad.trains.spec",
    "plan_train": "gearcad.trains.planner",
    "write_plan": "gearcad.export.bundle",
    "BuildOptions": "gearcad.export.bundle",
    "make_network": "gearcad.ratio.kinematics",
    "solve_network": "gearcad.ratio.kinematics",
    "network_ratio": "gearcad.ratio.kinematics",
    "make_set": "gearcad.ratio.planetary_set",
    "check_set": "gearcad.ratio.planetary_set",
    "solve_planetary": "gearcad.ratio.planetary",
    "solve_summing": "gearcad.ratio.summing",
    "SummingSpec": "gearcad.trains.spec",
    "summing_train_spec": "gearcad.trains.stages",
    "RingGear": "gearcad.geometry.internal",
    "make_internal_pair": "gearcad.meshes.internal",
    "analyse_internal_pair": "gearcad.meshes.internal",
    "load_material": "gearcad.materials",
    "rate_pair": "gearcad.meshes.strength",
    "lewis_form_factor": "gearcad.meshes.strength",
    "design": "gearcad.trains.design",
    "Design": "gearcad.trains.design",
}

__all__ = ["GearcadError", "InputError", "ProfileError", "GeometryError", "ExportError", "ToleranceError",
           "__version__", *_LAZY]


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        value = getattr(importlib.import_module(_LAZY[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'gearcad' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
