"""Benchmark (not a test): helical and herringbone solids against the straight prism, and their volume error.

Run: .venv/bin/python tests/benchmarks/bench_helical.py
Prints, per tooth count, the seconds to build a straight, a helical and a herringbone solid of the same
section, the ratio helical / straight, the relative volume error against transverse area x face width
(the solid's own check holds it to 1e-6) and the peak Python memory of the helical build.
"""

from __future__ import annotations

import math
import time
import tracemalloc


def main() -> None:
    import cadquery  # noqa: F401  (start-up is not timed)

    from gearcad.export.step import _adaptive_area, _face, _Stats, build_solid, helical_solid
    from gearcad.geometry.shape import Part, gear_loop
    from gearcad.meshes.helical import helical_gear
    from gearcad.profiles import load_tooth_system

    system = load_tooth_system("iso53-a")
    width = 8.0
    print(f"{'teeth':>5} {'straight s':>11} {'helical s':>10} {'herringbone s':>14} {'ratio':>6} {'volume error':>13} {'peak MiB':>9}")
    for teeth in (12, 24, 48):
        gear = helical_gear(teeth, 1.0, system, math.radians(20), "right")
        part = Part("g", gear_loop(gear, 1e-3))
        start = time.perf_counter()
        build_solid(part, width, 1e-3)
        t_straight = time.perf_counter() - start
        tracemalloc.start()
        start = time.perf_counter()
        helical = helical_solid(part, width, gear.twist(width), 1e-3)
        t_helical = time.perf_counter() - start
        peak = tracemalloc.get_traced_memory()[1] / 2**20
        tracemalloc.stop()
        start = time.perf_counter()
        helical_solid(part, width, gear.twist(width), 1e-3, herringbone=True, gap=1.0, gap_diameter=gear.root_diameter)
        t_herring = time.perf_counter() - start
        # against the kernel's transverse area (adaptive) x face width: Cavalieri says 0
        error = helical.volume / (_adaptive_area(_face(part, 1e-3, _Stats())) * width) - 1
        print(f"{teeth:>5} {t_straight:>11.2f} {t_helical:>10.2f} {t_herring:>14.2f} {t_helical / t_straight:>6.1f} "
              f"{error:>13.2e} {peak:>9.1f}")


if __name__ == "__main__":
    main()
