"""Benchmark (not a test): the worm wheel's STEP size against the points a run and the slices across the face.

Run: .venv/bin/python tests/benchmarks/bench_worm_wheel_size.py [--quick]

For each setting (points in the three runs of a tooth's slice, least slice count across the face) it builds the
wheel's solid and prints: seconds, STEP size, B-spline poles in the file, the volume against Simpson's rule on 21
slices of the hob simulation, and how far the solid's faces lie from the hob simulation's slices:

* ``at slices``: points of the lofted faces in the planes of the slices the loft went through;
* ``between``: points of the faces in planes halfway between those slices (where the loft interpolates);

each the largest distance, in um, from the outline of the hob simulation's own slice in that plane
(:func:`gearcad.geometry.worm_wheel.wheel_slice`, whose scallops are about 3 um at the default positions).  The
points are found on the faces' iso-curves across the slices by bisection on z, over one tooth.
"""

from __future__ import annotations

import math
import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

PAIRS = [  # (starts, wheel teeth, module mm, diameter factor): the brief's 7 MB pair and the handbook pair
    (1, 30, 2.0, 10.0),
    (2, 30, 3.0, 44 / 3),
]
SETTINGS = [  # (runs, slices); the default is (32, 8, 32), 11
    ((48, 12, 48), 17),
    ((32, 8, 32), 17),
    ((32, 8, 32), 11),
    ((24, 6, 24), 17),
    ((16, 6, 16), 17),
    ((24, 6, 24), 11),
    ((24, 6, 24), 9),
]


def _face_points_at(face, z: float, lines: int = 40) -> np.ndarray:
    """Points of ``face`` in the plane ``z``: on ``lines`` iso-curves of constant u, bisection on v."""
    from OCP.BRep import BRep_Tool
    from OCP.BRepTools import BRepTools

    surface = BRep_Tool.Surface_s(face)
    u0, u1, v0, v1 = BRepTools.UVBounds_s(face)
    out = []
    for u in np.linspace(u0, u1, lines):
        zs = [surface.Value(float(u), float(v)).Z() for v in (v0, v1)]
        lo, hi = (v0, v1) if zs[0] < zs[1] else (v1, v0)
        if not min(zs) - 1e-9 <= z <= max(zs) + 1e-9:
            continue
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            if surface.Value(float(u), float(mid)).Z() < z:
                lo = mid
            else:
                hi = mid
        p = surface.Value(float(u), float(0.5 * (lo + hi)))
        out.append((p.X(), p.Y()))
    return np.array(out)


def _tooth_faces(solid, teeth: int) -> list:
    """The faces of the tooth round +y (the lofted ones; the planar end faces are left out)."""
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    faces = []
    explorer = TopExp_Explorer(solid, TopAbs_FACE)
    while explorer.More():
        face = TopoDS.Face_s(explorer.Current())
        props = GProp_GProps()
        BRepGProp.SurfaceProperties_s(face, props)
        c = props.CentreOfMass()
        angle = math.atan2(c.Y(), c.X())
        if abs(math.hypot(c.X(), c.Y())) > 1e-6 and abs(angle - math.pi / 2) < 1.5 * math.pi / teeth:
            faces.append(face)
        explorer.Next()
    return faces


def _deviation(form, faces, zs) -> float:
    import shapely

    from gearcad.geometry.worm_wheel import wheel_slice

    worst = 0.0
    for z in zs:
        outline = wheel_slice(form, float(z)).exterior
        points = [p for f in faces if len(p := _face_points_at(f, float(z)))]
        if points:
            pts = np.vstack(points)
            worst = max(worst, float(shapely.distance(shapely.points(pts), outline).max()))
    return worst


def _poles(path: Path) -> int:
    return Path(path).read_text().count("CARTESIAN_POINT")


def main() -> None:
    import cadquery  # noqa: F401  (start-up is not timed)

    from gearcad.export.step import write_step
    from gearcad.export.step_worm_wheel import solid_volume, wheel_solid
    from gearcad.geometry.worm_wheel import wheel_slice
    from gearcad.geometry.worm_wheel_sections import sections_volume, tooth_sections
    from gearcad.meshes.worm import make_worm_pair, thread_form

    quick = "--quick" in sys.argv
    print(f"{'pair':>16} {'runs':>12} {'slices':>6} {'seconds':>8} {'STEP MB':>8} {'points':>7} {'vs Simpson':>11} "
          f"{'at slices um':>13} {'between um':>11}")
    for z1, z2, m, q in PAIRS[:1] if quick else PAIRS:
        form = thread_form(make_worm_pair(z1, z2, m, diameter_factor=q))
        cs = np.linspace(-form.face_width / 2, form.face_width / 2, 21)
        areas = np.array([wheel_slice(form, float(c)).area for c in cs])
        h = cs[1] - cs[0]
        simpson = h / 3 * (areas[0] + areas[-1] + 4 * areas[1:-1:2].sum() + 2 * areas[2:-1:2].sum())
        for runs, count in SETTINGS[:2] if quick else SETTINGS:
            start = time.perf_counter()
            spans = tooth_sections(form, count=count, runs=runs)
            solid = wheel_solid(form, spans, sections_volume(spans))
            seconds = time.perf_counter() - start
            with tempfile.TemporaryDirectory() as folder:
                step = write_step(solid, Path(folder) / "wheel.step")
                size, points = os.path.getsize(step) / 1e6, _poles(step)
            faces = _tooth_faces(solid, z2)
            at = sorted({s.c for span in spans for s in span})
            inner = [s for s in at if abs(s) < form.face_width / 2 - 1e-6]
            between = [0.5 * (a + b) for a, b in zip(at[:-1], at[1:])]
            dev_at = _deviation(form, faces, inner[:: max(1, len(inner) // 4)])
            dev_between = _deviation(form, faces, between[:: max(1, len(between) // 4)])
            error = solid_volume(solid) / simpson - 1
            print(f"{f'{z1}/{z2} m{m:g} q{q:.3g}':>16} {str(runs):>12} {count:6d} {seconds:8.1f} {size:8.2f} "
                  f"{points:7d} {error:+11.2e} {dev_at * 1e3:13.1f} {dev_between * 1e3:11.1f}")


if __name__ == "__main__":
    main()
