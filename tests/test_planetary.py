"""Planetary sets: ratios against a handbook table, the three conditions by construction, the solver's optimum.

Sources (named again beside each check):

- Dudley, *Handbook of Practical Gear Design*, the table of simple epicyclic
  arrangements (from memory): reduction (input turns per output turn)
  "planetary" (ring fixed, sun in, carrier out) ``1 + R/S``; "star" (carrier
  fixed, sun in, ring out) ``-R/S``; "solar" (sun fixed, ring in, carrier out)
  ``1 + S/R``; with compound (stepped) planets ``R/S`` becomes
  ``(R P1) / (S P2)``; input and output swapped give the reciprocal.
- Geometric constructions written out here: real tooth centres placed around
  sun, planets and ring; planet centres on their circle; involute tooth
  thickness on the working pitch circles.
- An exhaustive search in this file over small tooth ranges.
"""

from __future__ import annotations

import math
from fractions import Fraction
from itertools import product

import pytest
from hypothesis import given
from hypothesis import strategies as st

from gearcad.errors import InputError
from gearcad.geometry.involute import inv
from gearcad.ratio.planetary_set import MEMBERS, STANDARD_PRESSURE_ANGLE, assembly_angles, check_set, make_arrangement, make_set, phase_mismatch, ratio_formula, set_ratio
from gearcad.ratio.planetary import make_query, solve_planetary
from gearcad.ratio import make_limits, parse_target

ARRANGEMENTS = [make_arrangement(f, i) for f in MEMBERS for i in MEMBERS if i != f]


def handbook_ratio(arrangement, s, p1, p2, r):
    """Output turns per input turn from Dudley's table (from memory), stepped planets included."""
    k = Fraction(r * p1, s * p2)  # R/S for a simple planet
    reduction = {("ring", "sun"): 1 + k, ("carrier", "sun"): -k, ("sun", "ring"): 1 + 1 / k}
    fixed, inp, out = arrangement.fixed, arrangement.input, arrangement.output
    if (fixed, inp) in reduction:  # the table's own direction: input -> output
        return 1 / reduction[(fixed, inp)]
    return reduction[(fixed, out)]  # input and output swapped: the reciprocal


# --- ratios -------------------------------------------------------------------------------------------------

@pytest.mark.parametrize("arrangement", ARRANGEMENTS, ids=lambda a: a.describe())
def test_simple_sets_against_the_handbook_table(arrangement):
    # source: Dudley's table of epicyclic arrangements (from memory), against the general network solver
    for s, p in product(range(10, 41, 3), range(10, 41, 5)):
        pset = make_set(s, p, s + 2 * p, 3)
        assert set_ratio(pset, arrangement) == handbook_ratio(arrangement, s, p, p, s + 2 * p)


@given(st.integers(10, 60), st.integers(10, 60), st.integers(10, 60), st.integers(1, 5),
       st.sampled_from(ARRANGEMENTS))
def test_stepped_sets_against_the_handbook_table(s, p1, p2, n, arrangement):
    # source: Dudley's table, compound planets (from memory), against the general network solver with n planets
    pset = make_set(s, p1, s + p1 + p2, n, p2)
    assert set_ratio(pset, arrangement) == handbook_ratio(arrangement, s, p1, p2, s + p1 + p2)


@pytest.mark.parametrize("arrangement", ARRANGEMENTS, ids=lambda a: a.describe())
def test_search_formula_is_the_network_solution(arrangement):
    # source: the numeric network (every planet a member) against the symbolic formula the search evaluates
    num, den = ratio_formula(True, arrangement)
    for s, p1, p2 in [(12, 40, 15), (20, 18, 33), (31, 11, 60)]:
        subs = {str(k): v for k, v in zip(("z_p1", "z_p2", "z_r", "z_s"), (p1, p2, s + p1 + p2, s))}
        values = {sym: subs[str(sym)] for sym in num.free_symbols | den.free_symbols}
        expected = set_ratio(make_set(s, p1, s + p1 + p2, 2, p2), arrangement)
        assert Fraction(int(num.subs(values)), int(den.subs(values))) == expected


# --- assembly: a geometric construction ---------------------------------------------------------------------

