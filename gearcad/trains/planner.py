"""The one entry point of planning: a train description of any kind to its :class:`Plan`.

Each kind has its own planner (compound trains in :mod:`.plan`, planetary sets in
:mod:`.epicyclic`, summing trains in :mod:`.differential`, trains with a worm stage in
:mod:`.worm_stage`); all return the same
:class:`~gearcad.trains.plan.Plan`, so the writers and the report need no branch per kind.
"""

from __future__ import annotations

from ..geometry.generate import DEFAULT_TOLERANCE
from .differential import plan_summing
from .epicyclic import plan_planetary
from .layout import ALTERNATIVES
from .plan import InputLoad, Plan, plan_compound
from .process import process_check
from .spec import TrainSpec
from .supports import complete_plan

__all__ = ["plan_train"]


def plan_train(spec: TrainSpec, tolerance: float = DEFAULT_TOLERANCE, load: InputLoad | None = None) -> Plan:
    """Every figure, outline, position and check of the train ``spec``; with ``load``, the load ratings too.

    Every gear part is held against the fabrication process (``gearcad.trains.process``).
    A compound train whose best layout leaves a shaft on a stud is planned again on the layout search's other
    placements (:data:`gearcad.trains.layout.ALTERNATIVES` at most) and keeps the one that holds most shafts at two
    points.
    The plan comes with its mechanism (``gearcad.trains.supports``): what holds every shaft, the
    bought parts, the frame plates with every hole, and the assembly's interference check.
    """
    if spec.planetary is not None:
        return complete_plan(process_check(plan_planetary(spec, tolerance, load)))
    if spec.summing is not None:
        return complete_plan(process_check(plan_summing(spec, tolerance, load)))
    if spec.stages and spec.stages[0].worm is not None:
        from .worm_mount import finish_worm
        from .worm_stage import plan_worm

        plan, wanted = plan_worm(spec, tolerance, load)
        return finish_worm(complete_plan(process_check(plan), wanted))
    plan, wanted = plan_compound(spec, tolerance, load)
    best = complete_plan(process_check(plan), wanted)
    k = 1
    while _studs(best)[:2] != (0, 0) and k <= ALTERNATIVES:
        # A shaft left on a stud (the last resort): the layout search's other placements, the first that holds
        # every shaft at two points, else the one with the fewest studs (then bridges, then the smaller plate).
        other = plan_compound(spec, tolerance, load, alternative=k)
        if other is None:
            break
        trial = complete_plan(process_check(other[0]), other[1])
        if _studs(trial) < _studs(best):
            best = trial
        k += 1
    return best


def _studs(plan: Plan) -> tuple[int, int, int, float]:
    """A plan's ranking: studs whose pipe finds no room, studs the train file did not name, bridges, plate area."""
    mech = plan.mechanism
    failed = sum(1 for f in plan.findings if f.check.startswith("stud ") and f.severity == "failure")
    studs = sum(1 for s in mech.shafts if s.kind == "stud" and s.name not in plan.spec.studs)
    return failed, studs, len(mech.bridges), plan.layout.width * plan.layout.height
