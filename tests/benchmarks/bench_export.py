"""Benchmark (not a test): the demo, a 3-stage design, and per-gear DXF and STEP times.

Run: .venv/bin/python tests/benchmarks/bench_export.py
Targets (issue): demo within 10 s, DXF within 20 ms a gear, STEP within 0.5 s a gear, on the
project's 2-core machine, Python start-up excluded (every module is imported before timing).
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path


def warm_imports() -> None:
    """Import everything the runs use, so that start-up is not timed."""
    import cadquery  # noqa: F401
    import ezdxf  # noqa: F401
    import matplotlib.pyplot  # noqa: F401
    import sympy  # noqa: F401

    import gearcad.cli.build  # noqa: F401
    import gearcad.export.step  # noqa: F401


def timed(label: str, fn) -> float:
    start = time.perf_counter()
    fn()
    seconds = time.perf_counter() - start
    print(f"{label:<44} {seconds:8.2f} s")
    return seconds


def per_gear(teeth: int) -> None:
    from gearcad.drawings import part_drawing
    from gearcad.export.dxf import write_dxf
    from gearcad.export.step import build_solid, write_step
    from gearcad.geometry import SpurGear
    from gearcad.geometry.shape import Part, gear_loop

    gear = SpurGear.make(teeth, 1.0)
    part = Part("g", gear_loop(gear), circles=((0.0, 0.0, 3.1),), label=f"z{teeth}", symmetry=teeth)
    with tempfile.TemporaryDirectory() as tmp:
        start = time.perf_counter()
        write_dxf(part_drawing(part), Path(tmp) / "g.dxf")
        dxf = time.perf_counter() - start
        start = time.perf_counter()
        write_step(build_solid(part, 3.0, 1e-3).solid, Path(tmp) / "g.step")
        step = time.perf_counter() - start
    print(f"  z = {teeth:3d}: DXF (arcs) {dxf * 1e3:7.1f} ms   STEP {step:6.2f} s")


def main() -> None:
    from gearcad.cli import main as cli

    warm_imports()
    with tempfile.TemporaryDirectory() as tmp:
        timed("demo (all files, 6 gears, 2 plates, assembly)", lambda: cli(["demo", "--out", f"{tmp}/demo"]))
        timed("demo, DXF and SVG only", lambda: cli(["demo", "--out", f"{tmp}/d2", "--formats", "dxf,svg"]))
        if "design" in __import__("gearcad.cli", fromlist=["COMMANDS"]).COMMANDS:
            timed("design 366.2422/365.2422, 3 stages, all files",
                  lambda: cli(["design", "366.2422/365.2422", "--stages", "3", "--module", "1", "--out", f"{tmp}/sid"]))
    print("per gear (module 1):")
    for teeth in (12, 40, 100):
        per_gear(teeth)


if __name__ == "__main__":
    main()
