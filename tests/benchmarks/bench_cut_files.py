"""Benchmark (not a test): spline fitting, marking placement and nesting times, and spline sizes.

Run: .venv/bin/python tests/benchmarks/bench_cut_files.py
Prints, per gear, the time to fit its B-spline outline, the control points written and the
largest distance from ezdxf's evaluation of the written spline to the outline sampled to
0.01 µm; then the time to place a marking and to nest the demo's parts.
"""

from __future__ import annotations

import time
import tracemalloc

import numpy as np


def spline_figures(teeth: int, module: float) -> None:
    import shapely

    from gearcad.export.cutting import part_drawing
    from gearcad.geometry.bspline import evaluate
    from gearcad.geometry.gear import SpurGear
    from gearcad.geometry.shape import Part, gear_loop

    gear = SpurGear.make(teeth, module)
    part = Part("g", gear_loop(gear, 1e-3), circles=((0.0, 0.0, 3.0),), symmetry=teeth)
    start = time.perf_counter()
    drawing = part_drawing(part, "splines", 1e-3)
    seconds = time.perf_counter() - start
    (piece,) = drawing.outer_splines[0]
    breaks = np.unique(piece.knots)
    u = (breaks[:-1, None] + np.linspace(0, 1, 64, endpoint=False) * np.diff(breaks)[:, None]).ravel()
    ring = shapely.LinearRing(gear_loop(gear, 1e-5).points())
    worst = shapely.distance(ring, shapely.points(evaluate(piece, u))).max()
    print(f"spline fit z={teeth:<3} m={module:<4g} {seconds:7.3f} s  {len(piece.control):6d} control points  "
          f"worst {worst * 1e3:.3f} µm")


def main() -> None:
    from gearcad.trains.stages import solve_train_spec
    from gearcad.trains.planner import plan_train
    from gearcad.export.sheets import flat_parts, plan_sheets
    from gearcad.export.cutting import part_drawing
    from importlib import resources
    from gearcad.trains.trainfile import parse_train

    for teeth, module in ((12, 1.0), (40, 1.0), (91, 1.0), (150, 0.5)):
        spline_figures(teeth, module)
    text = resources.files("gearcad.demo").joinpath("moon-phase.toml").read_text(encoding="utf-8")
    spec, _ = solve_train_spec(parse_train(text))
    plan = plan_train(spec)
    start = time.perf_counter()
    for fp in flat_parts(plan):
        part_drawing(fp.part, "segments", 1e-3, fp.label_at, fp.label_height)
    print(f"demo: 8 part drawings with marking placement  {time.perf_counter() - start:7.3f} s")
    for size in (None, (300.0, 200.0), (200.0, 130.0)):
        tracemalloc.start()
        start = time.perf_counter()
        groups = plan_sheets(plan, size)
        seconds = time.perf_counter() - start
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
        sheets = [s for g in groups for s in g.nesting.sheets]
        used = ", ".join(f"{100 * s.used:.1f} %" for s in sheets)
        print(f"demo nest on {size or 'profile sheet'}: {len(sheets)} sheet(s), used {used}; "
              f"{seconds:.3f} s, peak {peak / 2**20:.1f} MiB")


if __name__ == "__main__":
    main()
