"""The build pipeline: every input checked before the first file, a folder replaced whole or not at all.

The facts checked are the project's own contracts (README, "Limits on input" and
"Output folders"): the references are the file system itself (names and bytes of
every file before and after) and the lock a second process sees.
"""

import hashlib
import math
import multiprocessing
import os
from pathlib import Path

import pytest

from gearcad.cli import main
from gearcad.errors import ExportError, InputError
from gearcad.export.staging import MARKER, folder_lock, staged_folder
from gearcad.inputfiles import MAX_INPUT_BYTES, MAX_NAME_LENGTH
from gearcad.trains.trainfile import MAX_FILE_STAGES, parse_train

GOOD = 'name = "one"\nmodule = 1\nthickness = 2\n[[stage]]\ndriver = 20\ndriven = 30\n'


def snapshot(folder: Path) -> dict[str, str]:
    """Every entry of ``folder`` (hidden ones too) with the SHA-256 of its bytes."""
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.iterdir())}


def siblings(folder: Path) -> list[str]:
    """Hidden entries beside ``folder`` that belong to its builds (staging folders, lock)."""
    return sorted(p.name for p in folder.parent.iterdir() if p.name.startswith(f".{folder.name}."))


def write_train(tmp_path: Path, text: str = GOOD, name: str = "train.toml") -> str:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


# -- a failure or an interrupt leaves the previous folder as it was --------------------------------

class Injected(RuntimeError):
    pass


def fail_after(monkeypatch, count: int, exc: type[BaseException] = Injected) -> list[str]:
    """Let the first ``count`` files of a build be written, then raise ``exc`` (the atomic writer is patched)."""
    import gearcad.export.atomic as atomic

    real = atomic.os.replace
    done: list[str] = []

    def replace(src, dst):
        real(src, dst)
        done.append(Path(dst).name)
        if len(done) == count:
            raise exc("injected failure")

    monkeypatch.setattr(atomic.os, "replace", replace)
    return done


@pytest.mark.parametrize("exc", [Injected, KeyboardInterrupt])
def test_a_failure_after_the_third_file_leaves_the_folder_unchanged(tmp_path, monkeypatch, capsys, exc):
    train = write_train(tmp_path)
    out = tmp_path / "o"
    assert main(["build", train, "--out", str(out), "--formats", "dxf,svg", "--no-assembly"]) == 0
    (out / "my-notes.txt").write_text("the user's own file")
    before = snapshot(out)
    # a different train into the same folder: its third file is written, then the build fails
    other = write_train(tmp_path, GOOD.replace("driven = 30", "driven = 45"), "other.toml")
    done = fail_after(monkeypatch, 3, exc)
    if exc is KeyboardInterrupt:  # the command line reports it: exit 130, one line
        assert main(["build", other, "--out", str(out), "--formats", "dxf,svg", "--no-assembly"]) == 130
        assert "nothing was put in place" in capsys.readouterr().err
    else:
        with pytest.raises(exc):
            main(["build", other, "--out", str(out), "--formats", "dxf,svg", "--no-assembly"])
    assert len(done) == 3
    assert snapshot(out) == before
    assert siblings(out) == []


def test_a_failed_first_build_leaves_no_folder(tmp_path, monkeypatch):
    from gearcad.export.bundle import BuildOptions, write_plan
    from gearcad.trains.planner import plan_train

    out = tmp_path / "new" / "deeper" / "o"
    fail_after(monkeypatch, 3)
    with pytest.raises(Injected):
        write_plan(plan_train(parse_train(GOOD)), out, BuildOptions(formats=("dxf", "svg"), preview=False))
    assert not (tmp_path / "new").exists()  # the folders made for it are gone again


def test_a_rebuild_keeps_user_files_and_drops_stale_ones(tmp_path):
    train = write_train(tmp_path)
    out = tmp_path / "o"
    assert main(["build", train, "--out", str(out), "--formats", "dxf,svg", "--no-assembly"]) == 0
    (out / "my-notes.txt").write_text("keep me")
    assert main(["build", train, "--out", str(out), "--formats", "dxf", "--no-assembly"]) == 0
    names = set(p.name for p in out.iterdir())
    assert "my-notes.txt" in names and not any(n.endswith(".svg") for n in names)
    listed = (out / MARKER).read_text().split()
    assert "my-notes.txt" not in listed and set(listed) == names - {"my-notes.txt", MARKER}
    assert (out / "my-notes.txt").read_text() == "keep me"
    assert siblings(out) == []


