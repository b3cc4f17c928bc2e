"""A ring-fixed planetary set reaches the outside: sun on the centre shaft (D-flat), carrier on a pipe through the
front plate; a set whose ring turns is refused with a finding naming the ring."""

import math

import pytest

from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train

TRAIN = """name = "epi"
module = 1.0
thickness = 3.0
fabrication = "laser-3mm-acrylic"
[planetary]
sun = 18
planet = 24
ring = 66
planets = 3
fixed = "{fixed}"
input = "{input}"
"""


@pytest.fixture(scope="module")
def plan():
    return plan_train(parse_train(TRAIN.format(fixed="ring", input="sun")))


def _rod(plan, name):
    return next(r for r in plan.mechanism.rods if r.name == name)


def _centre_hole(plate, x, y):
    return next(d for cx, cy, d in plate.part.circles if math.hypot(cx - x, cy - y) < 1e-9)


def test_the_carrier_turns_on_a_pipe_through_the_front_plate(plan):
    shaft, pipe = _rod(plan, "centre"), _rod(plan, "centre-pipe")
    carrier = next(p for p in plan.plates if p.name == "carrier")
    front = next(p for p in plan.plates if p.name == "front-plate")
    clearance = plan.fabrication.bore_clearance
    t = plan.spec.thickness
    # The pipe turns on the shaft (its bore a running fit), starts at the carrier's front disc and stands out of
    # the front plate; the shaft's front end turns inside it, so the shaft is still held at two points.
    assert pipe.bore == pytest.approx(shaft.diameter + clearance)
    assert pipe.z0 == pytest.approx(carrier.z) and pipe.z1 > front.z + t
    assert shaft.z1 == pytest.approx(pipe.z1) and shaft.z0 < -t
    # The carrier's centre hole fits the pipe (glued); the front plate's holds it at a running fit.
    assert _centre_hole(carrier, pipe.x, pipe.y) == pytest.approx(pipe.diameter + clearance)
    assert _centre_hole(front, pipe.x, pipe.y) == pytest.approx(pipe.diameter + clearance)
    # The carrier's back disc still turns on the shaft.
    back = next(p for p in plan.plates if p.name == "carrier-back")
    assert _centre_hole(back, pipe.x, pipe.y) == pytest.approx(shaft.diameter + clearance)
    # Nothing on the shaft above the carrier disc but the pipe: its spacers ride on the pipe.
    for r in plan.mechanism.rods:
        if r.kind == "spacer" and r.name.startswith("centre-") and r.z0 >= carrier.z - 1e-9:
            assert r.name.startswith("centre-pipe-") and r.bore > pipe.diameter


def test_the_sun_is_fixed_to_the_shaft_and_the_joins_say_where_the_drive_goes(plan):
    assert plan.gear("sun").spec.flat is not None
    notes = {j.method: j.note for j in plan.mechanism.joins}
    assert "input" in notes["flat"] and "output" in notes["pipe"]
    assert not any(f.severity == "failure" for f in plan.findings)
    assert plan.mechanism.overlaps == ()


@pytest.mark.parametrize("fixed, input", [("sun", "ring"), ("carrier", "sun")])
def test_a_turning_ring_is_refused_by_name(fixed, input):
    plan = plan_train(parse_train(TRAIN.format(fixed=fixed, input=input)))
    failure = next(f for f in plan.findings if f.check == "ring drive")
    assert failure.severity == "failure" and failure.message.startswith("ring:")
