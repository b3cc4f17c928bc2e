"""The wheel's tooth, slice by slice across the face, in matched points for a solid (pure numpy and shapely).

The wheel cut by the worm (:func:`gearcad.geometry.worm_wheel.wheel_slice`) is known slice by slice.  A
solid through those slices needs the same tooth in every slice, in points that correspond from one slice
to the next: a surface through ill-matched points cuts across the tooth (a chord across a corner, or a
point on the flank joined to one on the root), and the solid's volume drifts from the slices' (a loft
through one B-spline a tooth, unmatched, came out 2 % off).  Each slice here gives one tooth pitch, the
same for every tooth of the slice, in three runs with the same number of points in every slice:

1. from the middle of the tooth space (where the ray through the space's centroid meets the root) up
   the flank to the tip corner;
2. the tip land, on the exact circle of the blank, from corner to corner;
3. from the other tip corner down the flank to the middle of the next space.

Runs 1 and 3 are resampled by arc length in two parts, split where the run rises a fifth of its depth
above its lowest point: half the points on the tooth space's bottom (root and fillet), half on the flank.
Resampled evenly over the whole run, the n-th point sat on the root in one slice and on the fillet in the
next as the bottom changes across the face, and the surface between slices cut across the fillet: 23 um
(the 1:30 pair of module 2, q 10) and 44 um (the handbook pair) from the hob simulation's slices halfway
between those the loft passed, against 10 and 14 um split, with 32 points a run instead of 48 and 11
slices instead of 17 (the wheel's STEP 3.3 MB instead of 5.8 for the first pair); measured by
``tests/benchmarks/bench_worm_wheel_size.py``.  The corners, where a surface
must not cut across, are run ends in every slice.  The throated rim is a circle about the worm's axis up to the outside radius,
then a cylinder: the rim's radius has a kink at ``c_k = sqrt(R_t^2 - (a - r_out)^2)``, so the slices fall
into spans between kinks, each smooth across its slices (a smooth surface through a kink would swing
past it), with the kink's slice shared by the spans on either side.

Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely.affinity import rotate
from shapely.geometry import Point
from shapely.geometry import polygon as shapely_polygon
from shapely.ops import unary_union

from ..errors import GeometryError, InputError
from .worm_wheel import ThreadForm, default_positions, tooth_space

__all__ = ["ToothSection", "rim_radius", "rim_kinks", "tooth_section", "tooth_sections", "sections_volume", "SLICES",
           "RUN_POINTS"]

RUN_POINTS = (32, 8, 32)  # points in the runs: flank up, tip land, flank down
SLICES = 11  # least slices across the face (17 gave the same distances from the hob's slices, a quarter more file)
BOTTOM_DEPTH = 0.2  # where a flank run is split: this share of its depth above its lowest point
BOTTOM_POINTS = 0.5  # the share of a flank run's points below the split
_RESOLUTION = 256  # segments a quarter circle of the blank, as in wheel_slice


@dataclass(frozen=True)
class ToothSection:
    """One tooth pitch of the wheel in the slice ``z = c``.

    Attributes
    ----------
    c : float
        Distance of the slice from the mid-plane, mm.
    runs : tuple of numpy.ndarray
        Three (N, 2) runs of points, mm (see the module's docstring); the last point of each run is the
        first of the next, and the last point of run 3 is the first of run 1 turned by one pitch.
    tip_radius : float
        The blank's radius in this slice (the tip land's circle), mm.
    area : float
        The whole slice's area (every tooth, from the slice's own outline before resampling), mm².
    """

    c: float
    runs: tuple[np.ndarray, np.ndarray, np.ndarray]
    tip_radius: float
    area: float


def rim_radius(form: ThreadForm, c: float, throated: bool) -> float:
    """The blank's radius in the slice ``z = c`` (mm): the throated rim, or the straight face at the throat."""
    if not throated:
        return form.wheel_throat_radius
    if abs(c) < form.throat_surface_radius:
        return min(form.centre_distance - math.sqrt(form.throat_surface_radius ** 2 - c * c), form.wheel_outside_radius)
    return form.wheel_outside_radius


