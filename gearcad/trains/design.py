"""Design in the library: solve a ratio, choose the train to build, within the tolerance asked for.

:func:`design` is what ``gearcad design`` runs, callable without the command
line.  For each kind of train it

1. reads and bounds the target, and says at once when the limits cannot reach it,
2. runs the exact solver of that kind (best ratio first),
3. keeps only candidates whose |relative error| is within ``tolerance``,
4. builds each candidate's train description and plans it, keeping the first
   whose meshes pass every check (planetary and summing trains); among compound
   trains of the best error (the same ratio), the first, fewest teeth first,
   whose meshes pass without a warning (no thin tips, no undercut left after
   the least shift), else the fewest teeth,

and raises :class:`gearcad.errors.ToleranceError` when no candidate is within
the tolerance: the message names the best found and what would reach the
target.  Pure: no printing, no files.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any, Sequence

from ..errors import GearcadError, InputError, ToleranceError
from ..ratio.tolerance import DESIGN_TOLERANCE, tolerance_value
from ..ratio.planetary_ways import planetary_alternatives, planetary_ways, set_text

__all__ = ["Design", "design", "KINDS", "DESIGN_TOLERANCE", "planetary_alternatives"]

#: The kinds of train :func:`design` builds.
KINDS = ("compound", "planetary", "summing")


@dataclass(frozen=True)
class Design:
    """A chosen train.

    Attributes
    ----------
    spec : gearcad.trainspec.TrainSpec
        The train description, ready for :func:`gearcad.trains.plan.plan_train` and the train file.
    kind : str
        ``"compound"``, ``"planetary"``, ``"summing"`` or ``"worm"`` (a compound train with a worm stage).
    relative_error : float
        ``ratio / target - 1`` of the chosen train (exact rational computation, rounded).
    tolerance : float
        The tolerance it meets.
    solution : object
        The solver's own result (a ratio Train, a PlanetaryResult or a SummingTrain).
    """

    spec: Any
    kind: str
    relative_error: float
    tolerance: float
    solution: Any


@dataclass(frozen=True)
class _Common:
    """What every kind shares: the target, the gear making and the search limits."""

    target: str
    module: float
    thickness: float
    profile: str
    system: str
    bore: float
    name: str
    tolerance: float
    helix: float = 0.0  # degrees; 0: spur gears
    hand: str = "right"
    herringbone: bool = False


def design(target: str, *, kind: str = "compound", module: float, tolerance: float | None = None,
           thickness: float = 3.0, profile: str = "laser-3mm-acrylic", system: str = "iso53-a", bore: float = 3.0,
           name: str = "design", stages: int | None = None, min_teeth: int | None = None,
           max_teeth: int | None = None, max_stage_ratio: float = 6.0, hunting: bool = False,
           exclude: Sequence[object] = (), inventory: Any = None, coaxial: bool = False,
           shift_limit: float | None = None, direction: str | None = None, planets: int | None = None,
           fixed: str | None = None, input: str | None = None, stepped: bool = False,
           max_ring_teeth: int | None = None, neighbour_margin: float | None = None,
           differential: str | None = None, candidates: int | None = None, helix: float | None = None,
           hand: str = "right", herringbone: bool = False, worm: str | None = None, worm_flank: str = "za",
           worm_diameter_factor: float | None = None, worm_tool_diameter: float | None = None) -> Design:
    """Solve ``target`` and choose the train to build.

    Parameters
    ----------
    target : str
        Wanted ratio, output turns per input turn (decimal, fraction or expression).
    kind : {"compound", "planetary", "summing"}
    module : float
        Module of every gear, mm.
    tolerance : float, optional
        Largest |relative error| accepted (default :data:`DESIGN_TOLERANCE`, 1e-3).
    thickness, bore : float
        Face width and shaft diameter, mm.
    profile, system, name : str
        Fabrication profile, tooth system, train name.
    stages, min_teeth, max_teeth, max_stage_ratio, hunting, exclude, inventory, coaxial, shift_limit, direction
        The ratio solver's limits (as ``gearcad ratio``); ``inventory`` is a
        :class:`gearcad.ratio.Inventory`.
    planets, fixed, input, stepped, max_ring_teeth, neighbour_margin
        Planetary sets (``planets`` also the differential's planets of a summing train).
    differential : {"mean", "planetary"}, optional
        Summing trains: what recombines the two paths.
    candidates : int, optional
        How many of the best sets or trains are tried (planetary 10, summing 20 or 100 with a shelf).
    helix, hand, herringbone : optional
        Compound trains: a helix angle (degrees, 0 to below 45) makes every stage helical, each
        countershaft's gears of one hand so that their thrusts oppose; ``herringbone`` doubles each gear.
    worm : str, optional
        ``STARTS[:ZMIN-ZMAX]``: a worm stage as ``gearcad ratio --worm`` finds it (the train's first stage,
        the worm its input; :mod:`gearcad.trains.design_worm`); compound trains only.
    worm_flank : {"za", "zi", "zn", "zk"}
        The worm's flank form (default ZA: straight in the axial section).
    worm_diameter_factor : float, optional
        The worm's diameter factor ``q`` (default 10).
    worm_tool_diameter : float, optional
        A ZK worm's cutting disc diameter, mm (needed for ZK, refused for the other forms).

    Returns
    -------
    Design

    Raises
    ------
    InputError
        Bad input (also options that do not apply to the kind).
    ToleranceError
        No train within ``tolerance`` (or the target beyond the limits' reach).
    """
    from ..profiles import load_fabrication, load_tooth_system
    from ..validate import positive

    if kind not in KINDS:
        raise InputError(f"kind must be one of {', '.join(KINDS)}, got {kind!r}")
    load_tooth_system(system)  # unknown names fail before the search
    load_fabrication(profile)
    positive(module, "module", "mm")
    if helix is not None:
        from ..meshes.helical import check_helix

        check_helix(helix, "helix angle (--helix)")
    if helix is None and herringbone:
        raise InputError("--herringbone needs a helix angle: give --helix DEG")
    if helix is not None and kind in ("planetary", "summing"):
        hint = ("; for a helical set, add helix = DEG to the [planetary] table of the train file it writes"
                if kind == "planetary" else "")
        raise InputError(f"--helix applies to compound trains only in gearcad design; --kind {kind} takes spur gears{hint}")
    common = _Common(target, module, thickness, profile, system, bore, name,
                     DESIGN_TOLERANCE if tolerance is None else tolerance_value(tolerance), helix or 0.0, hand,
                     herringbone)
    if kind != "summing" and (differential is not None):
        raise InputError("--differential applies only to --kind summing")
    limits = _limits(min_teeth, max_teeth, max_stage_ratio, hunting, exclude, inventory, direction)
    given = [name for name, value in (("--worm-flank", worm_flank != "za"),
                                      ("--worm-diameter-factor", worm_diameter_factor is not None),
                                      ("--worm-tool-diameter", worm_tool_diameter is not None)) if value]
    if worm is None and given:
        raise InputError(f"{', '.join(given)} shape{'' if len(given) > 1 else 's'} the worm of a worm stage and "
                         f"need{'' if len(given) > 1 else 's'} --worm; allowed: add --worm STARTS, or leave "
                         f"{'them' if len(given) > 1 else 'it'} out")
    if worm is not None:
        if kind != "compound" or coaxial or inventory is not None or shift_limit is not None:
            raise InputError(f"--worm {worm} builds a compound train with a worm stage; allowed: leave out --kind "
                             f"{kind}" if kind != "compound" else "--coaxial, --inventory and --shift-limit do not "
                             "apply to --worm; allowed: leave them out")
        from .design_worm import design_worm

        spec, error, train = design_worm(common, limits, worm, stages, diameter_factor=worm_diameter_factor,
                                         form=worm_flank, tool_diameter=worm_tool_diameter)
        return Design(replace(spec, target_tolerance=common.tolerance), "worm", error, common.tolerance, train)
    chosen = _choose(common, limits, kind, stages, coaxial, inventory, shift_limit, planets, fixed, input, stepped,
                     max_ring_teeth, neighbour_margin, differential, candidates)
    return replace(chosen, spec=replace(chosen.spec, target_tolerance=common.tolerance))


def _choose(common, limits, kind, stages, coaxial, inventory, shift_limit, planets, fixed, input, stepped,
            max_ring_teeth, neighbour_margin, differential, candidates) -> Design:
    if kind == "planetary":
        if stages is not None or coaxial or inventory is not None:
            raise InputError("--stages, --coaxial and --inventory do not apply to --kind planetary")
        return _planetary(common, limits, planets, fixed, input, stepped, max_ring_teeth, shift_limit,
                          neighbour_margin, candidates or 10)
    if kind == "summing":
        if stages is not None or coaxial or stepped or fixed or input:
            raise InputError("--stages, --coaxial, --stepped, --fixed and --input do not apply to --kind summing")
        return _summing(common, limits, differential or "mean", planets, max_ring_teeth, neighbour_margin,
                        shift_limit, candidates or (100 if inventory is not None else 20))
    if planets is not None or fixed or input or stepped or max_ring_teeth is not None or neighbour_margin is not None:
        raise InputError("--planets, --fixed, --input, --stepped, --max-ring-teeth and --neighbour-margin apply "
                         "only to --kind planetary or summing")
    return _compound(common, limits, stages, coaxial, shift_limit)


def _limits(min_teeth, max_teeth, max_stage_ratio, hunting, exclude, inventory, direction):
    from ..ratio.limits import DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, make_limits

    low = min_teeth if min_teeth is not None else (min(inventory.teeth) if inventory else DEFAULT_MIN_TEETH)
    high = max_teeth if max_teeth is not None else (max(inventory.teeth) if inventory else DEFAULT_MAX_TEETH)
    return make_limits(low, high, max_stage_ratio, hunting, list(exclude), inventory, direction)


def _miss(common: _Common, best_text: str | None, best_error: float | None, ways: str) -> ToleranceError:
    found = f"the best found is {best_text} (relative error {best_error:+.3e})" if best_text else "nothing was found"
    return ToleranceError(f"no train within tolerance {common.tolerance:g} of {common.target}: {found}; "
                          f"nothing was built; {ways}", best_error)


# --- compound trains ----------------------------------------------------------------------------------------

def _compound(common: _Common, limits: Any, stages: int | None, coaxial: bool, shift_limit: float | None) -> Design:
    from ..ratio.reach import reach_note, reach_of
    from ..ratio.solve import RatioQuery, binding_limits, solve_ratio
    from ..ratio.target import parse_target
    from .spec import SolverSpec, TrainSpec
    from ..validate import as_int

    if shift_limit is not None and not coaxial:
        raise InputError("--shift-limit works only with --coaxial")
    target = parse_target(common.target)
    if stages is None:
        counts: tuple[int, ...] = (2,) if coaxial else (1, 2, 3)
    else:
        from ..ratio.compound import check_stages

        counts = (check_stages(as_int(stages, "stages")),)
    reachable = tuple(k for k in counts if reach_of(limits, (k,)).holds(target.approx))
    if not reachable:
        note = reach_note(target.expression, target.value, limits, counts, coaxial=coaxial)
        raise ToleranceError(f"{note}; nothing was built")
    query = RatioQuery(target, reachable, limits, 1, coaxial, shift_limit)
    trains = solve_ratio(query)
    if not trains:
        raise ToleranceError(f"no train reaches {common.target} within the limits ({limits.describe()}); "
                             "nothing was built")
    best = trains[0]
    if abs(best.relative_error) > common.tolerance:
        binding = binding_limits(query, common.tolerance)
        ways = ("would reach it: relaxing " + " or ".join(binding)) if binding else \
            "no single relaxation of the stage ratio, hunting, exclusions, tooth range or stage count reaches it"
        stages_text = " ".join(f"{d}/{n}" for d, n in best.stages)
        raise _miss(common, f"{best.numerator}/{best.denominator} ({stages_text})", best.relative_error, ways)
    solver = SolverSpec(ratio=common.target, stages=stages, min_teeth=limits.min_teeth if limits.inventory is None
                        else None, max_teeth=limits.max_teeth if limits.inventory is None else None,
                        max_stage_ratio=float(limits.max_stage_ratio), direction=limits.direction,
                        hunting=limits.hunting, coaxial=coaxial, exclude=tuple(str(z) for z in sorted(limits.exclude)))
    base = TrainSpec(name=common.name, module=common.module, thickness=common.thickness, stages=(),
                     target=common.target, tooth_system=common.system, fabrication=common.profile, bore=common.bore,
                     solver=solver, title=f"Train for {common.target}")
    chosen, spec = _cleanest(common, base, _equal_error_trains(trains, limits, target, coaxial), query)
    return Design(spec, "compound", chosen.relative_error, common.tolerance, chosen)


#: Trains of the best ratio planned to find one whose meshes pass without a warning, and how many teeth
#: more than the fewest they may have.
ALTERNATIVES, EXTRA_TEETH = 6, 40


def _equal_error_trains(trains: Sequence[Any], limits: Any, target: Any, coaxial: bool) -> list[Any]:
    """The best train, then other trains of exactly its error (same ratio, any stage count searched), fewest teeth first."""
    from fractions import Fraction

    from ..ratio.alternatives import same_ratio_trains

    best = trains[0]
    if coaxial:
        return [best]
    error = abs(Fraction(best.numerator, best.denominator) / target.approx - 1)
    equal = [t for t in trains if abs(Fraction(t.numerator, t.denominator) / target.approx - 1) == error]
    found = []
    for train in equal:
        found += same_ratio_trains(train.numerator, train.denominator, len(train.stages), limits, target,
                                   ALTERNATIVES, EXTRA_TEETH)
    found.sort(key=lambda t: (t.total_teeth, len(t.stages), t.stages))
    ordered = [best] + [t for t in found if t.stages != best.stages]
    return ordered[:ALTERNATIVES]


def _mesh_severities(spec: Any) -> set[str]:
    """Severities of the findings of every mesh of a compound train (pairs alone: no layout, no parts)."""
    from ..meshes.checks import analyse_pair
    from ..meshes.pair import make_pair
    from ..profiles import load_fabrication, load_tooth_system

    system, fab = load_tooth_system(spec.tooth_system), load_fabrication(spec.fabrication)
    found = set()
    for stage in spec.stages:
        module = stage.module or spec.module
        gears = [stage.driver, stage.idler, stage.driven] if stage.idler is not None else [stage.driver, stage.driven]
        for a, b in zip(gears, gears[1:]):
            pair = make_pair(a.teeth, b.teeth, module, system, shifts=(a.shift, b.shift), backlash=fab.backlash)
            found |= {f.severity for f in analyse_pair(pair).findings}
    return found


def _cleanest(common: _Common, base: Any, trains: Sequence[Any], query: Any) -> tuple[Any, Any]:
    """Among trains of equal error: the first whose meshes pass with no warning, else no failure, else the first.

    The alternatives of the best ratio come first (fewest teeth first); when none is clean, the search
    is repeated with larger least tooth counts (12, 14, 17, 20, 24, 28 teeth) while its best keeps the
    same error, since small pinions are what thin tips and undercut come from.
    """
    from dataclasses import replace as copy
    from fractions import Fraction

    from .stages import spec_with_stages
    from ..ratio.solve import solve_ratio

    def error(train: Any) -> Fraction:
        return abs(Fraction(train.numerator, train.denominator) / query.target.approx - 1)

    first_passing = None

    def judge(train: Any) -> Any:
        nonlocal first_passing
        try:
            spec = spec_with_stages(base, train, helix=common.helix, hand=common.hand,
                                    herringbone=common.herringbone)
            severities = _mesh_severities(spec)
        except GearcadError:
            return None
        if not severities & {"warning", "failure"}:
            return train, spec
        if "failure" not in severities and first_passing is None:
            first_passing = (train, spec)
        return None

    for train in trains:
        if (chosen := judge(train)) is not None:
            return chosen
    wanted, limits = error(trains[0]), query.limits
    if limits.inventory is None and not query.coaxial:
        for least in (12, 14, 17, 20, 24, 28):
            if least <= limits.min_teeth or least > limits.max_teeth:
                continue
            try:
                narrower = copy(limits, min_teeth=least)
                narrower.teeth  # noqa: B018 (an empty range raises below)
                found = solve_ratio(copy(query, limits=narrower, count=1)) if narrower.teeth else []
            except GearcadError:
                break
            if not found or error(found[0]) != wanted:
                break  # larger pinions only do worse from here
            if (chosen := judge(found[0])) is not None:
                return chosen
    return first_passing or (trains[0], spec_with_stages(base, trains[0], helix=common.helix, hand=common.hand,
                                                         herringbone=common.herringbone))


# --- planetary sets -----------------------------------------------------------------------------------------

def _planetary(common: _Common, limits: Any, planets, fixed, input, stepped, max_ring_teeth, shift_limit,
               margin, candidates: int) -> Design:
    from ..ratio.planetary_set import NEIGHBOUR_MARGIN, make_arrangement
    from ..ratio.planetary import make_query, solve_planetary
    from ..profiles import load_tooth_system
    from ..ratio.target import parse_target

    tooth = load_tooth_system(common.system)
    target = parse_target(common.target)
    arrangement = make_arrangement(fixed or "ring", input)
    query = make_query(target, limits, arrangement, planets, stepped, max_ring_teeth, shift_limit,
                       NEIGHBOUR_MARGIN if margin is None else margin, candidates, tooth.pressure_angle,
                       tooth.addendum)
    results = solve_planetary(query)
    within = [r for r in results if abs(r.relative_error) <= common.tolerance]
    if not within:
        best = results[0] if results else None
        text = f"{best.numerator}/{best.denominator} ({set_text(best)})" if best else None
        raise _miss(common, text, best.relative_error if best else None,
                    planetary_ways(query, common.tolerance))
    ring_limit = query.max_ring_teeth
    chosen = None
    for result in within:  # best ratio first; the same set scaled up keeps its ratio and its conditions
        for scale in range(1, 5):
            candidate = _planetary_spec(common, result, scale, shift_limit)
            if max(candidate.planetary.ring, candidate.planetary.sun) > ring_limit:
                break
            if _passes(candidate, meshes_only=True):
                chosen = (candidate, result)
                break
        if chosen:
            break
    spec, result = chosen or (_planetary_spec(common, within[0], 1, shift_limit), within[0])
    return Design(spec, "planetary", result.relative_error, common.tolerance, result)


def _planetary_spec(common: _Common, result: Any, scale: int, shift_limit: float | None) -> Any:
    """The train of a solved set, its tooth counts multiplied by ``scale`` (same ratio, same conditions)."""
    from .spec import PlanetarySpec, TrainSpec

    s, a = result.set, result.arrangement
    ring_side = s.planet_ring * scale if s.planet_ring else None
    return TrainSpec(name=common.name, module=common.module, thickness=common.thickness, stages=(),
                     target=common.target, tooth_system=common.system, fabrication=common.profile, bore=common.bore,
                     title=f"Planetary set for {common.target}",
                     planetary=PlanetarySpec(s.sun * scale, s.planet * scale, s.ring * scale, s.planets, ring_side,
                                             a.fixed, a.input, shift_limit))


def _passes(spec: Any, meshes_only: bool = False) -> bool:
    """Whether the train plans and its meshes (and, unless ``meshes_only``, its other checks) pass."""
    from .planner import plan_train

    try:
        plan = plan_train(spec)
    except GearcadError:
        return False
    meshes = all(f.severity != "failure" for m in plan.meshes for f in m.analysis.findings)
    return meshes and (meshes_only or all(f.severity != "failure" for f in plan.findings))


# --- summing trains -----------------------------------------------------------------------------------------

def _summing(common: _Common, limits: Any, kind: str, planets: int | None, max_ring_teeth: int | None,
             margin: float | None, shift_limit: float | None, count: int) -> Design:
    from .stages import planetary_differential, summing_train_spec
    from .differential import axle_room
    from .planner import plan_train
    from ..profiles import load_fabrication, load_tooth_system
    from ..ratio.target import parse_target
    from ..ratio.summing import solve_summing
    from .spec import SummingSpec

    planets = 3 if planets is None else planets
    if not 1 <= planets <= 24:
        raise InputError(f"--planets must be from 1 to 24, got {planets!r}")
    tooth, fab = load_tooth_system(common.system), load_fabrication(common.profile)
    target = parse_target(common.target)
    room = axle_room(SummingSpec("mean", planets=planets), common.module, common.bore, common.system,
                     common.profile) if kind == "mean" else 0.0
    min_axis = math.ceil(2 * room / common.module - 1e-9)
    candidates = solve_summing(target, sorted(limits.teeth), kind, count, float(limits.max_stage_ratio),
                               max_ring_teeth or 200, planets, 0.5 if margin is None else margin, one_axis=True,
                               min_axis=min_axis)
    if limits.inventory:
        candidates = [t for t in candidates if _on_the_shelf(t, limits.inventory)]
    if not candidates:
        raise ToleranceError(f"no summing train reaches {common.target} with both paths on one axle within the "
                             "limits; nothing was built")
    within = [t for t in candidates if abs(t.relative_error) <= common.tolerance]
    if not within:
        best = candidates[0]
        raise _miss(common, f"{best.ratio.numerator}/{best.ratio.denominator} (paths {best.path_a[0]}/"
                    f"{best.path_a[1]} and {best.path_b[0]}/{best.path_b[1]})", best.relative_error,
                    "would reach it: wider limits (--max-teeth, --max-stage-ratio), --differential planetary, "
                    "or a compound train (--kind compound)")
    base = dict(name=common.name, module=common.module, thickness=common.thickness, target=common.target,
                tooth_system=common.system, fabrication=common.profile, bore=common.bore,
                title=f"Summing train for {common.target}")
    chosen, first, problem = None, None, None
    for train in within:  # best first: the first whose every check passes is built
        if kind == "mean":
            differential = SummingSpec("mean", planets=planets)
        else:  # a set whose own meshes fail is passed over before its paths are laid out
            differential = planetary_differential(train, common.module, tooth, fab.backlash, max(limits.teeth),
                                                  shift_limit)
            if differential is None:
                continue
        idlers = _shelf_idlers(train, limits.inventory) if limits.inventory else None
        try:
            spec = summing_train_spec(train, differential, idlers=idlers, **base)
            plan = plan_train(spec)
        except GearcadError as exc:
            problem = problem or exc
            continue
        first = first or (spec, train)
        if all(f.severity != "failure" for m in plan.meshes for f in m.analysis.findings) and \
                all(f.severity != "failure" for f in plan.findings):
            chosen = (spec, train)
            break
    picked = chosen or first
    if picked is None:
        raise InputError(f"none of the {len(within)} best summing trains for {common.target!r} can be built: {problem}")
    return Design(picked[0], "summing", picked[1].relative_error, common.tolerance, picked[1])


def _on_the_shelf(train: Any, inventory: Any) -> bool:
    """Each physical gear of the two paths used once (the differential's own gears are made, not shelved)."""
    from collections import Counter

    need = Counter([*train.path_a, *train.path_b])
    return all(inventory.quantity(z) >= n for z, n in need.items())


def _shelf_idlers(train: Any, inventory: Any) -> tuple[int, ...]:
    """Idler tooth counts the shelf still holds once the paths have their gears (two of a count for two idlers)."""
    from collections import Counter

    used = Counter([*train.path_a, *train.path_b])
    need = 1 + (train.sign_a > 0 and train.sign_b > 0)
    return tuple(z for z in inventory.teeth if inventory.quantity(z) - used[z] >= need)
