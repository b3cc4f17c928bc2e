"""How a meshing pair is shown: its figures as JSON dictionaries and as text tables with the verdict.

Shared by ``gearcad pair`` and its helical form (:mod:`gearcad.cli._helical`).
"""

from __future__ import annotations

import math

from ._format import fmt, table

__all__ = ["internal_to_dict", "render_internal", "worst_status", "gear_to_dict", "finding_to_dict",
           "analysis_to_dict", "MARK", "mesh_rating_lines", "render", "verdict_lines"]


def internal_to_dict(a) -> dict:
    """JSON form of an internal pair analysis: the keys of :func:`analysis_to_dict` plus ``internal: true``."""
    p = a.pair
    pin, ring = a.gears
    gears = []
    for fig in a.gears:
        g = fig.gear
        gears.append({
            "teeth": g.teeth, "module": g.module, "shift": g.shift,
            "reference_diameter": g.reference_diameter, "base_diameter": g.base_diameter,
            "working_diameter": fig.working_diameter, "tip_diameter": g.tip_diameter, "root_diameter": g.root_diameter,
            "form_diameter": fig.form_diameter, "active_diameter": fig.active_diameter,
            "tooth_thickness": g.tooth_thickness, "tip_thickness": g.tip_thickness, "thinning": g.thinning,
            "tip_shortening": g.tip_shortening, "undercut": fig.undercut,
            "min_shift": fig.min_shift if fig is pin else None,
        })
    r = p.ring
    gears[1].update({"internal": True, "iso_teeth": r.iso_teeth, "nominal_root_diameter": r.nominal_root_diameter,
                     "cutter_teeth": r.cutter_teeth, "cutter_shift": r.cutter_shift,
                     "cutting_centre_distance": r.cutting_centre_distance, "outer_diameter": r.outer_diameter})
    return {"internal": True, **_mesh_dict(a, p.pinion.system.name), "least_tooth_difference": a.least_difference,
            "gears": gears, "findings": [finding_to_dict(f) for f in a.findings], "verdict": a.worst}


def render_internal(a, rating=None) -> str:
    """The readable table of ``pair`` for an internal pair (and its load rating, if any)."""
    p = a.pair
    pin, ring = a.gears
    r = p.ring
    head = (f"Internal pair {pin.gear.teeth} : {r.teeth} (ring; ISO 21771 z2 = {r.iso_teeth})   module {p.module:g} mm   "
            f"pressure angle {math.degrees(p.pressure_angle):g} deg   {p.pinion.system.title}")
    rows = [
        ("teeth", str(pin.gear.teeth), str(r.teeth)),
        ("profile shift x (ISO sign)", f"{pin.gear.shift:+.4f}", f"{r.shift:+.4f}"),
        ("reference diameter", fmt(pin.gear.reference_diameter), fmt(r.reference_diameter)),
        ("base diameter", fmt(pin.gear.base_diameter), fmt(r.base_diameter)),
        ("working pitch diameter", fmt(pin.working_diameter), fmt(ring.working_diameter)),
        ("tip diameter (ring: inner)", fmt(pin.gear.tip_diameter), fmt(r.tip_diameter)),
        ("root diameter (ring: outer, cut)", fmt(pin.gear.root_diameter), fmt(r.root_diameter)),
        ("form diameter (involute ends)", fmt(pin.form_diameter), fmt(ring.form_diameter)),
        ("tooth thickness at reference (arc)", fmt(pin.gear.tooth_thickness), fmt(r.tooth_thickness)),
        ("tip thickness (arc)", fmt(pin.gear.tip_thickness), fmt(r.tip_thickness)),
        ("least shift without undercut", f"{pin.min_shift:+.4f}", "-"),
        ("undercut", "yes" if pin.undercut else "no", "-"),
    ]
    least = "none found" if a.least_difference is None else str(a.least_difference)
    mesh = [
        ("reference centre distance", f"{fmt(p.standard_centre_distance)} mm"),
        ("centre distance", f"{fmt(p.centre_distance)} mm"),
        ("centre-distance modification y", f"{p.centre_modification:+.4f}"),
        ("working pressure angle", f"{math.degrees(p.operating_pressure_angle):.4f} deg"),
        ("transverse contact ratio", f"{a.contact_ratio:.4f}"),
        ("backlash, circumferential / normal", f"{a.backlash:.4f} / {a.normal_backlash:.4f} mm"),
        ("least tooth-count difference", least),
        ("ring cutter: teeth, shift", f"{r.cutter_teeth}, {r.cutter_shift:+.4f}"),
        ("cutting centre distance", f"{fmt(r.cutting_centre_distance)} mm"),
        ("blank outer diameter", f"{fmt(r.outer_diameter)} mm"),
    ]
    return "\n".join([
        head, "",
        table(rows, header=("gear figures (mm)", "pinion", "ring")), "",
        table(mesh, header=("mesh", "")), "",
        *(mesh_rating_lines(rating) if rating else []),
        *verdict_lines(list(a.findings) + (list(rating.findings()) if rating else [])),
    ])


