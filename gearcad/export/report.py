"""The build report: one dictionary for scripts (report.json) and Markdown for people (report.md).

Pure: builds data and text from a plan and the list of files written.  Lengths
in mm, angles in degrees, centres in plate coordinates (the plate DXF's).
"""

from __future__ import annotations

import math
from typing import Any, Mapping

from ..trains.plan import Plan
from ..trains.parts import assembly_steps, parts_list

__all__ = ["CAUTIONS", "report_data", "report_markdown", "ratio_data", "train_kind"]

CAUTIONS = (
    "Gears are machinery: guard every pinch point where teeth meet before anything drives the train.",
    "Load ratings (Lewis bending, Hertz contact), where given, are estimates for light duty only, with typical material "
    "values to verify with your supplier. Powered or load-bearing machinery needs guarding and a rating to the applicable "
    "standard (ISO 6336, AGMA 2001) by a qualified engineer.",
    "Laser cutting: never cut PVC or vinyl (they give off chlorine gas); run the extraction and never leave the laser unattended.",
    "Follow local codes and the machine makers' instructions; defer to a qualified engineer where safety depends on the mechanism.",
)


def ratio_data(plan: Plan) -> dict[str, Any]:
    """The ratio achieved against the target (exact where the target is rational)."""
    target = plan.spec.target
    data: dict[str, Any] = {"target": target, "numerator": plan.ratio.numerator, "denominator": plan.ratio.denominator,
                            "value": float(plan.ratio), "relative_error": None, "direction": plan.direction}
    if target:
        from ..ratio.target import parse_target
        from ..ratio.train import exact_relative_error

        parsed = parse_target(target)
        data["target_value"] = parsed.value
        data["relative_error"] = float(exact_relative_error(plan.ratio.numerator, plan.ratio.denominator, parsed))
    return data


def _target_findings(plan: Plan) -> tuple:
    from ..trains.target_check import target_findings

    return target_findings(spec.target, getattr(spec, "target_tolerance", None), plan.ratio) \
        if (spec := plan.spec).target else ()


def train_kind(plan: Plan) -> tuple[str, str]:
    """The train's kind and how its ratio comes about, in words."""
    spec = plan.spec
    if getattr(plan, "worm", None) is not None:
        from .report_worm import WORM_RULE

        return "worm", WORM_RULE
    if spec.planetary is not None:
        return "planetary", ("Ratio = output turns per input turn of the planetary set, from Willis's equation on each "
                             "mesh with the fixed member held (the kinematic model).")
    if spec.summing is not None:
        rule = ("(side a + side b) / 2" if spec.summing.differential == "mean"
                else "(z_sun side a + z_ring side b) / (z_sun + z_ring)")
        return "summing", ("Ratio = output (carrier) turns per input turn of a summing train: each path turns its side of "
                           f"the differential at driver / driven teeth (reversed by each mesh), and the carrier turns at {rule} "
                           "(the kinematic model, Willis's equation on each mesh).")
    return "compound", "Ratio = output turns per input turn = product of driver teeth / driven teeth."


def _files(files: Mapping[str, Mapping[str, str]], name: str, kinds: tuple[str, ...]) -> dict[str, str | None]:
    got = files.get(name, {})
    return {k: got.get(k) for k in kinds}


