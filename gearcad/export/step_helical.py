"""Helical and herringbone solids: a gear's outline (or a ring's tooth loops) swept along the helix (OCP).

The swept solid is unified, checked with OCP's BRepCheck and its volume against
the transverse area times the face width.  Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from ..errors import GeometryError, InputError
from .step_edges import _loop_wire, _Stats, kernel_quiet
from .step_solid import SolidBuild, _check_inputs, _face

if TYPE_CHECKING:
    from OCP.TopoDS import TopoDS_Face, TopoDS_Shape, TopoDS_Wire

    from ..geometry.shape import Part

__all__ = ["HELICAL_VOLUME_TOLERANCE", "helical_solid"]

HELICAL_VOLUME_TOLERANCE = 1e-6  # relative: a swept solid's volume against the transverse area x face width


def _adaptive_volume(shape: "TopoDS_Shape") -> float:
    """Kernel volume by adaptive integration (relative error 1e-10), mm³."""
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props, 1e-10, False)
    return props.Mass()


def _adaptive_area(face: "TopoDS_Face") -> float:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.SurfaceProperties_s(face, props, 1e-12)
    return props.Mass()


def _placed(shape: "TopoDS_Shape", turn: float = 0.0, z: float = 0.0) -> "TopoDS_Shape":
    """``shape`` turned by ``turn`` radians about the z axis, then moved up by ``z`` mm."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec

    move = gp_Trsf()
    move.SetTranslation(gp_Vec(0.0, 0.0, float(z)))
    rot = gp_Trsf()
    rot.SetRotation(gp_Ax1(gp_Pnt(0.0, 0.0, 0.0), gp_Dir(0.0, 0.0, 1.0)), float(turn))
    move.Multiply(rot)
    return BRepBuilderAPI_Transform(shape, move, True).Shape()


def _twisted(wire: "TopoDS_Wire", z0: float, length: float, start_turn: float, twist: float) -> "TopoDS_Shape":
    """The solid swept by ``wire`` (in z = 0) turned by ``start_turn`` and lifted to ``z0``, rising ``length`` mm
    while it turns by ``twist`` radians (positive counter-clockwise seen from +z): a pipe shell along the axis
    steered by an auxiliary helix, the exact screw motion."""
    import cadquery as cq
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.BRepOffsetAPI import BRepOffsetAPI_MakePipeShell
    from OCP.gp import gp_Pnt
    from OCP.TopoDS import TopoDS

    placed = TopoDS.Wire_s(_placed(wire, start_turn, z0))
    spine = BRepBuilderAPI_MakeWire(BRepBuilderAPI_MakeEdge(gp_Pnt(0.0, 0.0, z0), gp_Pnt(0.0, 0.0, z0 + length)).Edge()).Wire()
    pitch = 2 * math.pi * length / abs(twist)
    helix = cq.Wire.makeHelix(pitch, length, 1.0, center=cq.Vector(0.0, 0.0, z0), lefthand=twist < 0).wrapped
    shell = BRepOffsetAPI_MakePipeShell(spine)
    shell.SetMode(helix, False)
    shell.Add(placed)
    shell.SetTolerance(1e-7, 1e-7, 1e-6)
    shell.Build()
    if not shell.IsDone() or not shell.MakeSolid():
        raise GeometryError("the kernel could not sweep the outline along the helix")
    return shell.Shape()


