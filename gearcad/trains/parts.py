"""The parts list and the assembly sequence of a plan: what to make, what to buy, in which order to put it together.

Pure.  Made parts are the gears, plates, carrier discs and bridges (with their files);
bought parts are the rods of the mechanism (shafts, axles, pins, studs, pipes, spacers,
pillars, screws and nuts, dowel pins), grouped where diameter, bore and length agree.  A spacer
shorter than its shaft's diameter is listed as a washer (a shim washer up to 0.5 mm), named by its
inner and outer diameter and thickness, as washers are ordered.
Lengths in mm, rounded to 0.01 mm.
"""

from __future__ import annotations

from typing import Any, Mapping

from .hardware import spacer_word

__all__ = ["parts_list", "assembly_steps", "PARTS_COLUMNS"]

PARTS_COLUMNS = ("name", "kind", "quantity", "diameter", "bore", "length", "thickness", "thread", "material", "files",
                 "note")

_WHAT = {"arbor": "shaft (turns in its supports)", "axle": "axle (fixed)", "pin": "planet pin", "stud": "stud (fixed)",
         "pipe": "pipe (tube)", "spacer": "spacer tube", "pillar": "pillar (sleeve)", "screw": "screw with nut and washer",
         "dowel": "dowel pin", "nut": "hex nut", "washer": "plain washer"}


def _r(v: float) -> float:
    return round(float(v), 2)


def _word(plan, r) -> str:
    """What a rod is called in the list: a spacer shorter than its shaft's diameter is a (shim) washer."""
    if r.kind == "spacer":
        return spacer_word(r.length, r.bore - plan.fabrication.bore_clearance)
    return _WHAT.get(r.kind, r.kind)


def _rod_name(plan, r) -> str:
    """A row's name: a screw by its thread and length, a washer by inner x outer diameter x thickness (the way
    washers are ordered, e.g. DIN 988 shim rings d x D x s, from memory), other rods by what they are."""
    if r.kind == "screw":
        return f"{r.thread} x {_r(r.length):g}"
    if r.kind == "nut":  # ISO 4032 (from memory)
        return f"{r.thread} hex nut"
    if r.kind == "washer":  # ISO 7089, bore x outside x thickness (from memory)
        return f"{r.thread} plain washer {_r(r.bore):g} x {_r(r.diameter):g} x {_r(r.length):g}"
    word = _word(plan, r)
    if r.kind == "spacer" and word.endswith("washer"):
        return f"{word} {_r(r.bore):g} x {_r(r.diameter):g} x {_r(r.length):g}"
    return word


def parts_list(plan, files: Mapping[str, Mapping[str, str]]) -> list[dict[str, Any]]:
    """Every part: made parts one row each (with files), bought parts grouped by kind, diameter, bore and length."""
    rows: list[dict[str, Any]] = []
    material = plan.fabrication.material
    for g in plan.gears:
        rows.append({"name": g.name, "kind": "made", "quantity": 1, "diameter": _r(g.gear.tip_diameter if g.role != "ring"
                                                                               else getattr(g.gear, "outer_diameter", 0.0)),
                     "length": _r(plan.spec.thickness), "material": material,
                     "files": sorted(v for v in files.get(g.name, {}).values() if v), "note": f"gear, {g.gear.teeth} teeth"})
    for p in plan.plates:
        rows.append({"name": p.name, "kind": "made", "quantity": 1, "length": _r(plan.spec.thickness), "material": material,
                     "files": sorted(v for v in files.get(p.name, {}).values() if v), "note": "plate"})
    mech = plan.mechanism
    for j in (mech.joins if mech else ()):
        if j.file and j.file in files:
            rows.append({"name": j.file, "kind": "made", "quantity": 1, "material": material,
                         "files": sorted(v for v in files[j.file].values() if v), "note": j.note})
    groups: dict[tuple, dict[str, Any]] = {}
    for r in (mech.rods if mech else ()):
        key = (r.kind, _r(r.diameter), _r(r.bore), _r(r.length), r.thread)
        row = groups.get(key)
        if row is None:
            name = _rod_name(plan, r)
            row = groups[key] = {"name": name, "kind": "bought", "quantity": 0, "diameter": _r(r.diameter),
                                 "bore": _r(r.bore) if r.bore else None, "length": _r(r.length), "thread": r.thread or None,
                                 "material": "steel" if r.kind in ("arbor", "axle", "pin", "stud", "screw", "dowel", "nut", "washer")
                                 else "brass", "note": "", "used_for": []}
            if r.kind == "spacer" and _word(plan, r).endswith("washer"):  # a washer: its inner and outer diameter and thickness
                row.update(inner_diameter=_r(r.bore), outer_diameter=_r(r.diameter), thickness=_r(r.length))
            rows.append(row)
        row["quantity"] += 1
        row["used_for"].append(r.name)
    for row in groups.values():
        row["note"] = ", ".join(row.pop("used_for"))
    return rows