def report_data(plan: Plan, files: Mapping[str, Mapping[str, str]]) -> dict[str, Any]:
    """report.json's content; ``files`` maps part name -> {kind: path relative to the output folder}."""
    spec = plan.spec
    gears = []
    for g in plan.gears:
        gear = g.gear
        gears.append({
            "name": g.name, "role": g.role, "stage": g.stage, "teeth": gear.teeth, "module": gear.module,
            "pressure_angle": math.degrees(gear.pressure_angle), "shift": gear.shift,
            "reference_diameter": gear.reference_diameter, "base_diameter": gear.base_diameter,
            "tip_diameter": gear.tip_diameter, "root_diameter": gear.root_diameter,
            "tooth_thickness": gear.tooth_thickness, "tip_thickness": gear.tip_thickness, "thinning": gear.thinning,
            "bore": g.bore, "thickness": spec.thickness, "shaft": plan.shafts[g.shaft].name, "layer": g.layer,
            "z": g.z, "rotation": math.degrees(g.rotation),
            "hub": {"diameter": g.spec.hub.diameter, "length": g.spec.hub.length} if g.spec.hub else None,
            "files": _files(files, g.name, ("dxf", "step", "stl", "svg")),
            **_helical_gear(g, spec),
        })
    meshes = []
    for m in plan.meshes:
        a = m.analysis
        meshes.append({
            "gears": list(m.names), "centre_distance": m.pair.centre_distance,
            "standard_centre_distance": m.pair.standard_centre_distance,
            "working_pressure_angle": math.degrees(m.pair.operating_pressure_angle), "contact_ratio": a.contact_ratio,
            "backlash": a.backlash,
            "rating": rating_data(m.rating) if m.rating is not None else None,
            "findings": [{"check": f.check, "severity": f.severity, "message": f.message, "value": f.value, "limit": f.limit}
                         for f in a.findings + m.findings],
            **_helical_mesh(m, spec),
        })
    from .report_worm import worm_data, worm_parts, worm_shaft_rows, worm_steps

    steps = assembly_steps(plan)
    at = next((k + 1 for k, step in enumerate(steps) if step.startswith("Lay the back plate")), len(steps))
    steps[at:at] = worm_steps(plan)
    return {
        "name": spec.name, "title": spec.title, "kind": train_kind(plan)[0], "ratio_rule": train_kind(plan)[1],
        "ratio": ratio_data(plan),
        "tooth_system": {"name": plan.system.name, "title": plan.system.title,
                         "pressure_angle": math.degrees(plan.system.pressure_angle)},
        "gears": gears, "meshes": meshes,
        "shafts": _shafts(plan) + worm_shaft_rows(plan),
        "pillars": _pillars(plan),
        "bridges": [p for p in plan.mechanism.bridges] if plan.mechanism else [],
        "joins": _joins(plan),
        "parts": parts_list(plan, files) + worm_parts(plan, files),
        "sequence": steps,
        **({"worm": worm_data(plan, files)} if getattr(plan, "worm", None) is not None else {}),
        "plates": [{"name": p.name, **_extent(plan, p), "z": p.z, "files": _files(files, p.name, ("dxf", "step", "svg"))}
                   for p in plan.plates],
        "layout": {"area": plan.layout.area, "width": plan.layout.width, "height": plan.layout.height,
                   "search": plan.layout.search},
        "assembly": _assembly(plan, files),
        "fabrication": {"profile": plan.fabrication.name, "title": plan.fabrication.title,
                        "process": plan.fabrication.process, "kerf": plan.fabrication.kerf,
                        "backlash": plan.fabrication.backlash, "bore_clearance": plan.fabrication.bore_clearance},
        "findings": [{"check": f.check, "severity": f.severity, "message": f.message, "value": f.value, "limit": f.limit}
                     for f in plan.findings + _target_findings(plan)],
        "tolerance": plan.tolerance,
        **_shaft_thrusts(plan),
        "cautions": list(CAUTIONS) + ([plan.fabrication.note] if plan.fabrication.note else []),
    }


def _extent(plan: Plan, plate) -> dict[str, float]:
    """A plate's width and height: the frame's, or the bounding box of a carrier disc or bridge, mm."""
    if plate.name in ("back-plate", "front-plate"):
        return {"width": plan.layout.width, "height": plan.layout.height}
    pts = plate.part.outer.points()
    size = pts.max(axis=0) - pts.min(axis=0)
    return {"width": float(size[0]), "height": float(size[1])}


