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

from .errors import InputError

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


def summing_ratio(kind: str, rho_a: Fraction, rho_b: Fraction, planetary: tuple[int, int, int, int] | None = None) -> Fraction:
    """Output turns per input turn of a summing train with side-member speeds ``rho_a``, ``rho_b``."""
    if kind == "mean":
        return (rho_a + rho_b) / 2
    sun, _, ring, _ = planetary
    return (sun * rho_a + ring * rho_b) / (sun + ring)


def _stages(teeth: list[int], max_stage_ratio: float) -> tuple[np.ndarray, np.ndarray]:
    """Every allowed stage, one per distinct ratio: the one with the fewest teeth."""
    z = np.array(teeth, dtype=np.int64)
    a, b = np.meshgrid(z, z, indexing="ij")
    ok = (a <= max_stage_ratio * b) & (b <= max_stage_ratio * a)
    a, b = a[ok], b[ok]
    g = np.gcd(a, b)
    key = (a // g) * 1_000_003 + (b // g)  # the reduced ratio; teeth stay below 10^6
    order = np.lexsort((a + b, key))
    first = np.ones(len(order), dtype=bool)
    first[1:] = key[order][1:] != key[order][:-1]
    keep = order[first]
    return a[keep], b[keep]


def _planetary_sets(teeth: list[int], max_ring: int, planets: int, margin: float) -> list[tuple[int, int, int, int]]:
    """Standard (unshifted) sets that are coaxial, assemble with equal spacing and clear their neighbours."""
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
            if sun in allowed and planet in allowed:
                out.append((sun, planet, ring, planets))
    return out


def solve_summing(target, teeth: list[int], kind: str = "mean", count: int = 5, max_stage_ratio: float = 6.0,
                  max_ring: int = 200, planets: int = 3, margin: float = 0.5) -> list[SummingTrain]:
    """The ``count`` best summing trains for ``target`` (a :class:`gearcad.ratio.Target`).

    Ranked by |relative error| (exact fractions against ``target.approx``), then
    fewest teeth.  ``margin`` is the least tip gap between neighbouring planets,
    modules (common practice: 0.5).
    """
    if kind not in KINDS:
        raise InputError(f"summing kind must be one of {', '.join(KINDS)}, got {kind!r}")
    if planets < 2:
        raise InputError(f"a planetary differential needs at least 2 planets, got {planets!r}")
    goal = target.approx
    a, b = _stages(teeth, max_stage_ratio)
    values = a / b
    order = np.argsort(values, kind="stable")
    sorted_values = values[order]
    sets = _planetary_sets(teeth, max_ring, planets, margin) if kind == "planetary" else [None]
    if not sets:
        raise InputError(f"no planetary set of {planets} planets fits the tooth range and a ring of at most {max_ring} teeth")
    best: dict[tuple, SummingTrain] = {}
    chunk = 256
    for start in range(0, len(sets), chunk):
        block = sets[start:start + chunk]
        for sign_a in (-1, 1):
            for sign_b in (-1, 1):
                _best_for(best, kind, block, goal, sign_a, sign_b, a, b, values, order, sorted_values, count)
    ranked = sorted(best.values(), key=lambda t: (abs(t.relative_error), t.total_teeth, t.path_a, t.path_b))
    return ranked[:count]


def _threshold(best: dict, count: int) -> tuple[float, int]:
    """|relative error| and teeth of the ``count``-th best so far (inf, 0 until there are that many)."""
    if len(best) < count:
        return math.inf, 0
    kth = sorted(best.values(), key=lambda t: (abs(t.relative_error), t.total_teeth))[count - 1]
    return abs(kth.relative_error), kth.total_teeth + 1


def _best_for(best, kind, block, goal, sign_a, sign_b, a, b, values, order, sorted_values, count) -> None:
    """Rank, for a block of differentials (rows) and every first path (columns), the best second path."""
    g = float(goal)
    if kind == "mean":
        sun = ring = np.ones((1, 1))
    else:
        sun = np.array([p[0] for p in block], dtype=float)[:, None]
        ring = np.array([p[2] for p in block], dtype=float)[:, None]
    need = ((sun + ring) * g - sun * sign_a * values[None, :]) / ring * sign_b
    at = np.searchsorted(sorted_values, need)
    lo = order[np.clip(at - 1, 0, len(order) - 1)]
    hi = order[np.clip(at, 0, len(order) - 1)]
    second = np.where(np.abs(values[lo] - need) <= np.abs(values[hi] - need), lo, hi)
    ratio = (sun * sign_a * values[None, :] + ring * sign_b * values[second]) / (sun + ring)
    error = np.abs(ratio / g - 1).ravel()
    limit, most = _threshold(best, count)
    take = max(2 * count, 8)
    if np.isfinite(limit):
        teeth = (a + b)[None, :] + a[second] + b[second]
        if kind == "planetary":
            extra = np.array([p[0] + p[2] + p[1] * p[3] for p in block])[:, None]
            teeth = teeth + extra
        teeth = teeth.ravel()
        near = error <= limit * (1 + 1e-6) + 1e-13
        clearly = error < limit * (1 - 1e-6) - 1e-13
        picked = np.nonzero(clearly | (near & (teeth < most)))[0]
    else:
        picked = np.argpartition(error, min(take, len(error) - 1))[:take]
    columns = len(values)
    flat_second = second.ravel()
    for k in picked:
        row, i = divmod(int(k), columns)
        plan = block[row] if kind == "planetary" else None
        j = int(flat_second[k])
        exact_a = Fraction(int(a[i]), int(b[i])) * sign_a
        exact_b = Fraction(int(a[j]), int(b[j])) * sign_b
        exact = summing_ratio(kind, exact_a, exact_b, plan)
        if exact <= 0:
            continue
        train = SummingTrain(kind, (int(a[i]), int(b[i])), sign_a, (int(a[j]), int(b[j])), sign_b, plan, exact,
                             float(exact / goal - 1))
        key = (exact, plan)
        if key not in best or train.total_teeth < best[key].total_teeth:
            best[key] = train


def summing_network(train: SummingTrain):
    """The kinematic network of a summing train: input shaft, two paths, the differential.

    Returns ``(network, fixed, input, output)`` for :func:`gearcad.kinematics.network_ratio`.
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
