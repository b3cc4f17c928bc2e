"""The files of a train's worm stage: the blocks' drawings, the worm's and the blocks' solids.

The wheel is one of the plan's gears (its mid-plane section, written with the other gears: DXF, SVG,
and its STEP/STL as a prism of that section).  Here:

* each bearing block's end view (DXF, SVG), through the writers' neutral form;
* the worm (STEP, STL) and each block (STEP, STL), and their placed copies for the assembly.

Lengths in mm.
"""

from __future__ import annotations

from typing import Callable

__all__ = ["write_worm_stage", "write_block_drawings", "worm_stage_items"]


def write_worm_stage(plan, options, put: Callable, note: Callable) -> tuple[list[str], list]:
    """The blocks' drawings and (as the formats ask) the solids; the warnings and the placed assembly items.

    When the kernel cannot build the worm's helicoid (:func:`gearcad.export.step_worm.worm_solid` refuses a
    lost or invalid thread), the worm's files are left out and a warning says so; the rest is written.
    """
    warnings = write_block_drawings(plan, options, put, note) if {"dxf", "svg"} & set(options.formats) else []
    items: list = []
    if {"step", "stl"} & set(options.formats):
        more, items = worm_stage_items(plan, options, put, note)
        warnings += more
    return warnings, items


def write_block_drawings(plan, options, put: Callable, note: Callable) -> list[str]:
    """Each block's end view as DXF and SVG (as ``options.formats`` asks); the DXF writer's warnings."""
    from .cutting import part_drawing
    from .dxf import write_dxf
    from .svg import write_svg

    warnings: list[str] = []
    for block in plan.worm.blocks:
        drawing = part_drawing(block.part, "arcs", options.dxf_tolerance)
        if "dxf" in options.formats:
            note(f"DXF {block.name}")
            warnings += write_dxf(drawing, put(block.name, "dxf", f"{block.name}.dxf"), version=options.dxf_version)
        if "svg" in options.formats:
            write_svg(drawing, put(block.name, "svg", f"{block.name}.svg"))
    return warnings


def worm_stage_items(plan, options, put: Callable, note: Callable) -> tuple[list[str], list]:
    """Write the worm's and the blocks' STEP/STL; return the warnings and their placed assembly items."""
    from ..errors import GeometryError
    from .step import AssemblyItem, write_step, write_stl
    from .step_worm_stage import block_solid, placed, worm_part_solid

    worm = plan.worm
    items, warnings = [], []
    note("solid worm")
    try:
        solid = worm_part_solid(worm)
    except GeometryError as exc:
        warnings.append(f"worm: no STEP/STL written: {exc}")
    else:
        _write(solid, "worm", options, put, write_step, write_stl)
        items.append(AssemblyItem("worm", placed(solid, worm.direction, (worm.x, worm.y, worm.z), worm.thread / 2),
                                  0.0, 0.0, 0.0, 0.0))
    for block in worm.blocks:
        note(f"solid {block.name}")
        solid = block_solid(block, plan.tolerance)
        _write(solid, block.name, options, put, write_step, write_stl)
        items.append(AssemblyItem(block.name, placed(solid, worm.direction, (block.x, block.y, 0.0), block.length / 2),
                                  0.0, 0.0, 0.0, 0.0))
    return warnings, items


def _write(solid, name: str, options, put, write_step, write_stl) -> None:
    if "step" in options.formats:
        write_step(solid, put(name, "step", f"{name}.step"), names=[name])
    if "stl" in options.formats:
        write_stl(solid, put(name, "stl", f"{name}.stl"), options.stl_tolerance, options.stl_angle)
