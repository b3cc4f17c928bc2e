"""Material profiles: the figures a load rating needs, read from ``profiles/materials/*.toml``.

Each number is a table ``{value, unit, source}`` (see :func:`gearcad.profiles.read_profile`).
The shipped values are typical figures for the material type, not a supplier's
guarantee; every source says so.  Units: density kg/m³, stresses and moduli MPa,
Poisson's ratio and safety factor dimensionless (unit ``"1"``).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

from .errors import ProfileError
from .profiles import ValueSpec, profile_names, read_profile

__all__ = ["Material", "load_material", "material_names", "MATERIAL_KEYS"]

MATERIAL_KEYS: Mapping[str, ValueSpec] = {
    "density": ValueSpec("kg/m3", 100.0, 25_000.0),
    "elastic_modulus": ValueSpec("MPa", 10.0, 1_000_000.0),
    "poisson_ratio": ValueSpec("1", 0.0, 0.499),
    "allowable_bending": ValueSpec("MPa", 0.1, 3_000.0),
    "allowable_contact": ValueSpec("MPa", 0.1, 5_000.0),
    "min_safety_factor": ValueSpec("1", 1.0, 10.0),
}


@dataclass(frozen=True)
class Material:
    """A gear material as the load rating uses it.

    Parameters
    ----------
    name : str
        Profile name (file stem) or path.
    title : str
        Short human title, e.g. ``"acetal (POM)"``.
    density : float
        Density of the solid material, kg/m³.
    elastic_modulus : float
        Young's modulus, MPa.
    poisson_ratio : float
        Poisson's ratio, dimensionless.
    allowable_bending : float
        Tooth-root bending stress the material carries in long running, for use
        with the Lewis stress (before any safety factor), MPa.
    allowable_contact : float
        Surface (Hertz) contact stress the flanks carry in long running, MPa.
    min_safety_factor : float
        Least safety factor (allowable / computed stress) to accept, dimensionless.
    note : str
        Free text from the profile (cautions, grades the figures stand for).
    sources : Mapping[str, str]
        Where each value comes from, by key.
    """

    name: str
    title: str
    density: float
    elastic_modulus: float
    poisson_ratio: float
    allowable_bending: float
    allowable_contact: float
    min_safety_factor: float
    note: str = ""
    sources: Mapping[str, str] = field(default_factory=dict, compare=False)


def load_material(name: str) -> Material:
    """Load a material by name (see :func:`material_names`) or by a path ending ``.toml``.

    Raises
    ------
    ProfileError
        When the file is missing, is not valid TOML, or a key is missing,
        unknown, of the wrong unit or out of range; the message names file and key.
    """
    values, sources, texts = read_profile("materials", name, MATERIAL_KEYS)
    if not texts["title"].strip():
        raise ProfileError(f"material profile {name}: key 'title' must not be empty")
    return Material(name=name, title=texts["title"], note=texts.get("note", ""), sources=sources, **values)


def material_names() -> list[str]:
    """Names of the shipped material profiles."""
    return profile_names("materials")
