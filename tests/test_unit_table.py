"""The units converted without pint give exactly what pint gives (pint as the reference)."""

import subprocess
import sys

import numpy as np
import pint
import pytest

from membrane.units import FAST_UNITS, _temperature, to_si

# the base unit of each kind, as pint spells it
BASE = {"length": "m", "tension": "N/m", "areal_density": "kg/m^2", "volume": "m^3",
        "density": "kg/m^3", "speed": "m/s", "pressure": "Pa", "time": "s", "frequency": "Hz"}
UREG = pint.UnitRegistry()
NUMBERS = [0.0, 1.0, 7.5, 0.19, 26.0, 14.0, 170.0, 4.0, 20.0, 1390.0, 101.325, 1e-9, 3.3e7,
           *map(float, np.random.default_rng(7).uniform(0, 2000, 40))]


@pytest.mark.parametrize("kind,unit", [(k, u) for k, table in FAST_UNITS.items() for u in table])
def test_fast_conversion_is_pints_bit_for_bit(kind, unit):
    for x in NUMBERS:
        expected = float(UREG.Quantity(float(x), unit).to(BASE[kind]).magnitude)  # pint
        assert to_si(f"{x!r} {unit}", kind, key="k") == expected, (x, unit)


def test_other_spellings_and_units_still_go_through_pint():
    # spellings outside the table: pint parses them, and they agree with the table's
    assert to_si("0.26 kg / m**2", "areal_density", key="k") == to_si("0.26 kg/m^2", "areal_density", key="k")
    assert to_si("2 furlong", "length", key="k") == float(UREG.Quantity(2.0, "furlong").to("m").magnitude)
    assert to_si("7.5 mil", "length", key="k") == float(UREG.Quantity(7.5, "thou").to("m").magnitude)
    with pytest.raises(ValueError, match="wrong kind"):
        to_si("3 kg", "length", key="k")


@pytest.mark.parametrize("text", ["20 degC", "-5.5 degC", "293.15 K", "300", "68 degF"])
def test_temperatures_agree_with_pint(text):
    number, _, unit = text.partition(" ")
    expected = float(UREG.Quantity(float(number), unit or "K").to("K").magnitude)  # pint
    assert _temperature(text, key="t") == expected


def test_a_built_in_drum_loads_without_pint():
    # the examples' units are all in the table: no registry is built for them
    code = ("import sys; from membrane.drum import load_drum; load_drum('kettledrum'); "
            "load_drum('snare'); print('pint' in sys.modules)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "False"
