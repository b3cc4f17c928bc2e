"""Exact top-``k`` ranking of a fully enumerated table of trains.

Used where the trains can be listed outright (coaxial trains): a float
pre-selection with a generous margin, then exact rational ranking.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Callable

import numpy as np

from .target import Target
from .train import exact_relative_error

__all__ = ["top_ratios"]

_MARGIN = 1e-12


def _fewest_teeth_rows(num: np.ndarray, den: np.ndarray, totals: np.ndarray) -> np.ndarray:
    """One row per distinct (num, den): the one with the fewest teeth."""
    order = np.lexsort((totals, den, num))
    first = np.ones(len(order), dtype=bool)
    first[1:] = (num[order][1:] != num[order][:-1]) | (den[order][1:] != den[order][:-1])
    return order[first]


def top_ratios(numerators: np.ndarray, denominators: np.ndarray, totals: np.ndarray, target: Target,
               count: int, accept: Callable[[int], bool] | None = None) -> list[int]:
    """Rows of the best ``count`` distinct ratios, one row each (fewest teeth).

    Parameters
    ----------
    numerators, denominators, totals : ndarray
        One row per train: its ratio ``numerators / denominators`` and its teeth.
    target : Target
    count : int
    accept : callable, optional
        ``accept(row)`` rejects rows (e.g. an inventory check); rows are tried
        fewest teeth first within a ratio.

    Returns
    -------
    list of int
        Row indices, best first (|error| exact, then teeth, then ratio).
    """
    if len(numerators) == 0:
        return []
    t = target.value
    error = np.abs((numerators - t * denominators) / (t * denominators))
    g = np.gcd(numerators, denominators)
    num, den = numerators // g, denominators // g
    if accept is None:
        rows = _fewest_teeth_rows(num, den, totals)
        order = rows[np.lexsort((totals[rows], error[rows]))]
    else:
        order = np.lexsort((totals, error))
    chosen: dict[tuple[int, int], int] = {}
    threshold = np.inf
    for row in order.tolist():
        if error[row] > threshold:
            break
        key = (int(num[row]), int(den[row]))
        if key in chosen and totals[chosen[key]] <= totals[row]:
            continue
        if accept is not None and not accept(row):
            continue
        chosen[key] = row
        if len(chosen) >= count:
            kth = sorted(error[r] for r in chosen.values())[count - 1]
            threshold = min(threshold, kth + _MARGIN)

    def key_of(row: int) -> tuple:
        return (abs(exact_relative_error(int(num[row]), int(den[row]), target)), int(totals[row]),
                Fraction(int(num[row]), int(den[row])), row)

    return sorted(chosen.values(), key=key_of)[:count]
