"""Planetary sets: simple and stepped planets, their ratios and the three conditions.

A set has a sun (``z_s`` teeth), ``N`` equal planets and a ring (``z_r``
teeth, internal), the planets' axes held by the carrier.  A simple planet
has one gear (``z_p``) meshing sun and ring; a stepped planet has two gears
on one shaft, ``z_p1`` meshing the sun and ``z_p2`` meshing the ring.  Any
of sun, ring and carrier may be fixed, the other two being input and
output.  Every ratio comes from the network model of
:mod:`gearcad.ratio.kinematics` (Willis' equation on each mesh relative to the
carrier); the search evaluates the formula that model derives with symbolic
tooth counts, and each reported ratio is recomputed numerically from the
network with all its planets.

The three conditions (each reported as a :class:`gearcad.meshes.checks.Finding`):

coaxial
    Sun-planet and planet-ring centre distances agree: with one module and
    no shift ``z_r = z_s + z_p1 + z_p2`` (``z_s + 2 z_p``); with a shift limit
    ``X`` other ring sizes are accepted where profile shift coefficients
    within ``+-X`` on every gear bring both meshes to one working centre
    distance.
assembly
    With the carrier turned by ``dtheta`` a planet fits again where
    ``dtheta / 2pi * Q`` is a multiple of ``g``, with
    ``Q = z_s z_p2 + z_r z_p1`` and ``g = gcd(z_p1, z_p2)`` (derived in the
    docstring of :func:`assembly_steps`); so equal spacing needs
    ``Q / (N g)`` whole, for a simple set ``(z_s + z_r) / N``.  Otherwise the
    nearest working unequal spacing is reported.
neighbour
    Adjacent planets' tip circles clear each other:
    ``2 a_w sin(dtheta_min / 2) - d_a,max >= margin`` with a margin of half a
    module by default (common practice).

Ratios are output turns per input turn, signed (negative: the output turns
the other way).  Lengths in mm, angles in radians; pure computation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from typing import Sequence

import sympy

from ..meshes.checks import Finding
from ..errors import InputError
from ..geometry.involute import inv
from .kinematics import Gear, Mesh, Network, make_network, network_ratio, symbolic_ratio
from ..meshes.internal import internal_centre_distance, internal_shift_sum_for_centre
from ..meshes.pair import centre_distance_for_shift, total_shift_for_centre
from .limits import TEETH_BOUNDS
from ..validate import as_int, finite

__all__ = [
    "MEMBERS", "MIN_TOOTH_DIFFERENCE", "NEIGHBOUR_MARGIN", "MAX_PLANETS", "DEFAULT_PLANETS",
    "DEFAULT_MAX_RING_TEETH", "MAX_SHIFT_LIMIT", "STANDARD_PRESSURE_ANGLE", "STANDARD_ADDENDUM", "PlanetarySet",
    "make_set", "Arrangement", "make_arrangement", "set_network", "set_ratio", "ratio_formula", "coaxial_shifts",
    "shift_plan", "assembly_steps", "assembly_angles", "phase_mismatch", "Conditions", "check_set",
]

#: The members that may be fixed, driven or driven by.
MEMBERS = ("sun", "ring", "carrier")
#: Fewest teeth a ring must have more than the planet gear it meshes (common practice
#: for 20 degree full-depth teeth: below about 10 the tips of an internal pair interfere).
MIN_TOOTH_DIFFERENCE = 10
#: Clearance between adjacent planets' tip circles, in modules (common practice).
NEIGHBOUR_MARGIN = 0.5
#: Most planets a set may have.
MAX_PLANETS = 24
#: Planets when none is asked for (common practice: three share the load statically determinately).
DEFAULT_PLANETS = 3
#: Most ring teeth searched by default (a choice of this tool; ``max_ring_teeth`` changes it).
DEFAULT_MAX_RING_TEETH = 200
#: Largest shift limit accepted (beyond about 1 teeth become pointed or undercut).
MAX_SHIFT_LIMIT = 1.0
#: Pressure angle and addendum (modules) of the ISO 53 basic rack, the defaults of the conditions.
STANDARD_PRESSURE_ANGLE = math.radians(20.0)
STANDARD_ADDENDUM = 1.0

_TOL = 1e-9


# --- sets and arrangements ----------------------------------------------------------------------------------

@dataclass(frozen=True)
class PlanetarySet:
    """Tooth counts and planet count of a set (see :func:`make_set`).

    Attributes
    ----------
    sun, planet, ring : int
        Teeth of the sun, of the planet gear meshing the sun, of the ring.
    planets : int
        Number of planets ``N``.
    planet_ring : int or None
        Stepped planets: teeth of the planet gear meshing the ring; None for
        a simple planet (one gear meshes both).
    """

    sun: int
    planet: int
    ring: int
    planets: int
    planet_ring: int | None = None

    @property
    def stepped(self) -> bool:
        """Whether the planets are stepped."""
        return self.planet_ring is not None

    @property
    def ring_planet(self) -> int:
        """Teeth of the planet gear meshing the ring."""
        return self.planet if self.planet_ring is None else self.planet_ring

    @property
    def total_teeth(self) -> int:
        """Teeth of every gear of the set, all planets included."""
        per_planet = self.planet + (self.planet_ring or 0)
        return self.sun + self.ring + self.planets * per_planet

    def describe(self) -> str:
        """E.g. ``"sun 20, planets 3 x 30, ring 80"`` or ``"... 3 x 30/18 ..."``."""
        planet = f"{self.planet}/{self.planet_ring}" if self.stepped else str(self.planet)
        return f"sun {self.sun}, planets {self.planets} x {planet}, ring {self.ring}"


def checked_teeth(value: object, name: str) -> int:
    z = as_int(value, name)
    low, high = TEETH_BOUNDS
    if not low <= z <= high:
        raise InputError(f"{name} must be from {low} to {high} teeth, got {value!r}")
    return z


def make_set(sun: object, planet: object, ring: object, planets: object = DEFAULT_PLANETS,
             planet_ring: object | None = None) -> PlanetarySet:
    """Check and build a :class:`PlanetarySet`.

    A stepped planet whose two gears have equal teeth is a simple planet.

    Raises
    ------
    InputError
        Tooth counts outside 4..400, a planet count outside 1..MAX_PLANETS,
        or a ring with fewer than ``MIN_TOOTH_DIFFERENCE`` teeth more than the
        planet gear it meshes.
    """
    zs, zp, zr = checked_teeth(sun, "sun"), checked_teeth(planet, "planet"), checked_teeth(ring, "ring")
    z2 = None if planet_ring is None else checked_teeth(planet_ring, "planet gear meshing the ring")
    n = as_int(planets, "planets")
    if not 1 <= n <= MAX_PLANETS:
        raise InputError(f"planets must be from 1 to {MAX_PLANETS}, got {planets!r}")
    mate = zp if z2 is None else z2
    if zr - mate < MIN_TOOTH_DIFFERENCE:
        raise InputError(f"ring of {zr} teeth is too few for a planet gear of {mate} teeth: an internal mesh needs "
                         f"at least {MIN_TOOTH_DIFFERENCE} teeth more on the ring (common practice); allowed: ring "
                         f">= {mate + MIN_TOOTH_DIFFERENCE}")
    return PlanetarySet(zs, zp, zr, n, None if z2 == zp else z2)


@dataclass(frozen=True)
class Arrangement:
    """Which member is fixed, which is the input and which the output."""

    fixed: str
    input: str
    output: str

    def describe(self) -> str:
        """E.g. ``"ring fixed, sun in, carrier out"``."""
        return f"{self.fixed} fixed, {self.input} in, {self.output} out"


def make_arrangement(fixed: str = "ring", input: str | None = None) -> Arrangement:
    """The arrangement with ``fixed`` held and ``input`` driven; the output is the third member.

    ``input`` defaults to the first of sun, ring, carrier that is not fixed.
    """
    for name, value in (("fixed member", fixed), ("input member", input)):
        if value is not None and value not in MEMBERS:
            raise InputError(f"{name} must be one of {', '.join(MEMBERS)}, got {value!r}")
    free = [m for m in MEMBERS if m != fixed]
    chosen = free[0] if input is None else input
    if chosen == fixed:
        raise InputError(f"input member {chosen!r} is the fixed member; allowed: {' or '.join(free)}")
    return Arrangement(fixed, chosen, next(m for m in free if m != chosen))


def set_network(pset: PlanetarySet) -> Network:
    """The kinematic network of a set: sun and ring on the frame's axis, every planet on the carrier.

    Members ``sun``, ``ring``, ``carrier`` and ``planet1`` .. ``planetN``.
    """
    gears = [Gear("sun", "sun", pset.sun), Gear("ring", "ring", pset.ring)]
    meshes = []
    for k in range(1, pset.planets + 1):
        member = f"planet{k}"
        if pset.stepped:
            gears += [Gear(f"{member}-sun", member, pset.planet), Gear(f"{member}-ring", member, pset.ring_planet)]
            at_sun, at_ring = f"{member}-sun", f"{member}-ring"
        else:
            gears.append(Gear(member, member, pset.planet))
            at_sun = at_ring = member
        meshes += [Mesh("sun", at_sun, "carrier"), Mesh(at_ring, "ring", "carrier", internal=True)]
    return make_network(gears, meshes)


def set_ratio(pset: PlanetarySet, arrangement: Arrangement) -> Fraction:
    """Output turns per input turn (signed), solved on the set's network."""
    return network_ratio(set_network(pset), (arrangement.fixed,), arrangement.input, arrangement.output)


