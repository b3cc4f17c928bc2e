"""The worm's solid: OCP's checker, the worm's axial section against the flank form, one lead per turn."""

import math

import numpy as np
import pytest

from gearcad.geometry.worm_wheel import half_thickness, transverse_flank
from gearcad.meshes.worm import make_worm_pair, thread_form

pytestmark = pytest.mark.slow


PAIRS = {
    # The handbook pair of tests/test_worm.py (m_x 3, z1 2, z2 30, d1 44); a slender single-start worm of q 10
    # (once refused: the kernel's trim of the Frenet sweep lost its thread); a ZI worm of 4 starts.
    "handbook": lambda: make_worm_pair(2, 30, 3, worm_diameter=44),
    "single-start-q10": lambda: make_worm_pair(1, 40, 2, diameter_factor=10),
    "zi-4-starts": lambda: make_worm_pair(4, 41, 2.5, diameter_factor=11, flank="zi"),
    # ZN and ZK (tests/test_worm_flanks.py checks their sections on the sampled surfaces, not in the kernel).
    "zn-4-starts": lambda: make_worm_pair(4, 41, 2.5, diameter_factor=9, flank="zn", pressure_angle=22.5),
    "zk-handbook": lambda: make_worm_pair(2, 30, 3, worm_diameter=44, flank="zk", tool_diameter=80),
}
_BUILT: dict = {}


def _built(name):
    """(form, worm solid) of a named pair, built once per test process (a worm takes seconds in the kernel)."""
    if name not in _BUILT:
        from gearcad.export.step_worm import worm_solid

        form = thread_form(PAIRS[name]())
        _BUILT[name] = form, worm_solid(form, transverse_flank(form))
    return _BUILT[name]


def _flank_deviation(solid, form, angle):
    """Largest axial distance of the section's flank points (plane at ``angle`` about the axis) from the form."""
    import cadquery as cq
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Section
    from OCP.gp import gp_Dir, gp_Pln, gp_Pnt

    normal = gp_Dir(-math.sin(angle), math.cos(angle), 0)
    section = BRepAlgoAPI_Section(solid.wrapped, gp_Pln(gp_Pnt(0, 0, 0), normal))
    section.Build()
    shift = form.lead_parameter * angle  # the screw: the section at angle phi is the axial one moved by p phi
    worst, count = 0.0, 0
    for edge in cq.Shape.cast(section.Shape()).Edges():
        for t in np.linspace(0, 1, 41):
            v = edge.positionAt(t)
            r = v.x * math.cos(angle) + v.y * math.sin(angle)
            if not (form.root_radius + 1e-3 < r < form.tip_radius - 1e-3) or not (0.01 < v.z < form.length - 0.01):
                continue
            h = float(half_thickness(form, r))
            u = v.z - shift
            centre = round(u / form.axial_pitch) * form.axial_pitch
            worst = max(worst, min(abs(u - c - s * h) for c in (centre - form.axial_pitch, centre, centre + form.axial_pitch)
                                   for s in (-1, 1)))
            count += 1
    assert count > 100
    return worst


@pytest.mark.parametrize("name", list(PAIRS))
def test_worm_is_a_valid_solid(name):
    from gearcad.export.step_worm import is_valid

    form, worm = _built(name)
    assert is_valid(worm)  # OCP's BRepCheck_Analyzer
    # More than the core: the thread is there (the fault once seen left the core alone).
    assert worm.Volume() > 1.05 * math.pi * form.root_radius ** 2 * form.length


# The kernel's plane section of a helicoid takes 20 s to over two minutes (the long single-start worm): the axial
# plane and a turned plane of the handbook worm, a turned plane of the ZI worm (a turned plane checks the form and
# the lead at once).  Every worm, the single-start one included, is built by one sweep whose volume worm_solid
# itself holds to the section's area times the length (1e-5), and is checked valid above.
@pytest.mark.parametrize("name, angle", [("handbook", 0.0), ("handbook", 2.0), ("zi-4-starts", 2.0)])
def test_axial_section_is_the_flank_form_within_a_micrometre_and_advances_one_lead_per_turn(name, angle):
    # DIN 3975: the thread advances one lead p_z per turn, so the section in a plane turned by phi is the axial
    # section moved by p_z phi / (2 pi); the ZA flank is straight in it.
    form, worm = _built(name)
    assert _flank_deviation(worm, form, angle) < 1e-3
