"""``gearcad pair --helix``: the contract keys, the handbook figures, beta = 0, bad input; the helical rating."""

import json
import math

import pytest

from gearcad.cli import main
from gearcad.materials import load_material
from gearcad.meshes import helical as hx
from gearcad.meshes.helical_rating import helix_factor_bending, helix_factor_contact, rate_helical_pair
from gearcad.meshes.pair import make_pair
from gearcad.profiles import load_tooth_system
from gearcad.meshes.strength import rate_pair

ISO53A = load_tooth_system("iso53-a")


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_contract_keys_and_handbook_figures(capsys):
    # KHK technical reference, helical gears in the normal system (from memory: verify): m_n 3, beta 30 deg,
    # z 12 / 60, x_n 0.09809 / 0: alpha_t 22.79588 deg, alpha_wt 23.1126 deg, a = 125.000 mm.
    code, out, _ = run(capsys, "pair", "12", "60", "-m", "3", "--helix", "30", "--shift", "0.09809", "0",
                       "--backlash", "0.1", "--face-width", "20", "--json")
    assert code == 0
    d = json.loads(out)
    assert d["helix_angle"] == pytest.approx(30.0, rel=1e-14)
    assert d["transverse_module"] == pytest.approx(3.46410, abs=5e-6)
    assert d["transverse_pressure_angle"] == pytest.approx(22.79588, abs=5e-6)
    assert d["working_pressure_angle"] == pytest.approx(23.1126, abs=5e-5)
    assert d["centre_distance"] == pytest.approx(125.000, abs=5e-4)
    assert d["module"] == 3.0
    # eps_beta = b sin(beta) / (pi m_n) = 20 * 0.5 / (3 pi) (ISO 21771)
    assert d["overlap_ratio"] == pytest.approx(10 / (3 * math.pi), rel=1e-12)
    assert d["total_contact_ratio"] == pytest.approx(d["overlap_ratio"] + d["contact_ratio"], rel=1e-12)
    g1, g2 = d["gears"]
    assert (g1["hand"], g2["hand"]) == ("right", "left")
    assert g1["lead"] == pytest.approx(math.pi * 36 / math.cos(math.radians(30)) / math.tan(math.radians(30)), rel=1e-12)
    assert g1["shift"] == pytest.approx(0.09809, rel=1e-12)
    assert d["verdict"] in ("ok", "warning")


def test_zero_helix_gives_todays_spur_json(capsys):
    args = ["pair", "13", "31", "-m", "1.5", "--shift", "0.3", "-0.1", "--backlash", "0.05", "--json"]
    _, spur, _ = run(capsys, *args)
    code, helical, _ = run(capsys, *args, "--helix", "0")
    assert code == 0
    spur, helical = json.loads(spur), json.loads(helical)
    assert {k: helical[k] for k in spur} == spur
    assert helical["helix_angle"] == 0.0 and helical["overlap_ratio"] == 0.0


def test_left_hand_gear_1(capsys):
    code, out, _ = run(capsys, "pair", "20", "40", "-m", "1", "--helix", "15", "--hand", "left", "--json")
    g1, g2 = json.loads(out)["gears"]
    assert (g1["hand"], g2["hand"]) == ("left", "right")


def test_table_names_the_sections(capsys):
    code, out, _ = run(capsys, "pair", "20", "40", "-m", "1", "--helix", "15", "--herringbone", "--gap", "2")
    assert code == 0
    assert out.startswith("Herringbone pair 20 : 40")
    for text in ("transverse module", "overlap ratio (one half)", "lead", "Caution"):
        assert text in out


def test_overlap_warning_below_one(capsys):
    # common practice: eps_beta < 1 warns; 10 mm at 10 deg, m_n 1: 10 sin(10 deg) / pi = 0.553
    code, out, _ = run(capsys, "pair", "20", "40", "-m", "1", "--helix", "10", "--face-width", "10", "--json")
    found = {f["check"]: f for f in json.loads(out)["findings"]}
    assert found["overlap ratio"]["severity"] == "warning"
    assert found["hands"]["severity"] == "ok"


@pytest.mark.parametrize("argv, words", [
    (["--helix", "45"], "below 45 degrees"),
    (["--helix", "-5"], "helix angle"),
    (["--helix", "nan"], "helix angle"),
    (["--hand", "left"], "give the helix angle"),
    (["--herringbone"], "give the helix angle"),
    (["--helix", "0", "--herringbone"], "above 0 degrees"),
    (["--helix", "20", "--gap", "1"], "herringbone pair only"),
    (["--helix", "20", "--herringbone", "--gap", "30", "--face-width", "20"], "narrower than the face width"),
])
def test_bad_helix_input_is_one_line_exit_2(capsys, argv, words):
    code, out, err = run(capsys, "pair", "20", "40", "-m", "1", *argv)
    assert code == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and words in err