TOOTH_SYMBOLS = sympy.symbols("z_s z_p1 z_p2 z_r", positive=True, integer=True)


@lru_cache(maxsize=32)
def ratio_formula(stepped: bool, arrangement: Arrangement) -> tuple[sympy.Expr, sympy.Expr]:
    """The ratio as ``numerator / denominator``, integer polynomials in ``z_s, z_p1, z_p2, z_r``.

    Derived by the kinematic model from a one-planet network with symbolic
    tooth counts (a simple planet uses ``z_p1`` for both meshes).
    """
    s, p1, p2, r = TOOTH_SYMBOLS
    gears = [Gear("sun", "sun", s), Gear("ring", "ring", r), Gear("p1", "planet", p1)]
    if stepped:
        gears.append(Gear("p2", "planet", p2))
    net = make_network(gears, [Mesh("sun", "p1", "carrier"), Mesh("p2" if stepped else "p1", "ring", "carrier", True)])
    num, den = sympy.fraction(sympy.cancel(symbolic_ratio(net, (arrangement.fixed,), arrangement.input,
                                                          arrangement.output)))
    scale = sympy.ilcm(*[sympy.fraction(c)[1] for c in sympy.Poly(num, *TOOTH_SYMBOLS).coeffs()
                         + sympy.Poly(den, *TOOTH_SYMBOLS).coeffs()])
    return sympy.expand(num * scale), sympy.expand(den * scale)


