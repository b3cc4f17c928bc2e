"""The optimal search for planetary sets: every set within the limits, ranked by error, proven best.

The set, its ratio and its three conditions live in :mod:`gearcad.ratio.planetary_set`;
this module scans sun, planet and ring tooth counts in numpy, evaluates the ratio formula
the kinematic model derives, keeps the sets that meet the coaxial, assembly and neighbour
conditions in bulk, and checks each reported set in full.  Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from typing import Callable, Sequence

import numpy as np
import sympy

from ..errors import InputError
from .limits import Limits
from .target import Target
from .train import exact_relative_error
from .planetary_set import (Arrangement, Conditions, DEFAULT_MAX_RING_TEETH, DEFAULT_PLANETS, MAX_PLANETS,
                            MIN_TOOTH_DIFFERENCE, NEIGHBOUR_MARGIN, PlanetarySet, STANDARD_ADDENDUM,
                            STANDARD_PRESSURE_ANGLE, TOOTH_SYMBOLS, check_set, checked_shift_limit, checked_teeth,
                            make_arrangement, make_set, ratio_formula, set_ratio, shift_plan)
from ..validate import as_int, finite

__all__ = [
    "PlanetaryQuery", "PlanetaryResult", "make_query", "solve_planetary", "smallest_ring_for_planets",
]

_TOL = 1e-9


# --- the search ---------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class PlanetaryQuery:
    """One planetary search (build it with :func:`make_query`)."""

    target: Target
    arrangement: Arrangement
    limits: Limits
    planets: int = DEFAULT_PLANETS
    stepped: bool = False
    max_ring_teeth: int = DEFAULT_MAX_RING_TEETH
    shift_limit: float = 0.0
    margin: float = NEIGHBOUR_MARGIN
    count: int = 1
    pressure_angle: float = STANDARD_PRESSURE_ANGLE
    addendum: float = STANDARD_ADDENDUM


@dataclass(frozen=True)
class PlanetaryResult:
    """A set found by the search, with the contract fields of a compound train.

    Attributes
    ----------
    set : PlanetarySet
    arrangement : Arrangement
    signed : Fraction
        Output turns per input turn, signed.
    relative_error : float
        ``|ratio| / target - 1`` (exact, then rounded).
    conditions : Conditions
    """

    set: PlanetarySet
    arrangement: Arrangement
    signed: Fraction
    relative_error: float
    conditions: Conditions
    stages: tuple = ()
    idler: None = None

    @property
    def fraction(self) -> Fraction:
        """``|ratio|`` exactly."""
        return abs(self.signed)

    @property
    def numerator(self) -> int:
        """Numerator of ``|ratio|``."""
        return self.fraction.numerator

    @property
    def denominator(self) -> int:
        """Denominator of ``|ratio|``."""
        return self.fraction.denominator

    @property
    def ratio(self) -> float:
        """``|ratio|`` as a float."""
        return float(self.fraction)

    @property
    def direction(self) -> str:
        """``"same"`` or ``"opposite"``: the output's sense against the input's."""
        return "same" if self.signed > 0 else "opposite"

    @property
    def total_teeth(self) -> int:
        """Teeth of every gear of the set."""
        return self.set.total_teeth


def _neighbour_bound(z_sun: int, z_planet: int, n: int, margin: float, addendum: float, slack: float) -> bool:
    """The neighbour condition without shift (``slack`` modules of allowance for shifts)."""
    return n == 1 or (z_sun + z_planet) * math.sin(math.pi / n) - (z_planet + 2 * addendum) >= margin - slack - _TOL


def smallest_ring_for_planets(limits: Limits, planets: int, margin: float = NEIGHBOUR_MARGIN,
                              addendum: float = STANDARD_ADDENDUM, shift_limit: float = 0.0) -> int | None:
    """Fewest ring teeth (``z_s + 2 z_p``, shifts allowed for) of a simple set that holds ``planets`` planets.

    A necessary bound for stepped sets too (their ring has at least as many
    teeth as a simple set with the smaller planet gear).  None: no sun and
    planet of the tooth range hold that many.
    """
    teeth = limits.teeth
    slack = 4 * shift_limit
    best = None
    for zp in teeth:
        zs = next((z for z in teeth if _neighbour_bound(z, zp, planets, margin, addendum, slack)), None)
        if zs is not None:
            ring = zs + 2 * zp - math.ceil(8 * shift_limit)
            best = ring if best is None else min(best, ring)
    return best


def make_query(target: Target, limits: Limits, arrangement: Arrangement | None = None, planets: object = None,
               stepped: bool = False, max_ring_teeth: object = None, shift_limit: object | None = None,
               margin: object = NEIGHBOUR_MARGIN, count: int = 1, pressure_angle: float = STANDARD_PRESSURE_ANGLE,
               addendum: float = STANDARD_ADDENDUM) -> PlanetaryQuery:
    """Check the inputs of a search and build its :class:`PlanetaryQuery`.

    Raises
    ------
    InputError
        An inventory (not used by planetary sets), a planet count outside
        1..MAX_PLANETS or one no ring within ``max_ring_teeth`` can hold, a
        ring limit below the smallest ring the tooth range allows, a shift
        limit outside 0..1, a negative margin.
    """
    if limits.inventory is not None:
        raise InputError("an inventory does not apply to planetary sets; allowed: a tooth range (--min-teeth, "
                         "--max-teeth, --max-ring-teeth)")
    n = as_int(DEFAULT_PLANETS if planets is None else planets, "planets")
    if not 1 <= n <= MAX_PLANETS:
        raise InputError(f"planets must be from 1 to {MAX_PLANETS}, got {planets!r}")
    ring_max = checked_teeth(DEFAULT_MAX_RING_TEETH if max_ring_teeth is None else max_ring_teeth, "max ring teeth")
    limit = checked_shift_limit(shift_limit)
    gap = finite(margin, "neighbour margin")
    if gap < 0:
        raise InputError(f"neighbour margin must be 0 or more (modules), got {margin!r}")
    low = min(limits.teeth)
    floor = max(3 * low + (1 if stepped else 0) - math.ceil(8 * limit), low + MIN_TOOTH_DIFFERENCE)
    if ring_max < floor:
        raise InputError(f"max ring teeth {ring_max} is fewer than the smallest ring the planets allow: {floor} "
                         f"(sun + planet + planet gear of at least {low} teeth); allowed: max ring teeth >= {floor}")
    smallest = smallest_ring_for_planets(limits, n, gap, addendum, limit)
    if smallest is None or smallest > ring_max:
        fits = [k for k in range(1, MAX_PLANETS + 1)
                if (smallest_ring_for_planets(limits, k, gap, addendum, limit) or ring_max + 1) <= ring_max]
        need = f"a ring of at least {smallest} teeth" if smallest is not None else "a larger sun than the range has"
        raise InputError(f"planets {n}: a ring of at most {ring_max} teeth cannot hold {n} planets of at least "
                         f"{low} teeth with {gap:g} module clearance (needs {need}); allowed: planets "
                         f"{max(fits) if fits else 1} or fewer, or a larger --max-ring-teeth")
    wanted = as_int(count, "count")
    if not 1 <= wanted <= 1000:
        raise InputError(f"count must be from 1 to 1000, got {count!r}")
    return PlanetaryQuery(target, arrangement or make_arrangement(), limits, n, bool(stepped), ring_max, limit, gap,
                          wanted, pressure_angle, addendum)


@dataclass
class _Pool:
    """The rows with the least float error seen so far (all rows at or below ``cut``)."""

    keep: int
    rows: np.ndarray | None = None
    error: np.ndarray | None = None
    cut: float = math.inf

    def add(self, rows: np.ndarray, error: np.ndarray) -> None:
        mask = error <= self.cut
        rows, error = rows[mask], error[mask]
        self.rows = rows if self.rows is None else np.concatenate([self.rows, rows])
        self.error = error if self.error is None else np.concatenate([self.error, error])
        if len(self.error) > 4 * self.keep:
            kth = float(np.partition(self.error, self.keep)[self.keep])
            self.cut = kth
            mask = self.error <= kth
            self.rows, self.error = self.rows[mask], self.error[mask]


@lru_cache(maxsize=8)
def _evaluators(stepped: bool, arrangement: Arrangement) -> tuple[Callable, Callable]:
    num, den = ratio_formula(stepped, arrangement)
    return sympy.lambdify(TOOTH_SYMBOLS, num, "numpy"), sympy.lambdify(TOOTH_SYMBOLS, den, "numpy")


@dataclass(frozen=True)
class _Plans:
    """``shift_plan`` for every sun sum and ring-difference offset ``d`` (``z_r - z_p2 = sun sum + d``)."""

    low: int
    offsets: tuple[int, ...]
    ok: np.ndarray  # [sun sum - low, offset index] bool
    shifts: np.ndarray  # [..., 4]
    centre: np.ndarray  # modules


@lru_cache(maxsize=16)
def _plans(low: int, high: int, limit: float, stepped: bool, alpha: float) -> _Plans:
    reach = math.ceil(8 * limit) + 2 if limit > 0 else 0  # |d| / 2 <= |u| + |w| <= 4X (and a little)
    offsets = tuple(range(-reach, reach + 1))
    ok = np.zeros((high - low + 1, len(offsets)), dtype=bool)
    shifts = np.zeros((high - low + 1, len(offsets), 4))
    centre = np.zeros((high - low + 1, len(offsets)))
    for i, sun_sum in enumerate(range(low, high + 1)):
        for j, d in enumerate(offsets):
            plan = shift_plan(sun_sum, sun_sum + d, limit, stepped, alpha) if sun_sum + d > 0 else None
            if plan is not None:
                ok[i, j], shifts[i, j], centre[i, j] = True, plan[:4], plan[4]
    return _Plans(low, offsets, ok, shifts, centre)


def _planets(query: PlanetaryQuery, teeth: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    if not query.stepped:
        return teeth, teeth
    p1, p2 = (a.ravel() for a in np.meshgrid(teeth, teeth, indexing="ij"))
    return p1[p1 != p2], p2[p1 != p2]


def _candidates(query: PlanetaryQuery, zs: int, teeth: np.ndarray, plans: _Plans) -> np.ndarray:
    """Rows ``(z_s, z_p1, z_p2, z_r)`` with this sun that meet all three conditions (checked in bulk)."""
    p1, p2 = _planets(query, teeth)
    index = zs + p1 - plans.low
    blocks = []
    for j, d in enumerate(plans.offsets):
        ok = plans.ok[index, j]
        if not ok.any():
            continue
        rows = np.stack([np.full(ok.sum(), zs), p1[ok], p2[ok], zs + p1[ok] + d + p2[ok]], axis=1).astype(np.int64)
        keep = _bulk_mask(query, rows, plans.shifts[index[ok], j], plans.centre[index[ok], j])
        blocks.append(rows[keep])
    return np.concatenate(blocks) if blocks else np.zeros((0, 4), dtype=np.int64)


def _bulk_mask(query: PlanetaryQuery, rows: np.ndarray, shifts: np.ndarray, centre: np.ndarray) -> np.ndarray:
    """Ring limits, assembly with equal spacing, hunting, the neighbour condition and the ring's tips clear of
    the planet's interference point (sets whose ring would dig into the planets are never offered), row by row."""
    s, p1, p2, r = rows.T
    limits, n = query.limits, query.planets
    mask = (r <= query.max_ring_teeth) & (r - p2 >= MIN_TOOTH_DIFFERENCE)
    if limits.exclude:
        mask &= ~np.isin(r, np.array(sorted(limits.exclude)))
    mask &= (s * p2 + r * p1) % (n * np.gcd(p1, p2)) == 0
    if limits.hunting:
        mask &= (np.gcd(s, p1) == 1) & (np.gcd(p2, r) == 1)
    if n > 1:  # the formula of _neighbour at module 1 with equal spacing
        tip = np.maximum(p1 + 2 * shifts[:, 1], p2 + 2 * shifts[:, 2]) + 2 * query.addendum
        mask &= 2 * centre * math.sin(math.pi / n) - tip >= query.margin - _TOL
    mask &= _ring_tips_clear(p2, r, shifts[:, 3], centre, query.pressure_angle, query.addendum)
    return mask


