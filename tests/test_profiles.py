"""Tooth-system profiles: every shipped file loads, sources are present, bad files are refused clearly."""

import math

import pytest

from gearcad.errors import ProfileError
from gearcad.profiles import load_tooth_system, tooth_system_names

GOOD = """title = "test"
[pressure_angle]
value = 20.0
unit = "degree"
source = "test"
[addendum]
value = 1.0
unit = "module"
source = "test"
[dedendum]
value = 1.25
unit = "module"
source = "test"
[fillet_radius]
value = 0.38
unit = "module"
source = "test"
"""


def test_the_shipped_systems():
    assert set(tooth_system_names()) == {"iso53-a", "iso53-b", "iso53-c", "iso53-d", "stub-20", "full-14.5", "full-25"}


@pytest.mark.parametrize("name", ["iso53-a", "iso53-b", "iso53-c", "iso53-d", "stub-20", "full-14.5", "full-25"])
def test_every_value_carries_a_source(name):
    system = load_tooth_system(name)
    assert set(system.sources) == {"pressure_angle", "addendum", "dedendum", "fillet_radius"}
    assert all(src.strip() for src in system.sources.values())
    assert system.standard


# ISO 53:1998 basic rack profiles (from memory): h_aP 1.0 m, h_fP 1.25 m (D: 1.40 m), rho_fP 0.38/0.30/0.25/0.39 m.
@pytest.mark.parametrize("name, dedendum, rho", [("iso53-a", 1.25, 0.38), ("iso53-b", 1.25, 0.30),
                                                  ("iso53-c", 1.25, 0.25), ("iso53-d", 1.40, 0.39)])
def test_iso53_profiles(name, dedendum, rho):
    s = load_tooth_system(name)
    assert (math.degrees(s.pressure_angle), s.addendum, s.dedendum, s.fillet_radius) == (20.0, 1.0, dedendum, rho)


def test_profile_a_flank_depth_is_one_module():
    # ISO 53 profile A is laid out so that its straight flank reaches 1.0 m below the datum line:
    # 1.25 - 0.38 (1 - sin 20 deg) = 0.99997 (common practice: the undercut limit uses h = 1).
    assert load_tooth_system("iso53-a").straight_flank_depth == pytest.approx(1.0, abs=1e-4)


def write(tmp_path, text):
    path = tmp_path / "custom.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_a_good_file_loads_by_path(tmp_path):
    assert load_tooth_system(write(tmp_path, GOOD)).dedendum == 1.25


@pytest.mark.parametrize("edit, message", [
    (lambda t: t.replace("[fillet_radius]\nvalue = 0.38\nunit = \"module\"\nsource = \"test\"\n", ""), "missing key 'fillet_radius'"),
    (lambda t: t.replace("value = 20.0", "value = 45.0"), "pressure_angle.value must be from 10 to 35"),
    (lambda t: t.replace("value = 20.0", 'value = "twenty"'), "pressure_angle.value must be a number"),
    (lambda t: "colour = 3\n" + t, "unknown key 'colour'"),
    (lambda t: t.replace('unit = "degree"', 'unit = "radian"'), "pressure_angle.unit must be 'degree'"),
    (lambda t: t.replace('source = "test"\n[addendum]', 'source = ""\n[addendum]'), "pressure_angle.source"),
    (lambda t: t.replace("title = ", "title = = "), "TOML syntax error"),
    (lambda t: t.replace("value = 1.25", "value = 0.9"), "dedendum"),
    (lambda t: t.replace("value = 0.38", "value = 0.9"), "fillet_radius 0.9 m is larger"),
])
def test_bad_files_name_the_file_and_key(tmp_path, edit, message):
    path = write(tmp_path, edit(GOOD))
    with pytest.raises(ProfileError, match=message) as info:
        load_tooth_system(path)
    assert "\n" not in str(info.value).strip() or "TOML" in str(info.value)


def test_unknown_name_lists_the_choices():
    with pytest.raises(ProfileError, match="choose one of: full-14.5"):
        load_tooth_system("iso53-z")
