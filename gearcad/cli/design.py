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

Ratio = output turns per input turn = the product over stages of driver teeth / driven teeth.
Inventory syntax (--inventory): as for `gearcad ratio` (see its --help), e.g. 20x2,25-60/5,127."""


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``design``."""
    p = subparsers.add_parser("design", help="solve a ratio and build the best train", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("target", help="wanted ratio: output turns per input turn (decimal, fraction or expression)")
    add_solver_options(p)
    from .ratio import _add_planetary_options

    _add_planetary_options(p)
    from ._summing import add_summing_options

    add_summing_options(p)
    p.add_argument("--tolerance", type=float, metavar="REL", help=argparse.SUPPRESS)
    p.add_argument("--count", type=int, metavar="K", help=argparse.SUPPRESS)
    p.add_argument("--module", "-m", type=float, required=True, metavar="MM", help="module of every stage, mm")
    p.add_argument("--thickness", type=float, default=3.0, metavar="MM", help="face width of every gear, mm (default 3)")
    p.add_argument("--profile", default="laser-3mm-acrylic", metavar="NAME",
                   help="fabrication profile (default laser-3mm-acrylic; see gearcad profiles)")
    p.add_argument("--system", default="iso53-a", metavar="NAME", help="tooth system (default iso53-a)")
    p.add_argument("--bore", type=float, default=3.0, metavar="MM", help="shaft diameter, mm (default 3)")
    p.add_argument("--name", default="design", help="train name: output folder and file prefix (default design)")
    add_output_options(p)
    return p


def run(args: argparse.Namespace) -> int:
    """Run ``design``."""
    from ..design import solve, spec_with_stages
    from ..profiles import load_fabrication, load_tooth_system
    from ..ratio.inventory import read_inventory
    from ..trainfile import train_to_toml
    from ..trainspec import SolverSpec, TrainSpec

    load_tooth_system(args.system)  # unknown names fail before the search
    load_fabrication(args.profile)
    if args.kind != "summing" and (args.differential or args.separate_axes):
        from ..errors import InputError

        raise InputError("--differential and --separate-axes apply only to --kind summing")
    if args.kind == "summing" and args.separate_axes:
        from ..errors import InputError

        raise InputError("--separate-axes cannot be built: gearcad design needs both paths on one axle")
    if args.kind == "planetary":
        return _design_planetary(args)
    if args.kind == "summing":
        return _design_summing(args)
    if args.shift_limit is not None and not args.coaxial:
        from ..errors import InputError

        raise InputError("--shift-limit works only with --coaxial")
    solver = SolverSpec(ratio=args.target, stages=args.stages, min_teeth=args.min_teeth, max_teeth=args.max_teeth,
                        max_stage_ratio=args.max_stage_ratio, direction=args.direction, hunting=args.hunting,
                        coaxial=args.coaxial, exclude=tuple(exclusions(args.exclude)))
    inventory = read_inventory(args.inventory) if args.inventory is not None else None
    train = solve(solver, inventory=inventory, shift_limit=args.shift_limit)
    base = TrainSpec(name=args.name, module=args.module, thickness=args.thickness, stages=(), target=args.target,
                     tooth_system=args.system, fabrication=args.profile, bore=args.bore, solver=solver,
                     title=f"Train for {args.target}")
    spec = spec_with_stages(base, train)
    return build_and_write(spec, args, (("train.toml", train_to_toml(spec)),))


def _design_planetary(args: argparse.Namespace) -> int:
    """Solve for the best planetary set, then build it."""
    from ..planetary import solve_planetary
    from ..ratio.target import parse_target
    from ..trainfile import train_to_toml
    from ._solver import planetary_query_from_args

    if args.stages is not None or args.coaxial or args.inventory is not None:
        from ..errors import InputError

        raise InputError("--stages, --coaxial and --inventory do not apply to --kind planetary")
    if args.count is None:
        args.count = 10  # candidates, best first: the first whose meshes pass every check is built
    results = solve_planetary(planetary_query_from_args(args, parse_target(args.target)))
    if not results:
        from ..errors import InputError

        raise InputError(f"no planetary set reaches {args.target!r} within the limits and the three conditions")
    from ..errors import GearcadError
    from ..plan import plan_train

    chosen = None
    for result in results:  # best ratio first; the same set scaled up keeps its ratio and its conditions
        for scale in range(1, 5):
            candidate = _planetary_spec(args, result, scale)
            if max(candidate.planetary.ring, candidate.planetary.sun) > (args.max_ring_teeth or 200):
                break
            try:
                plan = plan_train(candidate)
            except GearcadError:
                continue
            if all(f.severity != "failure" for m in plan.meshes for f in m.analysis.findings):
                chosen = candidate
                break
        if chosen:
            break
    spec = chosen or _planetary_spec(args, results[0])
    return build_and_write(spec, args, (("train.toml", train_to_toml(spec)),))


def _planetary_spec(args: argparse.Namespace, result, scale: int = 1):
    """The train of a solved set, its tooth counts multiplied by ``scale`` (same ratio, same conditions)."""
    from ..trainspec import PlanetarySpec, TrainSpec

    s, a = result.set, result.arrangement
    ring_side = s.planet_ring * scale if s.planet_ring else None
    return TrainSpec(name=args.name, module=args.module, thickness=args.thickness, stages=(), target=args.target,
                     tooth_system=args.system, fabrication=args.profile, bore=args.bore,
                     title=f"Planetary set for {args.target}",
                     planetary=PlanetarySpec(s.sun * scale, s.planet * scale, s.ring * scale, s.planets, ring_side,
                                             a.fixed, a.input, args.shift_limit))



def _design_summing(args: argparse.Namespace) -> int:
    """Solve for the best summing train whose paths reach one axle, choose its idlers, then build it."""
    import math


    from ..design import planetary_differential, summing_train_spec
    from ..profiles import load_fabrication, load_tooth_system
    from ..differential import axle_room
    from ..errors import GearcadError, InputError
    from ..plan import plan_train
    from ..ratio.target import parse_target
    from ..summing import solve_summing
    from ..trainfile import train_to_toml
    from ..trainspec import SummingSpec
    from ._summing import on_the_shelf
    from ._solver import limits_from_args

    if args.stages is not None or args.coaxial or args.stepped or args.fixed or args.input_member:
        raise InputError("--stages, --coaxial, --stepped, --fixed and --input do not apply to --kind summing")
    kind = args.differential or "mean"
    planets = args.planets if args.planets is not None else 3
    if not 1 <= planets <= 24:
        raise InputError(f"--planets must be from 1 to 24, got {planets!r}")
    system, fab = load_tooth_system(args.system), load_fabrication(args.profile)
    target = parse_target(args.target)
    limits = limits_from_args(args)
    room = axle_room(SummingSpec("mean", planets=planets), args.module, args.bore, args.system, args.profile) \
        if kind == "mean" else 0.0
    min_axis = math.ceil(2 * room / args.module - 1e-9)
    candidates = solve_summing(target, sorted(limits.teeth), kind, 20 if not args.inventory else 100,
                               float(limits.max_stage_ratio), args.max_ring_teeth or 200, planets,
                               args.neighbour_margin or 0.5, one_axis=True, min_axis=min_axis)
    if limits.inventory:
        candidates = [t for t in candidates if on_the_shelf(t, limits.inventory)]
    if not candidates:
        raise InputError(f"no summing train reaches {args.target!r} with both paths on one axle within the limits")
    base = dict(name=args.name, module=args.module, thickness=args.thickness, target=args.target,
                tooth_system=args.system, fabrication=args.profile, bore=args.bore, title=f"Summing train for {args.target}")
    chosen, first_spec, problem = None, None, None
    for train in candidates:  # best first: the first whose every check passes is built
        if kind == "mean":
            differential = SummingSpec("mean", planets=planets)
        else:  # a set whose own meshes fail is passed over before its paths are laid out
            differential = planetary_differential(train, args.module, system, fab.backlash, max(limits.teeth),
                                                  args.shift_limit)
            if differential is None:
                continue
        idlers = _shelf_idlers(train, limits.inventory) if limits.inventory else None
        try:
            spec = summing_train_spec(train, differential, idlers=idlers, **base)
            plan = plan_train(spec)
        except GearcadError as exc:
            problem = problem or exc
            continue
        first_spec = first_spec or spec
        if all(f.severity != "failure" for m in plan.meshes for f in m.analysis.findings) and \
                all(f.severity != "failure" for f in plan.findings):
            chosen = spec
            break
    spec = chosen or first_spec
    if spec is None:
        raise InputError(f"none of the {len(candidates)} best summing trains for {args.target!r} can be built: {problem}")
    return build_and_write(spec, args, (("train.toml", train_to_toml(spec)),))


def _shelf_idlers(train, inventory) -> tuple[int, ...]:
    """Idler tooth counts the shelf still holds once the paths have their gears (two of a count for two idlers)."""
    from collections import Counter

    used = Counter([*train.path_a, *train.path_b])
    need = 1 + (train.sign_a > 0 and train.sign_b > 0)
    return tuple(z for z in inventory.teeth if inventory.quantity(z) - used[z] >= need)
