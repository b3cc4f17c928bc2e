"""Benchmark of summing trains (a script; pytest does not collect it).

Run:  .venv/bin/python tests/benchmarks/bench_summing.py

Prints the time of the summing search over 12-100 teeth for both differentials, with the one-axle
rules (the default) and without them (--separate-axes), the error reached, and the time to plan and
write (DXF only) a spur-differential train.
"""

from __future__ import annotations

import pathlib
import sys
import tempfile
import time

HERE = pathlib.Path(__file__).resolve()
sys.path.insert(0, str(HERE.parents[2]))

TARGETS = ("127/200", "1/131", "29.530588853/100")

TRAIN = """name = "bench-sum"
module = 1.0
thickness = 3.0
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


def main() -> None:
    from gearcad.export.bundle import BuildOptions, write_plan
    from gearcad.trains.planner import plan_train
    from gearcad.ratio import parse_target
    from gearcad.ratio.summing import solve_summing
    from gearcad.trains.trainfile import parse_train

    teeth = list(range(12, 101))
    print(f"{'differential':<14}{'rules':<16}{'target':<20}{'time s':>8}  {'best error':>11}")
    for kind, planets in (("mean", 3), ("planetary", 3)):
        for one_axis in (True, False):
            for expression in TARGETS:
                start = time.perf_counter()
                best = solve_summing(parse_target(expression), teeth, kind, 3, planets=planets, one_axis=one_axis,
                                     min_axis=51 if kind == "mean" and one_axis else 0)[0]
                took = time.perf_counter() - start
                rules = "one axle" if one_axis else "separate axes"
                print(f"{kind:<14}{rules:<16}{expression:<20}{took:8.2f}  {best.relative_error:+11.2e}")
    start = time.perf_counter()
    plan = plan_train(parse_train(TRAIN))
    planned = time.perf_counter() - start
    with tempfile.TemporaryDirectory() as folder:
        start = time.perf_counter()
        write_plan(plan, pathlib.Path(folder) / "out", BuildOptions(formats=("dxf",)))
        written = time.perf_counter() - start
    print(f"spur-differential train: plan {planned:.2f} s ({len(plan.gears)} gears), DXF files {written:.2f} s")


if __name__ == "__main__":
    main()
