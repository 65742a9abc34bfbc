r"""The partials of a strike as a sound: a sum of decaying complex exponentials.

Partial j is :math:`\mathrm{Im}[B_j e^{i\tilde\omega_j t}]` with
:math:`\tilde\omega_j = 2\pi f_j + i\,3\ln 10/T_{60,j}` (its amplitude falls 60 dB in
:math:`T_{60}`), t from the sound's arrival (:mod:`membrane.strike` derives B and the model).

The samples are computed without a loop over partials or samples: with n = kL + j
(L samples per block), :math:`e^{i\omega n/r} = e^{i\omega kL/r}\,e^{i\omega j/r}`, so the
whole sound is one complex matrix product, (blocks x partials) @ (partials x L). Each factor
is a directly evaluated exponential (no recursion that accumulates rounding error), so every
sample is as accurate as evaluating it alone: the relative error is a few units of rounding
in the phase :math:`\omega t`, as for the direct sum.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from ..notation import LN1000
from ..presets import PEAK_DBFS
from ..renamed import old_names

FADE_S = 0.01  # the raised-cosine fade at the end, s (ends the sound without a click)


def complex_omega(frequency: float, t60: float | None) -> complex:
    """2 pi f + i (amplitude decay rate), rad/s, from a frequency in Hz and a T60 in s.

    A T60 of None or 0 means no decay (rate 0).
    """
    rate = LN1000 / t60 if t60 else 0.0
    return complex(2 * math.pi * frequency, rate)


def decaying_sum(amplitudes, omegas, n: int, rate: float) -> np.ndarray:
    r"""Samples :math:`x_k = \mathrm{Im}\sum_j A_j e^{i\omega_j k / r}`, k = 0..n-1.

    Parameters
    ----------
    amplitudes : array_like
        Complex amplitudes A_j (any unit; the samples have the same).
    omegas : array_like
        Complex angular frequencies in rad/s (imaginary part: the decay rate, >= 0).
    n : int
        Number of samples.
    rate : float
        Sample rate in Hz.

    Returns
    -------
    numpy.ndarray
        float64, shape (n,).
    """
    a = np.asarray(amplitudes, dtype=complex).ravel()
    w = np.asarray(omegas, dtype=complex).ravel()
    if n <= 0 or a.size == 0:
        return np.zeros(max(n, 0))
    block = max(1, int(math.ceil(math.sqrt(n))))
    blocks = -(-n // block)
    within = np.exp(1j * np.outer(w, np.arange(block) / rate))  # (partials, L)
    starts = a[None, :] * np.exp(1j * np.outer(np.arange(blocks) * (block / rate), w))  # (blocks, partials)
    return (starts @ within).imag.ravel()[:n]


def synthesise(partials, *, rate: int, seconds: float, contact_time: float,
               assume_t60: float | None = None) -> np.ndarray:
    """The decaying partials as a sound at the listener, peak-normalised to -1 dBFS.

    Each partial is ``Im[B exp(i w t)]`` with ``w = 2 pi f + i 3 ln 10 / T60``, t from the
    sound's arrival. A raised-cosine onset over the contact time stands in for the blow's
    rise (the formula holds after the pulse), a 10 ms fade ends the sound without a click.
    Partials at or above the Nyquist frequency are left out (they would alias).

    Parameters
    ----------
    partials : iterable of membrane.strike.SoundingMode
        From :func:`membrane.strike.strike_partials` (frequency and T60 from each one's mode).
    rate : int
        Sample rate in Hz.
    seconds : float
        Length in s.
    contact_time : float
        Mallet contact time in s (the onset ramp).
    assume_t60 : float or None
        T60 in s for partials without a modelled decay (vacuum physics); without it such
        partials are refused.

    Returns
    -------
    numpy.ndarray
        float64 samples in [-1, 1].
    """
    n = int(round(rate * seconds))
    amplitudes, omegas = [], []
    for part in partials:
        if part.pressure == 0 or part.frequency >= rate / 2:
            continue
        if part.decay is None and assume_t60 is None:
            raise InputError("physics", "vacuum", "a sound preview needs decay times: use "
                             "--physics full, or give --assume-t60 S for every partial")
        mode = part.mode
        amplitudes.append(part.pressure)
        omegas.append(complex_omega(mode.frequency, mode.decay if mode.decay is not None else assume_t60))
    out = decaying_sum(amplitudes, omegas, n, rate)
    t = np.arange(n) / rate
    ramp = t < contact_time
    out[ramp] *= 0.5 * (1 - np.cos(np.pi * t[ramp] / contact_time))
    fade = t > seconds - FADE_S
    out[fade] *= 0.5 * (1 + np.cos(np.pi * (t[fade] - (seconds - FADE_S)) / FADE_S))
    peak = np.max(np.abs(out)) if n else 0.0
    if peak == 0:
        raise InputError("strike", "silent", "no partial reaches the listener from this strike "
                         "(a strike on the rim, or every partial above the Nyquist frequency)")
    return out * (10 ** (PEAK_DBFS / 20) / peak)


__getattr__ = old_names(__name__, {"synthesize": "synthesise"})
