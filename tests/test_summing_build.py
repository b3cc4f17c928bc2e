"""Building summing trains: one axle for both paths, every mesh in phase (shapely), Willis's equations (sympy),
the assembly rule of the spur differential checked by phasing, files and bad input."""

import itertools
import json
import math
from fractions import Fraction

import numpy as np
import pytest
import shapely
import sympy

from gearcad.cli import main
from gearcad.trains.hardware import END_SHAKE
from gearcad.trains.plan import placed_holes, placed_outline
from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train, train_to_toml

MEAN = """name = "sum-mean"
module = 1.0
thickness = 3.0
target = "127/200"
[summing]
differential = "mean"
[[stage]]
driver = 12
driven = 16
idler = 20
[[stage]]
driver = 13
driven = 25
idler = 20
"""

# Path a direct (45 + 30 = 75 half-modules), path b through an idler: the direct path sets the axle distance.
MIXED = """name = "sum-mixed"
module = 1.0
thickness = 3.0
[summing]
differential = "mean"
sun = 18
planet = 13
planets = 2
[[stage]]
driver = 45
driven = 30
[[stage]]
driver = 20
driven = 40
idler = 15
"""

PLANETARY = """name = "sum-planetary"
module = 1.0
thickness = 3.0
target = "127/200"
[summing]
differential = "planetary"
sun = 15
planet = 21
ring = 57
planets = 3
[[stage]]
driver = 29
driven = { teeth = 15, shift = 0.23 }
idler = 30
[[stage]]
driver = 22
driven = 75
idler = 30
"""


@pytest.fixture(scope="module", params=[MEAN, MIXED, PLANETARY], ids=["mean", "mixed", "planetary"])
def plan(request):
    return plan_train(parse_train(request.param))


def polygon(gear, plan):
    return shapely.Polygon(placed_outline(gear, plan), [h for h in placed_holes(gear, plan)])


def meshing_names(plan):
    """Every pair of gears that mesh: the plan lists the meshes of planet (pair) 1; the others mesh alike."""
    count = sum(1 for s in plan.shafts if s.name.startswith("pin-")) // (2 if plan.spec.summing.differential == "mean" else 1)
    return {frozenset(n.replace("planet-1", f"planet-{k}", 1) for n in m.names)
            for m in plan.meshes for k in range(1, count + 1)}


def test_no_two_parts_of_a_layer_overlap_and_every_mesh_closes_to_its_backlash(plan):
    # Reference: shapely's intersection areas and distances of the placed outlines.  Meshing gears come within
    # the profile's backlash (0.15 mm of thinning, about 0.07 mm normal gap each side) and never overlap.
    meshing = meshing_names(plan)
    for a, b in itertools.combinations(plan.gears, 2):
        if a.layer != b.layer:
            continue
        pa, pb = polygon(a, plan), polygon(b, plan)
        assert pa.intersection(pb).area < 1e-6, (a.name, b.name)
        gap = pa.distance(pb)
        if frozenset((a.name, b.name)) in meshing:
            assert 0.02 < gap < 0.15, (a.name, b.name, gap)
        else:
            assert gap > 0.5, (a.name, b.name, gap)


def test_both_paths_reach_one_axle_at_their_centre_distances(plan):
    # Reference: the shaft coordinates on the plate against each mesh's centre distance (ISO 21771 a_w).
    at = {s.name: np.array([s.x, s.y]) for s in plan.shafts}
    shaft_of = {g.name: plan.shafts[g.shaft].name for g in plan.gears}
    shaft_of.setdefault("ring", "differential")
    for m in plan.meshes:
        a, b = (shaft_of[n] for n in m.names)
        assert math.isclose(float(np.hypot(*(at[a] - at[b]))), m.pair.centre_distance, abs_tol=1e-9), m.names
    assert plan.gear("a-driver").shaft == next(i for i, s in enumerate(plan.shafts) if s.name == "input")


