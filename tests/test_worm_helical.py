"""A worm wheel approximated by a helical gear: its figures (ISO 21771), its contact with the worm, its solid."""

import dataclasses
import json
import math

import numpy as np
import pytest
from shapely.geometry import Polygon

from gearcad.cli import main
from gearcad.errors import InputError
from gearcad.geometry.shape import gear_loop
from gearcad.geometry.worm_wheel import least_gaps, wheel_slice
from gearcad.meshes.worm import WormPair, make_worm_pair, thread_form
from gearcad.meshes.worm_helical import contact_check, helical_wheel, helical_wheel_findings, helical_wheel_slices
from gearcad.profiles import load_tooth_system

PAIRS = {
    # The handbook pair of tests/test_worm.py (m_x 3, z1 2, z2 30, d1 44), a ZI worm of 4 starts, a shifted wheel.
    "handbook": lambda: make_worm_pair(2, 30, 3, worm_diameter=44),
    "zi-4-starts": lambda: make_worm_pair(4, 41, 2.5, diameter_factor=11, flank="zi"),
    "shifted": lambda: make_worm_pair(1, 40, 2, diameter_factor=10, wheel_shift=0.4),
}


@pytest.fixture(scope="module")
def system():
    return load_tooth_system()


@pytest.mark.parametrize("name", list(PAIRS))
def test_figures_are_the_worm_wheels_in_the_transverse_section(name, system):
    # ISO 21771: m_t = m_n / cos(beta), tan(alpha_t) = tan(alpha_n) / cos(beta), d = z m_t.  With beta = gamma and
    # m_n = m_x cos(gamma) the transverse module is the axial module, the transverse pressure angle the axial one
    # (DIN 3975's tan(alpha_x) = tan(alpha_n) / cos(gamma)), the reference diameter m_x z2.
    pair = PAIRS[name]()
    wheel = helical_wheel(pair, system)
    g = wheel.gear
    assert abs(wheel.transverse_module - pair.module) <= 1e-12
    assert wheel.helix_angle == pytest.approx(pair.lead_angle, abs=1e-15) and wheel.hand == "right"
    assert wheel.normal_module == pytest.approx(pair.module * math.cos(pair.lead_angle), rel=1e-15)
    assert g.system.pressure_angle == pytest.approx(pair.axial_pressure_angle, abs=1e-13)
    assert g.reference_diameter == pytest.approx(pair.module * pair.wheel_teeth, rel=1e-13)
    assert g.reference_diameter == pytest.approx(pair.wheel_reference_diameter, rel=1e-13)
    # The worm's basic rack in mm: the tip at the throat diameter, the root at the wheel's root diameter.
    assert g.tip_diameter == pytest.approx(pair.throat_diameter, rel=1e-12)
    assert g.root_diameter == pytest.approx(pair.wheel_root_diameter, rel=1e-12)
    # The same centre distance: a = (d1 + d2) / 2 + x2 m_x, the shift the same in mm.
    assert g.shift * g.module == pytest.approx(pair.wheel_shift * pair.module, abs=1e-12)
    assert wheel.face_width == pair.wheel_face_width


def test_a_lead_angle_of_45_degrees_is_refused_in_one_line(system):
    pair = WormPair(4, 41, 2.0, 4.0, math.radians(20), "zi")  # gamma = atan(4 / 4) = 45 degrees
    with pytest.raises(InputError, match="lead angle 45.000 degrees") as err:
        helical_wheel(pair, system)
    assert "\n" not in str(err.value)


@pytest.fixture(scope="module")
def handbook(system):
    pair = PAIRS["handbook"]()
    return pair, thread_form(pair), helical_wheel(pair, system)


def test_the_worm_turns_clear_of_the_wheel_of_its_own_hand_and_jams_in_the_other(handbook):
    # A crossed helical pair at 90 degrees needs helices of the same hand (common practice): over a full turn of the
    # worm the right-hand wheel leaves no overlap beyond the outlines' 1 um, a left-hand one overlaps by millimetres.
    pair, form, wheel = handbook
    contact = contact_check(wheel, form, slices=7, positions=36)
    assert contact.overlap < 1e-3
    other = dataclasses.replace(wheel, gear=dataclasses.replace(wheel.gear, hand="left"))
    assert contact_check(other, form, slices=7, positions=36).overlap > 0.5


def test_point_contact_against_the_generated_wheels_line_contact(handbook):
    # The generated wheel touches the worm in every slice across its face (line contact; gaps of the scallops'
    # order, a few um); the helical wheel only in the mid-plane, the gap growing towards the face's edges.
    pair, form, wheel = handbook
    half = wheel.face_width / 2
    cs = [0.0, half / 2, half]
    helical = [s for s in helical_wheel_slices(wheel, 5, 1e-3) if s[0] >= -1e-9]
    assert [round(c, 9) for c, _ in helical] == [round(c, 9) for c in cs]
    gaps = least_gaps(form, helical, 36)
    assert gaps[0] < 2e-3 and 0.05 < gaps[1] < gaps[2]
    generated = least_gaps(form, [(c, wheel_slice(form, c)) for c in cs], 36)
    assert max(generated) < 5e-3
    findings = helical_wheel_findings(wheel, contact_check(wheel, form, slices=5, positions=24))
    assert findings[0].severity == "warning" and "point" in findings[0].message and "prototypes" in findings[0].message
    assert findings[1].check == "helical wheel overlap" and findings[1].severity == "ok"


