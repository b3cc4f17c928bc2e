"""Material profiles: every shipped file loads with sources; bad files are refused naming file and key."""

import dataclasses

import pytest

from gearcad.errors import ProfileError
from gearcad.materials import MATERIAL_KEYS, Material, load_material, material_names

SHIPPED = {"acrylic", "acetal", "nylon", "pla", "petg", "brass", "aluminium", "mild-steel", "bronze"}  # bronze: worm wheels (issue 15)
POLYMERS = {"acrylic", "acetal", "nylon", "pla", "petg"}
METALS = SHIPPED - POLYMERS

GOOD = """title = "test material"
note = "a note"
[density]
value = 1400.0
unit = "kg/m3"
source = "test"
[elastic_modulus]
value = 2800.0
unit = "MPa"
source = "test"
[poisson_ratio]
value = 0.35
unit = "1"
source = "test"
[allowable_bending]
value = 20.0
unit = "MPa"
source = "test"
[allowable_contact]
value = 40.0
unit = "MPa"
source = "test"
[min_safety_factor]
value = 2.0
unit = "1"
source = "test"
"""


def write(tmp_path, text):
    path = tmp_path / "custom.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_the_shipped_materials():
    # The list: acrylic (PMMA), acetal (POM), nylon (PA6), PLA, PETG, brass, aluminium, mild steel.
    assert set(material_names()) == SHIPPED


@pytest.mark.parametrize("name", sorted(SHIPPED))
def test_every_value_carries_a_marked_source(name):
    # Project rule: each value names its source, marked "typical; verify with your supplier", and says
    # whether it is recalled ("(from memory)") or a rule of thumb ("common practice").
    material = load_material(name)
    assert set(material.sources) == set(MATERIAL_KEYS)
    for key, source in material.sources.items():
        assert "typical; verify with your supplier" in source, (name, key)
        assert "(from memory)" in source or "common practice" in source, (name, key)
    assert material.title.strip()


@pytest.mark.parametrize("name", sorted(SHIPPED))
def test_values_are_plausible_for_the_type(name):
    # Handbook ranges (from memory): unfilled thermoplastics E 1 to 4 GPa, density 1.0 to 1.5 t/m3;
    # engineering metals E 60 to 220 GPa, density 2.6 to 9 t/m3; nu 0.25 to 0.45; flanks carry more
    # contact pressure than the root carries bending stress (common practice).
    m = load_material(name)
    if name in POLYMERS:
        assert 1000 <= m.elastic_modulus <= 4000 and 1000 <= m.density <= 1500
        assert m.min_safety_factor >= 2.0
    else:
        assert 60_000 <= m.elastic_modulus <= 220_000 and 2600 <= m.density <= 9000
    assert 0.25 <= m.poisson_ratio <= 0.45
    assert m.allowable_contact > m.allowable_bending > 0


def test_acrylic_modulus():
    # Cast PMMA sheet: E about 3000 MPa (2400 to 3300 MPa, from memory).
    assert 2400 <= load_material("acrylic").elastic_modulus <= 3300


def test_a_custom_file_loads(tmp_path):
    m = load_material(write(tmp_path, GOOD))
    assert (m.density, m.elastic_modulus, m.poisson_ratio, m.allowable_bending, m.allowable_contact,
            m.min_safety_factor) == (1400.0, 2800.0, 0.35, 20.0, 40.0, 2.0)
    assert m.title == "test material" and m.note == "a note"
    with pytest.raises(dataclasses.FrozenInstanceError):
        m.density = 1.0  # type: ignore[misc]
    assert isinstance(m, Material)


@pytest.mark.parametrize("old, new, words", [
    ("[density]\nvalue = 1400.0\nunit = \"kg/m3\"\nsource = \"test\"\n", "", ["missing key 'density'"]),
    ("unit = \"kg/m3\"", "unit = \"g/cm3\"", ["density.unit", "kg/m3"]),
    ("value = 0.35", "value = 0.6", ["poisson_ratio.value"]),
    ("value = 20.0\nunit = \"MPa\"\nsource = \"test\"", "value = 20.0\nunit = \"MPa\"\nsource = \" \"", ["allowable_bending.source"]),
    ("value = 40.0", "value = \"forty\"", ["allowable_contact.value"]),
    ("title = \"test material\"", "title = \"test material\"\nhardness = 3", ["unknown key 'hardness'"]),
    ("title = \"test material\"", "title = \"\"", ["'title'"]),
    ("value = 2.0", "value = 0.5", ["min_safety_factor.value"]),
    ("[density]", "[density", ["TOML syntax error"]),
])
def test_bad_files_are_refused_naming_file_and_key(tmp_path, old, new, words):
    # Profile rules of the project (gearcad.profiles.read_profile): the message names the file and the key.
    assert old in GOOD
    path = write(tmp_path, GOOD.replace(old, new, 1))
    with pytest.raises(ProfileError) as info:
        load_material(path)
    message = str(info.value)
    assert "custom" in message
    for word in words:
        assert word in message


def test_unknown_name_lists_the_choices():
    with pytest.raises(ProfileError, match="unknown material profile 'unobtainium'.*acetal"):
        load_material("unobtainium")
