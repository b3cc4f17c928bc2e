"""The worm wheel's solid (STEP, STL) from its generated slices, and the worm placed in mesh with it.

Kernel code lives only in ``export/step*.py``, imported inside functions.  The geometry comes from
:mod:`gearcad.geometry.worm_wheel_sections` (one tooth pitch a slice, in matched runs); this module only
turns it into a solid:

* each slice becomes a closed wire: the three runs of one tooth as cubic B-splines through their points
  at the same parameters in every slice (so neighbouring slices' curves are compatible), turned to every
  tooth;
* each span of slices between the rim's kinks is lofted smoothly through its wires (the kernel's
  ``BRepOffsetAPI_ThruSections``, one surface a run a tooth), the spans' faces and the two end faces are
  sewn into one shell and closed into a solid.

Why not one loft through unmatched outlines (tried first, 2 % off the slices' volume): a loft joins the
n-th point of one slice to the n-th of the next.  When the runs are not cut at the tip corners, a point
near a corner in one slice is joined to a point round the corner in the next, and the surface cuts
across the corner; a smooth loft through the throated rim's kink swings past the kink.  Matched runs
and spans split at the kinks leave the solid within a few parts in 10^5 of the slices' volume
(measured in ``tests/benchmarks/bench_worm.py``).

Lengths in mm.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any, Sequence

import numpy as np

from ..errors import GeometryError

if TYPE_CHECKING:
    from ..geometry.worm_wheel import ThreadForm
    from ..geometry.worm_wheel_sections import ToothSection

__all__ = ["wheel_solid", "helical_wheel_solid", "placed_worm", "solid_volume", "WHEEL_VOLUME_TOLERANCE"]

WHEEL_VOLUME_TOLERANCE = 5e-3  # relative: the wheel's volume against the slices' areas integrated (Simpson)


def solid_volume(shape: Any) -> float:
    """The kernel's volume of a shape by adaptive integration (relative error 1e-4 estimated, about 1e-6 found), mm³.

    The kernel's default (a fixed Gauss rule a face) came out 0.37 % low on a throated wheel whose slices
    the solid matched to 1e-5: its lofted faces carry many knots.
    """
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(getattr(shape, "wrapped", shape), props, 1e-4, False)
    return props.Mass()


def _spline(points: np.ndarray, z: float) -> Any:
    """The cubic B-spline through ``points`` (in the plane ``z``) at evenly spaced parameters 0..1."""
    from OCP.GeomAPI import GeomAPI_Interpolate
    from OCP.gp import gp_Pnt
    from OCP.TColgp import TColgp_HArray1OfPnt
    from OCP.TColStd import TColStd_HArray1OfReal

    n = len(points)
    pts = TColgp_HArray1OfPnt(1, n)
    par = TColStd_HArray1OfReal(1, n)
    for i, (x, y) in enumerate(points, start=1):
        pts.SetValue(i, gp_Pnt(float(x), float(y), float(z)))
        par.SetValue(i, (i - 1) / (n - 1))
    try:
        interp = GeomAPI_Interpolate(pts, par, False, 1e-9)
        interp.Perform()
    except Exception as exc:  # the kernel's Standard_Failure (coincident points)
        raise GeometryError(f"the wheel's tooth could not be drawn as a B-spline: {exc}") from exc
    if not interp.IsDone():
        raise GeometryError("the wheel's tooth could not be drawn as a B-spline")
    return interp.Curve()


def _section_wire(section: "ToothSection", teeth: int) -> Any:
    """The slice's closed outline (an end face's edge): the tooth's three runs turned to every tooth."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.TopTools import TopTools_ListOfShape

    curves = [_spline(run, section.c) for run in section.runs]
    edges = TopTools_ListOfShape()
    for k in range(teeth):
        for curve in curves:
            edges.Append(BRepBuilderAPI_MakeEdge(curve.Transformed(_turn(k, teeth))).Edge())
    wire = BRepBuilderAPI_MakeWire()
    wire.Add(edges)
    if not wire.IsDone():
        raise GeometryError("the wheel's outline could not be closed (a tooth's runs do not meet)")
    return wire.Wire()


def _turn(k: int, teeth: int) -> Any:
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf

    turn = gp_Trsf()
    turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), 2 * math.pi * k / teeth)
    return turn


def _tooth_faces(span: Sequence["ToothSection"]) -> Any:
    """The smooth surfaces through one tooth's three runs in every slice of ``span`` (a shell of three faces).

    One loft for the whole tooth: the kernel picks one parameter a slice for the loft, so the tooth's
    side edges are one curve turned by a pitch, and turned copies of the tooth meet exactly (lofting each run
    apart gave each its own parameters and gaps of about a micrometre between them).
    """
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.BRepOffsetAPI import BRepOffsetAPI_ThruSections

    loft = BRepOffsetAPI_ThruSections(False, False, 1e-6)
    loft.CheckCompatibility(False)  # the runs are matched point for point already
    for s in span:
        wire = BRepBuilderAPI_MakeWire()
        for run in s.runs:
            wire.Add(BRepBuilderAPI_MakeEdge(_spline(run, s.c)).Edge())
        if not wire.IsDone():
            raise GeometryError("the wheel's tooth could not be drawn (its runs do not meet)")
        loft.AddWire(wire.Wire())
    loft.Build()
    if not loft.IsDone():
        raise GeometryError("the kernel could not loft the wheel's slices")
    return loft.Shape()


