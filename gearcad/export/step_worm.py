"""The worm's solid (STEP, STL), built with the OCP kernel through cadquery.

Kernel code lives only in ``export/step*.py``, imported inside functions, so ``import gearcad`` never
loads the kernel.  The geometry comes from :mod:`gearcad.geometry.worm_wheel` (the thread's axial
section, the wheel's slices as the worm cuts them); this module only turns it into solids:

* the worm: the axial section of one thread swept along a helix of the worm's lead with the Frenet
  frame (a helix's Frenet frame moves by a screw motion, so the swept flank is the helicoid itself),
  one sweep per start, fused with the root cylinder and trimmed to the threaded length, with a shaft
  of the root diameter beyond each end.  Axis along z, threads from ``z = 0`` to the threaded length.
The wheel has no solid yet: a loft through its generated slices came out 2 % off their volume
(one B-spline edge a tooth), and the blank minus lofted tooth spaces took about 5 s a tooth in the
kernel's boolean.  Its generated slices (:mod:`gearcad.geometry.worm_wheel`) are the reference.

Lengths in mm.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any, Sequence

import numpy as np

from ..errors import GeometryError, InputError

if TYPE_CHECKING:
    from ..geometry.worm_wheel import ThreadForm

__all__ = ["worm_solid", "is_valid"]


def is_valid(shape: Any) -> bool:
    """OCP's own checker (BRepCheck_Analyzer) on a shape or cadquery object."""
    from OCP.BRepCheck import BRepCheck_Analyzer

    wrapped = getattr(shape, "wrapped", shape)
    return bool(BRepCheck_Analyzer(wrapped).IsValid())


def _profile_wire(form: "ThreadForm", section: np.ndarray, z0: float):
    """One thread's axial section in the XZ plane (x = radius, z = axial), moved by ``z0``."""
    import cadquery as cq

    r, u = section[:, 1], section[:, 0]
    n = len(section) // 2
    right, left = section[:n], section[n:]
    if form.flank == "za":  # straight flanks: four exact lines
        corners = [(right[0][1], right[0][0] + z0), (right[-1][1], right[-1][0] + z0),
                   (left[0][1], left[0][0] + z0), (left[-1][1], left[-1][0] + z0)]
        return cq.Workplane("XZ").polyline(corners).close().wires().val()
    edges = [
        cq.Edge.makeSpline([cq.Vector(float(x), 0, float(z) + z0) for z, x in right]),
        cq.Edge.makeLine(cq.Vector(float(right[-1][1]), 0, float(right[-1][0]) + z0),
                         cq.Vector(float(left[0][1]), 0, float(left[0][0]) + z0)),
        cq.Edge.makeSpline([cq.Vector(float(x), 0, float(z) + z0) for z, x in left]),
        cq.Edge.makeLine(cq.Vector(float(left[-1][1]), 0, float(left[-1][0]) + z0),
                         cq.Vector(float(right[0][1]), 0, float(right[0][0]) + z0)),
    ]
    del r, u
    return cq.Wire.assembleEdges(edges)


def worm_solid(form: "ThreadForm", section: np.ndarray, *, shaft: float = 0.0, left_hand: bool = False) -> Any:
    """The worm as a solid (a cadquery Solid), axis along z, threads over ``[0, length]``.

    Parameters
    ----------
    form : ThreadForm
    section : numpy.ndarray
        One thread's axial section ``(u, r)`` from the root (or below it, into the core) to the tip,
        right flank root to tip then left flank tip to root, mm
        (:func:`gearcad.geometry.worm_wheel.axial_section`).
    shaft : float
        Length of plain shaft (root diameter) beyond each end, mm.
    left_hand : bool
        A left-hand thread.

    Raises
    ------
    GeometryError
        The kernel's result is not a valid solid.
    """
    import cadquery as cq

    from .step import kernel_quiet

    lead = form.lead_parameter * 2 * math.pi
    length = form.length
    height = length + 2 * lead
    with kernel_quiet():
        body = cq.Solid.makeCylinder(form.root_radius, height, cq.Vector(0, 0, -lead))
        for k in range(form.starts):
            profile = _profile_wire(form, section, -lead)
            helix = cq.Wire.makeHelix(lead, height, form.reference_radius, center=cq.Vector(0, 0, -lead),
                                      lefthand=left_hand)
            thread = cq.Solid.sweep(profile, [], helix, makeSolid=True, isFrenet=True)
            body = body.fuse(thread.rotate(cq.Vector(0, 0, 0), cq.Vector(0, 0, 1), 360.0 * k / form.starts))
        worm = body.intersect(cq.Solid.makeCylinder(form.tip_radius * 2, length, cq.Vector(0, 0, 0)))
        core_volume = math.pi * form.root_radius ** 2 * length
        if shaft > 0:
            for z0 in (-shaft, length):
                worm = worm.fuse(cq.Solid.makeCylinder(form.root_radius, shaft, cq.Vector(0, 0, z0)))
        worm = worm.clean()
    # The kernel's boolean has been seen to drop a swept thread without an error (a single-start worm of
    # q 10): refuse a worm with no more volume than its core.
    if worm.Volume() < core_volume * 1.05:
        raise GeometryError("the kernel lost the worm's thread while building the solid (a known fault for some "
                            "single-start worms); the figures and the wheel's drawing stand; try another diameter factor")
    solids = worm.Solids()
    if len(solids) != 1 or not is_valid(solids[0]):
        raise GeometryError("the worm's solid came out invalid in the kernel's checker; try another module or "
                            "diameter factor")
    return solids[0]
