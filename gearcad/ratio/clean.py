"""Whether a compound train's meshes pass without a warning: the tie-break among trains of equal error.

Trains of one ratio have one error, so the solver's order among them is a
practitioner's choice: first the trains whose every mesh passes the pair
checks with no warning and no failure (no thin tips, no undercut left after
the least shift, contact ratio, clearances), then fewer teeth.  Each stage gets
the shifts ``design`` gives it (:func:`gearcad.meshes.shifts.balanced_shifts`:
the least shift against undercut, balanced where the mate allows), an idler of
the last stage none, exactly as :func:`gearcad.trains.stages.spec_with_stages`
does; the pairs are judged by :func:`gearcad.meshes.checks.analyse_pair`.

The verdict is :func:`gearcad.meshes.checks.analyse_pair`'s (no finding a warning or
a failure), reached by :func:`pair_passes` from the same figures in closed form:
undercut and the form diameter come from the rack cutter (ISO 21771's form circle of
a rack-generated flank) instead of the generated outline, so ``gearcad ratio`` loads
neither the outline generator nor its sampling.  ``tests/test_ratio_listing.py``
holds the two verdicts equal over a grid of pairs.

The checks depend on the module only through the backlash, which the tooth
thinning turns into a shift; the judge takes a module (default 1 mm), a tooth
system and the backlash of a fabrication profile (defaults: those of
``gearcad design``, ``iso53-a`` and ``laser-3mm-acrylic``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

__all__ = ["MeshJudge", "JUDGE_MODULE", "pair_passes"]

#: Module at which ``gearcad ratio`` judges meshes, mm (the checks scale with it but for the backlash).
JUDGE_MODULE = 1.0


@dataclass
class MeshJudge:
    """Judges trains' meshes (stage results cached: a search judges the same stages many times)."""

    module: float = JUDGE_MODULE
    system_name: str = "iso53-a"
    fabrication: str = "laser-3mm-acrylic"
    _cache: dict = field(default_factory=dict, repr=False)

    def __post_init__(self) -> None:
        from ..meshes.shifts import thinning_shift
        from ..profiles import load_fabrication, load_tooth_system
        from ..validate import positive

        self.module = positive(self.module, "module", "mm")
        self.system = load_tooth_system(self.system_name)
        self.backlash = load_fabrication(self.fabrication).backlash
        self.thinning = thinning_shift(self.backlash, self.module, self.system)

    def _pair_clean(self, a: int, b: int, shifts: tuple[float, float]) -> bool:
        key = (a, b, shifts)
        found = self._cache.get(key)
        if found is None:
            from ..errors import GearcadError
            from ..meshes.pair import make_pair

            try:
                found = pair_passes(make_pair(a, b, self.module, self.system, shifts=shifts, backlash=self.backlash))
            except GearcadError:  # a pair that cannot be built at all is not clean
                found = False
            self._cache[key] = found
        return found

    def clean(self, train: Any) -> bool:
        """Whether every mesh of ``train`` (a :class:`gearcad.ratio.Train`) passes without a warning."""
        from ..meshes.shifts import balanced_shifts

        last = len(train.stages) - 1
        for k, (driver, driven) in enumerate(train.stages):
            if train.shifts is not None:
                x1, x2 = train.shifts[k]
            else:
                x1, x2 = balanced_shifts(driver, driven, self.system, self.thinning)
            if train.idler is not None and k == last:
                meshes = [(driver, train.idler, (x1, 0.0)), (train.idler, driven, (0.0, x2))]
            else:
                meshes = [(driver, driven, (x1, x2))]
            if not all(self._pair_clean(a, b, s) for a, b, s in meshes):
                return False
        return True


def _roll(gear: Any) -> float:
    """Length of the line of action from the base circle's tangent point to the tip circle, mm."""
    return math.sqrt((gear.tip_diameter / 2) ** 2 - (gear.base_diameter / 2) ** 2)


