"""The drum file: keys, units, validation, examples and overrides."""

import pytest

from membrane import load_drum, parse_drum
from membrane.drum import Air, builtin_names, override_table
from membrane.errors import InputError

BASE = {"head": {"diameter": "26 in", "film": "polyester", "thickness": "0.19 mm", "tension": "4000 N/m"}}


def test_film_gives_areal_density_and_stiffness():
    head = parse_drum(BASE).head
    # 0.19 mm x 1390 kg/m^3 = 0.2641 kg/m^2 (about 0.26 kg/m^2 for a timpani head, from memory)
    assert head.areal_density == pytest.approx(0.19e-3 * 1390)
    # D = E h^3 / (12 (1 - nu^2)) with E = 4.5 GPa, nu = 0.38 (films data file)
    assert head.bending_stiffness == pytest.approx(4.5e9 * 0.19e-3**3 / (12 * (1 - 0.38**2)))
    assert head.radius == pytest.approx(0.3302)


def test_plies_add_mass_and_stiffness_and_share_stress():
    head = parse_drum({"head": {**BASE["head"], "plies": 2}}).head
    one = parse_drum(BASE).head
    assert head.areal_density == pytest.approx(2 * one.areal_density)
    assert head.bending_stiffness == pytest.approx(2 * one.bending_stiffness)
    assert head.stress == pytest.approx(one.stress / 2)


def test_custom_areal_density_has_no_stiffness():
    head = parse_drum({"head": {"radius": 0.3, "areal_density": "260 g/m^2", "tension": 3000}}).head
    assert head.areal_density == pytest.approx(0.26) and head.bending_stiffness == 0


def test_air_from_temperature():
    # ideal gas, R = 287.058 J/(kg K), gamma = 1.4 gives 343.24 m/s, 1.2041 kg/m^3 at 20 degC
    # (handbooks: about 343.2 m/s, 1.204 kg/m^3)
    air = Air.from_conditions(temperature=293.15, pressure=101325.0)
    assert air.sound_speed == pytest.approx(343.24, abs=0.01)
    assert air.density == pytest.approx(1.2041, abs=1e-4)
    assert parse_drum({**BASE, "air": {"temperature": "20 degC"}}).air.sound_speed == pytest.approx(343.24, abs=0.01)


@pytest.mark.parametrize("change, key", [
    ({"head": {**BASE["head"], "diameter": "-3 in"}}, "head.diameter"),
    ({"head": {**BASE["head"], "diameter": 0}}, "head.diameter"),
    ({"head": {**BASE["head"], "tension": "4 kN"}}, "head.tension"),
    ({"head": {**BASE["head"], "film": "unobtainium"}}, "head.film"),
    ({"head": {**BASE["head"], "colour": "white"}}, "head.colour"),
    ({"head": {**BASE["head"], "plies": 0}}, "head.plies"),
    ({"head": {**BASE["head"], "poisson_ratio": 0.7}}, "head.poisson_ratio"),
    ({"head": {**BASE["head"], "edge": "glued"}}, "head.edge"),
    ({**BASE, "body": {"kind": "kettle"}}, "body.volume"),
    ({**BASE, "body": {"kind": "barrel"}}, "body.kind"),
    ({**BASE, "body": {"kind": "shell", "depth": "14 in"}}, "resonant_head"),
    ({**BASE, "lugs": {"pitches": ["D3", "D3"]}}, "lugs.pitches"),
    ({**BASE, "lugs": {"pitches": ["D3", "D3", "-5 Hz"]}}, "lugs.pitches[2]"),
    ({**BASE, "bowl": {}}, "bowl"),
])
def test_bad_values_name_their_key(change, key):
    with pytest.raises(InputError) as info:
        parse_drum(change)
    assert info.value.key == key


def test_builtin_examples_load_and_say_they_are_invented():
    assert set(builtin_names()) >= {"kettledrum", "snare"}
    kettle, snare = load_drum("kettledrum"), load_drum("snare")
    assert "invented" in kettle.name and "invented" in snare.name
    assert kettle.body.kind == "kettle" and snare.body.kind == "shell" and snare.resonant_head is not None
    assert len(kettle.lugs.pitches) == 8


def test_overrides_replace_what_they_should():
    table = override_table(BASE, radius="0.3 m", areal_density="0.3 kg/m^2", body="kettle", volume="150 L")
    drum = parse_drum(table)
    assert drum.head.radius == 0.3 and drum.head.areal_density == 0.3 and drum.body.volume == pytest.approx(0.15)
    assert "diameter" in BASE["head"]  # the original table is untouched


def test_missing_file_and_bad_toml(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        load_drum(tmp_path / "nope.toml")
    bad = tmp_path / "bad.toml"
    bad.write_text("[head\ndiameter = 3")
    with pytest.raises(InputError, match="not valid TOML"):
        load_drum(bad)


@pytest.mark.parametrize("name", ["tom", "bass_drum", "frame_drum"])
def test_new_examples_load_and_say_they_are_invented(name):
    from membrane.drum import builtin_text

    drum = load_drum(name)
    assert "invented" in drum.name and "INVENTED DEMO DATA" in builtin_text(name)
    if name == "frame_drum":
        assert drum.head.film == "goatskin" and drum.body.kind == "none"
    else:
        assert drum.body.kind == "shell" and drum.resonant_head is not None