# --- coaxial condition --------------------------------------------------------------------------------------


def _reach(teeth: int, limit: float, alpha: float, internal: bool) -> tuple[float, float]:
    """Centre distances (module 1) reachable with a shift sum within +-2X (and where a working angle exists)."""
    cap = 0.999 * inv(alpha) * teeth / (2 * math.tan(alpha))
    if internal:  # a larger sum brings the planet nearer the ring's axis
        return internal_centre_distance(0, teeth, 1.0, alpha, min(2 * limit, cap)), internal_centre_distance(0, teeth, 1.0, alpha, -2 * limit)
    return (centre_distance_for_shift(teeth, 0, 1.0, alpha, max(-2 * limit, -cap)),
            centre_distance_for_shift(teeth, 0, 1.0, alpha, 2 * limit))


@lru_cache(maxsize=65536)
def coaxial_shifts(sun_sum: int, ring_difference: int, limit: float, stepped: bool,
                   pressure_angle: float = STANDARD_PRESSURE_ANGLE) -> tuple[float, float, float] | None:
    """The shift sums ``u`` (sun mesh), ``w`` (ring mesh) and common centre distance making a set coaxial.

    Parameters
    ----------
    sun_sum : int
        ``z_s + z_p1`` (the external mesh).
    ring_difference : int
        ``z_r - z_p2`` (the internal mesh).
    limit : float
        Largest |shift coefficient| of each gear (0: no shift).
    stepped : bool
        A simple planet carries one shift into both meshes, so with
        ``u = x_s + x_p`` and ``w = x_p + x_r`` also ``|u - w| <= 2X``.
    pressure_angle : float
        Radians.

    Returns
    -------
    (u, w, a_w) or None
        ``u = x_s + x_p1``, ``w = x_p2 + x_r`` (ISO sign), ``a_w`` in modules,
        chosen where ``u - w`` is nearest 0.  None when no shifts within the
        limit work.
    """
    if sun_sum == ring_difference:
        return 0.0, 0.0, sun_sum / 2
    if limit <= 0:
        return None
    (e_lo, e_hi), (i_lo, i_hi) = (_reach(sun_sum, limit, pressure_angle, False),
                                  _reach(ring_difference, limit, pressure_angle, True))
    low, high = max(e_lo, i_lo), min(e_hi, i_hi)
    if low > high:
        return None

    def sums(a: float) -> tuple[float, float]:
        return (total_shift_for_centre(sun_sum, 0, 1.0, pressure_angle, a),
                internal_shift_sum_for_centre(0, ring_difference, 1.0, pressure_angle, a))

    lo, hi = low, high
    for _ in range(60):  # u - w grows with the centre distance
        mid = (lo + hi) / 2
        u, w = sums(mid)
        lo, hi = (mid, hi) if u - w < 0 else (lo, mid)
    centre = min(max((lo + hi) / 2, low), high)
    u, w = sums(centre)
    if max(abs(u), abs(w)) > 2 * limit + _TOL or (not stepped and abs(u - w) > 2 * limit + _TOL):
        return None
    return u, w, centre


