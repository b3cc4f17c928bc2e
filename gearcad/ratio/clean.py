"""Whether a compound train's meshes pass without a warning: the tie-break among trains of equal error.

Trains of one ratio have one error, so the solver's order among them is a
practitioner's choice: first the trains whose every mesh passes the pair
checks with no warning and no failure (no thin tips, no undercut left after
the least shift, contact ratio, clearances), then fewer teeth.  Each stage gets
the shifts ``design`` gives it (:func:`gearcad.meshes.shifts.balanced_shifts`:
the least shift against undercut, balanced where the mate allows), an idler of
the last stage none, exactly as :func:`gearcad.trains.stages.spec_with_stages`
does; the pairs are judged by :func:`gearcad.meshes.checks.analyse_pair`.

The checks depend on the module only through the backlash, which the tooth
thinning turns into a shift; the judge takes a module (default 1 mm), a tooth
system and the backlash of a fabrication profile (defaults: those of
``gearcad design``, ``iso53-a`` and ``laser-3mm-acrylic``).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

__all__ = ["MeshJudge", "JUDGE_MODULE"]

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
            from ..meshes.checks import analyse_pair
            from ..meshes.pair import make_pair

            try:
                pair = make_pair(a, b, self.module, self.system, shifts=shifts, backlash=self.backlash)
                found = all(f.severity not in ("warning", "failure") for f in analyse_pair(pair).findings)
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
