"""The report's part for a train's worm stage: figures, findings, where the worm lies, what holds it.

Pure: data and Markdown from the plan (:class:`gearcad.trains.worm_stage.WormLayout`).  The
figures' keys are those of ``gearcad worm --json`` (the issue's contract) beside the worm's place in
the assembly.  Lengths in mm, angles in degrees, plate coordinates.
"""

from __future__ import annotations

import math
from typing import Any, Mapping

from ..trains.design_worm import WORM_PLACE

__all__ = ["worm_data", "worm_shaft_rows", "worm_parts", "worm_steps", "worm_markdown", "WORM_RULE"]

WORM_RULE = ("Ratio = output turns per input (worm) turn = worm starts / wheel teeth × the product of the spur "
             "stages' driver teeth / driven teeth (the kinematic model: z1 ω_worm = z2 ω_wheel on the worm mesh). "
             "The worm's axis crosses the wheel's: the wheel's sense follows the worm's hand; the direction given "
             "is the spur stages' (from the wheel's shaft to the output).")


def _finding(f) -> dict[str, Any]:
    return {"check": f.check, "severity": f.severity, "message": f.message, "value": f.value, "limit": f.limit}


def worm_data(plan, files: Mapping[str, Mapping[str, str]]) -> dict[str, Any] | None:
    """report.json's ``worm``: the pair's figures, its findings, and its place, supports and files."""
    worm = plan.worm
    if worm is None:
        return None
    p, a = worm.pair, worm.analysis
    end = worm.input_end
    return {
        "starts": p.starts, "module": p.module, "diameter_factor": p.diameter_factor, "flank": p.flank,
        "ratio": p.ratio, "pressure_angle": math.degrees(p.pressure_angle),
        "axial_pressure_angle": math.degrees(p.axial_pressure_angle),
        "normal_pressure_angle": math.degrees(p.normal_pressure_angle),
        "centre_distance": p.centre_distance, "lead_angle": math.degrees(p.lead_angle), "lead": p.lead,
        "axial_pitch": p.axial_pitch, "contact_ratio": p.midplane_contact_ratio,
        "friction": {"low": a.friction.low, "high": a.friction.high, "source": a.friction.source},
        "efficiency": a.efficiency, "efficiency_low_friction": a.efficiency_best,
        "wheel_driving_efficiency": a.wheel_driving_efficiency, "self_locking": a.self_locking,
        "worm": {"reference_diameter": p.reference_diameter, "tip_diameter": p.tip_diameter,
                 "root_diameter": p.root_diameter, "length": p.worm_length, "shaft_diameter": worm.shaft_diameter,
                 "shaft_length": 2 * worm.shaft_end, "files": _files(files, "worm")},
        "wheel": {"name": worm.wheel, "teeth": p.wheel_teeth, "shift": p.wheel_shift,
                  "reference_diameter": p.wheel_reference_diameter, "throat_diameter": p.throat_diameter,
                  "outside_diameter": p.outside_diameter, "root_diameter": p.wheel_root_diameter,
                  "face_width": p.wheel_face_width, "thickness": plan.spec.thickness,
                  "shaft": plan.shafts[0].name,
                  "solid": "prism of the mid-plane section (the throat section) of the train's thickness, each tooth "
                           "space one B-spline fitted to the worm's generated section",
                  "outline": _outline(worm.outline, plan.tolerance)},
        "axis": {"x": worm.x, "y": worm.y, "z": worm.z, "heading": math.degrees(worm.direction),
                 "distance_to_wheel_axis": math.hypot(worm.x - plan.shafts[0].x, worm.y - plan.shafts[0].y)},
        "input_end": {"name": "worm input end", "x": end[0], "y": end[1], "z": end[2]},
        "place": {"stage": 1, "role": "input", "why": WORM_PLACE},
        "blocks": [{"name": b.name, "x": b.x, "y": b.y, "length": b.length, "width": b.width, "height": b.height,
                    "bore": b.bore, "screws": [list(s) for s in b.screws], "files": _files(files, b.name)}
                   for b in worm.blocks],
        "findings": [_finding(f) for f in a.findings],
    }


def _outline(outline, tolerance: float) -> dict[str, Any] | None:
    """The fitted outline against the generated section: deviations (mm), what was fitted and checked."""
    if outline is None:
        return None
    return {"deviation": outline.deviation, "vertex_deviation": outline.vertex_deviation, "tolerance": tolerance,
            "generating_positions": outline.positions, "section_points": outline.vertices,
            "spline_spans": outline.spans, "curves_per_space": outline.pieces}


def _files(files: Mapping[str, Mapping[str, str]], name: str) -> dict[str, str]:
    return {k: v for k, v in files.get(name, {}).items() if v}


def worm_shaft_rows(plan) -> list[dict[str, Any]]:
    """report.json's ``shafts`` row of the worm: its axis crosses the plates' shafts; held by its two blocks."""
    if plan.worm is None or plan.mechanism is None:
        return []
    worm = plan.worm
    support = next(s for s in plan.mechanism.shafts if s.name == "worm")
    return [{"name": "worm", "x": worm.x, "y": worm.y, "z": worm.z, "heading": math.degrees(worm.direction),
             "diameter": worm.shaft_diameter, "back_plate": False, "front_plate": False, "kind": support.kind,
             "supports": list(support.supports), "length": support.length, "free_span": support.free_span,
             "pipe": None, "around": None, "crossed": True}]


