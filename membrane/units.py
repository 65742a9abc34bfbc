"""Units and pitch at the edge: text in, SI floats out.

One pint registry serves the whole package. Everything past this module works in
plain SI floats (m, kg, s, N/m, Pa, K, Hz). Pitches may be written in Hz or as note
names; equal temperament is referenced to A4 = 440 Hz (ISO 16:1975).
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from . import ranges
from .errors import InputError
from .notation import cents  # noqa: F401  (its home; kept importable from here)

A4_HZ = 440.0  # ISO 16:1975 standard tuning frequency
A4_MIDI = 69

# What each physical kind of quantity must reduce to, with examples for messages.
DIMENSIONS = {
    "length": ("[length]", "a length such as '26 in', '0.65 m', '0.19 mm' or '7.5 mil'"),
    "tension": ("[mass] / [time] ** 2", "a tension per unit length such as '4000 N/m', '4 kN/m' or '20 lbf/in'"),
    "areal_density": ("[mass] / [length] ** 2", "an areal density such as '0.26 kg/m^2' or '260 g/m^2'"),
    "volume": ("[length] ** 3", "a volume such as '0.17 m^3', '170 L' or '10000 in^3'"),
    "density": ("[mass] / [length] ** 3", "a density such as '1390 kg/m^3'"),
    "speed": ("[length] / [time]", "a speed such as '343.2 m/s'"),
    "pressure": ("[mass] / [length] / [time] ** 2", "a pressure or stress such as '101.325 kPa' or '4.5 GPa'"),
    "time": ("[time]", "a time such as '2 ms' or '0.5 s'"),
    "frequency": ("1 / [time]", "a frequency such as '150 Hz'"),
    "mobility": ("[time] / [mass]", "a line mobility such as '1e-4 m/(N*s)'"),
}

# The units people write most, converted without pint: building pint's registry costs a
# command about 0.1-0.25 s (import 85 ms, registry 50 ms from its disk cache, 230 ms without),
# more than the whole solve of a simple drum. Each factor is written from the unit's
# definition exactly as pint evaluates it (tests/test_unit_table.py checks every one against
# pint's own conversion, bit for bit); any other spelling or unit goes to pint.
_INCH = 0.0254  # international inch, exact by definition (1959)
# lbf/in and in^3 as pint evaluates its chain of definitions (the last bit differs from
# 0.45359237 * 9.80665 / 0.0254 and 0.0254 ** 3 computed directly)
_LBF_PER_INCH = 175.12683524647645  # N/m
_CUBIC_INCH = 1.6387063999999996e-05  # m^3
FAST_UNITS = {
    "length": {"m": 1.0, "cm": 0.01, "mm": 0.001, "um": 1e-06, "in": _INCH, "inch": _INCH,
               "ft": 12 * _INCH, "thou": _INCH / 1000},
    "tension": {"N/m": 1.0, "kN/m": 1000.0, "lbf/in": _LBF_PER_INCH},
    "areal_density": {"kg/m^2": 1.0, "g/m^2": 0.001},
    "volume": {"m^3": 1.0, "L": 0.1 ** 3, "l": 0.1 ** 3, "in^3": _CUBIC_INCH},
    "density": {"kg/m^3": 1.0, "g/cm^3": 0.001 / 0.01 ** 3},
    "speed": {"m/s": 1.0},
    "pressure": {"Pa": 1.0, "kPa": 1000.0, "MPa": 1e6, "GPa": 1e9},
    "time": {"s": 1.0, "ms": 0.001},
    "frequency": {"Hz": 1.0, "kHz": 1000.0},
}
ZERO_CELSIUS = 273.15  # K


def _fast_spelling(unit: str) -> str:
    """``'kg / m**2'`` -> ``'kg/m^2'``: the spelling the table above is keyed by."""
    return re.sub(r"\s*([/^])\s*", r"\1", unit.replace("**", "^"))


_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?|[-+]?nan|[-+]?inf)\s*(.*?)\s*$",
                          re.IGNORECASE)


@lru_cache(maxsize=1)
def registry():
    """The package's single pint UnitRegistry (created on first use)."""
    import pint

    # pint parses its definitions file on every start (about 0.4 s); its own disk cache
    # of the parsed definitions makes later starts quick. No cache folder: parse afresh.
    try:
        return pint.UnitRegistry(cache_folder=":auto:")
    except Exception:
        return pint.UnitRegistry()


