"""ZN and ZK worms (DIN 3975 / ISO/TR 10828 flank forms): each axial section by two constructions, the ZN flank
straight in the thread's normal section on the sampled surface, the wheel they cut, and bad input."""

import math

import numpy as np
import pytest

from gearcad.cli import main
from gearcad.errors import InputError
from gearcad.geometry.worm_flanks import (axial_profile, zk_half_thickness, zk_half_thickness_cut, zn_half_thickness,
                                          zn_half_thickness_swept)
from gearcad.geometry.worm_wheel import half_thickness, interference, transverse_flank, wheel_slices
from gearcad.meshes.worm import make_worm_pair, thread_form

ZN = {
    # The handbook pair of tests/test_worm.py (m_x 3, z1 2, z2 30, d1 44) made ZN; a 4-start worm near 30 degrees;
    # a single-start slender worm.
    "handbook": lambda: make_worm_pair(2, 30, 3, worm_diameter=44, flank="zn"),
    "4-starts-30deg": lambda: make_worm_pair(4, 41, 2.5, diameter_factor=7, flank="zn", pressure_angle=22.5),
    "single-start": lambda: make_worm_pair(1, 40, 2, diameter_factor=10, flank="zn"),
}
ZK = {
    "handbook-tool-80": lambda: make_worm_pair(2, 30, 3, worm_diameter=44, flank="zk", tool_diameter=80),
    "4-starts-tool-40": lambda: make_worm_pair(4, 41, 2.5, diameter_factor=9, flank="zk", tool_diameter=40,
                                               pressure_angle=22.5),
    "single-start-tool-300": lambda: make_worm_pair(1, 40, 2, diameter_factor=10, flank="zk", tool_diameter=300),
}


def _radii(form, count=41):
    return np.linspace(form.root_radius, form.tip_radius, count)


@pytest.mark.parametrize("name", list(ZN))
def test_zn_closed_form_and_swept_line_agree(name):
    # The closed form (the line's radius a quadratic in its parameter) against a numerical sweep of the 3-D line
    # cut by the axial half-plane (Newton on two coordinates, explicit rotations): within 1e-9 mm; the cached
    # interpolant the solids use within 1e-9 mm too; the thread half the axial pitch on the reference cylinder.
    form = thread_form(ZN[name]())
    r = _radii(form)
    closed = zn_half_thickness(form, r)
    assert np.max(np.abs(closed - zn_half_thickness_swept(form, r))) < 1e-9
    assert np.max(np.abs(half_thickness(form, r) - closed)) < 1e-9
    assert float(half_thickness(form, form.reference_radius)) == pytest.approx(form.axial_pitch / 4, abs=1e-12)


def _normal_section(form, radii):
    """The flank surface h(r) as the solids take it, cut by the thread's normal plane at (r1, 0, 0): in-plane
    coordinates (radial offset from r1, distance along the normal n), by Newton on the angle about the axis."""
    r1, p = form.reference_radius, form.lead_parameter
    gamma = math.atan2(p, r1)
    t = np.array([0.0, math.cos(gamma), math.sin(gamma)])
    n = np.array([0.0, -math.sin(gamma), math.cos(gamma)])
    h = half_thickness(form, radii)
    phi = np.zeros_like(radii)
    for _ in range(50):  # t . (X - P0) = 0 with X = (r cos phi, r sin phi, p phi + h(r))
        f = radii * np.sin(phi) * t[1] + (p * phi + h) * t[2]
        phi -= f / (radii * np.cos(phi) * t[1] + p * t[2])
    x = np.stack([radii * np.cos(phi), radii * np.sin(phi), p * phi + h], -1)
    return x[:, 0] - r1, x @ n


@pytest.mark.parametrize("name", list(ZN))
def test_zn_normal_section_is_straight_within_a_micrometre(name):
    # DIN 3975: a ZN flank is straight in the normal section of the thread, at the normal pressure angle.  The
    # flank sampled (the h(r) the worm solid and the hob use), cut by that plane, a least-squares line fitted.
    pair = ZN[name]()
    form = thread_form(pair)
    s, v = _normal_section(form, _radii(form, 61))
    slope, offset = np.polyfit(s, v, 1)
    assert np.max(np.abs(v - (slope * s + offset))) < 1e-6 * 1e3  # mm: 1 um
    assert math.atan(-slope) == pytest.approx(pair.pressure_angle, abs=1e-9)


@pytest.mark.parametrize("flank", ["za", "zi"])
def test_the_straightness_test_can_fail(flank):
    # The same cut of a ZA or ZI worm of the same size is curved by far more than a micrometre.
    form = thread_form(make_worm_pair(4, 41, 2.5, diameter_factor=9 if flank == "zi" else 16, flank=flank))
    s, v = _normal_section(form, _radii(form, 61))
    residual = v - np.polyval(np.polyfit(s, v, 1), s)
    assert np.max(np.abs(residual)) > 1e-3


