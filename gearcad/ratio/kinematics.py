"""The exact kinematics of any gear network: members, gears, meshes, one linear system.

A *member* is anything that turns as one body about its own axis: a shaft,
a planet carrier, a ring, the frame.  A *gear* is fixed to a member.  A
*mesh* joins two gears whose axes are both held by one *carrier* member (the
frame for ordinary fixed axes, the planet carrier for the meshes of a
planet).  Each mesh gives one Willis equation, relative to its carrier ``c``::

    (w_a - w_c) / (w_b - w_c) = -z_b / z_a    external mesh
    (w_a - w_c) / (w_b - w_c) = +z_b / z_a    internal mesh

written without division as ``z_a w_a -+ z_b w_b - (z_a -+ z_b) w_c = 0``.
Given speeds (an input turning at 1, fixed members at 0; the frame is
always 0) add one equation each.  The system is solved exactly over the
rationals (sympy's ``DomainMatrix`` over ``QQ``); tooth counts may also be
sympy symbols, and the same elimination then runs over the field of rational
functions, which gives a ratio as a formula in the tooth counts.

Speeds are angular speeds in any one unit (turns per turn of the input when
the input is given 1); a positive and a negative speed turn opposite ways.
Pure computation, no I/O.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any, Mapping, Sequence, Union

import sympy
from sympy.polys.matrices import DomainMatrix

from ..errors import InputError
from ..validate import as_int

__all__ = [
    "FRAME", "Gear", "Mesh", "Network", "Motion", "make_network", "solve_network", "network_ratio",
    "symbolic_speeds", "symbolic_ratio", "compound_network", "compound_ratio", "direction_of",
]

#: The member every fixed axis belongs to; its speed is always 0.
FRAME = "frame"

Teeth = Union[int, sympy.Symbol]


@dataclass(frozen=True)
class Gear:
    """A gear fixed to a member.

    Attributes
    ----------
    name : str
        Unique name of the gear.
    member : str
        The member it turns with.
    teeth : int or sympy.Symbol
        Tooth count (a symbol for a formula in the tooth counts).
    """

    name: str
    member: str
    teeth: Teeth


@dataclass(frozen=True)
class Mesh:
    """Two gears in mesh, both axes held by ``carrier``.

    Attributes
    ----------
    gear_a, gear_b : str
        Names of the two gears (either order).
    carrier : str
        The member holding both axes (``FRAME`` for fixed axes).
    internal : bool
        True when one of the two gears is an internal (ring) gear.
    worm : bool
        True for a worm (``gear_a``, its teeth = its starts) and its wheel (``gear_b``) on crossed
        axes: ``z_a (w_a - w_c) = z_b (w_b - w_c)``, each axis oriented so that a right-hand worm
        turning positively turns its wheel positively (a convention: "same" or "opposite" has no
        meaning across crossed axes; the magnitude is exact).
    """

    gear_a: str
    gear_b: str
    carrier: str = FRAME
    internal: bool = False
    worm: bool = False

    @property
    def label(self) -> str:
        """``"mesh a-b"`` (with ``"(internal)"`` and the carrier when it is not the frame)."""
        kind = " internal" if self.internal else " worm" if self.worm else ""
        held = f" on {self.carrier}" if self.carrier != FRAME else ""
        return f"mesh{kind} {self.gear_a}-{self.gear_b}{held}"


@dataclass(frozen=True)
class Network:
    """Gears and meshes; built and checked by :func:`make_network`.

    Attributes
    ----------
    gears : tuple of Gear
    meshes : tuple of Mesh
    """

    gears: tuple[Gear, ...]
    meshes: tuple[Mesh, ...]

    @property
    def members(self) -> tuple[str, ...]:
        """Every member, the frame first, then in order of first appearance."""
        seen = [FRAME]
        for name in [g.member for g in self.gears] + [m.carrier for m in self.meshes]:
            if name not in seen:
                seen.append(name)
        return tuple(seen)

    def gear(self, name: str) -> Gear:
        """The gear called ``name``."""
        for g in self.gears:
            if g.name == name:
                return g
        raise InputError(f"no gear named {name!r}; allowed: {', '.join(g.name for g in self.gears)}")


def _check_teeth(gear: Gear) -> Gear:
    if isinstance(gear.teeth, sympy.Symbol):
        return gear
    teeth = as_int(gear.teeth, f"teeth of gear {gear.name!r}")
    if teeth < 1:
        raise InputError(f"teeth of gear {gear.name!r} must be at least 1, got {gear.teeth!r}")
    return Gear(gear.name, gear.member, teeth)


def _check_mesh(mesh: Mesh, gears: Mapping[str, Gear]) -> None:
    for name in (mesh.gear_a, mesh.gear_b):
        if name not in gears:
            raise InputError(f"{mesh.label} names gear {name!r}, which is not in the network; "
                             f"allowed: {', '.join(gears)}")
    a, b = gears[mesh.gear_a], gears[mesh.gear_b]
    if a.member == b.member:
        raise InputError(f"{mesh.label}: both gears are on member {a.member!r}; allowed: gears on two members")
    if mesh.internal and a.teeth == b.teeth:
        raise InputError(f"{mesh.label}: an internal mesh needs unequal tooth counts, got {a.teeth} and {b.teeth}")


def make_network(gears: Sequence[Gear], meshes: Sequence[Mesh]) -> Network:
    """Check and build a :class:`Network`.

    Raises
    ------
    InputError
        Duplicate gear names, a mesh naming an unknown gear or joining two
        gears of one member, tooth counts that are not whole and positive.
    """
    checked = [_check_teeth(g) for g in gears]
    names = [g.name for g in checked]
    for name in names:
        if names.count(name) > 1:
            raise InputError(f"gear name {name!r} is used {names.count(name)} times; allowed: unique names")
    by_name = {g.name: g for g in checked}
    for mesh in meshes:
        _check_mesh(mesh, by_name)
    if not meshes:
        raise InputError("a network needs at least one mesh, got none")
    return Network(tuple(checked), tuple(meshes))


@dataclass(frozen=True)
class Motion:
    """The exact speed of every member.

    Attributes
    ----------
    speeds : dict of str to Fraction
        Angular speed of each member (frame 0), in the unit of the given speeds.
    """

    speeds: Mapping[str, Fraction]

    def speed(self, member: str) -> Fraction:
        """Speed of ``member``."""
        if member not in self.speeds:
            raise InputError(f"no member named {member!r}; allowed: {', '.join(self.speeds)}")
        return self.speeds[member]

    def ratio(self, output: str, input: str) -> Fraction:
        """``speed(output) / speed(input)``: output turns per input turn, signed."""
        w_in = self.speed(input)
        if w_in == 0:
            raise InputError(f"member {input!r} stands still, so no ratio to it exists; allowed: a turning input")
        return self.speed(output) / w_in

    def direction(self, member: str, relative_to: str) -> str:
        """``"same"``, ``"opposite"`` or ``"still"``: sense of ``member`` against ``relative_to``."""
        return direction_of(self.ratio(member, relative_to))


def direction_of(ratio: Fraction) -> str:
    """``"same"`` for a positive ratio, ``"opposite"`` for a negative one, ``"still"`` for 0."""
    return "same" if ratio > 0 else "opposite" if ratio < 0 else "still"


# --- the linear system --------------------------------------------------------------------------------------

def _domain(network: Network) -> Any:
    symbols = sorted({g.teeth for g in network.gears if isinstance(g.teeth, sympy.Symbol)}, key=str)
    return sympy.QQ.frac_field(*symbols) if symbols else sympy.QQ


def _rows(network: Network, speeds: Mapping[str, Any], domain: Any) -> tuple[list[list[Any]], list[str]]:
    """Augmented rows ``[coefficients | right side]`` and a label for each."""
    members = network.members
    index = {m: i for i, m in enumerate(members)}
    zero = domain.zero
    rows, labels = [], []
    for mesh in network.meshes:
        a, b = network.gear(mesh.gear_a), network.gear(mesh.gear_b)
        za, zb = domain.from_sympy(sympy.sympify(a.teeth)), domain.from_sympy(sympy.sympify(b.teeth))
        sign = -1 if mesh.internal or mesh.worm else 1
        row = [zero] * (len(members) + 1)
        row[index[a.member]] += za
        row[index[b.member]] += sign * zb
        row[index[mesh.carrier]] -= za + sign * zb
        rows.append(row)
        labels.append(mesh.label)
    for member, value in {FRAME: 0, **speeds}.items():
        row = [zero] * (len(members) + 1)
        row[index[member]] = domain.one
        row[-1] = domain.from_sympy(sympy.Rational(str(Fraction(value))) if not isinstance(value, sympy.Basic)
                                    else value)
        rows.append(row)
        labels.append(f"speed of {member} = {value}")
    return rows, labels


def _rref(rows: list[list[Any]], domain: Any) -> tuple[Any, tuple[int, ...]]:
    width = len(rows[0])
    matrix = DomainMatrix(rows, (len(rows), width), domain)
    reduced, pivots = matrix.rref()
    return reduced.to_list(), tuple(pivots)


def _consistent(rows: list[list[Any]], domain: Any) -> bool:
    return len(rows[0]) - 1 not in _rref(rows, domain)[1]


def _conflict(rows: list[list[Any]], labels: list[str], domain: Any) -> list[str]:
    """A smallest set of equations that cannot hold together (deletion filter)."""
    keep = list(range(len(rows)))
    for i in list(keep):
        trial = [k for k in keep if k != i]
        if trial and not _consistent([rows[k] for k in trial], domain):
            keep = trial
    return [labels[k] for k in keep]


def _check_speeds(network: Network, speeds: Mapping[str, Any]) -> None:
    members = network.members
    for member, value in speeds.items():
        if member not in members:
            raise InputError(f"speed given for {member!r}, which is no member of the network; "
                             f"allowed: {', '.join(members)}")
        if member == FRAME and value != 0:
            raise InputError(f"the frame's speed is always 0, got {value!r}")


def _solve(network: Network, speeds: Mapping[str, Any]) -> dict[str, Any]:
    """Speed of every member as domain elements; :class:`InputError` when not one solution."""
    _check_speeds(network, speeds)
    domain = _domain(network)
    rows, labels = _rows(network, speeds, domain)
    reduced, pivots = _rref(rows, domain)
    members = network.members
    if len(members) in pivots:
        conflict = _conflict(rows, labels, domain)
        raise InputError("the network has no solution: " + "; ".join(conflict) + " cannot all hold; allowed: "
                         "speeds and meshes that agree (drop or change one of these)")
    free_columns = [j for j in range(len(members)) if j not in pivots]
    if free_columns:
        free = {members[j] for j in free_columns}
        for r, p in enumerate(pivots):
            if any(reduced[r][f] != domain.zero for f in free_columns):
                free.add(members[p])
        names = [m for m in members if m in free]
        raise InputError(f"the network is under-constrained ({len(free_columns)} degree(s) of freedom left): "
                         f"free members {', '.join(names)}; allowed: give {len(free_columns)} more speed(s), "
                         "e.g. fix or drive one of them")
    return {members[p]: reduced[r][-1] for r, p in enumerate(pivots)}


def solve_network(network: Network, speeds: Mapping[str, int | Fraction]) -> Motion:
    """The exact speed of every member, given the speeds of some.

    Parameters
    ----------
    network : Network
        With whole tooth counts.
    speeds : mapping of str to int or Fraction
        Known speeds, e.g. ``{"sun": 1, "ring": 0}``; the frame is always 0.

    Returns
    -------
    Motion

    Raises
    ------
    InputError
        Under-constrained (the message names the members left free) or
        inconsistent (the message names the meshes and speeds in conflict).
    """
    if _domain(network) != sympy.QQ:
        raise InputError("solve_network needs whole tooth counts; allowed: ints (use symbolic_speeds for symbols)")
    solution = _solve(network, speeds)
    return Motion({m: Fraction(int(v.numerator), int(v.denominator)) for m, v in solution.items()})


def network_ratio(network: Network, fixed: Sequence[str], input: str, output: str) -> Fraction:
    """Output turns per input turn (signed) with ``fixed`` members held still and ``input`` turning."""
    speeds: dict[str, int] = {m: 0 for m in fixed}
    speeds[input] = 1
    return solve_network(network, speeds).ratio(output, input)


def symbolic_speeds(network: Network, speeds: Mapping[str, Any]) -> dict[str, sympy.Expr]:
    """Every member's speed as a rational function of the symbolic tooth counts.

    The elimination is exact over the field of rational functions, so the
    result holds for every tooth count where no denominator vanishes.
    """
    domain = _domain(network)
    return {m: domain.to_sympy(v) for m, v in _solve(network, speeds).items()}


def symbolic_ratio(network: Network, fixed: Sequence[str], input: str, output: str) -> sympy.Expr:
    """Output turns per input turn as a formula in the symbolic tooth counts."""
    speeds: dict[str, int] = {m: 0 for m in fixed}
    speeds[input] = 1
    return sympy.cancel(symbolic_speeds(network, speeds)[output])


# --- compound trains ----------------------------------------------------------------------------------------

def compound_network(stages: Sequence[tuple[int, int]], idler: int | None = None,
                     idler_stage: int | None = None) -> tuple[Network, str, str]:
    """The network of a compound train on fixed axes.

    Stage ``k`` meshes its driver (on shaft ``k``) with its driven gear (on
    shaft ``k + 1``), both axes on the frame; an idler (on its own shaft)
    sits between driver and driven of ``idler_stage`` (default: the last).

    Returns
    -------
    network, input, output : Network, str, str
        The network and the names of its input and output members.
    """
    if not stages:
        raise InputError("a compound train needs at least one stage, got none")
    where = len(stages) - 1 if idler_stage is None else as_int(idler_stage, "idler stage")
    if not 0 <= where < len(stages):
        raise InputError(f"idler stage must be from 0 to {len(stages) - 1}, got {idler_stage!r}")
    gears, meshes = [], []
    for k, (driver, driven) in enumerate(stages):
        gears += [Gear(f"s{k}-driver", f"shaft{k}", driver), Gear(f"s{k}-driven", f"shaft{k + 1}", driven)]
        if idler is not None and k == where:
            gears.append(Gear(f"s{k}-idler", f"idler{k}", idler))
            meshes += [Mesh(f"s{k}-driver", f"s{k}-idler"), Mesh(f"s{k}-idler", f"s{k}-driven")]
        else:
            meshes.append(Mesh(f"s{k}-driver", f"s{k}-driven"))
    return make_network(gears, meshes), "shaft0", f"shaft{len(stages)}"


def compound_ratio(stages: Sequence[tuple[int, int]], idler: int | None = None) -> Fraction:
    """Signed ratio (output turns per input turn) of a compound train, from the network model."""
    network, input, output = compound_network(stages, idler)
    return network_ratio(network, (), input, output)
