"""A train whose first stage is a worm driving its wheel: the plan, with the worm across the plates.

The worm is the input.  Its axis is crossed with every other shaft: it lies parallel to the
plates, in the wheel's mid-plane, ``a`` (the pair's centre distance) from the wheel's axis,
held in two bearing blocks (made parts, screwed to the back plate from its outside) beyond
the ends of its thread.  The wheel sits on the first plate-crossing shaft in layer 0, the
room of the worm; the spur stages that follow (if any) take the layers above it, as a
compound train's.  Its input shaft end is the worm's end at ``+u`` along its axis.

The plan:

1. the pair's figures (:mod:`gearcad.meshes.worm`; the stage's module is the axial module) and
   its friction, efficiency and self-locking (the worm steel, the wheel the fabrication
   profile's material, or the stage's own friction coefficient);
2. the spur stages planned as a compound train (:func:`gearcad.trains.plan.plan_compound`) for
   their gears, meshes and checks, then laid out again with the wheel in layer 0 under them
   (:mod:`gearcad.trains.layout`: every shaft that passes layer 0 clears the wheel);
3. the worm's direction: the tangent direction, among every 15 degrees round the wheel, whose
   footprint (worm and blocks) clears every other shaft passing the worm's room and keeps the
   frame's edge strip free for the pillars, giving the least plate;
4. the z stack: the worm's axis high enough for its tip and its blocks' wall under the bore,
   the spur layers above the taller of the worm's tip and the blocks.

:func:`finish_worm` runs after the mechanism (:func:`gearcad.trains.supports.complete_plan`): the
blocks' screws (bought rods through the back plate), their holes in it, the worm shaft's two
supports, and the worm's clearance check against every rod, sweep and plate (the worm-wheel
mesh is a designed fit; the generated teeth are checked by the hob simulation's own residual).

The wheel is the worm's generated mid-plane section (:func:`gearcad.geometry.worm_wheel.tooth_space`), each
tooth space one B-spline fitted to it (:mod:`gearcad.trains.worm_wheel_outline`), a flat part of the train's
thickness; its figures in the gear table are those of the rack-generated
gear of the axial pressure angle (the worm's axial section acts as the rack in the mid-plane).
Pure: mm and radians inside.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..errors import InputError
from ..geometry.shape import Loop, Part
from ..meshes.checks import Finding
from .hardware import EDGE_RULE, REACH, SPACER_WALL, bridge_room, screw_size
from .layout import LayoutGear, LayoutProblem, Link, mesh_phase, shaft_sides, solve_layout
from .spec import TrainSpec

__all__ = ["WormBlock", "WormLayout", "worm_pair_of", "worm_analysis_of", "plan_worm", "WORM_MATERIAL",
           "DIRECTION_STEP", "BLOCK_WALL", "footprint"]

#: The worm's material (a turned steel worm; the friction table's worm side).
WORM_MATERIAL = "mild-steel"
#: Directions of the worm's axis tried round the wheel, degrees apart.
DIRECTION_STEP = 15.0
#: Wall of a bearing block round its bore, in bore diameters: the plates' edge rule (no hole nearer an edge
#: than its own diameter) applied to the block.
BLOCK_WALL = EDGE_RULE


@dataclass(frozen=True)
class WormBlock:
    """A bearing block: a made part screwed to the back plate, the worm's shaft turning in its bore.

    ``x, y``: centre of its foot on the back plate's inner face (z = 0), mm; ``length`` along the worm's
    axis, ``width`` across it, ``height`` from the plate; ``bore`` its hole's diameter; ``screws`` the
    centres of its screws in plate coordinates; ``part`` its profile (the end view: across, up; the
    foot's centre at the origin) for the DXF and the prism.
    """

    name: str
    x: float
    y: float
    length: float
    width: float
    height: float
    bore: float
    screws: tuple[tuple[float, float], ...]
    part: Part


@dataclass(frozen=True)
class WormLayout:
    """The worm of a plan: its pair, running figures, where its axis lies and what holds it.

    ``x, y, z``: the point of the worm's axis nearest the wheel's axis (plate coordinates, mm);
    ``direction``: the axis's heading in the plate, radians (``u`` runs along it); the thread spans
    ``u`` in ``[-thread/2, thread/2]``, the shaft ``[-shaft_end, shaft_end]``; ``input_end`` the point of
    the input shaft's end (``u = +shaft_end``); ``outline`` the wheel's fitted mid-plane outline
    (:class:`gearcad.trains.worm_wheel_outline.WheelOutline`: its deviation from the generated section).
    """

    pair: object  # gearcad.meshes.worm.WormPair
    analysis: object  # gearcad.meshes.worm.WormAnalysis
    form: object  # gearcad.geometry.worm_wheel.ThreadForm
    wheel: str
    x: float
    y: float
    z: float
    direction: float
    thread: float
    shaft_end: float
    shaft_diameter: float
    blocks: tuple[WormBlock, ...]
    screw: str
    screw_diameter: float
    outline: object = None  # gearcad.trains.worm_wheel_outline.WheelOutline

    def at(self, u: float) -> tuple[float, float]:
        """The plate point of the axis ``u`` mm along it from the nearest point to the wheel."""
        return self.x + u * math.cos(self.direction), self.y + u * math.sin(self.direction)

    @property
    def input_end(self) -> tuple[float, float, float]:
        """The input shaft's end point, mm."""
        return (*self.at(self.shaft_end), self.z)


def _pressure_angle(spec: TrainSpec) -> float:
    """The worm's pressure angle as given, degrees: the stage's, else the train's, else the tooth system's."""
    worm = spec.stages[0].worm
    if worm.pressure_angle is not None:
        return worm.pressure_angle
    if spec.pressure_angle is not None:
        return spec.pressure_angle
    from ..profiles import load_tooth_system

    return math.degrees(load_tooth_system(spec.tooth_system).pressure_angle)


def worm_pair_of(spec: TrainSpec):
    """The :class:`~gearcad.meshes.worm.WormPair` of the train's worm stage (its first), every bound checked.

    Raises
    ------
    InputError
        The pair's own bounds (:func:`gearcad.meshes.worm.make_worm_pair`): wheel teeth, module, pressure
        angle, the ZI base cylinder, undercut of the wheel in the mid-plane.
    """
    from ..meshes.worm import make_worm_pair

    stage = spec.stages[0]
    module = spec.module if stage.module is None else stage.module
    return make_worm_pair(stage.worm.starts, stage.driven.teeth, module, diameter_factor=stage.worm.diameter_factor,
                          pressure_angle=_pressure_angle(spec), flank=stage.worm.form, wheel_shift=stage.driven.shift,
                          tool_diameter=stage.worm.tool_diameter)


def worm_analysis_of(spec: TrainSpec, pair, material: str):
    """Friction, efficiency and self-locking of the pair, from rest, a steel worm on a ``material`` wheel."""
    from ..meshes.worm import analyse_worm_pair

    friction = spec.stages[0].worm.friction
    try:
        return analyse_worm_pair(pair, worm_material=WORM_MATERIAL, wheel_material=material, friction=friction)
    except InputError as exc:
        raise InputError(f"{exc}; in a train file: worm = {{ ..., friction = MU }}") from None


# -- the wheel ------------------------------------------------------------------------------------

def _wheel_parts(form, name: str, bore: float, fab, tolerance: float) -> tuple[Part, Part, object]:
    """The wheel's mid-plane section with its bore, drawn and cut (kerf applied), and its fitted outline, mm.

    Each tooth space is one B-spline fitted to the generated section (:mod:`gearcad.trains.worm_wheel_outline`),
    each tip land an arc: the writers fit and draw it as they do every gear's true curves.
    """
    from ..geometry.offset import offset_loop
    from .worm_wheel_outline import wheel_outline

    outline = wheel_outline(form, tolerance)
    outer = outline.loop
    hole = bore + fab.bore_clearance
    label = f"{name}  z{form.wheel_teeth}  mx{form.module:g}  worm wheel, mid-plane section"
    part = Part(name, outer, (), ((0.0, 0.0, hole),), label, symmetry=form.wheel_teeth)
    if fab.kerf == 0:
        return part, part, outline
    cut = Part(name, offset_loop(outer, fab.kerf / 2, tolerance), (), ((0.0, 0.0, hole - fab.kerf),), label,
               symmetry=form.wheel_teeth)
    return part, cut, outline


def _wheel_gear(pair, system):
    """The rack-generated gear of the wheel's mid-plane: axial module and pressure angle, the worm's basic rack."""
    from ..geometry.gear import SpurGear
    from ..meshes.worm import ADDENDUM, DEDENDUM

    rack = dataclasses.replace(system, pressure_angle=pair.axial_pressure_angle, addendum=ADDENDUM, dedendum=DEDENDUM)
    return SpurGear(pair.wheel_teeth, pair.module, rack, shift=pair.wheel_shift)


# -- the blocks -------------------------------------------------------------------------------------

@dataclass(frozen=True)
class _Sizes:
    """The worm's room: shaft, bore, block and axis height, mm."""

    shaft: float
    hole: float
    width: float
    length: float
    axis: float
    top: float
    screw: str
    screw_d: float
    across: float  # screw centre from the axis, across it


def _sizes(pair, fab, thickness: float) -> _Sizes:
    name, d_s = screw_size(fab.spacer_hole)
    shaft = pair.root_diameter  # the worm's plain ends (gearcad.export.step_worm.worm_solid)
    hole = shaft + fab.bore_clearance
    wall = BLOCK_WALL * hole
    across = hole / 2 + d_s  # the tapped hole clears the bore by half a screw diameter
    width = max(hole + 2 * wall, 2 * (across + d_s))
    length = max(1.5 * shaft, 2.5 * d_s)  # bearing length 1.5 shaft diameters: common practice
    r_a1 = pair.tip_diameter / 2
    axis = max(fab.layer_gap + r_a1, hole / 2 + wall, fab.layer_gap + thickness / 2)
    top = max(axis + r_a1, axis + hole / 2 + wall, axis + thickness / 2)
    return _Sizes(shaft, hole, width, length, axis, top, name, d_s, across)


def _block_part(name: str, z: _Sizes, tolerance: float) -> Part:
    """The block's end view: a rectangle (width x height) with the bore at the axis height, mm."""
    from ..geometry.shape import rounded_rectangle

    outer = rounded_rectangle(z.width, z.top, min(1.0, z.width / 4), tolerance)
    moved = Loop(tuple(dataclasses.replace(c, points=c.points - (z.width / 2, 0.0),
                                           centre=(c.centre[0] - z.width / 2, c.centre[1]) if c.radius else c.centre)
                       for c in outer.curves))
    return Part(name, moved, (), ((0.0, z.axis, z.hole),), name)


def footprint(x: float, y: float, heading: float, u0: float, u1: float, half: float) -> np.ndarray:
    """Corners (4, 2) of the rectangle ``u0..u1`` along ``heading`` and ``-half..half`` across, from (x, y)."""
    d = np.array([math.cos(heading), math.sin(heading)])
    n = np.array([-d[1], d[0]])
    c = np.array([x, y])
    return np.array([c + u0 * d - half * n, c + u1 * d - half * n, c + u1 * d + half * n, c + u0 * d + half * n])


def _block_inner(pair, z: _Sizes, clearance: float) -> float:
    """``u`` of the blocks' inner faces: past the thread and clear of the wheel's tip circle, mm."""
    a, r_a2 = pair.centre_distance, pair.throat_diameter / 2
    inner = pair.worm_length / 2 + clearance
    near = a - z.width / 2
    reach = r_a2 + clearance
    if near < reach:
        inner = max(inner, math.sqrt(reach ** 2 - near ** 2))
    return inner


# -- the plan -----------------------------------------------------------------------------------------

def _renamed(name: str) -> str:
    """A spur stage's gear name in the whole train: stage ``k`` of the spur part is stage ``k + 1``."""
    head, _, rest = name.partition("-")
    return f"s{int(head[1:]) + 1}-{rest}" if head[:1] == "s" and head[1:].isdigit() else name


def _renamed_finding(f: Finding) -> Finding:
    """A spur part's finding with its gear names as in the whole train (``s1-driver`` -> ``s2-driver``)."""
    import re

    def bump(text: str) -> str:
        return re.sub(r"\bs(\d+)-(driver|driven|idler)\b", lambda m: f"s{int(m.group(1)) + 1}-{m.group(2)}", text)

    return dataclasses.replace(f, check=bump(f.check), message=bump(f.message))


def _moved_part(part: Part | None, old: str, new: str) -> Part | None:
    if part is None:
        return None
    return dataclasses.replace(part, name=part.name.replace(old, new, 1), label=part.label.replace(old, new, 1))


def _rooms(pair, sizes: _Sizes, clearance: float) -> tuple[float, float, float, float]:
    """``u`` of the blocks' inner and outer faces, the shaft's end, and the footprint's widest half, mm."""
    inner = _block_inner(pair, sizes, clearance)
    outer = inner + sizes.length
    end = outer + REACH * sizes.shaft
    return inner, outer, end, max(sizes.width / 2, pair.tip_diameter / 2)


def _footprints(pair, sizes: _Sizes, x: float, y: float, heading: float, clearance: float) -> list[np.ndarray]:
    """The worm's footprint on the plate as rectangles: the thread, the two blocks, the shaft ends."""
    inner, outer, end, _ = _rooms(pair, sizes, clearance)
    r_a1 = pair.tip_diameter / 2
    return [footprint(x, y, heading, -inner, inner, r_a1),
            footprint(x, y, heading, inner, outer, sizes.width / 2), footprint(x, y, heading, -outer, -inner, sizes.width / 2),
            footprint(x, y, heading, -end, end, sizes.shaft / 2)]


def _rect_distance(point: np.ndarray, rect: np.ndarray) -> float:
    """Distance from ``point`` to the rectangle (4, 2) (0 inside), mm."""
    centre = rect.mean(axis=0)
    d, n = rect[1] - rect[0], rect[3] - rect[0]
    half_d, half_n = np.linalg.norm(d) / 2, np.linalg.norm(n) / 2
    v = point - centre
    du, dn = abs(float(v @ d)) / (2 * half_d) - half_d, abs(float(v @ n)) / (2 * half_n) - half_n
    return math.hypot(max(du, 0.0), max(dn, 0.0))


def _strip(fab) -> float:
    """Width kept free along the plate's edges for the frame pillars, mm (their corner offset, diameter, clearance)."""
    _, nominal = screw_size(fab.spacer_hole)
    need = max(EDGE_RULE * fab.spacer_hole + fab.spacer_hole / 2, nominal)
    return max(need, fab.plate_corner_radius) + nominal + fab.gear_clearance


def _place_worm(pair, sizes: _Sizes, fab, positions: np.ndarray, radii: list[float], tips, sides) -> tuple[float, np.ndarray, float, float]:
    """The worm's heading (radians) and the shifted positions, width and height of the plate.

    Tries every :data:`DIRECTION_STEP` degrees round the wheel; keeps the headings whose footprint clears
    every other shaft that passes the worm's room, and of those the one with the least plate.
    """
    centre = positions[0]
    strip, clearance = _strip(fab), fab.gear_clearance
    best = None
    for phi in np.radians(np.arange(0.0, 360.0, DIRECTION_STEP)):
        x, y = centre + pair.centre_distance * np.array([math.cos(phi), math.sin(phi)])
        heading = phi + math.pi / 2
        rects = _footprints(pair, sizes, x, y, heading, clearance)
        clear = all(_rect_distance(positions[i], r) >= radii[i] + SPACER_WALL + clearance
                    for i in range(1, len(positions)) if sides[i][0] for r in rects)
        if not clear:
            continue
        boxes = [np.vstack([r.min(axis=0) - strip, r.max(axis=0) + strip]) for r in rects]
        boxes += [np.vstack([positions[s] - tip - fab.plate_margin, positions[s] + tip + fab.plate_margin]) for s, tip in tips]
        low = np.min([b[0] for b in boxes], axis=0)
        high = np.max([b[1] for b in boxes], axis=0)
        area = float(np.prod(high - low))
        if best is None or area < best[0] - 1e-9:
            best = (area, phi, low, high)
    if best is None:
        raise InputError("no heading round the wheel leaves the worm and its bearing blocks clear of the other shafts; "
                         "allowed: a larger wheel, another module, or other tooth counts for the spur stages")
    _, phi, low, high = best
    return float(phi), positions - low, float(high[0] - low[0]), float(high[1] - low[1])


def _network_ratio(starts: int, wheel: int, spur_gears, spur_meshes, last: int) -> Fraction:
    """|output turns per worm turn|, from the kinematic model: the worm mesh, then the spur meshes."""
    from ..ratio.kinematics import Gear, Mesh, make_network, network_ratio

    gears = [Gear("worm", "worm", starts), Gear("s1-wheel", "shaft0", wheel)]
    gears += [Gear(g.name, f"shaft{g.shaft}", g.gear.teeth) for g in spur_gears]
    meshes = [Mesh("worm", "s1-wheel", worm=True)] + [Mesh(*m.names) for m in spur_meshes]
    return abs(network_ratio(make_network(gears, meshes), (), "worm", f"shaft{last}"))


def _heights(spec: TrainSpec, fab, gears, sizes: _Sizes, room: set[int]) -> tuple[dict[int, float], float]:
    """Lower-face z of every layer (layer 0: the wheel, centred on the worm's axis) and the front plate's z, mm."""
    t, gap = spec.thickness, fab.layer_gap
    top = max(g.layer for g in gears)
    heights = {0: sizes.axis - t / 2}
    z = sizes.top + gap
    for k in range(1, top + 2):
        if k in room:
            z += bridge_room(t, gap)
        if k == top + 1:
            break
        heights[k] = z
        z += t + max([g.hub_length for g in gears if g.layer == k] + [0.0]) + gap
    return heights, z


def plan_worm(spec: TrainSpec, tolerance: float, load) -> tuple[object, dict[int, str]]:
    """The plan of a train whose first stage is a worm stage, and the bridges its layout asks for.

    Raises
    ------
    InputError
        A load given (no load ratings for worm trains), the pair's bounds, a bore too large for the wheel,
        no heading for the worm clear of the other shafts, or no layout.
    """
    from ..meshes.outline_checks import process_findings
    from ..meshes.worm import thread_form
    from ..profiles import load_fabrication, load_tooth_system
    from .plan import Plan, PlannedGear, PlannedShaft, frame_plates, plan_compound

    if load is not None:
        raise InputError("--torque and --speed (load ratings) are not available for a train with a worm stage; "
                         "allowed: leave them out (the worm's efficiency is in the report)")
    fab = load_fabrication(spec.fabrication)
    system = load_tooth_system(spec.tooth_system)
    if spec.pressure_angle is not None:
        system = dataclasses.replace(system, pressure_angle=math.radians(spec.pressure_angle))
    pair = worm_pair_of(spec)
    analysis = worm_analysis_of(spec, pair, fab.material_profile or fab.material)
    form = thread_form(pair)
    stage, t = spec.stages[0], spec.thickness
    sizes = _sizes(pair, fab, t)
    wheel = _wheel_gear(pair, system)
    bore = spec.bore if stage.driven.bore is None else stage.driven.bore
    room = wheel.root_diameter / 2 - pair.module
    if bore / 2 > room:
        raise InputError(f"s1-wheel: bore {bore:g} mm is too large for the worm wheel of {pair.wheel_teeth} teeth at "
                         f"axial module {pair.module:g}: it must leave 1 module of rim below the root circle "
                         f"(bore up to {2 * room:.2f} mm)")
    spur = None
    if len(spec.stages) > 1:
        sub = dataclasses.replace(spec, stages=spec.stages[1:], target=None, target_tolerance=None, studs=())
        spur, _ = plan_compound(sub, tolerance, None)
    spur_gears = [dataclasses.replace(g, name=_renamed(g.name), stage=g.stage + 1, layer=g.layer + 1,
                                      part=_moved_part(g.part, g.name, _renamed(g.name)),
                                      cut_part=_moved_part(g.cut_part, g.name, _renamed(g.name)),
                                      hub=_moved_part(g.hub, g.name, _renamed(g.name)))
                  for g in (spur.gears if spur else ())]
    spur_meshes = [dataclasses.replace(m, names=tuple(_renamed(n) for n in m.names),
                                       findings=tuple(_renamed_finding(f) for f in m.findings))
                   for m in (spur.meshes if spur else ())]
    diameters = [s.diameter for s in spur.shafts] if spur else [bore]
    diameters[0] = max(diameters[0], bore)
    # The layout again, with the wheel in layer 0 under the spur stages.
    shaft_of = {g.name: g.shaft for g in spur_gears}
    names = ["s1-wheel"] + [g.name for g in spur_gears]
    lgears = (LayoutGear("s1-wheel", 0, 0, wheel.tip_diameter / 2),) + tuple(
        LayoutGear(g.name, g.shaft, g.layer, g.gear.tip_diameter / 2) for g in spur_gears)
    links = tuple(Link(shaft_of[a], shaft_of[b], m.pair.centre_distance) for m in spur_meshes for a, b in [m.names])
    meshes = frozenset(frozenset((names.index(a), names.index(b))) for m in spur_meshes for a, b in [m.names])
    problem = LayoutProblem(tuple(d / 2 + SPACER_WALL for d in diameters), lgears, links, meshes, fab.gear_clearance,
                            fab.plate_margin)
    layout = solve_layout(problem)
    sides = shaft_sides(problem, layout.positions)
    tips = [(g.shaft, g.tip_radius) for g in lgears]
    phi, positions, width, height = _place_worm(pair, sizes, fab, np.asarray(layout.positions, dtype=float),
                                                [d / 2 for d in diameters], tips, sides)
    layout = dataclasses.replace(layout, positions=positions, width=width, height=height)
    wanted = {i: ("front" if back else "back") for i, (back, front) in enumerate(sides) if back != front}
    bridge_layers = set()
    for i, side in wanted.items():
        layers = [g.layer for g in lgears if g.shaft == i]
        bridge_layers.add(max(layers) + 1 if side == "front" else min(layers))
    wheel_part, wheel_cut, outline = _wheel_parts(form, "s1-wheel", bore, fab, tolerance)
    gear_stub = [PlannedGear("s1-wheel", "driven", 1, wheel, stage.driven, 0, 0, bore, wheel_part, wheel_cut,
                             phi - math.pi / 2, 0.0)]
    heights, front_z = _heights(spec, fab, gear_stub + spur_gears, sizes, bridge_layers)
    rotation = {"s1-wheel": phi - math.pi / 2}
    for m in spur_meshes:
        a, b = m.names
        rotation.setdefault(a, 0.0)
        dx, dy = positions[shaft_of[b]] - positions[shaft_of[a]]
        teeth = {g.name: g.gear.teeth for g in spur_gears}
        rotation[b] = mesh_phase(rotation[a], teeth[a], teeth[b], math.atan2(dy, dx))
    gears = tuple(dataclasses.replace(g, z=heights[g.layer], rotation=rotation.get(g.name, g.rotation))
                  for g in gear_stub + spur_gears)
    count = len(diameters)
    shaft_names = ["output" if count == 1 else "wheel-shaft"] + [s.name for s in (spur.shafts[1:] if spur else ())]
    shafts = tuple(PlannedShaft(shaft_names[i], float(x), float(y), diameters[i], back, front)
                   for i, ((x, y), (back, front)) in enumerate(zip(positions, sides)))
    plates = frame_plates(spec, fab, layout, list(shafts), tolerance, front_z)
    x, y = positions[0] + pair.centre_distance * np.array([math.cos(phi), math.sin(phi)])
    worm = dataclasses.replace(_worm_layout(pair, analysis, form, sizes, fab, float(x), float(y), phi + math.pi / 2,
                                            tolerance), outline=outline)
    findings = [_renamed_finding(f) for f in (spur.findings if spur else ())]
    findings += [dataclasses.replace(f, check=f"worm {f.check}") for f in analysis.findings]
    findings += process_findings("s1-wheel", wheel, wheel_part.outer.points(), fab.process, fab.tool_radius,
                                 fab.min_feature)
    findings.append(_face_finding(pair, t))
    findings.append(_outline_finding(outline, tolerance))
    ratio = _network_ratio(pair.starts, pair.wheel_teeth, spur_gears, spur_meshes, count - 1)
    plan = Plan(spec, system, fab, gears, tuple(spur_meshes), shafts, plates, layout, ratio,
                spur.direction if spur else "same", tolerance, tuple(findings), worm=worm)
    return plan, wanted


def _outline_finding(outline, tolerance: float) -> Finding:
    """The wheel's drawn outline against the generated section it was fitted to."""
    severity = "ok" if outline.deviation <= tolerance else "failure"
    return Finding("worm wheel outline", severity, outline.deviation, tolerance,
                   f"s1-wheel: each tooth space one B-spline within {outline.deviation * 1000:.2f} µm of the worm's "
                   f"generated mid-plane section ({outline.positions} generating positions, {outline.vertices} points; "
                   f"allowed {tolerance * 1000:g} µm)")


def _face_finding(pair, thickness: float) -> Finding:
    """The wheel is cut from the sheet: its face width against the pair's rule."""
    b2 = pair.wheel_face_width
    if thickness + 1e-9 >= b2:
        return Finding("worm wheel face width", "ok", thickness, b2,
                       f"s1-wheel: {thickness:g} mm thick, at least the pair's face width {b2:.2f} mm")
    return Finding("worm wheel face width", "warning", thickness, b2,
                   f"s1-wheel: cut from the {thickness:g} mm sheet, narrower than the pair's face width {b2:.2f} mm: "
                   "the worm bears on a short line at the mid-plane; for more than light duty print or stack a wider "
                   "(throated) wheel")


def _worm_layout(pair, analysis, form, sizes: _Sizes, fab, x: float, y: float, heading: float,
                 tolerance: float) -> WormLayout:
    inner, outer, end, _ = _rooms(pair, sizes, fab.gear_clearance)
    d = np.array([math.cos(heading), math.sin(heading)])
    n = np.array([-d[1], d[0]])
    blocks = []
    for k, sign in enumerate((-1.0, 1.0), start=1):  # block 2 on the input side (+u)
        c = np.array([x, y]) + sign * (inner + sizes.length / 2) * d
        screws = tuple((float(p[0]), float(p[1])) for p in (c + sizes.across * n, c - sizes.across * n))
        name = f"worm-block-{k}"
        blocks.append(WormBlock(name, float(c[0]), float(c[1]), sizes.length, sizes.width, sizes.top, sizes.hole,
                                screws, _block_part(name, sizes, tolerance)))
    return WormLayout(pair, analysis, form, "s1-wheel", x, y, sizes.axis, heading, pair.worm_length, end, sizes.shaft,
                      tuple(blocks), sizes.screw, sizes.screw_d)
