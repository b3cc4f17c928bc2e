"""Train files: a TOML description of a gear train, of gearcad's own design.

Example (every key is documented in README.md)::

    name = "moon-phase"
    title = "Moon-phase indicator"
    target = "12/(29.530588853*24)"   # optional: the ratio the stages should reach
    target_tolerance = 1e-3           # optional: largest relative error of the stages against target (default 1e-3)
    module = 1.5                      # mm
    thickness = 3.0                   # face width, mm
    tooth_system = "iso53-a"
    fabrication = "laser-3mm-acrylic"
    bore = 3.0                        # default shaft diameter, mm

    [[stage]]
    driver = 12                       # or a table: { teeth = 12, shift = 0.3, bore = 4, flat = 1.6 }
    driven = { teeth = 60, hub = { diameter = 10, length = 4 } }

A file without stages may carry a ``[solve]`` table instead (ratio, stages,
min_teeth, max_teeth, max_stage_ratio, direction, hunting, coaxial, exclude):
the ratio solver then picks the tooth counts.  Errors name the file, the line
and the key.  :func:`parse_train` is pure; :func:`read_train` reads the file.

Every table is checked before anything is planned or written: tables that
contradict each other are refused (``[[stage]]`` beside ``[solve]`` or
``[planetary]``, ``[solve]`` beside ``[planetary]`` or ``[summing]``, a top
``coaxial`` or ``target`` that ``[solve]`` contradicts), ``[solve]`` is held to
the same rules as the command line's solver options, and sizes are bounded
(:data:`LIMITS`; the file itself by :mod:`gearcad.inputfiles`).
"""

from __future__ import annotations

import math
import re
from pathlib import Path
from typing import Any

from ..errors import InputError
from ..inputfiles import MAX_INPUT_BYTES, parse_toml, read_text_file
from .spec import GearSpec, Hub, Keyway, PlanetarySpec, SolverSpec, StageSpec, SummingSpec, TrainSpec, WormSpec
from .trainfile_write import train_to_toml

__all__ = ["parse_train", "read_train", "train_to_toml", "LIMITS", "MAX_FILE_STAGES", "MAX_TITLE_LENGTH"]

#: Most ``[[stage]]`` tables of a train file (a compound train of 12 stages spans
#: ratios beyond 10^9 at 6:1 a stage; the layout search grows with the count).
MAX_FILE_STAGES = 12
#: Longest title and ``target`` / ``ratio`` texts, characters.
MAX_TITLE_LENGTH = 200
MAX_EXCLUDE = 400
#: Bounds of the numbers of a train file, mm (shift: a coefficient); the gear
#: geometry adds its own (module 0.01 to 100 mm, shift -2 to 4, teeth 3 to 10000).
LIMITS: dict[str, tuple[float, float]] = {
    "module": (0.05, 50.0),
    "thickness": (0.1, 500.0),
    "bore": (0.1, 1000.0),
    "flat": (0.01, 500.0),
    "hub.diameter": (0.1, 2000.0),
    "hub.length": (0.01, 1000.0),
    "keyway.width": (0.01, 200.0),
    "keyway.depth": (0.01, 200.0),
    "tube": (0.1, 1000.0),
    "axis_distance": (0.1, 10000.0),
    "shift_limit": (0.0, 4.0),
    "max_stage_ratio": (1.0, 1e6),
    "shift": (-2.0, 4.0),
    "pressure_angle": (10.0, 35.0),
}
#: Most teeth of one gear in a train file (the geometry allows more; the files of a
#: bigger gear grow past what a cutter takes).
MAX_FILE_TEETH = 2000

TOP_KEYS = {"name", "title", "target", "target_tolerance", "module", "thickness", "tooth_system", "pressure_angle",
            "fabrication", "bore", "coaxial", "stage", "solve", "planetary", "summing", "join", "studs"}
PLANETARY_KEYS = {"sun", "planet", "ring", "planets", "planet_ring", "fixed", "input", "shift_limit", "helix", "hand",
                  "herringbone", "gap"}
