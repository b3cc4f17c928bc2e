"""Design with a worm stage: solve as ``gearcad ratio --worm`` does, build the best train.

:func:`design_worm` reads the worm option (``STARTS[:ZMIN-ZMAX]``), runs the worm search
(:func:`gearcad.ratio.worm.solve_worm`: spur stages then the worm stage, the global optimum first),
keeps the best train if it is within the tolerance, and writes it as a train description whose
**first** stage is the worm stage: the worm is the train's input, lying across the plates
(:mod:`gearcad.trains.worm_stage`), and the spur stages follow from the wheel's shaft.  The ratio
is a product, so the order changes nothing in it (the kinematic model gives the same value; the tests
check it).  The spur stages get the shifts every designed compound train gets
(:func:`gearcad.trains.stages.spec_with_stages`).  Pure: no printing, no files.
"""

from __future__ import annotations

import math
from dataclasses import replace
from types import SimpleNamespace
from typing import Any

from ..errors import InputError, ToleranceError

__all__ = ["design_worm", "DEFAULT_DIAMETER_FACTOR", "WORM_PLACE"]

#: Where a train's worm sits and why, as the report, the README and the ratio search say it.
WORM_PLACE = ("the worm stage is the first stage, the worm the train's input: its axis lies parallel to the plates "
              "in two bearing blocks and a motor or crank turns its end; the ratio search lists the worm last, and "
              "the ratio is the same product in either order; a worm after the spur stages would need a right-angle "
              "link from a plate shaft (bevel or crossed-helical gears), which gearcad does not make; so the spur "
              "stages' backlash reaches the output undivided by the worm's ratio")

#: The worm's diameter factor when none is given: q = 10, a common choice for single-start worms
#: (DIN 3976's preferred series holds it, from memory).
DEFAULT_DIAMETER_FACTOR = 10.0


def design_worm(common: Any, limits: Any, worm: str, stages: int | None, *, diameter_factor: float | None = None,
                form: str = "za", tool_diameter: float | None = None) -> tuple[Any, float, Any]:
    """The best train ending in a worm stage for ``common.target``: (train description, relative error, the search's train).

    Parameters
    ----------
    common : gearcad.trains.design._Common
        Target, module (the worm's axial module and the spur stages' module), thickness, profiles, name, tolerance.
    limits : gearcad.ratio.limits.Limits
        The spur stages' limits (the wheel takes their tooth range unless the option gives one).
    worm : str
        ``STARTS`` or ``STARTS:WHEEL_MIN-WHEEL_MAX``.
    stages : int, optional
        Every stage, the worm's included (default: 1, 2 and 3 tried).
    diameter_factor : float, optional
        The worm's ``q`` (default :data:`DEFAULT_DIAMETER_FACTOR`).
    form : str
        Flank form: ``za``, ``zi``, ``zn`` or ``zk``.
    tool_diameter : float, optional
        A ZK worm's cutting disc diameter, mm.

    Raises
    ------
    InputError
        Bad worm option, a direction asked for, a helix, or worm figures out of bounds.
    ToleranceError
        No train within the tolerance.
    """
    from ..meshes.worm import MAX_LEAD_ANGLE
    from ..profiles import load_tooth_system
    from ..ratio.target import parse_target
    from ..validate import finite
    from ..ratio.worm import make_worm_query, parse_worm_option, solve_worm
    from .spec import GearSpec, SolverSpec, StageSpec, TrainSpec, WormSpec
    from .stages import spec_with_stages

    if common.helix:
        raise InputError("--helix cannot stand with --worm: the wheel's helix is the worm's lead angle; allowed: "
                         "leave out --helix")
    form = str(form).lower()
    if form == "zk" and tool_diameter is None:
        raise InputError("a ZK worm needs --worm-tool-diameter MM (the diameter of the biconical disc that cuts it); "
                         "allowed: give it, or another --worm-flank")
    if form != "zk" and tool_diameter is not None:
        raise InputError(f"--worm-tool-diameter belongs to a ZK worm, not {form.upper()}; allowed: --worm-flank zk, "
                         "or leave it out")
    system = load_tooth_system(common.system)
    target = parse_target(common.target)
    option = parse_worm_option(worm, limits, system.pressure_angle)
    q = DEFAULT_DIAMETER_FACTOR if diameter_factor is None else finite(diameter_factor, "--worm-diameter-factor")
    gamma = math.degrees(math.atan2(option.starts, q))
    if form in MAX_LEAD_ANGLE and gamma > MAX_LEAD_ANGLE[form] + 1e-12:  # said in the command's words
        raise InputError(f"a worm of {option.starts} start(s) and q = {q:g} has a lead angle of {gamma:.3f} degrees, "
                         f"beyond the {form.upper()} form's {MAX_LEAD_ANGLE[form]:g}; allowed: fewer starts, a larger "
                         "--worm-diameter-factor" + (", or --worm-flank zi" if form == "za" else ""))
    worm_spec = WormSpec(option.starts, q, form, tool_diameter=tool_diameter)  # its own bounds (form, lead angle, q) before the search
    query = make_worm_query(target, option, limits, stages, 1)
    trains = solve_worm(query)
    if not trains:
        raise ToleranceError(f"no train with a worm of {option.starts} start(s) reaches {common.target} within the "
                             f"limits ({limits.describe()}); nothing was built")
    best = trains[0]
    if abs(best.relative_error) > common.tolerance:
        text = " ".join(f"{d}/{n}" + (" worm" if w else "") for d, n, w in best.stages)
        raise ToleranceError(f"no train within tolerance {common.tolerance:g} of {common.target}: the best found is "
                             f"{best.numerator}/{best.denominator} ({text}, relative error {best.relative_error:+.3e}); "
                             "nothing was built; a wider wheel range, more stages or another tooth range may reach it",
                             best.relative_error)
    base = TrainSpec(name=common.name, module=common.module, thickness=common.thickness, stages=(),
                     target=common.target, tooth_system=common.system, fabrication=common.profile, bore=common.bore,
                     title=f"Train for {common.target}: the worm first (the input), then the spur stages",
                     solver=SolverSpec(ratio=common.target))
    spur = spec_with_stages(base, SimpleNamespace(stages=best.spur, shifts=None, idler=None)) if best.spur else base
    first = StageSpec(GearSpec(option.starts), GearSpec(best.wheel), worm=worm_spec)
    spec = replace(spur, stages=(first,) + spur.stages, target=common.target, solver=None)
    from .worm_stage import worm_pair_of

    worm_pair_of(spec)  # the pair's own bounds, before anything is planned
    return spec, best.relative_error, best
