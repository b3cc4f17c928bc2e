"""Shaft layout: rules kept, coaxial kept, compactness against an exhaustive sweep, phasing formula."""

import dataclasses
import math

import numpy as np
import pytest

from gearcad.errors import InputError
from gearcad.trains.layout import LayoutGear, LayoutProblem, Link, _plate, _positions, _violation, mesh_phase, solve_layout


def chain(stages, m=1.0, bore=3.0, clearance=1.0, margin=5.0, coaxial=None):
    gears, links = [], []
    for k, (a, b) in enumerate(stages):
        gears += [LayoutGear(f"{k}a", k, k, (a / 2 + 1) * m), LayoutGear(f"{k}b", k + 1, k, (b / 2 + 1) * m)]
        links.append(Link(k, k + 1, (a + b) / 2 * m))
    meshes = frozenset(frozenset((2 * k, 2 * k + 1)) for k in range(len(stages)))
    return LayoutProblem((bore / 2,) * (len(stages) + 1), tuple(gears), tuple(links), meshes, clearance, margin, coaxial)


def distances(layout, problem):
    return [math.dist(layout.positions[l.parent], layout.positions[l.child]) for l in problem.links]


@pytest.mark.parametrize("stages", [[(20, 40)], [(12, 60), (15, 45)], [(12, 57), (18, 91), (37, 91)],
                                    [(12, 40), (14, 42), (13, 39), (15, 45)]])
def test_meshing_shafts_sit_at_their_centre_distances_and_every_rule_holds(stages):
    problem = chain(stages)
    layout = solve_layout(problem)
    assert distances(layout, problem) == pytest.approx([l.distance for l in problem.links], abs=1e-9)
    # The rule the placement keeps: both plates for every shaft, or (only where none does) one plate and a bridge.
    problem = dataclasses.replace(problem, both_plates=layout.both_plates)
    assert _violation(problem, layout.positions[None])[0] <= 1e-9
    # Everything on the plate: tip circles plus the margin inside [0, width] x [0, height].
    for g in problem.gears:
        x, y = layout.positions[g.shaft]
        r = g.tip_radius + problem.margin
        assert -1e-6 <= x - r and x + r <= layout.width + 1e-6
        assert -1e-6 <= y - r and y + r <= layout.height + 1e-6


def test_two_stage_layout_is_as_compact_as_an_exhaustive_sweep():
    # Reference: every turn angle in 0.5 degree steps and plate rotation in 0.5 degree steps.
    problem = chain([(12, 60), (15, 45)])
    layout = solve_layout(problem)
    problem = dataclasses.replace(problem, both_plates=layout.both_plates)  # the rule the search kept
    turns = np.radians(np.arange(-180, 180, 0.5))[:, None]
    pos = _positions(problem, turns)
    ok = _violation(problem, pos) <= 1e-9
    area, _ = _plate(problem, pos[ok], np.radians(np.arange(0, 90, 0.5)))
    assert layout.area <= area.min() * (1 + 1e-3)


def test_coaxial_shafts_coincide():
    problem = chain([(20, 40), (30, 30)], coaxial=(0, 2))
    layout = solve_layout(problem)
    assert np.allclose(layout.positions[0], layout.positions[2], atol=1e-9)


def test_coaxial_needs_equal_centre_distances():
    with pytest.raises(InputError, match="equal centre distances"):
        solve_layout(chain([(20, 40), (30, 31)], coaxial=(0, 2)))


def test_mesh_phase_puts_a_space_opposite_a_tooth():
    # Driver tooth 0 on the centre line (direction 0): the driven gear shows a space at pi, so its
    # tooth 0 sits half a pitch away from the line.  Turning the driver by d turns the driven by -d z1/z2.
    assert mesh_phase(0.0, 20, 30, 0.0) == pytest.approx(math.pi + math.pi / 30)
    assert mesh_phase(0.1, 20, 30, 0.0) - mesh_phase(0.0, 20, 30, 0.0) == pytest.approx(-0.1 * 20 / 30)


@pytest.mark.parametrize("stages", [[(20, 40)], [(12, 57), (18, 91), (37, 91)]])
def test_every_shaft_reaches_both_plates_where_a_placement_allows(stages):
    # The trade's first rule of a movement (common practice): every arbor held at both ends.  Checked against
    # shapely: each shaft's circle is disjoint from the tip circle of every gear of another shaft in the layers
    # between its own and each plate.
    import shapely

    problem = chain(stages)
    layout = solve_layout(problem)
    assert layout.both_plates
    top = max(g.layer for g in problem.gears)
    for s in range(len(problem.shaft_radii)):
        own = [g.layer for g in problem.gears if g.shaft == s]
        passed = set(range(0, min(own))) | set(range(max(own) + 1, top + 1))
        shaft = shapely.Point(*layout.positions[s]).buffer(problem.shaft_radii[s])
        for g in problem.gears:
            if g.layer in passed and g.shaft != s:
                tip = shapely.Point(*layout.positions[g.shaft]).buffer(g.tip_radius)
                assert shaft.distance(tip) >= problem.clearance - 1e-3
