"""The network model of gearcad.kinematics: compound trains, planetary networks, errors.

Sources: the compound-train convention (ratio = product of driver/driven
teeth, each external mesh reverses; gearcad.ratio.train), sympy's ``linsolve``
as reference library on hand-written Willis equations, and hand-built
networks whose conflict or freedom is evident from their drawing.
"""

from __future__ import annotations

from fractions import Fraction

import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st

from gearcad.errors import InputError
from gearcad.ratio.kinematics import (FRAME, Gear, Mesh, compound_network, compound_ratio, direction_of, make_network,
                                network_ratio, solve_network, symbolic_ratio, symbolic_speeds)
from gearcad.ratio.target import parse_target
from gearcad.ratio.train import make_train

teeth = st.integers(min_value=8, max_value=150)
stage = st.tuples(teeth, teeth)


@given(st.lists(stage, min_size=1, max_size=4), st.one_of(st.none(), teeth))
def test_compound_is_product_with_sign(stages, idler):
    # source: the compound convention (product of driver/driven; each external mesh reverses the sense)
    product = Fraction(1)
    for driver, driven in stages:
        product *= Fraction(driver, driven)
    meshes = len(stages) + (idler is not None)
    assert compound_ratio(stages, idler) == product * (-1) ** meshes
    train = make_train(stages, parse_target("1"), idler)  # the ratio package's own direction agrees
    assert direction_of(compound_ratio(stages, idler)) == train.direction
    assert abs(compound_ratio(stages, idler)) == train.fraction


def test_compound_network_speeds_of_every_shaft():
    # source: hand computation, 20/40 then 30/15 then 12/36 (product of driver/driven so far, alternating sign)
    network, first, last = compound_network([(20, 40), (30, 15), (12, 36)])
    motion = solve_network(network, {first: 1})
    assert [motion.speed(f"shaft{k}") for k in range(4)] == [1, Fraction(-1, 2), 1, Fraction(-1, 3)]
    assert motion.direction(last, first) == "opposite"


def test_idler_may_sit_in_any_stage():
    # source: an idler adds one mesh and changes no ratio (compound convention)
    a = compound_network([(20, 40), (30, 15)], 17, idler_stage=0)
    b = compound_network([(20, 40), (30, 15)], 17, idler_stage=1)
    assert network_ratio(a[0], (), a[1], a[2]) == network_ratio(b[0], (), b[1], b[2]) == -1


def _wolfrom():
    """Sun (input) drives stepped planets; planet gear b meshes a fixed ring, planet gear c an output ring."""
    gears = [Gear("sun", "sun", 15), Gear("a", "planet", 30), Gear("b", "planet", 30), Gear("c", "planet", 27),
             Gear("fixed-ring", "ring1", 75), Gear("out-ring", "ring2", 72)]
    meshes = [Mesh("sun", "a", "carrier"), Mesh("b", "fixed-ring", "carrier", internal=True),
              Mesh("c", "out-ring", "carrier", internal=True)]
    return make_network(gears, meshes)


def test_network_against_sympy_linsolve():
    # source: sympy as reference library, solving the Willis equations written out by hand
    ws, wp, wc, w1, w2 = sympy.symbols("ws wp wc w1 w2")
    equations = [15 * (ws - wc) + 30 * (wp - wc),   # external sun-a on the carrier
                 30 * (wp - wc) - 75 * (w1 - wc),   # internal b-ring1
                 27 * (wp - wc) - 72 * (w2 - wc),   # internal c-ring2
                 ws - 1, w1]
    (reference,) = sympy.linsolve(equations, [ws, wp, wc, w1, w2])
    motion = solve_network(_wolfrom(), {"sun": 1, "ring1": 0})
    got = [motion.speed(m) for m in ("sun", "planet", "carrier", "ring1", "ring2")]
    assert got == [Fraction(int(sympy.fraction(v)[0]), int(sympy.fraction(v)[1])) for v in reference]


