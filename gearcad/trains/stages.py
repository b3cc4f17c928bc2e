"""From a solved ratio to a train description: the stages, with profile shifts against undercut.

Pure.  ``solve_train_spec`` runs the ratio solver for a train file's ``[solve]``
table; ``spec_with_stages`` turns the best train into stages.  Undercut pinions
get the least profile shift that avoids undercut (rounded up to 0.01); the mate
takes the opposite shift where it can without undercut of its own, so the
centre distance stays the reference one (a zero-sum shift pair, common
practice), and otherwise keeps zero shift (the centre distance grows a little).
"""

from __future__ import annotations

import dataclasses
import math

from ..meshes.checks import analyse_pair
from ..meshes.shifts import balanced_shifts, least_shift, thinning_shift
from ..errors import InputError
from ..profiles import ToothSystem, load_tooth_system
from .spec import GearSpec, SolverSpec, StageSpec, SummingSpec, TrainSpec

__all__ = ["spec_with_stages", "solve_train_spec", "solve", "summing_train_spec",
           "planetary_differential"]


def _tooth_system(name: str, pressure_angle: float | None) -> ToothSystem:
    """The tooth system ``name``, at ``pressure_angle`` degrees where the train file gives one."""
    system = load_tooth_system(name)
    if pressure_angle is not None:
        system = dataclasses.replace(system, pressure_angle=math.radians(pressure_angle))
    return system


def spec_with_stages(spec: TrainSpec, train, system: ToothSystem | None = None, helix: float = 0.0,
                     hand: str = "right", herringbone: bool = False) -> TrainSpec:
    """``spec`` with the stages of a solved ``train`` (a :class:`gearcad.ratio.Train`).

    ``helix`` (degrees, 0 to below 45) makes every stage helical: the shifts are found in
    the transverse section and given as normal shifts (see :func:`_helical_stages`).
    """
    if system is None:
        system = _tooth_system(spec.tooth_system, spec.pressure_angle)
    elif spec.pressure_angle is not None:
        system = dataclasses.replace(system, pressure_angle=math.radians(spec.pressure_angle))
    if helix:
        return _helical_stages(spec, train, system, helix, hand, herringbone)
    from ..profiles import load_fabrication

    thinning = thinning_shift(load_fabrication(spec.fabrication).backlash, spec.module, system)
    stages = []
    for k, (driver, driven) in enumerate(train.stages):
        if train.shifts is not None:
            x1, x2 = train.shifts[k]
        else:
            x1, x2 = balanced_shifts(driver, driven, system, thinning)
        idler = GearSpec(train.idler) if train.idler is not None and k == len(train.stages) - 1 else None
        stages.append(StageSpec(GearSpec(driver, shift=x1), GearSpec(driven, shift=x2), idler=idler))
    coaxial = bool(spec.solver.coaxial) if spec.solver else spec.coaxial
    if coaxial and len(stages) == 2 and train.shifts is None:
        stages = _equal_centres(stages, spec.module, system)
    target = spec.target or (spec.solver.ratio if spec.solver else None)
    return dataclasses.replace(spec, stages=tuple(stages), coaxial=coaxial, target=target, solver=None)


def _helical_stages(spec: TrainSpec, train, system: ToothSystem, helix: float, hand: str, herringbone: bool) -> TrainSpec:
    """Helical stages: shifts against undercut in the transverse section (module ``m_n / cos(beta)``, the
    transverse rack), turned into normal shifts ``x_n = x_t / cos(beta)``.

    Hands: each stage's driver takes the hand of the gear it shares a shaft with (the previous stage's driven
    gear), so that on every intermediate shaft the two gears' axial forces oppose (common practice).
    """
    from ..meshes.helical import check_hand, check_helix, opposite_hand, transverse_system

    beta = check_helix(helix)
    check_hand(hand)
    c = math.cos(beta)
    plain = dataclasses.replace(spec, module=spec.module / c)
    spur = spec_with_stages(plain, train, transverse_system(system, beta))
    stages = []
    for stage in spur.stages:
        normal = [dataclasses.replace(g, shift=round(g.shift / c, 12)) if g is not None else None
                  for g in (stage.driver, stage.driven, stage.idler)]
        stages.append(StageSpec(normal[0], normal[1], stage.module, normal[2], helix=helix, hand=hand,
                                herringbone=herringbone))
        hand = hand if stage.idler is not None else opposite_hand(hand)
    return dataclasses.replace(spur, module=spec.module, stages=tuple(stages))


