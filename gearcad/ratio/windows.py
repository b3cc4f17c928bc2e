"""The general exact search for compound trains: windows of product pairs (numpy).

The ratio of a train is ``P / Q``: ``P`` the product of its driver tooth
counts, ``Q`` that of its driven ones.  The search

1. takes every pair of products within a relative window ``eps`` of the
   target (:mod:`gearcad.ratio.candidates`; nothing outside the window is
   better than anything inside it),
2. groups the pairs by their reduced ratio ``p / q`` and ranks the groups by
   their exact error (rational arithmetic against the target),
3. for each group in that order, splits ``P`` and ``Q`` into stages by a
   depth-first search (:mod:`gearcad.ratio.split`: each stage obeys the
   per-stage limits, hunting, exclusions and the inventory; branches are cut
   by the reach of the stages left and the AM-GM bound ``sum >= k P^(1/k)``),
4. widens ``eps`` and repeats until ``count`` trains are found whose errors
   are all within a window that has been searched completely.

Near an end of the reach the trains of steep stages are listed first
(:mod:`gearcad.ratio.ends`), and an exact rational target's group is settled
by its multiples before any window (:meth:`_Search.exact_first`).  The entry
point, with the checks of its arguments and the targets beyond the reach, is
:func:`gearcad.ratio.compound.solve_compound`; one and two stages over few
tooth counts take the pure-Python search of :mod:`gearcad.ratio.small`
instead (same results).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Callable, Iterator

import numpy as np

from .candidates import FLOAT_MARGIN, MAX_RAW, ScanCandidates, SortedCandidates
from .ends import EndCandidates
from .limits import Limits
from .products import multiple_bounds, multiset_count
from .reach import largest_stage_ratio
from .split import Splitter
from .target import Target
from .train import Train, exact_relative_error, make_train, needs_idler, rank_key

__all__ = ["search_windows", "allowed_stage_grid", "SORTED_LIMIT"]

#: Up to this many multisets of k tooth counts the sorted product set is built.
SORTED_LIMIT = 3_000_000
_SCAN_BUDGET = 2_000_000
#: Driven products sampled to size the first windows of the sorted search (sizing only: results are exact anyway).
_SIZING_SAMPLE = 250_000
#: Float errors closer than this are ranked together exactly (float error of an error is ~1e-15).
_CLUSTER = 1e-12
Progress = Callable[[float], None]


def allowed_stage_grid(limits: Limits) -> tuple[np.ndarray, np.ndarray]:
    """Every allowed stage as (drivers, driven): ratio limit, hunting, and two of a count on the shelf."""
    teeth = np.asarray(limits.teeth, dtype=np.int64)
    d, n = (a.ravel() for a in np.meshgrid(teeth, teeth, indexing="ij"))
    r = limits.max_stage_ratio
    ok = (d * r.denominator <= r.numerator * n) & (n * r.denominator <= r.numerator * d)
    if limits.hunting:
        ok &= np.gcd(d, n) == 1
    shelf = limits.shelf()
    if shelf is not None:
        ok &= (d != n) | np.array([shelf[int(z)] >= 2 for z in d], dtype=bool)
    return d[ok], n[ok]


@dataclass
class _Search:
    target: Target
    k: int
    limits: Limits
    count: int
    progress: Progress | None = None
    cap: float | None = None  # trains worse than this |relative error| are not wanted
    found: list[Train] = field(default_factory=list)
    done_ratios: set = field(default_factory=set)

    def __post_init__(self) -> None:
        self.shelf = self.limits.shelf()
        self.idler = needs_idler(self.k, self.limits)
        self.idler_floor = min(self.limits.teeth) if self.idler else 0
        self.smallest = min(self.limits.teeth)
        largest = largest_stage_ratio(self.limits)
        self.splitter = None if largest is None else Splitter(self.k, self.limits, self.shelf, self.idler, largest)
        self.cap_exact = None if self.cap is None else Fraction(self.cap)

    def _capped(self, eps: float) -> float:
        """``eps``, but no wider than the cap (rounded up, so the window holds every group within it)."""
        return eps if self.cap is None else min(eps, math.nextafter(self.cap, math.inf))

    def _past_cap(self, eps: float) -> bool:
        return self.cap_exact is not None and Fraction(eps) >= self.cap_exact

    # -- one ratio ---------------------------------------------------------
    def _best_for_pair(self, p: int, q: int, bound: float) -> tuple[int, tuple, int | None] | None:
        if self.splitter is None:
            return None
        return self.splitter.best_for(p, q, bound)

    def _best_for_ratio(self, ps: np.ndarray, qs: np.ndarray) -> Train | None:
        best = None if self.splitter is None else self.splitter.best_of(zip(ps.tolist(), qs.tolist()))
        return None if best is None else make_train(best[1], self.target, best[2])

    # -- the exact ratio, first ----------------------------------------------
    def exact_first(self, max_checks: int = 20_000, max_multiples: int = 20_000_000) -> tuple[int, int] | None:
        """Settle the group of the exact target ratio ``a/b`` by its multiples ``(g a, g b)``.

        The AM-GM bound of ``(g a, g b)`` grows with ``g``, so the multiples
        are taken in blocks of increasing ``g`` until it passes the best train
        found; within a block, in the order of a stronger bound
        (:func:`gearcad.ratio.products.multiple_bounds`), up to the best found.  Returns ``(a, b)`` when settled (the windows then leave exact
        pairs out), None when the target is not rational or the work caps are
        hit (the windows then treat the exact group like any other).
        """
        exact = self.target.rational
        if exact is None:
            return None
        a, b = exact.numerator, exact.denominator
        largest, k = max(self.limits.teeth), self.k
        g_low = max(-(-self.smallest ** k // a), -(-self.smallest ** k // b), 1)
        g_high = min(largest ** k // a, largest ** k // b)
        if g_high < g_low:  # no train can have this ratio at all
            return None
        best, checks = None, 0
        for start in range(g_low, g_high + 1, 100_000):
            if start - g_low > max_multiples:
                return None
            limit = math.inf if best is None else best[0]
            if math.floor(k * ((a * start) ** (1 / k) + (b * start) ** (1 / k)) * (1 - 1e-12)) + self.idler_floor > limit:
                break  # the AM-GM bound grows with g and is below the bounds of every later pair
            g = np.arange(start, min(start + 100_000, g_high + 1), dtype=np.int64)
            bounds, order = multiple_bounds(a, b, g, k, self.smallest, largest)
            for i in order.tolist():
                limit = math.inf if best is None else best[0]
                if bounds[i] + self.idler_floor > limit:
                    break
                checks += 1
                if checks > max_checks:
                    return None
                found = self._best_for_pair(int(a * g[i]), int(b * g[i]), limit)
                if found is not None and (best is None or (found[0], found[1]) < (best[0], best[1])):
                    best = found
        self.done_ratios.add((a, b))
        if best is not None:
            self.found.append(make_train(best[1], self.target, best[2]))
        return (a, b)

    # -- one window --------------------------------------------------------
    def _groups(self, p: np.ndarray, q: np.ndarray, eps: float) -> Iterator[tuple[Fraction, int, int, np.ndarray]]:
        """Unprocessed ratio groups of the window with float error <= eps, in exact order (lazily).

        Groups are taken in float order, in runs split where two neighbouring float errors differ
        by more than ``_CLUSTER`` (far above their rounding, ~1e-15, so no exact error crosses a
        split); each run is ranked exactly before it is handed out, so only the groups the caller
        consumes pay for rational arithmetic.
        """
        g = np.gcd(p, q)
        num, den = p // g, q // g
        if len(num) and max(int(num.max()), int(den.max())) < 2 ** 31:  # one int64 key per ratio: a fast 1-D unique
            packed, inverse = np.unique((num << 32) | den, return_inverse=True)
            keys = np.stack([packed >> 32, packed & 0xFFFFFFFF], axis=1)
        else:
            keys, inverse = np.unique(np.stack([num, den], axis=1), axis=0, return_inverse=True)
        inverse = inverse.ravel()
        t = self.target.value
        float_err = np.abs((keys[:, 0] - t * keys[:, 1]) / (t * keys[:, 1]))
        members = np.argsort(inverse, kind="stable")
        starts = np.searchsorted(inverse[members], np.arange(len(keys)))
        ends = np.append(starts[1:], len(members))
        order = np.argsort(float_err, kind="stable")
        order = order[float_err[order] <= eps + FLOAT_MARGIN]
        errors = float_err[order]
        splits = (np.flatnonzero(np.diff(errors) > _CLUSTER) + 1).tolist() + [len(order)]
        at = 0
        for stop in splits:
            batch = []
            for i in order[at:stop].tolist():
                num, den = int(keys[i, 0]), int(keys[i, 1])
                if (num, den) in self.done_ratios:
                    continue
                batch.append((abs(exact_relative_error(num, den, self.target)), num, den, members[starts[i]:ends[i]]))
            batch.sort(key=lambda item: (item[0], Fraction(item[1], item[2])))
            yield from batch
            at = stop

    def _enough(self, next_error: Fraction) -> bool:
        if len(self.found) < self.count:
            return False
        kth = sorted(abs(exact_relative_error(t.numerator, t.denominator, self.target)) for t in self.found)[self.count - 1]
        return next_error > kth

    def window(self, p: np.ndarray, q: np.ndarray, eps: float) -> bool:
        """Process a complete window; True when the results are final."""
        if len(p) == 0:
            return False
        eps_exact = Fraction(eps)
        for error, num, den, index in self._groups(p, q, eps):
            if error > eps_exact:
                return False
            if self._enough(error) or (self.cap_exact is not None and error > self.cap_exact):
                return True
            self.done_ratios.add((num, den))
            train = self._best_for_ratio(p[index], q[index])
            if train is not None:
                self.found.append(train)
        return len(self.found) >= self.count or self._past_cap(eps)  # every group within eps is done

    # -- rounds ------------------------------------------------------------
    def run_sorted(self, generator: SortedCandidates, start_eps: float = 0.0) -> None:
        if len(self.found) >= self.count:
            return
        stride = max(1, len(generator.products) // _SIZING_SAMPLE)  # a sample sizes the windows as well
        nearest = np.sort(generator.nearest_errors(stride))
        eps_all = generator.max_eps()
        eps, m = start_eps, 16 * self.count
        while True:
            proposal = float(nearest[min(m // stride, len(nearest) - 1)])
            if not math.isfinite(proposal) or proposal <= eps:
                positive = nearest[nearest > eps]
                proposal = max(eps * 8, float(positive[0]) if len(positive) else eps_all)
            # x8 to x64 a round: a sample's far tail (products with no partner near the target) must not
            # throw the window open at once
            eps = self._capped(min(max(proposal, eps * 8), eps * 64 if eps > 0 else proposal, eps_all))
            if self.window(*generator.within(eps), eps) or eps >= eps_all or self._past_cap(eps):
                return
            m *= 8
            self._report(0.5)

    def run_end(self, generator: EndCandidates, eps: float = 1e-7) -> float | None:
        """Rounds over the trains of steep stages while they are few (near an end of the reach).

        Returns the eps of the last complete window if the other generators must go on, None when finished.
        """
        if len(self.found) >= self.count:
            return None
        done = 0.0
        eps = self._capped(eps)
        while generator.usable(eps):
            pairs = generator.within(eps)
            if pairs is None:  # too many trains to list: the other generators go on from here
                break
            if self.window(*pairs, eps) or self._past_cap(eps):
                return None
            done = eps
            if eps >= 1.0:
                break
            eps = self._capped(min(eps * 4, 1.0))
        return done

    def run_scan(self, generator: ScanCandidates) -> float | None:
        """Scan rounds; returns the eps reached if the scan must hand over, None when finished."""
        if len(self.found) >= self.count:
            return None
        eps = self._capped(generator.eps_for_budget(_SCAN_BUDGET))
        done = 0.0
        while generator.usable(eps):
            if self.window(*generator.within(eps, self.progress), eps) or self._past_cap(eps):
                return None
            done = eps
            # ratios found grow about linearly with the raw candidates: aim at the count with a margin (x2 to x8
            # a round); where the stream is pruned (see ScanCandidates.least_streamed) the work grows faster than eps
            have = len(self.found)
            grow = 4 if have == 0 else min(8.0, max(2.0, 1.5 * self.count / have))
            wanted = generator.eps_for_budget(min(generator.raw_estimate(eps) * grow, MAX_RAW) * (1 - 1e-9))
            eps = self._capped(min(max(wanted, eps * 1.25), eps * grow))
        return done

    def _report(self, fraction: float) -> None:
        if self.progress is not None:
            self.progress(fraction)

    def results(self) -> list[Train]:
        kept = [t for t in self.found if self.cap_exact is None
                or abs(exact_relative_error(t.numerator, t.denominator, self.target)) <= self.cap_exact]
        return sorted(kept, key=lambda t: rank_key(t, self.target))[: self.count]


def search_windows(target: Target, k: int, limits: Limits, count: int, span: tuple[Fraction, Fraction], *,
                   progress: Progress | None = None, method: str = "auto", cap: float | None = None) -> list[Train]:
    """The best ``count`` distinct ratios of ``k`` stages for a target within ``span`` (see the module notes).

    Arguments are :func:`gearcad.ratio.compound.solve_compound`'s, checked there; ``span`` is the least
    and greatest ratio of ``k`` stages (:func:`gearcad.ratio.compound.stage_ratio_range`).
    """
    search = _Search(target, k, limits, count, progress, cap)
    ratio_range = (float(span[0]), float(span[1]))
    teeth = limits.teeth
    use_scan = method == "scan" or (method == "auto" and multiset_count(len(teeth), k) > SORTED_LIMIT)
    start_eps = 0.0
    # near an end of the reach the trains of steep stages come first, the exact ratio's among them
    reached = search.run_end(EndCandidates(*allowed_stage_grid(limits), k, target.value))
    if reached is None:
        return search.results()
    start_eps = reached
    rational = target.rational
    if rational is not None and (rational.numerator, rational.denominator) in search.done_ratios:
        exact = (rational.numerator, rational.denominator)  # settled by those windows
    else:
        exact = search.exact_first() if span[0] <= (rational or 0) <= span[1] else None
    if use_scan:
        reached = search.run_scan(ScanCandidates(teeth, k, target.value, ratio_range, exact))
        if reached is None:
            return search.results()
        start_eps = max(start_eps, reached)
    search.run_sorted(SortedCandidates(teeth, k, target.value, ratio_range, exact), start_eps)
    return search.results()
