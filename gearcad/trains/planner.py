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
from .plan import InputLoad, Plan, plan_compound
from .process import process_check
from .spec import TrainSpec
from .supports import complete_plan

__all__ = ["plan_train"]


def plan_train(spec: TrainSpec, tolerance: float = DEFAULT_TOLERANCE, load: InputLoad | None = None) -> Plan:
    """Every figure, outline, position and check of the train ``spec``; with ``load``, the load ratings too.

    Every gear part is held against the fabrication process (``gearcad.trains.process``).
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
    return complete_plan(process_check(plan), wanted)