def to_si(value, kind: str, *, key: str) -> float:
    """Convert a number or a text quantity to a plain SI float of the given kind.

    Parameters
    ----------
    value : float, int or str
        A bare number (taken as SI) or text such as ``"26 in"``.
    kind : str
        One of the keys of :data:`DIMENSIONS`, or ``"temperature"`` (returns kelvin).
    key : str
        The drum-file key or option the value came from, for error messages.

    Returns
    -------
    float
        The value in SI units. Finite; the caller checks the allowed range.

    Raises
    ------
    InputError
        On unparsable text, an unknown unit, the wrong dimension, or a non-finite number.
    """
    if kind == "temperature":
        return _temperature(value, key=key)
    dim, example = DIMENSIONS[kind]
    if isinstance(value, bool):
        raise InputError(key, value, f"expected {example}")
    if isinstance(value, (int, float)):
        number = float(value)
    elif isinstance(value, str):
        number, unit = _split(value, key=key, example=example)
        # In the film trade a mil is a thousandth of an inch (pint's 'mil' is an angle).
        unit = re.sub(r"\bmils?\b", "thou", unit)
        factor = FAST_UNITS.get(kind, {}).get(_fast_spelling(unit)) if unit else None
        if factor is not None:
            number = number * factor  # what pint computes for these units, without pint
        elif unit:
            ureg = registry()
            try:
                q = ureg.Quantity(number, unit)
            except Exception:
                raise InputError(key, value, f"unknown unit {unit!r}; expected {example}") from None
            if q.dimensionality != ureg.Quantity(1, _base_unit(kind)).dimensionality:
                raise InputError(key, value, f"wrong kind of quantity; expected {example}") from None
            number = float(q.to(_base_unit(kind)).magnitude)
    else:
        raise InputError(key, value, f"expected {example}")
    if not math.isfinite(number):
        raise InputError(key, value, f"must be a finite number; expected {example}")
    return number


def _base_unit(kind: str) -> str:
    return {
        "length": "m", "tension": "N/m", "areal_density": "kg/m^2", "volume": "m^3",
        "density": "kg/m^3", "speed": "m/s", "pressure": "Pa", "time": "s", "frequency": "Hz",
        "mobility": "m/(N*s)",
    }[kind]


def _split(text: str, *, key: str, example: str) -> tuple[float, str]:
    match = _NUMBER_UNIT.match(text)
    if not match:
        raise InputError(key, text, f"expected a number and a unit, {example}")
    return float(match.group(1)), match.group(2)


def _temperature(value, *, key: str) -> float:
    example = "a temperature such as '20 degC', '68 degF' or '293.15 K'"
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        kelvin = float(value)
    elif isinstance(value, str):
        number, unit = _split(value, key=key, example=example)
        if unit in ("degC", "K", ""):  # the usual spellings, as pint converts them
            kelvin = number + ZERO_CELSIUS if unit == "degC" else number
            if not math.isfinite(kelvin) or kelvin <= 0:
                raise InputError(key, value, f"must be above absolute zero; expected {example}")
            return kelvin
        ureg = registry()
        try:
            kelvin = float(ureg.Quantity(number, unit or "K").to("K").magnitude)
        except Exception:
            raise InputError(key, value, f"expected {example}") from None
    else:
        raise InputError(key, value, f"expected {example}")
    if not math.isfinite(kelvin) or kelvin <= 0:
        raise InputError(key, value, f"must be above absolute zero; expected {example}")
    return kelvin