def test_symbolic_ratio_matches_numbers():
    # source: sympy substitution of the tooth counts into the model's own formula
    s, p, r = sympy.symbols("s p r", positive=True)
    net = make_network([Gear("sun", "sun", s), Gear("p", "planet", p), Gear("ring", "ring", r)],
                       [Mesh("sun", "p", "carrier"), Mesh("p", "ring", "carrier", internal=True)])
    formula = symbolic_ratio(net, ("ring",), "sun", "carrier")
    numeric = make_network([Gear("sun", "sun", 18), Gear("p", "planet", 27), Gear("ring", "ring", 72)],
                           [Mesh("sun", "p", "carrier"), Mesh("p", "ring", "carrier", internal=True)])
    assert formula.subs({s: 18, p: 27, r: 72}) == sympy.Rational(18, 90)
    assert network_ratio(numeric, ("ring",), "sun", "carrier") == Fraction(18, 90)
    assert set(symbolic_speeds(net, {"sun": 1, "ring": 0})) == {FRAME, "sun", "planet", "ring", "carrier"}


def test_under_constrained_names_the_free_members():
    # source: the drawing: two separate pairs, only the first driven -> the second pair is free
    net = make_network([Gear("a", "A", 20), Gear("b", "B", 30), Gear("c", "C", 20), Gear("d", "D", 40)],
                       [Mesh("a", "b"), Mesh("c", "d")])
    with pytest.raises(InputError, match=r"free members C, D;") as info:
        solve_network(net, {"A": 1})
    assert "\n" not in str(info.value)
    planetary = _wolfrom()
    everything = r"\(2 degree\(s\) of freedom.*free members sun, planet, ring1, ring2, carrier"
    with pytest.raises(InputError, match=everything):
        solve_network(planetary, {})  # source: an epicyclic train has two degrees of freedom
    with pytest.raises(InputError, match=r"\(1 degree\(s\) of freedom.*free members planet, ring1, ring2, carrier;"):
        solve_network(planetary, {"sun": 1})  # driven but no member held: one left
    assert solve_network(planetary, {"sun": 1, "ring1": 0}).speed("ring2") != 0


def test_inconsistent_names_the_conflict():
    # source: the drawing: three external gears in a ring lock (each mesh reverses, an odd loop)
    net = make_network([Gear("a", "A", 10), Gear("b", "B", 12), Gear("c", "C", 14)],
                       [Mesh("a", "b"), Mesh("b", "c"), Mesh("c", "a")])
    with pytest.raises(InputError, match=r"no solution: mesh a-b; mesh b-c; mesh c-a;.*speed of A = 1") as info:
        solve_network(net, {"A": 1})
    assert "\n" not in str(info.value)
    # a given speed that contradicts the mesh: only that mesh, the two speeds and the frame are named
    pair = make_network([Gear("a", "A", 20), Gear("b", "B", 40)], [Mesh("a", "b")])
    with pytest.raises(InputError, match=r"mesh a-b; speed of frame = 0; speed of A = 1; speed of B = 1 cannot"):
        solve_network(pair, {"A": 1, "B": 1})
    assert solve_network(pair, {"A": 1, "B": Fraction(-1, 2)}).speed("B") == Fraction(-1, 2)  # redundant but agrees


@pytest.mark.parametrize("build, message", [
    (lambda: make_network([Gear("a", "A", 20), Gear("a", "B", 30)], [Mesh("a", "a")]), "used 2 times"),
    (lambda: make_network([Gear("a", "A", 20)], [Mesh("a", "zz")]), "gear 'zz'"),
    (lambda: make_network([Gear("a", "A", 20), Gear("b", "A", 30)], [Mesh("a", "b")]), "both gears are on member"),
    (lambda: make_network([Gear("a", "A", 0), Gear("b", "B", 30)], [Mesh("a", "b")]), "at least 1"),
    (lambda: make_network([Gear("a", "A", 2.5), Gear("b", "B", 30)], [Mesh("a", "b")]), "whole number"),
    (lambda: make_network([Gear("a", "A", 30), Gear("b", "B", 30)], [Mesh("a", "b", internal=True)]), "unequal"),
    (lambda: make_network([Gear("a", "A", 30)], []), "at least one mesh"),
])
def test_bad_networks(build, message):
    # source: the rule, one-line error naming the value and what is allowed
    with pytest.raises(InputError, match=message) as info:
        build()
    assert "\n" not in str(info.value)


def test_bad_speeds():
    # source: the rule, one-line error naming the value and what is allowed
    pair = make_network([Gear("a", "A", 20), Gear("b", "B", 40)], [Mesh("a", "b")])
    with pytest.raises(InputError, match="'Q', which is no member"):
        solve_network(pair, {"Q": 1})
    with pytest.raises(InputError, match="frame's speed is always 0"):
        solve_network(pair, {FRAME: 1})
    with pytest.raises(InputError, match="stands still"):
        solve_network(pair, {"A": 0}).ratio("B", "A")
