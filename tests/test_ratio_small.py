"""The pure-Python search of one and two stages (ratio/small.py) against the window search (ratio/windows.py).

Both are exact searches written independently (a best-first heap over product pairs against windows of
numpy arrays); the optimality of either against an exhaustive enumeration is tests/test_ratio_optimality.py's.
Here they must give the same trains, in the same order, over random targets and limits (seeded).  Also:
the ratio range from the largest stage ratio against the grid of every allowed stage, the alternatives of
one ratio in plain order against the numpy blocks, and a plain ``gearcad ratio`` that loads no numpy.
"""

from __future__ import annotations

import random
import subprocess
import sys

import pytest

from gearcad.ratio import make_limits, parse_inventory, parse_target, solve_compound
from gearcad.ratio.alternatives import _by_blocks, same_ratio_trains
from gearcad.ratio.compound import stage_ratio_range
from gearcad.ratio.reach import largest_stage_ratio
from gearcad.ratio.small import small_enough
from gearcad.ratio.split import Splitter
from gearcad.ratio.train import needs_idler
from gearcad.ratio.windows import allowed_stage_grid

SEED = 2026


def _random_case(rng: random.Random):
    low = rng.randint(8, 30)
    high = rng.randint(low + 4, low + rng.choice((20, 60, 110)))
    inventory = None
    if rng.random() < 0.2:
        teeth = sorted(rng.sample(range(low, high + 1), min(12, high - low + 1)))
        inventory = parse_inventory(",".join(f"{z}x{rng.randint(1, 2)}" for z in teeth))
    limits = make_limits(low, high, rng.choice((3, 4.5, 6, 8)), rng.random() < 0.25,
                         rng.sample(range(low, high + 1), rng.randint(0, 3)), inventory,
                         rng.choice((None, None, "same", "opposite")))
    if rng.random() < 0.3:
        text = f"{rng.randint(1, 400)}/{rng.randint(1, 400)}"
    else:
        text = repr(round(10 ** rng.uniform(-2.5, 2.5), rng.randint(3, 12)))
    return parse_target(text), limits


@pytest.mark.parametrize("case", range(200))
def test_small_search_equals_window_search(case):
    rng = random.Random(SEED * 1000 + case)
    target, limits = _random_case(rng)
    k = rng.choice((1, 2))
    count = rng.randint(1, 8)
    cap = rng.choice((None, None, 1e-4, 1e-2))
    small = solve_compound(target, k, limits, count, method="small", cap=cap)
    windows = solve_compound(target, k, limits, count, method="sorted", cap=cap)
    assert small == windows, (target.expression, k, limits.describe(), count, cap)


@pytest.mark.parametrize("text", ["36", "1/36", "35.999", "1e-4", "1e4", "1", "2", "29.530588853", "3/10"])
def test_small_search_at_the_reach_and_beyond(text):
    target, limits = parse_target(text), make_limits()  # default limits: 10-120 teeth, stage ratio 6
    for k in (1, 2):
        assert solve_compound(target, k, limits, 5, method="small") == solve_compound(target, k, limits, 5,
                                                                                      method="sorted")


def test_auto_takes_the_small_search_for_few_products():
    assert small_enough(2, make_limits(10, 120)) and small_enough(1, make_limits(10, 400))
    assert not small_enough(3, make_limits(10, 40)) and not small_enough(2, make_limits(10, 200))


@pytest.mark.parametrize("case", range(40))
def test_ratio_range_from_the_largest_stage_equals_the_grid(case):
    rng = random.Random(SEED + case)
    _, limits = _random_case(rng)
    d, n = allowed_stage_grid(limits)  # every allowed stage, by numpy over the whole grid
    k = rng.randint(1, 4)
    if len(d) == 0:
        assert stage_ratio_range(limits, k) is None
        return
    ratios = sorted(zip((d / n).tolist(), d.tolist(), n.tolist()))
    low, high = ratios[0], ratios[-1]
    from fractions import Fraction

    assert stage_ratio_range(limits, k) == (Fraction(low[1], low[2]) ** k, Fraction(high[1], high[2]) ** k)


@pytest.mark.parametrize("case", range(25))
def test_alternatives_in_plain_order_equal_the_blocks(case):
    rng = random.Random(SEED * 7 + case)
    target, limits = _random_case(rng)
    found = solve_compound(target, 2, limits, 3)
    if not found:
        return
    best = found[rng.randrange(len(found))]
    count, extra = rng.choice((4, 24)), rng.choice((10, 40))
    plain = same_ratio_trains(best.numerator, best.denominator, 2, limits, target, count, extra)
    idler = needs_idler(2, limits)
    low, high = min(limits.teeth), max(limits.teeth)
    splitter = Splitter(2, limits, limits.shelf(), idler, largest_stage_ratio(limits))
    g_low = max(-(-low ** 2 // best.numerator), -(-low ** 2 // best.denominator), 1)
    g_high = min(high ** 2 // best.numerator, high ** 2 // best.denominator)
    blocks, fewest = _by_blocks(best.numerator, best.denominator, 2, splitter, (g_low, g_high), (low, high),
                                low if idler else 0, count, extra)
    blocks = [t for t in blocks if t[0] <= fewest + extra][:count]
    assert [(t.stages, t.idler) for t in plain] == [(stages, z) for _, stages, z in blocks]


@pytest.mark.parametrize("extra", [[], ["--json"]])
def test_plain_ratio_loads_neither_numpy_nor_sympy(extra):
    code = ("import sys; from gearcad.cli import main; code = main(['ratio', '29.530588853', '--stages', '2'] + "
            f"{extra!r}); assert 'numpy' not in sys.modules, 'numpy loaded'; "
            "assert 'sympy' not in sys.modules, 'sympy loaded'; sys.exit(code)")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr
    assert "2392" in result.stdout  # the best train: 2392/81 (92/18 104/18), +9.3 ppm
