"""Tap recordings: read a WAV file, find the strike, measure the partials of the decay.

A partial is modelled as a damped sinusoid ``A exp(-r t) cos(2 pi f t + phi)`` starting at
the strike: frequency ``f`` [Hz], amplitude ``A`` at the strike (full scale = 1), amplitude
decay rate ``r`` [1/s] and reverberation-style decay time ``T60 = 3 ln(10) / r`` [s], the
time the partial takes to fall by 60 dB.

The method, in three steps:

1. *Seeds*: peaks of a zero-padded Hann spectrum of the decay propose where partials are.
2. *Bands*: around each seed a narrow band is cut out of one FFT of the decay with a flat,
   cosine-tapered mask and brought back to the time domain at a low rate (complex
   demodulation and decimation in one step). Within the band the signal is a short sum of
   damped complex exponentials plus noise.
3. *Damped-sinusoid fit*: ESPRIT on a Hankel matrix of the band signal, with the model order
   set by the singular values that stand above the noise, then a variable-projection
   least-squares polish. This resolves partials much closer than the FFT bin of the decay
   (a split degenerate mode beating at under 1 Hz, say).

Approximations: each partial is assumed to decay exponentially from the strike; a partial
whose decay is not exponential (two-stage decay, strong beating with a third partial) is
reported with its best exponential fit.
"""

from __future__ import annotations

import math
import struct
import warnings as _warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import scipy.fft
import scipy.io.wavfile
import scipy.optimize

from membrane.errors import InputError, RecordingError

LN1000 = 3.0 * math.log(10.0)  # an amplitude falls by 60 dB when r t = 3 ln 10

MIN_DURATION_S = 0.1  # shortest decay worth analysing
MAX_DURATION_S = 10.0  # longest decay analysed: enough for 0.01 Hz, and bounded work
DEFAULT_FLOOR_DB = -50.0
DEFAULT_MAX_PARTIALS = 32
MIN_FREQUENCY_HZ = 20.0  # below this: rumble and DC, not a partial of a drumhead

# Settings of the method, chosen on synthetic decays (tests/test_recording.py), no source:
_BAND_HALF_HZ = 20.0  # flat part of each band's mask, either side of the seed
_BAND_TAPER_HZ = 50.0  # width of the cosine taper beyond it
_EDGE_SKIP_S = 1.5 / _BAND_TAPER_HZ  # the band filter's start-up transient, skipped
# A fitted component dying as fast as the band filter's own start-up transient (time
# constant about 1 / (pi * taper)) cannot be told from it, so it is not reported: the
# method resolves partials with T60 above 3 ln 10 * pi * taper ~ 44 ms.
_FASTEST_RATE = math.pi * _BAND_TAPER_HZ  # 1/s
_MAX_ORDER = 10  # damped exponentials per band at most
_HANKEL_COLS = 48  # columns of the band's Hankel matrix (rows: the rest of the samples)
_NOISE_FACTOR = 2.0  # singular values this far above the noise ones count as signal
_MIN_SNR = 30.0  # a component's energy over the noise energy per sample, to be kept
_MIN_T60_S = 0.02  # faster "decays" are the remains of the filter transient


@dataclass(frozen=True)
class Recording:
    """A recording as one channel of floats.

    Attributes
    ----------
    samples : numpy.ndarray
        Samples, full scale = 1 (float64, 1-D).
    rate : float
        Sample rate [Hz].
    channels : int
        Channels in the file.
    encoding : str
        How the file stored its samples, e.g. ``"PCM 24-bit"``.
    clipped : int
        Samples found at the rails of the file's format (0 for an unclipped recording).
    """

    samples: np.ndarray
    rate: float
    channels: int
    encoding: str
    clipped: int = 0

    @property
    def duration(self) -> float:
        """Length of the recording [s]."""
        return self.samples.size / self.rate


