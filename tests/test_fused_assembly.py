"""A fused FDM compound (issue 10): one printed part, so one solid in assembly.step as in its own file.

References: OCP's STEP reader, checker (BRepCheck_Analyzer) and volume (BRepGProp) on the files read
back; the interference check's own contract (report.json `assembly`: solids, no overlaps).
"""

import json

import pytest

from gearcad.cli import main

pytestmark = pytest.mark.slow

FDM = """name = "fdm"
module = 1.5
thickness = 4.0
fabrication = "fdm-pla-0.4mm"
[[stage]]
driver = 15
driven = 45
[[stage]]
driver = 15
driven = 40
"""


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fdm")
    train = folder / "fdm.toml"
    train.write_text(FDM, encoding="utf-8")
    assert main(["build", str(train), "--out", str(folder / "o"), "--formats", "step"]) == 0
    return folder / "o"


def test_the_fused_pair_is_one_solid_of_the_assembly(built):
    from test_step_size import read_step, solids, valid, volume

    report = json.loads((built / "report.json").read_text())
    (join,) = [j for j in report["joins"] if j["method"] == "fused"]
    parts = solids(read_step(built / "assembly.step"))
    assert all(valid(s) for s in parts)
    assert len(parts) == report["assembly"]["solids"]  # the check counts the solids the file holds
    assert report["assembly"]["interference"] == []
    (fused,) = solids(read_step(built / f"{join['file']}.step"))
    same = [s for s in parts if volume(s) == pytest.approx(volume(fused), rel=1e-9)]
    assert len(same) == 1  # the fused part, once; its two gears are not there apart
    gears = {n: volume(solids(read_step(built / f"{n}.step"))[0]) for n in join["gears"]}
    for v in gears.values():
        assert not any(volume(s) == pytest.approx(v, rel=1e-9) for s in parts)
    assert volume(fused) > sum(gears.values())  # the hub across the gap is part of it


def test_no_spacer_sits_in_the_fused_hub():
    # The hub fills the layer gap between the fused gears; the spacers below and above the pair stay.
    from gearcad.trains.planner import plan_train
    from gearcad.trains.trainfile import parse_train

    plan = plan_train(parse_train(FDM))
    (j,) = [j for j in plan.mechanism.joins if j.hub is not None]
    _, _, z0, z1 = j.hub
    assert z1 > z0
    from gearcad.trains.hardware import spacers_of

    spacers = spacers_of(plan.mechanism.rods, j.shaft)  # spacer tubes and washers alike
    assert spacers
    assert not [r for r in spacers if min(r.z1, z1) - max(r.z0, z0) > 1e-9]
