"""Units at the edge and pitch names."""

import pytest

from membrane.errors import InputError
from membrane.units import cents, note_name, parse_pitch, to_si


@pytest.mark.parametrize("text, kind, si", [
    ("26 in", "length", 0.6604),            # 1 in = 25.4 mm exactly (international inch)
    ("0.19 mm", "length", 0.19e-3),
    ("7.5 mil", "length", 190.5e-6),        # 1 mil = 0.001 in = 25.4 um exactly
    ("65 cm", "length", 0.65),
    ("4 kN/m", "tension", 4000.0),
    ("20 lbf/in", "tension", 20 * 4.4482216152605 / 0.0254),  # 1 lbf = 4.4482216152605 N exactly
    ("0.262 kg/m^2", "areal_density", 0.262),
    ("260 g/m^2", "areal_density", 0.26),
    ("170 L", "volume", 0.17),
    ("1000 in^3", "volume", 1000 * 0.0254**3),
    ("20 degC", "temperature", 293.15),
    ("68 degF", "temperature", 293.15),
    (0.5, "length", 0.5),                   # bare numbers are SI
])
def test_quantities_convert_to_si(text, kind, si):
    assert to_si(text, kind, key="k") == pytest.approx(si, rel=1e-12)


@pytest.mark.parametrize("text, kind, words", [
    ("4 kN", "tension", "wrong kind"),
    ("3 florps", "length", "unknown unit"),
    ("nan m", "length", "finite"),
    ("twelve", "length", "number and a unit"),
])
def test_bad_quantities_name_the_problem(text, kind, words):
    with pytest.raises(InputError, match=words):
        to_si(text, kind, key="head.diameter")


@pytest.mark.parametrize("text, hz", [
    ("A4", 440.0),                          # ISO 16:1975
    ("A3", 220.0),
    ("C4", 440 * 2 ** (-9 / 12)),           # equal temperament, f = 440 * 2^((n - 69)/12)
    ("F#2", 440 * 2 ** ((42 - 69) / 12)),
    ("Gb2", 440 * 2 ** ((42 - 69) / 12)),
    ("Bb2", 440 * 2 ** ((46 - 69) / 12)),
    ("F2+15c", 440 * 2 ** ((41 - 69) / 12) * 2 ** (15 / 1200)),
    ("A4 -10 cents", 440 * 2 ** (-10 / 1200)),
    ("151.5 Hz", 151.5),
    ("151.5", 151.5),
])
def test_pitches(text, hz):
    assert parse_pitch(text) == pytest.approx(hz, rel=1e-12)


@pytest.mark.parametrize("text", ["H2", "", "F", "-3 Hz", "0"])
def test_bad_pitches(text):
    with pytest.raises(InputError):
        parse_pitch(text)


def test_note_names_and_cents():
    # ISO 16 (A4 = 440 Hz); cents = 1200 log2(f2/f1)
    assert note_name(440.0) == ("A4", 0.0)
    name, off = note_name(440 * 2 ** (30 / 1200))
    assert name == "A4" and off == pytest.approx(30.0)
    assert note_name(116.5409)[0] == "Bb2"
    assert cents(880.0, 440.0) == pytest.approx(1200.0)
