"""``gearcad ratio``: the best tooth counts for a ratio, and proof that nothing beats them."""

from __future__ import annotations

import argparse
import sys
import time
from typing import Any, Sequence

from ._format import print_json, table
from ._solver import add_planetary_options, add_solver_options, limits_from_args, planetary_query_from_args, stage_counts_from_args

__all__ = ["add_parser", "run"]

CONVENTION = ("Ratio = output turns per input turn = the product over stages of driver teeth / driven teeth. "
              "Each external mesh reverses the direction of rotation; an idler adds a mesh and changes no ratio.")

DESCRIPTION = """\
Find the tooth counts of a compound gear train that reaches TARGET as closely as
the limits allow.  The search is exact: for each stage count the first train is
the best there is within the limits (least |relative error|).  --count K
lists K distinct trains per stage count, different trains of one ratio
included; trains of equal error are ranked meshes first that pass the pair
checks without a warning (no thin tips, no undercut left after the least
shift; judged at module 1 with the shifts, tooth system and backlash that
gearcad design uses by default), then fewer teeth.

Ratio = output turns per input turn = the product over stages of driver
teeth / driven teeth.  Each external mesh reverses the direction of rotation;
an idler adds a mesh and changes no ratio.

TARGET is a decimal (29.530588853), a fraction (127/20) or an expression
(2*pi, 25.4/(8*pi), sqrt(2), 366.2422/365.2422); it is read exactly, never
evaluated as Python.

Inventory syntax (--inventory): entries separated by commas or lines, '#'
comments; Z (one gear), ZxN (N gears), A-B (every count from A to B), A-B/S
(every S-th count); e.g. 20x2,25-60/5,127.  A name of an existing file is read
as a file.

Planetary sets (--kind planetary): a sun, N equal planets (simple, or with
--stepped two gears on each planet shaft: the first meshes the sun, the second
the ring) and a ring, one of sun, ring and carrier fixed (--fixed), one of the
others the input (--input), the third the output.  The search is exact over
sun and planet teeth in --min-teeth..--max-teeth and the ring up to
--max-ring-teeth; every set shown meets the coaxial condition (one module;
with --shift-limit X profile shift within +-X may equalise the centre
distances), the assembly condition (planets equally spaced) and the neighbour
condition (adjacent planet tips clear by --neighbour-margin modules).  Its
ratio comes from the kinematic model (Willis' equation on each mesh); a
negative ratio is reported as output direction "opposite".  --max-stage-ratio
does not apply to planetary sets; --hunting asks every mesh to hunt.

Exit codes: 0 found; 1 nothing within --tolerance (or no train at all);
2 bad input."""


