"""Packaging: heavy CAD imports stay out of the light paths; the profiles travel with the package."""

import os
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent

LIGHT = """
import sys
import gearcad, gearcad.cli
from gearcad.cli import main
code = main(["pair", "20", "40", "-m", "3", "--json"])
assert code == 0, code
main(["profiles"])
heavy = sorted(m for m in sys.modules if m.split(".")[0] in ("cadquery", "OCP", "vtk", "vtkmodules"))
print("HEAVY", heavy, file=sys.stderr)
sys.exit(3 if heavy else 0)
"""


def test_the_light_paths_never_load_the_cad_kernel():
    # The cadquery import costs seconds and half a gigabyte: only the STEP/STL writers may pay it.
    result = subprocess.run([sys.executable, "-c", LIGHT], capture_output=True, text=True, cwd=ROOT)
    assert result.returncode == 0, result.stderr


def test_help_never_loads_the_cad_kernel():
    code = ("import sys\nfrom gearcad.cli import main\nmain(['--help'])\n"
            "sys.exit(3 if any(m.split('.')[0] in ('cadquery', 'OCP') for m in sys.modules) else 0)")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert result.returncode == 0, result.stderr


def test_every_package_is_listed_in_pyproject():
    listed = set(tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["packages"])
    found = {".".join(p.parent.relative_to(ROOT).parts) for p in (ROOT / "gearcad").rglob("__init__.py")}
    # Folders of data only: the demo's train files and each kind of profile (installed as gearcad.profile_data.*).
    data = {".".join(p.parent.relative_to(ROOT).parts) for p in (ROOT / "gearcad").rglob("*.toml")}
    data |= {"gearcad.profile_data." + p.parent.name for p in (ROOT / "profiles").rglob("*.toml")}
    assert found | data | {"gearcad.profile_data"} == listed


@pytest.mark.slow
def test_a_non_editable_install_carries_the_profiles(tmp_path):
    # pip builds a wheel from the tree and installs it without dependencies into a target folder;
    # a fresh interpreter that sees only that folder (and the venv's dependencies) loads a profile.
    target = tmp_path / "site"
    build = subprocess.run([sys.executable, "-m", "pip", "install", "--quiet", "--no-deps", "--no-build-isolation",
                            "--target", str(target), str(ROOT)], capture_output=True, text=True)
    assert build.returncode == 0, build.stderr[-2000:]
    tomls = sorted(p.name for p in (target / "gearcad" / "profile_data" / "tooth").glob("*.toml"))
    assert "iso53-a.toml" in tomls
    code = "import gearcad.profiles as p, sys; s = p.load_tooth_system('iso53-a'); print(p.__file__, s.dedendum)"
    env = dict(os.environ, PYTHONPATH=str(target))
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=tmp_path, env=env)
    assert result.returncode == 0, result.stderr
    assert str(target) in result.stdout and result.stdout.strip().endswith("1.25")


def test_every_public_name_resolves():
    import gearcad

    for name in gearcad.__all__:
        assert getattr(gearcad, name) is not None, name
