"""A stud's pipe is at least 1.5 bore diameters long, or the stud is a failure naming it.

The rule: a stud's pipe (the bush its gears turn on) at least 1.5 bore diameters long (the issue's rule; common
practice for a bush).  Where its gears span less, the pipe stands proud of them on the side away from the plate, up
to the end shake (END_SHAKE, common practice for small clockwork) before the next part; the stack is recomputed here
from the plan with shapely (which parts come within the gear clearance of the pipe), the parts list and the
assembly's interference check follow the rods.
"""

import json

import pytest
import shapely

from gearcad.cli import main
from gearcad.trains.hardware import END_SHAKE, STUD_PIPE
from gearcad.trains.interference import check_assembly
from gearcad.trains.parts import parts_list
from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train

from test_mechanism import COMPOUND  # the three-stage train of the mechanism tests


def _three(studs: str) -> str:
    """That train with a ``studs = [...]`` line."""
    return COMPOUND.replace("thickness = 3.0\n", f"thickness = 3.0\n{studs}\n", 1)


# One stage: the whole stack is one sheet between the plates, so no pipe of 1.5 bores fits.
ONE = """name = "one"
module = 1.0
thickness = 3.0
studs = ["output"]
[[stage]]
driver = 12
driven = 36
"""


def _parts_above(plan, shaft, z):
    """Gears and plates whose material comes within the gear clearance of the pipe's circle, from ``z`` up: their
    lower faces, mm (shapely)."""
    pipe = shapely.Point(shaft.x, shaft.y).buffer(shaft.diameter / 2 + plan.fabrication.gear_clearance, 128)
    out = []
    for g in plan.gears:
        s = plan.shafts[g.shaft]
        if s.name != shaft.name and g.z >= z - 1e-9 and \
                shapely.Point(s.x, s.y).buffer(g.gear.tip_diameter / 2, 128).intersects(pipe):
            out.append(g.z)
    for p in plan.plates:
        if p.z >= z - 1e-9 and shapely.Polygon(p.part.outer.points()).intersects(pipe):
            out.append(p.z)
    return out


def test_a_short_stud_pipe_stands_proud_of_its_gear_to_one_and_a_half_bores():
    plan = plan_train(parse_train(_three('studs = ["input"]')))
    mech = plan.mechanism
    support = next(s for s in mech.shafts if s.name == "input")
    shaft = next(s for s in plan.shafts if s.name == "input")
    rods = {r.name: r for r in mech.rods}
    pipe, stud = rods[support.pipe], rods["input"]
    gear = plan.gear("s1-driver")
    back = next(p for p in plan.plates if p.name == "back-plate")
    t = plan.spec.thickness
    need = STUD_PIPE * shaft.diameter
    # The gear alone spans less than 1.5 bores from the plate's face: the pipe stands proud of it, exactly as needed.
    assert gear.z + t - (back.z + t) < need
    assert pipe.z0 == pytest.approx(back.z + t) and pipe.length == pytest.approx(need, abs=1e-9)
    assert pipe.z1 > gear.z + t + 0.5
    assert stud.z0 == pytest.approx(back.z) and stud.z1 == pytest.approx(pipe.z1)  # flush with the pipe
    assert support.kind == "stud" and support.supports == ("back-plate",) and support.free_span == pytest.approx(need)
    assert min(_parts_above(plan, shaft, gear.z + t)) - pipe.z1 >= END_SHAKE - 1e-9
    finding = next(f for f in plan.findings if f.check == "stud input")
    assert finding.severity == "ok" and "proud" in finding.message
    # The parts list and the assembly follow the rods.
    rows = parts_list(plan, {})
    assert any(r["kind"] == "bought" and "input-pipe" in r["note"] and r["length"] == round(need, 2) for r in rows)
    assert any(r["kind"] == "bought" and r["note"].split(", ").count("input") and r["length"] == round(stud.length, 2)
               for r in rows)
    assert check_assembly(plan, mech).overlaps == ()


def test_a_stud_whose_gears_span_enough_keeps_its_pipe_to_them():
    plan = plan_train(parse_train(_three('studs = ["shaft-1"]')))
    rods = {r.name: r for r in plan.mechanism.rods}
    top = max(g.z for g in plan.gears if plan.shafts[g.shaft].name == "shaft-1") + plan.spec.thickness
    assert rods["shaft-1-pipe"].z1 == pytest.approx(top) and rods["shaft-1-pipe"].length >= STUD_PIPE * 3.0
    assert next(f for f in plan.findings if f.check == "stud shaft-1").severity == "ok"


def test_a_stud_with_no_room_for_its_pipe_is_a_failure_naming_it(tmp_path, capsys):
    plan = plan_train(parse_train(ONE))
    finding = next(f for f in plan.findings if f.check == "stud output")
    assert finding.severity == "failure" and finding.value < finding.limit == pytest.approx(STUD_PIPE * 3.0)
    assert "output" in finding.message and "front plate" in finding.message
    pipe = next(r for r in plan.mechanism.rods if r.name == "output-pipe")
    front = next(p for p in plan.plates if p.name == "front-plate")
    assert pipe.z1 == pytest.approx(front.z - END_SHAKE)  # as long as the room allows, still too short
    train = tmp_path / "one.toml"
    train.write_text(ONE)
    out = tmp_path / "out"
    assert main(["build", str(train), "--out", str(out), "--formats", "dxf", "--json"]) == 1
    report = json.loads(capsys.readouterr().out)
    assert any(f["check"] == "stud output" and f["severity"] == "failure" for f in report["findings"])
    assert not out.exists()
