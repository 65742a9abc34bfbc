"""Every drum flag has a drum-file key, and the flag and the key give the same drum and results.

The check is against the drum-file reader itself: a flag laid over a file must build the
identical frozen Drum (and so the identical table) as the key written into that file.
"""

import copy
import json
import tomllib

import pytest
from typer.testing import CliRunner

from membrane.cli import app
from membrane.cli.common import DRUM_FLAGS, FILE_KEYS, MORE_FLAGS, drum_from
from membrane.drum import builtin_text, parse_drum

TOM = tomllib.loads(builtin_text("tom"))

# One value per flag, as a user would type it (text with units, or a number).
VALUES = {
    "diameter": "13 in", "radius": "0.16 m", "tension": "1800 N/m", "areal_density": "0.4 kg/m^2",
    "film": "aramid", "thickness": "8 mil", "body": "shell", "volume": None, "depth": "9 in",
    "plies": 1, "edge": "hinged", "film_density": "1400 kg/m^3", "youngs_modulus": "5 GPa",
    "poisson_ratio": 0.3, "yield_stress": "90 MPa", "tensile_strength": "180 MPa",
    "resonant_film": "aramid", "resonant_thickness": "5 mil", "resonant_plies": 2,
    "resonant_tension": "1000 N/m", "resonant_areal_density": "0.2 kg/m^2", "resonant_edge": "hinged",
    "resonant_film_density": "1300 kg/m^3", "resonant_youngs_modulus": "6 GPa",
    "resonant_poisson_ratio": 0.3, "resonant_yield_stress": "80 MPa",
    "resonant_tensile_strength": "160 MPa",
    "air_temperature": "30 degC", "air_pressure": "90 kPa",
    "air_density": None, "air_sound_speed": None,  # these two go together: tested below
}


def test_every_flag_names_a_drum_file_key():
    assert set(DRUM_FLAGS) == set(FILE_KEYS) == set(VALUES)
    for flag, (table, key) in FILE_KEYS.items():
        assert table in ("head", "resonant_head", "body", "air")
        # the key is one the drum-file reader accepts there (an unknown key is an error)
        if table != "body":
            bad = copy.deepcopy(TOM)
            bad.setdefault(table, {})["no_such_key"] = 1
            with pytest.raises(Exception, match="no_such_key"):
                parse_drum(bad)


def _with_key(table, where, key, value):
    """The drum file as a user would edit it by hand for the same change."""
    edited = copy.deepcopy(table)
    part = edited.setdefault(where, {})
    if where in ("head", "resonant_head"):
        if key in ("film", "thickness", "density"):
            part.pop("areal_density", None)
        if key == "film":
            part.pop("density", None)
        if key == "diameter":
            part.pop("radius", None)
        if key == "radius":
            part.pop("diameter", None)
    part[key] = value
    return edited


@pytest.mark.parametrize("flag", [f for f, v in VALUES.items() if v is not None and f != "body"])
def test_flag_and_file_key_build_the_same_drum(flag, tmp_path):
    where, key = FILE_KEYS[flag]
    value = VALUES[flag]
    path = tmp_path / "tom.toml"
    path.write_text(builtin_text("tom"))
    edited = _with_key(TOM, where, key, value)
    if flag in ("diameter", "radius"):  # a shell's heads share one diameter: both change
        edited = _with_key(edited, "resonant_head", key, value)
    assert drum_from(str(path), **{flag: value}) == parse_drum(edited)


def test_air_by_density_and_sound_speed(tmp_path):
    path = tmp_path / "tom.toml"
    path.write_text(builtin_text("tom"))
    edited = copy.deepcopy(TOM)
    edited["air"] = {"density": "1.1 kg/m^3", "sound_speed": "350 m/s"}
    by_flags = drum_from(str(path), air_density="1.1 kg/m^3", air_sound_speed="350 m/s")
    assert by_flags == parse_drum(edited)
    assert by_flags.air.density == pytest.approx(1.1) and by_flags.air.sound_speed == pytest.approx(350.0)


def test_a_two_headed_drum_from_flags_alone_matches_its_file():
    # the built-in tom written out as flags: same table, number for number, with full physics
    flags = ["--diameter", "12 in", "--film", "polyester", "--thickness", "7 mil", "--plies", "2",
             "--tension", "1500 N/m", "--body", "shell", "--depth", "8 in",
             "--resonant-thickness", "7.5 mil", "--resonant-plies", "1", "--resonant-tension", "1200 N/m",
             "--air-temperature", "20 degC"]
    runner = CliRunner()
    common = ["--m-max", "1", "--n-max", "1", "--format", "json"]
    a = runner.invoke(app, ["modes", "tom", *common])
    b = runner.invoke(app, ["modes", *flags, *common])
    assert a.exit_code == 0 and b.exit_code == 0, a.output + b.output
    assert json.loads(a.stdout)["modes"] == json.loads(b.stdout)["modes"]


def test_resonant_flags_without_a_shell_are_refused():
    result = CliRunner().invoke(app, ["modes", "kettledrum", "--resonant-tension", "100 N/m",
                                      "--physics", "ideal"])
    assert result.exit_code == 2 and "resonant_head" in result.output


def test_more_flags_are_all_drum_file_keys_not_basic_ones():
    basic = set(DRUM_FLAGS) - set(MORE_FLAGS)
    assert basic == {"diameter", "radius", "tension", "areal_density", "film", "thickness", "body",
                     "volume", "depth"}


def test_body_and_volume_flags_match_their_keys():
    kettle = tomllib.loads(builtin_text("kettledrum"))
    edited = copy.deepcopy(kettle)
    edited["body"]["volume"] = "0.2 m^3"
    assert drum_from("kettledrum", volume="0.2 m^3") == parse_drum(edited)
    # a new body kind drops the old kind's size and, off a shell, the resonant head
    plain = copy.deepcopy(TOM)
    plain["body"] = {"kind": "none"}
    del plain["resonant_head"]
    assert drum_from("tom", body="none") == parse_drum(plain)
