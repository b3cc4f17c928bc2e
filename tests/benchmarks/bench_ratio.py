"""Benchmark of the ratio solver (a script; pytest does not collect it).

Run:  .venv/bin/python tests/benchmarks/bench_ratio.py

Prints, in one run:
* the solver against the exhaustive reference of tests/test_ratio_optimality.py
  on one 2-stage instance (time ratio, same optimum);
* time and peak memory for 3 and 4 stages over 12-120 teeth and 4 stages over
  10-200 teeth.
Targets of the issue: >= 1000x faster than exhaustive at 2 stages; 3 stages
within 0.5 s; 4 stages within 2 s; peak memory under 1 GiB.
Each case runs in a fresh process so its peak memory is its own.
"""

from __future__ import annotations

import importlib.util
import multiprocessing as mp
import pathlib
import resource
import sys
import time
import tracemalloc

HERE = pathlib.Path(__file__).resolve()
sys.path.insert(0, str(HERE.parents[2]))

CASES = [
    ("3 stages, 12-120 teeth", "366.2422/365.2422", 3, 12, 120),
    ("3 stages, 12-120 teeth", "29.530588853", 3, 12, 120),
    ("4 stages, 12-120 teeth", "366.2422/365.2422", 4, 12, 120),
    ("4 stages, 12-120 teeth", "2*pi", 4, 12, 120),
    ("4 stages, 10-200 teeth", "366.2422/365.2422", 4, 10, 200),
    ("4 stages, 10-200 teeth", "29.530588853", 4, 10, 200),
    ("4 stages, 10-200 teeth", "2*pi", 4, 10, 200),
]


def _reference():
    path = HERE.parents[1] / "test_ratio_optimality.py"
    spec = importlib.util.spec_from_file_location("ratio_reference", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module.exhaustive


def _timed_case(queue, expression, stages, low, high):
    from gearcad.ratio import make_limits, parse_target, solve_compound

    target, limits = parse_target(expression), make_limits(low, high)
    tracemalloc.start()
    start = time.perf_counter()
    best = solve_compound(target, stages, limits, 1)[0]
    elapsed = time.perf_counter() - start
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    queue.put((elapsed, peak, rss, best.stages, best.relative_error))


def _in_fresh_process(*args):
    queue = mp.get_context("spawn").Queue()
    process = mp.get_context("spawn").Process(target=_timed_case, args=(queue, *args))
    process.start()
    result = queue.get()
    process.join()
    return result


def compare_with_exhaustive(low: int, high: int) -> None:
    from gearcad.ratio import make_limits, parse_target, solve_compound

    exhaustive = _reference()
    target, limits = parse_target("29.530588853"), make_limits(low, high)
    solve_compound(parse_target("3.3"), 2, limits, 1)  # warm caches of imports
    start = time.perf_counter()
    repeats = 20
    for _ in range(repeats):
        solver = solve_compound(target, 2, limits, 1)[0]
    solver_time = (time.perf_counter() - start) / repeats
    start = time.perf_counter()
    reference = exhaustive(target, 2, limits, 1)[0]
    reference_time = time.perf_counter() - start
    same = (solver.numerator, solver.denominator, solver.total_teeth) == reference
    print(f"2 stages, {low}-{high} teeth, target 29.530588853")
    print(f"  solver      {solver_time * 1e3:9.2f} ms  {solver.stages}  error {solver.relative_error:+.3e}")
    print(f"  exhaustive  {reference_time * 1e3:9.2f} ms  {reference}")
    print(f"  speed-up    {reference_time / solver_time:9.0f} x   same optimum: {same}")


def main() -> None:
    compare_with_exhaustive(10, 120)
    compare_with_exhaustive(10, 200)
    print()
    print(f"  {'case':24} {'target':20} {'time s':>8} {'traced MiB':>11} {'max RSS MiB':>12}  best")
    for label, expression, stages, low, high in CASES:
        elapsed, peak, rss, best, error = _in_fresh_process(expression, stages, low, high)
        print(f"  {label:24} {expression:20} {elapsed:8.3f} {peak / 2**20:11.1f} {rss / 2**20:12.1f}  "
              f"{best} {error:+.2e}")


if __name__ == "__main__":
    main()