def _equal_centres(stages: list[StageSpec], module: float, system: ToothSystem) -> list[StageSpec]:
    """Give the stage with the shorter centre distance the shift sum that reaches the longer one.

    The pinion keeps its shift against undercut; the wheel takes the rest
    (ISO 21771's centre distance from the shift sum, inverted).
    """
    from ..meshes.pair import centre_distance_for_shift, total_shift_for_centre

    alpha = system.pressure_angle
    centres = [centre_distance_for_shift(s.driver.teeth, s.driven.teeth, module, alpha, s.driver.shift + s.driven.shift)
               for s in stages]
    if abs(centres[0] - centres[1]) < 1e-12:
        return stages
    k = 0 if centres[0] < centres[1] else 1
    s = stages[k]
    total = total_shift_for_centre(s.driver.teeth, s.driven.teeth, module, alpha, max(centres))
    if s.driver.teeth <= s.driven.teeth:
        new = StageSpec(s.driver, dataclasses.replace(s.driven, shift=round(total - s.driver.shift, 12)), s.module, s.idler)
    else:
        new = StageSpec(dataclasses.replace(s.driver, shift=round(total - s.driven.shift, 12)), s.driven, s.module, s.idler)
    stages = list(stages)
    stages[k] = new
    return stages


def solve(solver: SolverSpec, inventory=None, shift_limit: float | None = None, progress=None):
    """The best train for a ``[solve]`` table (or the same options from the command line)."""
    from ..ratio.limits import DEFAULT_MAX_STAGE_RATIO, DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, make_limits
    from ..ratio.solve import DEFAULT_STAGE_COUNTS, RatioQuery, solve_ratio
    from ..ratio.target import parse_target

    target = parse_target(solver.ratio)
    low = solver.min_teeth if solver.min_teeth is not None else (min(inventory.teeth) if inventory else DEFAULT_MIN_TEETH)
    high = solver.max_teeth if solver.max_teeth is not None else (max(inventory.teeth) if inventory else DEFAULT_MAX_TEETH)
    limits = make_limits(low, high, solver.max_stage_ratio or DEFAULT_MAX_STAGE_RATIO, solver.hunting,
                         solver.exclude, inventory, solver.direction)
    counts = (solver.stages,) if solver.stages else ((2,) if solver.coaxial else DEFAULT_STAGE_COUNTS)
    trains = solve_ratio(RatioQuery(target, counts, limits, 1, solver.coaxial, shift_limit), progress)
    if not trains:
        raise InputError(f"no train reaches {solver.ratio!r} within the limits ({limits.describe()})")
    return trains[0]


def solve_train_spec(spec: TrainSpec, progress=None) -> tuple[TrainSpec, object]:
    """Solve a train file's ``[solve]`` table; the completed spec and the solver's train."""
    if spec.solver is None:
        raise InputError("the train has no [solve] table")
    train = solve(spec.solver, progress=progress)
    return spec_with_stages(spec, train), train


def _idler_meshes_clean(stage: StageSpec, teeth: int, module: float, system: ToothSystem, thinning: float,
                        backlash: float) -> bool:
    """Whether an idler of ``teeth`` meshes the stage's driver and driven gear with no warning or failure."""
    from ..meshes.pair import make_pair

    x = least_shift(teeth, system, thinning)
    for gear in (stage.driver, stage.driven):
        pair = make_pair(gear.teeth, teeth, module, system, shifts=(gear.shift, x), backlash=backlash)
        if any(f.severity != "ok" for f in analyse_pair(pair).findings):
            return False
    return True


