"""Trains with a worm stage: spur stages from the input, then a worm driving its wheel on the output.

The ratio (output turns per input turn) of such a train is ``(P / Q) * z1 / z2``: the spur stages'
driver and driven products, the worm's starts and the wheel's teeth.  The worm stage is exact, so for
each wheel ``z2`` the spur part must approach ``T z2 / z1`` and its relative error is the whole train's.
The search runs the exact compound search (:func:`gearcad.ratio.compound.solve_compound`) for every
wheel in the range and every spur stage count, and merges: the first result is the global optimum
(least |relative error|, ties to fewer teeth), as the compound search's is for its own target.

Every reported ratio comes from the kinematic model (:mod:`gearcad.ratio.kinematics`, the worm mesh
``z1 w_worm = z2 w_wheel``).  Pure computation, no I/O.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Callable, Sequence

from ..errors import InputError
from ..meshes.worm import STARTS_RANGE, min_wheel_teeth
from ..validate import as_int
from .compound import solve_compound, stage_ratio_range
from .kinematics import Gear, Mesh, make_network, network_ratio
from .limits import MAX_STAGES, Limits
from .reach import Reach, largest_stage_ratio
from .target import Target
from .train import Train, exact_relative_error

__all__ = ["WormStage", "WormTrain", "WormQuery", "parse_worm_option", "make_worm_query", "solve_worm",
           "worm_train_network", "worm_train_ratio", "WHEEL_BOUNDS", "worm_reach", "worm_reach_note"]

#: Fewest and most wheel teeth a search may try.
WHEEL_BOUNDS = (4, 1000)
#: Most wheels one search may try (each runs a compound search per stage count).
MAX_WHEELS = 1000
Progress = Callable[[float], None]


@dataclass(frozen=True)
class WormStage:
    """The worm stage of a search: starts and the range of wheel teeth (inclusive)."""

    starts: int
    wheel_min: int
    wheel_max: int


def parse_worm_option(text: str, limits: Limits, pressure_angle: float = math.radians(20.0)) -> WormStage:
    """Read ``STARTS`` or ``STARTS:WHEEL_MIN-WHEEL_MAX``.

    Without a range the wheel takes the limits' tooth range, from no fewer teeth than the worm
    generates without undercut at ``pressure_angle`` (radians; 18 at 20 degrees, ISO 21771's limit).

    Raises
    ------
    InputError
        Unreadable text, starts out of range, a range out of bounds or below the undercut limit.
    """
    match = re.fullmatch(r"\s*(\d+)\s*(?::\s*(\d+)\s*-\s*(\d+)\s*)?", str(text))
    if not match:
        raise InputError(f"worm {text!r} is not STARTS or STARTS:WHEEL_MIN-WHEEL_MAX (e.g. 1 or 1:90-360)")
    starts = as_int(match.group(1), "worm starts")
    if not STARTS_RANGE[0] <= starts <= STARTS_RANGE[1]:
        raise InputError(f"worm starts must be from {STARTS_RANGE[0]} to {STARTS_RANGE[1]}, got {starts}")
    least = math.ceil(min_wheel_teeth(pressure_angle) - 1e-9)
    if match.group(2) is None:
        low, high = max(limits.min_teeth, least), limits.max_teeth
        if low > high:
            raise InputError(f"the tooth range {limits.min_teeth}-{limits.max_teeth} holds no wheel of {least} or more "
                             f"teeth; allowed: give the wheels, e.g. --worm {starts}:{least}-120")
        return WormStage(starts, low, high)
    low, high = int(match.group(2)), int(match.group(3))
    if not WHEEL_BOUNDS[0] <= low <= high <= WHEEL_BOUNDS[1]:
        raise InputError(f"wheel teeth {low}-{high} must lie from {WHEEL_BOUNDS[0]} to {WHEEL_BOUNDS[1]}, "
                         "smallest first")
    if low < least:
        raise InputError(f"wheel teeth {low} is too few: a worm of 20 degrees undercuts wheels below {least} teeth; "
                         f"allowed: a range from {least}")
    return WormStage(starts, low, high)


@dataclass(frozen=True)
class WormTrain:
    """Spur stages then a worm stage.

    Attributes
    ----------
    spur : tuple of (int, int)
        (driver, driven) of each spur stage, input first (may be empty).
    starts, wheel : int
        The worm's starts and the wheel's teeth (the last stage).
    numerator, denominator : int
        The exact ratio (output turns per input turn), reduced, from the kinematic model.
    relative_error : float
        ``ratio / target - 1``, exact rational arithmetic.
    total_teeth : int
        Teeth of every spur gear plus the wheel's teeth plus the worm's starts.
    """

    spur: tuple[tuple[int, int], ...]
    starts: int
    wheel: int
    numerator: int
    denominator: int
    relative_error: float
    total_teeth: int

    @property
    def ratio(self) -> float:
        """The ratio as a float."""
        return self.numerator / self.denominator

    @property
    def fraction(self) -> Fraction:
        """The exact ratio."""
        return Fraction(self.numerator, self.denominator)

    @property
    def stages(self) -> tuple[tuple[int, int, bool], ...]:
        """Every stage as (driver, driven, is_worm), input first; the worm stage is last."""
        return tuple((d, n, False) for d, n in self.spur) + ((self.starts, self.wheel, True),)


def worm_train_network(spur: Sequence[tuple[int, int]], starts: int, wheel: int):
    """The kinematic network of spur stages then a worm stage; returns (network, input, output)."""
    gears, meshes = [], []
    for k, (driver, driven) in enumerate(spur):
        gears += [Gear(f"s{k}-driver", f"shaft{k}", driver), Gear(f"s{k}-driven", f"shaft{k + 1}", driven)]
        meshes.append(Mesh(f"s{k}-driver", f"s{k}-driven"))
    n = len(spur)
    gears += [Gear("worm", f"shaft{n}", starts), Gear("wheel", f"shaft{n + 1}", wheel)]
    meshes.append(Mesh("worm", "wheel", worm=True))
    return make_network(gears, meshes), "shaft0", f"shaft{n + 1}"


def worm_train_ratio(spur: Sequence[tuple[int, int]], starts: int, wheel: int) -> Fraction:
    """|output turns per input turn| of spur stages then a worm stage, from the kinematic model."""
    network, first, last = worm_train_network(spur, starts, wheel)
    return abs(network_ratio(network, (), first, last))


def _make(spur: Sequence[tuple[int, int]], starts: int, wheel: int, target: Target) -> WormTrain:
    ratio = worm_train_ratio(spur, starts, wheel)
    error = exact_relative_error(ratio.numerator, ratio.denominator, target)
    total = sum(d + n for d, n in spur) + starts + wheel
    return WormTrain(tuple((int(d), int(n)) for d, n in spur), starts, wheel, ratio.numerator, ratio.denominator,
                     float(error), total)


@dataclass(frozen=True)
class WormQuery:
    """A worm search: target, the worm stage, the spur stage counts, limits, results per stage count."""

    target: Target
    worm: WormStage
    spur_counts: tuple[int, ...]
    limits: Limits
    count: int = 1


def make_worm_query(target: Target, worm: WormStage, limits: Limits, stages: int | None = None,
                    count: int = 1) -> WormQuery:
    """Check a query.  ``stages`` counts every stage, the worm included (default: 1, 2 and 3).

    Raises
    ------
    InputError
        A stage count out of range, an idler direction asked for (crossed axes have none), too many wheels.
    """
    if limits.direction is not None:
        raise InputError("--direction does not apply to a train with a worm stage: the wheel's sense follows the "
                         "worm's hand (right or left), not a mesh count; allowed: leave --direction out")
    if stages is None:
        counts: tuple[int, ...] = (0, 1, 2)
    else:
        k = as_int(stages, "stages")
        if not 1 <= k <= MAX_STAGES:
            raise InputError(f"stages must be from 1 to {MAX_STAGES} (the worm stage included), got {stages!r}")
        counts = (k - 1,)
    if worm.wheel_max - worm.wheel_min + 1 > MAX_WHEELS:
        raise InputError(f"wheel range {worm.wheel_min}-{worm.wheel_max} spans more than {MAX_WHEELS} wheels; "
                         "allowed: a narrower range")
    count = as_int(count, "count")
    if count < 1:
        raise InputError(f"count must be 1 or more, got {count}")
    return WormQuery(target, worm, counts, limits, count)


def _rank(train: WormTrain, target: Target) -> tuple:
    error = abs(exact_relative_error(train.numerator, train.denominator, target))
    return (error, train.total_teeth, train.fraction, train.stages)


def _remainder(target: Target, starts: int, wheel: int) -> Target:
    """The target of the spur part for one wheel: ``T z2 / z1``, exact (and its rational stand-in)."""
    scale = Fraction(wheel, starts)
    rational = target.rational * scale if target.rational is not None else None
    approx = target.approx * scale
    return Target(f"({target.expression})*{wheel}/{starts}", target.exact * wheel / starts, float(approx),
                  rational, approx)


def _worm_alone(query: WormQuery) -> list[WormTrain]:
    w = query.worm
    trains = [_make((), w.starts, z2, query.target) for z2 in range(w.wheel_min, w.wheel_max + 1)
              if z2 not in query.limits.exclude]
    return trains


def _wheels(query: WormQuery) -> list[int]:
    w = query.worm
    return [z for z in range(w.wheel_min, w.wheel_max + 1) if z not in query.limits.exclude]


def _floor(remainder: Target, span: tuple[Fraction, Fraction]) -> float:
    """The least |relative error| any spur part within ``span`` can give against ``remainder``.

    A spur ratio ``r`` gives the whole train the error ``r / R - 1`` (``R`` the remainder), so within
    reach the floor is 0 and beyond it the error of the nearer end of the span.
    """
    low, high = span
    if remainder.approx < low:
        return float(low) / remainder.approx - 1
    if remainder.approx > high:
        return 1 - float(high) / remainder.approx
    return 0.0


def _with_spur(query: WormQuery, k: int, progress: Progress | None) -> list[WormTrain]:
    """The best ``count`` trains (distinct ratios) of ``k`` spur stages and the worm, every wheel tried or proved
    unable to compete.

    The wheels whose spur part lies within the spur stages' reach go first (their error floor is 0); a wheel
    whose floor (:func:`_floor`) exceeds the ``count``-th best error found so far cannot place a train among
    the best, so its search is skipped.  The list is merged wheel by wheel: a train once pushed out of it never
    returns, so the result equals the search over every wheel.
    """
    w = query.worm
    span = stage_ratio_range(query.limits, k)
    if span is None:
        return []
    wheels = sorted(((_floor(_remainder(query.target, w.starts, z2), span), z2) for z2 in _wheels(query)))
    best: list[WormTrain] = []
    for i, (floor, z2) in enumerate(wheels):
        # Trains worse than the count-th best so far cannot enter the list (a hair of slack keeps exact ties).
        cap = abs(best[-1].relative_error) * (1 + 1e-9) + 1e-300 if len(best) == query.count else None
        if cap is not None and floor > cap:
            break  # the wheels are sorted by floor: no later one can do better either
        spur: list[Train] = solve_compound(_remainder(query.target, w.starts, z2), k, query.limits, query.count,
                                           cap=cap)
        best = _best_distinct(best + [_make(t.stages, w.starts, z2, query.target) for t in spur], query.target,
                              query.count)
        if progress is not None:
            progress((i + 1) / len(wheels))
    return best


def _best_distinct(trains: list[WormTrain], target: Target, count: int) -> list[WormTrain]:
    """The best ``count`` trains, one per distinct ratio (the one with the fewest teeth)."""
    out, seen = [], set()
    for t in sorted(trains, key=lambda t: _rank(t, target)):
        if t.fraction in seen:
            continue
        seen.add(t.fraction)
        out.append(t)
        if len(out) == count:
            break
    return out


def solve_worm(query: WormQuery, progress: Progress | None = None) -> list[WormTrain]:
    """The best trains ending in a worm stage, ``query.count`` per spur stage count, best first.

    Returns
    -------
    list of WormTrain
        Sorted by |relative error|, then total teeth; empty when nothing meets the limits.
    """
    results: list[WormTrain] = []
    counts = query.spur_counts
    for n, k in enumerate(counts):
        def step(fraction: float, n: int = n) -> None:
            if progress is not None:
                progress((n + fraction) / len(counts))
        found = _worm_alone(query) if k == 0 else _with_spur(query, k, step)
        results += _best_distinct(found, query.target, query.count)
    return sorted(results, key=lambda t: _rank(t, query.target))


def worm_reach(query: WormQuery) -> Reach:
    """The ratios the query's trains can have: the spur stages' reach times the worm stage's.

    ``k`` spur stages of largest stage ratio ``s`` reach ``[s^-k, s^k]`` (:mod:`gearcad.ratio.reach`); the worm
    stage ``z1 / z2`` lies within ``[z1 / z2max, z1 / z2min]``.  Every interval holds ratio 1's neighbourhood,
    so the union over the stage counts is the interval of the most spur stages.  ``stage_counts`` counts the
    worm stage.
    """
    counts = tuple(k + 1 for k in query.spur_counts)
    return Reach(counts, *_span(query, max(query.spur_counts)))


def _span(query: WormQuery, k: int) -> tuple[Fraction, Fraction]:
    """Least and greatest ratio of ``k`` spur stages and the worm stage (both 0 when the limits allow none)."""
    wheels = _wheels(query)
    s = largest_stage_ratio(query.limits)
    if not wheels or (k > 0 and (s is None or s < 1)):
        return Fraction(0), Fraction(0)
    s = s if k > 0 else Fraction(1)
    starts = query.worm.starts
    return Fraction(starts, max(wheels)) / s ** k, Fraction(starts, min(wheels)) * s ** k


def worm_reach_note(query: WormQuery) -> str:
    """One line: the target, what the worm query reaches, and what would reach it."""
    reach = worm_reach(query)
    t = query.target
    w = query.worm
    counts = reach.stage_counts
    stages = f"{counts[0]} stage{'s' * (counts[0] != 1)}" if len(counts) == 1 else f"{min(counts)} to {max(counts)} stages"
    head = (f"target {t.expression} = {float(t.approx):.6g} cannot be reached: {stages} (the worm's included) under the "
            f"limits ({query.limits.describe()}; worm {w.starts} start{'s' * (w.starts != 1)}, wheel "
            f"{w.wheel_min}-{w.wheel_max} teeth) reach {reach.describe()}")
    if reach.high == 0:
        return head + "; no stage obeys the limits: widen the tooth range or the stage ratio"
    ways = []
    s = largest_stage_ratio(query.limits) or Fraction(1)
    k = max(query.spur_counts)
    value = Fraction(t.approx)
    spans = ((n, _span(query, n)) for n in range(k + 1, MAX_STAGES))
    more = next((n for n, (low, high) in spans if low <= value <= high), None)
    if more is not None:
        ways.append(f"--stages {more + 1}")
    for n in range(k, MAX_STAGES):  # the fewest spur stages whose reach a wider wheel range or more starts extends
        stages_text = "" if n == k else f"--stages {n + 1} "
        if value < reach.low:
            need = math.ceil(w.starts / (float(t.approx) * float(s) ** n) * (1 - 1e-12))
            if need <= WHEEL_BOUNDS[1]:
                ways.append(f"{stages_text}--worm {w.starts}:{w.wheel_min}-{max(need, w.wheel_min)}")
                break
        else:
            need = math.ceil(float(t.approx) * w.wheel_min / float(s) ** n * (1 - 1e-12))
            if need <= STARTS_RANGE[1]:
                ways.append(f"{stages_text}--worm {need} (more starts)")
                break
    ways.append("no worm: a compound, planetary or summing train (--kind)")
    return head + "; would reach it: " + "; or ".join(ways)