def _wrap(angle, period):
    return (angle + period / 2) % period - period / 2


def geometric_misses(s, p1, p2, r, angles):
    """Ring-mesh miss (circular pitches) of each planet, built from real tooth centres (module 1).

    Sun and ring have a tooth centred at angle 0.  A planet at ``theta`` meets
    the sun at the pitch point in direction ``theta``: the sun tooth nearest
    lies an arc ``s_arc`` away along the sun's pitch circle, so the planet needs
    a tooth space ``s_arc`` away the other way round its own pitch circle.
    Each of the planet's ``p1`` ways to do so is tried; its second gear must
    then put a space where the ring's nearest tooth meets the pitch point in
    direction ``theta``.  The phase between the planet's two gears is set by
    planet 0, which therefore fits.
    """
    rs, r1, r2, rr = s / 2, p1 / 2, p2 / 2, r / 2

    def turns(theta):
        sun_tooth = 2 * math.pi * round(theta * s / (2 * math.pi)) / s
        beta = theta + math.pi - rs * (sun_tooth - theta) / r1 - math.pi / p1  # gear 1: a space faces the sun tooth
        ring_tooth = 2 * math.pi * round(theta * r / (2 * math.pi)) / r
        wanted = theta + rr * (ring_tooth - theta) / r2  # where gear 2 needs a space centre
        return beta, wanted

    beta0, wanted0 = turns(angles[0])
    delta = wanted0 - beta0 - math.pi / p2  # gear 2's phase on the planet shaft, fixed by planet 0
    misses = []
    for theta in angles:
        beta, wanted = turns(theta)
        best = min(abs(_wrap(wanted - (beta + 2 * math.pi * i / p1 + delta + math.pi / p2), 2 * math.pi / p2))
                   for i in range(p1))
        misses.append(best * r2 / math.pi)  # arc over the circular pitch (pi m, m = 1)
    return misses


def _equal(n):
    return [2 * math.pi * k / n for k in range(n)]


def test_simple_assembly_condition_by_construction():
    # source: the geometric construction above, over every small simple set and planet count
    for s, p, n in product(range(10, 25), range(10, 21, 2), range(2, 7)):
        pset = make_set(s, p, s + 2 * p, n)
        misses = geometric_misses(s, p, p, s + 2 * p, _equal(n))
        fits = all(m < 1e-9 for m in misses)
        assert fits == ((2 * s + 2 * p) % n == 0)  # (z_s + z_r) / N whole (from memory)
        assert fits == (check_set(pset).assembly.severity == "ok")
        assert misses == pytest.approx(phase_mismatch(pset, _equal(n)), abs=1e-9)


@given(st.integers(10, 40), st.integers(10, 40), st.integers(10, 40), st.integers(2, 6))
def test_stepped_assembly_condition_by_construction(s, p1, p2, n):
    # source: the geometric construction above; the general condition (z_s z_p2 + z_r z_p1) / (N gcd) whole
    r = s + p1 + p2
    pset = make_set(s, p1, r, n, p2)
    misses = geometric_misses(s, p1, p2, r, _equal(n))
    condition = (s * p2 + r * p1) % (n * math.gcd(p1, p2)) == 0
    assert all(m < 1e-9 for m in misses) == condition
    assert misses == pytest.approx(phase_mismatch(pset, _equal(n)), abs=1e-9)
    assert max(geometric_misses(s, p1, p2, r, assembly_angles(pset))) < 1e-9  # the reported spacing assembles


def test_a_failing_set_shows_the_clash():
    # source: the geometric construction: 20/30/80 with 3 planets, (20 + 80) / 3 is not whole
    pset = make_set(20, 30, 80, 3)
    misses = geometric_misses(20, 30, 30, 80, _equal(3))
    assert misses[0] == pytest.approx(0, abs=1e-12) and misses[1] == pytest.approx(1 / 3, abs=1e-9)
    finding = check_set(pset).assembly
    assert finding.severity == "warning" and "planet 2 misses the ring by 0.333 pitch" in finding.message
    angles = assembly_angles(pset)
    assert max(geometric_misses(20, 30, 30, 80, angles)) < 1e-9
    assert [round(math.degrees(a), 3) for a in angles] == [0, 118.8, 241.2]  # multiples of 360/100 degrees


