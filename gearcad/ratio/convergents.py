"""Best rational approximations: continued-fraction convergents and semiconvergents.

For ``x = [a0; a1, a2, ...]`` the convergents are ``h_n / k_n`` with
``h_n = a_n h_(n-1) + h_(n-2)`` (and the same for ``k``); the semiconvergents
between two convergents are ``(h_(n-2) + j h_(n-1)) / (k_(n-2) + j k_(n-1))``
for ``0 < j < a_n``.  Listed here are the semiconvergents that are best
approximations (closer than every fraction with a smaller denominator):
``j > a_n / 2``, and ``j = a_n / 2`` when it beats the previous convergent.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Iterator

from ..errors import InputError
from ..validate import as_int
from .target import Target
from .train import exact_relative_error

__all__ = ["Approximant", "continued_fraction_terms", "convergents", "best_approximations"]


@dataclass(frozen=True)
class Approximant:
    """A best rational approximation of the target.

    Attributes
    ----------
    numerator, denominator : int
    kind : str
        ``"convergent"`` or ``"semiconvergent"``.
    relative_error : float
        ``p / (q target) - 1``.
    """

    numerator: int
    denominator: int
    kind: str
    relative_error: float


def continued_fraction_terms(value: Fraction, max_terms: int = 60) -> list[int]:
    """Partial quotients of a positive rational, at most ``max_terms`` of them."""
    terms, x = [], Fraction(value)
    while len(terms) < max_terms:
        whole = x.numerator // x.denominator
        terms.append(whole)
        x -= whole
        if x == 0:
            break
        x = 1 / x
    return terms


def convergents(terms: list[int]) -> Iterator[tuple[int, int]]:
    """Convergents (h, k) of the partial quotients ``terms``."""
    h0, h1, k0, k1 = 0, 1, 1, 0
    for a in terms:
        h0, h1, k0, k1 = h1, a * h1 + h0, k1, a * k1 + k0
        yield h1, k1


def _terms_for(target: Target, max_denominator: int) -> list[int]:
    """Enough partial quotients to pass ``max_denominator`` (exact for a rational target).

    For an irrational target the 80-digit stand-in gives correct quotients as
    long as the denominators stay far below 10^39, which the bound enforces.
    """
    if target.rational is None and max_denominator > 10 ** 30:
        raise InputError(f"largest denominator {max_denominator} is too large for an irrational target; allowed: up to 1e30")
    return continued_fraction_terms(target.approx, 200)


def best_approximations(target: Target, max_denominator: int) -> list[Approximant]:
    """Convergents and best-approximation semiconvergents with denominator <= ``max_denominator``.

    Returned in increasing denominator order.
    """
    max_denominator = as_int(max_denominator, "largest denominator")
    if max_denominator < 1:
        raise InputError(f"largest denominator must be 1 or more, got {max_denominator}")
    x = target.approx
    terms = _terms_for(target, max_denominator)
    found: list[Approximant] = []
    h0, h1, k0, k1 = 0, 1, 1, 0
    for index, a in enumerate(terms):
        for j in range((a + 1) // 2 if index else a, a):
            h, k = h0 + j * h1, k0 + j * k1
            if 0 < j and h > 0 and k <= max_denominator and (2 * j > a or abs(Fraction(h, k) - x) < abs(Fraction(h1, k1) - x)):
                found.append(_approximant(h, k, "semiconvergent", target))
        h0, h1, k0, k1 = h1, a * h1 + h0, k1, a * k1 + k0
        if k1 > max_denominator:
            break
        if h1 > 0:
            found.append(_approximant(h1, k1, "convergent", target))
    return found


def _approximant(h: int, k: int, kind: str, target: Target) -> Approximant:
    return Approximant(h, k, kind, float(exact_relative_error(h, k, target)))
