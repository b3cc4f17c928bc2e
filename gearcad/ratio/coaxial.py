"""Coaxial (reverted) trains: input and output on one axis.

Two stages form a reverted pair when they share one centre distance.  With
one module that means equal tooth sums ``z1 + z2 == z3 + z4``.  With a shift
limit ``X`` the sums may differ where profile shift coefficients within
``+-X`` on each gear bring both stages to a common centre distance (computed
with :func:`gearcad.meshes.pair.total_shift_for_centre`; module 1 is used because
shift coefficients do not depend on the module).  Four stages are two
reverted pairs, each pair with its own centre distance.

The search enumerates every reverted pair outright (vectorised) and ranks
exactly; four stages combine two pairs by a window search like the compound
solver's.
"""

from __future__ import annotations

import math
from collections import Counter
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..errors import InputError
from ..meshes.pair import centre_distance_for_shift, split_shift, total_shift_for_centre
from ..validate import finite
from .windows import allowed_stage_grid
from .geometry_link import pressure_angle
from .limits import Limits
from .ranking import _fewest_teeth_rows, top_ratios
from .target import Target
from .train import Train, make_train

__all__ = ["solve_coaxial", "common_centre_shifts", "MAX_SHIFT_LIMIT"]

#: Largest shift limit accepted (coefficients beyond about 1 give pointed or undercut teeth).
MAX_SHIFT_LIMIT = 1.0


@lru_cache(maxsize=4096)
def _centre_span(tooth_sum: int, limit: float) -> tuple[float, float]:
    """Centre distances (module 1) a stage of ``tooth_sum`` teeth reaches with shift sum in +-2X."""
    alpha = pressure_angle()
    z1, z2 = tooth_sum // 2, tooth_sum - tooth_sum // 2
    floor = -0.999 * (math.tan(alpha) - alpha) * tooth_sum / (2 * math.tan(alpha))
    low = centre_distance_for_shift(z1, z2, 1.0, alpha, max(-2 * limit, floor))
    return low, centre_distance_for_shift(z1, z2, 1.0, alpha, 2 * limit)


def _compatible(s1: int, s2: int, limit: float | None) -> bool:
    if s1 == s2:
        return True
    if not limit:
        return False
    (a1, b1), (a2, b2) = _centre_span(s1, limit), _centre_span(s2, limit)
    return max(a1, a2) <= min(b1, b2)


def common_centre_shifts(stage1: tuple[int, int], stage2: tuple[int, int], limit: float) -> tuple[tuple[float, float], tuple[float, float]]:
    """Shift coefficients bringing two stages to one centre distance, largest |x| least.

    The common centre distance is where the two shift sums are equal and
    opposite (or the nearest end of the reachable range); each sum is shared
    by :func:`gearcad.meshes.pair.split_shift`, or equally where that rule would
    pass the limit.
    """
    alpha = pressure_angle()
    s1, s2 = sum(stage1), sum(stage2)
    if s1 == s2:
        return (0.0, 0.0), (0.0, 0.0)
    (a1, b1), (a2, b2) = _centre_span(s1, limit), _centre_span(s2, limit)
    low, high = max(a1, a2), min(b1, b2)

    def balance(a: float) -> float:
        return total_shift_for_centre(*stage1, 1.0, alpha, a) + total_shift_for_centre(*stage2, 1.0, alpha, a)

    for _ in range(80):
        mid = (low + high) / 2
        low, high = (mid, high) if balance(mid) < 0 else (low, mid)
    centre = (low + high) / 2
    return tuple(_split_within(total_shift_for_centre(*stage, 1.0, alpha, centre), stage, limit)
                 for stage in (stage1, stage2))  # type: ignore[return-value]


def _split_within(shift_sum: float, stage: tuple[int, int], limit: float) -> tuple[float, float]:
    x1, x2 = split_shift(shift_sum, *stage)
    if max(abs(x1), abs(x2)) > limit + 1e-12:
        x1 = x2 = shift_sum / 2
    return x1, x2


@dataclass(frozen=True)
class _Pairs:
    """Every reverted pair: stage indices, ratio numerator/denominator, teeth."""

    first: np.ndarray
    second: np.ndarray
    num: np.ndarray
    den: np.ndarray
    teeth: np.ndarray


def _reverted_pairs(d: np.ndarray, n: np.ndarray, limit: float | None) -> _Pairs:
    sums = d + n
    distinct = np.unique(sums)
    firsts, seconds = [], []
    members = {int(s): np.flatnonzero(sums == s) for s in distinct}
    for s1 in distinct.tolist():
        for s2 in distinct.tolist():
            if s2 < s1 or not _compatible(s1, s2, limit):
                continue
            a, b = members[s1], members[s2]
            i, j = (np.triu_indices(len(a)) if s1 == s2 else np.indices((len(a), len(b))).reshape(2, -1))
            firsts.append(a[i])
            seconds.append(b[j])
    first = np.concatenate(firsts) if firsts else np.zeros(0, dtype=np.int64)
    second = np.concatenate(seconds) if seconds else np.zeros(0, dtype=np.int64)
    return _Pairs(first, second, d[first] * d[second], n[first] * n[second], sums[first] + sums[second])


def _shelf_ok(gears: list[int], limits: Limits) -> bool:
    shelf = limits.shelf()
    return shelf is None or all(shelf[z] >= c for z, c in Counter(gears).items())