def worm_parts(plan, files: Mapping[str, Mapping[str, str]]) -> list[dict[str, Any]]:
    """Parts-list rows of the worm (with its shaft ends) and of each bearing block (the screws are rods)."""
    worm = plan.worm
    if worm is None:
        return []
    rows = [{"name": "worm", "kind": "made", "quantity": 1, "diameter": round(worm.pair.tip_diameter, 2),
             "length": round(2 * worm.shaft_end, 2), "material": "steel",
             "files": sorted(_files(files, "worm").values()),
             "note": f"worm, {worm.pair.starts} start(s), with its shaft ends of {worm.shaft_diameter:g} mm; "
                     "the input end turns by the +u end"}]
    for b in worm.blocks:
        rows.append({"name": b.name, "kind": "made", "quantity": 1, "bore": round(b.bore, 2),
                     "length": round(b.length, 2), "material": "printed or milled (PLA, acetal, aluminium)",
                     "files": sorted(_files(files, b.name).values()),
                     "note": f"bearing block {b.width:.2f} wide x {b.height:.2f} high, tapped {worm.screw} for its two "
                             "screws from the back plate"})
    return rows


def worm_steps(plan) -> list[str]:
    """The worm's assembly steps, after the back plate is laid flat."""
    worm = plan.worm
    if worm is None:
        return []
    names = " and ".join(b.name for b in worm.blocks)
    return [f"Slide {names} onto the worm's shaft ends, then stand them on the back plate's inner face over their "
            f"screw holes; put the {worm.screw} screws up through the back plate into the blocks' tapped holes and "
            f"tighten them with the worm turning freely, its thread in the wheel's place ({worm.pair.centre_distance:.3f} "
            "mm from the wheel's axis)."]


def worm_markdown(data: Mapping[str, Any]) -> list[str]:
    """report.md's worm section."""
    w = data.get("worm")
    if not w:
        return []
    axis, end = w["axis"], w["input_end"]
    lines = ["", "## Worm stage (mm, degrees)", "",
             f"- {w['starts']} start(s), axial module {w['module']:g}, diameter factor {w['diameter_factor']:g}, "
             f"flank {w['flank'].upper()}, pressure angle {w['pressure_angle']:g}; lead angle {w['lead_angle']:.4f}, "
             f"lead {w['lead']:.4f}, axial pitch {w['axial_pitch']:.4f}",
             f"- centre distance {w['centre_distance']:.4f}; mid-plane contact ratio {w['contact_ratio']:.3f}",
             f"- worm: reference {w['worm']['reference_diameter']:.4f}, tip {w['worm']['tip_diameter']:.4f}, root "
             f"{w['worm']['root_diameter']:.4f}, thread length {w['worm']['length']:.3f}, shaft "
             f"{w['worm']['shaft_diameter']:g} x {w['worm']['shaft_length']:.2f}",
             f"- wheel {w['wheel']['name']}: {w['wheel']['teeth']} teeth, reference {w['wheel']['reference_diameter']:.4f}, "
             f"throat {w['wheel']['throat_diameter']:.4f}, outside {w['wheel']['outside_diameter']:.4f}, root "
             f"{w['wheel']['root_diameter']:.4f}; face width by the rule {w['wheel']['face_width']:.3f}, cut "
             f"{w['wheel']['thickness']:g} thick; its solid is a {w['wheel']['solid']}"
             + (f" (within {w['wheel']['outline']['deviation'] * 1000:.2f} µm of its {w['wheel']['outline']['section_points']} "
                "points)" if w["wheel"].get("outline") else ""),
             f"- efficiency, worm driving: {w['efficiency']:.1%} (friction {w['friction']['high']:g}; "
             f"{w['efficiency_low_friction']:.1%} at {w['friction']['low']:g}); wheel driving "
             f"{w['wheel_driving_efficiency']:.1%}; self-locking: {'yes' if w['self_locking'] else 'no'}",
             f"- the worm's axis crosses the wheel's: it lies parallel to the plates at height {axis['z']:.3f} above the "
             f"back plate's inner face, through ({axis['x']:.3f}, {axis['y']:.3f}) heading {axis['heading']:.1f}, "
             f"{axis['distance_to_wheel_axis']:.4f} from the wheel's axis",
             f"- input: the {end['name']} at ({end['x']:.3f}, {end['y']:.3f}, {end['z']:.3f}): couple the motor or "
             "crank there",
             f"- where the worm sits: {w['place']['why']}", ""]
    lines += [f"- **{x['severity']}** {x['check']}: {x['message']}" for x in w["findings"]]
    lines += ["", "Bearing blocks (made parts; end view in the DXF, the prism in the STEP):", ""]
    lines += [f"- {b['name']} at ({b['x']:.3f}, {b['y']:.3f}): {b['length']:.2f} along the axis, {b['width']:.2f} wide, "
              f"{b['height']:.2f} high, bore {b['bore']:g}; " + ", ".join(f"`{f}`" for f in b["files"].values())
              for b in w["blocks"]]
    if w["worm"]["files"]:
        lines.append("- worm: " + ", ".join(f"`{f}`" for f in w["worm"]["files"].values()))
    return lines
