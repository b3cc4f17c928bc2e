"""The assembly phasing: meshing gears placed as the plan says do not intersect; turned half a pitch they do.

Reference: OCP's boolean common (BRepAlgoAPI_Common) on the solids, volume by BRepGProp.
"""

import math

import pytest

from gearcad.trains.planner import plan_train
from gearcad.trains.trainfile import parse_train

TRAIN = """name = "phase"
module = 2.0
thickness = 4.0
fabrication = "cnc-2mm-endmill"
[[stage]]
driver = 13
driven = 37
[[stage]]
driver = 16
driven = 29
idler = 18
"""


def placed(solid, x, y, z, angle):
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec

    turn, move = gp_Trsf(), gp_Trsf()
    turn.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), angle)
    move.SetTranslation(gp_Vec(x, y, z))
    return BRepBuilderAPI_Transform(solid, move.Multiplied(turn), True).Shape()


def common_volume(a, b):
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Common
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(BRepAlgoAPI_Common(a, b).Shape(), props)
    return props.Mass()


@pytest.mark.slow
def test_meshing_gears_as_placed_do_not_intersect_and_half_a_pitch_off_they_do():
    from gearcad.export.step import build_solid

    plan = plan_train(parse_train(TRAIN))
    solids = {g.name: build_solid(g.part, plan.spec.thickness, 1e-3).solid for g in plan.gears}
    for a, b in (m.names for m in plan.meshes):
        ga, gb = plan.gear(a), plan.gear(b)
        sa, sb = plan.shafts[ga.shaft], plan.shafts[gb.shaft]
        one = placed(solids[a], sa.x, sa.y, ga.z, ga.rotation)
        two = placed(solids[b], sb.x, sb.y, gb.z, gb.rotation)
        assert common_volume(one, two) < 1e-6
        off = placed(solids[b], sb.x, sb.y, gb.z, gb.rotation + math.pi / gb.gear.teeth)
        assert common_volume(one, off) > 1.0  # mm³: teeth on teeth
