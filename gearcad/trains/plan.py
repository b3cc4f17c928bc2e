"""From a train description to everything that will be made: the plan.

``plan_compound(spec)`` resolves profiles, builds every meshing pair and its
checks, the cut outlines (with the fabrication profile's kerf), the shaft
layout, the plates and the assembly phasing.  Pure: no file is read but the
profiles, none is written; the writers in ``gearcad.export`` consume the plan.
Lengths in mm, angles in radians.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..meshes.checks import Finding, PairAnalysis, analyse_pair
from ..errors import InputError
from ..geometry.bore import bore_loop
from ..geometry.gear import SpurGear
from ..geometry.offset import min_concave_radius, offset_loop
from ..geometry.shape import Loop, Part, circle_loop, gear_loop, rounded_rectangle
from ..ratio.kinematics import direction_of
from .layout import Layout, LayoutGear, LayoutProblem, Link, mesh_phase, shaft_sides, solve_layout
from ..meshes.pair import GearPair, make_pair
from ..profiles import Fabrication, ToothSystem, load_fabrication, load_tooth_system
from .spec import GearSpec, TrainSpec

__all__ = ["Plan", "PlannedGear", "PlannedMesh", "PlannedShaft", "PlannedPlate", "InputLoad", "plan_compound", "MIN_RIM",
           "frame_plates"]

MIN_RIM = 1.0  # modules of material between the bore (or keyway) and the root circle; common practice


@dataclass(frozen=True)
class PlannedGear:
    """One gear as it will be made and placed."""

    name: str
    role: str
    stage: int
    gear: SpurGear
    spec: GearSpec
    shaft: int
    layer: int
    bore: float  # shaft diameter, mm
    part: Part  # drawn size, centred on the origin
    cut_part: Part  # what the machine follows (kerf applied), centred on the origin
    rotation: float  # turn in the assembly, radians
    z: float  # lower face in the assembly, mm
    hub: Part | None = None  # boss on the upper face (solid models only), drawn size
    hub_length: float = 0.0  # mm
    label_at: tuple[float, float] | None = None  # where the marking text goes (default: in the rim), mm


@dataclass(frozen=True)
class InputLoad:
    """A steady load on the input shaft: torque (N·m) and speed (rpm)."""

    torque: float
    speed: float


@dataclass(frozen=True)
class PlannedMesh:
    """A meshing pair of the plan, with its analysis, load rating and extra findings."""

    names: tuple[str, str]
    pair: GearPair
    analysis: PairAnalysis
    findings: tuple[Finding, ...]
    rating: object | None = None  # gearcad.strength.PairRating when a load was given


@dataclass(frozen=True)
class PlannedShaft:
    """A shaft: position on the plate (mm), diameter (mm), which plates hold it."""

    name: str
    x: float
    y: float
    diameter: float
    back: bool
    front: bool


@dataclass(frozen=True)
class PlannedPlate:
    """A plate: drawn part, cut part, lower face z (mm)."""

    name: str
    part: Part
    cut_part: Part
    z: float


@dataclass(frozen=True)
class Plan:
    """Everything to be made, with its figures."""

    spec: TrainSpec
    system: ToothSystem
    fabrication: Fabrication
    gears: tuple[PlannedGear, ...]
    meshes: tuple[PlannedMesh, ...]
    shafts: tuple[PlannedShaft, ...]
    plates: tuple[PlannedPlate, ...]
    layout: Layout
    ratio: Fraction
    direction: str
    tolerance: float
    findings: tuple[Finding, ...]
    mechanism: object | None = None  # gearcad.trains.supports.Mechanism: supports, bought parts, interference
    worm: object | None = None  # gearcad.trains.worm_stage.WormLayout: a worm stage's worm, across the plates
    bonded: tuple[tuple[str, ...], ...] = ()  # parts glued face on face into one, each group bottom up (plate/gear names)

    def gear(self, name: str) -> PlannedGear:
        """The planned gear called ``name``."""
        return next(g for g in self.gears if g.name == name)


def _system(spec: TrainSpec) -> ToothSystem:
    system = load_tooth_system(spec.tooth_system)
    if spec.pressure_angle is None:
        return system
    if not 10 <= spec.pressure_angle <= 35:
        raise InputError(f"pressure_angle must be from 10 to 35 degrees, got {spec.pressure_angle!r}")
    return dataclasses.replace(system, pressure_angle=math.radians(spec.pressure_angle))


@dataclass
class _Chain:
    """Shafts and meshes as the stages are walked (working state of :func:`plan_compound`)."""

    gears: list[tuple[str, str, int, GearSpec, int, int]]  # name, role, stage, spec, shaft, layer
    links: list[tuple[int, int, str, str]]  # parent shaft, child shaft, driver name, driven name
    shafts: int = 1


def _walk(spec: TrainSpec) -> _Chain:
    chain = _Chain([], [])
    shaft = 0
    for k, stage in enumerate(spec.stages, start=1):
        layer = k - 1
        driver = f"s{k}-driver"
        chain.gears.append((driver, "driver", k, stage.driver, shaft, layer))
        last = driver
        if stage.idler is not None:
            idler = f"s{k}-idler"
            chain.gears.append((idler, "idler", k, stage.idler, chain.shafts, layer))
            chain.links.append((shaft, chain.shafts, driver, idler))
            shaft, last = chain.shafts, idler
            chain.shafts += 1
        driven = f"s{k}-driven"
        chain.gears.append((driven, "driven", k, stage.driven, chain.shafts, layer))
        chain.links.append((shaft, chain.shafts, last, driven))
        shaft = chain.shafts
        chain.shafts += 1
    return chain


def _stage_module(spec: TrainSpec, stage: int) -> float:
    m = spec.stages[stage - 1].module
    return spec.module if m is None else m


def _pairs(spec: TrainSpec, chain: _Chain, system: ToothSystem, fab: Fabrication) -> dict[tuple[str, str], GearPair]:
    specs = {name: (gspec, stage) for name, _, stage, gspec, _, _ in chain.gears}
    pairs = {}
    hands: dict[str, str] = {}
    for _, _, a, b in chain.links:
        (ga, stage), (gb, _) = specs[a], specs[b]
        st = spec.stages[stage - 1]
        if st.helix:  # a helical stage: normal module and shifts; the hands alternate from the driver's
            from ..meshes.helical import make_helical_pair

            hand = hands.get(a, st.hand)
            pair = make_helical_pair(ga.teeth, gb.teeth, _stage_module(spec, stage), system, math.radians(st.helix),
                                     hand, shifts=(ga.shift, gb.shift), backlash=fab.backlash)
            hands[b] = pair.gear2.hand
            from ..meshes.helical import check_face_width

            check_face_width((pair.gear1, pair.gear2), spec.thickness)
            pairs[(a, b)] = pair
            continue
        pairs[(a, b)] = make_pair(ga.teeth, gb.teeth, _stage_module(spec, stage), system,
                                  shifts=(ga.shift, gb.shift), backlash=fab.backlash)
    return pairs


def _gear_of(name: str, pairs: dict[tuple[str, str], GearPair]) -> SpurGear:
    for (a, b), pair in pairs.items():
        if a == name:
            return pair.gear1
        if b == name:
            return pair.gear2
    raise KeyError(name)


def _check_bore(name: str, gear: SpurGear, gspec: GearSpec, bore: float) -> None:
    extra = gspec.keyway.depth if gspec.keyway else 0.0
    room = gear.root_diameter / 2 - MIN_RIM * gear.module
    if bore / 2 + extra > room:
        raise InputError(f"{name}: bore {bore:g} mm is too large for {gear.teeth} teeth of module {gear.module:g}: "
                         f"it must leave {MIN_RIM:g} module of rim below the root circle (bore up to {2 * (room - extra):.2f} mm)")


def _label(name: str, gear: SpurGear) -> str:
    if hasattr(gear, "hand"):  # helical: normal module and shift; the drawing is the transverse section at mid-face
        return (f"{name}  z{gear.teeth}  mn{gear.normal_module:g}  xn{gear.normal_shift:+.3f}  "
                f"helix {math.degrees(gear.helix_angle):g} {gear.hand}  transverse section")
    return f"{name}  z{gear.teeth}  m{gear.module:g}  x{gear.shift:+.3f}"


def _gear_parts(name: str, gear: SpurGear, gspec: GearSpec, bore: float, fab: Fabrication, tolerance: float) -> tuple[Part, Part]:
    hole = bore + fab.bore_clearance
    outer = gear_loop(gear, tolerance)
    shaped = bore_loop(hole, flat=gspec.flat, keyway=(gspec.keyway.width, gspec.keyway.depth) if gspec.keyway else None,
                       tolerance=tolerance)
    holes = (shaped,) if shaped is not None else ()
    circles = () if shaped is not None else ((0.0, 0.0, hole),)
    part = Part(name, outer, holes, circles, _label(name, gear), symmetry=gear.teeth)
    half = fab.kerf / 2
    if half == 0:
        return part, part
    cut = Part(name, offset_loop(outer, half, tolerance), tuple(offset_loop(h, half, tolerance) for h in holes),
               tuple((x, y, d - fab.kerf) for x, y, d in circles), part.label, symmetry=gear.teeth)
    return part, cut


def _hub_part(name: str, gear: SpurGear, gspec: GearSpec, part: Part, tolerance: float) -> Part | None:
    hub = gspec.hub
    if hub is None:
        return None
    hole = max([d for _, _, d in part.circles] + [2 * float(np.hypot(*h.points().T).max()) for h in part.holes])
    if not (math.isfinite(hub.length) and hub.length > 0):
        raise InputError(f"{name}: hub length must be greater than 0 mm, got {hub.length!r}")
    if not hole + 1.0 <= hub.diameter <= gear.root_diameter:
        raise InputError(f"{name}: hub diameter must be from {hole + 1.0:.2f} mm (the bore plus 1 mm) to the root "
                         f"diameter {gear.root_diameter:.2f} mm, got {hub.diameter!r}")
    return Part(f"{name}-hub", circle_loop(0.0, 0.0, hub.diameter, tolerance, clockwise=False), part.holes, part.circles)


def _layer_heights(spec: TrainSpec, chain: _Chain, fab: Fabrication, room: frozenset[int] = frozenset()) -> list[float]:
    """Lower-face z of each layer, mm: the face width, the gap and the longest hub of the layer below.

    ``room``: the layers below which a bridge stands (``k`` in ``room``: room for a bridge under layer ``k``).
    """
    from .hardware import bridge_room

    layers = len(spec.stages)
    hubs = [max([g[3].hub.length for g in chain.gears if g[5] == k and g[3].hub] + [0.0]) for k in range(layers)]
    heights, z = [], fab.layer_gap
    for k in range(layers + 1):
        if k in room:
            z += bridge_room(spec.thickness, fab.layer_gap)
        if k == layers:
            break
        heights.append(z)
        z += spec.thickness + hubs[k] + fab.layer_gap
    return heights + [z]


def _bridges_wanted(chain: _Chain, shafts: list[PlannedShaft]) -> dict[int, str]:
    """Shafts that reach one plate only: the side their bridge goes (the blocked one)."""
    wanted = {}
    for i, s in enumerate(shafts):
        if s.back != s.front:
            wanted[i] = "front" if s.back else "back"
    return wanted


def _bridge_layers(chain: _Chain, wanted: dict[int, str]) -> frozenset[int]:
    """Layer indices under which a bridge needs room: above a front-bridged shaft's top layer, below a back-bridged one's."""
    room = set()
    for i, side in wanted.items():
        layers = [g[5] for g in chain.gears if g[4] == i]
        room.add(max(layers) + 1 if side == "front" else min(layers))
    return frozenset(room)


def _tool_finding(name: str, loop: Loop, fab: Fabrication) -> Finding | None:
    if fab.process != "cnc" or fab.tool_radius <= 0:
        return None
    tightest = min_concave_radius(loop)
    if tightest + 1e-9 < fab.tool_radius:
        return Finding(f"tool radius {name}", "warning", tightest, fab.tool_radius,
                       f"{name}: the root fillet bends at {tightest:.3f} mm radius, tighter than the "
                       f"{fab.tool_radius:g} mm tool: the mill leaves the root rounder and the tips of the mate may touch it; "
                       "use a smaller tool or a larger module")
    return Finding(f"tool radius {name}", "ok", tightest, fab.tool_radius,
                   f"{name}: the tightest root fillet ({tightest:.3f} mm radius) takes the {fab.tool_radius:g} mm tool")


def _layout(spec: TrainSpec, chain: _Chain, pairs, bores: dict[int, float], fab: Fabrication,
            alternative: int = 0) -> tuple[LayoutProblem, Layout | None]:
    names = [g[0] for g in chain.gears]
    gears = tuple(LayoutGear(name, shaft, layer, _gear_of(name, pairs).tip_diameter / 2)
                  for name, _, _, _, shaft, layer in chain.gears)
    links = tuple(Link(p, c, pairs[(a, b)].centre_distance) for p, c, a, b in chain.links)
    meshes = frozenset(frozenset((names.index(a), names.index(b))) for _, _, a, b in chain.links)
    coaxial = (0, chain.shafts - 1) if spec.coaxial else None
    if spec.coaxial and any(s.idler for s in spec.stages):
        raise InputError("a coaxial train cannot carry idlers")
    from .hardware import SPACER_WALL

    # What passes the gears of other layers is the shaft with its spacer tube on it.
    problem = LayoutProblem(tuple(bores[s] / 2 + SPACER_WALL for s in range(chain.shafts)), gears, links, meshes,
                            fab.gear_clearance, fab.plate_margin, coaxial)
    return problem, solve_layout(problem, alternative)


def _phases(chain: _Chain, layout: Layout) -> dict[str, float]:
    rotation: dict[str, float] = {}
    teeth = {g[0]: g[3].teeth for g in chain.gears}
    for parent, child, a, b in chain.links:
        rotation.setdefault(a, 0.0)
        dx, dy = layout.positions[child] - layout.positions[parent]
        rotation[b] = mesh_phase(rotation[a], teeth[a], teeth[b], math.atan2(dy, dx))
    return rotation


def frame_plates(spec: TrainSpec, fab: Fabrication, layout: Layout, shafts: list[PlannedShaft], tolerance: float,
                 front_z: float) -> tuple[PlannedPlate, ...]:
    """The back and front plates: the layout's rectangle with the bores of the shafts each holds, and spacer holes."""
    w, h = layout.width, layout.height
    inset = fab.plate_margin / 2
    spacers = tuple((x, y, fab.spacer_hole) for x in (inset, w - inset) for y in (inset, h - inset))
    outer = rounded_rectangle(w, h, fab.plate_corner_radius, tolerance)
    plates = []
    for name, side, z in (("back-plate", "back", -spec.thickness), ("front-plate", "front", front_z)):
        holes = tuple((s.x, s.y, s.diameter + fab.bore_clearance) for s in shafts if getattr(s, side))
        unique = tuple(dict.fromkeys(holes))  # coaxial shafts share one hole
        part = Part(name, outer, (), unique + spacers, f"{spec.name} {name}")
        cut = part
        if fab.kerf:
            cut = Part(name, offset_loop(outer, fab.kerf / 2, tolerance), (),
                       tuple((x, y, d - fab.kerf) for x, y, d in unique + spacers), part.label)
        plates.append(PlannedPlate(name, part, cut, z))
    return tuple(plates)


