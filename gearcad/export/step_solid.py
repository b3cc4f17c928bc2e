"""Flat parts extruded into checked solids (OCP), hubs fused on, tubes and fused compound parts.

Each solid is checked with OCP's BRepCheck and its volume against the part's
area times its thickness.  The kernel is imported inside the functions.
Lengths in mm, angles in degrees at the interface.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from ..errors import GeometryError, InputError
from .step_edges import _circle_wire, _loop_wire, _Stats, kernel_quiet

if TYPE_CHECKING:
    from OCP.TopoDS import TopoDS_Face, TopoDS_Shape, TopoDS_Solid

    from ..geometry.shape import Part

__all__ = ["SolidBuild", "VOLUME_TOLERANCE", "build_solid", "with_hub", "gear_solid", "tube_solid", "fuse_placed"]

VOLUME_TOLERANCE = 1e-3  # relative: the solid's volume must match area x thickness this closely


def _shape(obj: Any) -> "TopoDS_Shape":
    """An OCP shape from an OCP shape or a cadquery object (``.wrapped``)."""
    return getattr(obj, "wrapped", obj)


def _check_inputs(part: "Part", thickness: float, tolerance: float) -> None:
    if not (math.isfinite(thickness) and thickness > 0):
        raise InputError(f"thickness must be greater than 0 mm, got {thickness!r}")
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InputError(f"tolerance must be greater than 0 mm, got {tolerance!r}")
    if part.outer.area() <= 0:
        raise InputError(f"part {part.name!r}: the outer loop must run counter-clockwise")
    for k, hole in enumerate(part.holes):
        if hole.area() >= 0:
            raise InputError(f"part {part.name!r}: hole {k} must run clockwise")


def _face(part: "Part", tolerance: float, stats: _Stats, join: bool = False) -> "TopoDS_Face":
    """The part's planar face; ``join``: each tooth space's bottom one edge (see ``step_edges._runs``)."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace

    maker = BRepBuilderAPI_MakeFace(_loop_wire(part.outer, tolerance, stats, f"{part.name} outer", join), True)
    for k, hole in enumerate(part.holes):
        maker.Add(_loop_wire(hole, tolerance, stats, f"{part.name} hole {k}", join))
    for x, y, d in part.circles:
        maker.Add(_circle_wire(x, y, d))
    if not maker.IsDone():
        raise GeometryError(f"part {part.name!r}: cannot make a planar face of its loops")
    return maker.Face()


def _volume(shape: "TopoDS_Shape") -> float:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props)
    return props.Mass()


def _check_solid(solid: "TopoDS_Solid", part: "Part", thickness: float) -> float:
    from OCP.BRepCheck import BRepCheck_Analyzer

    if not BRepCheck_Analyzer(solid).IsValid():
        raise GeometryError(f"part {part.name!r}: the kernel rejects the solid as invalid")
    volume = _volume(solid)
    expected = part.area() * thickness
    if abs(volume - expected) > VOLUME_TOLERANCE * expected:
        raise GeometryError(f"part {part.name!r}: solid volume {volume:.6g} mm³ differs from "
                            f"area x thickness {expected:.6g} mm³ by more than {VOLUME_TOLERANCE:.1%}")
    return volume


@dataclass(frozen=True)
class SolidBuild:
    """A solid and how it was made.

    Attributes
    ----------
    solid : OCP.TopoDS.TopoDS_Solid
        The part extruded from z = 0 to z = thickness, mm.
    splines : int
        B-spline edges in the outline.
    poles : int
        Control points of all B-spline edges together.
    worst_deviation : float
        Largest distance of a given curve point from its spline, mm.
    volume : float
        Kernel volume, mm³.
    """

    solid: Any
    splines: int
    poles: int
    worst_deviation: float
    volume: float


def build_solid(part: "Part", thickness: float, tolerance: float) -> SolidBuild:
    """Extrude ``part`` into a checked solid; see :func:`gear_solid`.

    Returns
    -------
    SolidBuild
    """
    from OCP.BRepPrimAPI import BRepPrimAPI_MakePrism
    from OCP.gp import gp_Vec
    from OCP.TopoDS import TopoDS

    _check_inputs(part, thickness, tolerance)
    stats = _Stats()
    with kernel_quiet():
        face = _face(part, tolerance, stats, join=True)
        prism = BRepPrimAPI_MakePrism(face, gp_Vec(0.0, 0.0, float(thickness)))
        solid = TopoDS.Solid_s(prism.Shape())
        volume = _check_solid(solid, part, thickness)
    return SolidBuild(solid, stats.splines, stats.poles, stats.worst, volume)


