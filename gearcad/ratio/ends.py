"""Candidate pairs near an end of the reach: the trains listed from their few steep stages.

Near ``s^k`` (``s`` the largest stage ratio) a train of ``k`` stages within
the window ``|r / T - 1| <= eps`` falls short of ``s^k`` by at most
``B = log(s^k / (T (1 - eps)))`` in all, summed over its stages' shortfalls
(deficits) ``log s - log(d/n)``: so every stage is steep (deficit at most
``B``), and below a target of 1 alike against the flattest stage.  Few
allowed stages are that steep, so every multiset of ``k`` of them whose
deficits sum to at most ``B`` (and at least the shortfall that keeps it
below the window's top) is listed: stages in order of deficit, each partial
train cut by what its remaining stages must still spend, the last stage
found by bisection in the range that lands the train in the window.  The window's pairs ``(P, Q)`` are then exactly
those of realisable trains; :mod:`gearcad.ratio.candidates` would instead
hand the split millions of product pairs that no train of stages within the
stage-ratio limit realises (``1296`` at 4 stages took minutes).

Pairs of the exact ratio are left out when it is settled apart (``exact``),
as in :mod:`gearcad.ratio.candidates`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .candidates import FLOAT_MARGIN, not_exact, unique_pairs
from .products import multiset_count

__all__ = ["EndCandidates", "END_LIMIT", "ROW_LIMIT"]

#: Most multisets of steep stages a window may list (a bound: the cuts list far fewer).
END_LIMIT = 50_000_000
#: Most rows (partial trains) the listing holds at any stage count (about 50 bytes each).
ROW_LIMIT = 4_000_000


@dataclass
class EndCandidates:
    """Window search by listing trains of the stages steep enough for the window (see module notes).

    ``driver`` and ``driven`` are the allowed stages (tooth counts), ``target``
    the target as a float.
    """

    driver: np.ndarray
    driven: np.ndarray
    k: int
    target: float
    exact: tuple[int, int] | None = None

    def __post_init__(self) -> None:
        logs = np.log(self.driver / self.driven)
        self.top = self.target >= 1  # near the top end: deficits below the steepest stage; else above the flattest
        self.deficit = (float(logs.max()) - logs) if self.top else (logs - float(logs.min()))
        self.end = self.k * (float(logs.max()) if self.top else float(logs.min()))
        self.log_target = math.log(self.target)

    def _budget(self, eps: float) -> tuple[float, float]:
        """Least and most a train of the window falls short of the end, summed over its stages (log)."""
        below = self.log_target + math.log1p(-min(eps + FLOAT_MARGIN, 0.999))
        above = self.log_target + math.log1p(eps + FLOAT_MARGIN)
        if self.top:
            return self.end - above - 1e-12, self.end - below + 1e-12
        return below - self.end - 1e-12, above - self.end + 1e-12

    def usable(self, eps: float) -> bool:
        """Whether the partial trains of window ``eps`` (all stages but the last) are few enough to list
        (a bound; :meth:`within` counts the rows)."""
        steep = int(np.count_nonzero(self.deficit <= self._budget(eps)[1]))
        return multiset_count(steep, self.k - 1) <= END_LIMIT

    def within(self, eps: float, progress: object = None) -> tuple[np.ndarray, np.ndarray] | None:
        """Every (P, Q) of a train of ``k`` allowed stages with |P/(T Q) - 1| <= eps (and a margin).

        None when the listing would pass :data:`ROW_LIMIT` rows at some stage (the caller hands over).
        Stages go in order of growing deficit, a train's stages in non-decreasing order (each multiset
        once): the next stage's deficit is at most what is left over the stages to come, and the last
        stage's lies in the range that puts the train inside the window (a bisection, not a listing).
        """
        least, budget = self._budget(eps)
        steep = np.flatnonzero(self.deficit <= budget)
        empty = np.zeros(0, dtype=np.int64)
        if len(steep) == 0:
            return empty, empty
        order = steep[np.argsort(self.deficit[steep], kind="stable")]
        deficit, d, n = self.deficit[order], self.driver[order], self.driven[order]
        last = np.arange(len(order))
        spent, p, q = deficit.copy(), d.copy(), n.copy()
        if self.k == 1:
            keep = spent >= least
            last, p, q = last[keep], p[keep], q[keep]
        for level in range(2, self.k + 1):
            rest = self.k - level + 1  # this stage and those after it, each at least this deficit
            stop = np.searchsorted(deficit, (budget - spent) / rest, "right")
            first = last if rest > 1 else np.maximum(last, np.searchsorted(deficit, least - spent, "left"))
            counts = np.maximum(stop - first, 0)
            if int(counts.sum()) > ROW_LIMIT:
                return None
            owner = np.repeat(np.arange(len(last)), counts)
            last = first[owner] + (np.arange(len(owner)) - np.repeat(np.cumsum(counts) - counts, counts))
            spent = spent[owner] + deficit[last]
            p, q = p[owner] * d[last], q[owner] * n[last]
        if len(p) == 0:
            return empty, empty
        error = np.abs(p / (self.target * q) - 1)
        keep = (error <= eps + FLOAT_MARGIN) & not_exact(p, q, self.exact)
        return unique_pairs(p[keep], q[keep])
