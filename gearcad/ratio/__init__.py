"""The ratio solver: provably best tooth counts for compound, inventory and coaxial trains.

Convention: ratio = output turns per input turn = the product over stages of
driver teeth / driven teeth.  Each external mesh reverses the direction.
"""

from __future__ import annotations

from .coaxial import solve_coaxial
from .compound import solve_compound
from .convergents import Approximant, best_approximations, continued_fraction_terms, convergents
from .inventory import Inventory, parse_inventory, read_inventory
from .limits import (DEFAULT_MAX_STAGE_RATIO, DEFAULT_MAX_TEETH, DEFAULT_MIN_TEETH, MAX_STAGES, Limits,
                     make_limits)
from .solve import (RatioQuery, approximations_with_trains, binding_limits, realising_stages, solve_ratio,
                    within_tolerance)
from .target import Target, parse_target
from .train import Train, make_train

__all__ = [
    "Approximant", "Inventory", "Limits", "RatioQuery", "Target", "Train",
    "DEFAULT_MAX_STAGE_RATIO", "DEFAULT_MAX_TEETH", "DEFAULT_MIN_TEETH", "MAX_STAGES",
    "approximations_with_trains", "best_approximations", "binding_limits", "continued_fraction_terms",
    "convergents", "make_limits", "make_train", "parse_inventory", "parse_target", "read_inventory",
    "realising_stages", "solve_coaxial", "solve_compound", "solve_ratio", "within_tolerance",
]
