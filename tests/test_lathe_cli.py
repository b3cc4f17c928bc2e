"""``gearcad lathe``: the JSON contract, the other forms, the sheet, missing gears and bad input.

Sources: the JSON keys are the command's contract (issue 16); the exact ratio of a metric pitch
on an 8 TPI leadscrew is p / (25.4/8) with 25.4 = 127/5 (definition of the inch); SVG is read
back with the standard library's XML parser; a PDF file starts with "%PDF-" (ISO 32000-1, 7.5.2).
"""

from __future__ import annotations

import csv
import io
import json
import subprocess
import sys
import xml.etree.ElementTree as ET
from fractions import Fraction
from pathlib import Path

import pytest

from gearcad.cli import main

BENCH = Path(__file__).resolve().parent.parent / "profiles" / "lathes" / "bench-8tpi.toml"


def run(capsys, *argv):
    code = main(["lathe", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_json_contract(capsys):
    code, out, err = run(capsys, "bench-8tpi", "--threads", "1.5,11tpi,1mod", "--json")
    assert code == 0, err
    data = json.loads(out)
    machine = data["machine"]
    assert {"name", "leadscrew_pitch_mm", "module", "stud_to_leadscrew", "slot"} <= set(machine)
    assert machine["leadscrew_pitch_mm"] == pytest.approx(25.4 / 8) and machine["slot"] == [50.0, 145.0]
    assert len(data["threads"]) == 3
    for thread in data["threads"]:
        assert {"name", "pitch_mm", "train", "ratio", "relative_error", "fits", "frame"} <= set(thread)
        assert {"stud", "intermediate", "leadscrew"} <= set(thread["train"])
        assert {"slot_position", "angle"} <= set(thread["frame"])
        assert thread["fits"] is True
        assert len(thread["train"]["intermediate"]) in (1, 2)
    first = data["threads"][0]
    t = first["train"]
    ratio = Fraction(t["stud"], t["leadscrew"])
    if len(t["intermediate"]) == 2:
        ratio *= Fraction(t["intermediate"][1], t["intermediate"][0])
    assert ratio == Fraction(3, 2) / (Fraction(127, 5) / 8)  # exact: p / (25.4/8)
    assert first["ratio"] == pytest.approx(float(ratio)) and first["relative_error"] == 0.0
    assert data["threads"][2]["relative_error"] != 0.0 and data["threads"][2]["error_um_per_25mm"] == \
        pytest.approx(data["threads"][2]["relative_error"] * 25000)


def test_text_markdown_and_csv(capsys):
    code, out, _ = run(capsys, "bench-8tpi", "--threads", "M10,bsw")
    assert code == 0 and "Stud" in out and "idler" in out and "Caution" in out
    code, out, _ = run(capsys, "bench-8tpi", "--threads", "M10,11tpi", "--markdown")
    assert code == 0 and out.count("\n|") >= 3
    code, out, _ = run(capsys, "bench-8tpi", "--threads", "M10,11tpi", "--csv")
    rows = list(csv.DictReader(io.StringIO(out)))
    assert code == 0 and [r["thread"] for r in rows] == ["1.5 mm (M10)", "11 TPI"]
    assert rows[0]["leadscrew"] == "127" and rows[0]["fits"] == "True"


def test_svg_and_pdf_sheets(capsys, tmp_path):
    svg, pdf = tmp_path / "sheet.svg", tmp_path / "sheet.pdf"
    code, _, err = run(capsys, "bench-8tpi", "--threads", "iso-coarse", "--sheet", str(svg))
    assert code == 0, err
    root = ET.parse(svg).getroot()
    assert root.get("width") == "210mm" and root.get("height") == "297mm"  # A4, ISO 216
    texts = [t.text for t in root.iter("{http://www.w3.org/2000/svg}text")]
    assert "1.5 mm (M10)" in texts and any("Caution" in (t or "") for t in texts)
    code, _, err = run(capsys, "metric-3mm", "--threads", "unc", "--sheet", str(pdf))
    assert code == 0, err
    assert pdf.read_bytes().startswith(b"%PDF-")


def test_a_long_table_spreads_over_pages(capsys, tmp_path):
    svg = tmp_path / "long.svg"
    code, _, err = run(capsys, "metric-3mm", "--threads", "iso-coarse,iso-fine,unc,unf", "--sheet", str(svg),
                       "--tolerance", "0.01")
    assert code == 0, err
    assert svg.exists() and (tmp_path / "long-2.svg").exists()


def test_the_reverse_query(capsys):
    code, out, _ = run(capsys, "bench-8tpi", "--can-cut", "bsp", "--json")
    data = json.loads(out)
    assert code == 0
    assert [t["name"] for t in data["not_cut"]] == ["19 TPI (G1/4, G3/8 BSP)"]
    assert all(t["relative_error"] == 0.0 for t in data["threads"])


def test_outside_tolerance_writes_nothing(capsys, tmp_path):
    sheet = tmp_path / "s.svg"
    code, out, err = run(capsys, "bench-8tpi", "--threads", "19tpi", "--sheet", str(sheet))
    assert code == 1 and "19 TPI" in out and "no file written" in err
    assert not sheet.exists()


def test_missing_gear_files(capsys, tmp_path):
    code, _, err = run(capsys, "bench-8tpi", "--threads", "19tpi", "--build-missing", str(tmp_path / "gears"),
                       "--formats", "dxf,svg")
    assert code == 0, err
    folders = sorted(p.name for p in (tmp_path / "gears").iterdir())
    assert len(folders) == 1 and int(folders[0].split("-")[1]) % 19 == 0
    folder = tmp_path / "gears" / folders[0]
    report = json.loads((folder / "report.json").read_text())
    gear = report["gears"][0]  # the missing gear: the machine's module, bore and face width
    assert (gear["teeth"], gear["module"], gear["bore"], gear["thickness"]) == (int(folders[0][5:]), 1.5, 12.0, 8.0)
    assert gear["reference_diameter"] == pytest.approx(1.5 * gear["teeth"])  # d = m z (ISO 21771)
    assert (folder / "s1-driver.dxf").exists() and (folder / "train.toml").exists()


@pytest.mark.parametrize("argv, words", [
    (["bench-8tpi", "--threads", "1.5furlong"], "unknown unit"),
    (["bench-8tpi", "--threads", "100mm"], "out of reach"),
    (["bench-8tpi", "--threads", "1.5", "--tolerance", "2"], "--tolerance"),
    (["no-such-lathe", "--threads", "1.5"], "unknown machine"),
    (["bench-8tpi"], "--threads"),
    (["bench-8tpi", "--threads", "1.5", "--sheet", "x.png"], ".svg or .pdf"),
])
def test_bad_input_is_one_line_and_writes_nothing(capsys, tmp_path, monkeypatch, argv, words):
    monkeypatch.chdir(tmp_path)
    code, out, err = run(capsys, *argv, *([] if "--sheet" in argv else ["--sheet", "s.svg"]))
    assert code == 2 and words in err and err.count("\n") == 1 and not out
    assert list(tmp_path.iterdir()) == []


def test_a_slot_shorter_than_zero_is_refused(capsys, tmp_path):
    machine = tmp_path / "short.toml"
    machine.write_text(BENCH.read_text().replace("farthest = 145.0", "farthest = 49.9"))
    code, _, err = run(capsys, str(machine), "--threads", "1.5", "--sheet", str(tmp_path / "s.svg"))
    assert code == 2 and "slot" in err and err.count("\n") == 1
    assert not (tmp_path / "s.svg").exists()


def test_listings_and_help(capsys):
    code, out, _ = run(capsys, "--machines")
    assert code == 0 and "bench-8tpi" in out and "metric-3mm" in out
    code, out, _ = run(capsys, "--series")
    assert code == 0 and "iso-coarse" in out and "ISO 261" in out
    code, out, _ = run(capsys, "--help")
    assert code == 0 and "swing frame" in out


def test_the_table_never_loads_the_cad_kernel():
    code = ("import sys\nfrom gearcad.cli import main\n"
            "assert main(['lathe', 'bench-8tpi', '--threads', 'iso-coarse', '--json']) == 0\n"
            "sys.exit(3 if any(m.split('.')[0] in ('cadquery', 'OCP') for m in sys.modules) else 0)")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert result.returncode == 0, result.stderr[-500:]