def _shafts(plan: Plan) -> list[dict[str, Any]]:
    """Every shaft: position, diameter, the plates its hole is in, and (with a mechanism) its kind, supports, length, span."""
    out = []
    mech = plan.mechanism
    for k, s in enumerate(plan.shafts):
        row: dict[str, Any] = {"name": s.name, "x": s.x, "y": s.y, "diameter": s.diameter, "back_plate": s.back,
                               "front_plate": s.front}
        if mech is not None:
            m = mech.shafts[k]
            row.update({"kind": m.kind, "supports": list(m.supports), "length": m.length, "free_span": m.free_span,
                        "pipe": m.pipe, "around": m.around})
        out.append(row)
    return out


def _pillars(plan: Plan) -> list[dict[str, Any]]:
    """Pillars in plate coordinates: centre, diameter (the sleeve's), length, the plates they hold, mm."""
    if plan.mechanism is None:
        return []
    return [{"name": r.name, "x": r.x, "y": r.y, "diameter": r.diameter, "hole": plan.fabrication.spacer_hole,
             "length": r.length, "z": r.z0, "holds": list(r.supports)} for r in plan.mechanism.pillars]


def _joins(plan: Plan) -> list[dict[str, Any]]:
    if plan.mechanism is None:
        return []
    return [{"shaft": j.shaft, "gears": list(j.gears), "method": j.method, "note": j.note, "pin": j.pin or None,
             "file": j.file} for j in plan.mechanism.joins]


def _assembly(plan: Plan, files: Mapping[str, Mapping[str, str]]) -> dict[str, Any]:
    """The assembly file and its interference check: solids checked, overlaps found (empty when clean)."""
    data: dict[str, Any] = {"file": files.get("assembly", {}).get("step"), "solids": 0, "interference": []}
    if plan.mechanism is None:
        return data
    data["solids"] = plan.mechanism.solids
    data["interference"] = [{"parts": [a, b], "depth": depth, "message": f"{a} and {b} overlap by {depth:.3f} mm"}
                            for a, b, depth in plan.mechanism.overlaps]
    data["sweep_margin"] = plan.mechanism.margin
    return data


def rating_data(r) -> dict[str, Any]:
    """A pair's load rating: N, N·m, rpm, m/s, MPa."""
    return {
        "torque": r.torque, "speed": r.speed, "face_width": r.face_width, "process": r.process,
        "pitch_line_speed": r.pitch_line_speed, "velocity_factor": r.velocity_factor,
        "contact_stress": r.contact_stress, "contact_allowable": r.contact_allowable, "contact_safety": r.contact_safety,
        "gears": [{"material": g.material.name, "torque": g.torque, "speed": g.speed, "tangential_load": g.tangential_load,
                   "form_factor": g.lewis.form_factor, "bending_stress": g.bending_stress, "allowable": g.allowable,
                   "safety_factor": g.safety_factor, "min_safety_factor": g.min_safety} for g in r.gears],
    }


def _row(cells) -> str:
    return "| " + " | ".join(str(c) for c in cells) + " |"


def _table(header, rows) -> list[str]:
    return [_row(header), _row(["---"] * len(header))] + [_row(r) for r in rows]


