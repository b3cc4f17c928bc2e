"""Results: a gear train with its exact ratio, its error and its direction.

Convention: ratio = output turns per input turn = the product over stages of
driver teeth / driven teeth.  Each external mesh reverses the direction of
rotation; an idler adds one mesh and changes no ratio.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, Sequence

from .target import Target

if TYPE_CHECKING:
    from .limits import Limits

__all__ = ["Train", "make_train", "exact_relative_error", "output_direction", "chain_ratio", "needs_idler", "rank_key"]


@dataclass(frozen=True)
class Train:
    """A compound gear train.

    Attributes
    ----------
    stages : tuple of (int, int)
        (driver, driven) tooth counts of each stage, input first.
    numerator, denominator : int
        The ratio as a reduced fraction.
    relative_error : float
        ``ratio / target - 1`` (signed), from an exact rational computation.
    direction : str
        ``"same"`` or ``"opposite"``: the output's sense of rotation relative to
        the input.
    idler : int or None
        Tooth count of an idler added to set the direction.
    total_teeth : int
        Teeth of every gear of the train, idler included.
    shifts : tuple of (float, float), optional
        Coaxial trains with profile shift: (driver, driven) shift coefficient
        of each stage.
    """

    stages: tuple[tuple[int, int], ...]
    numerator: int
    denominator: int
    relative_error: float
    direction: str
    idler: int | None
    total_teeth: int
    shifts: tuple[tuple[float, float], ...] | None = None

    @property
    def ratio(self) -> float:
        """The ratio as a float."""
        return self.numerator / self.denominator

    @property
    def fraction(self) -> Fraction:
        """The exact ratio."""
        return Fraction(self.numerator, self.denominator)


def exact_relative_error(numerator: int, denominator: int, target: Target) -> Fraction:
    """``numerator / (denominator * target) - 1`` exactly against ``target.approx``.

    For a rational target this is exact; for an irrational one it is exact
    against an 80-digit rational stand-in (so ~1e-78 relative).
    """
    t = target.approx
    return Fraction(numerator * t.denominator - t.numerator * denominator, t.numerator * denominator)


def output_direction(meshes: int) -> str:
    """``"opposite"`` for an odd number of external meshes, else ``"same"``."""
    return "opposite" if meshes % 2 else "same"


def chain_ratio(stages: Sequence[tuple[int, int]], idler: int | None = None) -> Fraction:
    """Signed ratio (output turns per input turn) of a compound train on fixed axes.

    Willis' equation of each external mesh with the frame as carrier,
    ``z_a w_a + z_b w_b = 0``, solved along the chain (an idler adds a mesh and
    changes only the sign).  It is the kinematic model of
    :func:`gearcad.ratio.kinematics.compound_ratio` for this one network shape,
    solved without a general linear system, so the ratio solver starts without
    sympy; ``tests/test_ratio_reach.py`` checks that both agree.
    """
    speed = Fraction(1)
    for driver, driven in stages:
        speed = -speed * driver / driven
    return -speed if idler else speed


def make_train(stages: Sequence[tuple[int, int]], target: Target, idler: int | None = None,
               shifts: tuple[tuple[float, float], ...] | None = None) -> Train:
    """Build a :class:`Train`, computing its reduced ratio, error and direction."""
    signed = chain_ratio(stages, idler)  # Willis on each mesh (the kinematic model; checked against kinematics)
    ratio = abs(signed)
    error = exact_relative_error(ratio.numerator, ratio.denominator, target)
    total = sum(d + n for d, n in stages) + (idler or 0)
    return Train(tuple((int(d), int(n)) for d, n in stages), ratio.numerator, ratio.denominator,
                 float(error), "same" if signed > 0 else "opposite", idler, total, shifts)


def needs_idler(k: int, limits: Limits) -> bool:
    """Whether a train of ``k`` stages needs an idler for the direction ``limits`` ask."""
    return limits.direction is not None and output_direction(k) != limits.direction


def rank_key(train: Train, target: Target) -> tuple:
    """Sort key of the solvers' results: |error| (exact), total teeth, ratio, stages."""
    error = abs(exact_relative_error(train.numerator, train.denominator, target))
    return (error, train.total_teeth, Fraction(train.numerator, train.denominator), train.stages)