def _split(u: float, w: float, limit: float, stepped: bool) -> tuple[float, float, float, float]:
    """Shift coefficients (sun, planet at sun, planet at ring, ring) from the sums ``u`` and ``w``.

    Stepped planets share each sum equally between its two gears; a simple
    planet carries one coefficient into both meshes, chosen to make the
    largest |x| least.
    """
    if stepped:
        return u / 2, u / 2, w / 2, w / 2
    choices = [min(max(x, -limit), limit) for x in (0.0, u, w, u / 2, w / 2, (u + w) / 2)]
    xp = min(choices, key=lambda x: max(abs(u - x), abs(x), abs(w - x)))
    return u - xp, xp, xp, w - xp


@lru_cache(maxsize=65536)
def shift_plan(sun_sum: int, ring_difference: int, limit: float, stepped: bool,
               pressure_angle: float = STANDARD_PRESSURE_ANGLE) -> tuple[float, float, float, float, float] | None:
    """Shifts (sun, planet at sun, planet at ring, ring; ISO sign) and centre distance (modules), or None.

    Depends on the tooth sums only (see :func:`coaxial_shifts`), so the
    search tabulates it.
    """
    found = coaxial_shifts(sun_sum, ring_difference, limit, stepped, pressure_angle)
    if found is None:
        return None
    u, w, centre = found
    if u == 0 and w == 0:
        return 0.0, 0.0, 0.0, 0.0, centre
    return (*_split(u, w, limit, stepped), centre)


