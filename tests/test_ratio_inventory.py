"""Inventories: the syntax, and the lathe case of a 127-tooth gear.

Sources: 25.4 mm = 127/5 mm exactly (definition of the inch, 1959), the lead
screw rule ratio = wanted pitch / lead-screw pitch (common practice), and the
exhaustive enumeration of tests/test_ratio_optimality.py.
"""

from __future__ import annotations

from fractions import Fraction

import pytest

from gearcad.errors import InputError
from gearcad.ratio import make_limits, parse_inventory, parse_target, read_inventory, solve_compound
from test_ratio_optimality import exhaustive

LATHE = "20x2, 25-60/5, 65, 70, 75, 80"  # a change-gear set (common practice), without and with a 127


def test_syntax():
    shelf = parse_inventory("# shelf\n20x2, 24 30-40/5\n127 # transposing gear\n20")
    assert shelf.counts == ((20, 3), (24, 1), (30, 1), (35, 1), (40, 1), (127, 1))
    assert shelf.size == 8


@pytest.mark.parametrize("text", ["", "# nothing", "20x", "a,b", "0", "30-20", "20x0"])
def test_malformed_inventories_are_refused(text):
    with pytest.raises(InputError):
        parse_inventory(text)


def test_file_and_list_read_alike(tmp_path):
    path = tmp_path / "gears.txt"
    path.write_text("20x2\n25-60/5  # every fifth\n127\n")
    assert read_inventory(str(path)) == read_inventory("20x2,25-60/5,127")
    with pytest.raises(InputError, match="neither an existing file"):
        read_inventory(str(tmp_path / "missing.txt"))


def test_metric_pitch_on_inch_leadscrew_is_exact_with_127():
    # 1.5 mm pitch from an 8 threads-per-inch leadscrew: ratio = 1.5 / (25.4 / 8) = 60/127 exactly.
    target = parse_target("1.5/(25.4/8)")
    assert target.rational == Fraction(60, 127)  # 25.4 = 127/5 exactly
    with_127 = make_limits(20, 127, 6, False, [], parse_inventory(LATHE + ", 127"))
    without = make_limits(20, 127, 6, False, [], parse_inventory(LATHE))
    best = solve_compound(target, 2, with_127, 1)[0]
    assert best.relative_error == 0 and best.fraction == Fraction(60, 127)
    assert any(127 in stage for stage in best.stages)
    assert solve_compound(target, 2, without, 1)[0].relative_error != 0  # 127 is prime: nothing else is exact
    for limits in (with_127, without):
        found = [(t.numerator, t.denominator, t.total_teeth) for t in solve_compound(target, 2, limits, 3)]
        assert found == exhaustive(target, 2, limits, 3)  # exhaustive reference
