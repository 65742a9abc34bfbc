"""The partials of a decay: frequency, level at a reference time, decay time, glide, flags.

A partial is modelled as a damped sinusoid ``A exp(-r t) cos(2 pi f t + phi)``: frequency
``f`` [Hz], amplitude decay rate ``r`` [1/s] and reverberation-style decay time
``T60 = 3 ln(10) / r`` [s], the time the partial takes to fall by 60 dB. Its *level* is its
amplitude at one reference time, :data:`REFERENCE_TIME_S` after the strike's onset, in dB
relative to the strongest partial there. That time is inside the decay that was measured
(the decay begins when the mallet leaves, a few milliseconds after the onset), so no level
is an extrapolation towards the strike, where a fast-dying component would be blown up by
exp(r t).

The method: seeds from long- and short-window spectra (:mod:`.seeding`), damped
exponentials band by band (:mod:`.esprit`; a band whose model ran short of order fitted
again in a narrow band of the residual), the components of each band grouped into its
physical lines with each line's level and decay from its own envelope (:mod:`.lines`), and
frequency tracks of the strong partials (:mod:`.glide`) that turn a comb of components along
a glide back into one partial.

Approximations: each partial is assumed to decay exponentially; a partial whose decay is
not exponential (two-stage decay, strong beating with a third partial) is reported with its
best exponential fit; a glide's decay time comes from its band's envelope.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import scipy.fft

from membrane.errors import InputError, RecordingError

from . import esprit
from ..blas import one_blas_thread
from .audio import Recording
from . import lines as line_fit
from .onset import find_strike
from .partial import LN1000, Partial
from .seeding import seeds as find_seeds

REFERENCE_TIME_S = 0.02  # levels are amplitudes this long after the strike's onset [s]
MIN_DURATION_S = 0.1  # shortest decay worth analysing
MAX_DURATION_S = 10.0  # longest decay analysed: enough for 0.01 Hz, and bounded work
DEFAULT_FLOOR_DB = -50.0
DEFAULT_MAX_PARTIALS = 32
MIN_FREQUENCY_HZ = 20.0  # below this: rumble and DC, not a partial of a drumhead
STRIKE_CONTRAST_DB = 6.0  # the loudest 20 ms stands this far above the quietest tenth
NO_PARTIALS = "no drum partials stand above the noise"
# The narrow refit of a band whose model ran out of order (:func:`_narrow_refit`); settings
# chosen on the recordings of tests/, no source:
NARROW_TAPER_HZ = 15.0  # its mask's taper: resolves T60 above 3 ln 10 / (pi * 15) = 0.15 s
NARROW_MARGIN_HZ = 3.0  # its flat part reaches this far past the band's own frequencies
UNSUPPORTED_RECORDS = 5.0  # a fitted T60 this many times the analysed decay is not measured
MAX_BANDS = 96  # bands fitted at most (the seeds standing highest): bounded work


@dataclass(frozen=True)
class Analysis:
    """What a recording's decay is made of.

    Attributes
    ----------
    partials : tuple of Partial
        Every partial above the floor, sorted by frequency.
    rate : float
        Sample rate [Hz].
    strike_time : float
        When the strike begins, from the start of the file [s].
    start_time, end_time : float
        The analysed stretch of the decay, from the start of the file [s].
    warnings : tuple of str
        Things the user should know (clipping, a second strike, no partials, ...).
    reference_time : float
        When the levels are taken, from the start of the file [s].
    """

    partials: tuple[Partial, ...]
    rate: float
    strike_time: float
    start_time: float
    end_time: float
    warnings: tuple[str, ...] = ()
    reference_time: float = field(default=math.nan)

    def strongest(self, count: int) -> tuple[Partial, ...]:
        """The ``count`` strongest partials, sorted by frequency (for display)."""
        kept = sorted(self.partials, key=lambda p: -p.amplitude)[:count]
        return tuple(sorted(kept, key=lambda p: p.frequency))


@one_blas_thread  # many small matrix products (membrane/blas.py)
def analyse(recording: Recording, *, floor_db: float = DEFAULT_FLOOR_DB,
            max_partials: int | None = None,
            min_frequency: float = MIN_FREQUENCY_HZ) -> Analysis:
    """Find the strike in a recording and the partials of its decay.

    Parameters
    ----------
    recording : Recording
    floor_db : float
        Partials weaker than this, in dB relative to the strongest, are left out (< 0).
    max_partials : int or None
        Return only this many (the strongest); the analysis itself does not depend on it.
    min_frequency : float
        Lowest frequency reported [Hz].

    Returns
    -------
    Analysis
        With no partials and a warning when none stands above the noise (white noise, a
        constant offset, no strike).

    Raises
    ------
    RecordingError
        If the recording is silent, too short, not finite, or its partials reach the
        Nyquist limit.
    """
    if not floor_db < 0:
        raise InputError("floor", floor_db, "a level below the strongest partial, in dB (< 0)")
    if max_partials is not None and max_partials < 1:
        raise InputError("max-partials", max_partials, "a whole number of at least 1")
    x, rate = recording.samples, recording.rate
    if x.size < MIN_DURATION_S * rate:
        raise RecordingError(f"recording is {x.size / rate:.3f} s long; "
                             f"need at least {MIN_DURATION_S} s of decay after the strike")
    if not np.all(np.isfinite(x)):
        raise RecordingError("recording holds NaN or infinite samples")
    if not np.any(x):
        raise RecordingError("recording is silent (every sample is zero)")
    # a constant offset (a microphone preamp's DC) is no partial and would hide the strike
    x = x - float(np.mean(x))
    peak = float(np.max(np.abs(x)))
    if peak <= 1e-12 * max(1.0, float(np.max(np.abs(recording.samples)))):
        return _empty(rate, f"{NO_PARTIALS}: the recording holds only a constant offset (DC)")
    if _strike_contrast_db(x, rate) < STRIKE_CONTRAST_DB:
        return _empty(rate, f"{NO_PARTIALS}: no strike rises {STRIKE_CONTRAST_DB:.0f} dB above "
                      "the rest of the recording (noise or a steady sound?)")
    onset, start, end = find_strike(x, rate=rate, min_frequency=min_frequency)
    end = min(end, start + int(MAX_DURATION_S * rate))
    notes = []
    if recording.clipped >= 3:
        stuck = np.nonzero(np.abs(recording.samples) >= np.max(np.abs(recording.samples))
                           * (1 - 1e-6))[0]
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
    reference = onset + REFERENCE_TIME_S * rate
    if start > reference:
        notes.append(f"the decay is measured from {(start - onset) / rate * 1e3:.0f} ms after "
                     f"the strike; levels at {REFERENCE_TIME_S * 1e3:.0f} ms are extrapolated "
                     "back along each partial's decay")
    partials = find_partials(x[start:end], rate=rate, floor_db=floor_db,
                             min_frequency=min_frequency, time_origin=(start - onset) / rate)
    if not partials:
        return _empty(rate, f"{NO_PARTIALS} of this recording", onset=onset, start=start,
                      end=end, notes=notes)
    nyquist = rate / 2
    near = [p for p in partials if p.frequency > 0.95 * nyquist and p.level_db > -30.0]
    if near:
        raise RecordingError(
            f"sample rate {rate:g} Hz is too low: a strong partial at {near[0].frequency:.0f} Hz "
            f"sits at the Nyquist limit {nyquist:g} Hz, so higher partials are missing or folded "
            "back; record at 44.1 kHz or 48 kHz")
    result = Analysis(partials=partials, rate=rate, strike_time=onset / rate,
                      start_time=start / rate, end_time=end / rate, warnings=tuple(notes),
                      reference_time=reference / rate)
    if max_partials is not None:
        result = Analysis(**{**result.__dict__, "partials": result.strongest(max_partials)})
    return result


def _empty(rate, why, *, onset=0, start=0, end=0, notes=()) -> Analysis:
    return Analysis(partials=(), rate=rate, strike_time=onset / rate, start_time=start / rate,
                    end_time=end / rate, warnings=tuple(notes) + (why,),
                    reference_time=onset / rate + REFERENCE_TIME_S)


def _strike_contrast_db(x: np.ndarray, rate: float) -> float:
    """Loudest 20 ms frame over the 10th percentile of the frames, in dB.

    A tap stands out of its own decay's end or of the noise before it; the 20 ms frames of
    steady noise differ by a dB or so (each holds hundreds of independent samples).
    """
    hop = max(1, int(0.02 * rate))
    nfr = x.size // hop
    if nfr < 3:
        return math.inf
    e = np.mean(x[: nfr * hop].reshape(nfr, hop) ** 2, axis=1)
    med = float(np.percentile(e, 10))
    return math.inf if med <= 0 else 10.0 * math.log10(float(e.max()) / med)


def find_partials(decay: np.ndarray, *, rate: float, floor_db: float = DEFAULT_FLOOR_DB,
                  max_partials: int | None = None,
                  min_frequency: float = MIN_FREQUENCY_HZ,
                  time_origin: float = 0.0,
                  reference_time: float = REFERENCE_TIME_S) -> tuple[Partial, ...]:
    """Fit a sum of damped sinusoids to a decay.

    Parameters
    ----------
    decay : numpy.ndarray
        Samples of the decay (full scale = 1), starting after the strike.
    rate : float
        Sample rate [Hz].
    floor_db : float
        Leave out partials weaker than this relative to the strongest [dB].
    max_partials : int or None
        Return only this many (the strongest); the others are found all the same.
    min_frequency : float
        Lowest frequency reported [Hz].
    time_origin : float
        How long after the strike's onset ``decay[0]`` is [s].
    reference_time : float
        When the levels are taken, after the onset [s].

    Returns
    -------
    tuple of Partial
        Sorted by frequency.
    """
    y = np.asarray(decay, dtype=float)
    n = y.size
    nfft = scipy.fft.next_fast_len(2 * n, real=True)
    spectrum = scipy.fft.rfft(y, nfft)
    seeds, grid, noise_var = find_seeds(y, rate=rate, floor_db=floor_db,
                                        min_frequency=min_frequency, limit=MAX_BANDS)
    # seeds within half a band of each other share one band
    groups: list[list[float]] = []
    for f in seeds:
        if groups and f - groups[-1][0] < 0.5 * esprit.BAND_HALF_HZ:
            groups[-1].append(f)
        else:
            groups.append([f])
    shift = reference_time - time_origin  # from the start of the decay to the reference
    bands, rates = [], []
    keep = []
    for i, group in enumerate(groups):
        fc = 0.5 * (group[0] + group[-1])
        # each frequency belongs to the nearest band, within its flat part
        lo = 0.5 * (groups[i - 1][-1] + group[0]) if i > 0 else -np.inf
        hi = 0.5 * (group[-1] + groups[i + 1][0]) if i + 1 < len(groups) else np.inf
        lo, hi = max(lo, fc - esprit.BAND_HALF_HZ), min(hi, fc + esprit.BAND_HALF_HZ)
        band = esprit.cut_band(spectrum, fc=fc, rate=rate, nfft=nfft, n=n,
                               noise_var=float(np.interp(fc, grid, noise_var)))
        s = esprit.band_poles(band)
        f = s.imag / (2 * np.pi)
        s = s[(f >= lo) & (f < hi) & (f >= min_frequency) & (f < rate / 2)]
        bands.append(band)
        rates.append(s)
        keep.append((max(lo, fc - esprit.BAND_HALF_HZ), min(hi, fc + esprit.BAND_HALF_HZ)))
    # amplitudes twice: first each band alone, then with the other bands' components taken
    # out (the start of the decay is a step for every partial, and a strong partial's step
    # spills into every band for the filter's start-up): the second fit of a band sees the
    # residual of the whole model plus its own components.
    amps = [esprit.band_amplitudes(b, s) if s.size else s for b, s in zip(bands, rates)]
    slow = [np.abs(s.real) < esprit.FASTEST_RATE for s in rates]
    every_s = np.concatenate([s[k] for s, k in zip(rates, slow)] + [np.zeros(0, complex)])
    every_c = np.concatenate([c[k] for c, k in zip(amps, slow)] + [np.zeros(0, complex)])
    residual = scipy.fft.rfft(y - _synthesise(every_s, every_c, n=n, rate=rate), nfft)
    second = []
    for b, s, c, k in zip(bands, rates, amps, slow):
        if not s.size:
            second.append(s)
            continue
        z = esprit.cut_band(residual, fc=b.kc * rate / nfft, rate=rate, nfft=nfft, n=n,
                            noise_var=0.0).z
        z = z + esprit.filtered_basis(b, s[k]) @ c[k]
        second.append(esprit.band_amplitudes(b, s, z=z))
    amps = second
    rates, amps = _narrow_refit(y, rates, amps, keep, [b.capped for b in bands], grid=grid,
                                noise_var=noise_var, rate=rate, nfft=nfft,
                                min_frequency=min_frequency)
    duration = n / rate
    lines: list[list[esprit.Component]] = []
    for b, s, c in zip(bands, rates, amps):
        found = [comp for comp in esprit.components(b, s, c)
                 if comp.decay_rate < esprit.FASTEST_RATE]
        lines += line_fit.group(found, duration=duration)
    if not lines:
        return ()
    lines = line_fit.glide_chains(lines, shift=shift, duration=duration, y=y, rate=rate)
    parts = line_fit.merge_glides(lines, y=y, rate=rate, shift=shift, duration=duration)
    parts = [p for p in parts if p.amplitude > 0]
    if not parts:
        return ()
    top = max(p.amplitude for p in parts)
    kept = []
    for p in parts:
        level = 20 * math.log10(p.amplitude / top)
        if level >= floor_db:
            members = tuple(Partial(**{**m.__dict__, "level_db": 20 * math.log10(m.amplitude / top)})
                            for m in p.members)
            kept.append(Partial(**{**p.__dict__, "level_db": level, "members": members}))
    if max_partials is not None:
        kept = sorted(kept, key=lambda p: -p.amplitude)[:max_partials]
    return tuple(sorted(kept, key=lambda p: p.frequency))


def _narrow_refit(y, rates, amps, keep, capped, *, grid, noise_var, rate, nfft,
                  min_frequency):
    """Bands whose model ran short of order, fitted again in a narrow band of the residual.

    On a dense spectrum a band's wide mask (some 140 Hz) holds more components than its
    model may have (:data:`.esprit.MAX_ORDER`), most of them strong partials in its tapers
    that other bands report; a line of its own that swells or beats then gets one pole, a
    nearly steady exponential far weaker than the line (docs/listen.md: the low timpano's
    (2,1)). The symptom, a decay time over :data:`UNSUPPORTED_RECORDS` times the analysed
    decay in a capped band, sends the band to a refit on the whole model's residual plus its
    own components, in a narrow band (flat over its frequencies and :data:`NARROW_MARGIN_HZ`
    beyond, :data:`NARROW_TAPER_HZ` tapers); components faster than that band resolves keep
    the wide fit. The refit is kept when it has no such decay time (a hum stays as it was).
    Returns the bands' poles and amplitudes (``rates``, ``amps`` where nothing changed).
    """
    n = y.size
    duration = n / rate
    if not any(capped):
        return rates, amps
    slow = [np.abs(s.real) < esprit.FASTEST_RATE for s in rates]
    every_s = np.concatenate([s[k] for s, k in zip(rates, slow)] + [np.zeros(0, complex)])
    every_c = np.concatenate([c[k] for c, k in zip(amps, slow)] + [np.zeros(0, complex)])
    residual = None
    fastest = math.pi * NARROW_TAPER_HZ  # the narrow band's resolution, as FASTEST_RATE's
    unsupported = LN1000 / (UNSUPPORTED_RECORDS * duration)  # decay rates below this [1/s]
    out_s, out_c = list(rates), list(amps)
    for i, ((lo, hi), s, c, k) in enumerate(zip(keep, rates, amps, slow)):
        if not (capped[i] and np.any(k & (np.abs(s.real) < unsupported))):
            continue
        if residual is None:
            residual = scipy.fft.rfft(y - _synthesise(every_s, every_c, n=n, rate=rate), nfft)
        centre = 0.5 * (lo + hi)
        nb = esprit.cut_band(residual, fc=centre, rate=rate, nfft=nfft, n=n,
                             noise_var=float(np.interp(centre, grid, noise_var)),
                             flat=0.5 * (hi - lo) + NARROW_MARGIN_HZ, taper=NARROW_TAPER_HZ)
        seen = k & (np.abs(s.real) < fastest)
        nb.z = nb.z + esprit.filtered_basis(nb, s[seen]) @ c[seen]
        s2 = esprit.band_poles(nb)
        f2 = s2.imag / (2 * np.pi)
        s2 = s2[(f2 >= lo) & (f2 < hi) & (f2 >= min_frequency) & (np.abs(s2.real) < fastest)]
        # nothing found (a decay too short for the narrow band's start-up) or still a decay
        # the record cannot have measured: the wide fit stays
        if not s2.size or np.any(np.abs(s2.real) < unsupported):
            continue
        out_s[i] = np.concatenate([s2, s[~seen]])
        out_c[i] = np.concatenate([esprit.band_amplitudes(nb, s2), c[~seen]])
    return out_s, out_c


def _synthesise(s: np.ndarray, c: np.ndarray, *, n: int, rate: float,
                block: int = 4096) -> np.ndarray:
    """``sum 2 Re(c exp(s t))`` over ``n`` samples: blocks of one table of exponentials,
    each block's start carried by one complex factor per component (a matrix product)."""
    out = np.zeros(n)
    if s.size == 0:
        return out
    tau = np.arange(block) / rate
    table = np.exp(s[:, None] * tau[None, :])
    for start in range(0, n, block):
        stop = min(n, start + block)
        weights = 2.0 * c * np.exp(s * (start / rate))
        out[start:stop] = np.real(weights @ table[:, : stop - start])
    return out


def decay_spectrum(recording: Recording, analysis: Analysis) -> tuple[np.ndarray, np.ndarray]:
    """Spectrum of the analysed decay, for pictures.

    The window is the falling half of a Hann window (full weight at the start of the decay,
    zero at its end), so that a partial that dies fast shows as strongly as it sounded,
    rather than being faded out as a symmetric window would.

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
    if y.size < 2:
        y = recording.samples
    y = y - np.mean(y)
    window = np.cos(0.5 * np.pi * np.arange(y.size) / y.size) ** 2
    nfft = scipy.fft.next_fast_len(4 * y.size, real=True)
    power = np.abs(scipy.fft.rfft(y * window, nfft)) ** 2
    level = 10 * np.log10(power / max(power.max(), 1e-300) + 1e-30)
    return np.arange(power.size) * recording.rate / nfft, level
