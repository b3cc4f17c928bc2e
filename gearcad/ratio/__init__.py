"""The ratio solver: provably best tooth counts for compound, inventory and coaxial trains.

Convention: ratio = output turns per input turn = the product over stages of
driver teeth / driven teeth.  Each external mesh reverses the direction.

Names are loaded on first use (PEP 562), so importing a light submodule such
as :mod:`gearcad.ratio.limits` does not pull in sympy or numpy.
"""

from __future__ import annotations

from ..lazy import lazy_names

_HOMES = {
    "solve_coaxial": "coaxial", "solve_compound": "compound",
    "Approximant": "convergents", "best_approximations": "convergents",
    "continued_fraction_terms": "convergents", "convergents": "convergents",
    "Inventory": "inventory", "parse_inventory": "inventory", "read_inventory": "inventory",
    "DEFAULT_MAX_STAGE_RATIO": "limits", "DEFAULT_MAX_TEETH": "limits", "DEFAULT_MIN_TEETH": "limits",
    "MAX_STAGES": "limits", "Limits": "limits", "make_limits": "limits",
    "RatioQuery": "solve", "approximations_with_trains": "solve", "binding_limits": "solve",
    "realising_stages": "solve", "solve_ratio": "solve", "within_tolerance": "solve",
    "Target": "target", "parse_target": "target",
    "Train": "train", "make_train": "train",
}

__all__ = sorted(_HOMES)

__getattr__, __dir__ = lazy_names(__name__, _HOMES, __all__)