def _ring_tips_clear(planet: np.ndarray, ring: np.ndarray, ring_shift: np.ndarray, centre: np.ndarray, alpha: float,
                     addendum: float) -> np.ndarray:
    """Whether the ring's tips stay outside the planet's interference point (module 1, before tip shortening).

    The same margin as :func:`gearcad.meshes.internal._involute_clearance`: the ring's
    tip radius ``z_r / 2 - (h_a + x_r)`` against ``sqrt(r_b2^2 + (a_w sin(alpha_w))^2)``,
    with ``cos(alpha_w) = (z_r - z_p) cos(alpha) / (2 a_w)`` (ISO 21771).
    """
    cos_w = np.clip((ring - planet) * math.cos(alpha) / (2 * centre), -1.0, 1.0)
    along = centre * np.sqrt(1 - cos_w ** 2)
    return ring / 2 - (addendum + ring_shift) >= np.hypot(ring * math.cos(alpha) / 2, along) - _TOL


def _ratios(query: PlanetaryQuery, rows: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    f_num, f_den = _evaluators(query.stepped, query.arrangement)
    cols = [rows[:, i] for i in range(4)]
    return (np.broadcast_to(np.asarray(f_num(*cols), dtype=np.int64), len(rows)),
            np.broadcast_to(np.asarray(f_den(*cols), dtype=np.int64), len(rows)))


def _scan(query: PlanetaryQuery, keep: int) -> tuple[np.ndarray, np.ndarray, float]:
    """Every candidate row within the ``keep`` least float errors (and ties): rows, errors, cut."""
    teeth = np.array(query.limits.teeth, dtype=np.int64)
    plans = _plans(2 * int(teeth[0]), 2 * int(teeth[-1]), query.shift_limit, query.stepped, query.pressure_angle)
    pool = _Pool(keep)
    t = query.target.value
    for zs in teeth.tolist():
        rows = _candidates(query, zs, teeth, plans)
        if len(rows) == 0:
            continue
        num, den = _ratios(query, rows)
        sign = np.sign(num) * np.sign(den)
        good = (num != 0) & (den != 0)
        if query.limits.direction is not None:
            good &= sign == (1 if query.limits.direction == "same" else -1)
        rows, num, den = rows[good], np.abs(num[good]), np.abs(den[good])
        pool.add(rows, np.abs(num / (den * t) - 1))
    if pool.rows is None:
        return np.zeros((0, 4), dtype=np.int64), np.zeros(0), math.inf
    return pool.rows, pool.error, pool.cut


def _result(query: PlanetaryQuery, row: Sequence[int]) -> PlanetaryResult | None:
    zs, p1, p2, zr = (int(v) for v in row)
    pset = make_set(zs, p1, zr, query.planets, p2 if query.stepped else None)
    conditions = check_set(pset, 1.0, query.shift_limit, query.margin, query.pressure_angle, query.addendum)
    if not conditions.ok:
        return None
    signed = set_ratio(pset, query.arrangement)
    error = exact_relative_error(abs(signed).numerator, abs(signed).denominator, query.target)
    return PlanetaryResult(pset, query.arrangement, signed, float(error), conditions)


def _ranked(query: PlanetaryQuery, rows: np.ndarray) -> list[tuple[tuple, np.ndarray]]:
    """Rows in exact order: |relative error|, total teeth, ratio, tooth counts; each with its key."""
    if len(rows) == 0:
        return []
    num, den = _ratios(query, rows)
    teeth = rows[:, 0] + rows[:, 3] + query.planets * (rows[:, 1] + (rows[:, 2] if query.stepped else 0))
    keyed = []
    for i in range(len(rows)):
        ratio = Fraction(abs(int(num[i])), abs(int(den[i])))
        error = abs(exact_relative_error(ratio.numerator, ratio.denominator, query.target))
        keyed.append(((error, int(teeth[i]), ratio, tuple(int(v) for v in rows[i])), rows[i]))
    return sorted(keyed, key=lambda item: item[0])


def solve_planetary(query: PlanetaryQuery) -> list[PlanetaryResult]:
    """The best ``query.count`` sets of distinct ratios, best first.

    Exact: least |relative error| (rational arithmetic against the target),
    ties to fewer total teeth, then the smaller ratio, then the smaller tooth
    counts; every set meets all three conditions with equally spaced planets.
    One set per distinct ratio, the one with the fewest teeth.  The bulk scan
    keeps every candidate whose float error is at or below a cut; the exact
    ranking is complete when the last result lies clearly below that cut,
    else the scan is repeated with a larger pool.
    """
    keep = max(64, 32 * query.count)
    while True:
        rows, _, cut = _scan(query, keep)
        found: dict[Fraction, PlanetaryResult] = {}
        for key, row in _ranked(query, rows):
            if key[2] in found:
                continue
            result = _result(query, row)
            if result is not None:
                found[key[2]] = result
                if len(found) == query.count:
                    break
        results = list(found.values())
        if math.isinf(cut) or (len(results) == query.count and abs(results[-1].relative_error) + 1e-12 < cut):
            return results
        keep *= 8
