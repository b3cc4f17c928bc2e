"""Benchmark (not a test): the worm's and the wheel's solids, their times, volumes and file sizes.

Run: .venv/bin/python tests/benchmarks/bench_worm.py
Prints, per worm pair: the seconds for the wheel's matched slices, the wheel's solid (lofts, sewing, the
kernel's checker, the volume) and the worm's solid; the wheel's volume against Simpson's rule on 21 slices of
the hob simulation (independent of the solid's slices); the STEP and STL sizes of the wheel.
"""

from __future__ import annotations

import os
import tempfile
import time
from pathlib import Path

import numpy as np

PAIRS = [  # (starts, wheel teeth, module mm, diameter factor, flank, throated)
    (2, 30, 3.0, 44 / 3, "za", True),
    (2, 30, 3.0, 44 / 3, "za", False),
    (1, 40, 2.0, 10.0, "za", True),
    (4, 41, 2.5, 11.0, "zi", True),
    (1, 120, 1.0, 12.0, "za", True),
    (1, 360, 1.0, 12.0, "za", True),
]


def _simpson(form, throated, count=21):
    from gearcad.geometry.worm_wheel import wheel_slice

    cs = np.linspace(-form.face_width / 2, form.face_width / 2, count)
    a = np.array([wheel_slice(form, float(c), throated=throated).area for c in cs])
    h = cs[1] - cs[0]
    return h / 3 * (a[0] + a[-1] + 4 * a[1:-1:2].sum() + 2 * a[2:-1:2].sum())


def main() -> None:
    import cadquery  # noqa: F401  (start-up is not timed)

    from gearcad.export.step import write_step, write_stl
    from gearcad.export.step_worm import worm_solid
    from gearcad.export.step_worm_wheel import solid_volume, wheel_solid
    from gearcad.export.worm_files import WHEEL_STL_ANGLE
    from gearcad.geometry.worm_wheel import transverse_flank
    from gearcad.geometry.worm_wheel_sections import sections_volume, tooth_sections
    from gearcad.meshes.worm import make_worm_pair, thread_form

    print(f"{'pair':>24} {'slices s':>9} {'wheel s':>8} {'worm s':>7} {'volume mm3':>12} {'vs Simpson':>11} "
          f"{'STEP MB':>8} {'STL MB':>7}")
    for z1, z2, m, q, flank, throated in PAIRS:
        form = thread_form(make_worm_pair(z1, z2, m, diameter_factor=q, flank=flank))
        start = time.perf_counter()
        spans = tooth_sections(form, throated=throated)
        t_slices = time.perf_counter() - start
        start = time.perf_counter()
        wheel = wheel_solid(form, spans, sections_volume(spans))
        t_wheel = time.perf_counter() - start
        start = time.perf_counter()
        worm_solid(form, transverse_flank(form))
        t_worm = time.perf_counter() - start
        volume = solid_volume(wheel)
        error = volume / _simpson(form, throated) - 1
        with tempfile.TemporaryDirectory() as folder:
            step = write_step(wheel, Path(folder) / "wheel.step")
            stl = write_stl(wheel, Path(folder) / "wheel.stl", angular_tolerance=WHEEL_STL_ANGLE)
            sizes = os.path.getsize(step) / 1e6, os.path.getsize(stl) / 1e6
        name = f"{z1}/{z2} m{m:g} q{q:.3g} {flank} {'throat' if throated else 'straight'}"
        print(f"{name:>24} {t_slices:9.2f} {t_wheel:8.2f} {t_worm:7.2f} {volume:12.1f} {error:+11.2e} "
              f"{sizes[0]:8.2f} {sizes[1]:7.2f}")


if __name__ == "__main__":
    main()
