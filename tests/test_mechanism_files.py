"""The mechanism's files: the FDM compound part fused in phase, and every bought part in assembly.step.

References: OCP's own checks (BRepCheck validity, volume by BRepGProp) on the written STEP files.
"""

import json

import pytest

from gearcad.cli import main

PRINTED = """name = "printed"
module = 1.0
thickness = 3.0
fabrication = "fdm-pla-0.4mm"
[[stage]]
driver = 12
driven = 36
[[stage]]
driver = 12
driven = 30
"""


def read_step(path):
    from OCP.STEPControl import STEPControl_Reader

    reader = STEPControl_Reader()
    assert reader.ReadFile(str(path)) == 1
    reader.TransferRoots()
    return reader.OneShape()


def volume(shape):
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props)
    return props.Mass()


def count_solids(shape):
    from OCP.TopAbs import TopAbs_SOLID
    from OCP.TopExp import TopExp_Explorer

    explorer, n = TopExp_Explorer(shape, TopAbs_SOLID), 0
    while explorer.More():
        n += 1
        explorer.Next()
    return n


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    folder = tmp_path_factory.mktemp("printed")
    train = folder / "t.toml"
    train.write_text(PRINTED)
    assert main(["build", str(train), "--out", str(folder / "o"), "--formats", "step,stl"]) == 0
    return folder / "o", json.loads((folder / "o" / "report.json").read_text())


@pytest.mark.slow
def test_the_printed_compound_is_one_valid_solid_of_both_gears_and_a_hub(built):
    from OCP.BRepCheck import BRepCheck_Analyzer

    out, report = built
    join = next(j for j in report["joins"] if len(j["gears"]) == 2)
    assert join["method"] == "fused"
    shape = read_step(out / f"{join['shaft']}-compound.step")
    assert BRepCheck_Analyzer(shape).IsValid()
    assert count_solids(shape) == 1
    parts = [volume(read_step(out / f"{name}.step")) for name in join["gears"]]
    # The fused part holds both gears and a hub across the layer gap: more than the gears, less than gears + a full
    # cylinder of the smaller root diameter over the gap.
    assert sum(parts) < volume(shape) < sum(parts) + 3.1416 / 4 * 20 ** 2 * 0.5 + 1e-6
    assert (out / f"{join['shaft']}-compound.stl").exists()
    assert any(p["files"] and f"{join['shaft']}-compound.step" in p["files"] for p in report["parts"])


@pytest.mark.slow
def test_assembly_step_holds_every_part(built):
    out, report = built
    shape = read_step(out / report["assembly"]["file"])
    bought = sum(p["quantity"] for p in report["parts"] if p["kind"] == "bought")
    made = len(report["gears"]) + len(report["plates"])
    assert count_solids(shape) == made + bought == report["assembly"]["solids"]
