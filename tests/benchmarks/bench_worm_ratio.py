"""Benchmark of the worm search, ``gearcad ratio TARGET --worm ...`` (a script; pytest does not collect it).

Run:  .venv/bin/python tests/benchmarks/bench_worm_ratio.py

Each query runs in a fresh process; prints its wall time, CPU time (user + system of the child) and peak
memory (``ru_maxrss``, from ``os.wait4``), and the load average before and after.  The sidereal targets
(one turn a sidereal day, 86164.0905 s, from memory) from a 1 rpm and a 60 rpm motor, over narrow and wide
wheel ranges, and one target beyond the reach (said at once).
"""

from __future__ import annotations

import os
import subprocess
import sys
import time

QUERIES = [
    ["60/86164.0905", "--worm", "1:90-360"],
    ["1/1436.068", "--worm", "1", "--stages", "3"],
    ["1/1436.068", "--worm", "1:18-1000", "--stages", "3"],
    ["1/1436.068", "--worm", "1:18-1000", "--stages", "4"],
    ["1/86164.0905", "--worm", "1", "--stages", "4"],
]


def run(args: list[str]) -> tuple[float, float, float, int]:
    start = time.perf_counter()
    proc = subprocess.Popen([sys.executable, "-m", "gearcad", "ratio", *args], stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - start
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024, os.waitstatus_to_exitcode(status)


def main() -> None:
    print(f"load average before: {os.getloadavg()[0]:.2f}")
    for args in QUERIES:
        wall, cpu, peak, code = run(args)
        print(f"ratio {' '.join(args):45s} exit {code}  wall {wall:6.2f} s  cpu {cpu:6.2f} s  peak {peak:6.0f} MiB")
    print(f"load average after: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