# --- coaxial: involute tooth thickness on the working circles -----------------------------------------------

def _thickness(z, x, radius, alpha=STANDARD_PRESSURE_ANGLE):
    """Arc tooth thickness of an external gear (module 1) at ``radius``: involute geometry."""
    alpha_r = math.acos(z * math.cos(alpha) / 2 / radius)
    return 2 * radius * ((math.pi / 2 + 2 * x * math.tan(alpha)) / z + inv(alpha) - inv(alpha_r))


@pytest.mark.parametrize("teeth, stepped", [((20, 30, 81), False), ((20, 30, 78), False), ((18, 40, 77, 20), True),
                                            ((18, 40, 80, 20), True), ((24, 24, 71), False)])
def test_shifted_sets_mesh_without_backlash(teeth, stepped):
    # source: involute tooth thickness; the teeth of each mesh fill the working pitch exactly, and the
    # planet's tooth fills the ring's tooth space (a ring space is shaped like an external tooth)
    pset = make_set(teeth[0], teeth[1], teeth[2], 1, teeth[3] if stepped else None)
    c = check_set(pset, shift_limit=0.5)
    assert c.coaxial.severity == "ok" and max(abs(x) for x in c.shifts) <= 0.5 + 1e-9
    xs, xp1, xp2, xr = c.shifts
    a = c.centre_distance
    z_s, z_1, z_2, z_r = pset.sun, pset.planet, pset.ring_planet, pset.ring
    r_s, r_1 = a * z_s / (z_s + z_1), a * z_1 / (z_s + z_1)
    assert _thickness(z_s, xs, r_s) + _thickness(z_1, xp1, r_1) == pytest.approx(2 * math.pi * r_1 / z_1, abs=1e-9)
    r_2, r_r = a * z_2 / (z_r - z_2), a * z_r / (z_r - z_2)
    # the ring's space is an external tooth of the opposite shift (ISO sign: the ring's shift points inwards)
    assert _thickness(z_2, xp2, r_2) == pytest.approx(_thickness(z_r, -xr, r_r), abs=1e-9)
    if not stepped:
        assert xp1 == xp2  # a simple planet has one shift


def test_coaxial_failure_names_the_ring():
    # source: the tooth equation z_r = z_s + 2 z_p of one module (20 + 60 = 80 teeth)
    finding = check_set(make_set(20, 30, 83, 4)).coaxial
    assert finding.severity == "failure" and "ring of 80 teeth" in finding.message
    assert check_set(make_set(20, 30, 83, 4), shift_limit=0.1).coaxial.severity == "failure"  # 3 teeth too far


# --- neighbour: planet centres placed on their circle -------------------------------------------------------

@pytest.mark.parametrize("teeth, n, ok", [((12, 30, 72), 6, False), ((30, 18, 66), 6, True), ((12, 21, 54), 3, True),
                                          ((10, 90, 190, 0), 2, True), ((18, 38, 94), 4, False)])
def test_neighbour_condition_by_construction(teeth, n, ok):
    # source: planet centres at a (cos t, sin t); centre spacing minus the tip diameter m (z + 2) against
    # half a module (common practice)
    pset = make_set(teeth[0], teeth[1], teeth[2], n)
    c = check_set(pset, module=2.0)
    a = c.centre_distance
    centres = [(a * math.cos(t), a * math.sin(t)) for t in c.angles]
    spacing = min(math.dist(centres[k], centres[(k + 1) % n]) for k in range(n))
    clearance = spacing - 2.0 * (pset.planet + 2)
    assert c.neighbour.value == pytest.approx(clearance, abs=1e-9)
    assert (c.neighbour.severity == "ok") == ok == (clearance >= 1.0)


# --- the solver against an exhaustive search ----------------------------------------------------------------

