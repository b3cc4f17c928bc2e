"""``gearcad worm``: the figures of a cylindrical worm and its wheel, efficiency, self-locking and a verdict."""

from __future__ import annotations

import argparse
import math

from ._format import fmt, print_json, table

__all__ = ["add_parser", "run", "worm_to_dict", "render"]

DESCRIPTION = """\
Figures and checks of a cylindrical worm (STARTS threads) driving a wheel of
WHEEL_TEETH teeth, shafts at 90 degrees.  Give the axial module and either the
diameter factor q (worm reference diameter / module) or the worm reference
diameter.  Geometry after DIN 3975 / ISO/TR 10828; basic rack 1 / 1.25 modules.

Flank forms: za (straight in the axial section, as turned on a lathe; the
pressure angle is the axial one; lead angles up to 15 degrees) and zi (involute
helicoid; the pressure angle is the normal one).

Friction comes from the material pair (steel worm on a bronze or brass wheel:
lubricated, falling with the sliding speed; plastics: dry ranges) or from
--friction.  Efficiency is quoted with the higher friction, self-locking is
judged with the lower one.  Self-locking is not a brake.

Exit 0: no check failed; 1: a check failed; 2: bad input.
Example (a 1:60 telescope drive):  gearcad worm 1 60 -m 1 --diameter-factor 12"""


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``worm``."""
    p = subparsers.add_parser("worm", help="figures and checks of a worm and wheel", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("starts", help="starts (threads) of the worm, z1 (1 to 12)")
    p.add_argument("wheel_teeth", help="teeth of the wheel, z2")
    p.add_argument("--module", "-m", required=True, type=float, metavar="MM",
                   help="axial module of the worm = transverse module of the wheel, mm")
    size = p.add_mutually_exclusive_group(required=True)
    size.add_argument("--diameter-factor", type=float, metavar="Q", help="diameter factor q = d1 / module (3 to 40)")
    size.add_argument("--worm-diameter", type=float, metavar="MM", help="worm reference diameter d1, mm")
    p.add_argument("--pressure-angle", type=float, default=20.0, metavar="DEG",
                   help="pressure angle, degrees (10 to 30; za: axial, zi: normal; default 20)")
    p.add_argument("--flank", choices=("za", "zi"), default="za", help="flank form (default za)")
    p.add_argument("--wheel-shift", type=float, default=0.0, metavar="X2",
                   help="profile shift coefficient of the wheel (-1 to 1, default 0)")
    p.add_argument("--worm-speed", type=float, default=0.0, metavar="RPM",
                   help="worm speed for the sliding speed and the friction, rpm (default 0: from rest)")
    p.add_argument("--worm-material", default="mild-steel", metavar="NAME", help="worm material (default mild-steel)")
    p.add_argument("--wheel-material", default="bronze", metavar="NAME", help="wheel material (default bronze)")
    p.add_argument("--friction", type=float, metavar="MU", help="friction coefficient, replacing the material table")
    p.add_argument("--out", metavar="DIR",
                   help="write the wheel's mid-plane section (DXF, SVG) into DIR, its teeth cut by the worm as a hob")
    p.add_argument("--solids", action="store_true",
                   help="with --out: also the worm as a solid (STEP and STL; takes a minute)")
    p.add_argument("--json", action="store_true", help="print one JSON object instead of the table")
    return p


def run(args: argparse.Namespace) -> int:
    """Run ``worm``."""
    from ..meshes.worm import analyse_worm_pair, make_worm_pair

    pair = make_worm_pair(args.starts, args.wheel_teeth, args.module, diameter_factor=args.diameter_factor,
                          worm_diameter=args.worm_diameter, pressure_angle=args.pressure_angle, flank=args.flank,
                          wheel_shift=args.wheel_shift)
    analysis = analyse_worm_pair(pair, worm_speed=args.worm_speed, worm_material=args.worm_material,
                                 wheel_material=args.wheel_material, friction=args.friction)
    if args.solids and not args.out:
        from ..errors import InputError

        raise InputError("--solids adds to the files of --out DIR; allowed: give --out DIR too")
    failed = analysis.worst == "failure"
    written = []
    if args.out and not failed:  # a failed check builds nothing
        from ..export.worm_files import write_worm_files
        from ..meshes.worm import thread_form

        written = write_worm_files(thread_form(pair), args.out, solids=args.solids)
    if args.json:
        data = worm_to_dict(analysis)
        data["files"] = [str(p) for p in written]
        print_json(data)
    else:
        print(render(analysis))
        for path in written:
            print(f"wrote {path}")
        if written:
            print("The wheel's mid-plane section: its teeth as the worm cuts them (simulated hob).")
    return 1 if failed else 0


def worm_to_dict(a) -> dict:
    """JSON form of a worm pair analysis (mm, degrees); the issue's keys are a contract (see README)."""
    from ._pairview import finding_to_dict

    p = a.pair
    return {
        "starts": p.starts, "module": p.module, "diameter_factor": p.diameter_factor, "flank": p.flank,
        "ratio": p.ratio, "pressure_angle": math.degrees(p.pressure_angle),
        "axial_pressure_angle": math.degrees(p.axial_pressure_angle),
        "normal_pressure_angle": math.degrees(p.normal_pressure_angle), "normal_module": p.normal_module,
        "centre_distance": p.centre_distance, "lead_angle": math.degrees(p.lead_angle), "lead": p.lead,
        "axial_pitch": p.axial_pitch, "contact_ratio": p.midplane_contact_ratio,
        "sliding_speed": a.sliding_speed, "worm_speed": a.worm_speed,
        "friction": {"low": a.friction.low, "high": a.friction.high, "source": a.friction.source},
        "friction_angle": math.degrees(a.friction_angle_low),
        "efficiency": a.efficiency, "efficiency_low_friction": a.efficiency_best,
        "wheel_driving_efficiency": a.wheel_driving_efficiency, "self_locking": a.self_locking,
        "worm": {"reference_diameter": p.reference_diameter, "tip_diameter": p.tip_diameter,
                 "root_diameter": p.root_diameter, "length": p.worm_length, "base_diameter": p.base_diameter},
        "wheel": {"teeth": p.wheel_teeth, "shift": p.wheel_shift, "reference_diameter": p.wheel_reference_diameter,
                  "throat_diameter": p.throat_diameter, "outside_diameter": p.outside_diameter,
                  "root_diameter": p.wheel_root_diameter, "face_width": p.wheel_face_width,
                  "throat_radius": p.throat_radius},
        "findings": [finding_to_dict(f) for f in a.findings], "verdict": a.worst,
    }