def _shaft_loads(chain: _Chain, pairs: dict[tuple[str, str], GearPair], load: InputLoad) -> dict[str, tuple[float, float]]:
    """Torque (N·m) and speed (rpm) of every gear, losses neglected: each mesh scales them by z2 / z1."""
    loads: dict[str, tuple[float, float]] = {}
    teeth = {g[0]: g[3].teeth for g in chain.gears}
    shaft_of = {g[0]: g[4] for g in chain.gears}
    by_shaft: dict[int, tuple[float, float]] = {0: (load.torque, load.speed)}
    for _, _, a, b in chain.links:
        torque, speed = loads.get(a) or by_shaft[shaft_of[a]]
        loads[a] = (torque, speed)
        ratio = teeth[b] / teeth[a]
        loads[b] = (torque * ratio, speed / ratio)
        by_shaft[shaft_of[b]] = loads[b]
    return loads


def _meshes(chain: _Chain, pairs, fab: Fabrication, spec: TrainSpec, load: InputLoad | None):
    loads = _shaft_loads(chain, pairs, load) if load else {}
    material = None
    if load:
        from ..materials import load_material

        material = load_material(fab.material_profile)
    stage_of = {g[0]: g[2] for g in chain.gears}
    for (a, b), pair in pairs.items():
        rating, extra = None, ()
        stage = spec.stages[stage_of[a] - 1]
        if load:
            from ..meshes.strength import PROCESS_CLASS, rate_pair

            torque, speed = loads[a]
            if stage.helix:
                from ..meshes.helical_rating import rate_helical_pair

                rating = rate_helical_pair(pair, torque, speed, spec.thickness, material, material,
                                           PROCESS_CLASS[fab.process], herringbone=stage.herringbone, gap_mm=stage.gap)
            else:
                rating = rate_pair(pair, torque, speed, spec.thickness, material, material,
                                   PROCESS_CLASS[fab.process])
            extra = rating.findings()
        analysis = analyse_pair(pair)
        if stage.helix:
            from ..meshes.helical import hand_findings, helical_mesh, in_normal_terms, overlap_finding

            analysis = in_normal_terms(analysis)
            width = (spec.thickness - stage.gap) / 2 if stage.herringbone else spec.thickness
            mesh = helical_mesh(pair, analysis.contact_ratio, analysis.backlash, width)
            extra = (*hand_findings(pair.gear1.hand, pair.gear2.hand), overlap_finding(mesh), *extra)
        yield PlannedMesh((a, b), pair, analysis, extra, rating)