def helical_solid(part: "Part", thickness: float, twist: float, tolerance: float, *, herringbone: bool = False,
                  gap: float = 0.0, gap_diameter: float = 0.0, twist_holes: bool = False) -> SolidBuild:
    """A helical or herringbone gear: the outer loop swept along the helix, holes straight through.

    The part's outer loop is the transverse section at mid-face (z = thickness / 2), so
    gears phased in the flat plan stay phased in mesh at mid-face.  A single helix turns
    the section by ``twist`` over the face (``b tan(beta) / r``, positive for a right
    hand: counter-clockwise seen from +z as z grows): the face at z = 0 is the section
    turned by ``-twist / 2``, the face at z = thickness by ``+twist / 2``.  A herringbone
    is two halves of opposite hand, each ``(thickness - gap) / 2`` long and turning at the
    same rate, meeting mid-face (where the section is the given one); a gap between them
    is a disc of ``gap_diameter`` (at most the root diameter).  Holes and round holes
    are cut straight through.  The solid is checked with OCP's BRepCheck and its volume
    against the transverse area times the face width (relative 1e-6).

    Parameters
    ----------
    part : Part
        Transverse section at mid-face, mm.
    thickness : float
        Face width, mm.
    twist : float
        Turn of a single helix over the whole face width, radians (signed by the hand).
    tolerance : float
        Largest distance of a given curve point from its B-spline edge, mm.
    herringbone : bool
        Two halves of opposite hand (the lower half turns with ``twist``'s sign).
    gap, gap_diameter : float
        Herringbone: the gap's length along the axis and the diameter of the disc filling it, mm.
    twist_holes : bool
        A ring gear: its teeth are the part's hole loops, which are swept along the helix (the gap of a
        herringbone ring is a disc of ``gap_diameter`` removed); the outer loop and round holes stay straight.
    """
    if twist_holes:
        return _helical_ring_solid(part, thickness, twist, tolerance, herringbone, gap, gap_diameter)
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut, BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder, BRepPrimAPI_MakePrism
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt, gp_Vec

    _check_inputs(part, thickness, tolerance)
    if not (math.isfinite(twist) and 0 < abs(twist) < 2 * math.pi):
        raise InputError(f"helix twist over the face must be above 0 and below one turn, got {twist!r} rad")
    if herringbone and not (math.isfinite(gap) and 0 <= gap < thickness):
        raise InputError(f"herringbone gap must be from 0 to below the face width {thickness:g} mm, got {gap!r}")
    if herringbone and gap > 0 and not (math.isfinite(gap_diameter) and gap_diameter > 0):
        raise InputError(f"herringbone gap needs a disc diameter above 0 mm, got {gap_diameter!r}")
    stats = _Stats()
    rate = twist / thickness
    with kernel_quiet():
        wire = _loop_wire(part.outer, tolerance, stats, f"{part.name} outer")
        area = _adaptive_area(BRepBuilderAPI_MakeFace(wire, True).Face())
        if not herringbone:
            shape = _twisted(wire, 0.0, thickness, -twist / 2, twist)
            expected = area * thickness
        else:
            half = (thickness - gap) / 2
            lower = _twisted(wire, 0.0, half, -rate * half, rate * half)
            upper = _twisted(wire, half + gap, half, 0.0, -rate * half)
            shape = BRepAlgoAPI_Fuse(lower, upper).Shape()
            expected = 2 * area * half
            if gap > 0:
                disc = BRepPrimAPI_MakeCylinder(gp_Ax2(gp_Pnt(0.0, 0.0, half), gp_Dir(0.0, 0.0, 1.0)), gap_diameter / 2, gap).Shape()
                shape = BRepAlgoAPI_Fuse(shape, disc).Shape()
                expected += math.pi * gap_diameter ** 2 / 4 * gap
        for k, hole in enumerate(part.holes):  # straight through: a bore is not twisted
            hole_face = BRepBuilderAPI_MakeFace(_loop_wire(hole, tolerance, stats, f"{part.name} hole {k}"), True).Face()
            hole_area = abs(_adaptive_area(hole_face))
            prism = BRepPrimAPI_MakePrism(hole_face, gp_Vec(0.0, 0.0, float(thickness))).Shape()
            shape = BRepAlgoAPI_Cut(shape, prism).Shape()
            expected -= hole_area * thickness
        for x, y, d in part.circles:
            axis = gp_Ax2(gp_Pnt(float(x), float(y), 0.0), gp_Dir(0.0, 0.0, 1.0))
            shape = BRepAlgoAPI_Cut(shape, BRepPrimAPI_MakeCylinder(axis, d / 2, float(thickness)).Shape()).Shape()
            expected -= math.pi * d * d / 4 * thickness
    return _checked_helical(shape, part.name, expected, stats, "helical solid", "the transverse area x face width")


