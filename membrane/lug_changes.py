"""Lug by lug changes that bring every lug to one tap pitch (a rule of thumb, not the model).

The pitch tapped near a lug is taken as proportional to sqrt(local tension). This is a rule
of thumb (common practice, no source), not a result of the model, which treats the tension
as uniform; it is labelled so wherever it is printed (:data:`LUG_RULE`).

Everything here takes and returns SI floats (Hz, cents).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .notation import cents as _cents

TURN_STEP = 1 / 8  # lug changes are rounded to eighths of a turn  # common practice, no source

LUG_RULE = ("rule of thumb: the pitch tapped near a lug is taken as proportional to the square "
            "root of the local tension, so relative tension = (tap pitch / rms tap pitch)^2")


@dataclass(frozen=True)
class LugChange:
    """What one lug needs. Tension and turns are positive for tightening."""

    lug: int
    tap_hz: float
    relative_tension: float
    change_cents: float
    tension_change_percent: float
    turns: float | None


def equalise_lugs(pitches, *, tension_ratio: float = 1.0, cents_per_turn: float | None = None,
                  key: str = "lugs.pitches") -> tuple[float, tuple[LugChange, ...]]:
    """Per-lug changes that bring every lug to one tap pitch (rule of thumb, see LUG_RULE).

    Parameters
    ----------
    pitches : sequence of float
        Tap pitch near each lug in Hz, at least 3.
    tension_ratio : float
        New mean tension over the current one (1: just even the head out).
    cents_per_turn : float or None
        Measured pitch change for one full turn of a lug, in cents; gives turns,
        rounded to :data:`TURN_STEP`.

    Returns
    -------
    (float, tuple of LugChange)
        The target tap pitch in Hz and each lug's change.

    Notes
    -----
    With tap pitch proportional to sqrt(local tension), the rms tap pitch stands for
    the head's mean tension, and the target tap pitch is it times sqrt(tension_ratio).
    """
    f = np.asarray(pitches, dtype=float)
    if f.size < 3:
        raise InputError(key, list(pitches), "give the tap pitch at each of at least 3 lugs")
    if not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise InputError(key, list(pitches), "tap pitches must be positive frequencies")
    if cents_per_turn is not None and not (math.isfinite(cents_per_turn) and cents_per_turn > 0):
        raise InputError("cents_per_turn", cents_per_turn, "must be a positive number of cents per turn")
    rms = float(np.sqrt(np.mean(f * f)))
    target = rms * math.sqrt(tension_ratio)
    lugs = []
    for i, tap in enumerate(f):
        change = float(_cents(target, tap))
        turns = None
        if cents_per_turn is not None:
            turns = round(change / cents_per_turn / TURN_STEP) * TURN_STEP + 0.0
        lugs.append(LugChange(lug=i + 1, tap_hz=float(tap), relative_tension=float((tap / rms) ** 2),
                              change_cents=change, tension_change_percent=float(100.0 * ((target / tap) ** 2 - 1)),
                              turns=turns))
    return target, tuple(lugs)


def turns_text(turns: float) -> str:
    """Eighths of a turn in words a person can act on: ``+1 3/8``, ``-1/4``, ``0``."""
    eighths = round(turns * 8)
    if eighths == 0:
        return "0"
    sign = "+" if eighths > 0 else "-"
    whole, rest = divmod(abs(eighths), 8)
    frac = ""
    if rest:
        g = math.gcd(rest, 8)
        frac = f"{rest // g}/{8 // g}"
    return sign + " ".join(p for p in (str(whole) if whole else "", frac) if p)
