"""Inventories: the gears on the shelf, in a small syntax of our own.

Syntax
------
Entries are separated by commas, spaces or line breaks; ``#`` starts a comment
that runs to the end of the line.  Each entry is one of

``Z``
    one gear of ``Z`` teeth, e.g. ``127``;
``ZxN``
    ``N`` gears of ``Z`` teeth, e.g. ``24x2`` (``X`` and ``*`` work too);
``A-B``
    one gear of every tooth count from ``A`` to ``B``, e.g. ``20-30``;
``A-B/S``
    one gear of every ``S``-th count from ``A`` to ``B``, e.g. ``20-120/5``;
    a range entry may carry a quantity too: ``20-60/5x2``.

Repeated entries add up: ``20,20`` is ``20x2``.  Example (a lathe's change
gears)::

    # change gears of the lathe
    20x2, 25-60/5, 65, 70, 75, 80, 127

:func:`read_inventory` accepts such a list or the name of a file holding one;
that function is the only place of the ratio package that reads a file.
"""

from __future__ import annotations

import os
import re
from collections import Counter
from dataclasses import dataclass
from typing import Mapping

from ..errors import InputError

__all__ = ["Inventory", "parse_inventory", "read_inventory", "MAX_INVENTORY_TEETH"]

#: Largest tooth count an inventory entry may name.
MAX_INVENTORY_TEETH = 1000
_ENTRY = re.compile(r"^(\d+)(?:-(\d+)(?:/(\d+))?)?(?:[xX*](\d+))?$")


@dataclass(frozen=True)
class Inventory:
    """A multiset of gears: ``counts`` is a sorted tuple of (teeth, quantity)."""

    counts: tuple[tuple[int, int], ...]

    @classmethod
    def from_mapping(cls, counts: Mapping[int, int]) -> "Inventory":
        """Build from ``{teeth: quantity}`` (quantities > 0 are kept)."""
        return cls(tuple(sorted((int(z), int(n)) for z, n in counts.items() if n > 0)))

    @property
    def teeth(self) -> tuple[int, ...]:
        """The distinct tooth counts, ascending."""
        return tuple(z for z, _ in self.counts)

    def quantity(self, teeth: int) -> int:
        """How many gears of ``teeth`` teeth are on the shelf."""
        return dict(self.counts).get(teeth, 0)

    @property
    def size(self) -> int:
        """Number of physical gears."""
        return sum(n for _, n in self.counts)

    def as_counter(self) -> Counter:
        """The multiset as a :class:`collections.Counter`."""
        return Counter(dict(self.counts))

    def describe(self) -> str:
        """The inventory in its own syntax."""
        return ",".join(f"{z}x{n}" if n > 1 else str(z) for z, n in self.counts)


def _entry_counts(entry: str, source: str) -> dict[int, int]:
    match = _ENTRY.match(entry)
    if not match:
        raise InputError(f"inventory entry {entry!r} in {source} is malformed; allowed: Z, ZxN, A-B or A-B/S "
                         "(whole tooth counts), separated by commas")
    first, last, step, quantity = (int(g) if g else None for g in match.groups())
    last = first if last is None else last
    step = 1 if step is None else step
    quantity = 1 if quantity is None else quantity
    if not (1 <= first <= last <= MAX_INVENTORY_TEETH) or step < 1 or quantity < 1:
        raise InputError(f"inventory entry {entry!r} in {source} is out of range; allowed: tooth counts 1 to "
                         f"{MAX_INVENTORY_TEETH} (ranges low-high), steps and quantities of 1 or more")
    return {z: quantity for z in range(first, last + 1, step)}


def parse_inventory(text: str, source: str = "the inventory") -> Inventory:
    """Parse an inventory written in the syntax of this module.

    Raises
    ------
    InputError
        A malformed entry, or no gear at all.
    """
    total: Counter = Counter()
    for line in text.splitlines():
        for entry in re.split(r"[,\s;]+", line.split("#", 1)[0]):
            if entry:
                total.update(_entry_counts(entry, source))
    if not total:
        raise InputError(f"{source} lists no gear; allowed: entries such as 20,24x2,127")
    return Inventory.from_mapping(total)


def read_inventory(spec: str) -> Inventory:
    """An inventory from a list (``20,24x2,127``) or from the file of that name.

    A file is read when ``spec`` names an existing file; otherwise ``spec`` is
    parsed as a list.
    """
    if os.path.isfile(spec):
        try:
            with open(spec, encoding="utf-8") as handle:
                text = handle.read()
        except (OSError, UnicodeDecodeError) as exc:
            raise InputError(f"inventory file {spec!r} cannot be read: {exc}") from None
        return parse_inventory(text, f"inventory file {spec!r}")
    if re.search(r"[A-Za-wyzA-WYZ./\\]", spec.replace("x", "").replace("X", "")) and not re.fullmatch(r"[\d\s,;xX*/\-]+", spec):
        raise InputError(f"inventory {spec!r} is neither an existing file nor a list such as 20,24x2,127")
    return parse_inventory(spec, f"inventory {spec!r}")