def _mechanism_markdown(data: Mapping[str, Any]) -> list[str]:
    """Pillars, joins, the parts table, the interference check and the numbered assembly sequence."""
    lines: list[str] = []
    if data.get("pillars"):
        lines += ["", "## Pillars (mm, plate coordinates)", "",
                  f"Each pillar stands outside every moving part's sweep by at least "
                  f"{data['assembly'].get('sweep_margin', 0):g} mm; a screw runs through it and the plates it holds.", ""]
        lines += _table(["pillar", "x", "y", "diameter", "length", "holds"],
                        [[p["name"], f"{p['x']:.3f}", f"{p['y']:.3f}", f"{p['diameter']:g}", f"{p['length']:.2f}",
                          ", ".join(p["holds"])] for p in data["pillars"]])
    if data.get("joins"):
        lines += ["", "## Compound gears", ""] + [f"- {j['shaft']} ({j['method']}): {j['note']}" for j in data["joins"]]
    if data.get("parts"):
        lines += ["", "## Parts list (mm)", "", "Made parts are cut or printed from the files; bought parts are cut to "
                  "length from stock (shafts, tube) or bought (screws, pins). `parts.csv` holds the same table.", ""]
        lines += _table(["part", "kind", "qty", "diameter", "bore", "length", "thread", "material", "files / used for"],
                        [[p["name"], p["kind"], p["quantity"], _num(p.get("diameter")), _num(p.get("bore")),
                          _num(p.get("length")), p.get("thread") or "", p.get("material") or "",
                          ", ".join(f"`{f}`" for f in p.get("files", [])) or p.get("note", "")] for p in data["parts"]])
    assembly = data.get("assembly") or {}
    if "interference" in assembly:
        lines += ["", "## Assembly check", ""]
        if assembly["interference"]:
            lines += [f"- **failure** {x['message']}" for x in assembly["interference"]]
        else:
            lines.append(f"No two of the {assembly['solids']} solids overlap but at designed fits (a shaft in its bores, "
                         "a pipe on its shaft, a screw in its pillar, meshing teeth).")
    if data.get("sequence"):
        lines += ["", "## Assembly sequence", ""] + [f"{k}. {step}" for k, step in enumerate(data["sequence"], start=1)]
    return lines


def _num(v) -> str:
    return "" if v is None else f"{v:g}"