def _make(stages: list[tuple[int, int]], target: Target, limit: float | None) -> Train:
    shifts = None
    if limit:
        shifts = tuple(x for a, b in zip(stages[::2], stages[1::2]) for x in common_centre_shifts(a, b, limit))
    return make_train(stages, target, None, shifts)


def _two_stage(target: Target, limits: Limits, count: int, limit: float | None, pairs: _Pairs,
               d: np.ndarray, n: np.ndarray) -> list[Train]:
    def stages_of(row: int) -> list[tuple[int, int]]:
        i, j = int(pairs.first[row]), int(pairs.second[row])
        return [(int(d[i]), int(n[i])), (int(d[j]), int(n[j]))]

    def accept(row: int) -> bool:
        return _shelf_ok([z for s in stages_of(row) for z in s], limits)

    rows = top_ratios(pairs.num, pairs.den, pairs.teeth, target, count, accept)
    return [_make(stages_of(r), target, limit) for r in rows]


def _window(sorted_half: np.ndarray, order: np.ndarray, half: np.ndarray, t: float, eps: float) -> tuple[np.ndarray, np.ndarray]:
    """Every (pair a, pair b) with |half_a half_b / t - 1| <= eps (plus a margin)."""
    lower = np.searchsorted(sorted_half, t / half * (1 - eps - 1e-13), "left")
    upper = np.searchsorted(sorted_half, t / half * (1 + eps + 1e-13), "right")
    counts = upper - lower
    a_rows = np.repeat(np.arange(len(half)), counts)
    starts = np.cumsum(counts) - counts
    return a_rows, order[lower[a_rows] + (np.arange(counts.sum()) - starts[a_rows])]


def _start_eps(sorted_half: np.ndarray, half: np.ndarray, t: float, count: int) -> float:
    """A first window: the (16 count)-th smallest nearest-partner error."""
    wanted = t / half
    index = np.clip(np.searchsorted(sorted_half, wanted), 1, max(1, len(sorted_half) - 1))
    near = np.abs(sorted_half[np.minimum(index, len(sorted_half) - 1)] / wanted - 1)
    near = np.minimum(near, np.abs(sorted_half[index - 1] / wanted - 1))
    return max(float(np.partition(near, min(16 * count, len(near) - 1))[min(16 * count, len(near) - 1)]), 1e-15)


def _four_stage(target: Target, limits: Limits, count: int, limit: float | None, pairs: _Pairs,
                d: np.ndarray, n: np.ndarray) -> list[Train]:
    """Two reverted pairs: every combination of two pairs within a window that grows until it certifies."""
    if limits.inventory is None:  # pairs are independent: keep the fewest-teeth pair of each ratio
        g = np.gcd(pairs.num, pairs.den)
        keep = _fewest_teeth_rows(pairs.num // g, pairs.den // g, pairs.teeth)
        pairs = _Pairs(*(getattr(pairs, f)[keep] for f in ("first", "second", "num", "den", "teeth")))
    half = pairs.num / pairs.den
    order = np.argsort(half, kind="stable")
    sorted_half, t = half[order], target.value
    eps = _start_eps(sorted_half, half, t, count)
    while True:
        a_rows, b_rows = _window(sorted_half, order, half, t, eps)

        def stages_of(row: int) -> list[tuple[int, int]]:
            out = []
            for pair in (int(a_rows[row]), int(b_rows[row])):
                i, j = int(pairs.first[pair]), int(pairs.second[pair])
                out += [(int(d[i]), int(n[i])), (int(d[j]), int(n[j]))]
            return out

        def accept(row: int) -> bool:
            return _shelf_ok([z for s in stages_of(row) for z in s], limits)

        rows = top_ratios(pairs.num[a_rows] * pairs.num[b_rows], pairs.den[a_rows] * pairs.den[b_rows],
                          pairs.teeth[a_rows] + pairs.teeth[b_rows], target, count, accept)
        trains = [_make(stages_of(r), target, limit) for r in rows]
        certified = len(trains) == count and abs(trains[-1].relative_error) <= eps * (1 - 1e-6)
        if certified or eps > 1e6:
            return trains
        eps *= 8


def solve_coaxial(target: Target, stages: int, limits: Limits, count: int = 5,
                  shift_limit: float | None = None) -> list[Train]:
    """The best ``count`` coaxial trains of 2 or 4 stages, best first.

    Parameters
    ----------
    target : Target
    stages : int
        2 (one reverted pair) or 4 (two reverted pairs).
    limits : Limits
    count : int
    shift_limit : float, optional
        Largest |profile shift coefficient| per gear that may equalise
        unequal tooth sums; None or 0 requires equal sums.

    Returns
    -------
    list of Train
        With ``shifts`` (one (driver, driven) pair per stage) when a shift
        limit is given.
    """
    if stages not in (2, 4):
        raise InputError(f"a coaxial train has 2 or 4 stages (one or two reverted pairs), got {stages}")
    if limits.direction == "opposite":
        raise InputError("direction 'opposite' cannot be met by a coaxial train (its output always turns the same way "
                         "as its input); allowed: --direction same or none")
    limit = None
    if shift_limit is not None:
        limit = finite(shift_limit, "shift limit")
        if not 0 <= limit <= MAX_SHIFT_LIMIT:
            raise InputError(f"shift limit must be from 0 to {MAX_SHIFT_LIMIT:g}, got {shift_limit!r}")
    d, n = allowed_stage_grid(limits)
    pairs = _reverted_pairs(d, n, limit or None)
    if len(pairs.num) == 0:
        return []
    solver = _two_stage if stages == 2 else _four_stage
    return solver(target, limits, count, limit or None, pairs, d, n)
