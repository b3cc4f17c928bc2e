"""The check of a train's ratio against its own target: a failure beyond the tolerance.

A train file may name the ``target`` its stages should reach and a
``target_tolerance`` (largest |relative error|; default
:data:`gearcad.ratio.tolerance.DESIGN_TOLERANCE`, 1e-3).  Stages that miss the
target by more get a failure finding, so ``gearcad build`` exits 1 as for any
failed check.  Pure.
"""

from __future__ import annotations

from fractions import Fraction

from ..meshes.checks import Finding
from ..ratio.tolerance import DESIGN_TOLERANCE

__all__ = ["target_findings"]


def target_findings(target: str | None, tolerance: float | None, ratio: Fraction) -> tuple[Finding, ...]:
    """A failure finding when ``ratio`` misses ``target`` by more than ``tolerance`` (relative), else none.

    Parameters
    ----------
    target : str or None
        The train's target (decimal, fraction or expression); None: no check.
    tolerance : float or None
        Largest |relative error| accepted (None: DESIGN_TOLERANCE).
    ratio : Fraction
        The train's ratio, output turns per input turn (its magnitude is compared).
    """
    if not target:
        return ()
    from ..ratio.target import parse_target
    from ..ratio.train import exact_relative_error

    limit = DESIGN_TOLERANCE if tolerance is None else tolerance
    ratio = abs(ratio)
    error = float(exact_relative_error(ratio.numerator, ratio.denominator, parse_target(target)))
    if abs(error) <= limit:
        return ()
    return (Finding("target ratio", "failure", abs(error), limit,
                    f"the stages give {ratio.numerator}/{ratio.denominator}, {error:+.3e} off the target {target} "
                    f"(tolerance {limit:g}); change the stages, or set target_tolerance if this is meant"),)
