"""Nearby planetary searches that would meet a tolerance the asked one misses (stepped planets, fewer
planets), as the one-line hints of ``ratio`` and ``design``."""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from ..errors import GearcadError

__all__ = ["planetary_alternatives", "planetary_ways", "alternative_sets", "set_text"]


def set_text(result: Any) -> str:
    s = result.set
    planet = f"{s.planet}/{s.planet_ring}" if s.stepped else str(s.planet)
    return f"sun {s.sun}, planet {planet}, ring {s.ring}, {s.planets} planets"


def planetary_alternatives(query: Any, tolerance: float) -> str:
    """One line: the nearby planetary searches (stepped planets, 2 or 3 planets) whose best meets ``tolerance``.

    Empty when none does.
    """
    ways = alternative_sets(query, tolerance)
    if not ways:
        return ""
    return (f"these reach {query.target.expression} within {tolerance:g}: " + "; or ".join(ways))


def planetary_ways(query: Any, tolerance: float) -> str:
    """What would reach the target: nearby planetary searches, else other kinds."""
    ways = alternative_sets(query, tolerance)
    if ways:
        return "would reach it: " + "; or ".join(ways)
    return "would reach it: a compound train (--kind compound) or a summing train (--kind summing), or wider limits"


def alternative_sets(query: Any, tolerance: float) -> list[str]:
    """Which nearby planetary searches (stepped planets, fewer planets) would meet the tolerance."""
    from ..ratio.planetary import solve_planetary

    ways = []
    trials = []
    if not query.stepped:
        trials.append(("--stepped", replace(query, stepped=True, count=1)))
    for n in (2, 3):
        if n < query.planets:
            trials.append((f"--planets {n}", replace(query, planets=n, count=1)))
            if not query.stepped:
                trials.append((f"--stepped --planets {n}", replace(query, stepped=True, planets=n, count=1)))
    for label, trial in trials:
        try:
            found = solve_planetary(trial)
        except GearcadError:
            continue
        if found and abs(found[0].relative_error) <= tolerance:
            ways.append(f"{label} ({set_text(found[0])}, error {found[0].relative_error:+.2e})")
            if len(ways) == 2:
                break
    return ways