@pytest.mark.slow
def test_solid_is_valid_and_holds_the_twisted_sections_area(handbook, tmp_path):
    # OCP's checker (BRepCheck_Analyzer); a screw motion keeps volume, so the solid (OCP's GProp) holds the
    # transverse area (shapely, on the outline drawn within 0.01 um) times the face width.  The solid's B-splines
    # pass within 1 um of the true outline, so the areas may differ by the perimeter times 1 um (measured:
    # 2.4 mm3 of 175857, against a bound of 17 mm3).
    from OCP.BRepClass3d import BRepClass3d_SolidClassifier
    from OCP.gp import gp_Pnt
    from OCP.TopAbs import TopAbs_IN, TopAbs_OUT

    from gearcad.export.step_worm import is_valid
    from gearcad.export.step_worm_wheel import helical_wheel_solid, solid_volume

    import cadquery as cq

    from gearcad.export.step import write_step

    pair, form, wheel = handbook
    write_step(helical_wheel_solid(wheel), tmp_path / "wheel.step")
    solid = cq.importers.importStep(str(tmp_path / "wheel.step")).val().wrapped  # the file, read back
    assert is_valid(solid)
    section = Polygon(gear_loop(wheel.gear, 1e-5).points())
    bound = section.length * 1e-3 * wheel.face_width
    assert abs(solid_volume(solid) - section.area * wheel.face_width) < bound
    assert bound < 1e-4 * section.area * wheel.face_width
    # Placed as the slices: in each slice c the tooth-space centre on the pitch circle (where the worm's thread
    # stands) is outside, the tooth centre half a pitch on is inside.
    r2, step = pair.wheel_reference_diameter / 2, 2 * math.pi / pair.wheel_teeth
    for c in np.linspace(-0.45, 0.45, 5) * wheel.face_width:
        space = wheel.section_turn(c) + math.pi / pair.wheel_teeth
        for angle, state in ((space, TopAbs_OUT), (space + step / 2, TopAbs_IN)):
            point = gp_Pnt(r2 * math.cos(angle), r2 * math.sin(angle), float(c))
            assert BRepClass3d_SolidClassifier(solid, point, 1e-7).State() == state


def _run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_cli_prints_the_helical_wheel_and_its_caution(capsys):
    code, out, _ = _run(capsys, "worm", "2", "30", "-m", "3", "--worm-diameter", "44", "--wheel-form", "helical",
                        "--json")
    assert code == 0
    data = json.loads(out)
    assert data["wheel_form"] == "helical"
    h = data["helical_wheel"]
    assert h["helix_angle"] == pytest.approx(data["lead_angle"], abs=1e-12) and h["hand"] == "right"
    assert h["transverse_module"] == pytest.approx(3.0, abs=1e-12)
    assert h["normal_module"] == pytest.approx(3 * math.cos(math.radians(data["lead_angle"])), rel=1e-12)
    assert h["reference_diameter"] == pytest.approx(data["wheel"]["reference_diameter"], rel=1e-13)
    assert any(f["check"] == "helical wheel" and f["severity"] == "warning" for f in data["findings"])
    assert data["verdict"] == "warning"


def test_cli_refuses_straight_face_with_another_wheel_form(capsys, tmp_path):
    code, _, err = _run(capsys, "worm", "2", "30", "-m", "3", "--worm-diameter", "44", "--wheel-form", "helical",
                        "--straight-face", "--out", str(tmp_path / "o"))
    assert code == 2 and err.count("\n") == 1 and "--straight-face" in err
    assert not (tmp_path / "o").exists()


def test_midplane_drawing_is_the_helical_section_with_a_space_on_the_worms_side(handbook):
    # The drawing's outline is the helical wheel's transverse section (the same area as shapely's outline of the
    # gear), turned so a tooth space is centred on +y, where the generated wheel's is (tests/test_worm_wheel.py).
    from shapely.geometry import Point

    from gearcad.export.worm_files import midplane_drawing

    pair, form, wheel = handbook
    outline = Polygon(midplane_drawing(form, helical=wheel).outer[0][:, :2])
    assert outline.area == pytest.approx(Polygon(gear_loop(wheel.gear, 1e-3).points()).area, rel=1e-12)
    r2 = pair.wheel_reference_diameter / 2
    assert not outline.contains(Point(0, r2)) and outline.contains(Point(0, r2 - 1.4 * pair.module))
