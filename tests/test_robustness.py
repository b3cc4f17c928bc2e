"""Every bad input refused cleanly: one line naming the value and what is allowed, exit 2, nothing written.

A table of bad inputs across every command, train file and profile; an interrupted build
leaves no partial file; the same train file gives byte-identical DXF and report.json.
"""

import hashlib
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from gearcad.cli import main

GOOD_TRAIN = 'name = "t"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n'


def train_file(tmp_path, text):
    path = tmp_path / "train.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def profile_file(tmp_path, text):
    path = tmp_path / "custom.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


BAD_TOOTH_PROFILE = ('title = "x"\n[pressure_angle]\nvalue = 20\nunit = "degree"\nsource = "s"\n'
                     '[addendum]\nvalue = 1\nunit = "module"\nsource = "s"\n')

# (argv builder, the words the one-line error must contain)
CASES = [
    # pair: tooth counts
    (lambda p: ["pair", "0", "20", "-m", "1"], "tooth count must be from 3"),
    (lambda p: ["pair", "-5", "20", "-m", "1"], "tooth count z1 must be positive"),
    (lambda p: ["pair", "20", "-15", "-m", "1"], "ring"),
    (lambda p: ["pair", "12.5", "20", "-m", "1"], "whole number"),
    (lambda p: ["pair", "1e9", "20", "-m", "1"], "whole number"),
    (lambda p: ["pair", "20", "20000", "-m", "1"], "tooth count must be from 3 to 10000"),
    (lambda p: ["pair", "twelve", "20", "-m", "1"], "whole number"),
    # pair: module, angle, shifts, centre
    (lambda p: ["pair", "12", "20", "-m", "0"], "module must be greater than 0"),
    (lambda p: ["pair", "12", "20", "-m", "-1"], "module must be greater than 0"),
    (lambda p: ["pair", "12", "20", "-m", "500"], "module must be from"),
    (lambda p: ["pair", "12", "20", "-m", "inf"], "finite"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--pressure-angle", "5"], "pressure angle must be from 10 to 35"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--pressure-angle", "40"], "pressure angle must be from 10 to 35"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--shift", "3.9", "0"], "pointed"),
    (lambda p: ["pair", "5", "20", "-m", "1", "--shift", "-1.5", "0"], "root diameter"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--shift", "9", "0"], "profile shift must be from"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--centre", "5"], "cannot be reached"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--centre", "-16"], "cannot be reached"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--system", "nope"], "unknown tooth profile"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--system", profile_file(p, BAD_TOOTH_PROFILE)], "missing key 'dedendum'"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--system", str(p / "absent.toml")], "does not exist"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--backlash", "-1"], "backlash"),
    (lambda p: ["pair", "12", "20", "-m", "1", "--typo"], "unrecognized arguments"),
    # ratio: targets, limits, inventories
    (lambda p: ["ratio", "0"], "target"),
    (lambda p: ["ratio", "-3"], "target"),
    (lambda p: ["ratio", "sqrt(-2)"], "target"),
    (lambda p: ["ratio", "2*/3"], "target"),
    (lambda p: ["ratio", "__import__('os')"], "target"),
    (lambda p: ["ratio", "1/0"], "target"),
    (lambda p: ["ratio", "2", "--min-teeth", "40", "--max-teeth", "20"], "min teeth"),
    (lambda p: ["ratio", "2", "--stages", "0"], "stages"),
    (lambda p: ["ratio", "2", "--stages", "5"], "stages"),
    (lambda p: ["ratio", "2", "--max-stage-ratio", "1"], "max stage ratio must be greater than 1"),
    (lambda p: ["ratio", "2", "--max-stage-ratio", "0.5"], "max stage ratio must be greater than 1"),
    (lambda p: ["ratio", "2", "--inventory", ""], "inventory"),
    (lambda p: ["ratio", "2", "--inventory", "20,abc"], "inventory"),
    (lambda p: ["ratio", "2", "--inventory", "20x0"], "inventory"),
    # build: train files
    (lambda p: ["build", train_file(p, GOOD_TRAIN + "speed = 3\n")], "unknown key"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace("[[stage]]", "[[stage]"))], "TOML syntax error"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace("module = 1", 'module = "one"'))], "must be a number"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace("thickness = 2", "thickness = -1"))], "thickness"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace("driver = 20", "driver = 20.5"))], "tooth count"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace("driver = 20", "driver = { teeth = 20, bore = 40 }"))],
     "too large"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN + 'fabrication = "plasma"\n')], "unknown key"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace("module = 1", 'module = 1\nfabrication = "plasma"'))],
     "unknown fabrication profile"),
    (lambda p: ["build", train_file(p, 'name = "t"\nmodule = 1\nthickness = 2\n')], "at least one [[stage]]"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN.replace('name = "t"', 'name = "../evil"'))], "plain file name"),
    (lambda p: ["build", str(p / "missing.toml")], "does not exist"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN), "--formats", "dwg"], "--formats"),
    (lambda p: ["build", train_file(p, GOOD_TRAIN), "--dxf-tolerance", "0"], "--dxf-tolerance"),
    # design
    (lambda p: ["design", "abc", "--module", "1"], "target"),
    (lambda p: ["design", "2", "--module", "1", "--thickness", "0"], "thickness"),
]


