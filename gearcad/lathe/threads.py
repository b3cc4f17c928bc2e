"""Thread pitches, kept exact: ``1.5``, ``1.5mm``, ``11tpi``, ``1mod``, ``24dp``, ``M10`` and named series.

A pitch is ``coefficient * pi**k`` millimetres with ``coefficient`` an exact
fraction and ``k`` 0 (screw threads) or 1 (worms by module or diametral
pitch).  The inch is exactly 25.4 mm = 127/5 mm (international yard and pound
agreement, 1959), so an inch pitch such as 11 TPI is the exact fraction
127/55 mm.  A metric worm of module ``m`` has the axial pitch ``pi m`` and a
worm of diametral pitch ``P`` (teeth per inch of pitch diameter) the axial
pitch ``pi / P`` inch (DIN 3975 / the definition of the module and of the
diametral pitch).

Syntax of a thread list: items separated by commas or spaces; each item is a
pitch (a number with an optional unit ``mm``, ``tpi``, ``mod``/``module`` or
``dp``; a bare number is mm; ``3/4`` fractions are allowed), an ISO metric
coarse size such as ``M10`` (ISO 261), or the name of a series (see
:data:`SERIES`).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from fractions import Fraction

from ..errors import InputError

__all__ = [
    "Pitch", "Series", "SERIES", "ISO_COARSE", "parse_pitch", "parse_threads", "series_names",
    "INCH", "PITCH_RANGE", "MAX_THREADS",
]

#: One inch in mm, exactly (international inch, 1959).
INCH = Fraction(127, 5)
#: Least and greatest pitch a thread may have, mm (bounds every search's magnitude).
PITCH_RANGE = (Fraction(1, 50), Fraction(100))
#: Most threads in one table.
MAX_THREADS = 200
#: Most characters of one pitch's number.
MAX_DIGITS = 24
#: Longest thread list text, characters.
MAX_LIST_TEXT = 4000

UNITS = ("mm", "tpi", "mod", "dp")
_UNIT_ALIASES = {"": "mm", "mm": "mm", "tpi": "tpi", "mod": "mod", "module": "mod", "dp": "dp"}
_PITCH = re.compile(r"^(\d+(?:\.\d+)?(?:/\d+(?:\.\d+)?)?)\s*([a-z]*)$")
ALLOWED = ("a pitch such as 1.5, 1.5mm, 11tpi, 4.5tpi, 1mod, 24dp, a size such as M10 (ISO 261 coarse), "
           "or a series name")


@dataclass(frozen=True)
class Pitch:
    """One thread's pitch (the lead of a single-start thread).

    Attributes
    ----------
    name : str
        How the table names the thread (``M10``, ``11 TPI``, ``module 1``).
    coefficient : Fraction
        The pitch is ``coefficient * pi**pi_power`` mm.
    pi_power : int
        0 for screw threads, 1 for worms by module or diametral pitch.
    kind : str
        ``mm``, ``tpi``, ``mod`` or ``dp``: how the pitch was given.
    """

    name: str
    coefficient: Fraction
    pi_power: int = 0
    kind: str = "mm"

    @property
    def mm(self) -> float:
        """The pitch in mm (a float)."""
        import math

        return float(self.coefficient) * math.pi ** self.pi_power

    @property
    def exact(self) -> str:
        """The exact pitch in mm as text: ``3/2``, ``127/55``, ``pi``, ``127*pi/120``."""
        c = self.coefficient
        if not self.pi_power:
            return str(c)
        top = "pi" if c.numerator == 1 else f"{c.numerator}*pi"
        return top if c.denominator == 1 else f"{top}/{c.denominator}"

    def ratio_expression(self, per_turn: Fraction) -> str:
        """Text of ``pitch / per_turn`` for :func:`gearcad.ratio.parse_target` (exact).

        Parameters
        ----------
        per_turn : Fraction
            Leadscrew advance per stud turn with a 1:1 train, mm (leadscrew pitch
            times the fixed gearing's stud turns per spindle turn).
        """
        value = self.coefficient / per_turn
        text = f"{value.numerator}/{value.denominator}"
        return f"pi*{text}" if self.pi_power else text


@dataclass(frozen=True)
class Series:
    """A named thread series: its title, the standard it comes from, its threads."""

    name: str
    title: str
    source: str
    threads: tuple[tuple[str, str], ...]  # (size shown, pitch text)
    tag: str = ""

    def pitches(self) -> tuple[Pitch, ...]:
        """The series' threads, one row per distinct pitch, named by the pitch and every size that uses it.

        E.g. ``20 TPI (1/4 UNC)``, ``2 mm (M14, M16)``, ``module 1``.
        """
        grouped: dict[tuple[Fraction, int], list[str]] = {}
        first: dict[tuple[Fraction, int], Pitch] = {}
        for shown, text in self.threads:
            pitch = parse_pitch(text)
            key = (pitch.coefficient, pitch.pi_power)
            first.setdefault(key, pitch)
            if shown != pitch.name:
                grouped.setdefault(key, []).append(shown)
        out = []
        for key, pitch in first.items():
            sizes = ", ".join(grouped.get(key, []))
            label = " ".join(t for t in (sizes, self.tag) if t)
            out.append(Pitch(f"{pitch.name} ({label})" if sizes else pitch.name, key[0], key[1], pitch.kind))
        return tuple(out)


def _sizes(prefix: str, pairs: str, unit: str) -> tuple[tuple[str, str], ...]:
    out = []
    for item in pairs.split():
        size, pitch = item.rsplit("-", 1)
        if "/" in size:  # 1.1/8 is the size 1-1/8 inch
            size = size.replace(".", "-")
        out.append((f"{prefix}{size}", f"{pitch}{unit}"))
    return tuple(out)


#: ISO 261 coarse pitches by nominal diameter, mm (ISO 261:1998, table of general purpose
#: metric screw threads, coarse pitch column; from memory).
ISO_COARSE: dict[str, str] = dict(_sizes("M", (
    "1-0.25 1.1-0.25 1.2-0.25 1.4-0.3 1.6-0.35 1.8-0.35 2-0.4 2.2-0.45 2.5-0.45 3-0.5 3.5-0.6 4-0.7 "
    "4.5-0.75 5-0.8 6-1 7-1 8-1.25 10-1.5 12-1.75 14-2 16-2 18-2.5 20-2.5 22-2.5 24-3 27-3 30-3.5 "
    "33-3.5 36-4 39-4 42-4.5 45-4.5 48-5 52-5 56-5.5 60-5.5 64-6"), "mm"))

_SERIES = (
    Series("iso-coarse", "ISO metric coarse", "ISO 261:1998 coarse pitches (from memory)",
           tuple(ISO_COARSE.items())),
    Series("iso-fine", "ISO metric fine pitches", "ISO 261:1998 fine pitches, distinct values (from memory)",
           tuple((f"{p} mm", f"{p}mm") for p in
                 ("0.2", "0.25", "0.35", "0.5", "0.75", "1", "1.25", "1.5", "2", "3", "4"))),
    Series("unc", "Unified coarse (UNC)", "ASME B1.1 coarse series, threads per inch (from memory)", _sizes("", (
        "#1-64 #2-56 #3-48 #4-40 #5-40 #6-32 #8-32 #10-24 #12-24 1/4-20 5/16-18 3/8-16 7/16-14 1/2-13 9/16-12 "
        "5/8-11 3/4-10 7/8-9 1-8 1.1/8-7 1.1/4-7 1.3/8-6 1.1/2-6 1.3/4-5 2-4.5"), "tpi"), "UNC"),
    Series("unf", "Unified fine (UNF)", "ASME B1.1 fine series, threads per inch (from memory)", _sizes("", (
        "#0-80 #1-72 #2-64 #3-56 #4-48 #5-44 #6-40 #8-36 #10-32 #12-28 1/4-28 5/16-24 3/8-24 7/16-20 1/2-20 "
        "9/16-18 5/8-18 3/4-16 7/8-14 1-12"), "tpi"), "UNF"),
    Series("bsw", "British Standard Whitworth (BSW)", "BS 84 coarse series, threads per inch (from memory)",
           _sizes("", ("1/8-40 3/16-24 1/4-20 5/16-18 3/8-16 7/16-14 1/2-12 9/16-12 5/8-11 3/4-10 7/8-9 1-8 "
                       "1.1/8-7 1.1/4-7 1.1/2-6 1.3/4-5 2-4.5"), "tpi"), "BSW"),
    Series("bsf", "British Standard Fine (BSF)", "BS 84 fine series, threads per inch (from memory)",
           _sizes("", ("3/16-32 7/32-28 1/4-26 9/32-26 5/16-22 3/8-20 7/16-18 1/2-16 9/16-16 5/8-14 11/16-14 "
                       "3/4-12 7/8-11 1-10"), "tpi"), "BSF"),
    Series("ba", "British Association (BA)", "BS 93, pitches 0.9^n mm rounded (from memory)",
           _sizes("", ("0BA-1.0 1BA-0.9 2BA-0.81 3BA-0.73 4BA-0.66 5BA-0.59 6BA-0.53 7BA-0.48 8BA-0.43 9BA-0.39 "
                       "10BA-0.35"), "mm")),
    Series("bsp", "British Standard Pipe (BSP)", "ISO 228-1 / ISO 7-1, threads per inch (from memory)",
           _sizes("G", "1/8-28 1/4-19 3/8-19 1/2-14 3/4-14 1-11 1.1/4-11 1.1/2-11 2-11", "tpi"), "BSP"),
    Series("module", "Worms by module", "ISO 54 first-choice modules, axial pitch pi m (from memory)",
           tuple((f"module {m}", f"{m}mod") for m in ("0.5", "0.6", "0.8", "1", "1.25", "1.5", "2", "2.5", "3", "4"))),
    Series("dp", "Worms by diametral pitch", "common diametral pitches (from memory), axial pitch pi/P inch",
           tuple((f"{p} DP", f"{p}dp") for p in ("8", "10", "12", "16", "20", "24", "32", "48"))),
)

#: Thread series by name.
SERIES: dict[str, Series] = {s.name: s for s in _SERIES}


def series_names() -> list[str]:
    """Names of the series a thread list may use."""
    return list(SERIES)


def _number(text: str, item: str) -> Fraction:
    try:
        if "/" in text:
            top, bottom = text.split("/")
            value = Fraction(top) / Fraction(bottom)
        else:
            value = Fraction(text)
    except (ValueError, ZeroDivisionError):
        raise InputError(f"thread {item!r} cannot be read; allowed: {ALLOWED}") from None
    if value <= 0:
        raise InputError(f"thread {item!r} must be greater than 0; allowed: {ALLOWED}")
    return value


def _shown(value: Fraction, text: str) -> str:
    short = f"{float(value):g}"
    return short if "/" not in text and Fraction(short) == value else text


def parse_pitch(text: str) -> Pitch:
    """One pitch: ``1.5``, ``1.5mm``, ``11tpi``, ``1mod``, ``24dp`` or ``M10``.

    Raises
    ------
    InputError
        An unknown unit or size, a value of 0 or less, or a pitch outside
        :data:`PITCH_RANGE`.
    """
    item = str(text).strip()
    low = item.lower()
    if low.startswith("m") and low[1:2].isdigit() and not low.endswith(("mm", "mod", "module")):
        key = "M" + low[1:]
        if key not in ISO_COARSE:
            raise InputError(f"thread size {item!r} is not an ISO 261 coarse size; allowed: "
                             f"{', '.join(ISO_COARSE)} (or give the pitch, e.g. 1.5mm)")
        pitch = parse_pitch(ISO_COARSE[key])
        return Pitch(f"{pitch.name} ({key})", pitch.coefficient, 0, "mm")
    match = _PITCH.match(low)
    if not match or match.group(2) not in _UNIT_ALIASES:
        raise InputError(f"thread {item!r} has an unknown unit or form; allowed: {ALLOWED}")
    if len(match.group(1)) > MAX_DIGITS:
        raise InputError(f"thread {item[:30]!r}... has {len(match.group(1))} characters in its number; allowed: "
                         f"at most {MAX_DIGITS}")
    value = _number(match.group(1), item)
    unit = _UNIT_ALIASES[match.group(2)]
    shown = _shown(value, match.group(1))
    if unit == "mm":
        pitch = Pitch(f"{shown} mm", value, 0, "mm")
    elif unit == "tpi":
        pitch = Pitch(f"{shown} TPI", INCH / value, 0, "tpi")
    elif unit == "mod":
        pitch = Pitch(f"module {shown}", value, 1, "mod")
    else:
        pitch = Pitch(f"{shown} DP", INCH / value, 1, "dp")
    if not PITCH_RANGE[0] <= Fraction(pitch.mm) <= PITCH_RANGE[1]:
        raise InputError(f"thread {item!r} has a pitch of {pitch.mm:.4g} mm; allowed: pitches from "
                         f"{float(PITCH_RANGE[0]):g} to {float(PITCH_RANGE[1]):g} mm")
    return pitch


def parse_threads(text: str) -> tuple[Pitch, ...]:
    """A thread list: pitches, sizes and series names, separated by commas or spaces.

    Repeated pitches are kept once (the first name wins).

    Raises
    ------
    InputError
        An item that cannot be read, an empty list, or more than
        :data:`MAX_THREADS` threads.
    """
    if len(text) > MAX_LIST_TEXT:
        raise InputError(f"thread list is {len(text)} characters long; allowed: at most {MAX_LIST_TEXT}")
    out: list[Pitch] = []
    seen: set[tuple[Fraction, int]] = set()
    for item in (t for t in re.split(r"[,;\s]+", text) if t):
        found = SERIES[item.lower()].pitches() if item.lower() in SERIES else (parse_pitch(item),)
        for pitch in found:
            key = (pitch.coefficient, pitch.pi_power)
            if key not in seen:
                seen.add(key)
                out.append(pitch)
        if len(out) > MAX_THREADS:
            raise InputError(f"thread list holds more than {MAX_THREADS} threads; allowed: at most {MAX_THREADS}")
    if not out:
        raise InputError(f"thread list {text!r} is empty; allowed: {ALLOWED}, separated by commas")
    return tuple(out)