def ring_tips_clear(planet, ring, ring_shift=0.0, centre=None, alpha=math.radians(20)):
    """Internal mesh at module 1: the ring's tip circle (radius z_r / 2 - (1 + x_r), ISO sign) outside the
    planet's interference point, the line of action's tangent point on the planet's base circle, which lies
    sqrt(r_b2^2 + (a_w sin alpha_w)^2) from the ring's axis, cos alpha_w = (z_r - z_p) cos alpha / (2 a_w)
    (ISO 21771 geometry; the unshifted form is cross-checked against gearcad.internal's full check in
    tests/test_summing.py)."""
    centre = (ring - planet) / 2 if centre is None else centre
    along = centre * math.sqrt(1 - ((ring - planet) * math.cos(alpha) / (2 * centre)) ** 2)
    return ring / 2 - (1 + ring_shift) >= math.hypot(ring * math.cos(alpha) / 2, along) - 1e-9


def exhaustive(target, arrangement, teeth, max_ring, n, stepped, count, margin=0.5):
    """Best sets by brute force: every sun and planet, the coaxial ring, formulas of this file's sources."""
    t = target.approx
    best = {}
    for s, p1 in product(teeth, teeth):
        for p2 in (teeth if stepped else [p1]):
            r = s + p1 + p2
            if (stepped and p1 == p2) or r > max_ring or r - p2 < 10:
                continue
            if (s * p2 + r * p1) % (n * math.gcd(p1, p2)):  # the assembly condition (checked geometrically above)
                continue
            if n > 1 and (s + p1) * math.sin(math.pi / n) - (max(p1, p2) + 2) < margin - 1e-9:
                continue
            if not ring_tips_clear(p2, r):
                continue
            ratio = handbook_ratio(arrangement, s, p1, p2, r)
            key = (abs(abs(ratio) / t - 1), s + r + n * (p1 + (p2 if stepped else 0)), abs(ratio), (s, p1, p2, r))
            if abs(ratio) not in best or key < best[abs(ratio)]:
                best[abs(ratio)] = key
    return [k[3] for k in sorted(best.values())[:count]]


def _rows(results):
    return [(r.set.sun, r.set.planet, r.set.ring_planet, r.set.ring) for r in results]


@pytest.mark.parametrize("stepped", [False, True])
@pytest.mark.parametrize("arrangement", ARRANGEMENTS, ids=lambda a: a.describe())
def test_solver_is_optimal(arrangement, stepped):
    # source: the exhaustive search above on a small range
    teeth = range(10, 23) if stepped else range(10, 31)
    limits = make_limits(10, teeth[-1])
    for text, n in [("0.2371", 3), ("2.7", 4), ("pi", 2)]:
        target = parse_target(text)
        query = make_query(target, limits, arrangement, n, stepped, 90, count=3)
        expected = exhaustive(target, arrangement, teeth, 90, n, stepped, 3)
        assert len(expected) == 3 and _rows(solve_planetary(query)) == expected


@pytest.mark.parametrize("stepped", [False, True])
def test_solver_with_shift_is_optimal(stepped):
    # source: an exhaustive search over every ring size, the conditions judged by check_set, ratios by the handbook
    teeth = range(10, 17) if stepped else range(10, 25)
    arrangement = make_arrangement("ring", "sun")
    target = parse_target("0.2222")
    best = {}
    for s, p1, r in product(teeth, teeth, range(20, 91)):
        for p2 in (teeth if stepped else [p1]):
            if (stepped and p1 == p2) or r - p2 < 10:
                continue
            pset = make_set(s, p1, r, 3, p2 if stepped else None)
            conditions = check_set(pset, shift_limit=0.5)
            if not conditions.ok or not ring_tips_clear(p2, r, conditions.shifts[3], conditions.centre_distance):
                continue
            ratio = handbook_ratio(arrangement, s, p1, p2, r)
            key = (abs(ratio / target.approx - 1), pset.total_teeth, ratio, (s, p1, p2, r))
            best[ratio] = min(best.get(ratio, key), key)
    expected = [k[3] for k in sorted(best.values())[:4]]
    assert len(expected) == 4
    query = make_query(target, make_limits(10, teeth[-1]), arrangement, 3, stepped, 90, shift_limit=0.5, count=4)
    results = solve_planetary(query)
    assert _rows(results) == expected
    assert any(any(r.conditions.shifts) for r in results) or not stepped  # shifts are used, not only standard rings