def willis_carrier(spec):
    """Carrier speed per input turn from Willis's equation on every mesh, solved by sympy (the reference)."""
    s = spec.summing
    speed = {}
    for name, stage in zip("ab", spec.stages):
        speed[name] = sympy.Rational(stage.driver.teeth, stage.driven.teeth) * (1 if stage.idler else -1)
    w_c, w_pa, w_pb = sympy.symbols("w_c w_pa w_pb")
    if s.differential == "mean":
        eqs = [sympy.Eq((speed["a"] - w_c) * s.sun, -(w_pa - w_c) * s.planet),
               sympy.Eq((w_pa - w_c), -(w_pb - w_c)),
               sympy.Eq((w_pb - w_c) * s.planet, -(speed["b"] - w_c) * s.sun)]
        return sympy.solve(eqs, [w_c, w_pa, w_pb])[w_c]
    # Sun on side a, ring on side b: (w_s - w_c) / (w_r - w_c) = -z_r / z_s.
    return sympy.solve(sympy.Eq((speed["a"] - w_c) * s.sun, -(speed["b"] - w_c) * s.ring), w_c)[0]


def test_the_ratio_is_sympys_solution_of_willis_equations(plan):
    expected = willis_carrier(plan.spec)
    assert abs(Fraction(str(expected))) == plan.ratio
    assert plan.direction == ("same" if expected > 0 else "opposite")


def test_planet_pins_sit_on_the_carrier_discs(plan):
    pins = [s for s in plan.shafts if s.name.startswith("pin-")]
    carriers = [p for p in plan.plates if p.name.startswith("carrier")]
    assert carriers and pins
    for carrier in carriers:
        holes = {(round(x, 6), round(y, 6)) for x, y, _ in carrier.part.circles}
        assert all((round(p.x, 6), round(p.y, 6)) in holes for p in pins)


def test_every_planet_pin_is_held_at_both_ends_in_two_carrier_discs_that_clear_the_set(plan):
    # The trade's rule for a carrier (common practice): each planet pin held at both ends, the discs above and
    # below the planet with the pin's washers between them.  shapely: the lower disc turns inside the spacer ring's
    # bore with the profile's gear clearance; the assembly check finds no overlap.
    from gearcad.trains.interference import check_assembly

    mech = plan.mechanism
    t = plan.spec.thickness
    z_of = {p.name: p.z for p in plan.plates}
    for s in (s for s in mech.shafts if s.name.startswith("pin-")):
        assert s.kind == "pin" and len(s.supports) == 2 and all(n.startswith("carrier") for n in s.supports)
        lo, hi = sorted(z_of[n] for n in s.supports)
        for g in (g for g in plan.gears if plan.shafts[g.shaft].name == s.name):
            assert lo + t <= g.z and g.z + t <= hi
    assert not any(f.check.startswith("stud ") for f in plan.findings)
    assert check_assembly(plan, mech).overlaps == ()
    if plan.spec.summing.differential == "planetary":
        spacer = next(p for p in plan.plates if p.name == "ring-spacer")
        lower = next(p for p in plan.plates if p.name == "carrier-back")
        ring = plan.gear("ring")
        bore = shapely.Polygon(spacer.part.holes[0].points())
        disc = shapely.Polygon(lower.part.outer.points())
        # The disc turns inside the glued cup, the end shake over the web (the spacer ring's lower face).
        assert lower.z == pytest.approx(spacer.z + END_SHAKE, abs=1e-9) and bore.contains(disc)
        assert disc.exterior.distance(bore.exterior) >= plan.fabrication.gear_clearance - 1e-3
        web = next(p for p in plan.plates if p.name == "ring-web")
        assert web.z < spacer.z < ring.z < z_of["carrier"]


# A planetary differential whose path-b idler reaches the front plate only (gearcad design 1/131 --kind summing
# --differential planetary --planets 2 --max-teeth 100 -m 1 chose it).
BRIDGED_B = """name = "sum-bridged"
module = 1.0
thickness = 3.0
[summing]
differential = "planetary"
sun = 49
planet = 20
planets = 2
ring = 89
[[stage]]
driver = 68
driven = 99
[[stage]]
driver = 39
driven = 100
idler = 19
"""


