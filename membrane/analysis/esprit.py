"""Damped complex exponentials in one narrow band of a decay (ESPRIT, then least squares).

Around a seed frequency a band is cut out of one FFT of the decay with a flat, cosine-tapered
mask and brought back to the time domain at a low rate (complex demodulation and decimation
in one step). Within the band the signal is a short sum of damped complex exponentials plus
noise.

1. *Poles* by ESPRIT on a Hankel matrix of the band signal, past the band filter's start-up
   and before the band sinks into its noise, with the model order set by the singular values
   that stand above the noise; then a Levenberg-Marquardt polish of poles and amplitudes.
2. *Amplitudes* by linear least squares of the whole band signal, start-up included, on
   basis signals that are each pole's damped exponential from the start of the decay passed
   through the very same band mask (the DFT of a truncated geometric series is closed-form).
   So an amplitude is the partial's own at the start of the decay, never an extrapolation
   through the filter's start-up transient.
"""

from __future__ import annotations

import math
import warnings
from contextlib import contextmanager
from dataclasses import dataclass

import numpy as np
import scipy.fft
import scipy.optimize

from ..notation import LN1000  # noqa: E402  (60 dB of decay: r t = 3 ln 10)

# Settings of the method, chosen on synthetic decays (tests/test_recording.py), no source:
BAND_HALF_HZ = 20.0  # flat part of each band's mask, either side of the seed
BAND_TAPER_HZ = 50.0  # width of the cosine taper beyond it
EDGE_SKIP_TAPERS = 1.5  # the band filter's start-up transient, skipped for poles: 1.5 / taper
EDGE_SKIP_S = EDGE_SKIP_TAPERS / BAND_TAPER_HZ  # [s] for the usual band
# A component dying as fast as the band filter's own start-up transient (time constant
# about 1 / (pi * taper)) cannot be told from it: the method resolves partials with T60
# above 3 ln 10 * pi * taper ~ 44 ms, and calls those under FAST_T60_S fast (their decay
# rate comes from few samples past the start-up and is uncertain).
FASTEST_RATE = math.pi * BAND_TAPER_HZ  # 1/s
FAST_T60_S = 0.1
MAX_ORDER = 10  # damped exponentials per band at most
HANKEL_COLS = 48  # columns of the band's Hankel matrix (rows: the rest of the samples)
NOISE_FACTOR = 2.0  # singular values this far above the noise ones count as signal
MIN_SNR = 30.0  # a component's energy over the noise energy per sample, to be kept
POLISH_SAMPLES = 256  # decimated samples the polish looks at, at most
CROWDED_HZ = 3.0  # components closer than this get the polish


@dataclass(frozen=True)
class Component:
    """One damped complex exponential of a band.

    Attributes
    ----------
    frequency : float
        [Hz].
    amplitude : float
        Amplitude of the real partial at the start of the decay (twice the complex one).
    decay_rate : float
        Amplitude decay rate r [1/s].
    phase : float
        [rad] at the start of the decay.
    """

    frequency: float
    amplitude: float
    decay_rate: float
    phase: float = 0.0


@dataclass
class Band:
    """A band cut out of the decay's FFT and brought to a low rate.

    Attributes
    ----------
    z : numpy.ndarray
        The band signal, demodulated by bin ``kc`` and decimated (complex).
    k, mask : numpy.ndarray
        The FFT bins in the band and the mask's weight on each.
    kc, m, nfft, n : int
        Centre bin, decimated length, FFT length, samples in the decay.
    rate : float
        Sample rate [Hz].
    noise : float
        Noise variance per decimated sample.
    poles : numpy.ndarray
        Absolute complex rates ``-r + i omega`` [1/s] of the band's components.
    taper : float
        Width of the mask's cosine taper [Hz] (its start-up transient lasts about
        ``1 / (pi * taper)``).
    capped : bool
        Set by :func:`band_poles`: the singular values asked for :data:`MAX_ORDER`
        components or more, so the model may be short of some.
    """

    z: np.ndarray
    k: np.ndarray
    mask: np.ndarray
    kc: int
    m: int
    nfft: int
    n: int
    rate: float
    noise: float
    poles: np.ndarray = None
    taper: float = BAND_TAPER_HZ
    capped: bool = False

    @property
    def dt(self) -> float:
        """Decimated sample step [s]."""
        return self.nfft / (self.m * self.rate)


