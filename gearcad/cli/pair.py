"""``gearcad pair``: every standard figure of a meshing pair and a verdict."""

from __future__ import annotations

import argparse
import dataclasses
import math

from ._format import fmt, print_json, table
from ._load import add_load_options, load_from_args

__all__ = ["add_parser", "run", "analysis_to_dict", "internal_to_dict", "render_internal"]

DESCRIPTION = """\
Figures and checks of two spur gears in mesh.  Give the tooth counts and the
module; optionally the profile shifts, or a centre distance that the shifts
must reach.  Exit 0: no check failed; 1: a check failed; 2: bad input.
Defaults: 20 degrees, ISO 53 profile A, tips shortened to keep the bottom clearance.

Internal pair (a pinion inside a ring gear): give the ring's teeth negative, as
ISO 21771 does, e.g.  gearcad pair 16 -24 -m 3 --shift 0 -0.516
Shifts keep ISO 21771's sign (positive towards the tooth tips, for the ring
towards its axis).  The ring is cut by a pinion-type cutter (--cutter-teeth).

Helical pair: add --helix DEG (and --hand, --herringbone); the module, pressure
angle and shifts are then the normal section's, e.g.  gearcad pair 12 60 -m 3 --helix 30"""


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``pair``."""
    p = subparsers.add_parser("pair", help="figures and checks of a meshing pair", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("z1", help="teeth of gear 1 (the pinion, usually)")
    p.add_argument("z2", help="teeth of gear 2; negative for a ring gear (internal pair, ISO 21771 sign)")
    p.add_argument("--module", "-m", required=True, type=float, metavar="MM", help="module, mm")
    p.add_argument("--pressure-angle", type=float, metavar="DEG",
                   help="pressure angle, degrees (10 to 35; default: the tooth system's)")
    p.add_argument("--system", default="iso53-a", metavar="NAME", help="tooth system (gearcad profiles; default iso53-a)")
    group = p.add_mutually_exclusive_group()
    group.add_argument("--shift", nargs=2, type=float, metavar=("X1", "X2"), help="profile shift coefficients")
    group.add_argument("--centre", type=float, metavar="MM",
                       help="required centre distance, mm: the shift sum is found and shared between the gears")
    p.add_argument("--backlash", type=float, default=0.0, metavar="MM",
                   help="circumferential backlash by tooth thinning, mm on the working pitch circle (default 0)")
    p.add_argument("--centre-allowance", type=float, default=0.0, metavar="MM",
                   help="set the shafts this much further apart than the zero-backlash distance, mm (default 0)")
    p.add_argument("--full-tips", action="store_true", help="keep full tips (no tip shortening)")
    p.add_argument("--cutter-teeth", type=int, metavar="Z0",
                   help="internal pair: teeth of the ring's pinion-type cutter (default: nearest 20 that cuts cleanly)")
    p.add_argument("--cutter-shift", type=float, default=0.0, metavar="X0",
                   help="internal pair: profile shift of the ring's cutter (default 0)")
    p.add_argument("--json", action="store_true", help="print one JSON object instead of the table")
    add_load_options(p)
    p.add_argument("--face-width", type=float, metavar="MM", help="face width for the load rating, mm (default 10 modules, common practice)")
    p.add_argument("--material", default="acetal", metavar="NAME",
                   help="material of both gears for the load rating (default acetal; see profiles/materials)")
    p.add_argument("--mate-material", metavar="NAME", help="material of gear 2, if it differs")
    p.add_argument("--made-by", choices=("laser", "fdm", "cnc"), default="cnc",
                   help="how the teeth are made, for the velocity factor (default cnc)")
    from ._helical import add_helix_options

    add_helix_options(p)
    return p


def _system(name: str, pressure_angle: float | None):
    from ..errors import InputError, ProfileError
    from ..geometry.gear import PRESSURE_ANGLE_RANGE
    from ..profiles import load_tooth_system
    from ..validate import in_range

    system = load_tooth_system(name)
    if pressure_angle is None:
        return system
    angle = in_range(pressure_angle, "pressure angle", *PRESSURE_ANGLE_RANGE, unit="degrees")
    try:
        return dataclasses.replace(system, pressure_angle=math.radians(angle))
    except ProfileError:
        from ..profiles import tooth_system_names

        fits = [n for n in tooth_system_names() if abs(math.degrees(load_tooth_system(n).pressure_angle) - angle) < 1e-9]
        hint = f"use --system {fits[0]}" if fits else "pick a system made for that angle (gearcad profiles)"
        raise InputError(
            f"pressure angle {pressure_angle:g} degrees does not fit tooth system {name}: its cutter tip round "
            f"({system.fillet_radius:g} m) leaves no room in the tooth space; {hint}") from None


def run(args: argparse.Namespace) -> int:
    """Run ``pair``."""
    from ..checks import analyse_pair
    from ..pair import make_pair
    from ..validate import as_int

    system = _system(args.system, args.pressure_angle)
    z1, z2 = as_int(args.z1, "tooth count z1"), as_int(args.z2, "tooth count z2")
    if z1 < 0:
        from ..errors import InputError

        raise InputError(f"tooth count z1 must be positive (only gear 2 may be a ring, given negative), got {z1}")
    from ._helical import run_helical, wants_helix

    if wants_helix(args):
        return run_helical(args, system, z1, z2, _show)
    if z2 < 0:
        return _run_internal(args, system, z1, -z2)
    if args.cutter_teeth is not None or args.cutter_shift:
        from ..errors import InputError

        raise InputError("--cutter-teeth and --cutter-shift apply to a ring gear only (give z2 negative)")
    pair = make_pair(z1, z2, args.module, system, shifts=tuple(args.shift) if args.shift else None, centre=args.centre,
                     backlash=args.backlash, centre_allowance=args.centre_allowance, shorten_tips=not args.full_tips)
    return _show(args, pair, analyse_pair(pair), analysis_to_dict, render)


def _run_internal(args: argparse.Namespace, system, z1: int, z2: int) -> int:
    """``pair`` for a pinion of ``z1`` teeth inside a ring of ``z2`` teeth."""
    from ..errors import InputError
    from ..internal import analyse_internal_pair, make_internal_pair

    if args.centre is not None:
        raise InputError("--centre is not available for an internal pair; give the shifts with --shift X1 X2")
    pair = make_internal_pair(z1, z2, args.module, system, shifts=tuple(args.shift) if args.shift else None,
                              backlash=args.backlash, centre_allowance=args.centre_allowance,
                              shorten_tips=not args.full_tips, cutter_teeth=args.cutter_teeth, cutter_shift=args.cutter_shift)
    return _show(args, pair, analyse_internal_pair(pair), internal_to_dict, render_internal)


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
        *(_rating_lines(rating) if rating else []),
        *_closing(list(a.findings) + (list(rating.findings()) if rating else [])),
    ])


def _worst(findings) -> str:
    order = ("ok", "warning", "failure")
    return max((f.severity for f in findings), key=order.index, default="ok")


def _show(args: argparse.Namespace, pair, analysis, to_dict, render_table) -> int:
    """Rate ``pair`` if a load was given, print its JSON or its table; exit 1 when a check fails."""
    rating = _rating(args, pair)
    findings = list(analysis.findings) + (list(rating.findings()) if rating else [])
    if args.json:
        data = to_dict(analysis)
        if rating:
            from ..report import rating_data

            data["rating"] = rating_data(rating)
            if hasattr(rating, "helical_data"):
                data["rating"].update(rating.helical_data())
            data["findings"] = [finding_to_dict(f) for f in findings]
            data["verdict"] = _worst(findings)
        print_json(data)
    else:
        print(render_table(analysis, rating))
    return 1 if _worst(findings) == "failure" else 0


def _rating(args: argparse.Namespace, pair):
    load = load_from_args(args)
    if load is None:
        return None
    from ..materials import load_material
    from ..strength import PROCESS_CLASS, rate_internal_pair, rate_pair
    from ..validate import positive

    width = positive(args.face_width, "face width", "mm") if args.face_width is not None else 10 * getattr(getattr(pair, "gear1", None), "normal_module", pair.module)
    first = load_material(args.material)
    second = load_material(args.mate_material) if args.mate_material else first
    rate = rate_internal_pair if hasattr(pair, "ring") else rate_pair
    if hasattr(getattr(pair, "gear1", None), "hand"):  # a helical pair
        from ..meshes.helical_rating import rate_helical_pair

        return rate_helical_pair(pair, load.torque, load.speed, width, first, second, PROCESS_CLASS[args.made_by],
                                 herringbone=args.herringbone, gap_mm=args.gap)
    return rate(pair, load.torque, load.speed, width, first, second, PROCESS_CLASS[args.made_by])


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


def _rating_lines(r) -> list[str]:
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
        *(_rating_lines(rating) if rating else []),
        *_closing(findings),
    ])


def _closing(findings) -> list[str]:
    """The checks, the verdict and the caution: the end of every pair table."""
    verdict = {"ok": "meshes well", "warning": "meshes, with warnings", "failure": "does NOT work as it stands"}
    return [
        "checks",
        "\n".join(f"  [{MARK[f.severity]:>4}] {f.check}: {f.message}" for f in findings), "",
        f"verdict: the pair {verdict[_worst(findings)]}.",
        "Caution: gears are machinery. Guard pinch points; strength figures are estimates for light duty; "
        "defer to local codes and a qualified engineer for anything that carries load.",
    ]
