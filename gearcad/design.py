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

from .checks import min_shift_without_undercut
from .errors import InputError
from .profiles import ToothSystem, load_tooth_system
from .trainspec import GearSpec, SolverSpec, StageSpec, TrainSpec

__all__ = ["balanced_shifts", "spec_with_stages", "solve_train_spec", "solve"]


def balanced_shifts(driver: int, driven: int, system: ToothSystem, thinning: float = 0.0) -> tuple[float, float]:
    """Profile shifts (driver, driven) that keep both gears free of undercut, summing to zero where possible.

    ``thinning`` is the tooth-thinning allowance per gear as a shift coefficient
    (``thinning_mm / (2 m tan(alpha))``): the cutter feeds that much deeper.
    """
    depth, alpha = system.straight_flank_depth, system.pressure_angle
    need = [max(0.0, math.ceil((min_shift_without_undercut(z, alpha, depth) + thinning) * 100 - 1e-9) / 100)
            for z in (driver, driven)]
    if need == [0.0, 0.0]:
        return 0.0, 0.0
    small, big = (0, 1) if driver <= driven else (1, 0)
    shifts = [0.0, 0.0]
    shifts[small] = need[small]
    mate_least = min_shift_without_undercut((driver, driven)[big], alpha, depth) + thinning
    shifts[big] = -need[small] if -need[small] >= mate_least + 0.01 else need[big]
    return shifts[0], shifts[1]


def spec_with_stages(spec: TrainSpec, train, system: ToothSystem | None = None) -> TrainSpec:
    """``spec`` with the stages of a solved ``train`` (a :class:`gearcad.ratio.Train`)."""
    system = system or load_tooth_system(spec.tooth_system)
    if spec.pressure_angle is not None:
        system = dataclasses.replace(system, pressure_angle=math.radians(spec.pressure_angle))
    from .profiles import load_fabrication

    # Each gear is thinned by about half the profile's backlash (gearcad.pair.make_pair).
    thinning = load_fabrication(spec.fabrication).backlash / 2 / (2 * spec.module * math.tan(system.pressure_angle))
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


def _equal_centres(stages: list[StageSpec], module: float, system: ToothSystem) -> list[StageSpec]:
    """Give the stage with the shorter centre distance the shift sum that reaches the longer one.

    The pinion keeps its shift against undercut; the wheel takes the rest
    (ISO 21771's centre distance from the shift sum, inverted).
    """
    from .pair import centre_distance_for_shift, total_shift_for_centre

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
    from .ratio.limits import DEFAULT_MAX_STAGE_RATIO, DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, make_limits
    from .ratio.solve import DEFAULT_STAGE_COUNTS, RatioQuery, solve_ratio
    from .ratio.target import parse_target

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