def _coaxial(pset: PlanetarySet, module: float, limit: float, alpha: float) -> tuple[Finding, float, tuple]:
    sun_sum, ring_diff = pset.sun + pset.planet, pset.ring - pset.ring_planet
    found = shift_plan(sun_sum, ring_diff, limit, pset.stepped, alpha)
    a_e, a_i = module * sun_sum / 2, module * ring_diff / 2
    if found is None:
        allowed = sun_sum + pset.ring_planet
        finding = Finding("coaxial", "failure", abs(a_e - a_i), 0.0,
                          f"sun-planet centre distance {a_e:.4f} mm, planet-ring {a_i:.4f} mm: they differ and no "
                          f"profile shift within +-{limit:g} equalises them; allowed: ring of {allowed} teeth")
        return finding, a_e, (0.0, 0.0, 0.0, 0.0)
    *shifts, _ = found
    xs, xp1, xp2, xr = shifts
    ext = centre_distance_for_shift(pset.sun, pset.planet, module, alpha, xs + xp1)
    internal = internal_centre_distance(0, ring_diff, module, alpha, xp2 + xr)
    how = "without shift" if not any(shifts) else ("with shifts sun {:+.3f}, planet {:+.3f}/{:+.3f}, ring {:+.3f} "
                                                   "(ISO sign)").format(*shifts)
    finding = Finding("coaxial", "ok", abs(ext - internal), _TOL * module,
                      f"both meshes at centre distance {ext:.4f} mm {how}")
    return finding, ext, tuple(shifts)


# --- assembly condition -------------------------------------------------------------------------------------

def assembly_steps(pset: PlanetarySet) -> int:
    """``P = (z_s z_p2 + z_r z_p1) / gcd(z_p1, z_p2)``: planets fit at the angles ``2 pi m / P``.

    Derivation: with tooth phases counted in pitches, a planet at angle
    ``theta`` meshes the sun when ``z_p1 beta = z_s theta + z_p1 theta + c1``
    and the ring when ``z_p2 beta = z_p2 theta - z_r theta + c2`` (mod one
    pitch, ``beta`` the planet's own rotation, free for each planet).  An
    integer ``j`` with ``beta = (A + j) / z_p1`` solves both iff
    ``z_p2 A - z_p1 B`` lies in ``z_p1 Z + z_p2 Z = gcd Z``; between two planets
    that quantity changes by ``dtheta / 2pi (z_s z_p2 + z_r z_p1)``.
    """
    g = math.gcd(pset.planet, pset.ring_planet)
    return (pset.sun * pset.ring_planet + pset.ring * pset.planet) // g


def assembly_angles(pset: PlanetarySet) -> tuple[float, ...]:
    """Planet angles (radians): equal spacing when it assembles, else the nearest spacing that does."""
    steps = assembly_steps(pset)
    n = pset.planets
    return tuple(2 * math.pi * round(Fraction(k * steps, n)) / steps for k in range(n))


def phase_mismatch(pset: PlanetarySet, angles: Sequence[float]) -> tuple[float, ...]:
    """For each planet, how far (in circular pitches) its ring mesh misses once it meshes the sun.

    Planet 0 (at ``angles[0]``) sets the phases; each other planet is turned
    on its pin to mesh the sun and the least miss at the ring over every such
    turn is returned (0: it fits).
    """
    g = math.gcd(pset.planet, pset.ring_planet)
    steps = assembly_steps(pset)
    out = []
    for theta in angles:
        turns = (theta - angles[0]) / (2 * math.pi) * steps
        out.append(g / pset.planet * abs(turns - round(turns)))
    return tuple(out)


def _assembly(pset: PlanetarySet) -> tuple[Finding, tuple[float, ...]]:
    n, steps = pset.planets, assembly_steps(pset)
    g = math.gcd(pset.planet, pset.ring_planet)
    equal = tuple(2 * math.pi * k / n for k in range(n))
    mismatch = phase_mismatch(pset, equal)
    worst = max(mismatch)
    q = f"(z_s z_p2 + z_r z_p1) / (N gcd) = {steps * g}/({n}*{g})"
    if steps % n == 0:
        return Finding("assembly", "ok", worst, 0.0, f"{q} = {steps // n}, whole: {n} planets equally spaced"), equal
    clash = next(k for k, e in enumerate(mismatch) if e > _TOL)
    angles = assembly_angles(pset)
    spaced = ", ".join(f"{math.degrees(a):.3f}" for a in angles)
    return (Finding("assembly", "warning", worst, 0.0,
                    f"{q} is not whole: equally spaced, planet {clash + 1} misses the ring by "
                    f"{mismatch[clash]:.3f} pitch; the planets assemble at {spaced} degrees"), angles)