def test_a_forced_build_keeps_the_foreign_folder_content(tmp_path):
    out = tmp_path / "mine"
    (out / "sub").mkdir(parents=True)
    (out / "sub" / "a.txt").write_text("a")
    (out / "b.txt").write_text("b")
    assert main(["build", write_train(tmp_path), "--out", str(out), "--formats", "dxf", "--force"]) == 0
    assert (out / "sub" / "a.txt").read_text() == "a" and (out / "b.txt").read_text() == "b"
    assert (out / "s1-driver.dxf").is_file()


def _hold_lock(folder: str, ready, release) -> None:
    with folder_lock(Path(folder)):
        ready.set()
        release.wait(30)


def test_a_second_build_of_a_folder_being_written_is_refused(tmp_path, capsys):
    out = tmp_path / "o"
    ctx = multiprocessing.get_context("fork")
    ready, release = ctx.Event(), ctx.Event()
    holder = ctx.Process(target=_hold_lock, args=(str(out), ready, release))
    holder.start()
    try:
        assert ready.wait(30)
        assert main(["build", write_train(tmp_path), "--out", str(out), "--formats", "dxf"]) == 2
        err = capsys.readouterr().err
        assert "being written by another gearcad build" in err and len(err.strip().splitlines()) == 1
        assert not out.exists()
    finally:
        release.set()
        holder.join(30)
    # the lock is gone with its holder; the build now runs
    assert main(["build", write_train(tmp_path), "--out", str(out), "--formats", "dxf"]) == 0
    assert siblings(out) == []


def test_a_killed_build_leaves_no_lock_that_blocks_the_next(tmp_path):
    out = tmp_path / "o"
    ctx = multiprocessing.get_context("fork")
    ready, release = ctx.Event(), ctx.Event()
    holder = ctx.Process(target=_hold_lock, args=(str(out), ready, release))
    holder.start()
    assert ready.wait(30)
    holder.kill()
    holder.join(30)
    (tmp_path / ".o.gearcad-staging-1-dead").mkdir()  # what a killed build leaves
    with staged_folder(out) as stage:
        stage.file("x.txt").write_text("x")
    assert snapshot(out).keys() == {"x.txt", MARKER}
    assert siblings(out) == []


def test_staged_names_must_be_plain(tmp_path):
    with pytest.raises(ExportError):
        with staged_folder(tmp_path / "o") as stage:
            stage.file("../escape.txt")
    assert not (tmp_path / "o").exists()


# -- every table checked before any work; contradictions refused ---------------------------------