def worst_status(findings) -> str:
    order = ("ok", "warning", "failure")
    return max((f.severity for f in findings), key=order.index, default="ok")


def gear_to_dict(fig) -> dict:
    """JSON form of one gear's figures (mm, degrees)."""
    g = fig.gear
    return {
        "teeth": g.teeth,
        "module": g.module,
        "shift": g.shift,
        "reference_diameter": g.reference_diameter,
        "base_diameter": g.base_diameter,
        "working_diameter": fig.working_diameter,
        "tip_diameter": g.tip_diameter,
        "root_diameter": g.root_diameter,
        "form_diameter": fig.form_diameter,
        "active_root_diameter": fig.active_root_diameter,
        "tooth_thickness": g.tooth_thickness,
        "tip_thickness": g.tip_thickness,
        "thinning": g.thinning,
        "tip_shortening": g.tip_shortening,
        "undercut": fig.undercut,
        "min_shift": fig.min_shift,
    }


def finding_to_dict(f) -> dict:
    """JSON form of a finding."""
    return {"check": f.check, "severity": f.severity, "message": f.message, "value": f.value, "limit": f.limit}


def analysis_to_dict(a) -> dict:
    """JSON form of a pair analysis; keys are a contract (see README)."""
    return {**_mesh_dict(a, a.pair.gear1.system.name), "gears": [gear_to_dict(f) for f in a.gears],
            "findings": [finding_to_dict(f) for f in a.findings], "verdict": a.worst}


def _mesh_dict(a, tooth_system: str) -> dict:
    """The mesh's keys shared by external and internal pairs (mm, degrees)."""
    p = a.pair
    return {
        "module": p.module,
        "pressure_angle": math.degrees(p.pressure_angle),
        "tooth_system": tooth_system,
        "standard_centre_distance": p.standard_centre_distance,
        "centre_distance": p.centre_distance,
        "centre_modification": p.centre_modification,
        "working_pressure_angle": math.degrees(p.operating_pressure_angle),
        "contact_ratio": a.contact_ratio,
        "backlash": a.backlash,
        "normal_backlash": a.normal_backlash,
    }


MARK = {"ok": "ok", "warning": "WARN", "failure": "FAIL"}


def mesh_rating_lines(r) -> list[str]:
    rows = [(f"gear {i}", g.material.title, f"{g.torque:.4g}", f"{g.tangential_load:.4g}", f"{g.lewis.form_factor:.3f}",
             f"{g.bending_stress:.3g}", f"{g.allowable:.3g}", f"{g.safety_factor:.2f}") for i, g in enumerate(r.gears, 1)]
    return ["load rating (estimates for light duty; Lewis bending, Hertz contact)",
            table(rows, header=("", "material", "torque N·m", "load N", "Lewis Y", "bending MPa", "allowable", "safety"),
                  left=(0, 1)),
            f"  face width {r.face_width:g} mm; pitch-line speed {r.pitch_line_speed:.3g} m/s; velocity factor "
            f"{r.velocity_factor:.3f}; contact stress {r.contact_stress:.3g} MPa (allowable {r.contact_allowable:.3g}, "
            f"safety {r.contact_safety:.2f})", ""]