@pytest.mark.parametrize("make_argv, needle", CASES)
def test_bad_input_gives_one_line_exit_2_and_writes_nothing(tmp_path, capsys, make_argv, needle):
    argv = make_argv(tmp_path)
    if argv[0] in ("build", "design"):
        argv += ["--out", str(tmp_path / "out")]
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 2, (argv, out, err)
    assert needle in err, err
    assert len(err.strip().splitlines()) == 1, err
    assert "Traceback" not in err and out == ""
    assert not (tmp_path / "out").exists()


def test_there_are_at_least_forty_cases():
    assert len(CASES) >= 40


def test_a_foreign_output_folder_is_refused(tmp_path, capsys):
    foreign = tmp_path / "out"
    foreign.mkdir()
    (foreign / "notes.txt").write_text("mine")
    assert main(["build", train_file(tmp_path, GOOD_TRAIN), "--out", str(foreign)]) == 2
    assert "not made by gearcad" in capsys.readouterr().err
    assert [p.name for p in foreign.iterdir()] == ["notes.txt"]


def digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_the_same_train_gives_byte_identical_dxf_and_report(tmp_path):
    # Two runs in separate processes (different hash seeds), same input: same bytes.
    train = train_file(tmp_path, GOOD_TRAIN)
    sums = []
    for seed, out in (("1", "a"), ("2", "b")):
        env = dict(os.environ, PYTHONHASHSEED=seed)
        subprocess.run([sys.executable, "-m", "gearcad", "build", train, "--out", str(tmp_path / out),
                        "--formats", "dxf,svg"], check=True, capture_output=True, env=env)
        sums.append({name: digest(tmp_path / out / name)
                     for name in ("s1-driver.dxf", "s1-driven.dxf", "back-plate.dxf", "report.json", "s1-driver.svg")})
    assert sums[0] == sums[1]


@pytest.mark.slow
def test_an_interrupted_build_leaves_nothing(tmp_path):
    # SIGINT while the files are being written (into the staging folder beside the output folder):
    # no output folder appears, no staging folder or lock file remains, and the build can run again.
    train = train_file(tmp_path, GOOD_TRAIN.replace("driven = 30", "driven = 90") +
                       "\n[[stage]]\ndriver = 20\ndriven = 95\n")
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "gearcad", "build", train, "--out", str(out)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline and not any(tmp_path.glob(".out.gearcad-staging-*/*.dxf")):
        time.sleep(0.05)
    time.sleep(0.5)
    proc.send_signal(signal.SIGINT)
    _, err = proc.communicate(timeout=120)
    assert proc.returncode in (130, 0), err
    if proc.returncode == 130:
        assert "interrupted" in err and "Traceback" not in err
        assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith(".out")) == []
    again = subprocess.run([sys.executable, "-m", "gearcad", "build", train, "--out", str(out), "--formats", "dxf"],
                           capture_output=True, text=True)
    assert again.returncode == 0, again.stderr
    import ezdxf

    for dxf in out.glob("*.dxf"):  # every file is whole: ezdxf reads it and its audit is clean
        assert not ezdxf.readfile(dxf).audit().has_errors


from fractions import Fraction  # noqa: E402

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=15, deadline=None)
@given(value=st.floats(0.05, 20), stages=st.integers(1, 3), hunting=st.booleans())
def test_every_solver_result_is_exactly_the_product_of_its_stages(value, stages, hunting):
    # Arithmetic fact: ratio = prod(driver) / prod(driven), reduced; the error is ratio / target - 1.
    from gearcad.ratio import RatioQuery, make_limits, parse_target, solve_ratio

    target = parse_target(repr(round(value, 6)))
    trains = solve_ratio(RatioQuery(target, (stages,), make_limits(10, 40, 6, hunting), 3))
    for t in trains:
        exact = Fraction(1)
        for driver, driven in t.stages:
            exact *= Fraction(driver, driven)
        assert Fraction(t.numerator, t.denominator) == exact
        assert t.relative_error == pytest.approx(float(exact / target.approx - 1), rel=1e-9, abs=1e-15)


def _pointed_shift(teeth: int) -> float:
    """The profile shift at which the tip thickness reaches 0 (bisection on ISO 21771's tip thickness)."""
    from gearcad.geometry.gear import SpurGear

    lo, hi = -0.5, 3.9
    for _ in range(60):
        mid = (lo + hi) / 2
        try:
            SpurGear.make(teeth, 1.0, shift=mid)
            lo = mid
        except Exception:
            hi = mid
    return lo


@settings(max_examples=12, deadline=None)
@given(teeth=st.integers(6, 120))
def test_just_inside_the_domain_valid_geometry_just_outside_an_error(teeth):
    # Reference for validity: shapely (GEOS) is_valid on the outline polygon.
    import shapely

    from gearcad.errors import GearcadError
    from gearcad.geometry import SpurGear, outline

    x = _pointed_shift(teeth)
    inside = SpurGear.make(teeth, 1.0, shift=x - 0.02)
    assert shapely.Polygon(outline(inside)).is_valid
    with pytest.raises(GearcadError):
        SpurGear.make(teeth, 1.0, shift=x + 0.02)