def _helical_ring_solid(part: "Part", thickness: float, twist: float, tolerance: float, herringbone: bool,
                        gap: float, gap_diameter: float) -> SolidBuild:
    """A helical ring: the straight blank less its tooth loops swept along the helix (see :func:`helical_solid`)."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut, BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder, BRepPrimAPI_MakePrism
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt, gp_Vec

    from ..geometry.shape import Part as _Part

    _check_inputs(part, thickness, tolerance)
    if not (math.isfinite(twist) and 0 < abs(twist) < 2 * math.pi):
        raise InputError(f"helix twist over the face must be above 0 and below one turn, got {twist!r} rad")
    if herringbone and not (math.isfinite(gap) and 0 <= gap < thickness):
        raise InputError(f"herringbone gap must be from 0 to below the face width {thickness:g} mm, got {gap!r}")
    stats = _Stats()
    rate = twist / thickness
    with kernel_quiet():
        blank = _face(_Part(part.name, part.outer, (), part.circles), tolerance, stats)
        expected = _adaptive_area(blank) * thickness
        shape = BRepPrimAPI_MakePrism(blank, gp_Vec(0.0, 0.0, float(thickness))).Shape()
        for k, hole in enumerate(part.holes):
            wire = _loop_wire(hole.reversed(), tolerance, stats, f"{part.name} hole {k}")
            area = abs(_adaptive_area(BRepBuilderAPI_MakeFace(wire, True).Face()))
            if not herringbone:
                cutter = _twisted(wire, 0.0, thickness, -twist / 2, twist)
                expected -= area * thickness
            else:
                half = (thickness - gap) / 2
                cutter = BRepAlgoAPI_Fuse(_twisted(wire, 0.0, half, -rate * half, rate * half),
                                          _twisted(wire, half + gap, half, 0.0, -rate * half)).Shape()
                expected -= 2 * area * half
                if gap > 0:
                    axis = gp_Ax2(gp_Pnt(0.0, 0.0, half), gp_Dir(0.0, 0.0, 1.0))
                    cutter = BRepAlgoAPI_Fuse(cutter, BRepPrimAPI_MakeCylinder(axis, gap_diameter / 2, gap).Shape()).Shape()
                    expected -= math.pi * gap_diameter ** 2 / 4 * gap
            shape = BRepAlgoAPI_Cut(shape, cutter).Shape()
    return _checked_helical(shape, part.name, expected, stats, "helical ring",
                            "the blank less the transverse tooth area x face width")


def _checked_helical(shape: Any, name: str, expected: float, stats: "_Stats", what: str, reference: str) -> SolidBuild:
    """A swept helical shape unified, checked valid by BRepCheck and its volume against ``expected`` (mm³)."""
    from OCP.BRepCheck import BRepCheck_Analyzer
    from OCP.ShapeUpgrade import ShapeUpgrade_UnifySameDomain

    with kernel_quiet():
        unify = ShapeUpgrade_UnifySameDomain(shape, True, True, False)
        unify.Build()
        shape = unify.Shape()
        if not BRepCheck_Analyzer(shape).IsValid():
            raise GeometryError(f"part {name!r}: the kernel rejects the {what} as invalid")
        volume = _adaptive_volume(shape)
    if abs(volume - expected) > HELICAL_VOLUME_TOLERANCE * expected:
        raise GeometryError(f"part {name!r}: {what} volume {volume:.9g} mm³ differs from {reference} "
                            f"{expected:.9g} mm³ by more than {HELICAL_VOLUME_TOLERANCE:g}")
    return SolidBuild(shape, stats.splines, stats.poles, stats.worst, volume)
