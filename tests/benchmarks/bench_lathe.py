"""Benchmark: thread tables of ``gearcad lathe`` (prints times and peak memory; not a test).

Cases: the shipped 8 TPI machine with about 40 threads (ISO coarse and BSW), the metric machine
with four series, and the bounds: a shelf of 80 sizes (160 gears) with 200 threads.  Peak memory
is the process's resident set (ru_maxrss), so it includes the interpreter and numpy.
"""

from __future__ import annotations

import resource
import time
from pathlib import Path

from gearcad.lathe.machine import load_machine, parse_machine
from gearcad.lathe.table import thread_table
from gearcad.lathe.threads import MAX_THREADS, parse_threads

BENCH = Path(__file__).resolve().parents[2] / "profiles" / "lathes" / "bench-8tpi.toml"


def measure(label: str, machine, threads: str, limit: int | None = None) -> None:
    pitches = parse_threads(threads)[:limit]
    start = time.perf_counter()
    table = thread_table(machine, pitches, tolerance=0.01)
    seconds = time.perf_counter() - start
    exact = sum(r.best.exact for r in table.rows)
    fits = sum(r.best.fit.fits for r in table.rows)
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"{label}: {len(table.rows)} threads in {seconds:.2f} s ({1000 * seconds / len(table.rows):.0f} ms each), "
          f"{exact} exact, {fits} fit the frame; peak resident memory so far {peak:.0f} MiB")


def main() -> None:
    measure("bench-8tpi, ISO coarse + BSW", load_machine("bench-8tpi"), "iso-coarse,bsw")
    measure("metric-3mm, UNC + UNF + ISO coarse + DP", load_machine("metric-3mm"), "unc,unf,iso-coarse,dp")
    big = parse_machine(BENCH.read_text().replace('shelf = "20x2, 25-80/5, 127"', 'shelf = "12-90x2, 127x2"'),
                        "big", "big.toml")
    series = "iso-coarse,iso-fine,unc,unf,bsw,bsf,ba,bsp,module,dp"
    extra = ",".join(f"{0.3 + 0.05 * i:.2f}" for i in range(120))
    measure(f"bounds: shelf of {len(big.shelf.counts)} sizes ({big.shelf.size} gears), up to {MAX_THREADS} threads",
            big, series + "," + extra, MAX_THREADS)


if __name__ == "__main__":
    main()