def wheel_solid(form: "ThreadForm", spans: Sequence[Sequence["ToothSection"]], expected_volume: float) -> Any:
    """The worm wheel as one solid (an OCP shape), axis along z, mid-plane at z = 0.

    One tooth's three faces are lofted a span and turned to every tooth; the faces and the two end faces
    are sewn into a shell and closed.

    Parameters
    ----------
    form : ThreadForm
    spans : sequence of sequences of ToothSection
        The tooth's slices in spans between the rim's kinks, ascending, neighbouring spans sharing a slice
        (:func:`gearcad.geometry.worm_wheel_sections.tooth_sections`).
    expected_volume : float
        The slices' areas integrated over the face width, mm³; the solid must come within
        :data:`WHEEL_VOLUME_TOLERANCE` of it.

    Raises
    ------
    GeometryError
        The kernel's result is not one valid solid, or its volume is off.
    """
    from OCP.BRepBuilderAPI import (BRepBuilderAPI_MakeFace, BRepBuilderAPI_MakeSolid, BRepBuilderAPI_Sewing,
                                    BRepBuilderAPI_Transform)
    from OCP.BRepLib import BRepLib
    from OCP.TopAbs import TopAbs_SHELL
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    from .step import kernel_quiet
    from .step_worm import is_valid

    teeth = form.wheel_teeth
    with kernel_quiet():
        sewing = BRepBuilderAPI_Sewing(1e-6)
        for span in spans:
            tooth = _tooth_faces(span)
            for k in range(teeth):
                sewing.Add(BRepBuilderAPI_Transform(tooth, _turn(k, teeth), True).Shape())
        for end in (spans[0][0], spans[-1][-1]):
            cap = BRepBuilderAPI_MakeFace(_section_wire(end, teeth), True)
            if not cap.IsDone():
                raise GeometryError("the kernel could not close the wheel's end faces")
            sewing.Add(cap.Face())
        sewing.Perform()
        explorer = TopExp_Explorer(sewing.SewedShape(), TopAbs_SHELL)
        if not explorer.More():
            raise GeometryError("the wheel's faces did not close into a shell")
        shell = TopoDS.Shell_s(explorer.Current())
        explorer.Next()
        if explorer.More():
            raise GeometryError("the wheel's faces came out as more than one shell")
        solid = BRepBuilderAPI_MakeSolid(shell).Solid()
        BRepLib.OrientClosedSolid_s(solid)  # faces outwards
    if not is_valid(solid):
        raise GeometryError("the wheel's solid came out invalid in the kernel's checker; try more slices or "
                            "another diameter factor")
    volume = solid_volume(solid)
    if not abs(volume / expected_volume - 1) <= WHEEL_VOLUME_TOLERANCE:
        raise GeometryError(f"the wheel's solid has {volume:.6g} mm3 against {expected_volume:.6g} mm3 from its "
                            f"slices (allowed: within {WHEEL_VOLUME_TOLERANCE:.1%})")
    return solid


def helical_wheel_solid(wheel: Any, tolerance: float = 1e-3) -> Any:
    """A wheel approximated by a helical gear (:class:`gearcad.meshes.worm_helical.HelicalWheel`) as a solid (an
    OCP shape), axis along z, mid-face at z = 0 (as the generated wheel's mid-plane).

    The section is swept along the helix by :func:`gearcad.export.step_helical.helical_solid`, which checks it in
    OCP's checker and its volume against the transverse area times the face width; ``tolerance`` is the largest
    distance of the outline's points from its B-spline edges, mm.
    """
    from ..meshes.worm_helical import helical_wheel_part
    from .step_helical import _placed, helical_solid

    build = helical_solid(helical_wheel_part(wheel, tolerance), wheel.face_width, wheel.twist, tolerance)
    return _placed(build.solid, 0.0, -wheel.face_width / 2)


def placed_worm(worm: Any, form: "ThreadForm") -> Any:
    """The worm solid (axis z, threads over ``[0, length]``) placed in mesh with the wheel at the origin.

    The worm's axis goes along x through ``(0, a, 0)``, its threads centred on x = 0, turned so its thread
    stands where the hob simulation put it at ``psi = 0`` (:mod:`gearcad.geometry.worm_wheel`): a thread
    centred on ``u = k p_x`` in the axial section towards the wheel.
    """
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Ax2, gp_Ax3, gp_Dir, gp_Pnt, gp_Trsf

    # In the worm's own frame the section towards +x (angle 0) has threads centred on z = k p_x
    # (worm_solid's sweep starts there); the section at angle phi, on z = k p_x + p phi.
    shift = (form.length / 2) % form.axial_pitch
    turn = gp_Trsf()
    turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), -shift / form.lead_parameter)
    # Frame change: own z -> world x, own x (the section at angle 0) -> world -y; origin at (-L/2, a, 0).
    frame = gp_Trsf()
    frame.SetDisplacement(gp_Ax3(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1), gp_Dir(1, 0, 0)),
                          gp_Ax3(gp_Ax2(gp_Pnt(-form.length / 2, form.centre_distance, 0), gp_Dir(1, 0, 0),
                                        gp_Dir(0, -1, 0))))
    shape = getattr(worm, "wrapped", worm)
    return BRepBuilderAPI_Transform(shape, frame.Multiplied(turn), True).Shape()