# -- the rating -------------------------------------------------------------------------------------

def test_helix_factors():
    # ISO 6336-3 (from memory): Y_beta = 1 - eps_beta beta / 120 deg with eps_beta <= 1 and beta <= 30 deg: floor 0.75.
    assert helix_factor_bending(2.0, math.radians(40)) == pytest.approx(0.75)
    assert helix_factor_bending(0.5, math.radians(12)) == pytest.approx(1 - 0.5 * 12 / 120)
    # ISO 6336-2:1996 / DIN 3990 (from memory): Z_beta = sqrt(cos beta)
    assert helix_factor_contact(math.radians(30)) == pytest.approx(math.sqrt(math.sqrt(3) / 2))


def test_small_helix_rating_tends_to_the_spur_rating():
    # As beta -> 0 every helical factor tends to 1 and the virtual gear to the real one: the spur rating.
    acetal = load_material("acetal")
    spur = rate_pair(make_pair(18, 40, 1.0, ISO53A), 0.5, 200, 8.0, acetal, acetal)
    helical = rate_helical_pair(hx.make_helical_pair(18, 40, 1.0, ISO53A, math.radians(0.01)), 0.5, 200, 8.0, acetal, acetal)
    assert helical.contact_stress == pytest.approx(spur.contact_stress, rel=1e-4)
    for h, s in zip(helical.gears, spur.gears):
        assert h.bending_stress == pytest.approx(s.bending_stress, rel=1e-3)


def test_axial_force_is_tangential_force_times_tan_beta():
    acetal = load_material("acetal")
    pair = hx.make_helical_pair(18, 40, 1.0, ISO53A, math.radians(25))
    r = rate_helical_pair(pair, 0.5, 200, 8.0, acetal, acetal)
    f_t = 2000 * 0.5 / pair.gear1.reference_diameter  # N on the reference circle from 0.5 N·m
    assert r.axial_force == pytest.approx(f_t * math.tan(math.radians(25)), rel=1e-12)
    h = rate_helical_pair(pair, 0.5, 200, 8.0, acetal, acetal, herringbone=True)
    assert h.axial_force == 0.0 and h.halves_axial_force == pytest.approx(r.axial_force / 2, rel=1e-12)
    assert any(f.check == "axial force" for f in r.findings())


def test_rating_in_json(capsys):
    code, out, _ = run(capsys, "pair", "18", "40", "-m", "1", "--helix", "25", "--torque", "0.5", "--speed", "200", "--json")
    rating = json.loads(out)["rating"]
    assert rating["axial_force"] > 0 and rating["bending_helix_factor"] < 1


# -- internal pairs ---------------------------------------------------------------------------------

@pytest.mark.parametrize("x1, x2", [(0.0, 0.0), (0.3, 0.1), (0.2, -0.3)])
def test_internal_helical_centre_distance_by_iso_formula(capsys, x1, x2):
    # ISO 21771 with the ring's tooth count negative: a_w = m_n (z1 + z2) cos(alpha_t) / (2 cos(beta) cos(alpha_wt)),
    # inv(alpha_wt) = inv(alpha_t) + 2 tan(alpha_n) (x1 + x2) / (z1 + z2); the magnitude is the distance.
    code, out, _ = run(capsys, "pair", "16", "-60", "-m", "1", "--helix", "20", "--shift", str(x1), str(x2), "--json")
    d = json.loads(out)
    expected = -hx.helical_centre_distance(16, -60, 1.0, ISO53A.pressure_angle, math.radians(20), x1 + x2)
    assert d["centre_distance"] == pytest.approx(expected, rel=1e-12)
    assert d["internal"] is True and [g["hand"] for g in d["gears"]] == ["right", "right"]
    found = {f["check"]: f["severity"] for f in d["findings"]}
    assert found["hands"] == "ok"


def test_internal_helix_zero_is_the_spur_internal_pair(capsys):
    args = ["pair", "16", "-60", "-m", "1", "--shift", "0.3", "0.1", "--backlash", "0.1", "--json"]
    _, spur, _ = run(capsys, *args)
    _, zero, _ = run(capsys, *args, "--helix", "0")
    spur, zero = json.loads(spur), json.loads(zero)
    assert {k: zero[k] for k in spur} == spur


@pytest.mark.parametrize("argv, words", [
    (["--helix", "20", "--herringbone"], "external pairs only"),
    (["--helix", "20", "--torque", "1", "--speed", "10"], "not available yet"),
])
def test_internal_helical_refusals(capsys, argv, words):
    code, out, err = run(capsys, "pair", "16", "-60", "-m", "1", *argv)
    assert code == 2 and out == "" and words in err
