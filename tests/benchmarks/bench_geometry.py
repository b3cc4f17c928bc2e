"""Benchmark (not a test): outline time and point count against tooth count and tolerance.

Run: .venv/bin/python tests/benchmarks/bench_geometry.py
Target (issue): at most 5 ms a gear for z <= 100 at 1 µm on the project's 2-core machine.
"""

from __future__ import annotations

import time

from gearcad.geometry import SpurGear, outline


def best_time(fn, repeat: int = 7) -> float:
    """Least wall time of ``repeat`` runs, seconds."""
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - start)
    return best


def main() -> None:
    print(f"{'z':>5} {'tol mm':>8} {'points':>8} {'ms':>8} {'µs/tooth':>9}")
    for tolerance in (1e-3, 1e-4):
        for z in (12, 25, 50, 100, 200, 400):
            gear = SpurGear.make(z, 1.0, shift=0.2 if z < 18 else 0.0)
            points = len(outline(gear, tolerance))
            seconds = best_time(lambda: outline(gear, tolerance))
            print(f"{z:5d} {tolerance:8.0e} {points:8d} {seconds * 1e3:8.2f} {seconds * 1e6 / z:9.1f}")
    print("Growth: one tooth pitch is computed once and turned z times, so time is a fixed cost "
          "(the pitch) plus a part linear in z (the copies).")


if __name__ == "__main__":
    main()
