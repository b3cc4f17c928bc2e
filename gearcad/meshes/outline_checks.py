"""Can the process make the part? Checks on a gear's drawn outline (numpy): end-mill reach, tip width.

Split from :mod:`gearcad.meshes.checks` (a pair's figures in closed form, no
arrays) so the ratio solver's mesh judge starts without numpy.  Each function
returns :class:`gearcad.meshes.checks.Finding` objects; lengths in mm.
"""

from __future__ import annotations

import math

import numpy as np

from ..geometry.gear import SpurGear
from .checks import Finding

__all__ = ["process_findings", "ring_process_findings", "tool_reach", "largest_tool", "space_direction",
           "ring_tool_reach", "ring_largest_tool"]


def _distance(points: np.ndarray, centre: np.ndarray) -> float:
    """Distance from ``centre`` to the closed polygon through ``points`` (its segments, not only its vertices), mm."""
    a, b = points, np.roll(points, -1, axis=0)
    ab = b - a
    length2 = np.einsum("ij,ij->i", ab, ab)
    k = np.clip(np.einsum("ij,ij->i", centre - a, ab) / np.where(length2 > 0, length2, 1.0), 0.0, 1.0)
    return float(np.min(np.hypot(*(a + k[:, None] * ab - centre).T)))


def _clear(points: np.ndarray, direction: np.ndarray, bottom: float, radius: float) -> bool:
    """Whether a disc of ``radius`` whose lowest point on the ray ``direction`` is at ``bottom`` misses the outline."""
    return _distance(points, direction * (bottom + radius)) >= radius * (1 - 1e-9)


def space_direction(points: np.ndarray, internal: bool = False) -> np.ndarray:
    """Unit vector along the centre line of one tooth space of a gear outline centred at the origin.

    The space is the one holding the outline's point nearest the centre (``internal``: a
    ring's tooth loop, the point farthest from it); a flat root arc is split in its middle
    (the spaces of a generated gear are symmetric).
    """
    r = np.hypot(*points.T)
    i = int(np.argmax(r) if internal else np.argmin(r))
    n = len(points)
    near = lambda k: abs(r[k % n] - r[i]) <= 1e-6 * max(r[i], 1.0)  # noqa: E731
    first, last = i, i
    while near(first - 1) and i - first < n:  # the run of root points around the deepest one
        first -= 1
    while near(last + 1) and last - i < n:
        last += 1
    angle = np.arctan2(points[:, 1], points[:, 0])
    span = np.angle(np.exp(1j * (angle[last % n] - angle[first % n])))
    middle = angle[first % n] + 0.5 * span
    return np.array([math.cos(middle), math.sin(middle)])


def _last_clear(is_clear, clear: float, blocked: float) -> float:
    """Bisection (60 halvings) between a value where ``is_clear`` holds and one where it does not; the
    clear end of the last interval (the end mills' reach and size)."""
    for _ in range(60):
        mid = 0.5 * (clear + blocked)
        clear, blocked = (mid, blocked) if is_clear(mid) else (clear, mid)
    return clear


def tool_reach(points: np.ndarray, tool_radius: float) -> float:
    """Lowest radius (mm) an end mill of ``tool_radius`` mm reaches in the tooth spaces of a gear outline.

    The mill goes down the centre line of a space until it touches a flank
    (bisection; the distance is taken to the outline's segments, so the
    outline's chord error is the accuracy).  Parameters: ``points`` (N, 2) outline of a gear centred at the
    origin, mm.
    """
    direction = space_direction(points)
    r = np.hypot(*points.T)
    low, high = float(r.min()), float(r.max()) + 2 * tool_radius
    if _clear(points, direction, low, tool_radius):
        return low
    return _last_clear(lambda mid: _clear(points, direction, mid, tool_radius), clear=high, blocked=low)


def largest_tool(points: np.ndarray, depth_radius: float) -> float:
    """Radius (mm) of the largest end mill that reaches ``depth_radius`` mm on a space's centre line."""
    direction = space_direction(points)
    return _last_clear(lambda mid: _clear(points, direction, depth_radius, mid), clear=0.0,
                       blocked=float(np.hypot(*points.T).max()))


def _clear_out(points: np.ndarray, direction: np.ndarray, top: float, radius: float) -> bool:
    """Whether a disc of ``radius`` whose outermost point on the ray ``direction`` is at ``top`` misses the loop."""
    return _distance(points, direction * (top - radius)) >= radius * (1 - 1e-9)


def ring_tool_reach(points: np.ndarray, tool_radius: float) -> float:
    """Highest radius (mm) an end mill of ``tool_radius`` mm reaches in the tooth spaces of a ring's tooth loop.

    The mill comes from the ring's centre and goes out along the centre line of a
    space until it touches a flank (bisection; distances to the loop's segments).  A mill wider
    than the tip circle cannot enter the spaces: the tip radius is returned.
    Parameters: ``points`` (N, 2) tooth loop of a ring centred at the origin, mm.
    """
    direction = space_direction(points, internal=True)
    r = np.hypot(*points.T)
    low, high = float(r.min()), float(r.max())
    if not _clear_out(points, direction, max(low, tool_radius), tool_radius):
        return low
    low = max(low, tool_radius)
    if _clear_out(points, direction, high, tool_radius):
        return high
    return _last_clear(lambda mid: _clear_out(points, direction, mid, tool_radius), clear=low, blocked=high)