def _bridge_side(plan, bridge: str) -> str:
    """``back`` when a bridge stands on the back plate (it holds a shaft's front end), else ``front``."""
    pillars = [r for r in plan.mechanism.rods if r.kind == "pillar" and bridge in r.supports]
    return "back" if any("back-plate" in r.supports for r in pillars) else "front"


def _stack(plan, shaft_names: set[str], reverse: bool) -> list[str]:
    """Gears, spacers, pipes and pins on the named shafts in z order (``reverse``: from the front down)."""
    mech = plan.mechanism
    items = [(g.z, f"gear {g.name} on {plan.shafts[g.shaft].name}") for g in plan.gears
             if plan.shafts[g.shaft].name in shaft_names]
    items += [(r.z0, f"{_word(plan, r)} {r.name} ({r.length:.2f} mm)") for r in mech.rods
              if r.kind in ("spacer", "pipe", "dowel") and any(r.name.startswith(f"{n}-") or r.name == n
                                                                 for n in shaft_names)]
    return [what for _, what in sorted(items, key=lambda t: t[0], reverse=reverse)]


def _gear_words(plan, g) -> str:
    if g.role == "ring":
        fixed = plan.spec.planetary is not None and plan.spec.planetary.fixed == "ring"
        return f"ring gear {g.name}" + (" over the bolt screws, its bolt holes on them" if fixed else "")
    return f"gear {g.name} on {plan.shafts[g.shaft].name}"


def _z_of(plan, name: str) -> float:
    return next(p.z for p in (*plan.plates, *plan.gears) if p.name == name)


def _inside_glued(plan, p) -> str:
    """Words for a disc that turns inside a glued group (a carrier disc in the differential's cup)."""
    t = plan.spec.thickness
    for group in plan.bonded:
        lo, hi = min(_z_of(plan, n) for n in group), max(_z_of(plan, n) for n in group) + t
        if lo < p.z < hi:
            return f", dropped into the glued part through {group[-1]}"
    return ""


def _glue_words(plan, group: tuple[str, ...]) -> str:
    """Glue a bonded group face on face (a planetary differential's web, spacer ring and ring: the ring's tips
    stand flush with the spacer ring's bore, which is their circle, so the eye or a fingertip centres it)."""
    words = f"Glue {', '.join(group[:-1])} and {group[-1]} face on face, in this order from the bottom, into one part"
    if {"ring-spacer", "ring"} <= set(group):
        words += (": outer edges of the web and the spacer ring flush, the ring's tooth tips flush with the spacer "
                  "ring's bore all round (the bore is their tip circle); keep glue out of the bore and off the teeth")
    return words + "."


