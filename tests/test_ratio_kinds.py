"""``gearcad ratio --kind any``: the best of each kind, its envelope, the JSON contract, the other-kind note.

Sources: shapely's ``minimum_bounding_radius`` of the placed tip circles (each a
polygon of 1024 sides) as the independent construction of the envelope; the
reference centre distance ``m (z1 + z2) / 2`` (ISO 21771) and the ISO 53 profile A
basic rack (addendum 1 m, dedendum 1.25 m) for the placement; the ring's rim
factor of gearcad.geometry.internal (common practice); the issue's JSON keys.
"""

from __future__ import annotations

import json
import math
import numpy as np
import pytest

shapely = pytest.importorskip("shapely")
from shapely.geometry import Point  # noqa: E402

from gearcad.cli import main  # noqa: E402
from gearcad.geometry.enclosing import enclosing_circle  # noqa: E402
from gearcad.ratio import make_limits, parse_target, solve_compound  # noqa: E402
from gearcad.ratio.clean import MeshJudge  # noqa: E402
from gearcad.trains.kinds import (best_of_kinds, compound_circles, envelope_diameter, planetary_circles,  # noqa: E402
                                  summing_circles)

ISO53_ADDENDUM, ISO53_DEDENDUM = 1.0, 1.25  # ISO 53 profile A, modules (from memory)


def shapely_diameter(centres, radii):
    """Independent construction: the union of the circles as polygons, then shapely's bounding circle."""
    union = shapely.union_all([Point(float(x), float(y)).buffer(float(r), quad_segs=256)
                               for (x, y), r in zip(centres, radii)])
    return 2 * shapely.minimum_bounding_radius(union)


@pytest.fixture(scope="module")
def kinds_1_40():
    return best_of_kinds(parse_target("1/40"), make_limits(10, 120), judge=MeshJudge().clean)


@pytest.mark.parametrize("seed", range(6))
def test_enclosing_circle_against_shapely(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(2, 12))
    centres, radii = rng.uniform(-60, 60, (n, 2)), rng.uniform(0.5, 40, n)
    x, y, r = enclosing_circle(centres, radii)
    assert 2 * r == pytest.approx(shapely_diameter(centres, radii), rel=2e-5)  # polygons lie inside their circles
    assert np.all(np.hypot(centres[:, 0] - x, centres[:, 1] - y) + radii <= r + 1e-9)  # it holds every circle


def test_two_equal_circles_touching():
    # two circles of radius 1 at distance 4: the least circle has diameter 6 (by hand)
    assert 2 * enclosing_circle(np.array([[0.0, 0.0], [4.0, 0.0]]), np.array([1.0, 1.0]))[2] == pytest.approx(6.0)


def test_compound_envelope_against_shapely(kinds_1_40):
    train = kinds_1_40[0].best
    centres, radii = compound_circles(train)
    # the placement: every mesh at the reference centre distance (ISO 21771), tips at z/2 + 1 (ISO 53 A)
    teeth = [z for stage in train.stages for z in stage]
    assert list(radii) == pytest.approx([z / 2 + ISO53_ADDENDUM for z in teeth])
    for i in range(0, len(teeth), 2):
        assert math.dist(centres[i], centres[i + 1]) == pytest.approx((teeth[i] + teeth[i + 1]) / 2, abs=1e-9)
    for i in range(1, len(teeth) - 1, 2):  # a driven gear and the next driver share a shaft
        assert math.dist(centres[i], centres[i + 1]) == pytest.approx(0.0, abs=1e-9)
    assert kinds_1_40[0].envelope_diameter == pytest.approx(shapely_diameter(centres, radii), rel=2e-5)


def test_planetary_envelope_against_shapely(kinds_1_40):
    result = kinds_1_40[1].best
    s, c = result.set, result.conditions
    # independent placement: ring outside = root circle + 1.2 tooth depths of rim, planets on the carrier circle
    circles = [((0, 0), s.ring / 2 + ISO53_DEDENDUM + 1.2 * (ISO53_ADDENDUM + ISO53_DEDENDUM)),
               ((0, 0), s.sun / 2 + ISO53_ADDENDUM)]
    for angle in c.angles:
        at = (c.centre_distance * math.cos(angle), c.centre_distance * math.sin(angle))
        circles += [(at, s.planet / 2 + ISO53_ADDENDUM), (at, s.ring_planet / 2 + ISO53_ADDENDUM)]
    centres, radii = zip(*circles)
    assert kinds_1_40[1].envelope_diameter == pytest.approx(shapely_diameter(centres, radii), rel=2e-5)
    assert envelope_diameter(*planetary_circles(result)) == kinds_1_40[1].envelope_diameter


