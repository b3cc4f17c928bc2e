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
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path
from typing import Any

from .errors import InputError
from .trainspec import GearSpec, Hub, Keyway, PlanetarySpec, SolverSpec, StageSpec, SummingSpec, TrainSpec

__all__ = ["parse_train", "read_train", "train_to_toml"]

TOP_KEYS = {"name", "title", "target", "target_tolerance", "module", "thickness", "tooth_system", "pressure_angle", "fabrication",
            "bore", "coaxial", "stage", "solve", "planetary", "summing"}
PLANETARY_KEYS = {"sun", "planet", "ring", "planets", "planet_ring", "fixed", "input", "shift_limit"}
SUMMING_KEYS = {"differential", "sun", "planet", "planets", "ring", "module", "tube", "axis_distance", "shift_limit"}
STAGE_KEYS = {"driver", "driven", "module", "idler"}
GEAR_KEYS = {"teeth", "shift", "bore", "flat", "keyway", "hub"}
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
        raise ctx.error(f"must be a number, got {value!r}", prefix + key, table, index)
    return float(value)


def _text(data: dict, key: str, ctx: _Context, default: str | None = None, table: str = "") -> str | None:
    if key not in data:
        return default
    if not isinstance(data[key], str):
        raise ctx.error(f"must be a text in quotes, got {data[key]!r}", key, table)
    return data[key]


def _flag(data: dict, key: str, ctx: _Context, table: str = "") -> bool:
    value = data.get(key, False)
    if not isinstance(value, bool):
        raise ctx.error(f"must be true or false, got {value!r}", key, table)
    return value


def _gear(value: Any, key: str, ctx: _Context, index: int) -> GearSpec:
    if isinstance(value, bool) or not isinstance(value, (int, dict)):
        raise ctx.error(f"must be a tooth count or a table {{ teeth = ... }}, got {value!r}", key, "stage", index)
    if isinstance(value, int):
        value = {"teeth": value}
    _check_keys(value, GEAR_KEYS, ctx, "stage", index, key + ".")
    if "teeth" not in value or isinstance(value["teeth"], bool) or not isinstance(value["teeth"], int):
        raise ctx.error(f"teeth must be a whole number, got {value.get('teeth')!r}", key + ".teeth", "stage", index)
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
                        flat=_number(value, "flat", ctx, "stage", index, key + "."), keyway=keyway, hub=hub)
    except InputError as exc:
        raise ctx.error(str(exc), key, "stage", index) from None


def _stages(data: dict, ctx: _Context) -> tuple[StageSpec, ...]:
    raw = data.get("stage", [])
    if not isinstance(raw, list) or not all(isinstance(s, dict) for s in raw):
        raise ctx.error("must be written as [[stage]] tables", "stage")
    stages = []
    for i, s in enumerate(raw):
        _check_keys(s, STAGE_KEYS, ctx, "stage", i)
        for key in ("driver", "driven"):
            if key not in s:
                raise ctx.error("missing (a tooth count or a gear table)", key, "stage", i)
        idler = _gear(s["idler"], "idler", ctx, i) if "idler" in s else None
        stages.append(StageSpec(_gear(s["driver"], "driver", ctx, i), _gear(s["driven"], "driven", ctx, i),
                                _number(s, "module", ctx, "stage", i), idler))
    return tuple(stages)


def _solver(data: dict, ctx: _Context) -> SolverSpec | None:
    if "solve" not in data:
        return None
    s = data["solve"]
    if not isinstance(s, dict):
        raise ctx.error("must be a [solve] table", "solve")
    _check_keys(s, SOLVE_KEYS, ctx, "solve")
    if not isinstance(s.get("ratio"), str):
        raise ctx.error("ratio must be a text in quotes, e.g. \"127/20\"", "ratio", "solve")
    ints = {}
    for key in ("stages", "min_teeth", "max_teeth"):
        if key in s:
            if isinstance(s[key], bool) or not isinstance(s[key], int):
                raise ctx.error(f"must be a whole number, got {s[key]!r}", key, "solve")
            ints[key] = s[key]
    exclude = s.get("exclude", [])
    if not isinstance(exclude, list) or not all(isinstance(z, int) and not isinstance(z, bool) for z in exclude):
        raise ctx.error("must be a list of tooth counts, e.g. [13, 17]", "exclude", "solve")
    return SolverSpec(ratio=s["ratio"], max_stage_ratio=_number(s, "max_stage_ratio", ctx, "solve"),
                      direction=_text(s, "direction", ctx, table="solve"), hunting=_flag(s, "hunting", ctx, "solve"),
                      coaxial=_flag(s, "coaxial", ctx, "solve"), exclude=tuple(exclude), **ints)


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
    return PlanetarySpec(fixed=_text(p, "fixed", ctx, "ring", "planetary"), input=_text(p, "input", ctx, None, "planetary"),
                         shift_limit=_number(p, "shift_limit", ctx, "planetary"), **counts)


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
    ctx = _Context(text, filename)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{filename}: TOML syntax error: {exc}") from None
    _check_keys(data, TOP_KEYS, ctx)
    for key in ("name", "module", "thickness"):
        if key not in data:
            raise ctx.error("missing (required)", key)
    name = _text(data, "name", ctx)
    try:
        return TrainSpec(
            name=name, title=_text(data, "title", ctx, ""), target=_text(data, "target", ctx),
            module=_number(data, "module", ctx, required=True), thickness=_number(data, "thickness", ctx, required=True),
            stages=_stages(data, ctx), tooth_system=_text(data, "tooth_system", ctx, "iso53-a"),
            pressure_angle=_number(data, "pressure_angle", ctx), fabrication=_text(data, "fabrication", ctx, "laser-3mm-acrylic"),
            bore=_number(data, "bore", ctx, default=3.0), coaxial=_flag(data, "coaxial", ctx), solver=_solver(data, ctx),
            planetary=_planetary(data, ctx), summing=_summing(data, ctx),
            target_tolerance=_number(data, "target_tolerance", ctx))
    except InputError as exc:
        if str(exc).startswith(filename):
            raise
        key = next((k for k in ("target_tolerance", "thickness", "module", "bore", "name")
                    if k in str(exc).split(" must")[0]), "name")
        raise ctx.error(str(exc), key) from None


