"""Pitch glide: how a partial's frequency moves over the decay.

A head struck hard stretches as it swings, so its tension, and with it every partial's
frequency, is highest just after the strike and settles as the motion dies away (tension
modulation at large amplitude; common practice, no source at hand: toms are heard to fall
by a semitone or more, timpani by a few cents). The partial's frequency is followed frame by
frame along its ridge in a short-time spectrum.

A glide is one partial. Its fit by damped exponentials is a comb of components spread over
the glide (a chirp is no sum of a few exponentials), which must not be read as several
partials, nor as a degenerate mode split by uneven tension (that is two components, each
with its own steady frequency and envelope, beating).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.fft

from ..notation import cents

WINDOW_S = 0.1  # frequency measured in frames this long [s], a quarter frame apart
GLIDE_MIN_CENTS = 20.0  # a drift smaller than this is not called a glide (beats wobble less)
WOBBLE_FACTOR = 4.0  # a glide's fall is this many times the settled scatter (plus 0.5 Hz)
TRACK_DB = 30.0  # the track follows the partial down this far below its loudest
STEP_FRACTION = 0.04  # a step of the ridge from one frame to the next, at most


@dataclass(frozen=True)
class Track:
    """A partial's frequency over the decay.

    Attributes
    ----------
    times : numpy.ndarray
        Window centres, from the start of the decay [s].
    frequencies : numpy.ndarray
        [Hz] in each window.
    amplitudes : numpy.ndarray
        Band amplitude in each window (full scale = 1).
    """

    times: np.ndarray
    frequencies: np.ndarray
    amplitudes: np.ndarray

    @property
    def initial(self) -> float:
        """Frequency in the first frame [Hz]."""
        return float(self.frequencies[0])

    @property
    def settled(self) -> float:
        """Median frequency over the second half of the track [Hz]."""
        return float(np.median(self.frequencies[self.frequencies.size // 2:]))

    @property
    def wobble(self) -> float:
        """Scatter of the settled half about its median [Hz] (1.4826 x the median absolute
        deviation: the standard deviation, were it normal); beating makes it."""
        half = self.frequencies[self.frequencies.size // 2:]
        return float(1.4826 * np.median(np.abs(half - np.median(half))))

    @property
    def cents(self) -> float:
        """Settled minus initial [cents]; negative when the partial falls."""
        return cents(self.settled, self.initial)

    @property
    def is_glide(self) -> bool:
        """A fall of at least :data:`GLIDE_MIN_CENTS`, well beyond the settled wobble.

        Only a fall: the tension a large swing adds goes as the motion dies, so a head's
        partials settle downwards; a rise is beating or a neighbour taking over the ridge.
        """
        if self.frequencies.size < 4 or self.cents > -GLIDE_MIN_CENTS:
            return False
        return self.initial - self.settled > WOBBLE_FACTOR * self.wobble + 0.5


@dataclass(frozen=True)
class Frames:
    """A short-time spectrum of a decay, shared by the tracks of all its partials.

    Attributes
    ----------
    level : numpy.ndarray
        Power [dB] per frame (rows) and bin (columns), bins from 0 Hz.
    starts : numpy.ndarray
        First sample of each frame.
    df : float
        Bin width [Hz].
    win : int
        Frame length [samples].
    first : int
        First sample of the first frame.
    floor : numpy.ndarray
        Each frame's noise [dB]: the median over its bins up to 4 kHz (most hold none).
    """

    level: np.ndarray
    starts: np.ndarray
    df: float
    win: int
    first: int
    floor: np.ndarray


def frames(y: np.ndarray, *, rate: float, t_from: float, f_max: float) -> Frames | None:
    """Hann frames of :data:`WINDOW_S`, zero-padded fourfold, a quarter frame apart, from
    ``t_from`` [s]; bins up to ``f_max`` [Hz] kept."""
    win = int(WINDOW_S * rate)
    hop = max(1, win // 4)
    first = int(max(t_from, 0.0) * rate)
    if y.size - first < 2 * win:
        return None
    nfft = scipy.fft.next_fast_len(4 * win, real=True)
    starts = np.arange(first, y.size - win + 1, hop)
    hann = np.hanning(win)
    df = rate / nfft
    top = min(nfft // 2 + 1, int(f_max / df) + 2)
    idx = starts[:, None] + np.arange(win)[None, :]
    spec = scipy.fft.rfft(y[idx] * hann, nfft, axis=1)
    wide = min(spec.shape[1], max(top, int(4000.0 / df)))
    floor = 10 * np.log10(np.median(np.abs(spec[:, 1:wide]) ** 2, axis=1) + 1e-300)
    power = np.abs(spec[:, :top]) ** 2
    return Frames(level=10 * np.log10(power + 1e-300), starts=starts, df=df, win=win,
                  first=first, floor=floor)


def track(y: np.ndarray, *, frequency: float, rate: float, t_from: float = 0.0,
          anchor_s: float | None = None, shared: Frames | None = None) -> Track | None:
    """The frequency of the partial near ``frequency`` frame by frame (a spectral ridge).

    Hann frames of :data:`WINDOW_S`, zero-padded fourfold, every quarter frame; in each the
    peak nearest the ridge is taken with parabolic interpolation of its log power. The ridge
    is followed from an anchor frame (where the partial is, by default a third into the
    decay) back to ``t_from`` and on until the peak sinks :data:`TRACK_DB` below the
    ridge's loudest or into the noise; each step may move by at most :data:`STEP_FRACTION`
    of the frequency (or 2 Hz).

    Parameters
    ----------
    y : numpy.ndarray
        The decay, full scale = 1.
    frequency : float
        Where the partial is at the anchor [Hz].
    rate : float
        Sample rate [Hz].
    t_from : float
        First frame starts here, from the start of the decay [s].
    anchor_s : float or None
        Start of the anchor frame [s].
    shared : Frames or None
        The decay's short-time spectrum, when the caller has it (from ``t_from``).

    Returns
    -------
    Track or None
        None when fewer than four frames follow the partial.
    """
    fr = shared or frames(y, rate=rate, t_from=t_from, f_max=1.6 * frequency + 10.0)
    if fr is None:
        return None
    starts, df, win, first = fr.starts, fr.df, fr.win, fr.first
    hop = max(1, win // 4)
    reach = min(fr.level.shape[1], int(np.ceil((frequency * 1.6 + 10.0) / df)))
    lo_bin = max(1, int((frequency * 0.6 - 10.0) / df))
    level = fr.level[:, lo_bin:reach]
    hann_sum = 0.5 * win
    floor = fr.floor
    anchor = int(np.clip(round(((anchor_s if anchor_s is not None else (y.size / rate) / 3)
                                 * rate - first) / hop), 0, starts.size - 1))
    step = max(2.0, STEP_FRACTION * frequency) / df

    def peak(k, guess):
        # the local maximum nearest the ridge's last place: a ridge is followed, not
        # abandoned for a louder neighbour
        a, b = int(max(1, guess - step)), int(min(level.shape[1] - 2, guess + step))
        if b <= a:
            return None
        row = level[k]
        seg = row[a:b + 1]
        mids = np.nonzero((seg >= row[a - 1:b]) & (seg >= row[a + 1:b + 2]))[0] + a
        if mids.size == 0:
            return None
        j = int(mids[np.argmin(np.abs(mids - guess))])
        l0, l1, l2 = row[j - 1], row[j], row[j + 1]
        den = l0 - 2 * l1 + l2
        d = 0.5 * (l0 - l2) / den if den < 0 else 0.0
        return j + d, l1 - 0.25 * (l0 - l2) * d

    freq = {}
    amp = {}
    guess = frequency / df - lo_bin
    got = peak(anchor, guess)
    if got is None:
        return None
    for direction in (-1, 1):
        guess = got[0]
        k = anchor if direction == -1 else anchor + 1
        while 0 <= k < starts.size:
            here = peak(k, guess)
            if here is None or here[1] < floor[k] + 10.0:
                break
            freq[k], amp[k] = here
            guess = here[0]
            k += direction
    keys = sorted(freq)
    if len(keys) < 4:
        return None
    loud = max(amp.values())
    keys = [k for k in keys if amp[k] >= loud - TRACK_DB]
    # keep the stretch that reaches back to the first frame kept
    times = (starts[keys] - first + win / 2) / rate + max(t_from, 0.0)
    f = (np.array([freq[k] for k in keys]) + lo_bin) * df
    a = 10 ** (np.array([amp[k] for k in keys]) / 20) * 2.0 / hann_sum
    return Track(times=times, frequencies=f, amplitudes=a)
