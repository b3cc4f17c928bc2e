"""Pure geometry: involutes, spur gears and their generated outlines (numpy, no I/O)."""

from .gear import SpurGear
from .involute import inv, inv_inverse
from .generate import Curve, TipRelief, ToothProfile, outline, tooth_profile

__all__ = ["SpurGear", "inv", "inv_inverse", "Curve", "TipRelief", "ToothProfile", "outline", "tooth_profile"]