def render(a) -> str:
    """The readable table of ``worm``."""
    from ._pairview import MARK

    p = a.pair
    flank = {"za": "ZA (straight axial section)", "zi": "ZI (involute helicoid)"}[p.flank]
    head = (f"Worm {p.starts} start{'s' if p.starts > 1 else ''} : wheel {p.wheel_teeth} teeth   ratio "
            f"{p.ratio:g}:1   axial module {p.module:g} mm   {flank}")
    worm = [
        ("reference diameter d1", fmt(p.reference_diameter)),
        ("diameter factor q", f"{p.diameter_factor:.4f}"),
        ("tip diameter", fmt(p.tip_diameter)),
        ("root diameter", fmt(p.root_diameter)),
        ("threaded length, least", fmt(p.worm_length)),
        ("axial pitch", fmt(p.axial_pitch)),
        ("lead", fmt(p.lead)),
        ("lead angle", f"{math.degrees(p.lead_angle):.4f} deg"),
        ("pressure angle, axial / normal", f"{math.degrees(p.axial_pressure_angle):.4f} / "
                                           f"{math.degrees(p.normal_pressure_angle):.4f} deg"),
        ("normal module", fmt(p.normal_module)),
    ]
    if p.base_diameter is not None:
        worm.append(("base diameter (ZI)", fmt(p.base_diameter)))
    wheel = [
        ("teeth", str(p.wheel_teeth)),
        ("profile shift x2", f"{p.wheel_shift:+.4f}"),
        ("reference diameter", fmt(p.wheel_reference_diameter)),
        ("throat diameter (tip, mid-plane)", fmt(p.throat_diameter)),
        ("outside diameter", fmt(p.outside_diameter)),
        ("root diameter", fmt(p.wheel_root_diameter)),
        ("throat radius", fmt(p.throat_radius)),
        ("face width", fmt(p.wheel_face_width)),
    ]
    fr = a.friction
    mu = f"{fr.low:.3f}" if fr.low == fr.high else f"{fr.low:.3f} to {fr.high:.3f}"
    running = [
        ("centre distance", f"{fmt(p.centre_distance)} mm"),
        ("contact ratio, mid-plane", f"{p.midplane_contact_ratio:.4f}"),
        ("worm speed / sliding speed", f"{a.worm_speed:g} rpm / {a.sliding_speed:.4g} m/s" if a.worm_speed
         else "0 (judged from rest)"),
        ("friction coefficient", mu),
        ("efficiency, worm driving", f"{a.efficiency:.1%}" + (f" (to {a.efficiency_best:.1%})" if fr.low != fr.high else "")),
        ("efficiency, wheel driving", f"{a.wheel_driving_efficiency:.1%}" if not a.self_locking else "0 (self-locking)"),
    ]
    verdict = {"ok": "works", "warning": "works, with warnings", "failure": "does NOT work as it stands"}
    return "\n".join([
        head, "",
        table(worm, header=("worm (mm)", "")), "",
        table(wheel, header=("wheel (mm)", "")), "",
        table(running, header=("mesh", "")),
        f"  friction: {fr.source}", "",
        "checks",
        "\n".join(f"  [{MARK[f.severity]:>4}] {f.check}: {f.message}" for f in a.findings), "",
        f"verdict: the worm pair {verdict[a.worst]}.",
        "Caution: gears are machinery. Guard pinch points; efficiency and friction are estimates that vary with "
        "finish, lubrication and running-in; self-locking is not a brake; defer to local codes and a qualified "
        "engineer for anything that carries load.",
    ])