def summing_train_spec(train, differential: SummingSpec, max_idler: int = 200, idlers: tuple[int, ...] | None = None,
                       **fields) -> TrainSpec:
    """The train of a solved summing ``train`` (:class:`gearcad.ratio.summing.SummingTrain`); ``fields`` are the
    other :class:`TrainSpec` fields (name, module, thickness, ...).

    A path without idler gets balanced shifts (the two such paths are then
    brought to one centre distance, :func:`_equal_centres`); a path with an idler
    gets the least shift against undercut on each gear and the fewest idler teeth
    with which the whole train plans (reaches the axle and clears every part),
    preferring idlers whose two meshes pass every check without a warning.
    ``idlers``: the tooth counts an idler may have (say, what the shelf holds
    beyond the paths' gears; two idler paths then need two of one count);
    default every count up to ``max_idler``.
    """
    from ..errors import GearcadError
    from .planner import plan_train
    from ..profiles import load_fabrication

    system = _tooth_system(fields.get("tooth_system", "iso53-a"), fields.get("pressure_angle"))
    module = fields["module"]
    backlash = load_fabrication(fields.get("fabrication", "laser-3mm-acrylic")).backlash
    thinning = thinning_shift(backlash, module, system)
    stages = []
    for (driver, driven), sign in ((train.path_a, train.sign_a), (train.path_b, train.sign_b)):
        if sign < 0:
            x1, x2 = balanced_shifts(driver, driven, system, thinning)
        else:
            x1, x2 = least_shift(driver, system, thinning), least_shift(driven, system, thinning)
        stages.append(StageSpec(GearSpec(driver, shift=x1), GearSpec(driven, shift=x2)))
    if train.sign_a < 0 and train.sign_b < 0:
        stages = _equal_centres(stages, module, system)
    done = TrainSpec(stages=tuple(stages), summing=differential, **fields)
    if train.sign_a < 0 and train.sign_b < 0:
        return done
    carriers = [k for k, s in enumerate((train.sign_a, train.sign_b)) if s > 0]
    first = max(12, min(min(stages[k].driver.teeth, stages[k].driven.teeth) for k in carriers) // 2)
    allowed = [z for z in (idlers if idlers is not None else range(first, max_idler + 1)) if z >= 8]
    if not allowed:
        raise InputError("no idler tooth count is available for the summing train's idler paths")
    clean = [z for z in allowed
             if all(_idler_meshes_clean(stages[k], z, module, system, thinning, backlash) for k in carriers)]
    last_error: GearcadError | None = None
    for teeth in clean[:40] + [z for z in allowed if z not in clean[:40]]:
        idler = GearSpec(teeth, shift=least_shift(teeth, system, thinning))
        trial = list(stages)
        for k in carriers:
            trial[k] = dataclasses.replace(trial[k], idler=idler)
        candidate = dataclasses.replace(done, stages=tuple(trial))
        try:
            plan_train(candidate)
        except GearcadError as exc:
            last_error = exc
            continue
        return candidate
    raise InputError(f"no idler of {allowed[0]} to {allowed[-1]} teeth completes the summing train: {last_error}")


def planetary_differential(train, module: float, system: ToothSystem, backlash: float, max_teeth: int,
                           shift_limit: float | None = None, max_scale: int = 4) -> SummingSpec | None:
    """The planetary differential of a solved summing ``train`` whose two meshes pass every check, or None.

    The set's tooth counts may be multiplied by a whole ``k`` (the summing ratio
    depends on sun : ring only, and the three conditions still hold) while the
    ring stays inside path B's driven gear (``ring + 7 <= driven``).
    """
    from ..errors import GearcadError
    from ..meshes.internal import analyse_internal_pair, make_internal_pair
    from ..meshes.pair import make_pair
    from ..ratio.planetary_set import check_set, make_set
    from ..ratio.summing import RING_FIT

    sun, planet, ring, count = train.planetary
    for k in range(1, max_scale + 1):
        if ring * k + RING_FIT > train.path_b[1] or planet * k > max_teeth or sun * k > max_teeth:
            break
        try:
            pset = make_set(sun * k, planet * k, ring * k, count)
            conditions = check_set(pset, module, shift_limit, pressure_angle=system.pressure_angle,
                                   addendum=system.addendum)
            if any(f.severity == "failure" for f in conditions.findings):
                continue
            x_s, x_p, _, x_r = conditions.shifts
            outer = make_pair(sun * k, planet * k, module, system, shifts=(x_s, x_p), backlash=backlash)
            inner = make_internal_pair(planet * k, ring * k, module, system, shifts=(x_p, x_r), backlash=backlash)
        except GearcadError:
            continue
        findings = analyse_pair(outer).findings + analyse_internal_pair(inner).findings
        if all(f.severity != "failure" for f in findings):
            return SummingSpec("planetary", sun=sun * k, planet=planet * k, ring=ring * k, planets=count,
                               shift_limit=shift_limit)
    return None
