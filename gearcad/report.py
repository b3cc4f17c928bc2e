"""The build report: one dictionary for scripts (report.json) and Markdown for people (report.md).

Pure: builds data and text from a plan and the list of files written.  Lengths
in mm, angles in degrees, centres in plate coordinates (the plate DXF's).
"""

from __future__ import annotations

import math
from typing import Any, Mapping

from .plan import Plan

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
        from .ratio.target import parse_target
        from .ratio.train import exact_relative_error

        parsed = parse_target(target)
        data["target_value"] = parsed.value
        data["relative_error"] = float(exact_relative_error(plan.ratio.numerator, plan.ratio.denominator, parsed))
    return data


def _target_findings(plan: Plan) -> tuple:
    from .trains.target_check import target_findings

    return target_findings(spec.target, getattr(spec, "target_tolerance", None), plan.ratio) \
        if (spec := plan.spec).target else ()


def train_kind(plan: Plan) -> tuple[str, str]:
    """The train's kind and how its ratio comes about, in words."""
    spec = plan.spec
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
        })
    return {
        "name": spec.name, "title": spec.title, "kind": train_kind(plan)[0], "ratio_rule": train_kind(plan)[1],
        "ratio": ratio_data(plan),
        "tooth_system": {"name": plan.system.name, "title": plan.system.title,
                         "pressure_angle": math.degrees(plan.system.pressure_angle)},
        "gears": gears, "meshes": meshes,
        "shafts": [{"name": s.name, "x": s.x, "y": s.y, "diameter": s.diameter, "back_plate": s.back, "front_plate": s.front}
                   for s in plan.shafts],
        "plates": [{"name": p.name, "width": plan.layout.width, "height": plan.layout.height, "z": p.z,
                    "files": _files(files, p.name, ("dxf", "step", "svg"))} for p in plan.plates],
        "layout": {"area": plan.layout.area, "width": plan.layout.width, "height": plan.layout.height,
                   "search": plan.layout.search},
        "assembly": files.get("assembly", {}).get("step"),
        "fabrication": {"profile": plan.fabrication.name, "title": plan.fabrication.title,
                        "process": plan.fabrication.process, "kerf": plan.fabrication.kerf,
                        "backlash": plan.fabrication.backlash, "bore_clearance": plan.fabrication.bore_clearance},
        "findings": [{"check": f.check, "severity": f.severity, "message": f.message, "value": f.value, "limit": f.limit}
                     for f in plan.findings + _target_findings(plan)],
        "tolerance": plan.tolerance,
        "cautions": list(CAUTIONS) + ([plan.fabrication.note] if plan.fabrication.note else []),
    }


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
    lines += ["", "## Meshes", ""]
    for m in data["meshes"]:
        lines += [f"### {m['gears'][0]} with {m['gears'][1]}", "",
                  f"- centre distance {m['centre_distance']:.4f} mm (reference {m['standard_centre_distance']:.4f} mm)",
                  f"- working pressure angle {m['working_pressure_angle']:.4f} deg; contact ratio {m['contact_ratio']:.4f}; "
                  f"backlash {m['backlash']:.4f} mm", ""]
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
    lay = data["layout"]
    lines += ["## Layout", "", f"Plate {lay['width']:.2f} × {lay['height']:.2f} mm, area {lay['area']:.0f} mm² "
              f"(search: {lay['search']}). Centres in plate coordinates (the plate DXF's).", ""]
    lines += _table(["shaft", "x", "y", "diameter", "back plate", "front plate"],
                    [[s["name"], f"{s['x']:.4f}", f"{s['y']:.4f}", f"{s['diameter']:g}", "yes" if s["back_plate"] else "no",
                      "yes" if s["front_plate"] else "no"] for s in data["shafts"]])
    lines += ["", "## Files", ""]
    for g in data["gears"] + data["plates"]:
        lines.append(f"- {g['name']}: " + ", ".join(f"`{p}`" for p in g["files"].values() if p))
    if data.get("assembly"):
        lines.append(f"- assembly: `{data['assembly']}`")
    lines += ["", "## Cautions", ""] + [f"- {c}" for c in data["cautions"]]
    return "\n".join(lines) + "\n"