def rim_kinks(form: ThreadForm, throated: bool) -> list[float]:
    """The ``c`` (mm) inside the face where the throated rim meets the outside cylinder, ascending (none if
    straight)."""
    if not throated:
        return []
    drop = form.centre_distance - form.wheel_outside_radius
    if not 0 <= drop < form.throat_surface_radius:
        return []
    ck = math.sqrt(form.throat_surface_radius ** 2 - drop ** 2)
    return [-ck, ck] if 1e-9 < ck < form.face_width / 2 - 1e-6 else []


def _resample(chain: np.ndarray, count: int) -> np.ndarray:
    steps = np.hypot(*np.diff(chain, axis=0).T)
    s = np.concatenate(([0.0], np.cumsum(steps)))
    if s[-1] <= 0:
        raise GeometryError("a run of the wheel's tooth has no length")
    t = np.linspace(0.0, s[-1], count)
    return np.column_stack((np.interp(t, s, chain[:, 0]), np.interp(t, s, chain[:, 1])))


def _resample_split(chain: np.ndarray, count: int) -> np.ndarray:
    """``count`` points along ``chain`` (from the bottom up or down to it): :data:`BOTTOM_POINTS` of them on the
    part below :data:`BOTTOM_DEPTH` of its depth, the rest above, each part evenly by arc length."""
    r = np.hypot(chain[:, 0], chain[:, 1])
    rising = r[-1] > r[0]
    ordered, rr = (chain, r) if rising else (chain[::-1], r[::-1])
    split = rr.min() + BOTTOM_DEPTH * (rr.max() - rr.min())
    k = int(np.argmax(rr > split))
    if k == 0:
        raise GeometryError("a flank run of the wheel's tooth does not start at the tooth space's bottom")
    t = (split - rr[k - 1]) / (rr[k] - rr[k - 1])
    point = ordered[k - 1] + t * (ordered[k] - ordered[k - 1])
    low = max(3, round(BOTTOM_POINTS * count))
    bottom = _resample(np.vstack((ordered[:k], point)), low)
    flank = _resample(np.vstack((point, ordered[k:])), count - low + 1)
    out = np.vstack((bottom, flank[1:]))
    return out if rising else out[::-1]


def _crossing(ring: np.ndarray, theta: float) -> tuple[int, np.ndarray]:
    """Where the counter-clockwise ``ring`` crosses the ray at ``theta`` nearest the centre: (edge index, point)."""
    d = np.array([math.cos(theta), math.sin(theta)])
    n = np.array([-d[1], d[0]])
    s = ring @ n
    s_next = np.roll(s, -1)
    nxt = np.roll(ring, -1, axis=0)
    found = np.nonzero((s < 0) & (s_next >= 0) & (ring @ d > 0))[0]
    if len(found) == 0:
        raise GeometryError("the wheel's slice has no tooth space where one was expected")
    t = s[found] / (s[found] - s_next[found])
    points = ring[found] + t[:, None] * (nxt[found] - ring[found])
    k = int(np.argmin(np.hypot(points[:, 0], points[:, 1])))
    return int(found[k]), points[k]