# --- neighbour condition ------------------------------------------------------------------------------------

def _neighbour(pset: PlanetarySet, module: float, centre: float, shifts: tuple, angles: Sequence[float],
               margin: float, addendum: float) -> Finding:
    if pset.planets == 1:
        return Finding("neighbour", "ok", math.inf, margin * module, "one planet: no neighbour")
    tips = [module * (pset.planet + 2 * addendum + 2 * shifts[1])]
    if pset.stepped:
        tips.append(module * (pset.ring_planet + 2 * addendum + 2 * shifts[2]))
    gaps = [(angles[(k + 1) % len(angles)] - angles[k]) % (2 * math.pi) for k in range(len(angles))]
    spacing = 2 * centre * math.sin(min(gaps) / 2)
    clearance = spacing - max(tips)
    ok = clearance >= margin * module - _TOL
    return Finding("neighbour", "ok" if ok else "failure", clearance, margin * module,
                   f"adjacent planets' tip circles ({max(tips):.4f} mm) {spacing:.4f} mm apart clear by "
                   f"{clearance:.4f} mm (at least {margin * module:.4f} mm wanted, common practice)")


@dataclass(frozen=True)
class Conditions:
    """The three conditions of a set and the figures they found.

    Attributes
    ----------
    coaxial, assembly, neighbour : Finding
        Severity ``ok`` or ``failure`` (``assembly`` is a ``warning`` when only
        an unequal spacing assembles; ``angles`` then holds it).
    centre_distance : float
        Working centre distance of the planets, mm.
    shifts : tuple of 4 float
        Profile shift coefficients: sun, planet gear at the sun, planet gear at
        the ring, ring (ISO 21771 sign: the ring's positive towards its tooth
        tips, as in :mod:`gearcad.meshes.internal`).
    angles : tuple of float
        Planet positions, radians.
    """

    coaxial: Finding
    assembly: Finding
    neighbour: Finding
    centre_distance: float
    shifts: tuple[float, float, float, float]
    angles: tuple[float, ...]

    @property
    def findings(self) -> tuple[Finding, Finding, Finding]:
        """The three findings."""
        return self.coaxial, self.assembly, self.neighbour

    @property
    def ok(self) -> bool:
        """All three conditions met with equally spaced planets."""
        return all(f.severity == "ok" for f in self.findings)


def checked_shift_limit(value: object | None) -> float:
    if value is None:
        return 0.0
    limit = finite(value, "shift limit")
    if not 0 <= limit <= MAX_SHIFT_LIMIT:
        raise InputError(f"shift limit must be from 0 to {MAX_SHIFT_LIMIT:g}, got {value!r}")
    return limit


def check_set(pset: PlanetarySet, module: float = 1.0, shift_limit: float | None = None,
              margin: float = NEIGHBOUR_MARGIN, pressure_angle: float = STANDARD_PRESSURE_ANGLE,
              addendum: float = STANDARD_ADDENDUM) -> Conditions:
    """Check coaxial, assembly and neighbour conditions of a set.

    Parameters
    ----------
    pset : PlanetarySet
    module : float
        Module of every mesh, mm.
    shift_limit : float, optional
        Largest |profile shift coefficient| per gear; None: no shift.
    margin : float
        Least clearance of adjacent planets' tip circles, modules.
    pressure_angle : float
        Radians.
    addendum : float
        Addendum coefficient (tip height over the reference circle, modules).
    """
    limit = checked_shift_limit(shift_limit)
    coaxial, centre, shifts = _coaxial(pset, module, limit, pressure_angle)
    assembly, angles = _assembly(pset)
    neighbour = _neighbour(pset, module, centre, shifts, angles, margin, addendum)
    return Conditions(coaxial, assembly, neighbour, centre, shifts, angles)