def test_the_ring_web_and_spacer_stay_glued_under_the_ring_when_an_idler_needs_a_bridge():
    # Web, spacer ring and ring are one glued stack, face on face, whatever bridge room the train needs; the
    # idler's bridge stands beside the differential below the ring's layer, and the assembly is clean.
    from gearcad.trains.interference import check_assembly

    plan = plan_train(parse_train(BRIDGED_B))
    z = {p.name: p.z for p in plan.plates}
    t = plan.spec.thickness
    assert z["ring-spacer"] - z["ring-web"] == pytest.approx(t, abs=1e-9)
    assert plan.gear("ring").z - z["ring-spacer"] == pytest.approx(t, abs=1e-9)
    idler = next(s for s in plan.mechanism.shafts if s.name == "idler-b")
    assert "bridge-idler-b" in idler.supports
    assert z["bridge-idler-b"] + t <= plan.gear("b-idler").z - plan.fabrication.layer_gap + 1e-9
    # Each pin's free span: the planet and its two washers, the end shake above the disc and the layer gap under the
    # upper carrier.
    assert all(s.free_span == pytest.approx(t + END_SHAKE + plan.fabrication.layer_gap)
               for s in plan.mechanism.shafts if s.name.startswith("pin-"))
    assert check_assembly(plan, plan.mechanism).overlaps == ()


def _footprint(plan, name):
    """A flat part's material in the plane as placed (shapely): gear tip circle, ring annulus, plate outline less its
    inner contours (a spacer ring's bore)."""
    from shapely.geometry import Point

    gear = next((g for g in plan.gears if g.name == name), None)
    if gear is not None:
        s = plan.shafts[gear.shaft]
        if gear.role == "ring":
            return Point(s.x, s.y).buffer(gear.gear.outer_diameter / 2, 256).difference(
                Point(s.x, s.y).buffer(gear.gear.tip_diameter / 2, 256))
        return Point(s.x, s.y).buffer(gear.gear.tip_diameter / 2, 256)
    plate = next(p for p in plan.plates if p.name == name)
    return shapely.Polygon(plate.part.outer.points(), [h.points() for h in plate.part.holes])


@pytest.mark.parametrize("text", [PLANETARY, BRIDGED_B, MEAN], ids=["planetary", "bridged", "mean"])
def test_glued_parts_meet_face_on_face_and_every_other_part_keeps_the_end_shake(text):
    # Recomputed from the plan: every glued pair's faces meet (top of one = bottom of the next, 1e-9 mm) over a
    # shared area (shapely); every other pair of flat parts that overlap in the plane (gears, discs, plates, bridges)
    # keeps at least the end shake between its faces (END_SHAKE, common practice for small clockwork), but meshing
    # gears, which share their layer.  The carrier disc drops in through the ring (shapely: inside its tip circle).
    plan = plan_train(parse_train(text))
    t = plan.spec.thickness
    z = {p.name: p.z for p in plan.plates} | {g.name: g.z for g in plan.gears}
    top = {p.name: p.z + t for p in plan.plates} | {g.name: g.z + t + g.hub_length for g in plan.gears}
    glued = {frozenset(pair) for group in plan.bonded for pair in zip(group, group[1:])}
    for group in plan.bonded:
        for lower, upper in zip(group, group[1:]):
            assert abs(top[lower] - z[upper]) <= 1e-9, (lower, upper)
            assert _footprint(plan, lower).intersection(_footprint(plan, upper)).area > 1.0
    if plan.spec.summing.differential == "planetary":
        assert plan.bonded == (("ring-web", "ring-spacer", "ring"),)
        ring = plan.gear("ring")
        disc = shapely.Polygon(next(p for p in plan.plates if p.name == "carrier-back").part.outer.points())
        s = plan.shafts[ring.shaft]
        assert shapely.Point(s.x, s.y).buffer(ring.gear.tip_diameter / 2, 256).contains(disc)
    meshing = {frozenset(m.names) for m in plan.meshes}
    planets = [g.name for g in plan.gears if g.role == "planet"]
    meshing |= {frozenset((p, q)) for p in planets for q in planets + [g.name for g in plan.gears
                                                                       if g.role in ("sun", "ring")] if p != q}
    names = list(z)
    checked = 0
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            if frozenset((a, b)) in glued | meshing:
                continue
            if _footprint(plan, a).intersection(_footprint(plan, b)).area <= 1e-6:
                continue
            gap = max(z[b] - top[a], z[a] - top[b])
            assert gap >= END_SHAKE - 1e-9, (a, b, gap)
            checked += 1
    assert checked > 10