SUMMING_KEYS = {"differential", "sun", "planet", "planets", "ring", "module", "tube", "axis_distance", "shift_limit"}
STAGE_KEYS = {"driver", "driven", "module", "idler", "helix", "hand", "herringbone", "gap", "worm"}
WORM_KEYS = {"starts", "diameter_factor", "form", "pressure_angle", "friction", "tool_diameter"}
GEAR_KEYS = {"teeth", "shift", "bore", "flat", "keyway", "hub", "hand"}
SOLVE_KEYS = {"ratio", "stages", "min_teeth", "max_teeth", "max_stage_ratio", "direction", "hunting", "coaxial", "exclude"}


class _Context:
    """Where a key sits in the file, for messages ``file:line: key ...``."""

    def __init__(self, text: str, filename: str) -> None:
        self.lines = text.splitlines()
        self.filename = filename

    def line_of(self, key: str, table: str = "", index: int = 0) -> int:
        """Line number (1-based) of ``key`` in ``[table]`` (the ``index``-th ``[[table]]``), else the table's."""
        current, seen, header_line = "", -1, 0
        for number, raw in enumerate(self.lines, start=1):
            line = raw.split("#", 1)[0].strip()
            header = re.fullmatch(r"\[\[?\s*([\w.-]+)\s*\]\]?", line)
            if header:
                current = header.group(1)
                if current == table:
                    seen += 1
                    header_line = number if seen == index else header_line
                continue
            if current == table and (not table or seen == index) and re.match(rf"{re.escape(key)}\s*=", line):
                return number
        return header_line or 1

    def error(self, message: str, key: str, table: str = "", index: int = 0) -> InputError:
        where = f"{table}[{index + 1}]." if table == "stage" else f"{table}." if table else ""
        return InputError(f"{self.filename}:{self.line_of(key.split('.')[0], table, index)}: {where}{key}: {message}")


def _check_keys(data: dict, allowed: set[str], ctx: _Context, table: str = "", index: int = 0, prefix: str = "") -> None:
    for key in data:
        if key not in allowed:
            raise ctx.error(f"unknown key; allowed: {', '.join(sorted(allowed))}", prefix + key, table, index)