@pytest.mark.parametrize("name", list(ZK))
def test_zk_law_of_gearing_and_simulated_cut_agree(name):
    # The envelope of the biconical tool two ways: the contact condition n . v = 0 on each circle of the cone, and
    # a simulated cut (the least axial position the screwed tool reaches, no normals): within 1 um (found 1e-11 mm).
    form = thread_form(ZK[name]())
    r = _radii(form, 21)
    gearing = zk_half_thickness(form, r)
    assert np.max(np.abs(gearing - zk_half_thickness_cut(form, r))) < 1e-3
    assert np.max(np.abs(axial_profile(form, r) - gearing)) < 1e-9
    assert float(half_thickness(form, form.reference_radius)) == pytest.approx(form.axial_pitch / 4, abs=1e-12)


def test_an_endless_zk_tool_grinds_the_involute_helicoid():
    # A cone of growing radius tends to a plane, and the envelope of a plane in screw motion is an involute
    # helicoid (why ZI worms are ground with a plane face; from memory): the ZK section of the handbook worm
    # tends to its ZI section as 1 / d0 (measured 7.1 um at 80 mm, 0.29 um at 3000 mm).
    zi = make_worm_pair(2, 30, 3, worm_diameter=44, flank="zi")
    r = _radii(thread_form(zi), 41)
    involute = half_thickness(thread_form(zi), r)

    def deviation(d0):
        zk = make_worm_pair(2, 30, 3, worm_diameter=44, flank="zk", tool_diameter=d0)
        return np.max(np.abs(half_thickness(thread_form(zk), r) - involute))

    near, far = deviation(300), deviation(3000)
    assert far < 1e-3 and near / far == pytest.approx(10, rel=0.2)


@pytest.mark.parametrize("name, pairs", [("handbook", ZN), ("handbook-tool-80", ZK)])
def test_the_wheel_they_cut_turns_free_over_a_full_turn(name, pairs):
    # The hob simulation is the same for every flank form (it reads h(r)): the wheel generated by a ZN or ZK worm
    # leaves no overlap beyond the scallops over a full turn (as the ZA wheel of tests/test_worm_wheel.py).
    form = thread_form(pairs[name]())
    found = interference(form, wheel_slices(form, 3), positions=24)
    assert found.depth < 5e-3


@pytest.mark.parametrize("name", ["handbook", "single-start"])
def test_zn_transverse_section_spans_its_thread(name):
    form = thread_form(ZN[name]())
    flank = transverse_flank(form)
    radius = np.hypot(flank[:, 0], flank[:, 1])
    assert radius[0] == pytest.approx(form.root_radius) and radius[-1] == pytest.approx(form.tip_radius)


def _run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("argv, words", [
    (["4", "41", "-m", "2.5", "--diameter-factor", "3", "--flank", "zn"], "beyond the ZN flank form's range"),
    (["4", "41", "-m", "2.5", "--diameter-factor", "4.5", "--flank", "zk", "--tool-diameter", "10"],
     "lead angle 41.634 degrees"),
    (["4", "41", "-m", "2.5", "--diameter-factor", "7", "--flank", "zk", "--tool-diameter", "100",
      "--pressure-angle", "22.5"], "down to its root"),
    (["2", "30", "-m", "3", "--diameter-factor", "10", "--flank", "zk"], "--tool-diameter"),
    (["2", "30", "-m", "3", "--diameter-factor", "10", "--flank", "zk", "--tool-diameter", "5"], "tool diameter"),
    (["2", "30", "-m", "3", "--diameter-factor", "10", "--tool-diameter", "80"], "not ZA"),
])
def test_bad_zn_and_zk_input_is_one_line_and_exit_2(capsys, tmp_path, argv, words):
    code, out, err = _run(capsys, "worm", *argv, "--out", str(tmp_path / "o"))
    assert code == 2 and out == "" and err.count("\n") == 1 and words in err
    assert not (tmp_path / "o").exists()


def test_zn_and_zk_figures_in_json(capsys):
    code, out, _ = _run(capsys, "worm", "2", "30", "-m", "3", "--worm-diameter", "44", "--flank", "zk",
                        "--tool-diameter", "80", "--json")
    import json

    data = json.loads(out)
    assert code == 0 and data["flank"] == "zk" and data["worm"]["tool_diameter"] == 80
    assert data["centre_distance"] == 67.0


def test_library_refuses_a_tool_for_another_form():
    with pytest.raises(InputError, match="ZK"):
        make_worm_pair(2, 30, 3, diameter_factor=10, flank="zn", tool_diameter=80)
