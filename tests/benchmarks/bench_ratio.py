"""Benchmark of the ratio solver (a script; pytest does not collect it).

Run:  .venv/bin/python tests/benchmarks/bench_ratio.py [--quick] [--only start|sweep|fractions|exhaustive]

Prints, in one run:
* the fast start: ``gearcad ratio 29.530588853 --stages 2`` against
  ``python -c "import numpy"``, fresh processes taken in turn, the median of 11
  runs each (after one warm-up), wall and CPU (user + system) time, and their
  ratio against the limit of 1.2x;
* a sweep of 40 log-spaced targets from 1e-4 to 1e4 plus 0.001, 1/300, 100 and
  1/1436.0682, each at 2, 3 and 4 stages, each in a fresh process running
  ``gearcad ratio TARGET --stages K --json`` (2 and 3 stages over the default
  10-120 teeth, 4 stages over 10-200 teeth); per stage count the worst time of
  the command (``main`` alone, once numpy is loaded, and the whole process) and the worst peak memory
  of the process (``ru_maxrss`` of that child, from ``os.wait4``), against the
  limits of the issue: 1 s up to 3 stages, 2 s at 4 stages, 1 GiB;
* simple fractions at 4 stages over 10-200 teeth: 20 fractions p/q with p, q
  from 1 to 200 (random, seed 11) and 3/10, 131/100, each in a fresh process,
  worst time and worst peak memory against 2 s and 1 GiB (exact hits and
  near-1 targets were the slow cases);
* the solver against the exhaustive reference of tests/test_ratio_optimality.py
  on one 2-stage instance (time ratio, same optimum).

Children run with bytecode caching allowed (as an installed gearcad does), after
one warm-up run.  The machine's load shows in every figure: the load average
is printed first and last; read the figures with it in mind.
"""

from __future__ import annotations

import importlib.util
import json
import os
import pathlib
import random
import statistics
import subprocess
import sys
import time

HERE = pathlib.Path(__file__).resolve()
ROOT = HERE.parents[2]
sys.path.insert(0, str(ROOT))

LIMITS = {2: 1.0, 3: 1.0, 4: 2.0}  # seconds, the limits
MEMORY_LIMIT = 1024  # MiB
TEETH = {2: (10, 120), 3: (10, 120), 4: (10, 200)}
EXTRA = ["0.001", "1/300", "100", "1/1436.0682"]
FAST_START_LIMIT = 1.2
FRACTION_SEED, FRACTION_COUNT = 11, 20

DRIVER = r"""
import io, json, sys, time, contextlib
import numpy  # the interpreter and numpy are the fast-start figure's business; here: the command's own work
from gearcad.cli import main
start = time.perf_counter()
out = io.StringIO()
with contextlib.redirect_stdout(out):
    code = main(sys.argv[1:])
elapsed = time.perf_counter() - start
print(json.dumps({"code": code, "seconds": elapsed, "result": out.getvalue()}))
"""


def _env() -> dict[str, str]:
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    return env


def _run(argv: list[str]) -> tuple[float, float, str, str, float]:
    """Wall time, peak RSS (MiB), stdout, stderr and CPU time (user + system) of one fresh process."""
    start = time.perf_counter()
    process = subprocess.Popen(argv, stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=_env(), cwd=ROOT)
    # read the pipes while waiting (wait4 gives this child's own rusage)
    out_chunks, err_chunks = [], []
    import threading

    def drain(stream, into):
        into.append(stream.read())

    threads = [threading.Thread(target=drain, args=(process.stdout, out_chunks)),
               threading.Thread(target=drain, args=(process.stderr, err_chunks))]
    for t in threads:
        t.start()
    _, status, usage = os.wait4(process.pid, 0)
    wall = time.perf_counter() - start
    for t in threads:
        t.join()
    process.returncode = os.waitstatus_to_exitcode(status)
    return (wall, usage.ru_maxrss / 1024, b"".join(out_chunks).decode(), b"".join(err_chunks).decode(),
            usage.ru_utime + usage.ru_stime)


def targets(count: int = 40) -> list[str]:
    """``count`` log-spaced targets from 1e-4 to 1e4, then the issue's named ones."""
    values = [10 ** (-4 + 8 * i / (count - 1)) for i in range(count)]
    return [f"{v:.6g}" for v in values] + EXTRA


