"""Machine files: a lathe's leadscrew, fixed gearing, change gears and swing frame, from TOML.

A machine file is a TOML file of our own design, shipped in ``profiles/lathes/``
or given by path.  Text keys: ``title``, ``note``, ``tumbler_reverse``
(true/false), ``shelf`` (the change gears, in the inventory syntax of
:mod:`gearcad.ratio.inventory`), ``tooth_system`` and ``fabrication`` (profile
names, for the files of gears that are missing).  Every number is a table with
``value``, ``unit`` and ``source`` (as in the other profiles); a range is a table
with two values.  Tables:

``[leadscrew]``        ``pitch`` (``"8tpi"``, ``"6mm"``) and ``source``;
``[spindle_to_stud]``  ``gears``: the fixed meshes from spindle to stud as
                       ``[[driver, driven], ...]`` tooth counts (tumbler gears are
                       idlers and change no ratio), and ``source``;
``[module]`` or ``[diametral_pitch]``  the change gears' tooth size (mm, or per inch);
``[stud_to_leadscrew]`` the fixed distance between the stud and leadscrew axes;
``[slot]``             ``nearest`` and ``farthest``: the intermediate stud's range
                       of distance from the leadscrew axis along the swing frame;
``[swing]``            optional ``from`` and ``to``: the frame's angle range,
                       degrees from the line leadscrew-to-stud (default 0 to 180);
``[largest_gear]``     the most teeth a change gear may have (the guard's room);
``[centre_allowance]`` added to every centre distance for backlash;
``[gear_gap]``         least gap between a gear's tip and a shaft end it passes;
``[boss_diameter]``    diameter of a shaft end with its nut and washer;
``[bore]``, ``[face_width]`` and optional ``[keyway]`` (``width``, ``depth``):
                       for building gears that are not on the shelf.

Lengths may be given in ``mm`` or ``inch``.  :func:`load_machine` is input (it
reads one file), like the profile loaders.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field
from fractions import Fraction
from importlib import resources
from pathlib import Path
from typing import Any, Mapping

from ..errors import GearcadError, ProfileError
from ..ratio.inventory import Inventory, parse_inventory
from .threads import INCH, Pitch, parse_pitch

__all__ = ["Machine", "load_machine", "parse_machine", "machine_names", "MAX_SHELF_GEARS", "MAX_SHELF_KINDS"]

#: Most gears a shelf may hold, and most distinct tooth counts (bounds every search).
MAX_SHELF_GEARS = 200
MAX_SHELF_KINDS = 80
_LENGTH_UNITS = {"mm": Fraction(1), "inch": INCH}
_LENGTH_RANGE = (0.0, 3000.0)  # mm
_TEXTS = ("title", "note", "shelf", "tooth_system", "fabrication")
_TABLES = ("leadscrew", "spindle_to_stud", "module", "diametral_pitch", "stud_to_leadscrew", "slot", "swing",
           "largest_gear", "centre_allowance", "gear_gap", "boss_diameter", "bore", "face_width", "keyway")
KINDS = "lathes"


@dataclass(frozen=True)
class Machine:
    """A lathe's change-gear setting: lengths in mm, angles in radians.

    Attributes
    ----------
    name, title, note : str
        File name (or path), title and note.
    leadscrew : Pitch
        The leadscrew's pitch.
    fixed_gears : tuple of (int, int)
        Fixed meshes from spindle to stud, (driver, driven) teeth.
    tumbler_reverse : bool
        Whether a tumbler reverse sets the hand of the thread.
    module : float
        Module of the change gears, mm (25.4 / P for diametral pitch P).
    diametral_pitch : float or None
        The diametral pitch, per inch, when the gears are given so.
    shelf : Inventory
        The change gears on the shelf.
    stud_to_leadscrew : float
        Distance between the stud and leadscrew axes, mm.
    slot : (float, float)
        Nearest and farthest distance of the intermediate stud from the
        leadscrew axis, mm.
    swing : (float, float)
        Least and greatest frame angle, radians from the line leadscrew-to-stud.
    largest_gear : int
        Most teeth a change gear may have.
    centre_allowance, gear_gap, boss_diameter, bore, face_width : float
        mm (see the module notes).
    keyway : (float, float) or None
        Keyway width and depth beyond the bore, mm.
    tooth_system, fabrication : str
        Profile names for building missing gears.
    sources : mapping
        Where each number comes from, by key.
    """

    name: str
    title: str
    leadscrew: Pitch
    fixed_gears: tuple[tuple[int, int], ...]
    tumbler_reverse: bool
    module: float
    diametral_pitch: float | None
    shelf: Inventory
    stud_to_leadscrew: float
    slot: tuple[float, float]
    swing: tuple[float, float]
    largest_gear: int
    centre_allowance: float
    gear_gap: float
    boss_diameter: float
    bore: float
    face_width: float
    keyway: tuple[float, float] | None = None
    tooth_system: str = "iso53-a"
    fabrication: str = "cnc-2mm-endmill"
    note: str = ""
    sources: Mapping[str, str] = field(default_factory=dict, compare=False)

    @property
    def fixed_ratio(self) -> Fraction:
        """Stud turns per spindle turn through the fixed gears (exact)."""
        ratio = Fraction(1)
        for driver, driven in self.fixed_gears:
            ratio *= Fraction(driver, driven)
        return ratio

    @property
    def advance_per_stud_turn(self) -> Fraction:
        """Leadscrew pitch times the fixed ratio, mm: the thread a 1:1 change-gear train cuts.

        A train of ratio ``R`` (leadscrew turns per stud turn) cuts the pitch
        ``R * advance_per_stud_turn``.
        """
        return self.leadscrew.coefficient * self.fixed_ratio


def machine_names() -> list[str]:
    """Names of the shipped machine files."""
    from ..profiles import profile_names

    return profile_names(KINDS)


def _locate(name: str) -> tuple[Path | Any, str]:
    if name.endswith(".toml") or "/" in name or "\\" in name:
        path = Path(name)
        if not path.is_file():
            raise ProfileError(f"machine file {name!r} does not exist")
        return path, str(path)
    candidate = resources.files("gearcad.profile_data").joinpath(KINDS).joinpath(f"{name}.toml")
    if not candidate.is_file():
        raise ProfileError(f"unknown machine {name!r}; choose one of: {', '.join(machine_names()) or 'none'}, "
                           "or give the path of a machine file (.toml)")
    return candidate, f"profiles/{KINDS}/{name}.toml"


def load_machine(name: str) -> Machine:
    """Load a machine by name (see :func:`machine_names`) or ``.toml`` path.

    Raises
    ------
    ProfileError
        The file is missing, is not TOML, or a key is missing, unknown, of
        the wrong unit or out of range (the message names the file and key).
    """
    path, shown = _locate(name)
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise ProfileError(f"machine file {shown!r} cannot be read: {exc}") from None
    if len(text) > 100_000:
        raise ProfileError(f"{shown}: the file is {len(text)} characters long; allowed: at most 100000")
    return parse_machine(text, name, shown)


class _Reader:
    """Checks the keys of one machine file, naming the file in every error."""

    def __init__(self, data: dict, shown: str) -> None:
        self.data, self.shown = data, shown
        self.sources: dict[str, str] = {}

    def fail(self, message: str) -> ProfileError:
        return ProfileError(f"{self.shown}: {message}")

    def table(self, key: str, fields: tuple[str, ...], required: bool = True) -> dict | None:
        entry = self.data.get(key)
        if entry is None:
            if required:
                raise self.fail(f"missing table [{key}]")
            return None
        if not isinstance(entry, dict):
            raise self.fail(f"{key} must be a table with {', '.join(fields)}, unit and source")
        extra = set(entry) - set(fields) - {"unit", "source"}
        if extra:
            raise self.fail(f"unknown key {key}.{sorted(extra)[0]}; allowed: {', '.join(fields)}, unit, source")
        source = entry.get("source")
        if not isinstance(source, str) or not source.strip():
            raise self.fail(f"{key}.source must name where the value comes from (e.g. \"measured on the machine\")")
        self.sources[key] = source
        return entry

    def number(self, entry: dict, key: str, name: str, low: float, high: float) -> float:
        value = entry.get(name)
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
            raise self.fail(f"{key}.{name} must be a number, got {value!r}")
        if not low <= value <= high:
            raise self.fail(f"{key}.{name} must be from {low:g} to {high:g}, got {value!r}")
        return float(value)

    def lengths(self, key: str, fields: tuple[str, ...] = ("value",), required: bool = True,
                low: float = _LENGTH_RANGE[0]) -> tuple[float, ...] | None:
        entry = self.table(key, fields, required)
        if entry is None:
            return None
        unit = entry.get("unit")
        if unit not in _LENGTH_UNITS:
            raise self.fail(f"{key}.unit must be one of {', '.join(_LENGTH_UNITS)}, got {unit!r}")
        scale = float(_LENGTH_UNITS[unit])
        out = []
        for name in fields:
            if name not in entry:
                raise self.fail(f"missing key {key}.{name}")
            value = self.number(entry, key, name, -1e9, 1e9) * scale
            if not low <= value <= _LENGTH_RANGE[1]:
                raise self.fail(f"{key}.{name} must be from {low:g} to {_LENGTH_RANGE[1]:g} mm, got {value:g} mm")
            out.append(value)
        return tuple(out)

    def text(self, key: str, default: str | None = None) -> str:
        value = self.data.get(key, default)
        if not isinstance(value, str):
            raise self.fail(f"key {key!r} must be a text" if key in self.data else f"missing key {key!r}")
        return value


def _tooth_size(r: _Reader) -> tuple[float, float | None]:
    has_module, has_dp = "module" in r.data, "diametral_pitch" in r.data
    if has_module == has_dp:
        raise r.fail("give the change gears' tooth size as exactly one of [module] (mm) or [diametral_pitch] (per inch)")
    if has_module:
        entry = r.table("module", ("value",))
        if entry.get("unit") != "mm":
            raise r.fail(f"module.unit must be 'mm', got {entry.get('unit')!r}")
        return r.number(entry, "module", "value", 0.2, 10.0), None
    entry = r.table("diametral_pitch", ("value",))
    if entry.get("unit") != "per inch":
        raise r.fail(f"diametral_pitch.unit must be 'per inch', got {entry.get('unit')!r}")
    dp = r.number(entry, "diametral_pitch", "value", 2.5, 128.0)
    return float(INCH) / dp, dp


def _leadscrew(r: _Reader) -> Pitch:
    entry = r.table("leadscrew", ("pitch",))
    text = entry.get("pitch")
    if not isinstance(text, str):
        raise r.fail(f"leadscrew.pitch must be a text such as \"8tpi\" or \"6mm\", got {text!r}")
    try:
        pitch = parse_pitch(text)
    except GearcadError as exc:
        raise r.fail(f"leadscrew.pitch: {exc}") from None
    if pitch.pi_power or not 0.5 <= pitch.mm <= 25.4:
        raise r.fail(f"leadscrew.pitch must be in mm or TPI, from 0.5 to 25.4 mm, got {text!r}")
    return pitch


def _fixed_gears(r: _Reader) -> tuple[tuple[int, int], ...]:
    entry = r.table("spindle_to_stud", ("gears",))
    gears = entry.get("gears")
    ok = isinstance(gears, list) and 1 <= len(gears) <= 6 and all(
        isinstance(g, list) and len(g) == 2 and all(isinstance(z, int) and not isinstance(z, bool) and 6 <= z <= 400
                                                    for z in g) for g in gears)
    if not ok:
        raise r.fail(f"spindle_to_stud.gears must list 1 to 6 meshes [driver, driven] of 6 to 400 teeth "
                     f"(e.g. [[40, 40]] for 1:1), got {gears!r}")
    return tuple((int(a), int(b)) for a, b in gears)


def _shelf(r: _Reader, largest: int) -> Inventory:
    text = r.text("shelf")
    try:
        shelf = parse_inventory(text, f"{r.shown} shelf")
    except GearcadError as exc:
        raise ProfileError(str(exc)) from None
    if shelf.size > MAX_SHELF_GEARS or len(shelf.counts) > MAX_SHELF_KINDS:
        raise r.fail(f"shelf holds {shelf.size} gears of {len(shelf.counts)} sizes; allowed: at most "
                     f"{MAX_SHELF_GEARS} gears of {MAX_SHELF_KINDS} sizes")
    if shelf.size < 3:
        raise r.fail(f"shelf holds {shelf.size} gears; allowed: at least 3 (stud, intermediate, leadscrew gear)")
    too_big = [z for z in shelf.teeth if z > largest]
    if too_big:
        raise r.fail(f"shelf holds a {too_big[0]}-tooth gear, more than largest_gear ({largest}); "
                     "allowed: gears up to largest_gear")
    if shelf.teeth[0] < 8:
        raise r.fail(f"shelf holds a {shelf.teeth[0]}-tooth gear; allowed: 8 teeth or more")
    return shelf


def parse_machine(text: str, name: str = "machine", shown: str = "machine file") -> Machine:
    """A :class:`Machine` from the TOML text of a machine file (see the module notes)."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ProfileError(f"{shown}: TOML syntax error: {exc}") from None
    known = set(_TEXTS) | set(_TABLES) | {"tumbler_reverse"}
    for key in data:
        if key not in known:
            raise ProfileError(f"{shown}: unknown key {key!r}; allowed: {', '.join(sorted(known))}")
    r = _Reader(data, shown)
    tumbler = data.get("tumbler_reverse", True)
    if not isinstance(tumbler, bool):
        raise r.fail(f"tumbler_reverse must be true or false, got {tumbler!r}")
    module, dp = _tooth_size(r)
    largest_entry = r.table("largest_gear", ("value",))
    if largest_entry.get("unit") != "teeth":
        raise r.fail(f"largest_gear.unit must be 'teeth', got {largest_entry.get('unit')!r}")
    largest = r.number(largest_entry, "largest_gear", "value", 8, 400)
    if not largest.is_integer():
        raise r.fail(f"largest_gear.value must be a whole number of teeth, got {largest!r}")
    (near, far) = r.lengths("slot", ("nearest", "farthest"))
    if far < near:
        raise r.fail(f"slot.farthest ({far:g} mm) is nearer than slot.nearest ({near:g} mm): the slot would be "
                     f"{far - near:g} mm long; allowed: farthest >= nearest")
    swing = _swing(r)
    keyway = r.lengths("keyway", ("width", "depth"), required=False)
    machine = Machine(
        name=name, title=r.text("title"), leadscrew=_leadscrew(r), fixed_gears=_fixed_gears(r),
        tumbler_reverse=tumbler, module=module, diametral_pitch=dp, shelf=_shelf(r, int(largest)),
        stud_to_leadscrew=r.lengths("stud_to_leadscrew", low=10.0)[0], slot=(near, far), swing=swing,
        largest_gear=int(largest), centre_allowance=r.lengths("centre_allowance")[0],
        gear_gap=r.lengths("gear_gap")[0], boss_diameter=r.lengths("boss_diameter")[0],
        bore=r.lengths("bore", low=1.0)[0], face_width=r.lengths("face_width", low=1.0)[0], keyway=keyway,
        tooth_system=r.text("tooth_system", "iso53-a"), fabrication=r.text("fabrication", "cnc-2mm-endmill"),
        note=r.text("note", ""), sources=dict(r.sources))
    if machine.centre_allowance > module:
        raise r.fail(f"centre_allowance ({machine.centre_allowance:g} mm) is more than a module ({module:g} mm); "
                     "allowed: 0 up to one module")
    _check_profiles(machine, shown)
    return machine


def _swing(r: _Reader) -> tuple[float, float]:
    entry = r.table("swing", ("from", "to"), required=False)
    if entry is None:
        return 0.0, math.pi
    if entry.get("unit") != "degree":
        raise r.fail(f"swing.unit must be 'degree', got {entry.get('unit')!r}")
    low = r.number(entry, "swing", "from", 0.0, 180.0)
    high = r.number(entry, "swing", "to", 0.0, 180.0)
    if high < low:
        raise r.fail(f"swing.to ({high:g} degrees) is less than swing.from ({low:g}); allowed: to >= from")
    return math.radians(low), math.radians(high)


def _check_profiles(machine: Machine, shown: str) -> None:
    from ..profiles import load_fabrication, load_tooth_system

    for loader, key in ((load_tooth_system, "tooth_system"), (load_fabrication, "fabrication")):
        try:
            loader(getattr(machine, key))
        except GearcadError as exc:
            raise ProfileError(f"{shown}: {key}: {exc}") from None