def add_parser(subparsers: Any) -> argparse.ArgumentParser:
    """Register ``gearcad ratio``."""

    parser = subparsers.add_parser("ratio", help="best tooth counts of a gear train for a ratio",
                                   description=DESCRIPTION, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("target", help="wanted ratio: output turns per input turn")
    parser.add_argument("--tolerance", type=float, metavar="REL",
                        help="list every train with |relative error| <= REL (up to --count); exit 1 if none")
    parser.add_argument("--count", type=int, metavar="K",
                        help="distinct trains listed per stage count, trains of one ratio included (default 5; 1 when "
                             "--stages is left out)")
    add_solver_options(parser)
    parser.add_argument("--fractions", action="store_true",
                        help="list the continued-fraction convergents and semiconvergents of the target and mark "
                             "those that a train of at most N stages realises exactly")
    add_planetary_options(parser, any_kind=True)
    from ._summing import add_summing_options

    add_summing_options(parser)
    from ._worm import add_worm_option

    add_worm_option(parser)
    parser.add_argument("--json", action="store_true", help="print JSON on stdout instead of a table")
    return parser


from ._solver import DEFAULT_MAX_RING_TEETH, DEFAULT_PLANETS, MAX_PLANETS, MEMBERS, NEIGHBOUR_MARGIN  # noqa: E402,F401


_PLANETARY_ONLY = (("planets", "--planets"), ("fixed", "--fixed"), ("input_member", "--input"),
                   ("stepped", "--stepped"), ("max_ring_teeth", "--max-ring-teeth"),
                   ("neighbour_margin", "--neighbour-margin"))
_COMPOUND_ONLY = (("stages", "--stages"), ("coaxial", "--coaxial"), ("inventory", "--inventory"),
                  ("fractions", "--fractions"))


def _refuse(args: argparse.Namespace, options: Sequence[tuple[str, str]], kind: str) -> None:
    from ..errors import InputError

    for attr, flag in options:
        if getattr(args, attr, None) not in (None, False):
            other = {"compound": "--kind planetary", "any": "one --kind of train"}.get(kind, "--kind compound")
            raise InputError(f"{flag} does not apply to --kind {kind}; allowed: {other} for it")


class _LazyProgress:
    """A rich progress bar on stderr that appears only after about a second."""

    def __init__(self, enabled: bool, delay: float = 1.0) -> None:
        self.enabled, self.delay = enabled, delay
        self.start = time.monotonic()
        self.bar: Any = None
        self.task: Any = None

    def __call__(self, fraction: float) -> None:
        if not self.enabled or time.monotonic() - self.start < self.delay:
            return
        if self.bar is None:
            from rich.console import Console
            from rich.progress import Progress

            self.bar = Progress(console=Console(stderr=True), transient=True)
            self.bar.start()
            self.task = self.bar.add_task("searching", total=1.0)
        self.bar.update(self.task, completed=min(1.0, max(0.0, fraction)))

    def close(self) -> None:
        if self.bar is not None:
            self.bar.stop()


def _query(args: argparse.Namespace, target: Any, limits: Any, counts: tuple[int, ...]) -> Any:
    from ..ratio.solve import RatioQuery, count_value

    default_count = 5 if args.stages is not None or args.tolerance is not None else 1
    count = count_value(args.count if args.count is not None else default_count)
    return RatioQuery(target, counts, limits, count, args.coaxial, args.shift_limit)


def _train_json(train: Any, tolerance: float | None = None, clean: Any = None) -> dict[str, Any]:
    within = tolerance is None or abs(train.relative_error) <= tolerance
    out: dict[str, Any] = {"numerator": train.numerator, "denominator": train.denominator, "ratio": train.ratio,
           "relative_error": train.relative_error, "direction": train.direction,
           "stages": [{"driver": d, "driven": n} for d, n in train.stages], "idler": train.idler,
           "total_teeth": train.total_teeth, "within_tolerance": within}
    if train.shifts is not None:
        out["shifts"] = [{"driver": a, "driven": b} for a, b in train.shifts]
    if clean is not None:
        out["meshes_clean"] = clean(train)
    return out


def _stages_text(train: Any) -> str:
    text = "  ".join(f"{d}/{n}" for d, n in train.stages)
    if train.shifts is not None and any(x for pair in train.shifts for x in pair):
        text += "  shifts " + " ".join(f"{a:+.3f}/{b:+.3f}" for a, b in train.shifts)
    return text


def _rows(trains: Sequence[Any], clean: Any = None) -> list[list[str]]:
    return [[str(i), str(len(t.stages)), _stages_text(t), f"{t.numerator}/{t.denominator}", f"{t.ratio:.15g}",
             f"{t.relative_error * 1e6:+.6f}", f"{t.relative_error:+.3e}", t.direction,
             str(t.idler) if t.idler is not None else "-", str(t.total_teeth)]
            + ([("clean" if clean(t) else "warning")] if clean is not None else [])
            for i, t in enumerate(trains, 1)]


_HEADER = ["#", "stages", "driver/driven per stage", "exact ratio", "decimal", "error ppm", "rel. error",
           "output", "idler", "teeth"]
#: The column of the mesh judgement (see gearcad.ratio.clean).
_MESHES = "meshes"



def _heading(target: Any, limits: Any) -> str:
    return (f"target {target.expression} = {target.digits(20)}\n"
            f"limits: {limits.describe()}\n"
            f"ratio = output turns per input turn = product of driver/driven teeth")


def _print_fractions(args: argparse.Namespace, target: Any, limits: Any) -> int:
    from ..ratio.solve import approximations_with_trains

    depth = args.stages or 3
    listing = approximations_with_trains(target, limits, depth)
    if args.json:
        print_json({"target": {"expression": target.expression, "value": target.value},
                    "approximations": [{"numerator": a.numerator, "denominator": a.denominator, "kind": a.kind,
                                        "relative_error": a.relative_error,
                                        "train": _train_json(t) if t else None} for a, t in listing]})
        return 0
    rows = [[a.kind, f"{a.numerator}/{a.denominator}", f"{a.numerator / a.denominator:.15g}",
             f"{a.relative_error:+.3e}", ("* " + _stages_text(t)) if t else "-"] for a, t in listing]
    print(_heading(target, limits))
    print(f"best rational approximations; * = realised exactly by a train of at most {depth} stages")
    print(table(rows, ["kind", "fraction", "decimal", "rel. error", "train"]))
    return 0


def _report_miss(args: argparse.Namespace, query: Any, trains: Sequence[Any], reach: Any, other: str = "") -> int:
    from ..ratio.solve import binding_limits

    binding = binding_limits(query, args.tolerance) if trains else []
    if args.json:
        print_json({"target": {"expression": query.target.expression, "value": query.target.value}, "results": [],
                    "tolerance": args.tolerance, "reach": reach.as_json(),
                    "best": _train_json(trains[0], args.tolerance) if trains else None, "binding": binding,
                    **({"other_kinds": other} if other else {})})
        return 1
    print(_heading(query.target, query.limits))
    if not trains:
        print("no train satisfies the limits (not enough gears, or no stage obeys the stage-ratio limit and hunting)")
        return 1
    print(f"no train within tolerance {args.tolerance:g}; the best found:")
    print(table(_rows(trains[:1]), _HEADER))
    if binding:
        print("binding: relaxing any one of " + ", ".join(binding) + " would meet the tolerance")
    else:
        print("binding: the limits together; no single relaxation of the stage ratio, hunting, exclusions, "
              "tooth range or stage count meets the tolerance")
    if other:
        print(other)
    return 1


def run(args: argparse.Namespace) -> int:
    """Run ``gearcad ratio``; returns the exit code."""
    from ..ratio.target import parse_target
    from ..ratio.tolerance import tolerance_value

    if args.kind == "any":
        from ._kinds import ANY_REFUSED, run_any

        _refuse(args, ANY_REFUSED, "any")
        return run_any(args, _train_json, _planetary_json)
    if args.kind == "planetary":
        _refuse(args, _COMPOUND_ONLY + (("differential", "--differential"), ("separate_axes", "--separate-axes")), "planetary")
        return _run_planetary(args)
    if args.kind == "summing":
        from ._summing import run_summing

        _refuse(args, (("stages", "--stages"), ("coaxial", "--coaxial"), ("fractions", "--fractions"),
                       ("fixed", "--fixed"), ("input_member", "--input"), ("stepped", "--stepped")), "summing")
        return run_summing(args, limits_from_args(args))
    _refuse(args, _PLANETARY_ONLY + (("differential", "--differential"), ("separate_axes", "--separate-axes")), "compound")
    if args.worm is not None:
        from ._worm import run_worm_ratio

        return run_worm_ratio(args, limits_from_args(args), _LazyProgress(enabled=not args.json and sys.stderr.isatty()))
    from ..ratio.reach import reach_note, reach_of

    target = parse_target(args.target)
    limits = limits_from_args(args)
    tolerance = tolerance_value(args.tolerance) if args.tolerance is not None else None
    counts = stage_counts_from_args(args)
    if args.count is not None:  # bad input is refused before anything else is said
        from ..ratio.tolerance import count_value

        count_value(args.count)
    reach = reach_of(limits, counts)
    reachable = tuple(k for k in counts if reach_of(limits, (k,)).holds(target.approx))
    if args.fractions:
        return _print_fractions(args, target, limits)
    if not reachable:  # said at once: no search can reach it
        note = reach_note(target.expression, target.value, limits, counts, coaxial=args.coaxial)
        if args.json:
            print_json({"target": {"expression": target.expression, "value": target.value}, "results": [],
                        "tolerance": tolerance, "reach": reach.as_json(), "unreachable": note})
        else:
            print(note)
        return 1
    from ..ratio.clean import MeshJudge
    from ..ratio.listing import distinct_trains
    from ..ratio.solve import within_tolerance

    query = _query(args, target, limits, reachable)
    progress = _LazyProgress(enabled=not args.json and sys.stderr.isatty())
    clean = MeshJudge().clean
    try:
        trains = distinct_trains(query, clean, progress)
    finally:
        progress.close()
    shown = within_tolerance(trains, tolerance) if tolerance is not None else trains
    other = _other_kinds(args, trains, tolerance)
    if not shown:
        return _report_miss(args, query, trains, reach, other)
    left_out = [k for k in counts if k not in reachable]
    if args.json:
        out = {"target": {"expression": target.expression, "value": target.value},
               "results": [_train_json(t, tolerance, clean) for t in shown], "tolerance": tolerance,
               "reach": reach.as_json()}
        if left_out:
            out["stage_counts_beyond_reach"] = left_out
        if other:
            out["other_kinds"] = other
        print_json(out)
        return 0
    print(_heading(target, limits))
    if left_out:
        print(f"left out: {_counts_text(left_out)} cannot reach {target.expression} "
              f"(they reach {reach_of(limits, (max(left_out),)).describe()})")
    print(table(_rows(shown, clean), _HEADER + [_MESHES]))
    print("meshes: clean = every mesh passes the pair checks without a warning at module 1 (shifts against "
          "undercut, backlash of the default fabrication profile)")
    if other:
        print(other)
    return 0


def _other_kinds(args: argparse.Namespace, trains: Sequence[Any], tolerance: float | None) -> str:
    """The note that another kind meets the tolerance (``--tolerance``, else design's default) the best misses."""
    from ..ratio.tolerance import DESIGN_TOLERANCE

    if args.coaxial:
        return ""
    wanted = tolerance if tolerance is not None else DESIGN_TOLERANCE
    best = abs(trains[0].relative_error) if trains else None
    if best is not None and best <= wanted:
        return ""
    from ._other import other_kinds_line

    return other_kinds_line(args, "compound", best, wanted)


def _counts_text(counts: Sequence[int]) -> str:
    words = " and ".join(str(k) for k in counts)
    return f"{words} stage{'s' if counts != [1] else ''}"


# --- planetary sets -----------------------------------------------------------------------------------------

def _planetary_json(result: Any) -> dict[str, Any]:
    import math

    s, c, a = result.set, result.conditions, result.arrangement
    return {"kind": "planetary", "numerator": result.numerator, "denominator": result.denominator,
            "ratio": result.ratio, "relative_error": result.relative_error, "direction": result.direction,
            "stages": [], "idler": None, "total_teeth": result.total_teeth,
            "members": {"sun": s.sun, "planet": s.planet, "planet_ring": s.planet_ring, "ring": s.ring,
                        "planets": s.planets, "fixed": a.fixed, "input": a.input, "output": a.output},
            "conditions": {f.check: {"severity": f.severity, "value": f.value, "limit": f.limit,
                                     "message": f.message} for f in c.findings},
            "centre_distance_modules": c.centre_distance,
            "shifts": dict(zip(("sun", "planet_sun", "planet_ring", "ring"), c.shifts)),
            "planet_angles_degrees": [round(math.degrees(x), 9) for x in c.angles]}


def _planetary_rows(results: Sequence[Any]) -> list[list[str]]:
    rows = []
    for i, r in enumerate(results, 1):
        s, c = r.set, r.conditions
        planet = f"{s.planet}/{s.planet_ring}" if s.stepped else str(s.planet)
        shifts = "-" if not any(c.shifts) else " ".join(f"{x:+.3f}" for x in c.shifts)
        rows.append([str(i), str(s.sun), planet, str(s.ring), str(s.planets), f"{r.numerator}/{r.denominator}",
                     f"{r.ratio:.15g}", f"{r.relative_error * 1e6:+.6f}", f"{r.relative_error:+.3e}", r.direction,
                     str(r.total_teeth), f"{c.centre_distance:.4f}", f"{c.neighbour.value:.3f}", shifts])
    return rows


_PLANETARY_HEADER = ["#", "sun", "planet", "ring", "N", "exact ratio", "decimal", "error ppm", "rel. error", "output",
                     "teeth", "centre/m", "tip gap/m", "shifts s p p r"]


def _planetary_heading(query: Any) -> str:
    kind = "stepped planets (sun-side/ring-side teeth)" if query.stepped else "simple planets"
    limits = query.limits
    parts = [f"sun and planet teeth {limits.min_teeth}-{limits.max_teeth}", f"ring <= {query.max_ring_teeth}",
             f"shift within +-{query.shift_limit:g} (ISO sign)" if query.shift_limit else "no shift",
             f"planet tips clear by >= {query.margin:g} module"]
    if limits.hunting:
        parts.append("hunting meshes")
    if limits.exclude:
        parts.append("excluding " + ",".join(map(str, sorted(limits.exclude))))
    return (f"target {query.target.expression} = {query.target.digits(20)}\n"
            f"planetary set, {kind}, {query.planets} planets: {query.arrangement.describe()}\n"
            f"limits: {', '.join(parts)}\n"
            f"every set: coaxial, equally spaced planets assemble, neighbours clear "
            f"(centre distance and tip gap in modules; shifts sun, planet at sun, planet at ring, ring)\n"
            f"ratio = output turns per input turn, from the kinematic model of the set")


#: Rows of a planetary table further off than both this and ten times the best's error are left out
#: (when the best itself is further off, only the sets as good as the best are shown).
FAR_OFF = 0.01


def _run_planetary(args: argparse.Namespace) -> int:
    from ..ratio.planetary import solve_planetary
    from ..ratio.solve import within_tolerance
    from ..ratio.target import parse_target
    from ..ratio.tolerance import DESIGN_TOLERANCE, is_within, tolerance_value
    from ..ratio.planetary_ways import planetary_alternatives

    target = parse_target(args.target)
    if args.tolerance is not None:
        tolerance_value(args.tolerance)
    query = planetary_query_from_args(args, target)
    results = solve_planetary(query)
    if results:  # no padding: rows far worse than the best say nothing
        best = abs(results[0].relative_error)
        cut = max(FAR_OFF, 10 * best) if best <= FAR_OFF else best
        results = [r for r in results if abs(r.relative_error) <= cut]
    shown = within_tolerance(results, args.tolerance) if args.tolerance is not None else results
    head = {"expression": target.expression, "value": target.value}
    wanted = args.tolerance if args.tolerance is not None else DESIGN_TOLERANCE
    missed = not results or abs(results[0].relative_error) > wanted
    hint = planetary_alternatives(query, wanted) if missed else ""
    from ._other import other_kinds_line

    other = other_kinds_line(args, "planetary", abs(results[0].relative_error) if results else None, wanted) \
        if missed else ""
    if not shown:
        if args.json:
            print_json({"target": head, "results": [], "tolerance": args.tolerance,
                        "best": {**_planetary_json(results[0]), "within_tolerance": False} if results else None,
                        "alternatives": hint, **({"other_kinds": other} if other else {})})
            return 1
        print(_planetary_heading(query))
        if not results:
            print("no set meets the three conditions within the limits")
        else:
            print(f"no set within tolerance {args.tolerance:g}; the best found:")
            print(table(_planetary_rows(results[:1]), _PLANETARY_HEADER))
        for line in (hint, other):
            if line:
                print(line)
        return 1
    if args.json:
        out = {"target": head, "results": [{**_planetary_json(r), "within_tolerance": is_within(r.relative_error,
                                                                                             args.tolerance)}
                                           for r in shown], "tolerance": args.tolerance}
        if hint:
            out["alternatives"] = hint
        if other:
            out["other_kinds"] = other
        print_json(out)
        return 0
    print(_planetary_heading(query))
    print(table(_planetary_rows(shown), _PLANETARY_HEADER))
    for line in (hint, other):
        if line:
            print(line)
    return 0