def _number(data: dict, key: str, ctx: _Context, table: str = "", index: int = 0, prefix: str = "",
            required: bool = False, default: float | None = None) -> float | None:
    if key not in data:
        if required:
            raise ctx.error("missing (a number is required)", prefix + key, table, index)
        return default
    value = data[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ctx.error(f"must be a number, got {_short(value)}", prefix + key, table, index)
    number = float(value) if not isinstance(value, int) or abs(value) < 10 ** 300 else math.inf
    bounds = LIMITS.get((prefix.rsplit(".", 2)[-2] + "." if prefix.count(".") >= 2 else "") + key) or LIMITS.get(key)
    if not math.isfinite(number):
        raise ctx.error(f"must be a finite number, got {_short(value)}", prefix + key, table, index)
    if bounds is not None and not bounds[0] <= number <= bounds[1]:
        low, high = bounds
        unit = "" if key in ("shift", "shift_limit", "max_stage_ratio") else " degrees" if key == "pressure_angle" else " mm"
        raise ctx.error(f"must be from {low:g} to {high:g}{unit}, got {_short(value)}", prefix + key, table, index)
    return number


def _short(value: Any) -> str:
    """``repr(value)`` cut to 60 characters, so a message stays one readable line."""
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _text(data: dict, key: str, ctx: _Context, default: str | None = None, table: str = "") -> str | None:
    if key not in data:
        return default
    if not isinstance(data[key], str):
        raise ctx.error(f"must be a text in quotes, got {_short(data[key])}", key, table)
    if len(data[key]) > MAX_TITLE_LENGTH:
        raise ctx.error(f"must be at most {MAX_TITLE_LENGTH} characters, got {len(data[key])}", key, table)
    if any(not c.isprintable() for c in data[key]):
        raise ctx.error(f"must be one line of printable characters, got {_short(data[key])}", key, table)
    return data[key]


def _flag(data: dict, key: str, ctx: _Context, table: str = "") -> bool:
    value = data.get(key, False)
    if not isinstance(value, bool):
        raise ctx.error(f"must be true or false, got {_short(value)}", key, table)
    return value


def _gear(value: Any, key: str, ctx: _Context, index: int) -> GearSpec:
    if isinstance(value, bool) or not isinstance(value, (int, dict)):
        raise ctx.error(f"must be a tooth count or a table {{ teeth = ... }}, got {_short(value)}", key, "stage", index)
    if isinstance(value, int):
        value = {"teeth": value}
    _check_keys(value, GEAR_KEYS, ctx, "stage", index, key + ".")
    if "teeth" not in value or isinstance(value["teeth"], bool) or not isinstance(value["teeth"], int):
        raise ctx.error(f"teeth must be a whole number, got {_short(value.get('teeth'))}", key + ".teeth", "stage", index)
    if not 3 <= value["teeth"] <= MAX_FILE_TEETH:
        raise ctx.error(f"tooth count must be from 3 to {MAX_FILE_TEETH}, got {_short(value['teeth'])}", key + ".teeth",
                        "stage", index)
    hub = keyway = None
    if "hub" in value:
        h = value["hub"]
        if not isinstance(h, dict) or set(h) != {"diameter", "length"}:
            raise ctx.error("must be a table { diameter = MM, length = MM }", key + ".hub", "stage", index)
        hub = Hub(*(_number(h, k, ctx, "stage", index, key + ".hub.", required=True) for k in ("diameter", "length")))
    if "keyway" in value:
        k = value["keyway"]
        if not isinstance(k, dict) or set(k) != {"width", "depth"}:
            raise ctx.error("must be a table { width = MM, depth = MM }", key + ".keyway", "stage", index)
        keyway = Keyway(*(_number(k, n, ctx, "stage", index, key + ".keyway.", required=True) for n in ("width", "depth")))
    try:
        return GearSpec(teeth=value["teeth"], shift=_number(value, "shift", ctx, "stage", index, key + ".", default=0.0),
                        bore=_number(value, "bore", ctx, "stage", index, key + "."),
                        flat=_number(value, "flat", ctx, "stage", index, key + "."), keyway=keyway, hub=hub,
                        hand=value.get("hand"))
    except InputError as exc:
        raise ctx.error(str(exc), key, "stage", index) from None


def _stages(data: dict, ctx: _Context) -> tuple[StageSpec, ...]:
    raw = data.get("stage", [])
    if not isinstance(raw, list) or not all(isinstance(s, dict) for s in raw):
        raise ctx.error("must be written as [[stage]] tables", "stage")
    if len(raw) > MAX_FILE_STAGES:
        raise ctx.error(f"at most {MAX_FILE_STAGES} [[stage]] tables are allowed, got {len(raw)}", "stage")
    stages = []
    for i, s in enumerate(raw):
        _check_keys(s, STAGE_KEYS, ctx, "stage", i)
        worm = _worm(s, ctx, i)
        for key in ("driven",) if worm else ("driver", "driven"):
            if key not in s:
                raise ctx.error("missing (a tooth count or a gear table)", key, "stage", i)
        idler = _gear(s["idler"], "idler", ctx, i) if "idler" in s else None
        helical = {}
        if "helix" in s:
            helical["helix"] = _number(s, "helix", ctx, "stage", i)
        if "gap" in s:
            helical["gap"] = _number(s, "gap", ctx, "stage", i)
        for key, kind in (("hand", str), ("herringbone", bool)):
            if key in s:
                if not isinstance(s[key], kind):
                    raise ctx.error("must be \"left\" or \"right\"" if kind is str else "must be true or false", key, "stage", i)
                helical[key] = s[key]
        driver = GearSpec(worm.starts) if worm else _gear(s["driver"], "driver", ctx, i)
        driven = _gear(s["driven"], "driven", ctx, i)
        try:
            stages.append(StageSpec(driver, driven, _number(s, "module", ctx, "stage", i), idler, worm=worm, **helical))
        except InputError as exc:
            key = next((k for k in ("helix", "hand", "herringbone", "gap", "idler", "driver")
                        if k in str(exc).split(" must")[0].split(" cannot")[0]), "worm" if worm else "helix")
            raise ctx.error(str(exc), key, "stage", i) from None
    return tuple(stages)


def _worm(s: dict, ctx: _Context, i: int) -> WormSpec | None:
    """A stage's ``worm = { starts = 1, diameter_factor = 10, form = "ZA" }`` table, or None."""
    if "worm" not in s:
        return None
    w = s["worm"]
    if not isinstance(w, dict):
        raise ctx.error("must be a table { starts = N, diameter_factor = Q, form = \"ZA\" }", "worm", "stage", i)
    _check_keys(w, WORM_KEYS, ctx, "stage", i, "worm.")
    if "driver" in s:
        raise ctx.error(f"{_short(s['driver'])} cannot stand with a worm: the worm is the driver; allowed: leave out "
                        "driver on a worm stage", "driver", "stage", i)
    starts = w.get("starts")
    if isinstance(starts, bool) or not isinstance(starts, int):
        raise ctx.error(f"must be a whole number, got {_short(starts)}", "worm.starts", "stage", i)
    if "form" in w and not isinstance(w["form"], str):
        raise ctx.error(f"must be \"ZA\", \"ZI\", \"ZN\" or \"ZK\", got {_short(w['form'])}", "worm.form", "stage", i)
    numbers = {k: _number(w, k, ctx, "stage", i, "worm.") for k in ("pressure_angle", "friction", "tool_diameter")}
    try:
        return WormSpec(starts, _number(w, "diameter_factor", ctx, "stage", i, "worm.", required=True),
                        w.get("form", "za"), **numbers)
    except InputError as exc:
        key = next((k for k in ("tool_diameter", "starts", "diameter_factor", "form", "pressure_angle", "friction",
                                "lead angle")
                    if k.replace("_", " ") in str(exc) or k in str(exc)), "starts")
        raise ctx.error(str(exc), "worm." + ("diameter_factor" if key == "lead angle" else key), "stage", i) from None


def _solver(data: dict, ctx: _Context) -> SolverSpec | None:
    if "solve" not in data:
        return None
    s = data["solve"]
    if not isinstance(s, dict):
        raise ctx.error("must be a [solve] table", "solve")
    _check_keys(s, SOLVE_KEYS, ctx, "solve")
    if not isinstance(s.get("ratio"), str):
        raise ctx.error("ratio must be a text in quotes, e.g. \"127/20\"", "ratio", "solve")
    _text(s, "ratio", ctx, table="solve")
    ints = {}
    for key in ("stages", "min_teeth", "max_teeth"):
        if key in s:
            if isinstance(s[key], bool) or not isinstance(s[key], int):
                raise ctx.error(f"must be a whole number, got {_short(s[key])}", key, "solve")
            ints[key] = s[key]
    exclude = s.get("exclude", [])
    if not isinstance(exclude, list) or not all(isinstance(z, int) and not isinstance(z, bool) for z in exclude):
        raise ctx.error("must be a list of tooth counts, e.g. [13, 17]", "exclude", "solve")
    if len(exclude) > MAX_EXCLUDE:
        raise ctx.error(f"must list at most {MAX_EXCLUDE} tooth counts, got {len(exclude)}", "exclude", "solve")
    top_coaxial = _flag(data, "coaxial", ctx)
    coaxial = _flag(s, "coaxial", ctx, "solve") if "coaxial" in s else top_coaxial
    if "coaxial" in s and "coaxial" in data and coaxial != top_coaxial:
        raise ctx.error(f"is {str(coaxial).lower()} but the top-level coaxial is {str(top_coaxial).lower()}; "
                        "give it once", "coaxial", "solve")
    solver = SolverSpec(ratio=s["ratio"], max_stage_ratio=_number(s, "max_stage_ratio", ctx, "solve"),
                        direction=_text(s, "direction", ctx, table="solve"), hunting=_flag(s, "hunting", ctx, "solve"),
                        coaxial=coaxial, exclude=tuple(exclude), **ints)
    _check_solver(solver, ctx)
    return solver


def _check_solver(solver: SolverSpec, ctx: _Context) -> None:
    """The command line's rules for the solver's options, applied to ``[solve]`` before any work."""
    from ..ratio.compound import check_stages
    from ..ratio.limits import DEFAULT_MAX_STAGE_RATIO, DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, make_limits
    from ..ratio.target import parse_target

    checks = (
        ("ratio", lambda: parse_target(solver.ratio)),
        ("stages", lambda: solver.stages is None or check_stages(solver.stages)),
        ("min_teeth", lambda: make_limits(
            solver.min_teeth if solver.min_teeth is not None else min(DEFAULT_MIN_TEETH, solver.max_teeth or DEFAULT_MIN_TEETH),
            solver.max_teeth if solver.max_teeth is not None else max(DEFAULT_MAX_TEETH, solver.min_teeth or 0),
            solver.max_stage_ratio or DEFAULT_MAX_STAGE_RATIO, solver.hunting, solver.exclude, None, solver.direction)),
    )
    for key, check in checks:
        try:
            check()
        except InputError as exc:
            text = str(exc)
            if key == "min_teeth":  # the limits name their own value
                key = next((k for k, start in (("max_teeth", "max teeth"), ("max_stage_ratio", "max stage ratio"),
                                               ("exclude", "excluded"), ("exclude", "no tooth count"),
                                               ("direction", "direction")) if text.startswith(start)), "min_teeth")
            raise ctx.error(text, key, "solve") from None
    if solver.coaxial and solver.stages is not None and solver.stages not in (2, 4):
        raise ctx.error(f"a coaxial train has 2 or 4 stages, got {solver.stages}", "stages", "solve")
    if solver.coaxial and solver.direction == "opposite":
        raise ctx.error("'opposite' cannot be met by a coaxial train (its output turns the same way as its input)",
                        "direction", "solve")


def _contradictions(data: dict, ctx: _Context) -> None:
    """Refuse tables that cannot stand together (one of them would be dropped without a word)."""
    has = {key: key in data for key in ("stage", "solve", "planetary", "summing")}
    if has["stage"] and has["solve"]:
        raise ctx.error("[solve] finds the stages; a file gives either [[stage]] tables or a [solve] table, not both",
                        "solve")
    if has["stage"] and has["planetary"]:
        raise ctx.error("a planetary train has no [[stage]] tables (its gears are sun, planet and ring); "
                        "remove the [[stage]] tables or the [planetary] table", "planetary")
    for other in ("planetary", "summing"):
        if has["solve"] and has[other]:
            raise ctx.error(f"[solve] finds compound trains; it cannot stand beside [{other}] "
                            f"(use gearcad design --kind {other} to solve one)", "solve")
    if has["planetary"] and data.get("coaxial") is True:
        raise ctx.error("a planetary set is coaxial by its nature; leave out coaxial", "coaxial")


def _check_target(spec: TrainSpec, ctx: _Context) -> None:
    """The top-level ``target`` and ``[solve]``'s ratio must be one value when both are given."""
    from ..ratio.target import parse_target

    if spec.target is None:
        return
    try:
        target = parse_target(spec.target)
    except InputError as exc:
        raise ctx.error(str(exc), "target") from None
    if spec.solver is not None and parse_target(spec.solver.ratio).approx != target.approx:
        raise ctx.error(f"{spec.target!r} differs from [solve] ratio {spec.solver.ratio!r}; give the ratio once "
                        "(in [solve])", "target")


def _table(data: dict, name: str, allowed: set[str], ctx: _Context) -> dict | None:
    """The ``[name]`` table, its keys checked, or None when the file has none."""
    if name not in data:
        return None
    table = data[name]
    if not isinstance(table, dict):
        raise ctx.error(f"must be a [{name}] table", name)
    _check_keys(table, allowed, ctx, name)
    return table


def _counts(table: dict, keys: tuple[str, ...], required: tuple[str, ...], ctx: _Context, name: str) -> dict[str, int]:
    """The whole-number entries ``keys`` of a table; ``required`` ones must be there."""
    counts = {}
    for key in keys:
        if key in table:
            if isinstance(table[key], bool) or not isinstance(table[key], int):
                raise ctx.error(f"must be a whole number, got {table[key]!r}", key, name)
            counts[key] = table[key]
        elif key in required:
            raise ctx.error("missing (a tooth count)", key, name)
    return counts


def _planetary(data: dict, ctx: _Context) -> PlanetarySpec | None:
    p = _table(data, "planetary", PLANETARY_KEYS, ctx)
    if p is None:
        return None
    counts = _counts(p, ("sun", "planet", "ring", "planets", "planet_ring"), ("sun", "planet", "ring"), ctx, "planetary")
    helical = {}
    for key in ("helix", "gap"):
        if key in p:
            helical[key] = _number(p, key, ctx, "planetary")
    if "hand" in p:
        helical["hand"] = _text(p, "hand", ctx, None, "planetary")
    if "herringbone" in p:
        helical["herringbone"] = _flag(p, "herringbone", ctx, "planetary")
    try:
        return PlanetarySpec(fixed=_text(p, "fixed", ctx, "ring", "planetary"), input=_text(p, "input", ctx, None, "planetary"),
                             shift_limit=_number(p, "shift_limit", ctx, "planetary"), **counts, **helical)
    except InputError as exc:
        if str(exc).startswith(ctx.filename) or not helical:
            raise
        key = next((k for k in ("helix", "hand", "herringbone", "gap") if k in str(exc).split(" must")[0]), "helix")
        raise ctx.error(str(exc), key, "planetary") from None


def _summing(data: dict, ctx: _Context) -> SummingSpec | None:
    s = _table(data, "summing", SUMMING_KEYS, ctx)
    if s is None:
        return None
    counts = _counts(s, ("sun", "planet", "planets", "ring"), (), ctx, "summing")
    numbers = {k: _number(s, k, ctx, "summing") for k in ("module", "tube", "axis_distance", "shift_limit")}
    try:
        return SummingSpec(differential=_text(s, "differential", ctx, "mean", "summing"), **counts, **numbers)
    except InputError as exc:
        key = next((k for k in SUMMING_KEYS if k in str(exc).split(" must")[0].split(" needs")[0]), "differential")
        raise ctx.error(str(exc), key, "summing") from None


def parse_train(text: str, filename: str = "train file") -> TrainSpec:
    """Parse a train file's text; raise :class:`InputError` naming file, line and key."""
    if len(text) > MAX_INPUT_BYTES:
        raise InputError(f"{filename}: larger than the {MAX_INPUT_BYTES // 1024} kB allowed for a train file")
    ctx = _Context(text, filename)
    data = parse_toml(text, filename, InputError)
    _check_keys(data, TOP_KEYS, ctx)
    _contradictions(data, ctx)
    for key in ("name", "module", "thickness"):
        if key not in data:
            raise ctx.error("missing (required)", key)
    name = _text(data, "name", ctx)
    try:
        spec = TrainSpec(
            name=name, title=_text(data, "title", ctx, ""), target=_text(data, "target", ctx),
            module=_number(data, "module", ctx, required=True), thickness=_number(data, "thickness", ctx, required=True),
            stages=_stages(data, ctx), tooth_system=_text(data, "tooth_system", ctx, "iso53-a"),
            pressure_angle=_number(data, "pressure_angle", ctx), fabrication=_text(data, "fabrication", ctx, "laser-3mm-acrylic"),
            bore=_number(data, "bore", ctx, default=3.0), coaxial=_flag(data, "coaxial", ctx), solver=_solver(data, ctx),
            planetary=_planetary(data, ctx), summing=_summing(data, ctx), join=_text(data, "join", ctx),
            studs=_studs(data, ctx), target_tolerance=_number(data, "target_tolerance", ctx))
    except InputError as exc:
        if str(exc).startswith(filename):
            raise
        key = next((k for k in ("target_tolerance", "thickness", "module", "bore", "join", "name")
                    if k in str(exc).split(" must")[0]), "name")
        raise ctx.error(str(exc), key) from None
    _check_target(spec, ctx)
    if spec.stages and spec.stages[0].worm is not None:  # the pair's own bounds (undercut, ZI base), before any work
        from .worm_stage import worm_pair_of

        try:
            worm_pair_of(spec)
        except InputError as exc:
            key = "driven" if "wheel" in str(exc).split(" must")[0] else "worm"
            raise ctx.error(str(exc), key, "stage", 0) from None
    return spec


def _studs(data: dict, ctx: _Context) -> tuple[str, ...]:
    studs = data.get("studs", [])
    if not isinstance(studs, list) or not all(isinstance(n, str) for n in studs) or len(studs) > 64:
        raise ctx.error("must be a list of shaft names, e.g. [\"shaft-2\"]", "studs")
    return tuple(studs)


def read_train(path: str | Path) -> TrainSpec:
    """Read and parse a train file."""
    path = Path(path)
    return parse_train(read_text_file(path, "train file", InputError), str(path))
