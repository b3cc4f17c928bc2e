"""Summing trains: exact where compound trains cannot be, optimal against exhaustive search, kinematics by sympy."""

import itertools
from fractions import Fraction

import numpy as np
import pytest
import sympy

from gearcad.ratio import parse_target
from gearcad.ratio.summing import solve_summing, summing_ratio


def willis_carrier_speed(sun_speed, ring_speed, sun, ring):
    """Carrier speed from Willis's equation (w_s - w_c) / (w_r - w_c) = -z_r / z_s, solved by sympy."""
    w_c = sympy.Symbol("w_c")
    solution = sympy.solve(sympy.Eq((sun_speed - w_c) * sun, -(ring_speed - w_c) * ring), w_c)
    return Fraction(str(solution[0]))


def test_a_large_prime_numerator_is_reached_exactly_by_the_mean_differential():
    # 127/200: 127 is a prime above the 100-tooth limit, so no compound train of 12..100 teeth hits it
    # (a compound ratio's numerator is a product of tooth counts); the sum of two stages does.
    best = solve_summing(parse_target("127/200"), list(range(12, 101)), "mean", 1, one_axis=False)[0]
    assert best.ratio == Fraction(127, 200) and best.relative_error == 0.0
    rho_a = Fraction(*best.path_a) * best.sign_a
    rho_b = Fraction(*best.path_b) * best.sign_b
    assert (rho_a + rho_b) / 2 == Fraction(127, 200)  # the mean differential: carrier at the mean of the sides


def test_a_large_prime_denominator_is_reached_exactly_by_a_planetary_differential():
    # 1/131: 131 is prime and above the tooth limit; with the set's z_s + z_r = 2 (z_s + z_p) = 262 it is reached.
    best = solve_summing(parse_target("1/131"), list(range(12, 101)), "planetary", 1, planets=2, one_axis=False)[0]
    assert best.ratio == Fraction(1, 131)
    sun, planet, ring, planets = best.planetary
    assert ring == sun + 2 * planet and (sun + ring) % planets == 0  # coaxial, assembly conditions
    carrier = willis_carrier_speed(Fraction(*best.path_a) * best.sign_a, Fraction(*best.path_b) * best.sign_b, sun, ring)
    assert carrier == Fraction(1, 131)  # sympy's solution of Willis's equation agrees


def exhaustive_mean(target: Fraction, teeth, count):
    results = {}
    for a, b, c, d in itertools.product(teeth, repeat=4):
        if max(a, b) > 6 * min(a, b) or max(c, d) > 6 * min(c, d):
            continue
        for sa, sb in itertools.product((-1, 1), repeat=2):
            ratio = summing_ratio("mean", Fraction(a, b) * sa, Fraction(c, d) * sb)
            if ratio <= 0:
                continue
            key = ratio
            teeth_count = a + b + c + d
            if key not in results or teeth_count < results[key]:
                results[key] = teeth_count
    ranked = sorted(results.items(), key=lambda kv: (abs(kv[0] / target - 1), kv[1]))
    return [(r, t) for r, t in ranked[:count]]


@pytest.mark.parametrize("expression", ["0.3137", "29.530588853/100", "1/7.77", "2.414213"])
def test_mean_kind_matches_exhaustive_search_on_a_small_range(expression):
    target = parse_target(expression)
    teeth = list(range(10, 19))
    found = solve_summing(target, teeth, "mean", 3, one_axis=False)
    expected = exhaustive_mean(target.approx, teeth, 3)  # reference: every combination, in the test
    assert [(t.ratio, t.total_teeth) for t in found] == expected


def test_closest_when_exact_is_impossible():
    # 1/127 by the mean kind: the denominator 2 b d has no factor 127, so only an approximation exists.
    best = solve_summing(parse_target("1/127"), list(range(12, 101)), "mean", 1, one_axis=False)[0]
    assert best.ratio != Fraction(1, 127) and abs(best.relative_error) < 1e-3


