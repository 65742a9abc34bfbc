"""The allowed range of every physical input, in one place (SI units).

These are practical bounds (common practice, no source), not limits of physics: wide
enough for any drum a person builds or measures, narrow enough that every number the
solvers produce stays meaningful (a head 5e-324 m across, or air at 100 kg/m^3, would
otherwise reach the solver and fail there, or worse, give a silent wrong answer).
The air ranges are what air can be where people live and play on Earth: about -90 degC
(the coldest recorded) to 70 degC, and 30 kPa (above the highest summit) to 110 kPa
(above the highest recorded sea-level pressure); density and sound speed follow from
the ideal gas over that span.

Each range knows its unit and checks a value, raising the package's one-line
:class:`~membrane.errors.InputError` that names the key, the value and the range.
They are checked where values come in from people: the drum file
(:func:`membrane.drum.parse_drum`) and the command line. The dataclasses themselves
(:class:`membrane.drum.Head` and the others) require only finite, positive sizes, so
the library can still be taken to modelling limits outside these ranges.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError


@dataclass(frozen=True)
class Range:
    """A closed interval ``lo <= x <= hi`` (``hi`` open when ``hi_open``), in SI ``unit``.

    Attributes
    ----------
    lo, hi : float
        Bounds in SI units.
    unit : str
        The SI unit, for messages.
    words : str
        The range as people say it (``"1 cm to 3 m"``); default from lo, hi and unit.
    hi_open : bool
        Whether ``hi`` itself is excluded (Poisson's ratio below 0.5).
    """

    lo: float
    hi: float
    unit: str = ""
    words: str = ""
    hi_open: bool = False

    def text(self) -> str:
        """``must be from ... to ...`` for error messages."""
        span = self.words or f"{self.lo:g} to {self.hi:g} {self.unit}".rstrip()
        return f"must be from {span}" + (" (not including the upper end)" if self.hi_open else "")

    def contains(self, value: float) -> bool:
        """True for a finite value inside the range."""
        if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value):
            return False
        return self.lo <= value and (value < self.hi if self.hi_open else value <= self.hi)

    def check(self, value: float, *, key: str, given: object = None) -> float:
        """Return ``float(value)``, or raise InputError naming ``key`` and ``given`` (default value)."""
        if not self.contains(value):
            raise InputError(key, value if given is None else given, self.text())
        return float(value)


# ------------------------------------------------------------------ the head
DIAMETER = Range(0.01, 3.0, "m", "1 cm to 3 m")
RADIUS = Range(0.005, 1.5, "m", "5 mm to 1.5 m")
# The file's lower tension bound is also the head's slack limit (drum.Head.slack_tension).
TENSION = Range(1.0, 1.0e5, "N/m", "1 N/m to 100 kN/m")
AREAL_DENSITY = Range(1.0e-3, 10.0, "kg/m^2", "1 g/m^2 to 10 kg/m^2")
THICKNESS = Range(1.0e-6, 5.0e-3, "m", "1 um to 5 mm (one ply)")
DENSITY = Range(100.0, 20000.0, "kg/m^3", "100 to 20000 kg/m^3")
YOUNGS_MODULUS = Range(1.0e5, 1.0e12, "Pa", "100 kPa to 1000 GPa")
POISSON_RATIO = Range(0.0, 0.5, "", "0 to 0.5", hi_open=True)
STRENGTH = Range(1.0e5, 1.0e11, "Pa", "100 kPa to 100 GPa")

# ------------------------------------------------------------------ the body
VOLUME = Range(1.0e-3, 2.0, "m^3", "1 L to 2 m^3")
DEPTH = Range(0.01, 3.0, "m", "1 cm to 3 m")

# ------------------------------------------------------------------ the air (on Earth)
TEMPERATURE = Range(183.15, 343.15, "K", "-90 degC to 70 degC (183.15 K to 343.15 K)")
PRESSURE = Range(30.0e3, 110.0e3, "Pa", "30 kPa to 110 kPa")
AIR_DENSITY = Range(0.3, 2.1, "kg/m^3", "0.3 to 2.1 kg/m^3")
SOUND_SPEED = Range(250.0, 400.0, "m/s", "250 to 400 m/s")

# ------------------------------------------------------------------ pitch and listening
PITCH = Range(0.1, 1.0e5, "Hz", "0.1 Hz to 100 kHz")
CENTS_OFFSET = Range(-1200.0, 1200.0, "cents", "-1200 to +1200 cents (one octave)")
OCTAVE = Range(-1, 10, "", "-1 to 10 (C-1 to B10)")
CENTS_PER_TURN = Range(0.01, 1200.0, "cents", "0.01 to 1200 cents per turn")
ANGLE_DEG = Range(-3600.0, 3600.0, "degrees", "-3600 to 3600 degrees")

# ------------------------------------------------------------------ command-line options
LISTENER_DISTANCE = Range(0.1, 1000.0, "m", "0.1 m to 1 km (the levels are a far-field model)")
CONTACT_TIME = Range(1.0e-5, 0.1, "s", "10 us to 100 ms")
T60 = Range(1.0e-3, 1000.0, "s", "1 ms to 1000 s")
FLOOR_DB = Range(-200.0, -1.0, "dB", "-200 to -1 dB")
TURNS_PER_NEWTON = Range(1.0e-6, 1.0, "turns/N", "1e-06 to 1 turn per newton of lug pull")
INTERVAL_CENTS = Range(-4800.0, 4800.0, "cents", "-4800 to +4800 cents (four octaves)")
