"""Writing a train back as a train file (what ``gearcad design`` and ``build`` save as ``train.toml``); the
text parses back to the same :class:`~gearcad.trains.spec.TrainSpec` (see :mod:`gearcad.trains.trainfile`)."""

from __future__ import annotations

from .spec import GearSpec, TrainSpec, WormSpec

__all__ = ["train_to_toml"]


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
    if g.hand is not None:
        parts.append(f"hand = {_quoted(g.hand)}")
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
    if spec.join:
        lines.append(f"join = {_quoted(spec.join)}")
    if spec.studs:
        lines.append("studs = [" + ", ".join(_quoted(n) for n in spec.studs) + "]")
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
        lines += _helix_toml(p)
    if spec.summing is not None:
        s = spec.summing
        lines += ["", "# A summing train: the first [[stage]] is path a, the second path b.", "[summing]",
                  f"differential = {_quoted(s.differential)}", f"sun = {s.sun}", f"planet = {s.planet}",
                  f"planets = {s.planets}"]
        lines += [f"{key} = {getattr(s, key)!r}" for key in ("ring", "module", "tube", "axis_distance", "shift_limit")
                  if getattr(s, key) is not None]
    for stage in spec.stages:
        if stage.worm is not None:
            lines += ["", "[[stage]]  # the worm stage comes first: the worm is the input", _worm_toml(stage.worm), f"driven = {_gear_toml(stage.driven)}"]
        else:
            lines += ["", "[[stage]]", f"driver = {_gear_toml(stage.driver)}", f"driven = {_gear_toml(stage.driven)}"]
        if stage.module is not None:
            lines.append(f"module = {stage.module!r}")
        if stage.idler is not None:
            lines.append(f"idler = {_gear_toml(stage.idler)}")
        lines += _helix_toml(stage)
    return "\n".join(lines) + "\n"


def _worm_toml(worm: WormSpec) -> str:
    """A worm stage's ``worm = { ... }`` line (degrees)."""
    parts = [f"starts = {worm.starts}", f"diameter_factor = {worm.diameter_factor!r}", f"form = {_quoted(worm.form.upper())}"]
    parts += [f"{k} = {getattr(worm, k)!r}" for k in ("pressure_angle", "friction", "tool_diameter")
              if getattr(worm, k) is not None]
    return "worm = { " + ", ".join(parts) + " }"


def _helix_toml(table) -> list[str]:
    """The helix keys of a ``[[stage]]`` or ``[planetary]`` table, where it has a helix (degrees, mm)."""
    lines = [f"helix = {table.helix!r}", f"hand = {_quoted(table.hand)}"] if table.helix else []
    if table.herringbone:
        lines.append("herringbone = true")
    if table.gap:
        lines.append(f"gap = {table.gap!r}")
    return lines