def report_markdown(data: Mapping[str, Any]) -> str:
    """report.md from :func:`report_data`'s dictionary."""
    r = data["ratio"]
    lines = [f"# {data['title'] or data['name']}", ""]
    lines += ["## Ratio", "", data["ratio_rule"], ""]
    achieved = f"{r['numerator']}/{r['denominator']} = {r['value']:.12g}"
    if r["target"]:
        err = r["relative_error"]
        lines += [f"- target: `{r['target']}` = {r['target_value']:.12g}", f"- achieved: {achieved}",
                  f"- relative error: {err:+.3e} ({err * 1e6:+.4f} ppm)"]
    else:
        lines += [f"- achieved: {achieved} (no target given)"]
    lines += [f"- output turns the {'same way as' if r['direction'] == 'same' else 'opposite way to'} the input", ""]
    f = data["fabrication"]
    lines += ["## Making", "", f"- fabrication profile: `{f['profile']}` ({f['title']})",
              f"- kerf compensation: {f['kerf']:g} mm (outlines out, holes in, by half)",
              f"- backlash by tooth thinning: {f['backlash']:g} mm; bore clearance {f['bore_clearance']:g} mm",
              f"- tooth system: {data['tooth_system']['title']} ({data['tooth_system']['pressure_angle']:g} deg)",
              f"- outline tolerance: {data['tolerance'] * 1000:g} µm", ""]
    lines += ["## Gears (mm)", ""]
    lines += _table(["gear", "teeth", "module", "shift", "ref. dia.", "tip dia.", "root dia.", "tip thick.", "bore", "shaft", "layer"],
                    [[g["name"], g["teeth"], f"{g['module']:g}", f"{g['shift']:+.4f}", f"{g['reference_diameter']:.4f}",
                      f"{g['tip_diameter']:.4f}", f"{g['root_diameter']:.4f}", f"{g['tip_thickness']:.3f}", f"{g['bore']:g}",
                      g["shaft"], g["layer"]] for g in data["gears"]])
    lines += _helical_gears_markdown(data["gears"])
    lines += ["", "## Meshes", ""]
    for m in data["meshes"]:
        lines += [f"### {m['gears'][0]} with {m['gears'][1]}", "",
                  f"- centre distance {m['centre_distance']:.4f} mm (reference {m['standard_centre_distance']:.4f} mm)",
                  f"- working pressure angle {m['working_pressure_angle']:.4f} deg; contact ratio {m['contact_ratio']:.4f}; "
                  f"backlash {m['backlash']:.4f} mm", ""]
        if m.get("helix_angle"):
            lines[-1:] = [f"- helix {m['helix_angle']:g} deg; transverse module {m['transverse_module']:.4f} mm, transverse "
                          f"pressure angle {m['transverse_pressure_angle']:.4f} deg; overlap ratio {m['overlap_ratio']:.4f}, "
                          f"total contact ratio {m['total_contact_ratio']:.4f}"
                          + (f"; axial force on each shaft {m['axial_force']:.4g} N (a bearing that takes thrust)"
                             if m.get("axial_force") else ""), ""]
        if m["rating"]:
            r = m["rating"]
            lines += [f"Load rating (estimates for light duty): input of this mesh {r['gears'][0]['torque']:.4g} N·m at "
                      f"{r['speed']:.4g} rpm; pitch-line speed {r['pitch_line_speed']:.3g} m/s, velocity factor "
                      f"{r['velocity_factor']:.3f}; contact stress {r['contact_stress']:.3g} MPa "
                      f"(allowable {r['contact_allowable']:.3g}, safety {r['contact_safety']:.2f})", ""]
            lines += _table(["gear", "material", "torque N·m", "Lewis Y", "bending MPa", "allowable MPa", "safety"],
                            [[n, g["material"], f"{g['torque']:.4g}", f"{g['form_factor']:.3f}", f"{g['bending_stress']:.3g}",
                              f"{g['allowable']:.3g}", f"{g['safety_factor']:.2f}"] for n, g in zip(m["gears"], r["gears"])])
            lines.append("")
        lines += [f"- **{x['severity']}** {x['check']}: {x['message']}" for x in m["findings"]]
        lines.append("")
    if data["findings"]:
        lines += ["## Other checks", ""] + [f"- **{x['severity']}** {x['check']}: {x['message']}" for x in data["findings"]] + [""]
    from .report_worm import worm_markdown

    lines += worm_markdown(data)[1:] + ([""] if data.get("worm") else [])
    lay = data["layout"]
    lines += ["## Layout", "", f"Plate {lay['width']:.2f} × {lay['height']:.2f} mm, area {lay['area']:.0f} mm² "
              f"(search: {lay['search']}). Centres in plate coordinates (the plate DXF's).", ""]
    lines += _table(["shaft", "x", "y", "diameter", "kind", "held by", "length", "free span"],
                    [[s["name"], f"{s['x']:.4f}", f"{s['y']:.4f}", f"{s['diameter']:g}", s.get("kind", ""),
                      ", ".join(s.get("supports", [])) or "-", f"{s['length']:.2f}" if "length" in s else "",
                      f"{s['free_span']:.2f}" if "free_span" in s else ""] for s in data["shafts"]])
    if data.get("shaft_axial_forces"):
        lines += ["", "Axial forces on the shafts from the helical meshes (N, net of each shaft's gears; a bearing "
                  "that takes thrust wherever it is not 0): " + "; ".join(f"{k} {v:.4g}" for k, v in
                                                                          data["shaft_axial_forces"].items())]
    lines += _mechanism_markdown(data)
    lines += ["", "## Files", ""]
    for g in data["gears"] + data["plates"]:
        lines.append(f"- {g['name']}: " + ", ".join(f"`{p}`" for p in g["files"].values() if p))
    assembly = data.get("assembly") or {}
    if assembly.get("file"):
        lines.append(f"- assembly: `{assembly['file']}`")
    lines += _sheet_lines(data.get("sheets", ()))
    lines += ["", "## Cautions", ""] + [f"- {c}" for c in data["cautions"]]
    return "\n".join(lines) + "\n"


# -- helical gears (gearcad.meshes.helical) --------------------------------------------------------