def plan_compound(spec: TrainSpec, tolerance: float, load: InputLoad | None,
                  alternative: int = 0) -> tuple[Plan, dict[int, str]] | None:
    """The plan of a compound train (its ``[[stage]]`` tables) and the bridges its layout asks for.

    ``alternative`` k > 0: on the layout search's k-th other placement (``layout.solve_layout``); ``None`` when
    there is none.
    """
    if not spec.stages:
        raise InputError("the train has no stages: solve its ratio first (gearcad design)")
    system = _system(spec)
    fab = load_fabrication(spec.fabrication)
    chain = _walk(spec)
    pairs = _pairs(spec, chain, system, fab)
    bores = {}
    for name, _, _, gspec, shaft, _ in chain.gears:
        bore = _bore(spec, gspec, shaft, chain, fab)
        _check_bore(name, _gear_of(name, pairs), gspec, bore)
        bores[shaft] = max(bores.get(shaft, 0.0), bore)
    problem, layout = _layout(spec, chain, pairs, bores, fab, alternative)
    if layout is None:
        return None
    sides = shaft_sides(problem, layout.positions)
    shafts = [PlannedShaft(_shaft_name(i, chain.shafts), float(x), float(y), bores[i], back, front)
              for i, ((x, y), (back, front)) in enumerate(zip(layout.positions, sides))]
    rotation = _phases(chain, layout)
    wanted = _bridges_wanted(chain, shafts)
    heights = _layer_heights(spec, chain, fab, _bridge_layers(chain, wanted))
    gears, extra = [], []
    for name, role, stage, gspec, shaft, layer in chain.gears:
        gear = _gear_of(name, pairs)
        bore = _bore(spec, gspec, shaft, chain, fab)
        part, cut = _gear_parts(name, gear, gspec, bore, fab, tolerance)
        finding = _tool_finding(name, part.outer, fab)
        if finding:
            extra.append(finding)
        gears.append(PlannedGear(name, role, stage, gear, gspec, shaft, layer, bore, part, cut, rotation[name],
                                 heights[layer], _hub_part(name, gear, gspec, part, tolerance),
                                 gspec.hub.length if gspec.hub else 0.0))
    meshes = tuple(_meshes(chain, pairs, fab, spec, load))
    signed = _network_ratio(chain)
    ratio, direction = abs(signed), direction_of(signed)
    plates = frame_plates(spec, fab, layout, shafts, tolerance, heights[-1])
    return Plan(spec, system, fab, tuple(gears), meshes, tuple(shafts), plates, layout, ratio, direction, tolerance,
                tuple(extra)), wanted