def with_hub(build: SolidBuild, hub: "Part", thickness: float, length: float, tolerance: float) -> SolidBuild:
    """Fuse a hub (the flat part ``hub`` extruded by ``length`` mm) onto the top face of a built solid.

    The hub stands on z = ``thickness``; the result is checked for validity and
    for the volume of both pieces (0.1 %).
    """
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Trsf, gp_Vec
    from OCP.ShapeUpgrade import ShapeUpgrade_UnifySameDomain

    boss = build_solid(hub, length, tolerance)
    with kernel_quiet():
        move = gp_Trsf()
        move.SetTranslation(gp_Vec(0.0, 0.0, float(thickness)))
        placed = BRepBuilderAPI_Transform(boss.solid, move, True).Shape()
        fused = BRepAlgoAPI_Fuse(build.solid, placed).Shape()
        unify = ShapeUpgrade_UnifySameDomain(fused, True, True, False)
        unify.Build()
        shape = unify.Shape()
        volume = _volume(shape)
    expected = build.volume + boss.volume
    if abs(volume - expected) > 1e-3 * expected:
        raise GeometryError(f"{hub.name}: the gear with its hub has volume {volume:.4g} mm³, expected {expected:.4g}")
    return SolidBuild(shape, build.splines, build.poles, build.worst_deviation, volume)


def gear_solid(part: "Part", thickness: float, tolerance: float) -> "TopoDS_Solid":
    """The solid of a flat part: its face extruded from z = 0 to z = ``thickness``.

    Parameters
    ----------
    part : Part
        Outer loop (counter-clockwise), holes (clockwise) and round holes, mm.
    thickness : float
        Extrusion length along +z, mm.
    tolerance : float
        Largest distance of a given curve point from its B-spline edge, mm.

    Returns
    -------
    OCP.TopoDS.TopoDS_Solid

    Raises
    ------
    InputError
        Thickness or tolerance not positive, loops running the wrong way.
    GeometryError
        Curves that do not join, an invalid solid, or a volume off
        ``part.area() * thickness`` by more than 0.1 %.
    """
    return build_solid(part, thickness, tolerance).solid


def tube_solid(diameter: float, bore: float, length: float) -> Any:
    """An exact cylinder (``bore`` 0) or tube along +z from z = 0, mm: shafts, pipes, spacers, pillars, screws."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder

    if not (diameter > bore >= 0 and length > 0):
        raise InputError(f"a tube needs diameter > bore >= 0 and length > 0 mm, got {diameter!r}, {bore!r}, {length!r}")
    with kernel_quiet():
        shape = BRepPrimAPI_MakeCylinder(diameter / 2, length).Shape()
        if bore > 0:
            shape = BRepAlgoAPI_Cut(shape, BRepPrimAPI_MakeCylinder(bore / 2, length).Shape()).Shape()
    return shape


def fuse_placed(items: Sequence[Any], x: float, y: float, hub_z: float, hub_length: float, hub_diameter: float,
                hole: float, tolerance: float) -> Any:
    """One solid of placed parts (a compound pair) and a hub (``hub_diameter`` with a ``hole`` bore, mm) between them.

    The result sits in the part's own frame: the axis at (0, 0), the lowest face at z = 0.
    """
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Fuse
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec

    low = min(it.z for it in items)
    shapes = []
    for it in items:
        turn, move = gp_Trsf(), gp_Trsf()
        turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), math.radians(it.rotation_deg))
        move.SetTranslation(gp_Vec(0.0, 0.0, float(it.z - low)))
        shapes.append(BRepBuilderAPI_Transform(_shape(it.solid), move.Multiplied(turn), True).Shape())
    if hub_length > 1e-9:
        move = gp_Trsf()
        move.SetTranslation(gp_Vec(0.0, 0.0, float(hub_z - low)))
        shapes.append(BRepBuilderAPI_Transform(tube_solid(hub_diameter, hole, hub_length), move, True).Shape())
    with kernel_quiet():
        fused = shapes[0]
        for other in shapes[1:]:
            fused = BRepAlgoAPI_Fuse(fused, other).Shape()
    return fused
