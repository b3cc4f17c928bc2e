"""The worm's solid (STEP, STL), built with the OCP kernel through cadquery.

Kernel code lives only in ``export/step*.py``, imported inside functions, so ``import gearcad`` never
loads the kernel.  The geometry comes from :mod:`gearcad.geometry.worm_wheel` (the thread's axial
section, the wheel's slices as the worm cuts them); this module only turns it into solids:

* the worm: its transverse section (every start's thread, the tip and root arcs exact, the flanks
  B-splines through :func:`gearcad.geometry.worm_wheel.transverse_flank`) swept along the axis while
  an auxiliary helix of the worm's lead turns it: a screw motion, so the flanks are the helicoids
  themselves, and the ends are the planes ``z = 0`` and ``z = length``, with no boolean at all.  (The
  first build swept the axial section along a helix with the Frenet frame, fused it with the core and
  trimmed it by a cylinder; for a single-start worm of q 10 the kernel's trim returned an empty
  solid without an error.)  A screw motion keeps the volume: the solid must hold the section's area
  times the length.  Axis along z, threads from ``z = 0`` to the threaded length.

The wheel is in :mod:`gearcad.export.step_worm_wheel`.

Lengths in mm.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

import numpy as np

from ..errors import GeometryError

if TYPE_CHECKING:
    from ..geometry.worm_wheel import ThreadForm

__all__ = ["worm_solid", "is_valid", "WORM_VOLUME_TOLERANCE"]

WORM_VOLUME_TOLERANCE = 1e-5  # relative: a screw motion keeps the section's area times the length


def is_valid(shape: Any) -> bool:
    """OCP's own checker (BRepCheck_Analyzer) on a shape or cadquery object."""
    from OCP.BRepCheck import BRepCheck_Analyzer

    wrapped = getattr(shape, "wrapped", shape)
    return bool(BRepCheck_Analyzer(wrapped).IsValid())


def _transverse_wire(form: "ThreadForm", flank: np.ndarray) -> Any:
    """The worm's transverse section at z = 0: per start a flank up, the tip arc, the mirrored flank down and
    the root arc to the next start (arcs exact, flanks cubic B-splines through the points)."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.GC import GC_MakeArcOfCircle
    from OCP.GeomAPI import GeomAPI_Interpolate
    from OCP.gp import gp_Pnt
    from OCP.TColgp import TColgp_HArray1OfPnt

    def spline(points: np.ndarray) -> Any:
        pts = TColgp_HArray1OfPnt(1, len(points))
        for i, (x, y) in enumerate(points, start=1):
            pts.SetValue(i, gp_Pnt(float(x), float(y), 0.0))
        interp = GeomAPI_Interpolate(pts, False, 1e-9)
        interp.Perform()
        if not interp.IsDone():
            raise GeometryError("the worm's flank could not be drawn as a B-spline")
        return interp.Curve()

    def turned(points: np.ndarray, angle: float) -> np.ndarray:
        c, s = math.cos(angle), math.sin(angle)
        return points @ np.array([[c, s], [-s, c]])

    def pnt(xy: np.ndarray) -> Any:
        return gp_Pnt(float(xy[0]), float(xy[1]), 0.0)

    mirrored = flank[::-1] * np.array([1.0, -1.0])  # tip to root, at +h(r) / p
    step = 2 * math.pi / form.starts
    wire = BRepBuilderAPI_MakeWire()
    for j in range(form.starts):
        up, down = turned(flank, j * step), turned(mirrored, j * step)
        next_root = turned(flank[:1], (j + 1) * step)[0]
        tip_mid = form.tip_radius * np.array([math.cos(j * step), math.sin(j * step)])
        root_mid = form.root_radius * np.array([math.cos((j + 0.5) * step), math.sin((j + 0.5) * step)])
        tip_arc = GC_MakeArcOfCircle(pnt(up[-1]), pnt(tip_mid), pnt(down[0])).Value()
        root_arc = GC_MakeArcOfCircle(pnt(down[-1]), pnt(root_mid), pnt(next_root)).Value()
        for curve in (spline(up), tip_arc, spline(down), root_arc):
            wire.Add(BRepBuilderAPI_MakeEdge(curve).Edge())
    if not wire.IsDone():
        raise GeometryError("the worm's transverse section could not be closed")
    return wire.Wire()


def _face_area(wire: Any) -> float:
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.SurfaceProperties_s(BRepBuilderAPI_MakeFace(wire, True).Face(), props)
    return props.Mass()


def worm_solid(form: "ThreadForm", flank: np.ndarray, *, shaft: float = 0.0, left_hand: bool = False) -> Any:
    """The worm as a solid (a cadquery Solid), axis along z, threads over ``[0, length]``.

    Parameters
    ----------
    form : ThreadForm
    flank : numpy.ndarray
        One flank of the thread in the transverse section ``z = 0``, root to tip, mm
        (:func:`gearcad.geometry.worm_wheel.transverse_flank`).
    shaft : float
        Length of plain shaft (root diameter) beyond each end, mm.
    left_hand : bool
        A left-hand thread.

    Raises
    ------
    GeometryError
        The kernel's result is not a valid solid, or its volume is not the section's area times the length.
    """
    import cadquery as cq
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.BRepOffsetAPI import BRepOffsetAPI_MakePipeShell
    from OCP.gp import gp_Pnt

    from .step import kernel_quiet

    lead = form.lead_parameter * 2 * math.pi
    length = form.length
    with kernel_quiet():
        section = _transverse_wire(form, flank)
        area = _face_area(section)
        spine = BRepBuilderAPI_MakeWire(BRepBuilderAPI_MakeEdge(gp_Pnt(0, 0, 0), gp_Pnt(0, 0, length)).Edge()).Wire()
        helix = cq.Wire.makeHelix(lead, length, 1.0, center=cq.Vector(0, 0, 0), lefthand=left_hand).wrapped
        sweep = BRepOffsetAPI_MakePipeShell(spine)
        sweep.SetMode(helix, False)  # the auxiliary helix steers the turn: an exact screw motion
        sweep.Add(section)
        sweep.SetTolerance(1e-7, 1e-7, 1e-6)
        sweep.Build()
        if not sweep.IsDone() or not sweep.MakeSolid():
            raise GeometryError("the kernel could not sweep the worm's section along its lead")
        worm = cq.Shape.cast(sweep.Shape())
        expected = area * length
        if shaft > 0:
            for z0 in (-shaft, length):
                worm = worm.fuse(cq.Solid.makeCylinder(form.root_radius, shaft, cq.Vector(0, 0, z0)))
            worm = worm.clean()
            expected += 2 * math.pi * form.root_radius ** 2 * shaft
    solids = worm.Solids()
    if len(solids) != 1 or not is_valid(solids[0]):
        raise GeometryError("the worm's solid came out invalid in the kernel's checker; try another module or "
                            "diameter factor")
    if abs(solids[0].Volume() / expected - 1) > WORM_VOLUME_TOLERANCE:
        raise GeometryError(f"the worm's solid has {solids[0].Volume():.6g} mm3 against {expected:.6g} mm3 from its "
                            f"section times its length (allowed: within {WORM_VOLUME_TOLERANCE:g})")
    return solids[0]
