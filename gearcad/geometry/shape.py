"""Planar parts as closed loops of true curves: the neutral form every writer consumes.

A :class:`Loop` is a closed chain of :class:`~gearcad.geometry.outline.Curve`
pieces (each curve's last point is the next one's first).  Outer loops run
counter-clockwise, holes clockwise.  A :class:`Part` is one flat piece: a gear
blank with its teeth and bore, or a plate with its shaft holes.  Lengths in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .gear import SpurGear
from .generate import DEFAULT_TOLERANCE, Curve, TipRelief, tooth_profile

__all__ = ["Loop", "Part", "gear_loop", "circle_loop", "polygon_area", "line_curve", "arc_curve", "rounded_rectangle"]


@dataclass(frozen=True)
class Loop:
    """A closed chain of curves, mm."""

    curves: tuple[Curve, ...]

    def points(self) -> np.ndarray:
        """The loop as an (N, 2) polyline; the first point is not repeated at the end."""
        parts = [c.points[:-1] for c in self.curves]
        return np.concatenate(parts)

    def area(self) -> float:
        """Signed area of the polyline (positive counter-clockwise), mm²."""
        return polygon_area(self.points())

    def reversed(self) -> "Loop":
        """The same loop run the other way."""
        return Loop(tuple(Curve(c.kind, c.points[::-1], -c.tangents[::-1], c.params[::-1], c.radius, c.centre)
                          for c in reversed(self.curves)))


@dataclass(frozen=True)
class Part:
    """One flat part: an outer loop, inner loops (holes), round holes and a label.

    Attributes
    ----------
    name : str
        Part name, used in file names and labels.
    outer : Loop
        Outer contour, counter-clockwise.
    holes : tuple of Loop
        Inner contours that are not plain circles (D-flat bores, keyways), clockwise.
    circles : tuple of (x, y, diameter)
        Plain round holes, mm.
    label : str
        Marking text (never cut).
    symmetry : int
        The outer loop is this many copies of its first ``len(curves) / symmetry``
        curves turned about the origin (a gear: its tooth count); writers and arc
        fitting may work on one copy.
    """

    name: str
    outer: Loop
    holes: tuple[Loop, ...] = ()
    circles: tuple[tuple[float, float, float], ...] = ()
    label: str = ""
    symmetry: int = 1

    def area(self) -> float:
        """Net area (outer minus holes and circles), mm²."""
        area = self.outer.area() + sum(h.area() for h in self.holes)
        return area - sum(math.pi * d * d / 4 for _, _, d in self.circles)


def polygon_area(points: np.ndarray) -> float:
    """Signed shoelace area of a closed polyline given without its closing point, mm²."""
    x, y = points[:, 0], points[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def gear_loop(gear: SpurGear, tolerance: float = DEFAULT_TOLERANCE, relief: TipRelief | None = None) -> Loop:
    """The full outline of ``gear`` as a loop: the tooth pitch's curves turned ``z`` times."""
    profile = tooth_profile(gear, tolerance, relief)
    z = gear.teeth
    curves: list[Curve] = []
    for k in range(z):
        curves.extend(c.transformed(rotation=2 * math.pi * k / z) for c in profile.curves)
    return Loop(_merge_arcs(curves))


def _merge_arcs(curves: list[Curve]) -> tuple[Curve, ...]:
    """Join neighbouring root-circle halves (space centre) into one arc each."""
    merged: list[Curve] = []
    for c in curves:
        if merged and c.kind == "root" and merged[-1].kind == "root":
            prev = merged.pop()
            c = Curve("root", np.concatenate([prev.points, c.points[1:]]), np.concatenate([prev.tangents, c.tangents[1:]]),
                      np.concatenate([prev.params, c.params[1:]]), c.radius, c.centre)
        merged.append(c)
    if len(merged) > 1 and merged[0].kind == "root" and merged[-1].kind == "root":
        last, first = merged.pop(), merged.pop(0)
        merged.insert(0, Curve("root", np.concatenate([last.points, first.points[1:]]),
                               np.concatenate([last.tangents, first.tangents[1:]]),
                               np.concatenate([last.params, first.params[1:]]), first.radius, first.centre))
    return tuple(merged)


def circle_loop(x: float, y: float, diameter: float, tolerance: float = DEFAULT_TOLERANCE, clockwise: bool = True) -> Loop:
    """A full circle as a loop of two half arcs (for writers that need loops), mm."""
    from .sampling import arc_step

    r = diameter / 2
    n = max(3, math.ceil(math.pi / arc_step(r, tolerance)) + 1)
    sign = -1.0 if clockwise else 1.0
    halves = []
    for start in (0.0, math.pi):
        angles = sign * np.linspace(start, start + math.pi, n)
        pts = np.column_stack((x + r * np.cos(angles), y + r * np.sin(angles)))
        tans = sign * np.column_stack((-np.sin(angles), np.cos(angles)))
        halves.append(Curve("arc", pts, tans, angles, r, (x, y)))
    return Loop(tuple(halves))


def line_curve(a: tuple[float, float], b: tuple[float, float]) -> Curve:
    """A straight segment from ``a`` to ``b`` (mm) as a curve of kind ``"line"``."""
    pts = np.array([a, b], dtype=float)
    direction = (pts[1] - pts[0]) / math.hypot(*(pts[1] - pts[0]))
    return Curve("line", pts, np.array([direction, direction]), np.array([0.0, 1.0]))


def arc_curve(centre: tuple[float, float], radius: float, start: float, stop: float, tolerance: float = DEFAULT_TOLERANCE) -> Curve:
    """Arc of radius ``radius`` (mm) about ``centre`` from polar angle ``start`` to ``stop`` (radians, either way)."""
    from .sampling import arc_step

    n = max(2, math.ceil(abs(stop - start) / arc_step(radius, tolerance)) + 1)
    angles = np.linspace(start, stop, n)
    radial = np.column_stack((np.cos(angles), np.sin(angles)))
    sign = 1.0 if stop >= start else -1.0
    tangents = sign * np.column_stack((-radial[:, 1], radial[:, 0]))
    return Curve("arc", np.asarray(centre) + radius * radial, tangents, angles, radius, (float(centre[0]), float(centre[1])))


def rounded_rectangle(width: float, height: float, radius: float, tolerance: float = DEFAULT_TOLERANCE) -> Loop:
    """A counter-clockwise rectangle from (0, 0) to (width, height) with rounded corners, mm."""
    r = min(radius, width / 2, height / 2)
    if r <= 0:
        corners = [(0.0, 0.0), (width, 0.0), (width, height), (0.0, height)]
        return Loop(tuple(line_curve(corners[i], corners[(i + 1) % 4]) for i in range(4)))
    quarter = math.pi / 2
    centres = [(width - r, r), (width - r, height - r), (r, height - r), (r, r)]
    curves: list[Curve] = []
    for k, (cx, cy) in enumerate(centres):
        start = -quarter + k * quarter
        arc = arc_curve((cx, cy), r, start, start + quarter, tolerance)
        if curves:
            curves += _joining_line(curves[-1].points[-1], arc.points[0])
        curves.append(arc)
    curves += _joining_line(curves[-1].points[-1], curves[0].points[0])
    return Loop(tuple(curves))


def _joining_line(a: np.ndarray, b: np.ndarray) -> list[Curve]:
    """The straight between two corner arcs, or none where they meet (a radius of half the side: a stadium)."""
    if math.hypot(*(np.asarray(b) - np.asarray(a))) <= 1e-12:
        return []
    return [line_curve(tuple(a), tuple(b))]