def _helical_gear(g, spec) -> dict[str, Any]:
    """A helical gear's keys: module and shift become the normal ones (mm, degrees)."""
    gear = g.gear
    if not hasattr(gear, "hand"):
        return {}
    stage = spec.planetary if spec.planetary is not None else (
        spec.stages[g.stage - 1] if g.stage and g.stage <= len(spec.stages) else None)
    return {"module": gear.normal_module, "shift": gear.normal_shift, "transverse_module": gear.module,
            "transverse_shift": gear.shift, "helix_angle": math.degrees(gear.helix_angle), "hand": gear.hand,
            "lead": gear.lead, "herringbone": bool(stage and stage.herringbone),
            "pressure_angle": math.degrees(gear.normal_pressure_angle),
            "transverse_pressure_angle": math.degrees(gear.pressure_angle)}


def _helical_mesh(m, spec) -> dict[str, Any]:
    """A helical mesh's keys (mm, degrees, N)."""
    g1, g2 = (m.pair.pinion, m.pair.ring) if hasattr(m.pair, "ring") else (m.pair.gear1, m.pair.gear2)
    if not hasattr(g1, "hand"):
        return {}
    overlap = next((f.value for f in m.findings if f.check == "overlap ratio"), None)
    data = {"helix_angle": math.degrees(g1.helix_angle), "hands": [g1.hand, g2.hand],
            "transverse_module": g1.module, "transverse_pressure_angle": math.degrees(g1.pressure_angle),
            "overlap_ratio": overlap, "total_contact_ratio": None if overlap is None else overlap + m.analysis.contact_ratio}
    if m.rating is not None and hasattr(m.rating, "helical_data"):
        data["axial_force"] = m.rating.axial_force
        data["rating_helical"] = m.rating.helical_data()
    return data


def _helical_gears_markdown(gears) -> list[str]:
    rows = [[g["name"], f"{g['helix_angle']:g}", g["hand"] + (" / other half opposite" if g["herringbone"] else ""),
             f"{g['lead']:.3f}", f"{g['transverse_module']:.4f}", f"{g['transverse_pressure_angle']:.4f}"]
            for g in gears if "helix_angle" in g]
    if not rows:
        return []
    return ["", "Helical gears: module and shift above are the normal section's; the DXF and SVG drawings are the "
            "transverse section at mid-face; the solids are that section swept along the helix.", ""] + _table(
        ["gear", "helix deg", "hand", "lead", "transverse module", "transverse pressure angle deg"], rows)


def _shaft_thrusts(plan) -> dict[str, Any]:
    """``shaft_axial_forces``: net axial force per shaft (N) when helical meshes are rated, else nothing."""
    loads = []
    for m in plan.meshes:
        force = getattr(m.rating, "axial_force", None)
        if not force:
            continue
        for name, drives in zip(m.names, (True, False)):
            g = plan.gear(name)
            loads.append((plan.shafts[g.shaft].name, g.gear.hand, drives, force))
    if not loads:
        return {}
    from ..meshes.helical import shaft_axial_forces

    return {"shaft_axial_forces": shaft_axial_forces(loads)}


def _sheet_lines(sheets) -> list[str]:
    """The nested cut sheets: one row per sheet with its parts and the area they use."""
    if not sheets:
        return []
    lines = ["", "## Cut sheets", "",
             f"Every flat part nested on stock sheets, at least {sheets[0]['spacing_mm']:g} mm apart and from the "
             "edges; each sheet's files carry its name. Cut in file order: marking, holes, outlines.", ""]
    lines += _table(["sheet", "material", "thickness", "size (mm)", "parts", "part area mm²", "used"],
                    [[s["name"], s["material"], f"{s['thickness_mm']:g} mm", f"{s['width_mm']:g} × {s['height_mm']:g}",
                      ", ".join(s["parts"]), f"{s['part_area_mm2']:.0f}", f"{s['used_percent']:.1f} %"] for s in sheets])
    parts = sum(s["part_area_mm2"] for s in sheets)
    stock = sum(s["width_mm"] * s["height_mm"] for s in sheets)
    lines += ["", f"{len(sheets)} sheet{'s' * (len(sheets) != 1)}: parts take {parts:.0f} of {stock:.0f} mm² "
                  f"({100 * parts / stock:.1f} %)."]
    return lines
