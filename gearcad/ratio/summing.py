"""Summing trains: two paths from one input, recombined in a differential.

A compound train reaches a fraction exactly only when its numerator and
denominator factor into tooth counts of the allowed range.  Adding two paths
lifts that limit:

- ``mean``: a differential whose carrier turns at the mean of its two side
  members (a bevel or spur differential with equal side gears):
  ``R = (rho_A + rho_B) / 2``; the numerator ``a d +- b c`` of the sum may be
  any integer, a large prime included.
- ``planetary``: a planetary set used as a differential, the sun driven by path
  A, the ring (by teeth on its outside) by path B, the carrier the output:
  ``R = (z_s rho_A + z_r rho_B) / (z_s + z_r)`` (Willis's equation with the carrier
  free); the denominator ``z_s + z_r`` may be a prime above the largest tooth count.

Each path is one stage (driver/driven), turning the side member against the
input (one mesh) or with it (through an idler): ``rho = -a/b`` or ``+a/b``.
The search is exhaustive over the first path and exact for the second: for each
first path the needed second ratio is found among every allowed stage by
bisection of the sorted ratios and its neighbours are ranked with exact
fractions.  Pure; speeds are signed turns per input turn.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..errors import InputError

__all__ = ["SummingTrain", "solve_summing", "summing_ratio", "summing_network", "KINDS"]

KINDS = ("mean", "planetary")


@dataclass(frozen=True)
class SummingTrain:
    """A summing train.

    ``path_a``, ``path_b``: (driver, driven) teeth; ``sign_a``, ``sign_b``: +1 when the path
    turns its side member with the input (it carries an idler), -1 against it;
    ``planetary``: (sun, planet, ring, planets) for the planetary kind, else None.
    """

    kind: str
    path_a: tuple[int, int]
    sign_a: int
    path_b: tuple[int, int]
    sign_b: int
    planetary: tuple[int, int, int, int] | None
    ratio: Fraction
    relative_error: float

    @property
    def total_teeth(self) -> int:
        """Teeth of the two paths (idlers not counted) and of the differential's gears."""
        teeth = sum(self.path_a) + sum(self.path_b)
        if self.planetary:
            sun, planet, ring, count = self.planetary
            teeth += sun + ring + planet * count
        return teeth

    @property
    def axis_teeth(self) -> int | None:
        """Half-modules from the input shaft to the differential axis set by a path without idler, else None."""
        direct = [sum(p) for p, s in ((self.path_a, self.sign_a), (self.path_b, self.sign_b)) if s < 0]
        return direct[0] if direct else None


def summing_ratio(kind: str, rho_a: Fraction, rho_b: Fraction, planetary: tuple[int, int, int, int] | None = None) -> Fraction:
    """Output turns per input turn of a summing train with side-member speeds ``rho_a``, ``rho_b``."""
    if kind == "mean":
        return (rho_a + rho_b) / 2
    sun, _, ring, _ = planetary
    return (sun * rho_a + ring * rho_b) / (sun + ring)