def _bore(spec: TrainSpec, gspec: GearSpec, shaft: int, chain: _Chain, fab: Fabrication) -> float:
    """A gear's shaft diameter, mm; a coaxial train's output turns on a pipe around the input, so its gear fits the pipe."""
    if gspec.bore is not None:
        return gspec.bore
    if spec.coaxial and shaft == chain.shafts - 1:
        from .hardware import PIPE_WALL

        return spec.bore + fab.bore_clearance + 2 * PIPE_WALL
    return spec.bore


def _network_ratio(chain: _Chain) -> Fraction:
    """Signed output turns per input turn of the chain, from the kinematic model (Willis on every mesh)."""
    from ..ratio.kinematics import Gear, Mesh, make_network, network_ratio

    gears = [Gear(name, f"shaft{shaft}", gspec.teeth) for name, _, _, gspec, shaft, _ in chain.gears]
    meshes = [Mesh(a, b) for _, _, a, b in chain.links]
    return network_ratio(make_network(gears, meshes), (), "shaft0", f"shaft{chain.shafts - 1}")


def _shaft_name(index: int, count: int) -> str:
    if index == 0:
        return "input"
    return "output" if index == count - 1 else f"shaft-{index}"


def placed_outline(gear: PlannedGear, plan: Plan, cut: bool = False) -> np.ndarray:
    """The gear's outline turned and moved to its shaft on the plate, (N, 2) mm."""
    part = gear.cut_part if cut else gear.part
    return _placed(part.outer.points(), gear, plan)


def placed_holes(gear: PlannedGear, plan: Plan) -> list[np.ndarray]:
    """The gear's shaped holes (a ring's teeth, a D-flat bore) turned and moved like its outline, mm."""
    return [_placed(h.points(), gear, plan) for h in gear.part.holes]


def _placed(pts: np.ndarray, gear: PlannedGear, plan: Plan) -> np.ndarray:
    c, s = math.cos(gear.rotation), math.sin(gear.rotation)
    shaft = plan.shafts[gear.shaft]
    return pts @ np.array([[c, -s], [s, c]]).T + (shaft.x, shaft.y)