def tooth_section(form: ThreadForm, c: float, *, throated: bool = True, positions: int | None = None,
                  runs: tuple[int, int, int] = RUN_POINTS) -> ToothSection:
    """One tooth pitch of the slice ``z = c`` (mm) in three matched runs (see the module's docstring)."""
    if positions is None:
        positions = default_positions(form)
    step = 2 * math.pi / form.wheel_teeth
    radius = rim_radius(form, c, throated)
    space = tooth_space(form, c, positions)
    if space.is_empty:
        raise GeometryError(f"the worm cuts no tooth space in the slice {c:.4f} mm from the mid-plane")
    centre = space.centroid
    start = math.atan2(centre.y, centre.x)
    blank = Point(0, 0).buffer(radius, quad_segs=_RESOLUTION)
    local = blank.difference(unary_union([rotate(space, k * step, origin=(0, 0), use_radians=True)
                                          for k in (-1, 0, 1, 2)]))
    if local.geom_type != "Polygon":
        local = max(local.geoms, key=lambda g: g.area)
    ring = np.asarray(shapely_polygon.orient(local, 1.0).exterior.coords)[:-1]
    i0, p0 = _crossing(ring, start)
    i1, _ = _crossing(ring, start + step)
    inner = ring[i0 + 1:i1 + 1] if i1 > i0 else np.vstack((ring[i0 + 1:], ring[:i1 + 1]))
    turn = np.array([[math.cos(step), -math.sin(step)], [math.sin(step), math.cos(step)]])
    chain = np.vstack((p0, inner, turn @ p0))
    # The tip land: vertices on the blank's polygon (its chords sag by R (1 - cos(pi / 4n)) at most).
    sag = radius * (1 - math.cos(math.pi / (4 * _RESOLUTION)))
    on_tip = np.nonzero(np.hypot(chain[:, 0], chain[:, 1]) >= radius - 2 * sag - 1e-9)[0]
    if len(on_tip) == 0:
        raise GeometryError(f"the wheel's teeth come to a point below the blank in the slice {c:.4f} mm from the "
                            "mid-plane; allowed: a blank the teeth reach with a land")
    a, b = int(on_tip[0]), int(on_tip[-1])
    ta, tb = math.atan2(chain[a, 1], chain[a, 0]), math.atan2(chain[b, 1], chain[b, 0])
    corner_a = radius * np.array([math.cos(ta), math.sin(ta)])
    corner_b = radius * np.array([math.cos(tb), math.sin(tb)])
    up = _resample_split(np.vstack((chain[:a], corner_a)), runs[0])
    angles = np.linspace(ta, ta + ((tb - ta + math.pi) % (2 * math.pi) - math.pi), runs[1])
    land = np.column_stack((radius * np.cos(angles), radius * np.sin(angles)))
    down = _resample_split(np.vstack((corner_b, chain[b + 1:])), runs[2])
    x, y = chain[:, 0], chain[:, 1]  # the pitch's sector: origin, chain, origin (shoelace)
    area = form.wheel_teeth * 0.5 * float(np.sum(x[:-1] * y[1:] - x[1:] * y[:-1]))
    return ToothSection(float(c), (up, land, down), radius, area)


def tooth_sections(form: ThreadForm, *, throated: bool = True, count: int = SLICES,
                   positions: int | None = None, runs: tuple[int, int, int] = RUN_POINTS) -> list[list[ToothSection]]:
    """The tooth across the face width: spans of slices between the rim's kinks, each span's slices ascending.

    At least ``count`` slices over the face (mm spacing at most face width / (count - 1)), an odd number a
    span; neighbouring spans share the kink's slice.  ``runs``: the points of each run (see :func:`tooth_section`).
    """
    if not (len(runs) == 3 and all(isinstance(n, int) and low <= n <= 400 for n, low in zip(runs, (8, 4, 8)))):
        raise InputError(f"run point counts must be three whole numbers up to 400, from 8 on the flanks and 4 on "
                         f"the tip land, got {runs!r}")
    if not 3 <= count <= 201:
        raise InputError(f"slice count must be from 3 to 201, got {count}")
    half = form.face_width / 2
    edges = [-half, *rim_kinks(form, throated), half]
    spacing = form.face_width / (count - 1)
    cache: dict[float, ToothSection] = {}
    spans = []
    for lo, hi in zip(edges[:-1], edges[1:]):
        n = max(3, math.ceil((hi - lo) / spacing - 1e-9) + 1)
        n += 1 - n % 2  # odd, for Simpson's rule
        span = []
        for c in np.linspace(lo, hi, n):
            key = round(float(c), 12)
            if key not in cache:
                cache[key] = tooth_section(form, float(c), throated=throated, positions=positions, runs=runs)
            span.append(cache[key])
        spans.append(span)
    return spans


def sections_volume(spans: list[list[ToothSection]]) -> float:
    """The slices' areas integrated over the face width by Simpson's rule, span by span, mm³."""
    total = 0.0
    for span in spans:
        if len(span) % 2 == 0 or len(span) < 3:
            raise InputError(f"Simpson's rule needs an odd number of slices from 3, got {len(span)}")
        h = (span[-1].c - span[0].c) / (len(span) - 1)
        a = [s.area for s in span]
        total += h / 3 * (a[0] + a[-1] + 4 * sum(a[1:-1:2]) + 2 * sum(a[2:-1:2]))
    return total
