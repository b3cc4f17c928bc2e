"""The thread table: for each thread, the best change-gear train from the shelf that fits the frame.

For one thread of pitch ``p`` the change gears must turn the leadscrew
``R = p / (P_ls * f)`` times per stud turn (``P_ls`` the leadscrew pitch, ``f`` the
fixed gearing's stud turns per spindle turn; the lead-screw rule, common
practice).  The ratio solver (:func:`gearcad.ratio.solve_ratio` with the shelf
as inventory, one and two stages) ranks the distinct ratios the shelf can make
by their exact error.  Ratio by ratio, best first, every way of mounting it
(which gear on the stud, which pair or idler on the intermediate stud, which on
the leadscrew) is placed on the frame (:func:`gearcad.lathe.frame.place`); the
first ratio with a train that fits gives the row, its simplest train the best:
an idler before a compound pair, then a train with a module or more to spare on
every rule before a tight one (measured figures are never exact; common
practice), then fewest teeth, then the widest margin.
A better ratio whose every train misses the frame is reported beside it.

When the best train is not exact and the pitch is rational, exact trains that
need one gear not on the shelf are searched (three gears from the shelf, the
fourth computed) and the simplest that fits is offered with the missing gear.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Iterator, Sequence

import numpy as np

from ..errors import InputError
from ..ratio.limits import make_limits
from ..ratio.products import Factorizer
from ..ratio.solve import RatioQuery, solve_ratio
from ..ratio.target import Target, parse_target
from ..ratio.train import exact_relative_error
from .frame import Frame, FrameFit, Setup, place
from .machine import Machine
from .threads import Pitch

__all__ = ["Candidate", "ThreadRow", "ThreadTable", "thread_table", "thread_row", "arrangements",
           "one_gear_short", "reachable_pitches", "can_cut", "APPROACH_LIMIT", "DEFAULT_TOLERANCE", "error_um"]

#: Beyond this |relative error| a pitch counts as out of the shelf's reach (bad input).
APPROACH_LIMIT = 0.05
#: Default tolerance of a thread's |relative error| (25 um over 25 mm of thread).
DEFAULT_TOLERANCE = 1e-3
#: Thread length over which the error is stated in micrometres, mm.
ERROR_LENGTH = 25.0
_COUNTS = (3, 12, 48)  # ratios asked of the solver per stage count, widened while nothing fits


def error_um(relative_error: float, length: float = ERROR_LENGTH) -> float:
    """The pitch error accumulated over ``length`` mm of thread, micrometres."""
    return relative_error * length * 1000.0


@dataclass(frozen=True)
class Candidate:
    """One train for one thread: its setup, exact ratio, error and fit."""

    setup: Setup
    ratio: Fraction
    relative_error: float
    fit: FrameFit
    missing: tuple[int, ...] = ()

    @property
    def exact(self) -> bool:
        """Whether the ratio equals the wanted one exactly."""
        return self.relative_error == 0.0


@dataclass(frozen=True)
class ThreadRow:
    """One thread of the table.

    Attributes
    ----------
    pitch : Pitch
    target : Target
        The change-gear ratio wanted (leadscrew turns per stud turn).
    best : Candidate
        The best train that fits, or (``best.fit.fits`` False) the nearest
        miss when no train of the shelf fits.
    alternative : Candidate or None
        The next-best train with other gears: exact too when one exists.
    better_unfit : Candidate or None
        A train of a better ratio than ``best`` that does not fit the frame.
    with_missing : Candidate or None
        An exact train that needs a gear not on the shelf (``missing``).
    tolerance : float
    """

    pitch: Pitch
    target: Target
    best: Candidate
    alternative: Candidate | None
    better_unfit: Candidate | None
    with_missing: Candidate | None
    tolerance: float

    @property
    def within_tolerance(self) -> bool:
        """Whether the best train fits and its |error| is within the tolerance."""
        return self.best.fit.fits and abs(self.best.relative_error) <= self.tolerance


@dataclass(frozen=True)
class ThreadTable:
    """Every row, with the machine they were worked out for."""

    machine: Machine
    rows: tuple[ThreadRow, ...]
    tolerance: float


def _shelf(machine: Machine) -> Counter:
    return Counter(dict(machine.shelf.counts))


def _on_shelf(gears: Iterable[int], shelf: Counter) -> bool:
    return all(shelf[z] >= n for z, n in Counter(gears).items())


def arrangements(ratio: Fraction, shelf: Counter, kinds: str = "idler,compound") -> Iterator[Setup]:
    """Every way of mounting ``ratio`` with the gears of ``shelf`` (each physical gear once).

    Simple trains (``idler``: stud gear, idler, leadscrew gear) and compound
    trains (``compound``: stud gear, intermediate driven and driver, leadscrew
    gear), simple ones first; the two drivers or the two driven gears of a
    compound train are tried in both places.
    """
    teeth = sorted(z for z in shelf if shelf[z] > 0)
    members = set(teeth)
    p, q = ratio.numerator, ratio.denominator
    if "idler" in kinds:
        for stud in teeth:
            if (stud * q) % p == 0 and (stud * q) // p in members:
                lead = (stud * q) // p
                for idler in teeth:
                    if _on_shelf((stud, idler, lead), shelf):
                        yield Setup(stud, (idler,), lead)
    if "compound" not in kinds:
        return
    factorizer = Factorizer(teeth)
    for driven in teeth:
        for lead in teeth:
            product = p * driven * lead
            if product % q:
                continue
            for low, high in factorizer.factorizations(product // q, 2):
                for stud, driver in {(low, high), (high, low)}:
                    if _on_shelf((stud, driven, driver, lead), shelf):
                        yield Setup(stud, (driven, driver), lead)


def _rank(candidate: Candidate, comfort: float = 0.0) -> tuple:
    """Simplest first: fewer gears, then trains with ``comfort`` mm to spare, then fewest teeth."""
    s = candidate.setup
    return (len(s.gears), candidate.fit.margin < comfort, sum(s.gears), -candidate.fit.margin, s.gears)


def _candidates(ratio: Fraction, target: Target, shelf: Counter, frame: Frame, kinds: str) -> list[Candidate]:
    error = _error(ratio, target)
    return [Candidate(s, ratio, error, place(s, frame)) for s in arrangements(ratio, shelf, kinds)]


def _solver_ratios(target: Target, machine: Machine, count: int) -> list[Fraction]:
    teeth = machine.shelf.teeth
    limits = make_limits(min_teeth=max(4, teeth[0]), max_teeth=min(400, teeth[-1]),
                         max_stage_ratio=teeth[-1] / teeth[0] + 1, inventory=machine.shelf)
    trains = solve_ratio(RatioQuery(target, (1, 2), limits, count=count))
    seen: dict[Fraction, None] = {}
    for train in trains:
        seen.setdefault(train.fraction, None)
    return list(seen)


def _error(ratio: Fraction, target: Target) -> float:
    return float(exact_relative_error(ratio.numerator, ratio.denominator, target))


def _key(setup: Setup) -> tuple:
    """The gears that carry the ratio: drivers and driven gears (an idler carries none)."""
    if setup.compound:
        return tuple(sorted((setup.stud, setup.intermediate[1]))), tuple(sorted((setup.intermediate[0], setup.leadscrew)))
    return (setup.stud,), (setup.leadscrew,)


def _different(a: Candidate, b: Candidate) -> bool:
    return _key(a.setup) != _key(b.setup)


def thread_row(pitch: Pitch, machine: Machine, frame: Frame, tolerance: float = DEFAULT_TOLERANCE) -> ThreadRow:
    """The row of one thread (see the module notes).

    Raises
    ------
    InputError
        No train of the shelf comes within :data:`APPROACH_LIMIT` of the pitch.
    """
    target = parse_target(pitch.ratio_expression(machine.advance_per_stud_turn))
    shelf = _shelf(machine)
    best = alternative = better_unfit = None
    done: set[Fraction] = set()
    for count in _COUNTS:
        ratios = _solver_ratios(target, machine, count)
        if not ratios or abs(_error(ratios[0], target)) > APPROACH_LIMIT:
            raise InputError(_out_of_reach(pitch, machine))
        for ratio in (r for r in ratios if r not in done):
            done.add(ratio)
            found: list[Candidate] = []
            for kinds in ("idler", "compound"):  # simple trains rank first: compounds only when still needed
                more = _candidates(ratio, target, shelf, frame, kinds)
                found += more
                fitting = sorted((c for c in more if c.fit.fits), key=lambda c: _rank(c, frame.module))
                if best is None and fitting:
                    best, fitting = fitting[0], fitting[1:]
                if best is not None and alternative is None:
                    alternative = next((c for c in fitting if _different(c, best)), None)
                if best is not None and alternative is not None:
                    break
            if best is None and found and better_unfit is None:  # the nearest miss of the best ratio
                better_unfit = max(found, key=lambda c: (c.fit.margin, -len(c.setup.gears)))
            if alternative is not None:
                break
        if alternative is not None or len(ratios) < count:  # settled, or the shelf has no more ratios
            break
    if best is None:  # nothing fits: the nearest miss of the best ratio stands in the row
        best, better_unfit = better_unfit, None
    if best is None or abs(best.relative_error) > APPROACH_LIMIT:
        raise InputError(_out_of_reach(pitch, machine))
    if better_unfit is not None and abs(better_unfit.relative_error) >= abs(best.relative_error):
        better_unfit = None  # an equally good ratio that does not fit is no loss
    missing = None
    if not best.exact and target.rational is not None:
        missing = one_gear_short(target.rational, shelf, frame, machine.largest_gear, target)
    return ThreadRow(pitch, target, best, alternative, better_unfit, missing, tolerance)


def one_gear_short(ratio: Fraction, shelf: Counter, frame: Frame, largest: int, target: Target,
                   smallest: int = 12) -> Candidate | None:
    """The simplest exact train that fits and needs one gear not on the shelf, or None.

    Three gears come from the shelf, the fourth (``smallest`` to ``largest``
    teeth) is computed from the ratio.  Ranked like the table's trains.
    """
    teeth = sorted(z for z in shelf if shelf[z] > 0)
    found: list[Candidate] = []
    if max(ratio.numerator, ratio.denominator) > largest ** 2:  # no two gears make such a ratio
        return None

    def consider(setup: Setup) -> None:
        gears = Counter(setup.gears)
        short = gears - shelf
        if sum(short.values()) != 1 or not all(smallest <= z <= largest for z in short):
            return
        fit = place(setup, frame)
        if fit.fits:
            found.append(Candidate(setup, setup.ratio, 0.0, fit, tuple(short.elements())))

    for known in teeth:  # simple trains: stud gear or leadscrew gear missing
        for other in (Fraction(known) / ratio, Fraction(known) * ratio):
            if other.denominator == 1:
                stud, lead = (known, int(other)) if other == Fraction(known) / ratio else (int(other), known)
                for idler in teeth:
                    consider(Setup(stud, (idler,), lead))
    p, q = ratio.numerator, ratio.denominator
    z = np.asarray(teeth, dtype=np.int64)
    x, y, w = (a.ravel() for a in np.meshgrid(z, z, z, indexing="ij"))
    for top, bottom, driver_missing in ((p * x * y, q * w, True), (q * x * y, p * w, False)):
        hit = top % bottom == 0  # a missing driver a: a w / (x y) = p / q; a missing driven b: x y / (w b) = p / q
        value = np.where(hit, top // np.maximum(bottom, 1), 0)
        hit &= (value >= smallest) & (value <= largest)
        for i in np.flatnonzero(hit).tolist():
            a, xi, yi, wi = int(value[i]), int(x[i]), int(y[i]), int(w[i])
            if driver_missing:
                consider(Setup(a, (xi, wi), yi))
                consider(Setup(wi, (xi, a), yi))
            else:
                consider(Setup(xi, (a, yi), wi))
                consider(Setup(xi, (wi, yi), a))
    return min(found, key=lambda c: _rank(c, frame.module)) if found else None


def reachable_pitches(machine: Machine) -> tuple[float, float]:
    """Least and greatest pitch any train of the shelf could cut on this machine, mm (a bound)."""
    gears = sorted(machine.shelf.as_counter().elements())
    low = Fraction(gears[0] * gears[1], gears[-1] * gears[-2]) if len(gears) >= 4 else Fraction(gears[0], gears[-1])
    high = 1 / low
    scale = machine.advance_per_stud_turn
    return float(low * scale), float(high * scale)


def _out_of_reach(pitch: Pitch, machine: Machine) -> str:
    low, high = reachable_pitches(machine)
    shown = pitch.name if pitch.kind == "mm" else f"{pitch.name} ({pitch.mm:.4g} mm)"
    return (f"thread {shown} is out of reach of the shelf of {machine.name}: no train "
            f"comes within {APPROACH_LIMIT:.0%}; allowed: pitches from about {low:.3g} to {high:.3g} mm")


def _frame(machine: Machine, tolerance: float, addendum: float | None = None) -> Frame:
    """The machine's frame, after checking the tolerance (addendum: the tooth system's unless given)."""
    if not 0 < tolerance < APPROACH_LIMIT:
        raise InputError(f"tolerance must be greater than 0 and less than {APPROACH_LIMIT}, got {tolerance!r}")
    if addendum is None:
        from ..profiles import load_tooth_system

        addendum = load_tooth_system(machine.tooth_system).addendum
    return Frame.of_machine(machine, addendum)


def thread_table(machine: Machine, pitches: Sequence[Pitch], tolerance: float = DEFAULT_TOLERANCE,
                 addendum: float | None = None) -> ThreadTable:
    """The table of ``pitches`` for ``machine`` (one :class:`ThreadRow` each, in order).

    Parameters
    ----------
    machine : Machine
    pitches : sequence of Pitch
    tolerance : float
        Largest |relative error| a thread may have to count as cut.
    addendum : float, optional
        Addendum of the tooth system in modules (default: the machine's tooth
        system's).
    """
    frame = _frame(machine, tolerance, addendum)
    return ThreadTable(machine, tuple(thread_row(p, machine, frame, tolerance) for p in pitches), tolerance)


def can_cut(machine: Machine, pitches: Sequence[Pitch], tolerance: float = DEFAULT_TOLERANCE) -> tuple[ThreadTable, tuple[Pitch, ...]]:
    """What the shelf can cut: the rows within tolerance that fit, and the pitches it cannot reach.

    A pitch out of reach altogether counts as not cut (no error is raised).
    """
    frame = _frame(machine, tolerance)
    rows: list[ThreadRow] = []
    missed: list[Pitch] = []
    for pitch in pitches:
        try:
            row = thread_row(pitch, machine, frame, tolerance)
        except InputError:  # out of reach altogether
            missed.append(pitch)
            continue
        if row.within_tolerance:
            rows.append(row)
        else:
            missed.append(pitch)
    return ThreadTable(machine, tuple(rows), tolerance), tuple(missed)

