"""Benchmark (not a test): how the shafts of random compound trains are held, and the planning time.

A seeded sample of compound trains (2 to 4 stages, 10 to 80 teeth a gear, module 1, 1.5 or 2 mm, the default
laser profile) is planned (layout, supports, parts, interference; no files written).  Printed: the count of
shafts held by both frame plates, by a plate and a bridge and by a stud (the last resort), the studs whose pipe
finds no room (failures), the mean frame plate area, the trains that do not plan, and the time.

Run: .venv/bin/python tests/benchmarks/bench_supports.py [trains] [seed]   (defaults 150 trains, seed 2026)
"""

from __future__ import annotations

import sys
import time
from collections import Counter

import numpy as np


def sample(count: int, seed: int) -> list[str]:
    """``count`` train files of random compound trains, the same for the same seed."""
    rng = np.random.default_rng(seed)
    trains = []
    for k in range(count):
        stages = int(rng.integers(2, 5))
        module = float(rng.choice([1.0, 1.5, 2.0]))
        text = f'name = "t{k}"\nmodule = {module}\nthickness = 3.0\n'
        for _ in range(stages):
            a, b = (int(z) for z in rng.integers(10, 81, size=2))
            text += f"[[stage]]\ndriver = {a}\ndriven = {b}\n"
        trains.append(text)
    return trains


def held(plan) -> Counter:
    """Shafts of one plan by what holds them (planet pins aside)."""
    out = Counter()
    for s in plan.mechanism.shafts:
        if s.kind == "stud":
            out["stud"] += 1
        elif any(n.startswith("bridge-") for n in s.supports):
            out["bridge"] += 1
        elif set(s.supports) >= {"back-plate", "front-plate"} or s.kind == "pipe":
            out["two plates"] += 1
    out["stud failures"] += sum(1 for f in plan.findings if f.check.startswith("stud ") and f.severity == "failure")
    out["overlaps"] += len(plan.mechanism.overlaps)
    out["area"] += plan.layout.width * plan.layout.height
    return out


def main(argv: list[str]) -> None:
    from gearcad.errors import GearcadError
    from gearcad.trains.planner import plan_train
    from gearcad.trains.trainfile import parse_train

    count = int(argv[0]) if argv else 150
    seed = int(argv[1]) if len(argv) > 1 else 2026
    trains = sample(count, seed)
    totals, refused, worst = Counter(), Counter(), (0.0, "")
    start = time.perf_counter()
    for text in trains:
        t0 = time.perf_counter()
        try:
            plan = plan_train(parse_train(text))
        except GearcadError as exc:
            refused[str(exc).split(":")[0][:60]] += 1
            continue
        totals += held(plan)
        seconds = time.perf_counter() - t0
        worst = max(worst, (seconds, text.split("\n")[0]))
    elapsed = time.perf_counter() - start
    planned = count - sum(refused.values())
    print(f"{count} random compound trains (seed {seed}; 2-4 stages, 10-80 teeth, module 1-2 mm): {planned} planned")
    for key in ("two plates", "bridge", "stud", "stud failures", "overlaps"):
        print(f"  shafts held by {key:<14} {totals[key]:5d}" if key in ("two plates", "bridge", "stud")
              else f"  {key:<29} {totals[key]:5d}")
    print(f"  frame plate area, mean          {totals['area'] / max(planned, 1):8.0f} mm2")
    for why, n in refused.most_common():
        print(f"  refused ({n}): {why}")
    print(f"time {elapsed:.1f} s ({elapsed / count:.2f} s a train; slowest {worst[0]:.2f} s, {worst[1]})")


if __name__ == "__main__":
    main(sys.argv[1:])
