"""The worm's thread form and the wheel it generates as a hob (pure numpy and shapely).

Frames (mm, radians).  The wheel turns about the z axis through the origin; its mid-plane is
``z = 0``.  The worm's axis is parallel to x through ``(0, a, 0)``.  A point of the worm has
an axial coordinate ``u`` (= x), a radius ``r`` from the worm's axis and an angle ``phi`` about
it, 0 towards the wheel's centre.

**Thread form.**  The axial section (``phi = 0``) holds a thread every axial pitch ``p_x``; the
thread centred at ``u = 0`` occupies ``|u| <= h(r)`` for ``r_f <= r <= r_a``, with
``h(r_1) = p_x / 4`` (thread and space equal on the reference cylinder):

* ZA (straight in the axial section): ``h(r) = p_x / 4 - (r - r_1) tan(alpha_x)``;
* ZI (involute helicoid): a transverse section of the worm is an involute of the base circle
  ``r_b``, whose polar angle grows as ``inv(alpha_r) = tan(alpha_r) - alpha_r`` with
  ``cos(alpha_r) = r_b / r``.  Turning that point back to ``phi = 0`` moves it axially by the lead
  parameter ``p = p_z / (2 pi)`` times the angle, so ``h(r) = p_x / 4 - p (inv(alpha_r) - inv(alpha_r1))``.
  Its slope at ``r_1`` is ``p tan(alpha_t) / r_1 = tan(gamma) tan(alpha_t) = tan(alpha_x)``
  (checked in the tests);
* ZN (straight in the thread's normal section) and ZK (a biconical disc tool's envelope): no closed form
  in ``r`` for ZK, and both by two constructions, in :mod:`gearcad.geometry.worm_flanks`.

The worm is a right-hand screw: the section at angle ``phi`` is the axial one moved by ``p phi`` along the
axis, ``phi`` turning about +x (from the wheel's centre, ``-y``, towards ``-z``), and turning the worm by
``psi`` moves its thread by ``-p psi``.

**The wheel as the worm cuts it.**  The wheel turns by ``theta = psi z1 / z2`` as the worm turns by
``psi`` (rolling at the wheel's reference circle: ``p psi = r_2 theta``).  In each transverse slice
``z = c`` of the wheel, the worm's section is a rack-like row of teeth (asymmetric off the
mid-plane); placed in the wheel's frame for many generating positions ``psi`` and unioned, one
thread sweeps one tooth space.  The slice of the wheel is its blank minus that space repeated
``z2`` times.  This is the simulated hob: it leaves the envelope of the thread, exactly up to the
spacing of the generating positions (scallops of the order ``(delta)^2 / (8 rho)``; measured by
:func:`interference` with positions between those that cut).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely.affinity import rotate
from shapely.geometry import Point, Polygon, box
from shapely.ops import unary_union

from ..errors import InputError

__all__ = ["ThreadForm", "half_thickness", "axial_section", "transverse_flank", "worm_slice", "wheel_slice", "wheel_slices",
           "interference", "Interference", "tooth_space", "default_positions", "least_gaps"]


@dataclass(frozen=True)
class ThreadForm:
    """Everything the hob simulation needs about a worm pair (mm, radians).

    Attributes
    ----------
    starts, wheel_teeth : int
    module : float
        Axial module, mm.
    reference_radius, tip_radius, root_radius : float
        Of the worm, mm.
    flank : str
        ``"za"``, ``"zi"``, ``"zn"`` or ``"zk"``.
    axial_pressure_angle : float
        ZA's flank angle in the axial section, radians.
    base_radius : float
        ZI's base cylinder, mm (0 for ZA).
    centre_distance : float
        mm.
    length : float
        Threaded length of the worm, mm (centred on the wheel's mid-plane).
    wheel_throat_radius, wheel_outside_radius, throat_surface_radius : float
        The wheel's tip radius in the mid-plane, its outside radius and the radius of its concave rim, mm.
    face_width : float
        The wheel's face width, mm.
    normal_pressure_angle : float
        ZN: the flank line's angle in the thread's normal section; ZK: the tool's profile angle, radians.
    tool_radius : float
        ZK: the tool's radius where it meets the worm's reference cylinder, mm (0 otherwise).
    """

    starts: int
    wheel_teeth: int
    module: float
    reference_radius: float
    tip_radius: float
    root_radius: float
    flank: str
    axial_pressure_angle: float
    base_radius: float
    centre_distance: float
    length: float
    wheel_throat_radius: float
    wheel_outside_radius: float
    throat_surface_radius: float
    face_width: float
    normal_pressure_angle: float = 0.0
    tool_radius: float = 0.0

    @property
    def axial_pitch(self) -> float:
        """``pi m_x``, mm."""
        return math.pi * self.module

    @property
    def lead_parameter(self) -> float:
        """``p = p_z / (2 pi)``: axial advance per radian, mm."""
        return self.starts * self.axial_pitch / (2 * math.pi)

    @property
    def wheel_reference_radius(self) -> float:
        """``z2 m_x / 2``, mm."""
        return self.wheel_teeth * self.module / 2


def _involute_angle(radius: np.ndarray, base_radius: float) -> np.ndarray:
    alpha = np.arccos(np.clip(base_radius / radius, -1.0, 1.0))
    return np.tan(alpha) - alpha


def half_thickness(form: ThreadForm, radius: np.ndarray | float) -> np.ndarray:
    """Half the thread's axial thickness ``h(r)`` at ``radius`` (mm), mm."""
    r = np.asarray(radius, dtype=float)
    quarter = form.axial_pitch / 4
    if form.flank == "za":
        return quarter - (r - form.reference_radius) * math.tan(form.axial_pressure_angle)
    if form.flank == "zi":
        r_eff = np.maximum(r, form.base_radius)
        inv = _involute_angle(r_eff, form.base_radius) - _involute_angle(np.array(form.reference_radius), form.base_radius)
        # below the base cylinder the flank goes on radially (the thread is not involute there)
        return quarter - form.lead_parameter * inv
    if form.flank in ("zn", "zk"):
        from .worm_flanks import axial_profile

        return axial_profile(form, r)
    raise InputError(f"flank form must be za, zi, zn or zk, got {form.flank!r}")


def axial_section(form: ThreadForm, samples: int = 64, inner_radius: float | None = None) -> np.ndarray:
    """One thread's outline in the axial section, (N, 2) points ``(u, r)`` mm, counter-clockwise.

    The right flank from ``inner_radius`` (default the root radius; a solid takes it a little inside the
    core so the thread and the core overlap) to the tip, then the left flank back, ``samples`` points each.
    """
    r = np.linspace(form.root_radius if inner_radius is None else inner_radius, form.tip_radius, samples)
    h = half_thickness(form, r)
    right = np.column_stack((h, r))  # root to tip
    left = np.column_stack((-h, r))[::-1]  # tip to root
    return np.vstack((right, left))


def transverse_flank(form: ThreadForm, samples: int = 64) -> np.ndarray:
    """One flank of the thread in a transverse section of the worm, (N, 2) points ``(x, y)`` mm, root to tip.

    In the worm's own frame (axis z, right hand, the thread centred on ``z = k p_x`` in the axial section
    towards +x), the thread crosses the plane ``z = 0`` where ``|p phi| <= h(r)``: the thread's angular half
    width at radius ``r`` is ``h(r) / p`` (for ZA an Archimedean spiral).  This is the flank at
    ``phi = -h(r) / p``; the other is its mirror in the x axis, and the other starts are turned by ``2 pi / z1``.
    """
    if not 8 <= samples <= 4096:
        raise InputError(f"flank samples must be from 8 to 4096, got {samples}")
    r = np.linspace(form.root_radius, form.tip_radius, samples)
    phi = -half_thickness(form, r) / form.lead_parameter
    if float(-2 * phi[0]) >= 2 * math.pi / form.starts:
        raise InputError(f"the thread at the root spans {math.degrees(float(-2 * phi[0])):.4g} degrees of the worm's "
                         f"transverse section, more than a start's {360 / form.starts:.4g}; allowed: a thinner thread")
    return np.column_stack((r * np.cos(phi), r * np.sin(phi)))


def _thread_polygon(form: ThreadForm, c: float, shift: float, samples: int) -> Polygon | None:
    """One thread's section in the slice ``z = c`` (fixed frame, x along the worm axis), moved by ``shift`` along x."""
    if abs(c) >= form.tip_radius:
        return None
    a = form.centre_distance
    t_lo = math.sqrt(max(form.root_radius ** 2 - c * c, 0.0))
    t_hi = math.sqrt(form.tip_radius ** 2 - c * c)
    t = np.linspace(t_lo, t_hi, samples)  # depth below the worm's axis, towards the wheel
    r = np.hypot(c, t)
    phi = np.arctan2(-c, t)  # about +x from -y: a right-hand thread advances along +x
    centre = form.lead_parameter * phi + shift
    h = half_thickness(form, r)
    y = a - t
    left = np.column_stack((centre - h, y))
    right = np.column_stack((centre + h, y))[::-1]
    outline = np.vstack((left, right))  # closed across the root (where the thread joins the core) or the axis
    poly = Polygon(outline)
    return poly if poly.is_valid else poly.buffer(0)


def worm_slice(form: ThreadForm, c: float, psi: float, samples: int = 48, core: bool = True):
    """The worm's section in the wheel's slice ``z = c`` with the worm turned by ``psi``, in the fixed frame.

    Every thread within the worm's length, and (``core=True``) its root cylinder.  Returns a shapely geometry.
    """
    half = form.length / 2
    p, px = form.lead_parameter, form.axial_pitch
    first = math.floor((-half - px + p * psi) / px)
    last = math.ceil((half + px + p * psi) / px)
    parts = [_thread_polygon(form, c, k * px - p * psi, samples) for k in range(first, last + 1)]
    parts = [q for q in parts if q is not None and not q.is_empty]
    if core and abs(c) < form.root_radius:
        t_core = math.sqrt(form.root_radius ** 2 - c * c)
        parts.append(box(-half, form.centre_distance - t_core, half, form.centre_distance + t_core))
    if not parts:
        return Polygon()
    return unary_union(parts).intersection(box(-half, -1e9, half, 1e9))


def _blank(form: ThreadForm, c: float, throated: bool, resolution: int) -> Polygon:
    if throated and abs(c) < form.throat_surface_radius:
        radius = min(form.centre_distance - math.sqrt(form.throat_surface_radius ** 2 - c * c),
                     form.wheel_outside_radius)
    elif throated:
        radius = form.wheel_outside_radius
    else:
        radius = form.wheel_throat_radius
    return Point(0, 0).buffer(radius, quad_segs=resolution)


def default_positions(form: ThreadForm) -> int:
    """Generating positions of one thread across the worm: 40 per axial pitch travelled."""
    return int(40 * (form.length + 2 * form.axial_pitch) / form.axial_pitch) + 1


def tooth_space(form: ThreadForm, c: float, positions: int, samples: int = 48) -> Polygon:
    """The region one thread sweeps in the wheel's frame: one tooth space of the slice ``z = c``."""
    p = form.lead_parameter
    reach = form.length / 2 + form.axial_pitch
    psis = np.linspace(-reach / p, reach / p, positions)
    ratio = form.starts / form.wheel_teeth
    half = form.length / 2
    pieces = []
    for psi in psis:
        poly = _thread_polygon(form, c, -p * psi, samples)
        if poly is None or poly.is_empty:
            continue
        poly = poly.intersection(box(-half, -1e9, half, 1e9))
        if not poly.is_empty:
            pieces.append(rotate(poly, -psi * ratio, origin=(0, 0), use_radians=True))
    return unary_union(pieces)


def wheel_slice(form: ThreadForm, c: float, *, throated: bool = True, positions: int | None = None,
                samples: int = 48, resolution: int = 256):
    """The wheel's section in the slice ``z = c`` (mm), cut by the worm as a hob; a shapely Polygon.

    Parameters
    ----------
    form : ThreadForm
    c : float
        Distance of the slice from the wheel's mid-plane, mm.
    throated : bool
        True: the blank's rim follows the throat (concave, radius ``throat_surface_radius`` about the worm's
        axis, up to the outside radius).  False: a straight (cylindrical) face at the throat radius, which
        prints without support.
    positions : int, optional
        Generating positions of one thread across the worm (default: 40 per axial pitch travelled).
    samples : int
        Points along each flank of a thread section.
    resolution : int
        Segments per quarter circle of the blank.
    """
    if positions is None:
        positions = default_positions(form)
    space = tooth_space(form, c, positions, samples)
    blank = _blank(form, c, throated, resolution)
    if space.is_empty:
        return blank
    step = 2 * math.pi / form.wheel_teeth
    spaces = [rotate(space, j * step, origin=(0, 0), use_radians=True) for j in range(form.wheel_teeth)]
    result = blank.difference(unary_union(spaces))
    if result.geom_type != "Polygon":  # keep the wheel body, drop slivers
        result = max(getattr(result, "geoms", [result]), key=lambda g: g.area)
    return result


def wheel_slices(form: ThreadForm, count: int, **options) -> list[tuple[float, object]]:
    """``count`` slices evenly across the face width, ``(c, polygon)`` each (c mm from the mid-plane)."""
    if count < 1:
        raise InputError(f"slice count must be 1 or more, got {count}")
    half = form.face_width / 2
    cs = [0.0] if count == 1 else list(np.linspace(-half, half, count))
    return [(float(c), wheel_slice(form, float(c), **options)) for c in cs]


@dataclass(frozen=True)
class Interference:
    """Overlap of the worm and the generated wheel over the positions tried.

    Attributes
    ----------
    area : float
        The largest overlap area in one slice at one position, mm².
    depth : float
        The largest overlap thickness (twice area over perimeter of each overlap piece), mm.
    positions : int
        Positions of the worm tried (over one full turn).
    """

    area: float
    depth: float
    positions: int


def interference(form: ThreadForm, slices: list[tuple[float, object]], positions: int = 72) -> Interference:
    """Turn the worm through a full turn (and the wheel with it) and measure any overlap with the wheel.

    The positions are offset by half a step from zero, so they fall between the generating positions.
    """
    ratio = form.starts / form.wheel_teeth
    worst_area, worst_depth = 0.0, 0.0
    for k in range(positions):
        psi = 2 * math.pi * (k + 0.5) / positions
        for c, wheel in slices:
            worm = worm_slice(form, c, psi)
            if worm.is_empty:
                continue
            placed = rotate(wheel, psi * ratio, origin=(0, 0), use_radians=True)
            overlap = placed.intersection(worm)
            if overlap.is_empty or overlap.area == 0:
                continue
            worst_area = max(worst_area, overlap.area)
            for piece in getattr(overlap, "geoms", [overlap]):
                if piece.area > 0:
                    worst_depth = max(worst_depth, 2 * piece.area / piece.length)
    return Interference(worst_area, worst_depth, positions)


def least_gaps(form: ThreadForm, slices: list[tuple[float, object]], positions: int = 72) -> list[float]:
    """The least distance between the worm and the wheel in each slice over a full turn of the worm, mm.

    A wheel the worm generated touches it in every slice its thread reaches (line contact: gaps of the order
    of the scallops); a wheel that meets the worm at a point leaves gaps growing away from the contact.  The
    positions are those of :func:`interference`; an overlapping slice reads 0.
    """
    ratio = form.starts / form.wheel_teeth
    gaps = []
    for c, wheel in slices:
        best = math.inf
        for k in range(positions):
            psi = 2 * math.pi * (k + 0.5) / positions
            worm = worm_slice(form, c, psi)
            if not worm.is_empty:
                best = min(best, rotate(wheel, psi * ratio, origin=(0, 0), use_radians=True).distance(worm))
        gaps.append(best)
    return gaps