def test_direction_filter_and_exact_errors():
    # source: Dudley's table: a star arrangement (carrier fixed) always reverses
    limits = make_limits(10, 40, direction="same")
    query = make_query(parse_target("0.5"), limits, make_arrangement("carrier", "sun"), 3)
    assert solve_planetary(query) == []
    best = solve_planetary(make_query(parse_target("0.5"), make_limits(10, 40), make_arrangement("carrier", "sun")))[0]
    assert best.direction == "opposite" and best.signed == -Fraction(best.set.sun, best.set.ring)
    assert best.relative_error == float(Fraction(best.set.sun, best.set.ring) / Fraction(1, 2) - 1)


def test_stepped_planets_reach_a_hundred_to_one():
    # source: Dudley's compound-planet form 1 + (R P1)/(S P2), checked on the solver's set; the geometric
    # assembly construction above; simple sets cannot: 1 + R/S <= 1 + 200/10 within these limits
    # 150 teeth: with at most 120 the ring-side planet that meshes without interference needs shift
    query = make_query(parse_target("1/100"), make_limits(10, 150), make_arrangement("ring", "sun"), 2, True)
    (best,) = solve_planetary(query)
    assert ring_tips_clear(best.set.ring_planet, best.set.ring)
    s, p1, p2, r = best.set.sun, best.set.planet, best.set.ring_planet, best.set.ring
    assert best.relative_error == 0 and best.conditions.ok
    assert 1 + Fraction(r * p1, s * p2) == 100
    assert max(geometric_misses(s, p1, p2, r, _equal(2))) < 1e-9
    simple = solve_planetary(make_query(parse_target("1/100"), make_limits(10, 120), make_arrangement("ring", "sun"),
                                        2))
    assert simple[0].ratio >= 1 / 21


# --- bad input ----------------------------------------------------------------------------------------------

@pytest.mark.parametrize("build, message", [
    (lambda: make_set(20, 30, 35, 3), r"ring of 35 teeth is too few for a planet gear of 30 teeth.*ring >= 40"),
    (lambda: make_set(20, 30, 80, 0), r"planets must be from 1 to 24, got 0"),
    (lambda: make_set(20, 30, 80, 3, 75), r"ring of 80 teeth is too few for a planet gear of 75 teeth"),
    (lambda: make_arrangement("ring", "ring"), r"input member 'ring' is the fixed member"),
    (lambda: make_arrangement("moon"), r"fixed member must be one of sun, ring, carrier"),
    (lambda: make_query(parse_target("5"), make_limits(), planets=12, max_ring_teeth=50),
     r"planets 12: a ring of at most 50 teeth cannot hold 12 planets.*allowed: planets \d+ or fewer"),
    (lambda: make_query(parse_target("5"), make_limits(), max_ring_teeth=25),
     r"max ring teeth 25 is fewer than the smallest ring the planets allow: 30"),
    (lambda: make_query(parse_target("5"), make_limits(), planets=30), r"planets must be from 1 to 24, got 30"),
    (lambda: make_query(parse_target("5"), make_limits(), shift_limit=2), r"shift limit must be from 0 to 1"),
])
def test_bad_input(build, message):
    # source: the rule, one-line error naming the value and what is allowed
    with pytest.raises(InputError, match=message) as info:
        build()
    assert "\n" not in str(info.value)


def test_planet_count_bound_is_tight():
    # source: the exhaustive search above: the largest planet count the error message allows does hold a set
    with pytest.raises(InputError) as info:
        make_query(parse_target("5"), make_limits(10, 60), planets=12, max_ring_teeth=50)
    allowed = int(str(info.value).split("allowed: planets ")[1].split()[0])
    teeth = range(10, 61)
    assert any(s + 2 * p <= 50 and (s + p) * math.sin(math.pi / allowed) - (p + 2) >= 0.5
               for s, p in product(teeth, teeth))
    assert not any(s + 2 * p <= 50 and (s + p) * math.sin(math.pi / (allowed + 1)) - (p + 2) >= 0.5
                   for s, p in product(teeth, teeth))
