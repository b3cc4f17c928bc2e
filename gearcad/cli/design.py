"""``gearcad design``: solve a ratio, take the best train, build every file of it."""

from __future__ import annotations

import argparse

from ._solver import add_solver_options, exclusions
from .build import add_output_options, build_and_write

__all__ = ["add_parser", "run"]

DESCRIPTION = """\
Solve TARGET with the ratio solver (same options as `gearcad ratio`), take the best
train, give undercut pinions the least profile shift that avoids undercut (balanced by
the mate where it can take it), then build it as `gearcad build` does.  The train file
it built is written as train.toml beside the other files: edit it and rebuild.

Only a train within --tolerance is built (default 1e-3 relative); otherwise nothing is
written, the best train found and what would reach the target are named, and the exit
code is 1.  Exit codes: 0 built and every check passed; 1 no train within tolerance, or
a failed check; 2 bad input.

Ratio = output turns per input turn = the product over stages of driver teeth / driven teeth.
Inventory syntax (--inventory): as for `gearcad ratio` (see its --help), e.g. 20x2,25-60/5,127."""


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``design``."""
    p = subparsers.add_parser("design", help="solve a ratio and build the best train", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("target", help="wanted ratio: output turns per input turn (decimal, fraction or expression)")
    add_solver_options(p)
    from ._solver import add_planetary_options

    add_planetary_options(p)
    from ._summing import add_summing_options

    add_summing_options(p)
    from ..ratio.tolerance import DESIGN_TOLERANCE

    p.add_argument("--tolerance", type=float, metavar="REL",
                   help=f"largest |relative error| of the ratio accepted (default {DESIGN_TOLERANCE:g}, 0.1 %%); "
                        "when no train is within it nothing is built, the best found and what would reach the "
                        "target are named, exit 1")
    p.add_argument("--count", type=int, metavar="K",
                   help="planetary and summing: how many of the best sets are tried, best first, for one whose "
                        "meshes pass every check (default 10; summing 20, 100 with --inventory)")
    p.add_argument("--module", "-m", type=float, required=True, metavar="MM", help="module of every stage, mm")
    p.add_argument("--thickness", type=float, default=3.0, metavar="MM", help="face width of every gear, mm (default 3)")
    p.add_argument("--profile", default="laser-3mm-acrylic", metavar="NAME",
                   help="fabrication profile (default laser-3mm-acrylic; see gearcad profiles)")
    p.add_argument("--system", default="iso53-a", metavar="NAME", help="tooth system (default iso53-a)")
    p.add_argument("--bore", type=float, default=3.0, metavar="MM", help="shaft diameter, mm (default 3)")
    p.add_argument("--name", default="design", help="train name: output folder and file prefix (default design)")
    p.add_argument("--helix", type=float, metavar="DEG",
                   help="helical gears: helix angle of every stage, degrees (0 to below 45); --module is then the normal module")
    p.add_argument("--hand", choices=("left", "right"), default="right", help="hand of the input gear (default right)")
    p.add_argument("--herringbone", action="store_true", help="herringbone stages (needs --helix)")
    p.add_argument("--worm", metavar="STARTS[:ZMIN-ZMAX]",
                   help="a worm stage as `gearcad ratio --worm` finds it (a worm of STARTS starts, diameter factor 10 "
                        "and ZA flanks unless --worm-* say otherwise, driving a wheel of ZMIN to ZMAX teeth; --module is its axial module); the train file puts "
                        "it first: the worm is the input, across the plates; --stages counts it")
    p.add_argument("--worm-flank", choices=("za", "zi", "zn", "zk"), default="za",
                   help="with --worm: the worm's flank form (default za: straight in the axial section; zi involute "
                        "helicoid, zn straight in the normal section, zk cut by a biconical disc)")
    p.add_argument("--worm-diameter-factor", type=float, metavar="Q",
                   help="with --worm: the worm's diameter factor q = d1 / module (3 to 40; default 10)")
    p.add_argument("--worm-tool-diameter", type=float, metavar="MM",
                   help="with --worm-flank zk: diameter of the biconical disc that cuts the worm, mm")
    add_output_options(p)
    return p


def run(args: argparse.Namespace) -> int:
    """Run ``design``: the library chooses the train (gearcad.trains.choose.design), this builds and prints."""
    import sys

    from ..errors import InputError, ToleranceError
    from ..ratio.inventory import read_inventory
    from ..trains.trainfile import train_to_toml
    from ..trains.design import design

    if args.kind != "summing" and (args.differential or args.separate_axes):
        raise InputError("--differential and --separate-axes apply only to --kind summing")
    if args.kind == "summing" and args.separate_axes:
        raise InputError("--separate-axes cannot be built: gearcad design needs both paths on one axle")
    inventory = read_inventory(args.inventory) if args.inventory is not None else None
    try:
        chosen = design(args.target, kind=args.kind, module=args.module, tolerance=args.tolerance,
                        thickness=args.thickness, profile=args.profile, system=args.system, bore=args.bore,
                        name=args.name, stages=args.stages, min_teeth=args.min_teeth, max_teeth=args.max_teeth,
                        max_stage_ratio=args.max_stage_ratio, hunting=args.hunting, exclude=exclusions(args.exclude),
                        inventory=inventory, coaxial=args.coaxial, shift_limit=args.shift_limit,
                        direction=args.direction, planets=args.planets, fixed=args.fixed, input=args.input_member,
                        stepped=args.stepped, max_ring_teeth=args.max_ring_teeth,
                        neighbour_margin=args.neighbour_margin, differential=args.differential, candidates=args.count,
                        helix=args.helix, hand=args.hand, herringbone=args.herringbone, worm=args.worm,
                        worm_flank=args.worm_flank, worm_diameter_factor=args.worm_diameter_factor,
                        worm_tool_diameter=args.worm_tool_diameter)
    except ToleranceError as exc:  # a result outside what was asked: exit 1, nothing built
        if args.json:
            from ._format import print_json

            print_json({"built": False, "best_relative_error": exc.best_error, "message": str(exc)})
        else:
            print(f"gearcad design: {exc}", file=sys.stderr)
        return 1
    spec = chosen.spec
    return build_and_write(spec, args, (("train.toml", train_to_toml(spec)),))
