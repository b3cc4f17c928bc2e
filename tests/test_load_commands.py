"""Load options on ``pair`` and ``build``: ratings reach the table, the JSON and the report; torque follows the train."""

import json

import pytest

from gearcad.cli import main


def test_pair_rating_in_json_and_exit_code(capsys):
    code = main(["pair", "20", "40", "-m", "1.5", "--torque", "0.5", "--speed", "100", "--face-width", "6", "--json"])
    data = json.loads(capsys.readouterr().out)
    assert code == 0
    r = data["rating"]
    # Torque balance without losses: gear 2 carries T z2 / z1 (statics).
    assert r["gears"][1]["torque"] == pytest.approx(0.5 * 40 / 20, rel=1e-12)
    # Tangential load on the reference circle W = 2000 T / d (N, N·m, mm): 2000 * 0.5 / 30.
    assert r["gears"][0]["tangential_load"] == pytest.approx(2000 * 0.5 / 30, rel=1e-12)
    assert {f["check"] for f in data["findings"]} >= {"bending gear 1", "bending gear 2", "contact"}
    # Ten times the torque: acetal's bending allowable is exceeded, a failure, exit 1.
    assert main(["pair", "20", "40", "-m", "1.5", "--torque", "5", "--speed", "100", "--face-width", "6"]) == 1
    assert "bending gear 1" in capsys.readouterr().out


@pytest.mark.parametrize("argv, needle", [
    (["--torque", "1"], "needs --speed"),
    (["--speed", "100"], "--speed needs --torque"),
    (["--torque", "-1", "--speed", "100"], "torque must be greater than 0"),
    (["--power", "0", "--speed", "100"], "power must be greater than 0"),
    (["--torque", "1", "--power", "5", "--speed", "100"], "not allowed with argument"),
    (["--torque", "1", "--speed", "100", "--material", "cheese"], "unknown material profile"),
])
def test_pair_load_input_errors(capsys, argv, needle):
    assert main(["pair", "20", "40", "-m", "1.5", *argv]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1


def test_build_rates_every_mesh_with_the_torque_carried_along(tmp_path, capsys):
    train = tmp_path / "t.toml"
    train.write_text('name = "t"\nmodule = 1.5\nthickness = 3\nfabrication = "fdm-pla-0.4mm"\n'
                     "[[stage]]\ndriver = 15\ndriven = 45\n[[stage]]\ndriver = 20\ndriven = 40\n")
    # a torque the gears carry: a build whose rating fails writes nothing (exit 1)
    assert main(["build", str(train), "--out", str(tmp_path / "o"), "--formats", "dxf", "--torque", "0.02",
                 "--speed", "300", "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    first, second = (m["rating"] for m in report["meshes"])
    assert first["gears"][0]["material"] == "pla"  # the fabrication profile's material
    # Shaft 1 turns 45/15 = 3 times slower and carries 3 times the torque (no losses).
    assert second["torque"] == pytest.approx(0.02 * 3, rel=1e-12)
    assert second["speed"] == pytest.approx(300 / 3, rel=1e-12)
    md = (tmp_path / "o" / "report.md").read_text()
    assert "Load rating (estimates for light duty)" in md
