"""The process checks (end mill reach, thinnest tip) hold for every gear of every kind of train.

References: shapely's distance from the mill's centre to the part's polygon (the largest mill
that reaches a circle touches the flanks); ISO 21771's tooth thickness on the tip circle for
the width of a ring's space (pi d_a / z minus the ring's tooth thickness there); the build
contract of issue 12 (a part the process cannot make: exit 1, one line, nothing written).
"""

import math
from pathlib import Path

import pytest

from gearcad.cli import main
from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train


def planetary(module: float, fabrication: str) -> str:
    return (f'name = "epi"\nmodule = {module}\nthickness = 3.0\nfabrication = "{fabrication}"\n'
            '[planetary]\nsun = 18\nplanet = 24\nring = 66\nplanets = 3\nfixed = "ring"\n')


SUMMING = ('name = "sum-planetary"\nmodule = {module}\nthickness = 3.0\nfabrication = "{fabrication}"\n'
           'target = "127/200"\n[summing]\ndifferential = "planetary"\nsun = 15\nplanet = 21\nring = 57\nplanets = 3\n'
           '[[stage]]\ndriver = 29\ndriven = {{ teeth = 15, shift = 0.23 }}\nidler = 30\n'
           '[[stage]]\ndriver = 22\ndriven = 75\nidler = 30\n')


def process(plan, check: str) -> dict[str, str]:
    """Severity of each gear's ``check`` finding, by the gear named in it."""
    return {f.check.removeprefix(check + " "): f.severity for f in plan.findings if f.check.startswith(check + " ")}


def test_every_planetary_gear_is_held_against_the_end_mill():
    plan = plan_train(parse_train(planetary(0.5, "cnc-2mm-endmill")))
    reach = process(plan, "tool reach")
    assert set(reach) == {g.name for g in plan.gears}  # sun, each planet, the ring
    assert set(reach.values()) == {"failure"}  # module 0.5: every space is under 0.8 mm wide
    ring = next(f for f in plan.findings if f.check == "tool reach ring")
    assert "short of the form diameter" in ring.message and "end mill of at most" in ring.message
    wide = plan_train(parse_train(planetary(2.0, "cnc-2mm-endmill")))
    assert set(process(wide, "tool reach").values()) == {"ok"}


def test_every_summing_gear_is_held_against_the_process():
    plan = plan_train(parse_train(SUMMING.format(module=1.0, fabrication="cnc-2mm-endmill")))
    reach = process(plan, "tool reach")
    assert {g.name for g in plan.gears} <= set(reach)
    assert "ring (outside teeth)" in reach  # the ring's outside teeth are path b's driven gear
    assert reach["ring"] == "failure"


def test_a_planetary_set_too_fine_for_the_end_mill_builds_nothing(tmp_path, capsys):
    train = tmp_path / "epi.toml"
    train.write_text(planetary(0.5, "cnc-2mm-endmill"), encoding="utf-8")
    out = tmp_path / "o"
    assert main(["build", str(train), "--out", str(out)]) == 1
    captured = capsys.readouterr()
    assert "ring: the 2 mm end mill" in captured.out and "planet-1: the 2 mm end mill" in captured.out
    assert "nothing was written" in captured.err and len(captured.err.strip().splitlines()) == 1
    assert not out.exists()
    assert sorted(p.name for p in Path(tmp_path).iterdir()) == ["epi.toml"]


def test_a_planetary_tip_thinner_than_the_process_holds_fails():
    # Module 0.5 in a 0.4 mm nozzle's profile: the planets' tips (about 0.39 m) are under 0.4 mm.
    plan = plan_train(parse_train(planetary(0.5, "fdm-pla-0.4mm")))
    tips = process(plan, "tip width")
    assert set(tips) == {g.name for g in plan.gears}
    assert tips["planet-1"] == "failure"
    assert set(process(plan_train(parse_train(planetary(1.0, "fdm-pla-0.4mm"))), "tip width").values()) == {"ok"}


def test_the_ring_tool_reach_against_shapely_and_the_space_width():
    # The largest mill that reaches the ring's form circle from the centre touches the flanks (shapely's
    # distance from its centre to the tooth loop equals its radius) and is narrower than the ring's
    # space at its tip circle, the widest the space gets.
    from shapely.geometry import Point, Polygon

    from gearcad.meshes.outline_checks import ring_largest_tool, ring_tool_reach, space_direction

    plan = plan_train(parse_train(planetary(1.0, "laser-3mm-acrylic")))
    ring = plan.gear("ring")
    loop = next(h for h in ring.part.holes if any(c.kind == "involute" for c in h.curves)).points()
    form = ring.gear.form_diameter / 2
    biggest = ring_largest_tool(loop, form)
    centre = space_direction(loop, internal=True) * (form - biggest)
    polygon = Polygon(loop)
    assert polygon.contains(Point(centre))
    assert polygon.exterior.distance(Point(centre)) == pytest.approx(biggest, abs=1e-6)
    g = ring.gear
    assert 2 * biggest < math.pi * g.tip_diameter / g.teeth - g.tip_thickness + 1e-9
    assert ring_tool_reach(loop, biggest * 0.999) >= form - 1e-6 > ring_tool_reach(loop, biggest * 1.01)
    assert ring_tool_reach(loop, g.tip_diameter) == pytest.approx(g.tip_diameter / 2, rel=1e-6)  # cannot enter