@dataclass(frozen=True)
class Partial:
    """One damped sinusoid of a decay.

    Attributes
    ----------
    frequency : float
        Frequency [Hz].
    amplitude : float
        Amplitude at the strike (full scale = 1).
    decay_rate : float
        Amplitude decay rate r [1/s]; the partial goes as ``exp(-r t)``.
    level_db : float
        Amplitude at the strike in dB relative to the strongest partial.
    """

    frequency: float
    amplitude: float
    decay_rate: float
    level_db: float = 0.0

    @property
    def t60(self) -> float | None:
        """Time to fall by 60 dB [s], ``3 ln 10 / r``; None if the partial does not decay."""
        return LN1000 / self.decay_rate if self.decay_rate > 0 else None


@dataclass(frozen=True)
class Analysis:
    """What a recording's decay is made of.

    Attributes
    ----------
    partials : tuple of Partial
        Sorted by frequency.
    rate : float
        Sample rate [Hz].
    strike_time : float
        When the strike begins, from the start of the file [s].
    start_time, end_time : float
        The analysed stretch of the decay, from the start of the file [s].
    warnings : tuple of str
        Things the user should know (clipping, a second strike, ...).
    """

    partials: tuple[Partial, ...]
    rate: float
    strike_time: float
    start_time: float
    end_time: float
    warnings: tuple[str, ...] = ()


# --------------------------------------------------------------------------- reading


def read_wav(path: str | Path, *, channel: int | None = None) -> Recording:
    """Read a WAV file (PCM 8/16/24/32-bit or float 32/64-bit, any rate, any channels).

    Parameters
    ----------
    path : str or Path
        The file.
    channel : int or None
        Channel to use, counting from 0; None mixes all channels (their mean).

    Returns
    -------
    Recording

    Raises
    ------
    RecordingError
        If the file is missing, empty, not a WAV file, truncated, or has no samples.
    InputError
        If ``channel`` is not one of the file's channels.
    """
    path = Path(path)
    if not path.is_file():
        raise RecordingError(f"{path}: no such file")
    size = path.stat().st_size
    if size == 0:
        raise RecordingError(f"{path}: empty file (0 bytes); expected a WAV recording")
    with open(path, "rb") as fh:
        magic = fh.read(12)
    if magic[:4] not in (b"RIFF", b"RIFX", b"RF64") or magic[8:12] != b"WAVE":
        raise RecordingError(f"{path}: not a WAV file (no RIFF/WAVE header); "
                             "export the recording as WAV (PCM or float)")
    try:
        with _warnings.catch_warnings():
            _warnings.simplefilter("ignore")  # extra chunks (LIST, bext) are harmless
            rate, data = scipy.io.wavfile.read(path)
    except (ValueError, EOFError, OSError, IndexError, TypeError, struct.error) as exc:
        raise RecordingError(f"{path}: unreadable WAV file ({exc}); "
                             "expected PCM 8/16/24/32-bit or float 32/64-bit") from None
    data = np.asarray(data)
    if data.ndim == 1:
        data = data[:, None]
    if data.shape[0] == 0:
        raise RecordingError(f"{path}: the WAV file holds no samples (truncated?)")
    if rate <= 0:
        raise RecordingError(f"{path}: sample rate {rate} Hz is not positive")
    channels = data.shape[1]
    if channel is not None and not 0 <= channel < channels:
        raise InputError("channel", channel + 1,
                         f"a channel of this {channels}-channel file: 1 to {channels}, or mix")
    picked = data if channel is None else data[:, channel:channel + 1]
    full, encoding, rails = _full_scale(data.dtype, path)
    clipped = int(np.count_nonzero(rails(picked)))
    x = picked.astype(np.float64)
    if data.dtype == np.uint8:
        x -= 128.0
    x = x.mean(axis=1) / full
    return Recording(samples=x, rate=float(rate), channels=channels,
                     encoding=encoding, clipped=clipped)


