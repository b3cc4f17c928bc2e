"""Benchmark (not a test): STEP file sizes and write/read times, before and after the compaction.

Run: .venv/bin/python tests/benchmarks/bench_step_size.py

"before" writes as gearcad did until issue 12: trim curves (pcurves) on every edge, every
point and curve its own entity, every planet its own product.  "after" is the writer as it
is.  Goals (issue 12): a 91-tooth gear at most 1 MB, the demo's assembly at most 2 MB.
Prints bytes, the ratio, write time and read-back time (OCP's STEP reader), and the peak
memory of the process.
"""

from __future__ import annotations

import resource
import tempfile
import time
from contextlib import contextmanager
from pathlib import Path


@contextmanager
def as_before():
    """The writer's settings before issue 12: pcurves written, nothing shared."""
    from OCP.Interface import Interface_Static

    import gearcad.export.step_files as step

    settings, share = step._step_settings, step.share_geometry

    def old_settings() -> None:
        settings()
        Interface_Static.SetIVal_s("write.surfacecurve.mode", 1)

    step._step_settings, step.share_geometry = old_settings, (lambda text: text)
    try:
        yield
    finally:
        step._step_settings, step.share_geometry = settings, share


def read_time(path: Path) -> float:
    from OCP.STEPControl import STEPControl_Reader

    from gearcad.export.step import kernel_quiet

    start = time.perf_counter()
    with kernel_quiet():
        reader = STEPControl_Reader()
        reader.ReadFile(str(path))
        reader.TransferRoots()
        reader.OneShape()
    return time.perf_counter() - start


def row(label: str, write, write_before=None) -> int:
    with tempfile.TemporaryDirectory() as tmp:
        sizes = []
        for mode in ("before", "after"):
            path = Path(tmp) / f"{mode}.step"
            start = time.perf_counter()
            if mode == "before":
                with as_before():
                    (write_before or write)(path)
            else:
                write(path)
            wrote = time.perf_counter() - start
            sizes.append(path.stat().st_size)
            print(f"  {label:<34} {mode:<6} {sizes[-1] / 1e6:7.3f} MB  write {wrote:6.2f} s  read {read_time(path):6.2f} s")
        print(f"  {label:<34} ratio  {sizes[0] / sizes[1]:7.2f}x")
    return sizes[1]


def by_entity(path: Path) -> None:
    """Bytes of the file by entity type (the ten largest), to see what takes the room."""
    import re
    from collections import Counter

    sizes: Counter[str] = Counter()
    for number, body in re.findall(r"#(\d+)\s*=\s*((?:'(?:[^']|'')*'|[^';])*);", path.read_text(encoding="latin-1")):
        sizes[body.split("(", 1)[0].strip() or "(complex)"] += len(number) + len(body) + 4
    total = sum(sizes.values())
    for kind, size in sizes.most_common(10):
        print(f"    {kind:<34} {size / 1e3:8.1f} kB {100 * size / total:5.1f} %")


def main() -> None:
    from importlib import resources

    from gearcad.cli.build import solved
    from gearcad.export.step import AssemblyItem, assembly_step, build_solid, write_step
    from gearcad.trains.planner import plan_train
    from gearcad.trains.trainfile import parse_train

    plan = plan_train(parse_train('name = "g"\nmodule = 1\nthickness = 3\n[[stage]]\ndriver = 20\ndriven = 91\n'))
    gear = build_solid(plan.gears[1].part, 3.0, plan.tolerance).solid
    after = row("91-tooth gear (goal <= 1 MB)", lambda p: write_step(gear, p, names=["g"]))
    print(f"  goal met: {after <= 1_000_000}")

    text = resources.files("gearcad").joinpath("demo", "moon-phase.toml").read_text(encoding="utf-8")
    demo = plan_train(solved(parse_train(text))[0])
    items = []
    for g in demo.gears:
        shaft = demo.shafts[g.shaft]
        items.append(AssemblyItem(g.name, build_solid(g.part, demo.spec.thickness, demo.tolerance).solid,
                                  shaft.x, shaft.y, g.z, 0.0))
    for p in demo.plates:
        items.append(AssemblyItem(p.name, build_solid(p.part, demo.spec.thickness, demo.tolerance).solid, 0, 0, p.z))
    after = row("demo assembly (goal <= 2 MB)", lambda p: assembly_step(items, p, "demo"))
    print(f"  goal met: {after <= 2_000_000}")
    with tempfile.TemporaryDirectory() as tmp:
        print("  by part (each written alone):")
        for item in items:
            path = write_step(item.solid, Path(tmp) / f"{item.name}.step", names=[item.name])
            print(f"    {item.name:<34} {path.stat().st_size / 1e3:8.1f} kB")
        path = assembly_step(items, Path(tmp) / "assembly.step", "demo")
        print("  by entity type (the assembly):")
        by_entity(path)

    epi = plan_train(parse_train('name = "epi"\nmodule = 1.0\nthickness = 3.0\nfabrication = "fdm-pla-0.4mm"\n'
                                 '[planetary]\nsun = 18\nplanet = 24\nring = 66\nplanets = 3\nfixed = "ring"\n'))
    planet = build_solid(next(g for g in epi.gears if "planet" in g.name).part, 3.0, epi.tolerance).solid
    twelve = [AssemblyItem(f"planet-{k}", planet, 30.0 * k, 0.0, 0.0, 0.0, "planet") for k in range(12)]
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Copy

    copies = [AssemblyItem(f"planet-{k}", BRepBuilderAPI_Copy(planet).Shape(), 30.0 * k, 0.0, 0.0, 0.0)
              for k in range(12)]  # before: every planet its own solid and product
    row("12 equal planets", lambda p: assembly_step(twelve, p, "planets"), lambda p: assembly_step(copies, p, "planets"))
    print(f"peak memory {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MB")


if __name__ == "__main__":
    main()
