"""Where to look for partials: peaks of a long-window and a short-window spectrum of the decay.

Three spectra propose seeds: the whole decay under one Hann window (the finest resolution,
for long-ringing partials), a Welch average of half-overlapping Hann windows of a quarter of
the decay (steadier peaks for a partial that glides or beats), and the first 0.3 s (where a
fast-dying partial still stands above the noise). A seed only proposes a band to look in;
the band's damped-sinusoid fit decides whether a partial is there.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.fft

MAX_SEEDS = 256  # bands looked at, at most: bounded work whatever is asked for display
SEED_MERGE_HZ = 1.5  # seeds closer than this are the same peak seen twice
SHORT_WINDOW_S = 0.3


def seeds(y: np.ndarray, *, rate: float, floor_db: float, min_frequency: float,
          limit: int = MAX_SEEDS) -> tuple[list[float], np.ndarray, np.ndarray]:
    """Candidate partial frequencies [Hz], ascending.

    Parameters
    ----------
    y : numpy.ndarray
        The decay, full scale = 1.
    rate : float
        Sample rate [Hz].
    floor_db : float
        How far below the strongest peak to look [dB] (seeds are taken 20 dB lower still).
    min_frequency : float
        No seed below this [Hz].
    limit : int
        At most this many seeds (the highest above their threshold).

    Returns
    -------
    seeds : list of float
        [Hz], ascending.
    grid, noise_var : numpy.ndarray
        The noise as a white-noise variance per sample [full scale^2] on a grid of
        frequencies [Hz], from the spectrum of the whole decay.
    """
    found: dict[float, float] = {}
    n = y.size
    short = min(n, int(SHORT_WINDOW_S * rate))
    quarter = max(min(n, 256), n // 4)
    grid = noise_var = None
    for length, kind in ((n, "whole"), (quarter, "welch"), (short, "short")):
        if kind == "welch" and length >= n:
            continue
        pad = 4 if kind != "whole" else 2
        nfft = scipy.fft.next_fast_len(pad * length, real=True)
        win = np.hanning(length)
        if kind == "welch":
            hop = max(1, length // 2)
            starts = range(0, n - length + 1, hop)
            power = np.mean([np.abs(scipy.fft.rfft(y[s:s + length] * win, nfft)) ** 2
                             for s in starts], axis=0)
        else:
            power = np.abs(scipy.fft.rfft(y[:length] * win, nfft)) ** 2
        freqs = np.arange(power.size) * rate / nfft
        level = 10 * np.log10(power + 1e-300)
        centres, med = noise_blocks(power)
        noise = 10 * np.log10(np.interp(np.arange(power.size), centres, med) + 1e-300)
        level[freqs < min_frequency] = -np.inf
        # a fast-dying partial has a low, broad peak: look 20 dB below the floor
        height = np.maximum(level.max() + floor_db - 20.0, noise + 8.0)
        spacing = max(1, nfft // length)  # one bin of the unpadded window
        for k in peaks(level, height=height, spacing=spacing):
            h = float(level[k] - height[k])
            f = float(freqs[k])
            found[f] = max(h, found.get(f, -np.inf))
        if kind == "whole":
            # a Hann window keeps sum(w^2) = 3n/8 of white noise's power per bin
            grid, noise_var = centres * rate / nfft, med / (0.375 * length)
    chosen: list[float] = []
    for f in sorted(found, key=lambda f: -found[f]):
        if all(abs(f - g) > SEED_MERGE_HZ for g in chosen):
            chosen.append(f)
        if len(chosen) == limit:
            break
    return sorted(chosen), grid, noise_var


def peaks(level: np.ndarray, *, height: np.ndarray, spacing: int) -> list[int]:
    """Local maxima of ``level`` [dB] above ``height``, standing 3 dB above both sides.

    A maximum counts when the spectrum dips at least 3 dB below it on each side within two
    bins of the unpadded window (``2 * spacing``); of maxima closer than ``spacing`` the
    higher is kept.
    """
    mid = level[1:-1]
    cand = np.nonzero((mid > level[:-2]) & (mid >= level[2:]) & (mid > height[1:-1]))[0] + 1
    reach = 2 * spacing
    kept: list[int] = []
    for k in cand[np.argsort(-level[cand])]:
        left = level[max(0, k - reach): k]
        right = level[k + 1: k + 1 + reach]
        if left.size and right.size and max(left.min(), right.min()) <= level[k] - 3.0 \
                and all(abs(k - j) >= spacing for j in kept):
            kept.append(int(k))
    return kept


def noise_blocks(power: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Noise power per FFT bin from medians over blocks of bins (lines are sparse).

    Returns the blocks' centre bins and the mean noise power per bin there (the median of
    an exponentially distributed power is ln 2 times its mean).
    """
    block = max(64, power.size // 256)
    nb = max(1, power.size // block)
    med = np.median(power[: nb * block].reshape(nb, block), axis=1) / math.log(2.0)
    return (np.arange(nb) + 0.5) * block, med
