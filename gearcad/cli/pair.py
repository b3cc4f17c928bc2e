"""``gearcad pair``: every standard figure of a meshing pair and a verdict."""

from __future__ import annotations

import argparse
import dataclasses
import math

from ._format import print_json
from ._load import add_load_options, load_from_args
from ._pairview import (analysis_to_dict, finding_to_dict, internal_to_dict,
                        render, render_internal, worst_status)

__all__ = ["add_parser", "run"]

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
    from ..meshes.checks import analyse_pair
    from ..meshes.pair import make_pair
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
    from ..meshes.internal import analyse_internal_pair, make_internal_pair

    if args.centre is not None:
        raise InputError("--centre is not available for an internal pair; give the shifts with --shift X1 X2")
    pair = make_internal_pair(z1, z2, args.module, system, shifts=tuple(args.shift) if args.shift else None,
                              backlash=args.backlash, centre_allowance=args.centre_allowance,
                              shorten_tips=not args.full_tips, cutter_teeth=args.cutter_teeth, cutter_shift=args.cutter_shift)
    return _show(args, pair, analyse_internal_pair(pair), internal_to_dict, render_internal)


def _show(args: argparse.Namespace, pair, analysis, to_dict, render_table) -> int:
    """Rate ``pair`` if a load was given, print its JSON or its table; exit 1 when a check fails."""
    rating = _rating(args, pair)
    findings = list(analysis.findings) + (list(rating.findings()) if rating else [])
    if args.json:
        data = to_dict(analysis)
        if rating:
            from ..export.report import rating_data

            data["rating"] = rating_data(rating)
            if hasattr(rating, "helical_data"):
                data["rating"].update(rating.helical_data())
            data["findings"] = [finding_to_dict(f) for f in findings]
            data["verdict"] = worst_status(findings)
        print_json(data)
    else:
        print(render_table(analysis, rating))
    return 1 if worst_status(findings) == "failure" else 0


def _rating(args: argparse.Namespace, pair):
    load = load_from_args(args)
    if load is None:
        return None
    from ..materials import load_material
    from ..meshes.strength import PROCESS_CLASS, rate_internal_pair, rate_pair
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


