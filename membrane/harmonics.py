"""The harmonic series nearest some frequencies: f0 and a whole harmonic number for each.

:func:`harmonic_series` fits raw frequencies; :meth:`membrane.modes.ModeSet.harmonic_fit`
fits named modes with it and returns a :class:`HarmonicFit` (docs/physics.md, "Ratios and
harmonicity").
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .notation import cents

# The harmonic-series fit takes the lowest fitted mode as harmonic 1 up to this
# number and keeps the best; two fits within TIE_CENTS rms keep the higher f0.
MAX_LOWEST_HARMONIC = 4
TIE_CENTS = 1.0
# Any two frequencies sit on some harmonic series; three are the fewest a fit can test.
MIN_FIT_MODES = 3


@dataclass(frozen=True)
class HarmonicFit:
    """The harmonic series that best fits chosen modes.

    Attributes
    ----------
    fundamental : float
        f0 in Hz.
    harmonics : dict
        (m, n) -> harmonic number of each fitted mode.
    rms_cents : float
        Root-mean-square deviation of the fitted modes from their harmonics.
    fitted : tuple of (int, int)
        The modes the fit used.
    """

    fundamental: float
    harmonics: dict
    rms_cents: float
    fitted: tuple


def harmonic_series(frequencies, *, max_lowest: int = MAX_LOWEST_HARMONIC) -> tuple[float, np.ndarray, float]:
    """Least-squares harmonic series through some frequencies, in cents (raw numbers, no modes).

    :meth:`ModeSet.harmonic_fit` is the same fit over named modes, returned as a
    :class:`HarmonicFit`; ``harmonic_fit`` is this function's older name.

    For each choice of the lowest frequency's harmonic number (1..max_lowest), the
    harmonic numbers are assigned by rounding and f0 refitted (the least-squares f0
    in log frequency is the geometric mean of f_i / h_i) until the assignment
    settles. The fit with the smallest rms deviation wins; fits within 1 cent of
    it keep the highest f0, since a lower f0 can always fit as well.

    Parameters
    ----------
    frequencies : array_like
        Positive frequencies in Hz.
    max_lowest : int
        Highest harmonic number the lowest frequency may take.

    Returns
    -------
    (float, numpy.ndarray, float)
        f0 in Hz, integer harmonic numbers, rms deviation in cents.
    """
    f = np.asarray(frequencies, dtype=float)
    low = f.min()
    best = None
    for h_low in range(1, max_lowest + 1):
        f0 = low / h_low
        h = np.maximum(1, np.rint(f / f0))
        for _ in range(20):
            f0 = float(np.exp(np.mean(np.log(f / h))))
            new = np.maximum(1, np.rint(f / f0))
            if np.array_equal(new, h):
                break
            h = new
        rms = float(np.sqrt(np.mean(cents(f, h * f0) ** 2)))
        if best is None or rms < best[2] - TIE_CENTS:
            best = (f0, h.astype(int), rms)
    return best



harmonic_fit = harmonic_series  # the older name (it returns a tuple, not a HarmonicFit)