@pytest.mark.parametrize("sun,pairs", [(z, n) for z in range(13, 25) for n in (2, 3, 4, 5)])
def test_the_spur_differentials_assembly_rule_agrees_with_phasing_every_mesh(sun, pairs, monkeypatch):
    # The closed form 2 z_s / N (derived in gearcad.trains.differential_mean) against the plan's phasing of every mesh with the
    # rule switched off: phasing fails exactly when the rule does.
    import gearcad.trains.differential as differential
    import gearcad.trains.differential_mean as mean
    from gearcad.errors import InputError

    monkeypatch.setattr(mean, "mean_assembles", lambda z, n: True)
    text = MEAN.replace('differential = "mean"', f'differential = "mean"\nsun = {sun}\nplanet = 13\nplanets = {pairs}')
    spec = parse_train(text)
    if (2 * sun) % pairs == 0:
        differential.plan_summing(spec, 1e-3)
    else:
        with pytest.raises(InputError, match="do not all mesh sun B"):
            differential.plan_summing(spec, 1e-3)


def test_a_spacing_that_breaks_the_rule_shows_the_clash(monkeypatch):
    # 19 suns, 3 pairs: 2 x 19 / 3 is not whole.  Forced through, sun B phased to pair 1 overlaps another pair's
    # planet (shapely), which is what the rule forbids.
    import gearcad.trains.differential as differential
    import gearcad.trains.differential_mean as mean

    monkeypatch.setattr(mean, "mean_assembles", lambda z, n: True)
    monkeypatch.setattr(mean, "same_phase", lambda angles, teeth: True)
    text = MEAN.replace('differential = "mean"', 'differential = "mean"\nsun = 19\nplanet = 13\nplanets = 3')
    forced = differential.plan_summing(parse_train(text), 1e-3)
    sun_b = polygon(forced.gear("sun-b"), forced)
    assert sun_b.intersection(polygon(forced.gear("planet-1b-2"), forced)).area < 1e-6
    worst = max(sun_b.intersection(polygon(forced.gear(f"planet-{k}b-2"), forced)).area for k in (2, 3))
    assert worst > 0.05


def test_the_default_spur_differential_passes_every_check():
    plan = plan_train(parse_train(MEAN))
    assert all(f.severity == "ok" for f in plan.findings)
    for m in plan.meshes:
        if "sun-a" in m.names or "sun-b" in m.names or m.names[0].startswith("planet"):
            assert all(f.severity == "ok" for f in m.analysis.findings), m.names


def test_the_train_file_round_trips():
    for text in (MEAN, MIXED, PLANETARY):
        spec = parse_train(text)
        assert parse_train(train_to_toml(spec)) == spec


BAD = [
    ("one path", MEAN.split("[[stage]]\ndriver = 13")[0], "exactly two"),
    ("rule", MEAN.replace('differential = "mean"', 'differential = "mean"\nsun = 17\nplanets = 3'), "2 x sun teeth / pairs"),
    ("idler", MIXED.replace("idler = 15", "idler = 12").replace("driver = 45", "driver = 60").replace("driven = 30", "driven = 60"),
     "give it at least"),
    ("unequal", MIXED.replace("idler = 15\n", ""), "both paths need one centre distance"),
    ("ring fit", PLANETARY.replace("driven = 75", "driven = 60"), "must carry the 57-tooth ring"),
    ("no ring", PLANETARY.replace("ring = 57\n", ""), "needs its ring"),
    ("kind", MEAN.replace('"mean"', '"bevel"'), "differential must be one of"),
    ("key", MEAN.replace("[summing]", "[summing]\nsuns = 3"), "unknown key"),
]


