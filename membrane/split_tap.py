"""The sound of a tap on an unevenly tensioned head: each degenerate pair as two partials.

A pair (m, n) of the uneven head has members with shapes ``cos m(theta - psi)`` (the higher,
antinodes at psi) and ``sin m(theta - psi)`` (the lower). A strike at angle theta0 excites the
higher by ``cos m(theta0 - psi)`` and the lower by ``sin m(theta0 - psi)``, and a far listener
at azimuth phi hears them through the same factors at phi (the radiation of
:mod:`membrane.strike`, whose uniform-head amplitude carries ``cos m(phi - theta0)``, the sum
of the two). Frequencies come from the split table, everything else (radial shape, mallet,
radiation, decay) from the uniform head's partial.
"""

from __future__ import annotations

import math
from dataclasses import replace

from .lugs import SplitTable
from .modes import ModeSet
from .strike import Listener, Strike, strike_partials


def split_partials(modeset: ModeSet, table: SplitTable, *, strike: Strike = Strike(),
                   listener: Listener = Listener()) -> list:
    """Partials of a tap on the uneven head, ready for :func:`membrane.audio.synthesise`.

    Parameters
    ----------
    modeset : ModeSet
        The uniform head at the mean tension (any physics).
    table : SplitTable
        From :func:`membrane.lugs.split_table`; modes not in it are kept as they are.
    strike, listener : Strike, Listener
        Strike angle and listener azimuth in rad, on the lugs' angle scale (lug 1 at 0).

    Returns
    -------
    list of membrane.strike.SoundingMode
    """
    phi = strike.angle if listener.azimuth is None else listener.azimuth
    theta0 = strike.angle
    # amplitudes of the cos m(theta - 0) member, heard at azimuth 0
    base = strike_partials(modeset, strike=replace(strike, angle=0.0),
                           listener=replace(listener, azimuth=0.0))
    splits = {(s.m, s.n): s for s in table.splits}
    out = []
    for part in base:
        mode = part.mode
        s = splits.get((mode.m, mode.n))
        if mode.m == 0 or s is None or mode.head == "resonant":
            if mode.m:
                part = replace(part, pressure=part.pressure * math.cos(mode.m * (phi - theta0)))
            out.append(part)
            continue
        m = mode.m
        psi = math.radians(s.high_antinode_deg) if s.high_antinode_deg is not None else 0.0
        for f, gain in ((s.high_frequency, math.cos(m * (theta0 - psi)) * math.cos(m * (phi - psi))),
                        (s.low_frequency, math.sin(m * (theta0 - psi)) * math.sin(m * (phi - psi)))):
            omega = complex(2 * math.pi * f, mode.omega.imag)
            member = replace(mode, frequency=f, omega=omega, multiplicity=1)
            out.append(replace(part, mode=member, frequency=f, pressure=part.pressure * gain))
    return out