def _full_scale(dtype: np.dtype, path: Path):
    """Full-scale value, a name, and a test for samples stuck at the rails."""
    if dtype == np.int16:
        return 32768.0, "PCM 16-bit", lambda d: np.abs(d.astype(np.int32)) >= 32767
    if dtype == np.int32:
        # 24-bit PCM arrives left-justified in int32: its top code is 2**31 - 256
        top = 2**31 - 256
        return 2.0**31, "PCM 24/32-bit", lambda d: (d >= top) | (d <= -top)
    if dtype == np.uint8:
        return 128.0, "PCM 8-bit", lambda d: (d == 0) | (d == 255)
    if dtype in (np.float32, np.float64):
        # a float file may legitimately exceed 1; clipping shows as samples exactly at +-1
        return 1.0, f"float {8 * dtype.itemsize}-bit", lambda d: np.abs(d) == 1.0
    if dtype == np.int64:
        return 2.0**63, "PCM 64-bit", lambda d: np.abs(d) >= 2**63 - 2**40
    raise RecordingError(f"{path}: sample format {dtype} not supported; "
                         "expected PCM 8/16/24/32-bit or float 32/64-bit")


# --------------------------------------------------------------------------- the strike


def find_strike(samples: np.ndarray, *, rate: float) -> tuple[int, int, int]:
    """Locate the strike and the stretch of decay after it.

    Parameters
    ----------
    samples : numpy.ndarray
        One channel, full scale = 1.
    rate : float
        Sample rate [Hz].

    Returns
    -------
    onset, start, end : int
        Sample indices: where the strike begins (the time origin of the partials'
        amplitudes), where the analysed decay begins (just after the mallet leaves), and
        where it ends (a second strike, the decay sinking into the noise, or the file's end).
    """
    x = np.asarray(samples, dtype=float)
    peak = np.max(np.abs(x))
    # the first sample above a tenth of the peak: the strike's leading edge (within a
    # quarter period of the lowest strong partial)
    onset = int(np.argmax(np.abs(x) >= 0.1 * peak))
    hop = max(1, int(round(0.005 * rate)))  # 5 ms frames
    nfr = x.size // hop
    env = np.sqrt(np.mean(x[: nfr * hop].reshape(nfr, hop) ** 2, axis=1)) if nfr else np.zeros(1)
    k0 = onset // hop
    # the mallet is off the head by the loudest frame within 10 ms of the onset
    look = env[k0: k0 + max(1, int(0.01 * rate) // hop) + 1]
    loudest = (k0 + int(np.argmax(look))) * hop if look.size else onset
    start = min(max(loudest, onset + int(0.002 * rate)), x.size)
    # the noise level from the frames before the onset, when there are enough of them
    pre = env[: max(0, k0 - 2)]
    post = env[k0:]
    noise = np.median(pre) if pre.size >= 10 else 0.0
    end = x.size
    kmax = k0 + (int(np.argmax(post)) if post.size else 0)
    for k in range(kmax + 2, nfr):
        # a second strike: an abrupt rise (x4 in 10 ms) to a loud level
        if env[k] > 0.1 * env[kmax] and env[k] > 4.0 * env[k - 2]:
            end = (k - 2) * hop
            break
    # the broadband level sinks into the noise long before the weak partials do, whose
    # bands stay above it: trim only a tail that is pure noise, each band trims itself
    if noise > 0:
        above = np.nonzero(env[kmax: end // hop] > 1.2 * noise)[0]
        if above.size:
            end = min(end, (kmax + above[-1] + 1) * hop + int(0.5 * rate))
    return onset, start, max(min(end, x.size), start)


# --------------------------------------------------------------------------- partials


def analyse(recording: Recording, *, floor_db: float = DEFAULT_FLOOR_DB,
            max_partials: int = DEFAULT_MAX_PARTIALS,
            min_frequency: float = MIN_FREQUENCY_HZ) -> Analysis:
    """Find the strike in a recording and the partials of its decay.

    Parameters
    ----------
    recording : Recording
    floor_db : float
        Partials weaker than this, in dB relative to the strongest, are left out (< 0).
    max_partials : int
        Keep at most this many partials (the strongest).
    min_frequency : float
        Lowest frequency reported [Hz].

    Returns
    -------
    Analysis

    Raises
    ------
    RecordingError
        If the recording is silent, too short, or its partials reach the Nyquist limit.
    """
    if not floor_db < 0:
        raise InputError("floor", floor_db, "a level below the strongest partial, in dB (< 0)")
    if max_partials < 1:
        raise InputError("max-partials", max_partials, "a whole number of at least 1")
    x, rate = recording.samples, recording.rate
    notes = []
    if x.size < MIN_DURATION_S * rate:
        raise RecordingError(f"recording is {x.size / rate:.3f} s long; "
                             f"need at least {MIN_DURATION_S} s of decay after the strike")
    if not np.any(x):
        raise RecordingError("recording is silent (every sample is zero)")
    if not np.all(np.isfinite(x)):
        raise RecordingError("recording holds NaN or infinite samples")
    onset, start, end = find_strike(x, rate=rate)
    end = min(end, start + int(MAX_DURATION_S * rate))
    if recording.clipped >= 3:
        stuck = np.nonzero(np.abs(x) >= np.max(np.abs(x)) * (1 - 1e-6))[0]
        later = stuck[-1] + int(0.002 * rate)
        notes.append(f"recording is clipped ({recording.clipped} samples at full scale): "
                     "the decay is analysed after the clipping ends; record at a lower gain")
        if later < end - MIN_DURATION_S * rate:
            start = max(start, later)
    if end < x.size and end - start >= MIN_DURATION_S * rate and \
            np.max(np.abs(x[end:])) > 0.1 * np.max(np.abs(x[start:end])):
        notes.append(f"a second strike at {end / rate:.2f} s; only the decay before it is used")
    if end - start < MIN_DURATION_S * rate:
        raise RecordingError(f"only {(end - start) / rate:.3f} s of decay after the strike; "
                             f"need at least {MIN_DURATION_S} s")
    partials = find_partials(x[start:end], rate=rate, floor_db=floor_db,
                             max_partials=max_partials, min_frequency=min_frequency,
                             time_origin=(start - onset) / rate)
    if not partials:
        raise RecordingError("no partial stands above the noise; is this a drum tap?")
    nyquist = rate / 2
    near = [p for p in partials if p.frequency > 0.95 * nyquist and p.level_db > -30.0]
    if near:
        raise RecordingError(
            f"sample rate {rate:g} Hz is too low: a strong partial at {near[0].frequency:.0f} Hz "
            f"sits at the Nyquist limit {nyquist:g} Hz, so higher partials are missing or folded "
            "back; record at 44.1 kHz or 48 kHz")
    return Analysis(partials=partials, rate=rate, strike_time=onset / rate,
                    start_time=start / rate, end_time=end / rate, warnings=tuple(notes))


def find_partials(decay: np.ndarray, *, rate: float, floor_db: float = DEFAULT_FLOOR_DB,
                  max_partials: int = DEFAULT_MAX_PARTIALS,
                  min_frequency: float = MIN_FREQUENCY_HZ,
                  time_origin: float = 0.0) -> tuple[Partial, ...]:
    """Fit a sum of damped sinusoids to a decay.

    Parameters
    ----------
    decay : numpy.ndarray
        Samples of the decay (full scale = 1), starting after the strike.
    rate : float
        Sample rate [Hz].
    floor_db : float
        Leave out partials weaker than this relative to the strongest [dB].
    max_partials : int
        Keep at most this many (the strongest).
    min_frequency : float
        Lowest frequency reported [Hz].
    time_origin : float
        How long after the strike ``decay[0]`` is [s]; amplitudes are given at the strike.

    Returns
    -------
    tuple of Partial
        Sorted by frequency.
    """
    y = np.asarray(decay, dtype=float)
    n = y.size
    nfft = scipy.fft.next_fast_len(2 * n, real=True)
    spectrum = scipy.fft.rfft(y, nfft)
    df = rate / nfft
    seeds, grid, noise_var = _seeds(y, rate=rate, floor_db=floor_db,
                                    min_frequency=min_frequency, limit=3 * max_partials)
    # seeds within half a band of each other share one band
    groups = []
    for f in seeds:
        if groups and f - groups[-1][0] < 0.5 * _BAND_HALF_HZ:
            groups[-1].append(f)
        else:
            groups.append([f])
    found = []
    for i, group in enumerate(groups):
        fc = 0.5 * (group[0] + group[-1])
        # each frequency belongs to the nearest band, within its flat part
        lo = 0.5 * (groups[i - 1][-1] + group[0]) if i > 0 else -np.inf
        hi = 0.5 * (group[-1] + groups[i + 1][0]) if i + 1 < len(groups) else np.inf
        lo, hi = max(lo, fc - _BAND_HALF_HZ), min(hi, fc + _BAND_HALF_HZ)
        sigma2 = float(np.interp(fc, grid, noise_var))
        for f, c, r in _band_fit(spectrum, fc=fc, df=df, nfft=nfft, duration=n / rate,
                                 noise_var=sigma2):
            if lo <= f < hi and f >= min_frequency and f < rate / 2 and r < _FASTEST_RATE:
                found.append((f, 2.0 * abs(c) * math.exp(r * time_origin), r))
    if not found:
        return ()
    top = max(a for _, a, _ in found)
    kept = [(f, a, r) for f, a, r in found if 20 * math.log10(a / top) >= floor_db]
    kept = sorted(kept, key=lambda p: -p[1])[:max_partials]
    return tuple(Partial(frequency=f, amplitude=a, decay_rate=r,
                         level_db=20 * math.log10(a / top)) for f, a, r in sorted(kept))


def _seeds(y: np.ndarray, *, rate: float, floor_db: float, min_frequency: float,
           limit: int) -> tuple[list[float], np.ndarray, np.ndarray]:
    """Candidate partial frequencies [Hz], ascending: peaks of zero-padded Hann spectra.

    Also returns the noise as a white-noise variance per sample [full scale^2] on a grid of
    frequencies [Hz] (grid, variance), from the spectrum of the whole decay.

    Two spectra: the whole decay (fine resolution for long-ringing partials) and its first
    0.3 s (where a fast-dying partial still stands above the noise). A seed only proposes a
    band to look in; the band fit decides whether a partial is there.
    """
    found = {}
    short = min(y.size, int(0.3 * rate))
    for length in sorted({y.size, short}):
        # pad the short window more: its peaks are broad and few bins cover them
        nfft = scipy.fft.next_fast_len((4 if length == short else 2) * length, real=True)
        power = np.abs(scipy.fft.rfft(y[:length] * np.hanning(length), nfft)) ** 2
        freqs = np.arange(power.size) * rate / nfft
        level = 10 * np.log10(power + 1e-300)
        centres, med = _noise_blocks(power)
        noise = 10 * np.log10(np.interp(np.arange(power.size), centres, med) + 1e-300)
        level[freqs < min_frequency] = -np.inf
        # a fast-dying partial has a low, broad peak: look 20 dB below the floor
        height = np.maximum(level.max() + floor_db - 20.0, noise + 8.0)
        spacing = max(1, nfft // length)  # one bin of the unpadded window
        for k in _peaks(level, height=height, spacing=spacing):
            h = float(level[k] - height[k])
            found[float(freqs[k])] = max(h, found.get(float(freqs[k]), -np.inf))
        if length == y.size:
            # a Hann window keeps sum(w^2) = 3n/8 of white noise's power per bin
            grid, noise_var = centres * rate / nfft, med / (0.375 * length)
    # strongest first, dropping any within 1.5 Hz of a stronger one (the same peak twice)
    seeds = []
    for f in sorted(found, key=lambda f: -found[f]):
        if all(abs(f - g) > 1.5 for g in seeds):
            seeds.append(f)
        if len(seeds) == limit:
            break
    return sorted(seeds), grid, noise_var


def _peaks(level: np.ndarray, *, height: np.ndarray, spacing: int) -> list[int]:
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


def _noise_blocks(power: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Noise power per FFT bin from medians over blocks of bins (lines are sparse).

    Returns the blocks' centre bins and the mean noise power per bin there (the median of
    an exponentially distributed power is ln 2 times its mean).
    """
    block = max(64, power.size // 256)
    nb = max(1, power.size // block)
    med = np.median(power[: nb * block].reshape(nb, block), axis=1) / math.log(2.0)
    return (np.arange(nb) + 0.5) * block, med


def _band_fit(spectrum: np.ndarray, *, fc: float, df: float, nfft: int, duration: float,
              noise_var: float) -> list[tuple[float, complex, float]]:
    """Damped complex exponentials in a band around ``fc``.

    ``spectrum`` is the FFT (length ``nfft``, bin ``df`` [Hz]) of the decay zero-padded;
    ``noise_var`` the variance per sample of the recording's noise near ``fc``.

    Returns (frequency [Hz], complex amplitude at the start of the decay, decay rate [1/s])
    for each component; the real partial's amplitude is twice the modulus.
    """
    kc = int(round(fc / df))
    half = int(math.ceil((_BAND_HALF_HZ + _BAND_TAPER_HZ) / df))
    k = np.arange(kc - half, kc + half + 1)
    k = k[(k > 0) & (k < spectrum.size)]
    dist = np.abs(k - kc) * df
    x = np.clip((dist - _BAND_HALF_HZ) / _BAND_TAPER_HZ, 0.0, 1.0)
    mask = 0.5 * (1.0 + np.cos(np.pi * x))
    # a little room beyond the mask; at least 256 points, so a short decay still gets
    # some 100 samples in the band (the extra points interpolate, they add no information)
    m = scipy.fft.next_fast_len(max(int(1.25 * (2 * half + 1)), 256))
    buf = np.zeros(m, dtype=complex)
    buf[(k - kc) % m] = spectrum[k] * mask
    z = scipy.fft.ifft(buf) * (m / nfft)
    dt = 1.0 / (m * df)  # decimated sample step [s]
    j0 = int(math.ceil(_EDGE_SKIP_S / dt))
    j1 = int((duration - _EDGE_SKIP_S) / dt)
    # the band's noise: white noise through the mask, decimated
    noise_var = noise_var * float(np.sum(mask**2)) / nfft
    # stop where the band has sunk into its noise: the rest only adds noise to the fit
    smooth = np.convolve(np.abs(z[j0:j1]) ** 2, np.ones(8) / 8, mode="same")
    loud = np.nonzero(smooth > 4.0 * noise_var)[0]
    if loud.size == 0:
        return []  # nothing but noise in this band
    j1 = min(j1, j0 + loud[-1] + 8)
    j1 = max(j1, min(j0 + 3 * _HANKEL_COLS, int((duration - _EDGE_SKIP_S) / dt)))
    if j1 - j0 < 24:
        return []
    seg = z[j0:j1]
    poles = _esprit(seg, noise_var=noise_var)
    if poles.size == 0:
        return []
    poles, amps = _polish(seg, poles)
    t = np.arange(seg.size)
    out = []
    for lam, c in zip(poles, amps):
        energy = abs(c) ** 2 * np.sum(np.abs(lam) ** (2 * t))
        if energy < _MIN_SNR * noise_var:
            continue
        s = np.log(lam) / dt  # -r + i omega, relative to the band centre
        r = -s.real
        if r > 0 and LN1000 / r < _MIN_T60_S:
            continue
        f = kc * df + s.imag / (2 * np.pi)
        # back from the first kept sample to the start of the decay
        c0 = c * np.exp(r * j0 * dt) * np.exp(-1j * s.imag * j0 * dt)
        out.append((float(f), complex(c0), float(r)))
    return out


def _esprit(z: np.ndarray, *, noise_var: float) -> np.ndarray:
    """Poles of the damped exponentials in ``z`` (ESPRIT, order from the singular values)."""
    cols = min(_HANKEL_COLS, z.size // 3)
    rows = z.size - cols + 1
    # right singular vectors and values from the small Gram matrix: cheaper than an SVD
    # of the tall Hankel matrix, and accurate enough for the signal subspace
    ev, vec = np.linalg.eigh(_hankel_gram(z, cols))
    s = np.sqrt(np.clip(ev[::-1], 0.0, None))
    vh = vec[:, ::-1].conj().T
    # the largest singular value of a rows x cols block of white noise
    noise_sv = math.sqrt(max(noise_var, 1e-300)) * (math.sqrt(rows) + math.sqrt(cols))
    order = int(np.count_nonzero(s > _NOISE_FACTOR * noise_sv))
    order = min(order, _MAX_ORDER, cols // 2)
    if order == 0:
        return np.zeros(0, dtype=complex)
    w = vh[:order].T  # cols x order, spans the vectors (1, lam, lam^2, ...) (conjugated)
    psi = np.linalg.lstsq(w[:-1], w[1:], rcond=None)[0]
    return np.linalg.eigvals(psi)


def _hankel_gram(z: np.ndarray, cols: int) -> np.ndarray:
    """H^H H for the Hankel matrix H[i, k] = z[i + k] (``cols`` columns, the rest rows).

    Entry (j, j + d) is a sum of conj(z[i]) z[i + d] over a sliding stretch of i, taken
    from running sums of the lag-d products: O(cols * len(z)) with no matrix product, which
    a threaded BLAS on a busy machine makes slow for matrices this small.
    """
    n = z.size
    rows = n - cols + 1
    gram = np.empty((cols, cols), dtype=complex)
    for d in range(cols):
        run = np.concatenate(([0.0], np.cumsum(np.conj(z[: n - d]) * z[d:])))
        j = np.arange(cols - d)
        gram[j, j + d] = run[j + rows] - run[j]
        gram[j + d, j] = np.conj(gram[j, j + d])
    return gram


def _amplitudes(z: np.ndarray, poles: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Least-squares complex amplitudes for given poles, and the residual."""
    basis = poles[None, :] ** np.arange(z.size)[:, None]
    c = np.linalg.lstsq(basis, z, rcond=None)[0]
    return c, z - basis @ c


def _polish(z: np.ndarray, poles: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Nonlinear least squares on poles and amplitudes together, from the ESPRIT estimate.

    Parameters per component: ln(pole) = -r dt + i w dt and the complex amplitude c; the
    model z_t = sum c exp(t ln(pole)) has the analytic Jacobian used here, so a
    Levenberg-Marquardt run costs a few evaluations of the basis.
    """
    poles = poles[np.abs(poles) < 1.05]  # drop growing components: noise or transient
    if poles.size == 0:
        return poles, np.zeros(0, dtype=complex)
    k = poles.size
    t = np.arange(z.size, dtype=float)[:, None]
    c0 = _amplitudes(z, poles)[0]
    p0 = np.log(poles)

    def unpack(v):
        return v[:k] + 1j * v[k:2 * k], v[2 * k:3 * k] + 1j * v[3 * k:]

    def residual(v):
        s, c = unpack(v)
        res = np.exp(t * s[None, :]) @ c - z
        return np.concatenate([res.real, res.imag])

    def jacobian(v):
        s, c = unpack(v)
        e = np.exp(t * s[None, :])
        d_s = t * e * c[None, :]  # d model / d ln(pole), complex-analytic
        cols = np.concatenate([d_s, 1j * d_s, e, 1j * e], axis=1)
        return np.concatenate([cols.real, cols.imag], axis=0)

    v0 = np.concatenate([p0.real, p0.imag, c0.real, c0.imag])
    try:
        sol = scipy.optimize.least_squares(residual, v0, jac=jacobian, method="lm",
                                           xtol=1e-10, ftol=1e-12, max_nfev=50)
        v = sol.x if sol.cost <= 0.5 * np.sum(residual(v0) ** 2) else v0
    except (ValueError, np.linalg.LinAlgError):
        v = v0
    s, c = unpack(v)
    return np.exp(s), c


def decay_spectrum(recording: Recording, analysis: Analysis) -> tuple[np.ndarray, np.ndarray]:
    """Spectrum of the analysed decay, for pictures.

    The window is the falling half of a Hann window (full weight at the strike, zero at the
    end of the analysed decay), so that a partial that dies fast shows as strongly as it
    sounded, rather than being faded out as a symmetric window would.

    Returns
    -------
    frequencies : numpy.ndarray
        [Hz]
    level_db : numpy.ndarray
        Power in dB relative to the highest peak.
    """
    i0 = int(round(analysis.start_time * recording.rate))
    i1 = int(round(analysis.end_time * recording.rate))
    y = recording.samples[i0:i1]
    window = np.cos(0.5 * np.pi * np.arange(y.size) / y.size) ** 2
    nfft = scipy.fft.next_fast_len(4 * y.size, real=True)
    power = np.abs(scipy.fft.rfft(y * window, nfft)) ** 2
    level = 10 * np.log10(power / power.max() + 1e-30)
    return np.arange(power.size) * recording.rate / nfft, level