@pytest.mark.parametrize("text,expect", [(t, e) for _, t, e in BAD], ids=[n for n, _, _ in BAD])
def test_bad_summing_trains_get_one_line_exit_2_and_nothing_written(text, expect, tmp_path, capsys):
    train = tmp_path / "t.toml"
    train.write_text(text)
    out = tmp_path / "out"
    assert main(["build", str(train), "--out", str(out), "--formats", "dxf"]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and expect in err and "Traceback" not in err
    assert not out.exists()


def test_build_writes_every_part_and_the_report_names_the_differential(tmp_path, capsys):
    train = tmp_path / "t.toml"
    train.write_text(PLANETARY)
    assert main(["build", str(train), "--out", str(tmp_path / "out"), "--formats", "dxf,step"]) in (0, 1)
    report = json.loads((tmp_path / "out" / "report.json").read_text())
    assert report["kind"] == "summing" and "carrier" in report["ratio_rule"]
    assert {p["name"] for p in report["plates"]} >= {"back-plate", "front-plate", "carrier", "carrier-back",
                                                          "ring-web", "ring-spacer"}
    checks = {f["check"] for f in report["findings"]}
    assert {"one axle", "coaxial", "assembly", "neighbour", "ring rim", "kinematics"} <= checks
    assert (tmp_path / "out" / "ring.step").stat().st_size > 10_000
    assert "never laser-cut PVC" in capsys.readouterr().out


def test_the_ring_with_outside_teeth_is_a_valid_solid_of_the_right_volume():
    # Reference: OCP's BRepCheck (valid) and shapely's area of the same outline times the face width.
    from gearcad.export.step import build_solid

    plan = plan_train(parse_train(PLANETARY))
    ring = plan.gear("ring")
    from OCP.BRepCheck import BRepCheck_Analyzer

    built = build_solid(ring.part, plan.spec.thickness, plan.tolerance)
    assert BRepCheck_Analyzer(built.solid).IsValid()
    area = shapely.Polygon(ring.part.outer.points(), [h.points() for h in ring.part.holes]).area
    assert math.isclose(built.volume, area * plan.spec.thickness, rel_tol=1e-3)


@pytest.mark.parametrize("differential", ["mean", "planetary"])
def test_design_kind_summing_builds_an_exact_train_on_one_axle(differential, tmp_path, capsys):
    # 127/200: 127 is a prime above the 100-tooth limit (no compound train of 12..100 teeth reaches it).
    out = tmp_path / "out"
    code = main(["design", "127/200", "--kind", "summing", "--differential", differential, "-m", "1",
                 "--min-teeth", "12", "--max-teeth", "100", "--out", str(out), "--formats", "dxf", "--json"])
    assert code == 0
    report = json.loads(capsys.readouterr().out)
    assert (report["ratio"]["numerator"], report["ratio"]["denominator"]) == (127, 200)
    spec = parse_train((out / "train.toml").read_text())
    assert spec.summing.differential == differential
    assert Fraction(str(willis_carrier(spec))) == Fraction(127, 200)


def test_design_from_an_inventory_takes_the_idlers_from_the_shelf_too(tmp_path, capsys):
    # Each physical gear once: the two paths' gears and their idlers all come from the shelf.
    from collections import Counter

    shelf = "20x2,25-60/5x2,127"
    out = tmp_path / "out"
    assert main(["design", "0.6", "--kind", "summing", "-m", "1", "--inventory", shelf, "--out", str(out),
                 "--formats", "dxf"]) == 0
    spec = parse_train((out / "train.toml").read_text())
    used = Counter(g.teeth for s in spec.stages for g in (s.driver, s.driven, s.idler) if g is not None)
    held = Counter({20: 2, 127: 1, **{z: 2 for z in range(25, 61, 5)}})
    assert all(held[z] >= n for z, n in used.items()), used
