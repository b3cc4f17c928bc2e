"""Solids for CAD programs (STEP AP214) and printers (STL), built with the OCP kernel.

The public names of the STEP/STL stage, gathered from its topic modules:

- :mod:`.step_edges`: kernel quietness, exact edges, B-spline edges within a tolerance, wires;
- :mod:`.step_solid`: flat parts extruded into checked solids, hubs, tubes, fused compound parts;
- :mod:`.step_files`: STEP files (parts and assemblies, shared solids placed once) and STL files;
- :mod:`.step_helical`: helical and herringbone solids.

Only the ``export/step*.py`` modules use cadquery / OCP, and they import them inside
functions: importing :mod:`gearcad.export.step` costs nothing until a solid is built.
The kernel writes statistics to the process's standard output; every kernel call that
may print runs with file descriptor 1 pointed at the null device (see
:func:`kernel_quiet`), so a program printing JSON on stdout stays parseable.  Lengths
in mm, angles in degrees at the interface and radians inside.
"""

from __future__ import annotations

from .step_compact import share_geometry
from .step_edges import STRAIGHT_KINDS, _Stats, kernel_quiet, spline_through
from .step_files import AssemblyItem, _step_settings, assembly_document, assembly_step, write_step, write_stl
from .step_helical import HELICAL_VOLUME_TOLERANCE, _adaptive_area, _adaptive_volume, _placed, helical_solid
from .step_solid import (VOLUME_TOLERANCE, SolidBuild, _face, build_solid, fuse_placed, gear_solid, tube_solid,
                         with_hub)

__all__ = [
    "SolidBuild",
    "AssemblyItem",
    "VOLUME_TOLERANCE",
    "STRAIGHT_KINDS",
    "kernel_quiet",
    "build_solid",
    "with_hub",
    "gear_solid",
    "spline_through",
    "write_step",
    "write_stl",
    "assembly_step",
    "helical_solid",
    "HELICAL_VOLUME_TOLERANCE",
    "fuse_placed",
    "tube_solid",
    "assembly_document",
    "share_geometry",
]

# Helpers the tests and benchmarks reach by their old address (not part of the public surface).
_PRIVATE = (_Stats, _face, _step_settings, _adaptive_area, _adaptive_volume, _placed)