def cut_band(spectrum: np.ndarray, *, fc: float, rate: float, nfft: int, n: int,
             noise_var: float, flat: float = BAND_HALF_HZ,
             taper: float = BAND_TAPER_HZ) -> Band:
    """The band around ``fc`` [Hz] of ``spectrum`` (``rfft`` of the decay, ``n`` samples,
    zero-padded to ``nfft``); ``noise_var`` is the noise variance per sample near ``fc``;
    the mask is flat within ``flat`` [Hz] of ``fc`` and falls to zero over ``taper`` [Hz]."""
    df = rate / nfft
    kc = int(round(fc / df))
    half = int(math.ceil((flat + taper) / df))
    k = np.arange(kc - half, kc + half + 1)
    k = k[(k > 0) & (k < spectrum.size)]
    dist = np.abs(k - kc) * df
    x = np.clip((dist - flat) / taper, 0.0, 1.0)
    mask = 0.5 * (1.0 + np.cos(np.pi * x))
    # a little room beyond the mask; at least 256 points, so a short decay still gets
    # some 100 samples in the band (the extra points interpolate, they add no information)
    m = scipy.fft.next_fast_len(max(int(1.25 * (2 * half + 1)), 256))
    buf = np.zeros(m, dtype=complex)
    buf[(k - kc) % m] = spectrum[k] * mask
    z = scipy.fft.ifft(buf) * (m / nfft)
    return Band(z=z, k=k, mask=mask, kc=kc, m=m, nfft=nfft, n=n, rate=rate,
                noise=noise_var * float(np.sum(mask**2)) / nfft, taper=taper)


def band_poles(band: Band) -> np.ndarray:
    """Poles of the band's components by ESPRIT and a polish, past the filter's start-up.

    Returns absolute complex rates ``-r + i omega`` [1/s] (empty when the band holds only
    noise).
    """
    z, dt = band.z, band.dt
    duration = band.n / band.rate
    skip = EDGE_SKIP_TAPERS / band.taper  # the band filter's start-up transient [s]
    j0 = int(math.ceil(skip / dt))
    j_end = int((duration - skip) / dt)
    # stop where the band has sunk into its noise: the rest only adds noise to the poles
    smooth = np.convolve(np.abs(z[j0:j_end]) ** 2, np.ones(8) / 8, mode="same")
    loud = np.nonzero(smooth > 4.0 * band.noise)[0]
    if loud.size == 0:
        return np.zeros(0, dtype=complex)
    j1 = min(j_end, j0 + loud[-1] + 8)
    j1 = max(j1, min(j0 + 3 * HANKEL_COLS, j_end))
    if j1 - j0 < 24:
        return np.zeros(0, dtype=complex)
    seg = z[j0:j1]
    poles = esprit(seg, noise_var=band.noise)
    band.capped = poles.size >= MAX_ORDER
    if poles.size > 1 and _crowded(poles, dt):
        # the polish on the loudest stretch, only where components crowd (closer than
        # CROWDED_HZ): there ESPRIT's estimates lean on each other; elsewhere they are as
        # good as the polish would make them, at a tenth of the cost
        poles = polish(seg[:POLISH_SAMPLES], poles)
    return np.log(poles) / dt + 2j * np.pi * band.kc * band.rate / band.nfft


def _crowded(poles: np.ndarray, dt: float) -> bool:
    f = np.sort(np.angle(poles)) / (2 * np.pi * dt)
    return bool(np.any(np.diff(f) < CROWDED_HZ))


def filtered_basis(band: Band, s: np.ndarray) -> np.ndarray:
    """Damped exponentials ``exp(s t)`` over the decay, through the band's mask (m x len(s)).

    Each is the exponential over the decay's ``n`` samples (zero after, as the zero-padded
    FFT has it), so its DFT at bin ``k`` is the geometric sum ``(1 - q**n) / (1 - q)`` with
    ``q = exp(s / rate - 2 pi i k / nfft)``: the filter's start-up and the decay's end are in
    the basis, exactly.
    """
    q_log = s[None, :] / band.rate - 2j * np.pi * band.k[:, None] / band.nfft
    den = 1.0 - np.exp(q_log)
    small = np.abs(den) < 1e-12
    y = np.where(small, float(band.n),
                 (1.0 - np.exp(band.n * q_log)) / np.where(small, 1.0, den))
    buf = np.zeros((band.m, s.size), dtype=complex)
    buf[(band.k - band.kc) % band.m, :] = y * band.mask[:, None]
    return scipy.fft.ifft(buf, axis=0) * (band.m / band.nfft)