def assembly_steps(plan) -> list[str]:
    """Numbered assembly steps (without the numbers): joins, the front plate's bridges, then from the back plate up."""
    mech = plan.mechanism
    if mech is None:
        return []
    steps = [(f"Join {' and '.join(j.gears)}: " if len(j.gears) > 1 else "") + f"{j.note}." for j in mech.joins]
    steps += [_glue_words(plan, group) for group in plan.bonded]
    glued = {n: group for group in plan.bonded for n in group}
    front_bridges = [b for b in mech.bridges if _bridge_side(plan, b) == "front"]
    front_studs = sorted(s.name for s in mech.shafts if s.kind == "stud" and s.supports == ("front-plate",))
    held_front = {s.name for s in mech.shafts if any(b in s.supports for b in front_bridges)} | set(front_studs)
    rods = {r.name: r for r in mech.rods}
    for name in front_studs:  # a stud fixed in the front plate hangs its pipe and gears from it
        steps.append(f"Front plate first: lay it inner face up and fix the stud {name} ({rods[name].diameter:g} mm, "
                     f"{rods[name].length:.2f} mm long) in its hole, flush with the plate's outer face; slide on, in this "
                     "order, " + "; ".join(_stack(plan, {name}, reverse=True)) + "; keep the pipe on by peening the "
                     "stud's end or gluing a washer to it (not to the pipe).")
    for b in front_bridges:
        shafts = sorted(s.name for s in mech.shafts if b in s.supports)
        steps.append(f"Front plate first: lay it inner face up and put the {', '.join(shafts)} shaft(s) into their "
                     f"holes; slide on, in this order, " + "; ".join(_stack(plan, set(shafts), reverse=True)) +
                     f"; then stand the {b} pillars on the front plate and screw {b} onto them over the shaft end(s) "
                     "(screws from the plate's outside, tapped into the bridge).")
    steps.append("Lay the back plate flat, inner face up (the face the layers stand on).")
    pillars = [r for r in mech.rods if r.kind == "pillar" and "back-plate" in r.supports]
    if pillars:
        steps.append(f"Put a screw ({mech.screw}) up through each of the back plate's {len(pillars)} pillar holes and slide "
                     "the pillar sleeves over them (" + ", ".join(f"{p.name} {p.length:.2f} mm" for p in pillars) + ").")
    holders = [r for r in mech.rods if r.kind in ("arbor", "axle", "stud") and r.name not in held_front]
    for r in sorted(holders, key=lambda r: r.z0):
        steps.append(f"Fit the {_WHAT[r.kind]} {r.name} ({r.diameter:g} mm, {r.length:.2f} mm long) into its hole in the "
                     f"{r.supports[0] if r.supports else 'plate'}.")
    items = [(g.z, _gear_words(plan, g)) for g in plan.gears if plan.shafts[g.shaft].name not in held_front
             and g.name not in glued]
    items += [(r.z0, f"{_word(plan, r)} {r.name} ({r.length:.2f} mm)") for r in mech.rods
              if r.kind in ("spacer", "pipe", "pin", "dowel") and not any(r.name.startswith(f"{n}-") for n in held_front)]
    items += [(r.z0, f"pillar sleeve {r.name} ({r.length:.2f} mm) over its screw") for r in mech.rods
              if r.kind == "pillar" and "back-plate" not in r.supports and not set(r.supports) & set(front_bridges)]
    # Discs first in their layer (a carrier disc before the pins that stand in it); a bonded part says so.
    items = [(p.z, p.name + _inside_glued(plan, p)) for p in plan.plates
             if p.name not in ("back-plate", "front-plate") and p.name not in front_bridges and p.name not in glued] + items
    items += [(min(_z_of(plan, n) for n in group), f"the glued {' + '.join(group)} (one part) over the "
               + next(plan.shafts[g.shaft].name for g in plan.gears if g.name in group)) for group in plan.bonded]
    bridges = set(mech.bridges)
    layer = None
    for z, what in sorted(items, key=lambda t: t[0]):
        if what in bridges:  # a bridge's words follow its name
            what = f"{what}, screwed onto its pillars (screws from the back plate's outside, tapped into the bridge)"
        if layer is not None and abs(z - layer[0]) < 1e-6:
            layer[1].append(what)
            continue
        if layer:
            steps.append(f"At {layer[0]:.2f} mm above the back plate: " + "; ".join(layer[1]) + ".")
        layer = (z, [what])
    if layer:
        steps.append(f"At {layer[0]:.2f} mm above the back plate: " + "; ".join(layer[1]) + ".")
    steps.append("Check that every gear turns freely and meshes in the phase the assembly drawing shows (assembly.step).")
    what = "the front plate" + (" with its bridge(s), stud(s) and what they hold" if front_bridges or front_studs else "")
    steps.append(f"Lower {what} over the shaft ends and the screws, the gears it carries meshing as they go down; fit "
                 "washers and nuts and tighten evenly.")
    steps.append("Turn the input by hand through a full turn of the output: nothing may bind or rub.")
    return steps