@pytest.mark.parametrize("text, needle", [
    (GOOD + '[solve]\nratio = "1/3"\n', "not both"),
    (GOOD + "[planetary]\nsun = 20\nplanet = 16\nring = 52\n", "remove the [[stage]] tables"),
    ('name = "p"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/3"\n[planetary]\nsun = 20\nplanet = 16\nring = 52\n',
     "cannot stand beside [planetary]"),
    ('name = "p"\nmodule = 1\nthickness = 2\ncoaxial = true\n[planetary]\nsun = 20\nplanet = 16\nring = 52\n',
     "coaxial by its nature"),
    ('name = "s"\nmodule = 1\nthickness = 2\ncoaxial = true\n[solve]\nratio = "1/9"\ncoaxial = false\n',
     "give it once"),
    ('name = "s"\nmodule = 1\nthickness = 2\ntarget = "1/8"\n[solve]\nratio = "1/9"\n', "give the ratio once"),
    # [solve] values the command line refuses
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\nstages = 9\n', "stages must be from 1 to 4"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\nmin_teeth = 2\n', "min teeth must be from 4"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\nmin_teeth = 90\nmax_teeth = 20\n',
     "more than max teeth"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\ndirection = "sideways"\n', "'same' or 'opposite'"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\nmax_stage_ratio = 0.5\n', "max_stage_ratio"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "one ninth"\n', "solve.ratio"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\ncoaxial = true\nstages = 3\n', "2 or 4 stages"),
    ('name = "s"\nmodule = 1\nthickness = 2\n[solve]\nratio = "1/9"\ncoaxial = true\ndirection = "opposite"\n',
     "coaxial train"),
])
def test_contradicting_or_refused_tables_are_one_line_errors(tmp_path, capsys, text, needle):
    out = tmp_path / "o"
    assert main(["build", write_train(tmp_path, text), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err, err
    assert not out.exists() and siblings(out) == []


def test_a_top_level_coaxial_reaches_the_solver():
    spec = parse_train('name = "s"\nmodule = 1\nthickness = 2\ncoaxial = true\n[solve]\nratio = "1/9"\n')
    assert spec.solver.coaxial


# -- sizes and magnitudes bounded -----------------------------------------------------------------

def stages(n: int) -> str:
    return 'name = "many"\nmodule = 1\nthickness = 2\n' + "[[stage]]\ndriver = 20\ndriven = 30\n" * n


@pytest.mark.parametrize("make, needle", [
    (lambda: GOOD.replace('name = "one"', 'name = "one"\ntitle = "' + "x" * 100_000 + '"'), "kB allowed"),
    (lambda: GOOD.replace('name = "one"', 'name = "one"\ntitle = "' + "x" * 300 + '"'), "at most 200 characters"),
    (lambda: stages(200_000), "kB allowed"),
    (lambda: stages(MAX_FILE_STAGES + 1), f"at most {MAX_FILE_STAGES} [[stage]] tables"),
    (lambda: GOOD + "x = " + "[" * 5000 + "]" * 5000 + "\n", "nested deeper"),
    (lambda: GOOD + "x = " + "[" * 20 + "]" * 20 + "\n", "nested deeper"),
    (lambda: GOOD.replace('"one"', '"' + "n" * (MAX_NAME_LENGTH + 1) + '"'), "plain file name"),
    (lambda: GOOD.replace('"one"', '"a\\u0000b"'), "printable"),
    (lambda: GOOD.replace('"one"', '"tab\\there"'), "printable"),
    (lambda: GOOD.replace('"one"', '"con"'), "device name"),
    (lambda: GOOD.replace('"one"', '"trailing."'), "plain file name"),
    (lambda: GOOD.replace("driver = 20", "driver = 99999999999999999999999999999999"), "tooth count must be from 3"),
    (lambda: GOOD.replace("module = 1", "module = 1e308"), "module: must be from"),
    (lambda: GOOD.replace("module = 1", "module = 1e-300"), "module: must be from"),
    (lambda: GOOD.replace("module = 1", "module = inf"), "finite"),
    (lambda: GOOD.replace("module = 1", "module = nan"), "finite"),
    (lambda: GOOD.replace("thickness = 2", "thickness = 1e9"), "thickness: must be from"),
    (lambda: GOOD.replace("driver = 20", "driver = { teeth = 20, shift = 1e300 }"), "shift: must be from"),
    (lambda: GOOD.replace("driven = 30", "driven = { teeth = 30, hub = { diameter = 10, length = 1e12 } }"),
     "hub.length: must be from"),
    (lambda: "module = 2\n" + GOOD, "TOML syntax error"),
])
def test_oversized_and_edge_inputs_are_refused(tmp_path, capsys, make, needle):
    out = tmp_path / "o"
    assert main(["build", write_train(tmp_path, make()), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err, err[:500]
    assert len(err) < 600 and not out.exists()


@pytest.mark.parametrize("data, needle", [
    (GOOD.encode("utf-16"), "UTF-16 text"),
    (GOOD.replace("one", "caf\u00e9").encode("latin-1"), "not UTF-8"),
    (b"\x00\x01\x02\x03" * 100, "not a text file"),
    (bytes(range(256)) * 4, "not a text file"),
])
def test_train_files_in_other_encodings_or_binary_are_refused(tmp_path, capsys, data, needle):
    path = tmp_path / "t.toml"
    path.write_bytes(data)
    assert main(["build", str(path), "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err


def test_a_utf8_byte_order_mark_is_accepted():
    from gearcad.inputfiles import decode_text

    assert decode_text(b"\xef\xbb\xbf" + GOOD.encode(), "x", InputError) == GOOD


@pytest.mark.parametrize("data, needle", [
    (b"\xff\xfe" + 'title = "x"'.encode("utf-16-le"), "UTF-16"),
    (b"\x7fELF\x02\x01\x01\x00" * 64, "not a text file"),
    (b"# " + b"x" * (MAX_INPUT_BYTES + 10), "kB allowed"),
    ('title = "x"\n'.encode() + b"a = " + b"[" * 3000 + b"]" * 3000, "nested deeper"),
])
def test_profiles_in_other_encodings_binary_or_oversized_are_refused(tmp_path, capsys, data, needle):
    profile = tmp_path / "fab.toml"
    profile.write_bytes(data)
    train = write_train(tmp_path, GOOD.replace("module = 1", f'module = 1\nfabrication = "{profile}"'))
    assert main(["build", train, "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err


def test_material_profile_binary_is_refused(tmp_path, capsys):
    from gearcad.errors import ProfileError
    from gearcad.materials import load_material

    path = tmp_path / "m.toml"
    path.write_bytes(b"\x00" * 10)
    with pytest.raises(ProfileError, match="not a text file"):
        load_material(str(path))


def test_a_folder_given_as_train_file_is_refused(tmp_path, capsys):
    assert main(["build", str(tmp_path), "--out", str(tmp_path / "o")]) == 2
    assert "is a folder" in capsys.readouterr().err


def test_the_lock_file_is_beside_the_folder(tmp_path):
    with folder_lock(tmp_path / "o"):
        assert (tmp_path / ".o.gearcad-lock").read_text().strip() == str(os.getpid())
        with pytest.raises(ExportError, match="another gearcad build"):
            with folder_lock(tmp_path / "o"):
                pass
    assert not (tmp_path / ".o.gearcad-lock").exists()


# -- a part the process cannot make is a failure: exit 1, nothing built -----------------------

def cnc_train(module: float, fabrication: str = "cnc-2mm-endmill") -> str:
    return (f'name = "cnc"\nmodule = {module}\nthickness = 2\nfabrication = "{fabrication}"\n'
            "[[stage]]\ndriver = 20\ndriven = 30\n")


def test_an_end_mill_wider_than_the_tooth_space_fails_and_builds_nothing(tmp_path, capsys):
    out = tmp_path / "o"
    assert main(["build", write_train(tmp_path, cnc_train(0.5)), "--out", str(out)]) == 1
    captured = capsys.readouterr()
    assert "the 2 mm end mill" in captured.out and "the flanks cannot be cut" in captured.out
    assert "nothing was written" in captured.err and len(captured.err.strip().splitlines()) == 1
    assert not out.exists() and siblings(out) == []


def test_the_tool_reach_against_shapely_and_the_space_width():
    # The largest mill that reaches the form circle touches the flanks: shapely's distance from its
    # centre to the gear polygon equals its radius; and it is narrower than the tooth space at the
    # tip circle (pi d_a / z - s_a, ISO 21771's tip thickness), the widest the space gets.
    from shapely.geometry import Point, Polygon

    from gearcad.meshes.outline_checks import largest_tool, space_direction, tool_reach
    from gearcad.geometry.generate import tooth_profile
    from gearcad.trains.planner import plan_train

    plan = plan_train(parse_train(cnc_train(0.5, "laser-3mm-acrylic")))
    for gear in plan.gears:
        points = gear.part.outer.points()
        g = gear.gear
        form = tooth_profile(g, tolerance=1e-3).form_diameter / 2
        biggest = largest_tool(points, form)
        centre = space_direction(points) * (form + biggest)
        polygon = Polygon(points)
        assert not polygon.contains(Point(centre))
        assert polygon.distance(Point(centre)) == pytest.approx(biggest, abs=2e-3)
        assert 2 * biggest < math.pi * g.tip_diameter / g.teeth - g.tip_thickness
        assert tool_reach(points, 1.0) > form  # a 2 mm mill does not reach (module 0.5: spaces under 0.8 mm)
        assert tool_reach(points, biggest * 0.999) <= form + 1e-6 < tool_reach(points, biggest * 1.01)


def test_a_tip_thinner_than_the_process_holds_fails(tmp_path, capsys):
    # 12 teeth at shift +0.6: tip about 0.2 m before thinning (ISO 21771 tip thickness), under 0.4 mm at m 1.
    text = ('name = "thin"\nmodule = 1\nthickness = 2\nfabrication = "fdm-pla-0.4mm"\n'
            "[[stage]]\ndriver = { teeth = 12, shift = 0.6 }\ndriven = 40\n")
    out = tmp_path / "o"
    assert main(["build", write_train(tmp_path, text), "--out", str(out)]) == 1
    assert "thinner than the 0.4 mm the fdm process holds" in capsys.readouterr().out
    assert not out.exists()