def read_train(path: str | Path) -> TrainSpec:
    """Read and parse a train file."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise InputError(f"train file {str(path)!r} does not exist") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"train file {str(path)!r} cannot be read: {exc}") from None
    return parse_train(text, str(path))


def _gear_toml(g: GearSpec) -> str:
    parts = [f"teeth = {g.teeth}"]
    if g.shift:
        parts.append(f"shift = {g.shift!r}")
    if g.bore is not None:
        parts.append(f"bore = {g.bore!r}")
    if g.flat is not None:
        parts.append(f"flat = {g.flat!r}")
    if g.keyway is not None:
        parts.append(f"keyway = {{ width = {g.keyway.width!r}, depth = {g.keyway.depth!r} }}")
    if g.hub is not None:
        parts.append(f"hub = {{ diameter = {g.hub.diameter!r}, length = {g.hub.length!r} }}")
    return str(g.teeth) if len(parts) == 1 else "{ " + ", ".join(parts) + " }"


def _quoted(text: str) -> str:
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


def train_to_toml(spec: TrainSpec) -> str:
    """The train file text for ``spec`` (what ``gearcad design`` writes); parses back to ``spec``."""
    lines = ["# Train file written by gearcad; edit it and run `gearcad build` on it.",
             f"name = {_quoted(spec.name)}"]
    if spec.title:
        lines.append(f"title = {_quoted(spec.title)}")
    if spec.target:
        lines.append(f"target = {_quoted(spec.target)}")
    if spec.target_tolerance is not None:
        lines.append(f"target_tolerance = {spec.target_tolerance!r}")
    lines += [f"module = {spec.module!r}", f"thickness = {spec.thickness!r}", f"tooth_system = {_quoted(spec.tooth_system)}"]
    if spec.pressure_angle is not None:
        lines.append(f"pressure_angle = {spec.pressure_angle!r}")
    lines += [f"fabrication = {_quoted(spec.fabrication)}", f"bore = {spec.bore!r}"]
    if spec.coaxial:
        lines.append("coaxial = true")
    if spec.planetary is not None:
        p = spec.planetary
        lines += ["", "[planetary]", f"sun = {p.sun}", f"planet = {p.planet}", f"ring = {p.ring}", f"planets = {p.planets}"]
        if p.planet_ring is not None:
            lines.append(f"planet_ring = {p.planet_ring}")
        lines.append(f"fixed = {_quoted(p.fixed)}")
        if p.input is not None:
            lines.append(f"input = {_quoted(p.input)}")
        if p.shift_limit is not None:
            lines.append(f"shift_limit = {p.shift_limit!r}")
    if spec.summing is not None:
        s = spec.summing
        lines += ["", "# A summing train: the first [[stage]] is path a, the second path b.", "[summing]",
                  f"differential = {_quoted(s.differential)}", f"sun = {s.sun}", f"planet = {s.planet}",
                  f"planets = {s.planets}"]
        lines += [f"{key} = {getattr(s, key)!r}" for key in ("ring", "module", "tube", "axis_distance", "shift_limit")
                  if getattr(s, key) is not None]
    for stage in spec.stages:
        lines += ["", "[[stage]]", f"driver = {_gear_toml(stage.driver)}", f"driven = {_gear_toml(stage.driven)}"]
        if stage.module is not None:
            lines.append(f"module = {stage.module!r}")
        if stage.idler is not None:
            lines.append(f"idler = {_gear_toml(stage.idler)}")
    return "\n".join(lines) + "\n"
