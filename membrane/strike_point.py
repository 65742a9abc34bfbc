r"""Where to strike: the strike radius that favours chosen modes over the rest.

The objective and its search are :func:`best_strike_radius`; what a strike at one radius
sounds like is :mod:`membrane.strike`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .modes import ModeSet
from .notation import mode_list
from .presets import DEFAULT_MALLET, MALLETS, SEARCH_RANGE
from .renamed import warn_renamed
from .strike import Listener, Strike, gains, shapes_times_gains, strike_partials

XTOL = 1e-5  # the strike radius is refined to this fraction of the radius
_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0  # 0.618...: the interval shrinks by this per evaluation


def golden_maximum(f, a: float, b: float, *, xtol: float) -> tuple[float, float]:
    """The maximum of a scalar function on [a, b] by golden-section search: (x, f(x)).

    One evaluation per step, the bracket shrinking by 0.618 each time until it is narrower
    than ``xtol``; f should have one maximum in [a, b] (here the bracket around the best
    point of a grid). Written out rather than scipy.optimize, whose import alone would cost
    a strike or a handout about 0.1-0.3 s of CPU.
    """
    c, d = b - _GOLDEN * (b - a), a + _GOLDEN * (b - a)
    fc, fd = f(c), f(d)
    while b - a > xtol:
        if fc >= fd:  # the maximum is in [a, d]
            b, d, fd = d, c, fc
            c = b - _GOLDEN * (b - a)
            fc = f(c)
        else:  # in [c, b]
            a, c, fc = c, d, fd
            d = a + _GOLDEN * (b - a)
            fd = f(d)
    return (c, fc) if fc >= fd else (d, fd)


@dataclass(frozen=True)
class StrikeAdvice:
    """The strike radius that favours chosen modes.

    Attributes
    ----------
    radius_fraction : float
        Best strike radius r0/a, a fraction of the head's radius.
    contrast_db : float
        The objective there: 10 log10 (sum over chosen |B|^2 / sum over the others |B|^2).
    partials : tuple of SoundingMode
        The modes as heard with a strike there.
    chosen : tuple of (int, int)
        The modes favoured.
    """

    radius_fraction: float
    contrast_db: float
    partials: tuple
    chosen: tuple

    def __repr__(self) -> str:
        return (f"StrikeAdvice(r/a = {self.radius_fraction:.3f} for {mode_list(self.chosen)}, "
                f"contrast {self.contrast_db:+.1f} dB, {len(self.partials)} partials)")

    @property
    def at(self) -> float:
        """The older name of :attr:`radius_fraction`."""
        warn_renamed("StrikeAdvice.at", "StrikeAdvice.radius_fraction")
        return self.radius_fraction


def best_strike_radius(modeset: ModeSet, *, modes, contact_time: float = MALLETS[DEFAULT_MALLET],
                       listener: Listener = Listener(), angle: float = 0.0,
                       search: tuple[float, float] = SEARCH_RANGE, head: str | None = None) -> StrikeAdvice:
    r"""Strike-point advice: the radius that favours the chosen modes over the rest.

    The objective is the contrast

    .. math:: C(r_0) = 10 \log_{10} \frac{\sum_{j \in S} |B_j(r_0)|^2}
                                         {\sum_{j \notin S} |B_j(r_0)|^2}

    over the solved modes, S the chosen ones: the share of the chosen partials in the
    summed squared pressure at the listener at the start of the sound (the levels of the
    table; decay times do not enter). It is maximised over ``search`` (fractions of the
    radius) on a grid of 181 points, then refined by a bounded scalar search.

    Parameters
    ----------
    modeset : ModeSet
        Solved modes.
    modes : iterable of (int, int)
        The (m, n) to favour, e.g. [(1, 1), (2, 1), (3, 1), (4, 1)].
    contact_time : float
        Mallet contact time in s.
    listener : Listener
        Listening point.
    angle : float
        Strike angle in rad (matters only with a listener azimuth of its own).
    search : (float, float)
        Range of strike radii searched, fractions of the radius.
    head : {None, "struck", "resonant"}
        On a two-headed drum, whose (m, n) the chosen modes are (default the struck head's).

    Returns
    -------
    StrikeAdvice
        Radius, contrast in dB, and the partials heard with a strike there.
    """
    chosen = tuple(dict.fromkeys((int(m), int(n)) for m, n in modes))
    if not chosen:
        raise InputError("best-for", "", "name at least one mode M,N to favour")
    picked = {id(modeset.find(m, n, head=head)) for m, n in chosen}  # find() names a missing mode
    mask = np.array([id(mode) in picked for mode in modeset])
    if mask.all():
        raise InputError("best-for", " ".join(f"{m},{n}" for m, n in chosen),
                         "leave some solved modes out: the search weighs the chosen against the rest")
    g = gains(modeset, contact_time=contact_time, listener=listener, angle=angle)  # once: not per radius

    def contrast(radius_fraction) -> np.ndarray:
        radii = np.atleast_1d(np.asarray(radius_fraction, dtype=float))
        power = np.abs(shapes_times_gains(modeset, radii, g)) ** 2
        with np.errstate(divide="ignore"):
            return 10 * np.log10(power[mask].sum(axis=0)) - 10 * np.log10(power[~mask].sum(axis=0))

    lo, hi = search
    grid = np.linspace(lo, hi, 181)
    values = contrast(grid)
    i = int(np.argmax(values))
    a, b = grid[max(i - 1, 0)], grid[min(i + 1, len(grid) - 1)]
    x, fx = golden_maximum(lambda r: float(contrast(r)[0]), a, b, xtol=XTOL)
    where, best = (x, fx) if fx >= values[i] else (float(grid[i]), float(values[i]))
    heard = strike_partials(modeset, strike=Strike(radius_fraction=where, contact_time=contact_time,
                                                   angle=angle), listener=listener)
    return StrikeAdvice(radius_fraction=where, contrast_db=best, partials=heard, chosen=chosen)
