"""Friction, efficiency and self-locking of a worm and wheel.

Friction and efficiency (the screw-thread relations, e.g. Niemann/Winter, Maschinenelemente III,
and Shigley's Mechanical Engineering Design, worm gearing chapter; from memory, and derived a
second way in the tests): with ``rho' = atan(mu / cos(alpha_n))``

* worm driving ``eta = tan(gamma) / tan(gamma + rho')``,
* wheel driving ``eta' = tan(gamma - rho') / tan(gamma)`` (zero when ``gamma <= rho'``),
* self-locking when ``gamma <= rho'``.

Pure computation: radians inside, no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError

__all__ = ["Friction", "FRICTION_PAIRS", "COPPER_ALLOYS", "SELF_LOCKING_CAUTION", "copper_alloy_friction", "worm_friction",
           "friction_angle", "efficiency_worm_driving", "efficiency_wheel_driving"]

SELF_LOCKING_CAUTION = ("self-locking is not a brake: vibration, shock, running-in and lubrication lower the "
                        "friction and the load can creep or run back; fit a brake wherever a load can fall or "
                        "spring back (common practice)")


@dataclass(frozen=True)
class Friction:
    """A friction coefficient range for a material pair.

    Attributes
    ----------
    low, high : float
        Least and largest coefficient to expect (dimensionless).  Efficiency is quoted with
        ``high`` (more heat, the safe side for a motor), self-locking is judged with ``low``
        (the safe side for a claim that the load holds).
    source : str
        Where the figures come from.
    """

    low: float
    high: float
    source: str


#: Worm material -> wheel material -> (low, high, source) for a steel worm.  Copper alloys use
#: :func:`copper_alloy_friction` (speed-dependent, lubricated).  Figures typical of the pair,
#: not a supplier's guarantee.
FRICTION_PAIRS: dict[tuple[str, str], tuple[float, float, str]] = {
    ("mild-steel", "mild-steel"): (0.10, 0.18, "steel on steel, oil-lubricated boundary friction 0.1 to 0.18 (from memory); "
                                               "a steel wheel galls easily: prefer bronze"),
    ("mild-steel", "aluminium"): (0.10, 0.20, "steel on aluminium alloy, greased, 0.1 to 0.2 (from memory)"),
    ("mild-steel", "acetal"): (0.20, 0.35, "POM on steel, dry, 0.2 to 0.35 (from memory; plastics gear-design guides)"),
    ("mild-steel", "nylon"): (0.25, 0.40, "PA on steel, dry, 0.25 to 0.4 (from memory)"),
    ("mild-steel", "pla"): (0.30, 0.50, "printed PLA on steel, dry, 0.3 to 0.5 (from memory)"),
    ("mild-steel", "petg"): (0.30, 0.50, "printed PETG on steel, dry, 0.3 to 0.5 (from memory)"),
    ("mild-steel", "acrylic"): (0.40, 0.50, "PMMA on steel, dry, 0.4 to 0.5 (from memory)"),
    ("acetal", "acetal"): (0.25, 0.40, "POM on POM, dry, 0.25 to 0.4 (from memory)"),
    ("pla", "pla"): (0.30, 0.55, "printed PLA on PLA, dry, 0.3 to 0.55 (from memory)"),
    ("petg", "petg"): (0.30, 0.55, "printed PETG on PETG, dry, 0.3 to 0.55 (from memory)"),
}
#: Wheel materials that run on the speed-dependent curve of a hardened steel worm on bronze.
COPPER_ALLOYS = ("bronze", "brass")


def copper_alloy_friction(sliding_speed: float) -> float:
    """Friction coefficient of a steel worm on a bronze wheel, lubricated, at ``sliding_speed`` (m/s).

    AGMA's curve for a case-hardened steel worm on a cast bronze wheel as Shigley's Mechanical
    Engineering Design gives it (worm gearing chapter; from memory), with ``V_s`` in ft/min:
    0.15 at rest, ``0.124 exp(-0.074 V_s^0.645)`` up to 10 ft/min, ``0.103 exp(-0.110 V_s^0.450) + 0.012``
    beyond.  (The two branches meet within 2 % at 10 ft/min, a check on the recollection.)
    """
    v = max(0.0, float(sliding_speed)) * 60.0 / 0.3048
    if v == 0.0:
        return 0.150
    if v <= 10.0:
        return 0.124 * math.exp(-0.074 * v ** 0.645)
    return 0.103 * math.exp(-0.110 * v ** 0.450) + 0.012


def worm_friction(worm_material: str, wheel_material: str, sliding_speed: float) -> Friction:
    """The friction range of a worm and wheel material pair.

    Parameters
    ----------
    worm_material, wheel_material : str
        Material profile names (``gearcad profiles``).
    sliding_speed : float
        Sliding speed at the worm's reference cylinder, m/s (0: starting from rest).

    Raises
    ------
    InputError
        For a pair without figures (the message lists the pairs that have them).
    """
    if worm_material == "mild-steel" and wheel_material in COPPER_ALLOYS:
        mu = copper_alloy_friction(sliding_speed)
        note = ("steel worm on a copper-alloy wheel, lubricated, at the sliding speed (AGMA's curve as Shigley "
                "gives it, from memory; brass taken as bronze, and it wears faster)")
        return Friction(mu, mu, note)
    key = (worm_material, wheel_material)
    if key not in FRICTION_PAIRS:
        pairs = [f"{a}/{b}" for a, b in FRICTION_PAIRS] + [f"mild-steel/{b}" for b in COPPER_ALLOYS]
        raise InputError(f"no friction figures for a {worm_material} worm on a {wheel_material} wheel; allowed "
                         f"pairs (worm/wheel): {', '.join(sorted(pairs))}, or give the coefficient with --friction")
    low, high, source = FRICTION_PAIRS[key]
    return Friction(low, high, source)


def friction_angle(mu: float, normal_pressure_angle: float) -> float:
    """The virtual friction angle ``rho' = atan(mu / cos(alpha_n))``, radians."""
    return math.atan(mu / math.cos(normal_pressure_angle))


def efficiency_worm_driving(lead_angle: float, rho: float) -> float:
    """``tan(gamma) / tan(gamma + rho')`` (angles in radians), the meshing efficiency with the worm driving."""
    return math.tan(lead_angle) / math.tan(lead_angle + rho)


def efficiency_wheel_driving(lead_angle: float, rho: float) -> float:
    """``tan(gamma - rho') / tan(gamma)``, or 0 when the pair self-locks (``gamma <= rho'``)."""
    if lead_angle <= rho:
        return 0.0
    return math.tan(lead_angle - rho) / math.tan(lead_angle)