def test_summing_envelope_against_shapely(kinds_1_40):
    train = kinds_1_40[2].best
    centres, radii = summing_circles(train, 10, 20.0, 0)
    assert envelope_diameter(centres, radii) == pytest.approx(shapely_diameter(centres, radii), rel=2e-5)
    # input at the origin, axle on +x at the axis distance; an idler meshes both at reference centre distances
    axle = centres[0]
    assert axle[1] == 0 and (train.axis_teeth is None or axle[0] == train.axis_teeth / 2)
    at = 1
    for (driver, driven), sign in ((train.path_a, train.sign_a), (train.path_b, train.sign_b)):
        assert tuple(centres[at]) == (0, 0) and tuple(centres[at + 1]) == tuple(axle)
        assert (radii[at], radii[at + 1]) == (driver / 2 + ISO53_ADDENDUM, driven / 2 + ISO53_ADDENDUM)
        if sign > 0:
            idler = radii[at + 2] - ISO53_ADDENDUM
            assert math.dist(centres[at + 2], (0, 0)) == pytest.approx(driver / 2 + idler, abs=1e-9)
            assert math.dist(centres[at + 2], axle) == pytest.approx(idler + driven / 2, abs=1e-9)
            at += 1
        else:
            assert axle[0] == (driver + driven) / 2
        at += 2


def test_best_compound_is_the_best_over_stage_counts(kinds_1_40):
    limits, target = make_limits(10, 120), parse_target("1/40")
    errors = [abs(t[0].relative_error) for k in (2, 3, 4) if (t := solve_compound(target, k, limits, 1))]
    assert kinds_1_40[0].error == min(errors)


def test_json_contract(capsys):
    assert main(["ratio", "0.3", "--kind", "any", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert [k["kind"] for k in out["kinds"]] == ["compound", "planetary", "summing"]
    for item in out["kinds"]:
        assert set(item) == {"kind", "best", "envelope_diameter"}
        assert {"numerator", "denominator", "relative_error", "total_teeth", "within_tolerance"} <= set(item["best"])
        assert item["envelope_diameter"] > 0
        assert item["best"]["numerator"] / item["best"]["denominator"] == pytest.approx(0.3 * (1 + item["best"]["relative_error"]))


def test_table_for_people(capsys):
    assert main(["ratio", "0.3", "--kind", "any"]) == 0
    text = capsys.readouterr().out
    assert "envelope/m" in text and all(kind in text for kind in ("compound", "planetary", "summing"))


@pytest.mark.parametrize("argv", [["--stages", "2"], ["--stepped"], ["--tolerance", "2"], ["--count", "3"],
                                  ["--max-teeth", "9000"]])
def test_bad_input_exit_2(capsys, argv):
    assert main(["ratio", "0.3", "--kind", "any", *argv]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err and len(captured.err.strip().splitlines()) == 1


def test_bad_target_exit_2(capsys):
    assert main(["ratio", "pi**1000", "--kind", "any"]) == 2
    assert capsys.readouterr().out == ""


def test_chosen_kind_far_worse_says_so(capsys):
    # three simple planets cannot make 1/40 (ratio 1 + ring/sun needs ring = 39 suns); compound trains can
    main(["ratio", "1/40", "--kind", "planetary", "--planets", "3"])
    lines = [line for line in capsys.readouterr().out.splitlines() if "--kind compound reaches" in line]
    assert len(lines) == 1 and "--kind summing" in lines[0]


def test_no_note_when_the_chosen_kind_meets_the_tolerance(capsys):
    assert main(["ratio", "1/40", "--stages", "3"]) == 0
    assert "--kind" not in capsys.readouterr().out


def test_summing_far_worse_says_so(capsys):
    # a mean differential halves the sum of two path ratios, so 100 lies far beyond it; 3 compound stages reach it
    assert main(["ratio", "100", "--kind", "summing", "--tolerance", "1e-3", "--json"]) == 1
    out = json.loads(capsys.readouterr().out)
    assert out["results"] == [] and "--kind compound reaches 0.00e+00" in out["other_kinds"]
