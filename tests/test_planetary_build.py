"""Building a planetary set: parts in phase (shapely overlaps), carrier pins at the assembly angles, files read back."""

import json
import math

import ezdxf
import numpy as np
import pytest
import shapely
from shapely import affinity

from gearcad.cli import main
from gearcad.trains.plan import placed_holes, placed_outline
from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train

TRAIN = """name = "epi"
module = 1.0
thickness = 3.0
fabrication = "fdm-pla-0.4mm"
[planetary]
sun = 18
planet = 24
ring = 66
planets = 3
fixed = "ring"
"""


UNEQUAL = TRAIN.replace("sun = 18", "sun = 20").replace("planet = 24", "planet = 23")  # (20 + 66) / 3 not whole


@pytest.fixture(scope="module")
def plan():
    return plan_train(parse_train(TRAIN))


def test_an_unequal_spacing_that_assembles_is_used_and_stays_in_phase():
    # The assembly condition fails for equal spacing: the set takes the unequal spacing that does work
    # (a warning), and every planet still meshes both sun and ring (shapely).
    uneven = plan_train(parse_train(UNEQUAL))
    assembly = next(f for f in uneven.findings if f.check == "assembly")
    assert assembly.severity == "warning"
    ring = polygon(uneven.gear("ring"), uneven)
    for k in (1, 2, 3):
        p = polygon(uneven.gear(f"planet-{k}"), uneven)
        assert polygon(uneven.gear("sun"), uneven).intersection(p).area < 1e-6
        assert ring.intersection(p).area < 1e-6


def polygon(gear, plan, turn=0.0):
    shaft = plan.shafts[gear.shaft]
    outer = shapely.Polygon(placed_outline(gear, plan), [h for h in placed_holes(gear, plan)])
    return affinity.rotate(outer, turn, origin=(shaft.x, shaft.y), use_radians=True)


def test_every_mesh_is_in_phase_and_half_a_pitch_off_it_is_not(plan):
    # Reference: shapely intersections of the placed outlines (the ring as its rim with the toothed hole).
    sun = plan.gear("sun")
    ring = plan.gear("ring")
    ring_poly = polygon(ring, plan)
    for k in (1, 2, 3):
        planet = plan.gear(f"planet-{k}")
        p = polygon(planet, plan)
        assert polygon(sun, plan).intersection(p).area < 1e-6
        assert ring_poly.intersection(p).area < 1e-6
        off = polygon(planet, plan, math.pi / planet.gear.teeth)
        assert polygon(sun, plan).intersection(off).area > 0.1 or ring_poly.intersection(off).area > 0.1


def test_planet_pins_sit_at_the_assembly_angles_on_the_centre_distance(plan):
    carrier = next(p for p in plan.plates if p.name == "carrier")
    centre = plan.shafts[0]
    pins = [c for c in carrier.part.circles if math.hypot(c[0] - centre.x, c[1] - centre.y) > 1]
    a = plan.meshes[0].pair.centre_distance
    angles = sorted(math.atan2(y - centre.y, x - centre.x) % (2 * math.pi) for x, y, _ in pins)
    assert [math.hypot(x - centre.x, y - centre.y) for x, y, _ in pins] == pytest.approx([a] * 3, abs=1e-9)
    # (z_s + z_r) / N = 28, whole: equal spacing of 120 degrees (the assembly condition).
    assert np.diff(angles) == pytest.approx([2 * math.pi / 3] * 2, abs=1e-9)


def test_the_ratio_is_the_kinematic_models(plan):
    # Ring fixed, sun in, carrier out: 1 / (1 + z_r / z_s) = 18 / 84 = 3/14 (Dudley's handbook table, from memory).
    assert (plan.ratio.numerator, plan.ratio.denominator) == (3, 14)


def test_build_writes_ring_carrier_and_the_three_conditions(tmp_path, capsys):
    train = tmp_path / "epi.toml"
    train.write_text(TRAIN)
    out = tmp_path / "o"
    assert main(["build", str(train), "--out", str(out), "--formats", "dxf", "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    checks = {f["check"]: f["severity"] for f in report["findings"]}
    assert checks["coaxial"] == checks["assembly"] == checks["neighbour"] == "ok"
    for name in ("ring.dxf", "carrier.dxf", "sun.dxf", "planet-1.dxf", "back-plate.dxf"):
        doc = ezdxf.readfile(out / name)
        assert not doc.audit().has_errors  # ezdxf's audit
    ring = ezdxf.readfile(out / "ring.dxf")
    inner = [e for e in ring.modelspace() if e.dxftype() == "LWPOLYLINE" and e.dxf.layer == "CUT_INNER"]
    assert len(inner) == 1  # the toothed contour is one closed inner polyline


def test_planets_that_collide_are_refused(tmp_path, capsys):
    # Five 24-tooth planets on a 21 mm centre distance: even equally spaced, 2 a sin(pi/5) = 24.7 mm is less than
    # their 26 mm tip circles (the neighbour condition).
    train = tmp_path / "bad.toml"
    train.write_text(TRAIN.replace("planets = 3", "planets = 5"))
    assert main(["build", str(train), "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err
    assert "tip circles" in err and len(err.strip().splitlines()) == 1
    assert not (tmp_path / "o").exists()


STEPPED = """name = "stepped"
module = 1.0
thickness = 3.0
fabrication = "fdm-pla-0.4mm"
[planetary]
sun = 53
planet = 116
ring = 191
planets = 3
planet_ring = 22
fixed = "ring"
"""


def test_stepped_planets_mesh_the_sun_in_one_layer_and_the_ring_in_the_next():
    # shapely: each planet's sun-side gear clears the sun, its ring-side gear clears the ring; one rigid part each.
    stepped = plan_train(parse_train(STEPPED))
    ring = polygon(stepped.gear("ring"), stepped)
    sun = polygon(stepped.gear("sun"), stepped)
    for k in (1, 2, 3):
        a, b = stepped.gear(f"planet-{k}"), stepped.gear(f"planet-{k}-ring-side")
        assert a.layer != b.layer and a.rotation == b.rotation
        assert sun.intersection(polygon(a, stepped)).area < 1e-6
        assert ring.intersection(polygon(b, stepped)).area < 1e-6
    # Ring fixed, sun in, carrier out: 1 / (1 + z_r z_p1 / (z_s z_p2)) (Dudley's table, stepped planets; from memory).
    from fractions import Fraction

    assert stepped.ratio == 1 / (1 + Fraction(191 * 116, 53 * 22))


def test_design_planetary_builds_an_exact_set_that_passes_every_mesh_check(tmp_path, capsys):
    out = tmp_path / "d"
    code = main(["design", "0.25", "--kind", "planetary", "--module", "1", "--min-teeth", "18", "--out", str(out),
                 "--formats", "dxf", "--json"])
    report = json.loads(capsys.readouterr().out)
    assert code == 0
    assert (report["ratio"]["numerator"], report["ratio"]["denominator"]) == (1, 4)
    assert all(f["severity"] != "failure" for m in report["meshes"] for f in m["findings"])
    assert "[planetary]" in (out / "train.toml").read_text()