def ring_largest_tool(points: np.ndarray, reach_radius: float) -> float:
    """Radius (mm) of the largest end mill that reaches ``reach_radius`` mm on a ring space's centre line."""
    direction = space_direction(points, internal=True)
    return _last_clear(lambda mid: _clear_out(points, direction, reach_radius, mid), clear=0.0,
                       blocked=float(reach_radius))


def _tip_findings(name: str, tip: float, process: str, min_feature: float) -> list[Finding]:
    if tip < min_feature:
        return [Finding(f"tip width {name}", "failure", tip, min_feature,
                        f"{name}: the tip is {tip:.3f} mm thick, thinner than the {min_feature:g} mm the "
                        f"{process} process holds; reduce the profile shift or shorten the tips")]
    return [Finding(f"tip width {name}", "ok", tip, min_feature,
                    f"{name}: the tip ({tip:.3f} mm) is not thinner than the {min_feature:g} mm the "
                    f"{process} process holds")]


def _reach_finding(name: str, tool_radius: float, reach: float, form: float, blocked: bool, biggest: float | None,
                   inward: bool) -> Finding:
    """The end mill's finding.

    ``reach`` and ``form`` are radii (mm); ``biggest`` (the largest end mill that reaches, diameter mm) is given
    when the mill falls short, None when it reaches; ``inward`` for an external gear (the mill goes down towards
    the axis), outward for a ring; ``blocked`` when it cannot enter the spaces at all.
    """
    way, end = ("deeper", "begins") if inward else ("farther out", "ends")
    if biggest is not None:
        where = ("cannot enter the tooth spaces at all" if blocked else
                 f"goes no {way} than diameter {2 * reach:.3f} mm in the tooth spaces")
        return Finding(f"tool reach {name}", "failure", 2 * reach, 2 * form,
                       f"{name}: the {2 * tool_radius:g} mm end mill {where}, short of the form diameter "
                       f"{2 * form:.3f} mm where the involute {end}, so the flanks cannot be cut; use an "
                       f"end mill of at most {biggest:.2f} mm or a larger module")
    return Finding(f"tool reach {name}", "ok", 2 * reach, 2 * form,
                   f"{name}: the {2 * tool_radius:g} mm end mill reaches the whole involute flank "
                   f"({'down' if inward else 'out'} to diameter {2 * reach:.3f} mm)")


def ring_process_findings(name: str, ring, loop: np.ndarray, process: str, tool_radius: float,
                          min_feature: float) -> list[Finding]:
    """Whether the fabrication process can make a ring's internal teeth: failures name the reason.

    As :func:`process_findings` for an external gear, with the end mill entering the
    ring's tooth spaces from its centre: it must reach out to the ring's form circle
    (where the involute ends and the root fillet begins).

    Parameters
    ----------
    name : str
        The ring's name, for messages.
    ring : gearcad.geometry.internal.RingGear
        The ring (its tip thickness, tip and form circles), mm.
    loop : numpy.ndarray
        (N, 2) the ring's tooth loop at the origin as it is drawn, mm.
    process, tool_radius, min_feature
        As for :func:`process_findings` (mm).

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    if process == "cnc" and tool_radius > 0:
        form = ring.form_diameter / 2
        reach = ring_tool_reach(loop, tool_radius)
        short = reach < form - 1e-3
        out.append(_reach_finding(name, tool_radius, reach, form, reach <= ring.tip_diameter / 2 + 1e-6,
                                  2 * ring_largest_tool(loop, form) if short else None, inward=False))
    if min_feature > 0:
        out += _tip_findings(name, ring.tip_thickness, process, min_feature)
    return out


def process_findings(name: str, gear: SpurGear, outline: np.ndarray, process: str, tool_radius: float,
                     min_feature: float) -> list[Finding]:
    """Whether the fabrication process can make an external gear: failures name the reason.

    - ``cnc``: the end mill (``tool_radius`` mm) must reach down each tooth space
      to the form circle, where the cut involute begins; higher up it leaves part of
      the working flank standing and the mate's tips strike it.
    - every process: the tip must be at least ``min_feature`` mm thick, the thinnest
      wall the process holds (a laser burns a thinner tip away, a printer cannot lay
      a line narrower than its nozzle).

    Parameters
    ----------
    name : str
        The gear's name, for messages.
    gear : SpurGear
        The gear (its tip thickness and form circle), mm.
    outline : numpy.ndarray
        (N, 2) outline of the gear at the origin as it is drawn, mm.
    process : str
        ``laser``, ``fdm`` or ``cnc``.
    tool_radius : float
        Radius of the end mill, mm (0: none).
    min_feature : float
        Thinnest wall the process holds, mm (0: not checked).

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    if process == "cnc" and tool_radius > 0:
        from ..geometry.generate import tooth_profile

        form = tooth_profile(gear, tolerance=1e-3).form_diameter / 2
        reach = tool_reach(outline, tool_radius)
        short = reach > form + 1e-3
        out.append(_reach_finding(name, tool_radius, reach, form, reach >= gear.tip_diameter / 2 - 1e-6,
                                  2 * largest_tool(outline, form) if short else None, inward=True))
    if min_feature > 0:
        out += _tip_findings(name, gear.tip_thickness, process, min_feature)
    return out
