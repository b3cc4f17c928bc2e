"""Profiles: tooth systems (and later fabrication processes and materials) from TOML.

Each profile is one TOML file under ``profiles/<kind>/``.  Every number in it is
a table ``{value, unit, source}`` so that no figure travels without its source.
Reading a profile is the only file access outside ``export/``; it is read-only.
A profile can be named (``iso53-a``) or given as a path to a ``.toml`` file.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Mapping

from .errors import ProfileError
from .inputfiles import MAX_INPUT_BYTES, decode_text, parse_toml, read_text_file

__all__ = [
    "ToothSystem",
    "ValueSpec",
    "load_tooth_system",
    "tooth_system_names",
    "read_profile",
    "profile_names",
    "DEFAULT_TOOTH_SYSTEM",
    "Fabrication",
    "load_fabrication",
    "fabrication_names",
    "DEFAULT_FABRICATION",
]

DEFAULT_TOOTH_SYSTEM = "iso53-a"


@dataclass(frozen=True)
class ValueSpec:
    """What a numeric key of a profile must hold: its unit and allowed range."""

    unit: str
    low: float
    high: float
    required: bool = True


def _profile_dir(kind: str):
    from . import profile_data  # the shipped profiles are files on disk: a Path, without importlib.resources' start-up

    return Path(profile_data.__path__[0]).joinpath(kind)


def profile_names(kind: str) -> list[str]:
    """Names of the shipped profiles of one kind (``tooth``, ``fabrication``, ...)."""
    folder = _profile_dir(kind)
    if not folder.is_dir():
        return []
    return sorted(p.name[: -len(".toml")] for p in folder.iterdir() if p.name.endswith(".toml"))


def _locate(kind: str, name: str):
    label = {"materials": "material"}.get(kind, kind)
    if not name or len(name) > 1024 or not name.isprintable():
        shown = repr(name if len(name) <= 60 else name[:57] + "...")
        raise ProfileError(f"{label} profile must be a profile name or a path to a .toml file of at most 1024 "
                           f"printable characters, got {shown}")
    if name.endswith(".toml"):
        path = Path(name)
        if not path.is_file():
            raise ProfileError(f"{ {'materials': 'material'}.get(kind, kind)} profile file {name!r} does not exist")
        return path, str(path)
    candidate = _profile_dir(kind).joinpath(f"{name}.toml")
    if not candidate.is_file():
        choices = ", ".join(profile_names(kind)) or "none"
        label = {"materials": "material"}.get(kind, kind)
        raise ProfileError(f"unknown {label} profile {name!r}; choose one of: {choices}")
    return candidate, f"profiles/{kind}/{name}.toml"


def read_profile(kind: str, name: str, numbers: Mapping[str, ValueSpec],
                 texts: tuple[str, ...] = ("title",)) -> tuple[dict[str, float], dict[str, str], dict[str, str]]:
    """Read and validate one profile file.

    Returns ``(values, sources, texts)``: numeric values in the file's units,
    the source of each value, and the text keys.  Raises :class:`ProfileError`
    naming the file and key for a syntax error, a missing or unknown key, a
    wrong type or a value out of range.
    """
    path, shown = _locate(kind, name)
    label = f"{ {'materials': 'material'}.get(kind, kind)} profile"
    if isinstance(path, Path):
        text = read_text_file(path, label, ProfileError)
    else:  # a shipped profile inside the package
        text = decode_text(path.read_bytes()[:MAX_INPUT_BYTES + 1], shown, ProfileError)
    data = parse_toml(text, shown, ProfileError)
    known = set(numbers) | set(texts) | {"note", "standard"}
    for key in data:
        if key not in known:
            raise ProfileError(f"{shown}: unknown key {key!r}; allowed: {', '.join(sorted(known))}")
    text_values: dict[str, str] = {}
    for key in texts:
        if not isinstance(data.get(key), str):
            raise ProfileError(f"{shown}: key {key!r} must be a text")
        text_values[key] = data[key]
    for key in ("note", "standard"):
        if key in data:
            if not isinstance(data[key], str):
                raise ProfileError(f"{shown}: key {key!r} must be a text")
            text_values[key] = data[key]
    values: dict[str, float] = {}
    sources: dict[str, str] = {}
    for key, spec in numbers.items():
        if key not in data:
            if spec.required:
                raise ProfileError(f"{shown}: missing key {key!r}")
            continue
        entry = data[key]
        if not isinstance(entry, dict) or set(entry) - {"value", "unit", "source"}:
            raise ProfileError(f"{shown}: key {key!r} must be a table with value, unit and source")
        value = entry.get("value")
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
            raise ProfileError(f"{shown}: {key}.value must be a number, got {value!r}")
        if entry.get("unit") != spec.unit:
            raise ProfileError(f"{shown}: {key}.unit must be {spec.unit!r}, got {entry.get('unit')!r}")
        if not isinstance(entry.get("source"), str) or not entry["source"].strip():
            raise ProfileError(f"{shown}: {key}.source must name where the value comes from")
        if not spec.low <= value <= spec.high:
            raise ProfileError(f"{shown}: {key}.value must be from {spec.low:g} to {spec.high:g} {spec.unit}, got {value!r}")
        values[key] = float(value)
        sources[key] = entry["source"]
    return values, sources, text_values


@dataclass(frozen=True)
class ToothSystem:
    """A basic rack tooth profile (ISO 53 style), lengths in modules.

    Parameters
    ----------
    name : str
        Profile name (file stem) or path.
    title : str
        Short human title.
    pressure_angle : float
        Pressure angle of the basic rack, radians.
    addendum : float
        Addendum of the gear (h_aP / m), in modules.
    dedendum : float
        Dedendum of the gear (h_fP / m), in modules; equals the cutter's addendum.
    fillet_radius : float
        Root fillet radius of the basic rack (rho_fP / m), which is the cutter tip
        radius, in modules.
    """

    name: str
    title: str
    pressure_angle: float
    addendum: float
    dedendum: float
    fillet_radius: float
    standard: str = ""
    note: str = ""
    sources: Mapping[str, str] = field(default_factory=dict, compare=False)

    def __post_init__(self) -> None:
        if not self.dedendum > self.addendum:
            raise ProfileError(f"tooth system {self.name}: dedendum ({self.dedendum:g} m) must exceed the addendum ({self.addendum:g} m)")
        if self.fillet_radius > self.max_fillet_radius + 1e-12:
            raise ProfileError(
                f"tooth system {self.name}: fillet_radius {self.fillet_radius:g} m is larger than the "
                f"{self.max_fillet_radius:.4f} m that fits the basic rack's tooth space")

    @property
    def clearance(self) -> float:
        """Bottom clearance of the basic rack (dedendum - addendum), in modules."""
        return self.dedendum - self.addendum

    @property
    def max_fillet_radius(self) -> float:
        """Largest cutter tip radius that keeps a (zero-width) flat tip, in modules.

        The tip round's centre lies at ``pi/4 + (rho - h_f) tan(alpha) - rho/cos(alpha)``
        from the cutter tooth's centre line; it must not pass that line.
        """
        a = self.pressure_angle
        return (math.pi / 4 - self.dedendum * math.tan(a)) / (1 / math.cos(a) - math.tan(a))

    @property
    def fillet_stretch(self) -> float:
        """Ratio of the cutter tip round's semi-axis along the rack to its radius: 1, a circle.

        A helical gear's transverse section is cut by the transverse section of the
        rack, whose round is an ellipse stretched along the rack by ``1/cos(beta)``
        (see ``gearcad.meshes.helical.TransverseSystem``).
        """
        return 1.0

    @property
    def straight_flank_depth(self) -> float:
        """Depth of the cutter's straight flank below the reference line, in modules.

        ``h_f - rho (1 - sin alpha)``: where the flank meets the tip round.  This
        is the addendum that decides undercut.
        """
        return self.dedendum - self.fillet_radius * (1 - math.sin(self.pressure_angle))


_TOOTH_KEYS = {
    "pressure_angle": ValueSpec("degree", 10.0, 35.0),
    "addendum": ValueSpec("module", 0.3, 2.0),
    "dedendum": ValueSpec("module", 0.4, 2.5),
    "fillet_radius": ValueSpec("module", 0.0, 1.0),
}


def load_tooth_system(name: str = DEFAULT_TOOTH_SYSTEM) -> ToothSystem:
    """Load a tooth system by name (see :func:`tooth_system_names`) or ``.toml`` path."""
    values, sources, texts = read_profile("tooth", name, _TOOTH_KEYS)
    return ToothSystem(
        name=name,
        title=texts["title"],
        pressure_angle=math.radians(values["pressure_angle"]),
        addendum=values["addendum"],
        dedendum=values["dedendum"],
        fillet_radius=values["fillet_radius"],
        standard=texts.get("standard", ""),
        note=texts.get("note", ""),
        sources=sources,
    )


def tooth_system_names() -> list[str]:
    """Names of the shipped tooth systems."""
    return profile_names("tooth")


DEFAULT_FABRICATION = "laser-3mm-acrylic"
PROCESSES = ("laser", "fdm", "cnc")


@dataclass(frozen=True)
class Fabrication:
    """How the parts are made: compensations and clearances, mm.

    ``kerf``: material a cut removes (outlines move out by half, holes in);
    ``backlash``: circumferential backlash built in by thinning the teeth;
    ``bore_clearance``: added to shaft diameters; ``tool_radius``: the cutter's
    radius (CNC), which the root fillet must not be tighter than; ``layer_gap``,
    ``gear_clearance``, ``plate_margin``, ``plate_corner_radius``,
    ``spacer_hole``: layout and plate figures; ``sheet_width``, ``sheet_height``:
    the stock sheet (or print bed) the nested cut sheets are laid out for
    (optional in a profile, default 600 x 400 mm); ``min_feature``: the thinnest
    wall the process holds (optional, 0: not checked), which a gear's tip may not
    be thinner than.
    """

    name: str
    title: str
    process: str
    material: str
    kerf: float
    backlash: float
    bore_clearance: float
    tool_radius: float
    layer_gap: float
    gear_clearance: float
    plate_margin: float
    plate_corner_radius: float
    spacer_hole: float
    note: str = ""
    sources: Mapping[str, str] = field(default_factory=dict, compare=False)
    material_profile: str = ""
    sheet_width: float = 600.0  # mm; common practice (a common laser bed and stock sheet)
    sheet_height: float = 400.0  # mm; common practice
    min_feature: float = 0.0


_FABRICATION_KEYS = {
    "kerf": ValueSpec("mm", 0.0, 2.0),
    "backlash": ValueSpec("mm", 0.0, 2.0),
    "bore_clearance": ValueSpec("mm", 0.0, 2.0),
    "tool_radius": ValueSpec("mm", 0.0, 10.0),
    "layer_gap": ValueSpec("mm", 0.0, 20.0),
    "gear_clearance": ValueSpec("mm", 0.0, 20.0),
    "plate_margin": ValueSpec("mm", 1.0, 100.0),
    "plate_corner_radius": ValueSpec("mm", 0.0, 50.0),
    "spacer_hole": ValueSpec("mm", 1.0, 30.0),
    "sheet_width": ValueSpec("mm", 10.0, 10000.0, required=False),
    "sheet_height": ValueSpec("mm", 10.0, 10000.0, required=False),
    "min_feature": ValueSpec("mm", 0.0, 5.0, required=False),
}


def load_fabrication(name: str = DEFAULT_FABRICATION) -> Fabrication:
    """Load a fabrication profile by name (see :func:`fabrication_names`) or ``.toml`` path."""
    values, sources, texts = read_profile("fabrication", name, _FABRICATION_KEYS,
                                          texts=("title", "process", "material", "material_profile"))
    if texts["process"] not in PROCESSES:
        raise ProfileError(f"fabrication profile {name}: process must be one of {', '.join(PROCESSES)}, got {texts['process']!r}")
    if values["spacer_hole"] >= values["plate_margin"]:
        raise ProfileError(f"fabrication profile {name}: spacer_hole ({values['spacer_hole']:g} mm) must be smaller than plate_margin")
    return Fabrication(name=name, title=texts["title"], process=texts["process"], material=texts["material"],
                       note=texts.get("note", ""), sources=sources, material_profile=texts["material_profile"], **values)


def fabrication_names() -> list[str]:
    """Names of the shipped fabrication profiles."""
    return profile_names("fabrication")
