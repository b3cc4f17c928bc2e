"""Benchmark (not a test): a train's worm wheel as fitted curves, its time, deviation, STEP size and faces.

Run: .venv/bin/python tests/benchmarks/bench_worm_train.py
Prints, per worm pair: the seconds for the fitted mid-plane outline (hob simulation of one tooth space and
the fit) and for the prism solid (the writers' path: B-spline edges, the kernel's checker and volume), the
fit's deviation from the generated section (µm), the spline's spans, the STEP's size and its face count;
then the whole camera-slider demo build (seconds, the wheel's and the assembly's STEP size and faces).

Measured on the camera-slider demo before the fit (the section as a polygon of planar faces, simplified to
half the tolerance): s1-wheel.step 5.81 MB with 5555 faces, assembly.step 7.99 MB with 5907 faces, the build
48.7 s; gmsh timed out on both and admesh fixed 96 normals of s1-wheel.stl.
"""

from __future__ import annotations

import contextlib
import io
import os
import tempfile
import time
from pathlib import Path

PAIRS = [  # (starts, wheel teeth, module mm, diameter factor, flank)
    (1, 30, 1.5, 10.0, "za"),
    (2, 40, 1.0, 12.0, "zi"),
    (1, 60, 3.0, 10.0, "za"),
    (1, 120, 0.5, 16.0, "za"),
    (1, 360, 0.5, 20.0, "za"),
]
TOLERANCE = 1e-3  # mm, the plan's


def _faces(path: Path) -> int:
    return path.read_text(encoding="ascii", errors="replace").count("ADVANCED_FACE(")


def main() -> None:
    from gearcad.export.step import write_step
    from gearcad.export.step_solid import build_solid
    from gearcad.geometry.shape import Part
    from gearcad.meshes.worm import make_worm_pair, thread_form
    from gearcad.trains.worm_wheel_outline import wheel_outline

    print(f"{'pair':>18} {'outline s':>9} {'solid s':>8} {'dev µm':>7} {'spans':>5} {'STEP MB':>8} {'faces':>6}")
    for z1, z2, m, q, flank in PAIRS:
        form = thread_form(make_worm_pair(z1, z2, m, diameter_factor=q, pressure_angle=20.0, flank=flank))
        start = time.perf_counter()
        outline = wheel_outline(form, TOLERANCE)
        t_outline = time.perf_counter() - start
        part = Part("wheel", outline.loop, (), ((0.0, 0.0, 3.0),), "", symmetry=z2)
        start = time.perf_counter()
        solid = build_solid(part, 3.0, TOLERANCE).solid
        t_solid = time.perf_counter() - start
        with tempfile.TemporaryDirectory() as folder:
            step = Path(write_step(solid, Path(folder) / "wheel.step"))
            size, faces = os.path.getsize(step) / 1e6, _faces(step)
        name = f"{z1}/{z2} m{m:g} q{q:g} {flank}"
        print(f"{name:>18} {t_outline:9.2f} {t_solid:8.2f} {outline.deviation * 1e3:7.3f} {outline.spans:5d} "
              f"{size:8.3f} {faces:6d}")
    from importlib.resources import files

    from gearcad.cli import main as gearcad_main

    with tempfile.TemporaryDirectory() as folder:
        demo = files("gearcad.demo").joinpath("camera-slider.toml")
        out = Path(folder) / "out"
        start = time.perf_counter()
        with contextlib.redirect_stdout(io.StringIO()):  # the build's own summary
            code = gearcad_main(["build", str(demo), "--out", str(out), "--json"])
        elapsed = time.perf_counter() - start
        print(f"camera-slider build: exit {code}, {elapsed:.1f} s")
        for name in ("s1-wheel.step", "assembly.step"):
            path = out / name
            print(f"  {name}: {os.path.getsize(path) / 1e6:.3f} MB, {_faces(path)} faces")


if __name__ == "__main__":
    main()
