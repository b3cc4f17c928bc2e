"""The pinion-type cutter that generates a ring's teeth (see :mod:`gearcad.geometry.internal`).

Pure numpy; lengths mm, angles radians; the cutter frame has tooth 0 on +x.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError
from ..profiles import ToothSystem
from .involute import inv
from .involute_curve import involute_points, roll_angle_at

__all__ = ["Cutter", "make_cutter", "cutter_outline"]


@dataclass(frozen=True)
class Cutter:
    """Pinion-type cutter figures, mm and radians, cutter frame (tooth 0 on +x)."""

    teeth: int
    base_radius: float
    tip_radius: float
    half_angle_at_base: float  # s0/d0 + inv(alpha)
    rho: float  # tip round radius
    centre: tuple[float, float]  # upper tip round's centre
    touch_roll: float  # roll angle where the round meets the involute
    land: float  # polar angle of the round's centre: half angle of the tip land


def _round_on(rb: float, ra: float, psi: float, rho: float) -> tuple[float, np.ndarray, float]:
    """Touch roll angle, centre and centre polar angle of a tip round of radius ``rho`` (upper corner)."""
    t_touch = float(roll_angle_at(ra - rho, rb)) + rho / rb  # the inward parallel of an involute is an involute
    phi = psi - t_touch
    touch = involute_points(rb, psi, np.array([t_touch]))[0]
    centre = touch - rho * np.array([-math.sin(phi), math.cos(phi)])
    return t_touch, centre, math.atan2(centre[1], centre[0])


def make_cutter(teeth: int, shift: float, module: float, system: ToothSystem) -> Cutter:
    """The cutter; its tip round is the system's fillet radius, or a full round where that does not fit."""
    alpha = system.pressure_angle
    r0 = teeth * module / 2
    rb = r0 * math.cos(alpha)
    ra = r0 + module * (system.dedendum + shift)
    psi = (math.pi / 2 + 2 * shift * math.tan(alpha)) / teeth + inv(alpha)
    if ra <= rb or psi - inv(math.acos(rb / ra)) <= 0:
        raise GeometryError(f"a {teeth}-tooth cutter with shift {shift:g} has pointed teeth or tips inside its base "
                            "circle; use a cutter with more teeth or a smaller cutter shift")
    rho = system.fillet_radius * module
    if rho > 0:
        lo, hi = 0.0, min(rho, ra - rb)
        if _round_on(rb, ra, psi, hi)[2] > 0:
            lo = hi
        else:  # full round: the largest radius whose centre stays on this side of the tooth's centre line
            for _ in range(100):
                mid = 0.5 * (lo + hi)
                if mid in (lo, hi):
                    break
                lo, hi = (mid, hi) if _round_on(rb, ra, psi, mid)[2] > 0 else (lo, mid)
        rho = lo
    t_touch, centre, land = _round_on(rb, ra, psi, rho)
    if land < 1e-9:
        centre, land = np.array([math.hypot(*centre), 0.0]), 0.0
    return Cutter(teeth, rb, ra, psi, rho, (float(centre[0]), float(centre[1])), t_touch, land)


def cutter_outline(cutter: Cutter, count: int = 24) -> np.ndarray:
    """Points of cutter tooth 0 above the base circle: both flanks, both rounds, the land (cutter frame)."""
    rb, rho = cutter.base_radius, cutter.rho
    flank = involute_points(rb, cutter.half_angle_at_base, np.linspace(0.0, cutter.touch_roll, count))
    phi = cutter.half_angle_at_base - cutter.touch_roll
    normals = np.linspace(phi + math.pi / 2, cutter.land, count)
    corner = np.asarray(cutter.centre) + rho * np.column_stack((np.cos(normals), np.sin(normals)))
    land = cutter.tip_radius * np.column_stack((np.cos(np.linspace(cutter.land, 0, 6)), np.sin(np.linspace(cutter.land, 0, 6))))
    upper = np.concatenate([flank, corner, land])
    return np.concatenate([upper, upper * (1.0, -1.0)])

