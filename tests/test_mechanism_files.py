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
    fused = sum(len(j["gears"]) - 1 for j in report["joins"] if j["method"] == "fused")  # a fused pair is one part
    made = len(report["gears"]) + len(report["plates"]) - fused
    assert count_solids(shape) == made + bought == report["assembly"]["solids"]


SMALL = """name = "small"
module = 1.0
thickness = 3.0
[[stage]]
driver = 12
driven = 24
[[stage]]
driver = 12
driven = 20
"""


def placed_solids(plan):
    """Every solid of the assembly as OCP shapes in place (gears, plates, rods)."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec

    from gearcad.export.step import build_solid, tube_solid

    def place(shape, x, y, z, angle):
        turn, move = gp_Trsf(), gp_Trsf()
        turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), angle)
        move.SetTranslation(gp_Vec(x, y, z))
        return BRepBuilderAPI_Transform(shape, move.Multiplied(turn), True).Shape()

    t = plan.spec.thickness
    out = {}
    for g in plan.gears:
        s = plan.shafts[g.shaft]
        out[g.name] = place(build_solid(g.part, t, 1e-3).solid, s.x, s.y, g.z, g.rotation)
    for p in plan.plates:
        out[p.name] = place(build_solid(p.part, t, 1e-3).solid, 0.0, 0.0, p.z, 0.0)
    for r in plan.mechanism.rods:
        out[r.name] = place(tube_solid(r.diameter, r.bore, r.length), r.x, r.y, r.z0, 0.0)
    return out


def overlapping_pairs(solids):
    """Pairs whose solids share volume (OCP's boolean common, more than 1e-4 mm³), among those whose boxes meet."""
    from OCP.Bnd import Bnd_Box
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Common
    from OCP.BRepBndLib import BRepBndLib

    boxes = {}
    for name, shape in solids.items():
        box = Bnd_Box()
        BRepBndLib.Add_s(shape, box)
        boxes[name] = box
    names = list(solids)
    found = set()
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            if boxes[a].IsOut(boxes[b]):
                continue
            if volume(BRepAlgoAPI_Common(solids[a], solids[b]).Shape()) > 1e-4:
                found.add(frozenset((a, b)))
    return found


@pytest.mark.slow
def test_the_analytic_check_agrees_with_the_kernels_booleans():
    # OCP's BRepAlgoAPI_Common on every pair of placed solids whose boxes meet: no shared volume in the plan as made
    # (shafts run in bores with the running clearance, spacers meet faces only, meshing teeth sit in spaces); a
    # pillar moved into a gear shares volume with it, and the analytic check says so too.
    import dataclasses

    from gearcad.trains.planner import plan_train
    from gearcad.trains.trainfile import parse_train
    from gearcad.trains.interference import check_assembly

    plan = plan_train(parse_train(SMALL))
    assert plan.mechanism.overlaps == ()
    solids = placed_solids(plan)
    # Designed fits the kernel sees as overlap: a round shaft in a D-flat bore (the user files the flat on it).
    flats = {frozenset((g.name, plan.shafts[g.shaft].name)) for g in plan.gears if g.part.holes}
    assert flats and overlapping_pairs(solids) == flats
    gear = plan.gear("s1-driven")
    s = plan.shafts[gear.shaft]
    pillar = next(p for p in plan.mechanism.pillars if p.name.startswith("pillar-"))  # a frame pillar: all layers
    moved = dataclasses.replace(pillar, x=s.x + gear.gear.root_diameter / 2 - 4.0, y=s.y)
    mech = dataclasses.replace(plan.mechanism, rods=tuple(moved if r is pillar else r for r in plan.mechanism.rods))
    moved_plan = dataclasses.replace(plan, mechanism=mech)
    kernel = overlapping_pairs(placed_solids(moved_plan))
    analytic = {frozenset((a, b)) for a, b, _ in check_assembly(plan, mech).overlaps}
    assert frozenset((pillar.name, gear.name)) in kernel
    assert frozenset((pillar.name, gear.name)) in analytic
    assert {p for p in kernel if pillar.name in p} <= analytic | {p for p in kernel if pillar.name not in p}