def _undercut_and_form(gear: Any) -> tuple[bool, float]:
    """Whether the rack cutter undercuts ``gear``, and (when not) its form diameter, mm.

    The cutter's straight flank ends where its tip round begins, ``h = (h_fP - rho (1 - sin a)
    - x_E) m`` below the rolling line; it cuts the involute down to the line-of-action point
    ``h / sin a`` from the pitch point, which lies past the base circle's tangent point
    (undercut) when ``r sin a < h / sin a``.  Otherwise that point is where the involute
    begins: ``d_F = 2 sqrt(r_b^2 + (r sin a - h / sin a)^2)`` (ISO 21771, the form circle of
    a rack-generated flank).  The arithmetic follows :mod:`gearcad.geometry.generate`
    step for step, so a gear on the edge gets the same answer.
    """
    m, system = gear.module, gear.system
    alpha = system.pressure_angle
    rho = system.fillet_radius * m
    round_v = (gear.generating_shift * m - system.dedendum * m) + rho  # the tip round's centre, rack frame
    depth = -(round_v - rho * math.sin(alpha))
    r, rb = gear.reference_diameter / 2, gear.base_diameter / 2
    roll = (r * math.sin(alpha) - depth / math.sin(alpha)) / rb
    if roll < 0:
        return True, math.nan
    return False, 2 * math.hypot(rb, roll * rb)


def pair_passes(pair: Any) -> bool:
    """Whether :func:`gearcad.meshes.checks.analyse_pair` finds no warning and no failure in ``pair``.

    The same checks on the same figures: contact ratio, undercut, tip thickness,
    interference, active flank, bottom clearances, backlash; undercut and form
    diameter by :func:`_undercut_and_form` (a rack-generated spur gear; other tooth
    systems fall back to the full analysis).
    """
    from ..meshes.checks import MIN_CONTACT_RATIO, MIN_TIP_THICKNESS

    g1, g2 = pair.gear1, pair.gear2
    if g1.system.fillet_stretch != 1.0 or g2.system.fillet_stretch != 1.0:
        from ..meshes.checks import analyse_pair

        return all(f.severity not in ("warning", "failure") for f in analyse_pair(pair).findings)
    a, alpha_op = pair.centre_distance, pair.operating_pressure_angle
    contact = (_roll(g1) + _roll(g2) - a * math.sin(alpha_op)) / g1.base_pitch
    if contact < MIN_CONTACT_RATIO:
        return False
    for gear, mate in ((g1, g2), (g2, g1)):
        undercut, form = _undercut_and_form(gear)
        if undercut or form >= gear.tip_diameter or gear.tip_thickness < MIN_TIP_THICKNESS * gear.module:
            return False  # undercut: a warning; a form circle past the tip: no outline at all
        reach = a * math.sin(alpha_op) - _roll(mate)
        if reach < 0 or 2 * math.sqrt((gear.base_diameter / 2) ** 2 + reach ** 2) < form - 1e-9:
            return False  # interference; the mate's tip below the form circle
    limit = g1.system.clearance * pair.module
    for tip, root in ((g1, g2), (g2, g1)):
        clearance = a - tip.tip_diameter / 2 - root.root_diameter / 2
        if clearance <= 0 or clearance < limit - 1e-9:
            return False
    return _backlash(pair) > 1e-9


def _backlash(pair: Any) -> float:
    """Circumferential backlash on the working pitch circle, mm: the pitch there less both tooth thicknesses,
    each ``d_w (s / d + inv a - inv a_w)`` (ISO 21771, tooth thickness at a diameter)."""
    from ..geometry.involute import inv

    alpha_op = pair.operating_pressure_angle
    d_w1, d_w2 = pair.working_diameters()

    def thickness(gear: Any, d_w: float) -> float:
        return d_w * (gear.tooth_thickness / gear.reference_diameter + inv(gear.pressure_angle) - inv(alpha_op))

    return math.pi * d_w1 / pair.gear1.teeth - thickness(pair.gear1, d_w1) - thickness(pair.gear2, d_w2)
