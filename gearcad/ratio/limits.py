"""The limits a train must respect: tooth range, stage ratio, hunting, exclusions, shelf."""

from __future__ import annotations

import functools

import math
from collections import Counter
from dataclasses import dataclass, field
from fractions import Fraction
from itertools import permutations
from typing import Sequence

from ..errors import InputError
from ..validate import as_int, finite
from .inventory import Inventory

__all__ = [
    "Limits", "make_limits", "DEFAULT_MIN_TEETH", "DEFAULT_MAX_TEETH", "DEFAULT_MAX_STAGE_RATIO",
    "MAX_STAGES", "stage_allowed", "assign_stages",
]

#: Default fewest teeth of a gear (common practice: below about 10 teeth spur
#: pinions of the standard 20 degree system undercut badly).
DEFAULT_MIN_TEETH = 10
#: Default most teeth of a gear (common practice for clock and change-gear work).
DEFAULT_MAX_TEETH = 120
#: Default largest ratio of one stage, either way (common practice for a spur stage).
DEFAULT_MAX_STAGE_RATIO = 6.0
#: Most stages the solver searches.
MAX_STAGES = 4
#: Fewest and most teeth a gear may have in a search.
TEETH_BOUNDS = (4, 400)


@dataclass(frozen=True)
class Limits:
    """Everything a train must respect besides its ratio.

    Attributes
    ----------
    min_teeth, max_teeth : int
        Tooth range of every gear (an inventory is filtered by it too).
    max_stage_ratio : Fraction
        Each stage obeys ``1/R <= driver/driven <= R``.
    hunting : bool
        ``gcd(driver, driven) == 1`` in every stage.
    exclude : frozenset of int
        Tooth counts never used.
    inventory : Inventory or None
        The gears on the shelf; each physical gear is used once.
    direction : str or None
        ``"same"`` / ``"opposite"``: add an idler where needed.
    """

    min_teeth: int = DEFAULT_MIN_TEETH
    max_teeth: int = DEFAULT_MAX_TEETH
    max_stage_ratio: Fraction = Fraction(6)
    hunting: bool = False
    exclude: frozenset[int] = field(default_factory=frozenset)
    inventory: Inventory | None = None
    direction: str | None = None

    @functools.cached_property
    def teeth(self) -> tuple[int, ...]:
        """Every tooth count allowed, ascending (computed once: the limits are frozen)."""
        if self.inventory is not None:
            pool: Sequence[int] = self.inventory.teeth
        else:
            pool = range(self.min_teeth, self.max_teeth + 1)
        return tuple(z for z in pool if self.min_teeth <= z <= self.max_teeth and z not in self.exclude)

    def shelf(self) -> Counter | None:
        """The usable inventory as a Counter (None without an inventory)."""
        if self.inventory is None:
            return None
        allowed = set(self.teeth)
        return Counter({z: n for z, n in self.inventory.counts if z in allowed})

    def describe(self) -> str:
        """One line naming the limits."""
        parts = [f"teeth {self.min_teeth}-{self.max_teeth}", f"stage ratio <= {float(self.max_stage_ratio):g}"]
        if self.hunting:
            parts.append("hunting")
        if self.exclude:
            parts.append("excluding " + ",".join(map(str, sorted(self.exclude))))
        if self.inventory is not None:
            parts.append(f"inventory {self.inventory.describe()}")
        return ", ".join(parts)


def _tooth_count(value: object, name: str) -> int:
    number = as_int(value, name)
    low, high = TEETH_BOUNDS
    if not low <= number <= high:
        raise InputError(f"{name} must be from {low} to {high}, got {value!r}")
    return number


def make_limits(min_teeth: object = DEFAULT_MIN_TEETH, max_teeth: object = DEFAULT_MAX_TEETH,
                max_stage_ratio: object = DEFAULT_MAX_STAGE_RATIO, hunting: bool = False,
                exclude: Sequence[object] = (), inventory: Inventory | None = None,
                direction: str | None = None) -> Limits:
    """Validate and build :class:`Limits`; every fault raises :class:`InputError`."""
    low = _tooth_count(min_teeth, "min teeth")
    high = _tooth_count(max_teeth, "max teeth")
    if low > high:
        raise InputError(f"min teeth {low} is more than max teeth {high}; allowed: min teeth <= max teeth")
    ratio = finite(max_stage_ratio, "max stage ratio")
    if ratio <= 1:
        raise InputError(f"max stage ratio must be greater than 1, got {max_stage_ratio!r}")
    excluded = frozenset(as_int(z, "excluded tooth count") for z in exclude)
    if direction not in (None, "same", "opposite"):
        raise InputError(f"direction must be 'same' or 'opposite', got {direction!r}")
    limits = Limits(low, high, Fraction(repr(ratio)), bool(hunting), excluded, inventory, direction)
    if not limits.teeth:
        raise InputError(f"no tooth count is left to use ({limits.describe()}); allowed: a range, "
                         "exclusions and inventory that leave at least one gear")
    return limits


def stage_allowed(driver: int, driven: int, limits: Limits) -> bool:
    """Whether one stage obeys the stage-ratio limit and, if asked, hunting."""
    r = limits.max_stage_ratio
    if driver * r.denominator > r.numerator * driven or driven * r.denominator > r.numerator * driver:
        return False
    return not limits.hunting or math.gcd(driver, driven) == 1


def assign_stages(drivers: Sequence[int], driven: Sequence[int], limits: Limits) -> tuple[tuple[int, int], ...] | None:
    """Pair drivers with driven gears so that every stage is allowed.

    Returns the stages sorted by (driver, driven), or None when no pairing works.
    Tries every distinct pairing (at most 4! = 24).
    """
    driven_sorted = tuple(sorted(driven))
    for order in sorted(set(permutations(sorted(drivers)))):
        if all(stage_allowed(d, n, limits) for d, n in zip(order, driven_sorted)):
            return tuple(sorted(zip(order, driven_sorted)))
    return None