def test_bad_kind_and_planet_count():
    from gearcad.errors import InputError

    with pytest.raises(InputError, match="summing kind"):
        solve_summing(parse_target("2"), list(range(12, 30)), "bevel")
    with pytest.raises(InputError, match="at least 2 planets"):
        solve_summing(parse_target("2"), list(range(12, 30)), "planetary", planets=1)


def test_every_summing_result_agrees_with_the_kinematic_model():
    # The network model (Willis on every mesh, exact rationals) against the search's own formula.
    from gearcad.ratio.kinematics import network_ratio
    from gearcad.ratio.summing import summing_network

    for kind, planets in (("mean", 3), ("planetary", 3)):
        for t in solve_summing(parse_target("0.4142"), list(range(12, 41)), kind, 3, planets=planets, one_axis=False):
            assert network_ratio(*summing_network(t)) == t.ratio


def test_ratio_command_kind_summing(capsys):
    import json

    from gearcad.cli import main

    assert main(["ratio", "127/200", "--kind", "summing", "--min-teeth", "12", "--max-teeth", "100", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    best = data["results"][0]
    for key in ("numerator", "denominator", "ratio", "relative_error", "direction", "stages", "idler", "total_teeth"):
        assert key in best
    assert (best["numerator"], best["denominator"], best["relative_error"]) == (127, 200, 0.0)
    assert best["kind"] == "summing" and best["members"]["differential"] == "mean"
    assert main(["ratio", "2", "--kind", "summing", "--stepped"]) == 2
    assert "--stepped does not apply" in capsys.readouterr().err


def test_summing_from_an_inventory_uses_each_gear_once(capsys):
    import json
    from collections import Counter

    from gearcad.cli import main

    shelf = {12: 1, 13: 1, 16: 1, 20: 2, 24: 1, 25: 1, 30: 1, 35: 1, 40: 1}
    spec = ",".join(f"{z}x{n}" for z, n in shelf.items())
    assert main(["ratio", "0.6", "--kind", "summing", "--inventory", spec, "--count", "5", "--json"]) == 0
    for result in json.loads(capsys.readouterr().out)["results"]:
        used = Counter(z for path in result["members"]["paths"] for z in (path["driver"], path["driven"]))
        assert all(used[z] <= shelf[z] for z in used)  # the shelf's counts, as given


def exhaustive_one_axis(target: Fraction, teeth, count, min_axis):
    """Every combination under the one-axle rules (written out here from the docstring of solve_summing)."""
    results = {}
    for a, b, c, d in itertools.product(teeth, repeat=4):
        if max(a, b) > 6 * min(a, b) or max(c, d) > 6 * min(c, d):
            continue
        for sa, sb in itertools.product((-1, 1), repeat=2):
            if sa < 0 and sb < 0 and not (a + b == c + d >= min_axis):
                continue
            if sa < 0 < sb and not (a + b >= max(min_axis, c + d + 6)):
                continue
            if sb < 0 < sa and not (c + d >= max(min_axis, a + b + 6)):
                continue
            ratio = summing_ratio("mean", Fraction(a, b) * sa, Fraction(c, d) * sb)
            if ratio > 0 and (ratio not in results or a + b + c + d < results[ratio]):
                results[ratio] = a + b + c + d
    ranked = sorted(results.items(), key=lambda kv: (abs(kv[0] / target - 1), kv[1]))
    return ranked[:count]


@pytest.mark.parametrize("expression,min_axis", [("0.3137", 0), ("1/7.77", 0), ("2.414213", 30), ("0.61803", 34)])
def test_one_axle_search_matches_exhaustive_search_on_a_small_range(expression, min_axis):
    target = parse_target(expression)
    teeth = list(range(10, 21))
    found = solve_summing(target, teeth, "mean", 4, min_axis=min_axis)
    assert [(t.ratio, t.total_teeth) for t in found] == exhaustive_one_axis(target.approx, teeth, 4, min_axis)


def test_one_axle_results_keep_every_rule_and_the_prime_numerator_stays_exact():
    from gearcad.ratio.summing import IDLER_GAP, RING_FIT, _ring_tips_clear

    best = solve_summing(parse_target("127/200"), list(range(12, 101)), "mean", 1, min_axis=51)[0]
    assert best.ratio == Fraction(127, 200)
    for t in solve_summing(parse_target("0.2953"), list(range(12, 101)), "planetary", 10, planets=3):
        sun, planet, ring, _ = t.planetary
        assert t.path_b[1] >= ring + RING_FIT and _ring_tips_clear(planet, ring)
        sums = [sum(p) for p, s in ((t.path_a, t.sign_a), (t.path_b, t.sign_b)) if s < 0]
        idlers = [sum(p) for p, s in ((t.path_a, t.sign_a), (t.path_b, t.sign_b)) if s > 0]
        assert len(set(sums)) <= 1
        if sums:
            assert all(s + IDLER_GAP <= sums[0] for s in idlers)


def test_ring_tip_rule_agrees_with_the_internal_pair_check():
    # The closed form used by the search against gearcad.internal's full check (unshifted, module 1).
    from gearcad.meshes.internal import analyse_internal_pair, make_internal_pair
    from gearcad.profiles import load_tooth_system
    from gearcad.ratio.summing import _ring_tips_clear

    system = load_tooth_system("iso53-a")
    for planet, ring in [(18, 160), (18, 162), (20, 62), (20, 66), (24, 38), (24, 42), (30, 40), (30, 70)]:
        check = next(f for f in analyse_internal_pair(make_internal_pair(planet, ring, 1.0, system)).findings
                     if f.check == "involute interference")
        assert (check.severity == "ok") == _ring_tips_clear(planet, ring), (planet, ring)


def brute_planetary_one_axle(target, teeth, max_stage_ratio, planets):
    """Best (ratio, teeth) over every pair of stages and every set, under the one-axle and ring rules (numpy)."""
    from gearcad.ratio.summing import IDLER_GAP, RING_FIT, _planetary_sets

    z = np.array(teeth)
    a, b = (m.ravel() for m in np.meshgrid(z, z, indexing="ij"))
    keep = (a <= max_stage_ratio * b) & (b <= max_stage_ratio * a)
    a, b = a[keep], b[keep]
    rho, sums = a / b, a + b
    goal = float(target.approx)
    candidates = []
    for sun, planet, ring, n in _planetary_sets(teeth, 200, planets, 0.5):
        if ring + RING_FIT > max(teeth):
            continue
        fits = (b >= ring + RING_FIT)[None, :]
        for sa, sb in itertools.product((-1, 1), repeat=2):
            if sa < 0 and sb < 0:
                rule = sums[:, None] == sums[None, :]
            elif sa < 0:
                rule = sums[:, None] >= sums[None, :] + IDLER_GAP
            elif sb < 0:
                rule = sums[None, :] >= sums[:, None] + IDLER_GAP
            else:
                rule = np.ones((len(a), len(a)), dtype=bool)
            ratio = (sun * sa * rho[:, None] + ring * sb * rho[None, :]) / (sun + ring)
            err = np.where(rule & fits & (ratio > 0), np.abs(ratio / goal - 1), np.inf)
            best = err.min()
            if np.isfinite(best):
                for i, j in zip(*np.nonzero(err <= best * (1 + 1e-9) + 1e-15)):
                    exact = (sun * Fraction(int(a[i]), int(b[i])) * sa + ring * Fraction(int(a[j]), int(b[j])) * sb) / (sun + ring)
                    total = int(a[i] + b[i] + a[j] + b[j]) + sun + ring + planet * n
                    candidates.append((abs(exact / target.approx - 1), total, exact))
    return min(candidates)[2], min(candidates)[1]


@pytest.mark.parametrize("expression", ["0.2953", "127/200", "1/7.77"])
def test_planetary_one_axle_search_matches_brute_force(expression):
    # Reference: every pair of stages against every set, the rules as numpy masks (written out here).
    target = parse_target(expression)
    teeth = list(range(12, 76))
    best = solve_summing(target, teeth, "planetary", 1, max_stage_ratio=1.25, planets=3)[0]
    assert (best.ratio, best.total_teeth) == brute_planetary_one_axle(target, teeth, 1.25, 3)
