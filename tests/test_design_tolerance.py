"""``gearcad design`` builds only within tolerance; ``gearcad.design`` chooses a train without the command line.

Sources: the reach rule (k stages of at most R each reach R^-k..R^k: 2 stages of
6 reach 1/36, so 1/200 is beyond them), the exhaustive reference of
tests/test_ratio_optimality.py for the compound optimum, and exact fractions
(25.4 mm = 127/5 mm, so 127/20 is exact with a 127-tooth gear).
"""

from __future__ import annotations

import json

import pytest

from gearcad.cli import main
from gearcad.errors import ToleranceError
from gearcad.ratio import make_limits, parse_target
from gearcad.trains.design import DESIGN_TOLERANCE, design
from test_ratio_optimality import exhaustive


@pytest.mark.parametrize("argv, words", [
    (["1/200", "--stages", "2"], "cannot be reached"),                       # beyond 1/36 (6^2)
    (["29.530588853", "--stages", "1", "--tolerance", "1e-6"], "cannot be reached"),
    (["5.3530588853", "--stages", "1", "--tolerance", "1e-6"], "best found is 91/17"),  # -2.2e-5 off
    (["1/50", "--kind", "planetary"], "no train within tolerance"),          # simple 3-planet sets miss 1/50
])
def test_design_outside_tolerance_exits_1_and_writes_nothing(tmp_path, capsys, argv, words):
    out = tmp_path / "d"
    code = main(["design", *argv, "--module", "1", "--out", str(out), "--formats", "dxf"])
    err = capsys.readouterr().err
    assert code == 1
    assert not out.exists()  # nothing built
    assert words in err and "nothing was built" in err and err.count("\n") == 1


def test_design_json_outside_tolerance(tmp_path, capsys):
    code = main(["design", "1/200", "--stages", "2", "--module", "1", "--out", str(tmp_path / "j"), "--json"])
    out = json.loads(capsys.readouterr().out)
    assert code == 1 and out["built"] is False and "1/36 to 36" in out["message"]


def test_tolerance_is_shown_in_help(capsys):
    assert main(["design", "--help"]) == 0
    text = capsys.readouterr().out
    assert "--tolerance REL" in text and "default 0.001" in text


def test_library_design_picks_the_exhaustive_optimum_without_the_cli():
    chosen = design("127/20", module=1.0, stages=2, max_teeth=127)
    assert chosen.kind == "compound" and chosen.relative_error == 0 and chosen.tolerance == DESIGN_TOLERANCE
    best = exhaustive(parse_target("127/20"), 2, make_limits(10, 127), 1)[0]  # exhaustive reference
    train = chosen.solution
    assert (train.numerator, train.denominator) == best[:2] and train.total_teeth >= best[2]
    assert [(s.driver.teeth, s.driven.teeth) for s in chosen.spec.stages] == list(train.stages)
    assert chosen.spec.target_tolerance == DESIGN_TOLERANCE


def _severities(spec):
    from gearcad.trains.planner import plan_train

    plan = plan_train(spec)
    return {f.severity for m in plan.meshes for f in m.analysis.findings}


def test_equal_error_prefers_meshes_without_warnings_1_15():
    # The fewest-teeth optimum (exhaustive reference, 2 stages) uses 10-tooth pinions, whose meshes carry warnings
    # in 3 mm acrylic; design keeps the exact ratio and takes a train whose meshes pass clean.
    chosen = design("1/15", module=1.0)
    fewest = exhaustive(parse_target("1/15"), len(chosen.solution.stages), make_limits(10, 120), 1)[0]
    assert (chosen.solution.numerator, chosen.solution.denominator) == fewest[:2]
    assert not _severities(chosen.spec) & {"warning", "failure"}
    assert chosen.solution.total_teeth > fewest[2]


def test_equal_error_prefers_meshes_without_warnings_100():
    # 100 at 3 stages: 40/10 50/10 50/10 has 170 teeth, the least possible (AM-GM: drivers' product 10^5 and driven
    # 10^3 give at least 3 (10^(5/3) + 10) = 169.2 teeth), with 10-tooth pinions; design takes an exact, clean train.
    chosen = design("100", module=1.0)
    assert chosen.relative_error == 0 and chosen.solution.total_teeth > 170
    assert not _severities(chosen.spec) & {"warning", "failure"}


def test_library_design_raises_tolerance_error():
    with pytest.raises(ToleranceError) as info:
        design("5.3530588853", module=1.0, stages=1, tolerance=1e-6)
    assert info.value.best_error == pytest.approx(91 / 17 / 5.3530588853 - 1, rel=1e-9)


def test_library_design_planetary_within_tolerance():
    chosen = design("0.25", kind="planetary", module=1.0, min_teeth=18)
    assert chosen.kind == "planetary" and abs(chosen.relative_error) <= DESIGN_TOLERANCE
    assert chosen.spec.planetary is not None
