"""Train descriptions for change gears that are not on the shelf.

Each missing gear is described as a one-stage train: the missing gear meshing
with its mate in the train that needs it, at the machine's module, with the
machine's bore, keyway, face width, tooth system and fabrication profile.  The
usual build pipeline (:func:`gearcad.trains.plan.plan_train`, then
:func:`gearcad.export.bundle.write_plan`) turns it into files and a report with
the checks of that mesh.  Pure: no file is read or written here.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..trains.spec import GearSpec, Keyway, StageSpec, TrainSpec
from .frame import Setup
from .machine import Machine
from .table import ThreadTable

__all__ = ["MissingGear", "missing_gears", "missing_gear_spec"]


@dataclass(frozen=True)
class MissingGear:
    """A gear to be made: its teeth, the gear it meshes with, the threads that need it."""

    teeth: int
    mate: int
    threads: tuple[str, ...]


def _mate(setup: Setup, teeth: int) -> int:
    """The gear ``teeth`` meshes with in ``setup`` (first place it holds)."""
    first, second = setup.first_mesh, setup.second_mesh
    for a, b in (first, second):
        if a == teeth:
            return b
        if b == teeth:
            return a
    raise ValueError(f"{teeth} is not a gear of {setup.describe()}")


def missing_gears(table: ThreadTable) -> list[MissingGear]:
    """Every gear the table's rows need but the shelf lacks, with the threads that need it."""
    found: dict[int, tuple[int, list[str]]] = {}
    for row in table.rows:
        candidate = row.with_missing
        if candidate is None:
            continue
        for teeth in candidate.missing:
            mate, names = found.setdefault(teeth, (_mate(candidate.setup, teeth), []))
            names.append(row.pitch.name)
    return [MissingGear(z, mate, tuple(names)) for z, (mate, names) in sorted(found.items())]


def missing_gear_spec(machine: Machine, gear: MissingGear) -> TrainSpec:
    """A one-stage train: the missing gear driving its mate (the machine's module, bore, face width)."""
    keyway = Keyway(*machine.keyway) if machine.keyway else None

    def spec(teeth: int) -> GearSpec:
        return GearSpec(teeth, bore=machine.bore, keyway=keyway)

    return TrainSpec(name=f"gear-{gear.teeth}", module=machine.module, thickness=machine.face_width,
                     stages=(StageSpec(spec(gear.teeth), spec(gear.mate)),),
                     title=f"Change gear {gear.teeth} teeth (with its mate {gear.mate}) for {machine.title}",
                     tooth_system=machine.tooth_system, fabrication=machine.fabrication, bore=machine.bore)
