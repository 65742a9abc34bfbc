"""The strike: where it begins, when the mallet has left, and where the decay ends.

The onset is the strike's leading edge. A second strike is found on an energy envelope
whose frames span at least two periods of the lowest strong partial (so a frame never
falls on a zero crossing of a low, slow wave) and at least 20 ms: a frame whose energy
rises to more than four times (6 dB) the highest energy of the frames before it within
the last 0.6 s is a new strike. The decay of a struck head never rises like that: its
envelope is bounded by the sum of its partials' decaying amplitudes, and the beating of
close partials only brings the envelope back up to, not above, what it was a beat earlier
(beats slower than 0.6 s excepted, which a drum's split modes do not make audibly).
"""

from __future__ import annotations

import numpy as np
import scipy.fft

ONSET_FRACTION = 0.1  # the leading edge: the first sample above this fraction of the peak
MIN_FRAME_S = 0.02  # shortest envelope frame [s]
RESTRIKE_RISE = 4.0  # energy ratio over the recent maximum that makes a new strike
RESTRIKE_MEMORY_S = 0.6  # how far back the recent maximum reaches [s]
RESTRIKE_LEVEL = 1e-3  # a new strike is at least this fraction of the peak frame energy (-30 dB)


def lowest_strong_frequency(x: np.ndarray, *, rate: float, onset: int,
                            min_frequency: float = 20.0) -> float:
    """The lowest spectral peak within 20 dB of the strongest, in the first second [Hz].

    A Hann spectrum of up to 1 s from the onset; used only to size the envelope's frames.
    """
    y = x[onset: onset + int(rate)]
    if y.size < 64:
        return 100.0
    nfft = scipy.fft.next_fast_len(2 * y.size, real=True)
    p = np.abs(scipy.fft.rfft((y - y.mean()) * np.hanning(y.size), nfft)) ** 2
    f = np.arange(p.size) * rate / nfft
    p[f < min_frequency] = 0.0
    if not np.any(p > 0):
        return 100.0
    strong = np.nonzero(p >= 0.01 * p.max())[0]
    return float(max(f[strong[0]], min_frequency))


def find_strike(samples: np.ndarray, *, rate: float,
                min_frequency: float = 20.0) -> tuple[int, int, int]:
    """Locate the strike and the stretch of decay after it.

    Parameters
    ----------
    samples : numpy.ndarray
        One channel, full scale = 1.
    rate : float
        Sample rate [Hz].
    min_frequency : float
        Lowest partial frequency of interest [Hz]; bounds the envelope's frame length.

    Returns
    -------
    onset, start, end : int
        Sample indices: where the strike begins (the time origin of the partials'
        levels), where the analysed decay begins (just after the mallet leaves), and
        where it ends (a second strike, the decay sinking into the noise, or the file's end).
    """
    x = np.asarray(samples, dtype=float)
    peak = np.max(np.abs(x))
    onset = int(np.argmax(np.abs(x) >= ONSET_FRACTION * peak))
    # the mallet is off the head by the loudest 1 ms stretch within 10 ms of the onset
    ms = max(1, int(round(0.001 * rate)))
    look = x[onset: onset + 11 * ms]
    nms = max(1, look.size // ms)
    loud = np.sum(look[: nms * ms].reshape(nms, ms) ** 2, axis=1) if look.size >= ms else np.ones(1)
    start = onset + int(np.argmax(loud)) * ms
    start = min(max(start, onset + int(0.002 * rate)), x.size)

    f_low = lowest_strong_frequency(x, rate=rate, onset=onset, min_frequency=min_frequency)
    frame = max(int(MIN_FRAME_S * rate), int(np.ceil(2.0 * rate / f_low)))
    hop = max(1, frame // 4)
    nfr = max(0, (x.size - frame) // hop + 1)
    end = x.size
    if nfr >= 3:
        csum = np.concatenate(([0.0], np.cumsum(x * x)))
        idx = np.arange(nfr) * hop
        energy = csum[idx + frame] - csum[idx]
        k0 = min(nfr - 1, max(0, onset // hop))
        kmax = k0 + int(np.argmax(energy[k0: k0 + max(2, frame // hop + 4)]))
        memory = max(2, int(RESTRIKE_MEMORY_S * rate / hop))
        top = energy[kmax]
        for k in range(kmax + frame // hop + 1, nfr):
            recent = energy[max(kmax, k - memory): k - 1]
            if recent.size and energy[k] > RESTRIKE_RISE * recent.max() and \
                    energy[k] > RESTRIKE_LEVEL * top:
                # the new strike begins within the frame before the rise
                end = max(start, idx[k - 1] + frame - hop)
                break
        # trim a tail that is pure noise (each band also trims itself): the noise from
        # the frames before the onset, when there are enough of them
        pre = energy[: max(0, k0 - frame // hop - 1)]
        if pre.size >= 10:
            noise = float(np.median(pre))
            above = np.nonzero(energy[kmax: max(kmax + 1, (end - frame) // hop)] > 1.5 * noise)[0]
            if above.size:
                end = min(end, idx[kmax + above[-1]] + frame + int(0.5 * rate))
    return onset, start, max(min(end, x.size), start)