def band_amplitudes(band: Band, s: np.ndarray, *, z: np.ndarray | None = None) -> np.ndarray:
    """Complex amplitudes at the start of the decay of the band's components ``exp(s t)``.

    Linear least squares over the whole band signal (or ``z``, the band signal with other
    bands' components taken out), start-up included.
    """
    z = band.z if z is None else z
    return np.linalg.lstsq(filtered_basis(band, s), z, rcond=None)[0]


def components(band: Band, s: np.ndarray, c: np.ndarray) -> list[Component]:
    """The band's components worth keeping: energy at least :data:`MIN_SNR` times the noise."""
    out = []
    t_seg = np.arange(int(band.n / band.rate / band.dt)) * band.dt
    for sk, ck in zip(s, c):
        r = -sk.real
        energy = abs(ck) ** 2 * float(np.sum(np.exp(-2.0 * r * t_seg)))
        if energy < MIN_SNR * band.noise:
            continue
        out.append(Component(frequency=float(sk.imag / (2 * np.pi)), amplitude=2.0 * abs(ck),
                             decay_rate=float(r), phase=float(np.angle(ck))))
    return out


def esprit(z: np.ndarray, *, noise_var: float) -> np.ndarray:
    """Poles of the damped exponentials in ``z`` (ESPRIT, order from the singular values)."""
    cols = min(HANKEL_COLS, z.size // 3)
    rows = z.size - cols + 1
    # right singular vectors and values from the small Gram matrix: cheaper than an SVD
    # of the tall Hankel matrix, and accurate enough for the signal subspace
    ev, vec = np.linalg.eigh(hankel_gram(z, cols))
    sv = np.sqrt(np.clip(ev[::-1], 0.0, None))
    vh = vec[:, ::-1].conj().T
    # the largest singular value of a rows x cols block of white noise
    noise_sv = math.sqrt(max(noise_var, 1e-300)) * (math.sqrt(rows) + math.sqrt(cols))
    order = int(np.count_nonzero(sv > NOISE_FACTOR * noise_sv))
    order = min(order, MAX_ORDER, cols // 2)
    if order == 0:
        return np.zeros(0, dtype=complex)
    w = vh[:order].T  # cols x order, spans the vectors (1, lam, lam^2, ...) (conjugated)
    psi = np.linalg.lstsq(w[:-1], w[1:], rcond=None)[0]
    return np.linalg.eigvals(psi)


def hankel_gram(z: np.ndarray, cols: int) -> np.ndarray:
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


@contextmanager
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        yield


def polish(z: np.ndarray, poles: np.ndarray) -> np.ndarray:
    """Nonlinear least squares on poles and amplitudes together, from the ESPRIT estimate.

    Parameters per component: ln(pole) = -r dt + i w dt and the complex amplitude c; the
    model z_t = sum c exp(t ln(pole)) has the analytic Jacobian used here, so a
    Levenberg-Marquardt run costs a few evaluations of the basis. Returns the poles.
    """
    poles = poles[np.abs(poles) < 1.05]  # drop growing components: noise or transient
    if poles.size == 0:
        return poles
    k = poles.size
    t = np.arange(z.size, dtype=float)[:, None]
    basis = poles[None, :] ** t
    c0 = np.linalg.lstsq(basis, z, rcond=None)[0]
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
    # a trial step may overflow exp() (a pole far outside the unit circle): that step is
    # rejected by the solver, and the user must not see numpy's warning about it
    with np.errstate(all="ignore"), _quiet():
        try:
            sol = scipy.optimize.least_squares(residual, v0, jac=jacobian, method="lm",
                                               xtol=1e-10, ftol=1e-12, max_nfev=25)
            ok = np.all(np.isfinite(sol.x)) and sol.cost <= 0.5 * np.sum(residual(v0) ** 2)
            v = sol.x if ok else v0
        except (ValueError, np.linalg.LinAlgError):
            v = v0
    s, _ = unpack(v)
    return np.exp(s)