def render(a, rating=None) -> str:
    """The readable table of ``pair`` (and its load rating, if any)."""
    p = a.pair
    g1, g2 = a.gears
    head = (f"Spur pair {g1.gear.teeth} : {g2.gear.teeth}   module {p.module:g} mm   "
            f"pressure angle {math.degrees(p.pressure_angle):g} deg   {p.gear1.system.title}")
    rows = [
        ("teeth", str(g1.gear.teeth), str(g2.gear.teeth)),
        ("profile shift x", f"{g1.gear.shift:+.4f}", f"{g2.gear.shift:+.4f}"),
        ("reference diameter", fmt(g1.gear.reference_diameter), fmt(g2.gear.reference_diameter)),
        ("base diameter", fmt(g1.gear.base_diameter), fmt(g2.gear.base_diameter)),
        ("working pitch diameter", fmt(g1.working_diameter), fmt(g2.working_diameter)),
        ("tip diameter", fmt(g1.gear.tip_diameter), fmt(g2.gear.tip_diameter)),
        ("root diameter", fmt(g1.gear.root_diameter), fmt(g2.gear.root_diameter)),
        ("form diameter (involute starts)", fmt(g1.form_diameter), fmt(g2.form_diameter)),
        ("tooth thickness at reference (arc)", fmt(g1.gear.tooth_thickness), fmt(g2.gear.tooth_thickness)),
        ("tip thickness (arc)", fmt(g1.gear.tip_thickness), fmt(g2.gear.tip_thickness)),
        ("least shift without undercut", f"{g1.min_shift:+.4f}", f"{g2.min_shift:+.4f}"),
        ("undercut", "yes" if g1.undercut else "no", "yes" if g2.undercut else "no"),
    ]
    mesh = [
        ("reference centre distance", f"{fmt(p.standard_centre_distance)} mm"),
        ("centre distance", f"{fmt(p.centre_distance)} mm"),
        ("centre-distance modification y", f"{p.centre_modification:+.4f}"),
        ("tip shortening k", f"{p.tip_shortening:.4f}" if p.gear1.tip_shortening else "none (full tips)" if p.tip_shortening > 1e-12 else "none needed"),
        ("working pressure angle", f"{math.degrees(p.operating_pressure_angle):.4f} deg"),
        ("transverse contact ratio", f"{a.contact_ratio:.4f}"),
        ("backlash, circumferential / normal", f"{a.backlash:.4f} / {a.normal_backlash:.4f} mm"),
    ]
    findings = list(a.findings) + (list(rating.findings()) if rating else [])
    return "\n".join([
        head, "",
        table(rows, header=("gear figures (mm)", "gear 1", "gear 2")), "",
        table(mesh, header=("mesh", "")), "",
        *(mesh_rating_lines(rating) if rating else []),
        *verdict_lines(findings),
    ])


def verdict_lines(findings) -> list[str]:
    """The checks, the verdict and the caution: the end of every pair table."""
    verdict = {"ok": "meshes well", "warning": "meshes, with warnings", "failure": "does NOT work as it stands"}
    return [
        "checks",
        "\n".join(f"  [{MARK[f.severity]:>4}] {f.check}: {f.message}" for f in findings), "",
        f"verdict: the pair {verdict[worst_status(findings)]}.",
        "Caution: gears are machinery. Guard pinch points; strength figures are estimates for light duty; "
        "defer to local codes and a qualified engineer for anything that carries load.",
    ]