def _stages(teeth: list[int], max_stage_ratio: float, per_sum: bool = False) -> tuple[np.ndarray, np.ndarray]:
    """Every allowed stage, one per distinct ratio (``per_sum``: per ratio and tooth sum): the fewest teeth."""
    z = np.array(teeth, dtype=np.int64)
    a, b = np.meshgrid(z, z, indexing="ij")
    ok = (a <= max_stage_ratio * b) & (b <= max_stage_ratio * a)
    a, b = a[ok], b[ok]
    g = np.gcd(a, b)
    key = (a // g) * 1_000_003 + (b // g)  # the reduced ratio; teeth stay below 10^6
    if per_sum:  # the one-axle rules tell stages of one ratio apart by their tooth sums
        key = key * 4096 + (a + b)
    order = np.lexsort((a + b, key))
    first = np.ones(len(order), dtype=bool)
    first[1:] = key[order][1:] != key[order][:-1]
    keep = order[first]
    return a[keep], b[keep]


def _ring_tips_clear(planet: int, ring: int, pressure_angle: float = math.radians(20.0), addendum: float = 1.0) -> bool:
    """Whether an unshifted ring's tip circle stays outside the planet's interference point (module 1).

    The line of action touches the ring's base circle at T2 and the planet's at
    T1, ``a sin(alpha)`` apart (internal pair: both on one side), so T1 lies
    ``sqrt(r_b2^2 + (a sin alpha)^2)`` from the ring's centre; the ring's tips
    must not reach inside it (ISO 21771's interference condition for internal
    gears, as gearcad.internal checks it).
    """
    centre = (ring - planet) / 2
    base = ring * math.cos(pressure_angle) / 2
    return ring / 2 - addendum >= math.hypot(base, centre * math.sin(pressure_angle))


def _planetary_sets(teeth: list[int], max_ring: int, planets: int, margin: float) -> list[tuple[int, int, int, int]]:
    """Standard (unshifted) sets that are coaxial, assemble with equal spacing, clear their neighbours, and whose
    ring tips stay clear of the planet's interference point."""
    out = []
    allowed = set(teeth)
    for sun in teeth:
        for planet in teeth:
            ring = sun + 2 * planet  # coaxial with one module and no shift
            if ring > max_ring or (sun + ring) % planets:
                continue
            # Neighbours: planet centres 2 a sin(pi/N) apart, tips need (z_p + 2 + margin) modules.
            if (sun + planet) * math.sin(math.pi / planets) <= planet + 2 + margin:
                continue
            if sun in allowed and planet in allowed and _ring_tips_clear(planet, ring):
                out.append((sun, planet, ring, planets))
    return out


IDLER_GAP = 6  # an idler path needs the axis 6 half-modules beyond driver + driven: tips 1 module apart; common practice
RING_FIT = 7  # outside teeth round a ring: z_outside >= z_ring + 7 leaves 1 module of rim (2.5 + 2.5 + 2); common practice


def solve_summing(target, teeth: list[int], kind: str = "mean", count: int = 5, max_stage_ratio: float = 6.0,
                  max_ring: int = 200, planets: int = 3, margin: float = 0.5, one_axis: bool = True,
                  min_axis: int = 0) -> list[SummingTrain]:
    """The ``count`` best summing trains for ``target`` (a :class:`gearcad.ratio.Target`).

    Ranked by |relative error| (exact fractions against ``target.approx``), then
    fewest teeth.  ``margin`` is the least tip gap between neighbouring planets,
    modules (common practice: 0.5).

    With ``one_axis`` (the default) both paths run from one input shaft to one
    differential axis, all gears of one module, so the train can be built:

    - a path without idler fixes the axis distance: ``S = driver + driven``
      half-modules (reference centre distance ``m S / 2``); two such paths need
      the same ``S``;
    - a path with an idler reaches any axis at least ``driver + driven + 6``
      half-modules away (its driver and driven tips then clear by a module);
    - a path without idler has ``S >= min_axis`` (room for the differential
      beside the input shaft, from the caller);
    - the planetary kind's ring is driven by teeth on its outside (path B's
      driven gear), which needs ``driven >= ring + 7``.

    The search is exact: the paths are grouped by ``S``, and under the ring
    rule each ring size is searched among the path-B stages whose driven gear
    carries it.
    """
    if kind not in KINDS:
        raise InputError(f"summing kind must be one of {', '.join(KINDS)}, got {kind!r}")
    if kind == "planetary" and planets < 2:
        raise InputError(f"a planetary differential needs at least 2 planets, got {planets!r}")
    goal = target.approx
    a, b = _stages(teeth, max_stage_ratio, per_sum=one_axis)
    sets = _planetary_sets(teeth, max_ring, planets, margin) if kind == "planetary" else [None]
    ring_fit = one_axis and kind == "planetary"
    if ring_fit:  # the ring must fit inside path B's driven gear
        sets = [s for s in sets if s[2] + RING_FIT <= max(teeth)]
    if not sets:
        raise InputError(f"no planetary set of {planets} planets fits the tooth range and a ring of at most {max_ring} teeth"
                         + (f" (and {RING_FIT} fewer than the largest tooth count, for its outside teeth)" if ring_fit else ""))
    best: dict[tuple, SummingTrain] = {}
    for sign_a in (-1, 1):
        for sign_b in (-1, 1):
            for outer_is_a, outer, pool in _groups(a + b, sign_a, sign_b, one_axis, min_axis):
                rows = max(1, 2_000_000 // (2 * len(outer)))
                for start in range(0, len(sets), rows):
                    search = _Search(kind, sets[start:start + rows], goal, sign_a, sign_b, a, b, ring_fit)
                    search.run(best, outer_is_a, outer, pool, count)
    ranked = sorted(best.values(), key=lambda t: (abs(t.relative_error), t.total_teeth, t.path_a, t.path_b))
    return ranked[:count]


def _groups(sums: np.ndarray, sign_a: int, sign_b: int, one_axis: bool, min_axis: int):
    """(outer is path A, outer stage indices, pool stage indices) for each group the rules allow.

    For every outer stage the search finds the best pool stage; a direct path
    (sign -1) is the outer one when there is one, so the groups stay small.
    """
    every = np.arange(len(sums))
    if not one_axis or (sign_a > 0 and sign_b > 0):
        yield True, every, every
        return
    by_sum = np.argsort(sums, kind="stable")
    sorted_sums = sums[by_sum]
    for s in np.unique(sorted_sums[sorted_sums >= min_axis]):
        lo, hi = np.searchsorted(sorted_sums, [s, s + 1])
        direct = by_sum[lo:hi]
        if sign_a < 0 and sign_b < 0:
            yield True, direct, direct
            continue
        idler_side = by_sum[:np.searchsorted(sorted_sums, s - IDLER_GAP + 1)]
        if len(idler_side):
            yield sign_a < 0, direct, idler_side


def _nearest(pool: np.ndarray, pool_values: np.ndarray, need: np.ndarray) -> np.ndarray:
    """For each needed ratio, the pool stage (indices sorted by ratio) whose ratio lies nearest."""
    at = np.searchsorted(pool_values, need)
    lo = pool[np.clip(at - 1, 0, len(pool) - 1)]
    hi = pool[np.clip(at, 0, len(pool) - 1)]
    lo_gap = np.where(at > 0, np.abs(pool_values[np.clip(at - 1, 0, len(pool) - 1)] - need), np.inf)
    hi_gap = np.where(at < len(pool), np.abs(pool_values[np.clip(at, 0, len(pool) - 1)] - need), np.inf)
    return np.where(lo_gap <= hi_gap, lo, hi)


class _Search:
    """One block of differentials (rows) and one sign pair: for each outer stage, the best pool stage."""

    def __init__(self, kind, block, goal, sign_a, sign_b, a, b, ring_fit) -> None:
        self.kind, self.block, self.goal = kind, block, goal
        self.sign_a, self.sign_b, self.a, self.b, self.ring_fit = sign_a, sign_b, a, b, ring_fit
        if kind == "mean":
            self.sun = self.ring = np.ones((1, 1))
        else:
            self.sun = np.array([p[0] for p in block], dtype=float)[:, None]
            self.ring = np.array([p[2] for p in block], dtype=float)[:, None]

    def run(self, best: dict, outer_is_a: bool, outer: np.ndarray, pool: np.ndarray, count: int) -> None:
        a, b, g = self.a, self.b, float(self.goal)
        values = a / b
        pool = pool[np.argsort(values[pool], kind="stable")]
        pool_values = values[pool]
        outer_values = values[outer][None, :]
        sun, ring = self.sun, self.ring
        if outer_is_a:  # the B stage needed for each A stage: rho_b = ((s + r) g - s rho_a) / r
            need = ((sun + ring) * g - sun * self.sign_a * outer_values) / ring * self.sign_b
        else:  # the A stage for each B stage: rho_a = ((s + r) g - r rho_b) / s
            need = ((sun + ring) * g - ring * self.sign_b * outer_values) / sun * self.sign_a
        if self.ring_fit and outer_is_a:  # path B (the pool) must carry the ring: each ring value its own pool
            other = np.zeros(need.shape, dtype=np.int64)
            usable = np.zeros(need.shape, dtype=bool)
            rings = self.ring[:, 0]
            for r in np.unique(rings):
                rows = np.nonzero(rings == r)[0]
                fitting = pool[b[pool] >= r + RING_FIT]  # still sorted by ratio
                if len(fitting):
                    other[rows], usable[rows] = _nearest(fitting, values[fitting], need[rows]), True
        else:
            other, usable = _nearest(pool, pool_values, need), np.ones(need.shape, dtype=bool)
            if self.ring_fit:  # path B is the outer stage: its driven gear carries the ring or nothing helps
                usable = b[outer][None, :] >= self.ring + RING_FIT
        first = np.broadcast_to(outer[None, :], other.shape) if outer_is_a else other
        second = other if outer_is_a else np.broadcast_to(outer[None, :], other.shape)
        ratio = (sun * self.sign_a * values[first] + ring * self.sign_b * values[second]) / (sun + ring)
        error = np.where(usable, np.abs(ratio / g - 1), np.inf)
        self._keep(best, first, second, error, count)

    def _keep(self, best: dict, first: np.ndarray, second: np.ndarray, error: np.ndarray, count: int) -> None:
        """Record, exactly, the candidates that may enter the ``count`` best so far."""
        a, b = self.a, self.b
        error = error.ravel()
        finite = np.isfinite(error)
        if not finite.any():
            return
        limit, most = _threshold(best, count)
        if np.isfinite(limit):
            teeth = (a[first] + b[first] + a[second] + b[second])
            if self.kind == "planetary":
                teeth = teeth + np.array([p[0] + p[2] + p[1] * p[3] for p in self.block])[:, None]
            teeth = np.broadcast_to(teeth, first.shape).ravel()
            near = error <= limit * (1 + 1e-6) + 1e-13
            clearly = error < limit * (1 - 1e-6) - 1e-13
            chosen = np.nonzero(clearly | (near & (teeth < most)))[0]
        else:
            take = max(2 * count, 8)
            chosen = np.argpartition(error, min(take, len(error) - 1))[:take]
            chosen = chosen[finite[chosen]]
        columns = first.shape[1]
        flat_first, flat_second = first.ravel(), second.ravel()
        for k in chosen:
            row = int(k) // columns
            plan = self.block[row] if self.kind == "planetary" else None
            i, j = int(flat_first[k]), int(flat_second[k])
            exact_a = Fraction(int(a[i]), int(b[i])) * self.sign_a
            exact_b = Fraction(int(a[j]), int(b[j])) * self.sign_b
            exact = summing_ratio(self.kind, exact_a, exact_b, plan)
            if exact <= 0:
                continue
            train = SummingTrain(self.kind, (int(a[i]), int(b[i])), self.sign_a, (int(a[j]), int(b[j])), self.sign_b,
                                 plan, exact, float(exact / self.goal - 1))
            key = (exact, plan)
            if key not in best or train.total_teeth < best[key].total_teeth:
                best[key] = train


def _threshold(best: dict, count: int) -> tuple[float, int]:
    """|relative error| and teeth of the ``count``-th best so far (inf, 0 until there are that many)."""
    if len(best) < count:
        return math.inf, 0
    kth = sorted(best.values(), key=lambda t: (abs(t.relative_error), t.total_teeth))[count - 1]
    return abs(kth.relative_error), kth.total_teeth + 1


def summing_network(train: SummingTrain):
    """The kinematic network of a summing train: input shaft, two paths, the differential.

    Returns ``(network, fixed, input, output)`` for :func:`gearcad.ratio.kinematics.network_ratio`.
    The mean differential is a spur differential: two equal sun gears (one per
    side member) and meshing pairs of planets on the output carrier (a planet
    of one pair meshes one sun and its mate, the mate the other sun), which makes
    the carrier turn at the mean of the side members (Willis on each mesh).
    """
    from .kinematics import Gear, Mesh, make_network

    gears: list = []
    meshes: list = []
    for name, (driver, driven), sign in (("a", train.path_a, train.sign_a), ("b", train.path_b, train.sign_b)):
        gears += [Gear(f"{name}-driver", "input", driver), Gear(f"{name}-driven", f"side-{name}", driven)]
        if sign > 0:  # an idler between them turns the side member with the input
            gears.append(Gear(f"{name}-idler", f"idler-{name}", max(driver, driven)))
            meshes += [Mesh(f"{name}-driver", f"{name}-idler"), Mesh(f"{name}-idler", f"{name}-driven")]
        else:
            meshes.append(Mesh(f"{name}-driver", f"{name}-driven"))
    if train.kind == "planetary":
        sun, planet, ring, _ = train.planetary
        gears += [Gear("sun", "side-a", sun), Gear("planet", "planet", planet), Gear("ring", "side-b", ring)]
        meshes += [Mesh("sun", "planet", carrier="carrier"), Mesh("planet", "ring", carrier="carrier", internal=True)]
    else:
        gears += [Gear("sun-a", "side-a", 20), Gear("sun-b", "side-b", 20),
                  Gear("planet-a", "planet-a", 10), Gear("planet-b", "planet-b", 10)]
        meshes += [Mesh("sun-a", "planet-a", carrier="carrier"), Mesh("planet-a", "planet-b", carrier="carrier"),
                   Mesh("planet-b", "sun-b", carrier="carrier")]
    return make_network(gears, meshes), (), "input", "carrier"
