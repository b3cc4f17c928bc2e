"""Fit of a change-gear train on the swing frame: the triangle, the slot, the swing and the shafts.

The stud (S) and the leadscrew (L) are fixed, ``stud_to_leadscrew`` apart.  The
swing frame turns about the leadscrew axis and carries the intermediate stud (I)
in a slot, ``r`` from the leadscrew.  A compound train has the stud gear ``A``
on S meshing the intermediate pair's driven gear ``B`` on I (one plane), and the
pair's driver ``C`` on I meshing the leadscrew gear ``D`` on L (the other plane).
A simple train has one idler ``E`` on I between ``A`` and ``D`` (one plane).

With the centre distances ``a1 = |SI| = m (A + B) / 2 + allowance`` and
``a2 = |IL| = m (C + D) / 2 + allowance`` and the fixed ``d = |SL|``:

* the triangle S, I, L exists: ``|a1 - a2| <= d <= a1 + a2``;
* the intermediate stud lands inside the slot: ``nearest <= a2 <= farthest``;
* the frame's angle (at L, from the line L to S; law of cosines
  ``cos phi = (a2^2 + d^2 - a1^2) / (2 a2 d)``) lies within its swing;
* no gear hits a shaft it does not mesh with: a gear's tip circle (radius
  ``m z / 2 + addendum m``) clears the end of every other shaft (its boss, with
  nut and washer) by ``gear_gap``.  Every shaft end is taken to reach through
  both planes (the cautious case), so ``A`` and ``D`` must clear L and S, ``B``
  must clear L and ``C`` must clear S; in a simple train ``A`` and ``D`` share a
  plane and must clear each other too.

Every rule gives a slack in mm (an angle's slack is the arc it spans at the
intermediate stud); the train fits when the least slack is zero or more.
Lengths in mm, angles in radians.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

__all__ = ["Frame", "Setup", "FrameFit", "place"]


@dataclass(frozen=True)
class Frame:
    """The swing frame's geometry and the rules of clearance.

    Attributes
    ----------
    stud_to_leadscrew : float
        Distance between the stud and leadscrew axes, mm.
    slot : (float, float)
        Nearest and farthest position of the intermediate stud from the
        leadscrew axis, mm.
    swing : (float, float)
        Least and greatest frame angle, radians from the line leadscrew-to-stud.
    module : float
        Module of the change gears, mm.
    addendum : float
        Addendum of the tooth system, in modules (tip radius = m z / 2 + addendum m).
    centre_allowance : float
        Added to every centre distance for backlash, mm.
    gear_gap : float
        Least gap between a gear's tip and a shaft end it passes, mm.
    boss_diameter : float
        Diameter of a shaft end with its nut and washer, mm.
    """

    stud_to_leadscrew: float
    slot: tuple[float, float]
    swing: tuple[float, float]
    module: float
    addendum: float = 1.0
    centre_allowance: float = 0.0
    gear_gap: float = 1.0
    boss_diameter: float = 16.0

    @classmethod
    def of_machine(cls, machine, addendum: float = 1.0) -> "Frame":
        """The frame of a :class:`gearcad.lathe.machine.Machine` (addendum in modules)."""
        return cls(machine.stud_to_leadscrew, machine.slot, machine.swing, machine.module, addendum,
                   machine.centre_allowance, machine.gear_gap, machine.boss_diameter)

    def centre(self, z1: int, z2: int) -> float:
        """Centre distance of two meshing change gears, mm (with the allowance)."""
        return self.module * (z1 + z2) / 2 + self.centre_allowance

    def tip_radius(self, z: int) -> float:
        """Tip radius of a change gear of ``z`` teeth, mm."""
        return self.module * (z / 2 + self.addendum)


@dataclass(frozen=True)
class Setup:
    """A change-gear train as mounted: stud gear, intermediate gears, leadscrew gear (teeth).

    ``intermediate`` is ``(driven, driver)`` of the compound pair on the
    intermediate stud, or ``(idler,)`` for a simple train.
    """

    stud: int
    intermediate: tuple[int, ...]
    leadscrew: int

    @property
    def compound(self) -> bool:
        """Whether the intermediate stud carries a compound pair (else one idler)."""
        return len(self.intermediate) == 2

    @property
    def ratio(self) -> Fraction:
        """Leadscrew turns per stud turn (exact): stud / driven x driver / leadscrew."""
        if self.compound:
            driven, driver = self.intermediate
            return Fraction(self.stud * driver, driven * self.leadscrew)
        return Fraction(self.stud, self.leadscrew)

    @property
    def gears(self) -> tuple[int, ...]:
        """Every gear of the train (teeth)."""
        return (self.stud, *self.intermediate, self.leadscrew)

    @property
    def first_mesh(self) -> tuple[int, int]:
        """Teeth of the mesh stud gear - intermediate stud."""
        return self.stud, self.intermediate[0]

    @property
    def second_mesh(self) -> tuple[int, int]:
        """Teeth of the mesh intermediate stud - leadscrew gear."""
        return self.intermediate[-1], self.leadscrew

    def describe(self) -> str:
        """``40 : 127 / 60 : 50`` style text: stud, intermediate, leadscrew."""
        middle = " / ".join(str(z) for z in self.intermediate)
        return f"{self.stud} > {middle} > {self.leadscrew}"


@dataclass(frozen=True)
class FrameFit:
    """Where a train sits on the frame and whether it fits.

    Attributes
    ----------
    fits : bool
        Every rule holds.
    slot_position : float
        Distance of the intermediate stud from the leadscrew axis, mm.
    angle : float or None
        Frame angle from the line leadscrew-to-stud, radians (None: no triangle).
    margin : float
        The least slack over every rule, mm (negative: by how much the worst
        rule is missed).
    problem : str
        The rule with the least slack when the train does not fit, else "".
    """

    fits: bool
    slot_position: float
    angle: float | None
    margin: float
    problem: str = ""


def _slacks(setup: Setup, frame: Frame) -> tuple[float, float | None, list[tuple[float, str]]]:
    d = frame.stud_to_leadscrew
    a1 = frame.centre(*setup.first_mesh)
    a2 = frame.centre(*setup.second_mesh)
    near, far = frame.slot
    out = [
        (a1 + a2 - d, f"the gears do not reach: centre distances {a1:.1f} + {a2:.1f} mm are less than the "
                      f"{d:.1f} mm from stud to leadscrew"),
        (d - abs(a1 - a2), f"the centre distances {a1:.1f} and {a2:.1f} mm differ by more than the {d:.1f} mm "
                           "from stud to leadscrew"),
        (a2 - near, f"the intermediate stud would sit {a2:.1f} mm from the leadscrew, nearer than the slot's "
                    f"end at {near:.1f} mm"),
        (far - a2, f"the intermediate stud would sit {a2:.1f} mm from the leadscrew, beyond the slot's end at "
                   f"{far:.1f} mm"),
    ]
    angle = None
    if out[0][0] >= 0 and out[1][0] >= 0:
        cosine = (a2 * a2 + d * d - a1 * a1) / (2 * a2 * d)
        angle = math.acos(max(-1.0, min(1.0, cosine)))
        low, high = frame.swing
        out.append(((angle - low) * a2, f"the frame would stand at {math.degrees(angle):.1f} degrees, below its "
                                        f"swing from {math.degrees(low):.0f} degrees"))
        out.append(((high - angle) * a2, f"the frame would stand at {math.degrees(angle):.1f} degrees, beyond its "
                                         f"swing to {math.degrees(high):.0f} degrees"))
    boss = frame.boss_diameter / 2 + frame.gear_gap
    tip = frame.tip_radius
    out.append((d - tip(setup.stud) - boss, f"the {setup.stud}-tooth stud gear hits the leadscrew's end"))
    out.append((d - tip(setup.leadscrew) - boss, f"the {setup.leadscrew}-tooth leadscrew gear hits the stud's end"))
    if setup.compound:
        driven, driver = setup.intermediate
        out.append((a2 - tip(driven) - boss, f"the {driven}-tooth driven gear of the intermediate pair hits the "
                                             "leadscrew's end"))
        out.append((a1 - tip(driver) - boss, f"the {driver}-tooth driver of the intermediate pair hits the "
                                             "stud's end"))
    else:
        out.append((d - tip(setup.stud) - tip(setup.leadscrew) - frame.gear_gap,
                    f"the {setup.stud}-tooth stud gear and the {setup.leadscrew}-tooth leadscrew gear "
                    "(one plane) hit each other"))
    return a2, angle, out


def place(setup: Setup, frame: Frame) -> FrameFit:
    """Place ``setup`` on ``frame``: slot position, frame angle, and the least slack of every rule.

    Parameters
    ----------
    setup : Setup
        The train (teeth).
    frame : Frame
        The frame's geometry, mm and radians.

    Returns
    -------
    FrameFit
    """
    a2, angle, slacks = _slacks(setup, frame)
    margin, problem = min(slacks, key=lambda item: item[0])
    fits = margin >= -1e-9
    return FrameFit(fits, a2, angle, margin, "" if fits else problem)