def _measure(label: str, listing: list[str], k: int, low: int, high: int) -> None:
    """Run ``gearcad ratio`` on each target at ``k`` stages in a fresh process; print the worst figures."""
    worst_main = worst_wall = worst_rss = worst_cpu = 0.0
    worst_case = worst_rss_case = ""
    reached = unreachable = 0
    for text in listing:
        argv = [sys.executable, "-c", DRIVER, "ratio", text, "--stages", str(k), "--json",
                "--min-teeth", str(low), "--max-teeth", str(high)]
        wall, rss, out, err, cpu = _run(argv)
        try:
            data = json.loads(out)
        except json.JSONDecodeError:
            print(f"  {k} stages {text}: no result ({err.strip()[-200:]})")
            continue
        code = data["code"]
        reached += code == 0
        unreachable += code == 1
        if data["seconds"] > worst_main:
            worst_main, worst_case = data["seconds"], text
        if rss > worst_rss:
            worst_rss, worst_rss_case = rss, text
        worst_wall, worst_cpu = max(worst_wall, wall), max(worst_cpu, cpu)
    verdict = "ok" if worst_main <= LIMITS[k] and worst_rss <= MEMORY_LIMIT else "OVER"
    print(f"  {label}{k} stages, teeth {low}-{high}: {reached} solved, {unreachable} beyond reach (exit 1); "
          f"worst main() {worst_main:.3f} s (target {worst_case}), worst process {worst_wall:.3f} s "
          f"(CPU {worst_cpu:.3f} s), worst peak {worst_rss:.0f} MiB (target {worst_rss_case}); "
          f"limits {LIMITS[k]:g} s, {MEMORY_LIMIT} MiB: {verdict}")


def sweep(quick: bool = False) -> None:
    listing = targets(12 if quick else 40)
    print(f"sweep: {len(listing)} targets (log-spaced 1e-4..1e4 and {', '.join(EXTRA)}), fresh process each")
    _run([sys.executable, "-c", DRIVER, "ratio", "2", "--stages", "2", "--json"])  # warm-up: bytecode caches
    for k in (2, 3, 4):
        _measure("", listing, k, *TEETH[k])


def fractions(quick: bool = False) -> list[str]:
    """Simple fractions p/q (p, q from 1 to 200, seeded) and 3/10, 131/100, at 4 stages over 10-200 teeth."""
    rng = random.Random(FRACTION_SEED)
    listing = [f"{rng.randint(1, 200)}/{rng.randint(1, 200)}" for _ in range(6 if quick else FRACTION_COUNT)]
    listing += ["3/10", "131/100"]
    print(f"simple fractions: {', '.join(listing)}; fresh process each")
    _run([sys.executable, "-c", DRIVER, "ratio", "2", "--stages", "2", "--json"])  # warm-up: bytecode caches
    _measure("fractions, ", listing, 4, *TEETH[4])
    return listing


def fast_start(runs: int = 11) -> None:
    """Median wall and CPU time of ``gearcad ratio 29.530588853 --stages 2`` against ``python -c 'import numpy'``."""
    numpy_runs, ratio_runs = [], []
    for _ in range(runs + 1):  # taken in turn, so a change of load touches both; the first of each is a warm-up
        numpy_runs.append(_run([sys.executable, "-c", "import numpy"]))
        ratio_runs.append(_run([sys.executable, "-m", "gearcad", "ratio", "29.530588853", "--stages", "2"]))
    for name, index in (("wall", 0), ("CPU", 4)):
        a = statistics.median(r[index] for r in numpy_runs[1:])
        b = statistics.median(r[index] for r in ratio_runs[1:])
        verdict = "ok" if b / a <= FAST_START_LIMIT else "OVER"
        print(f"fast start ({name}, median of {runs}): python -c 'import numpy' {a:.3f} s; "
              f"gearcad ratio 29.530588853 --stages 2 {b:.3f} s; ratio {b / a:.2f}x "
              f"(limit {FAST_START_LIMIT}x): {verdict}")


def _reference():
    path = HERE.parents[1] / "test_ratio_optimality.py"
    spec = importlib.util.spec_from_file_location("ratio_reference", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module.exhaustive


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
    quick = "--quick" in sys.argv
    parts = ("start", "sweep", "fractions", "exhaustive")
    if "--only" in sys.argv:
        parts = tuple(sys.argv[sys.argv.index("--only") + 1].split(","))
    print(f"load average: {os.getloadavg()[0]:.2f} on {os.cpu_count()} cores")
    if "start" in parts:
        fast_start()
    if "sweep" in parts:
        sweep(quick)
    if "fractions" in parts:
        fractions(quick)
    if "exhaustive" in parts and not quick:
        compare_with_exhaustive(10, 120)
    print(f"load average at the end: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