# ---------------------------------------------------------------- pitch
_NOTE = re.compile(r"^\s*([A-Ga-g])([#♯b♭]*)(-?\d+)\s*(?:([-+]\s*\d+(?:\.\d*)?)\s*c(?:ents?)?)?\s*$")
_HZ = re.compile(r"^\s*((?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?:hz)?\s*(?:([-+]\s*\d+(?:\.\d*)?)\s*c(?:ents?)?)?\s*$",
                 re.IGNORECASE)
_STEPS = {"C": 0, "D": 2, "E": 4, "F": 5, "G": 7, "A": 9, "B": 11}
_NAMES = ("C", "C#", "D", "Eb", "E", "F", "F#", "G", "Ab", "A", "Bb", "B")


def parse_pitch(text, *, key: str = "pitch") -> float:
    """A pitch in Hz from a number, ``"150 Hz"``, or a note name.

    Notes are a letter, any number of sharps (``#``) or flats (``b``), and an octave
    number in scientific pitch notation (C4 is middle C, A4 = 440 Hz). Either form
    may carry a cents offset: ``"F2+15c"``, ``"Bb2 -8 cents"``, ``"151.2 Hz +3c"``.

    Parameters
    ----------
    text : str or float
        The pitch as given.
    key : str
        Where it came from, for error messages.

    Returns
    -------
    float
        Frequency in Hz.

    Examples
    --------
    >>> round(parse_pitch("A4"), 6), round(parse_pitch("C4"), 3)
    (440.0, 261.626)
    """
    allowed = "expected Hz ('150', '150 Hz') or a note name ('F2', 'F#2', 'Bb2'), optionally with cents ('F2+15c')"
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        hz = float(text)
    elif isinstance(text, str):
        note = _NOTE.match(text)
        hz_match = None if note else _HZ.match(text)
        if note:
            letter, accidentals, octave, offset = note.groups()
            # bounded before any power is taken: 'A99999999999' would overflow
            if len(octave) > 3 or not ranges.OCTAVE.contains(int(octave)):
                raise InputError(key, text, f"the octave {ranges.OCTAVE.text()}")
            if len(accidentals) > 2:
                raise InputError(key, text, "at most two sharps or flats")
            semis = _STEPS[letter.upper()] + sum(1 if a in "#♯" else -1 for a in accidentals)
            midi = 12 * (int(octave) + 1) + semis
            hz = A4_HZ * 2.0 ** ((midi - A4_MIDI) / 12)
        elif hz_match:
            hz, offset = float(hz_match.group(1)), hz_match.group(2)
        else:
            raise InputError(key, text, allowed)
        if offset:
            shift = float(offset.replace(" ", ""))
            if not ranges.CENTS_OFFSET.contains(shift):
                raise InputError(key, text, f"the cents offset {ranges.CENTS_OFFSET.text()}")
            hz *= 2.0 ** (shift / 1200)
    else:
        raise InputError(key, text, allowed)
    if not ranges.PITCH.contains(hz):
        raise InputError(key, text, f"a pitch {ranges.PITCH.text()}")
    return hz


def note_name(frequency: float) -> tuple[str, float]:
    """Nearest equal-tempered note (A4 = 440 Hz) and the cents from it.

    Returns
    -------
    (str, float)
        The note, such as ``"F#2"`` (sharps for the black keys but E-flat, A-flat and
        B-flat, as usually written), and the deviation in cents, within +-50.

    Examples
    --------
    >>> note_name(440.0)
    ('A4', 0.0)
    """
    midi = A4_MIDI + 12 * math.log2(frequency / A4_HZ)
    nearest = round(midi)
    octave, step = divmod(nearest, 12)
    return f"{_NAMES[step]}{octave - 1}", round(100.0 * (midi - nearest), 10)
