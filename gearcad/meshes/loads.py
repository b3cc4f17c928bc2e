"""Steady loads in planetary sets and differentials: the torque and the speed each mesh carries.

Pure, losses neglected.  Torques are magnitudes in N·m, speeds magnitudes in
rpm; a mesh whose gears sit on a carrier runs at the speed relative to that
carrier (what wears it and what the velocity factor sees).

The statics of a planetary set follow from two facts (any textbook on epicyclic
trains, e.g. Shigley ch. 13, from memory): the three members' torques sum to
zero (the set is in equilibrium), and, lossless, their powers sum to zero.  So
the input's torque fixes the output's, ``T_out = -T_in w_in / w_out``, and the
fixed member takes the rest.  The sun's torque is shared by the planets;
each planet, in equilibrium about its own pin, passes the same tangential force
to the ring (scaled by its two pitch radii when stepped).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

__all__ = ["MeshLoad", "member_torques", "planet_mesh_loads", "differential_side_torques"]

STATIC_SPEED = 1e-6  # rpm given to a mesh that only turns with its carrier: a static load (velocity factor 1)


@dataclass(frozen=True)
class MeshLoad:
    """Torque (N·m) on a mesh's first gear and that gear's speed (rpm) relative to the mesh's carrier."""

    torque: float
    speed: float


def member_torques(speeds: dict[str, Fraction], fixed: str, input: str, output: str, torque_in: float) -> dict[str, float]:
    """Signed torques (N·m) on sun, ring and carrier for ``torque_in`` on the input, from equilibrium and power.

    ``speeds``: the members' speeds per input turn (the kinematic model's).
    """
    w_in, w_out = float(speeds[input]), float(speeds[output])
    torques = {input: torque_in, output: -torque_in * w_in / w_out}
    torques[fixed] = -(torques[input] + torques[output])
    return torques


def planet_mesh_loads(sun_torque: float, relative_sun_speed: float, planets: int, sun_teeth: int, planet_teeth: int
                      ) -> tuple[MeshLoad, MeshLoad]:
    """Loads of one planet's two meshes: sun with planet, planet (its ring-side gear) with ring.

    ``sun_torque`` N·m on the sun, shared equally by ``planets`` (load sharing
    factor 1: real sets share less evenly); ``relative_sun_speed`` rpm of the sun
    relative to the carrier.  The planet's torque about its pin is the sun's
    share times ``z_p / z_s`` (same tangential force, its own pitch radius) at
    ``z_s / z_p`` times the relative speed.
    """
    share = abs(sun_torque) / planets
    speed = max(abs(relative_sun_speed), STATIC_SPEED)
    return (MeshLoad(share, speed),
            MeshLoad(share * planet_teeth / sun_teeth, max(speed * sun_teeth / planet_teeth, STATIC_SPEED)))


def differential_side_torques(kind: str, output_torque: float, sun: int | None = None, ring: int | None = None
                              ) -> tuple[float, float]:
    """Torque magnitudes (N·m) on sides A and B of a differential whose carrier carries ``output_torque``.

    ``mean``: the carrier's torque splits equally between the two equal suns.
    ``planetary``: sun (side A) and ring (side B) share it as ``z_s : z_r``
    (the planets' equilibrium: equal tangential forces at the sun and the ring).
    """
    t = abs(output_torque)
    if kind == "mean":
        return t / 2, t / 2
    return t * sun / (sun + ring), t * ring / (sun + ring)
