r"""Strike and sound: which partials a mallet blow excites, what a listener hears, a preview.

Model (time dependence :math:`e^{i\omega t}`, SI units throughout)
--------------------------------------------------------------------
*The blow.* A point force :math:`F(t)` at radius :math:`r_0`, angle :math:`\theta_0` on the
struck head: a half-sine pulse of contact time :math:`t_c` and impulse :math:`J`,
:math:`F(t) = (\pi J / 2 t_c) \sin(\pi t / t_c)` for :math:`0 < t < t_c`. Its spectrum
:math:`\hat F(\omega) = \int F e^{-i\omega t} dt` is, with :math:`x = \omega t_c`,

.. math:: \hat F / J = \pi^2 e^{-ix/2} \cos(x/2) / (\pi^2 - x^2),

flat (= 1) at low frequency, falling to zero at :math:`f t_c = 1.5` and in side lobes above:
a shorter contact (harder mallet) reaches higher partials.

*The modal amplitude.* Mode j of order m has the shape :math:`\psi_j = \phi_j(r)\cos
m(\theta-\theta_0)`, :math:`\phi_j = \sum_n c_{jn}\phi_n` over the in-vacuum basis. Of a
degenerate pair only the member :math:`\cos m(\theta-\theta_0)` is excited (the other has a
nodal diameter through the strike point). The coupled problem is
:math:`Z(\omega) c = [K + S(\omega) - \omega^2 (M + A(\omega))] c = 0` with
:math:`K_{nn} = \omega_n^2 M_n` (:attr:`RadialBasis.modal_mass` :math:`M_n`), S the body's
plane-wave air stiffness (:func:`body_stiffness`) and A every mass-like air load (radiation,
the body's evanescent terms). The response to a generalised force g near the complex root
:math:`\tilde\omega_j` is :math:`c\,(c^T g) / (c^T Z'(\tilde\omega_j) c\,(\omega -
\tilde\omega_j))` (unconjugated products: the loaded problem is complex symmetric), which
defines the effective modal mass :math:`\mathcal M_j = -c^T Z' c / (2\tilde\omega_j)`. The
root condition :math:`c^T (M + A) c = c^T (K + S) c / \tilde\omega_j^2` leaves

.. math:: \mathcal M_j = \frac{c^T K c + S(\tilde\omega_j)}{\tilde\omega_j^2}
          - \frac{S'(\tilde\omega_j)}{2\tilde\omega_j}

neglecting only :math:`dA/d\omega` (an approximation): only the basis, the frequency and the
body's plane-wave term are needed, and in vacuum it is the plain modal mass. Closing the
inverse Fourier integral around the pole gives, after the pulse, the modal coordinate

.. math:: q_j(t) = \mathrm{Im}[Q_j e^{i\tilde\omega_j t}],\qquad
          Q_j = \phi_j(r_0) \hat F(\tilde\omega_j) / (\tilde\omega_j \mathcal M_j),

which for an undamped oscillator is the familiar :math:`\phi(r_0)|\hat F|/(M\omega)`.
The amplitude is independent of how the coefficients are scaled.

*Radiation.* The struck head's outer face radiates into a half space as if set in a rigid
baffle (the Rayleigh integral; an approximation for a kettle, whose bowl baffles the head
only partly, and a shell's resonant head, whose sound goes the other way, is left out).
A listener at polar angle :math:`\vartheta` from the axis, azimuth :math:`\varphi`, distance
R in the far field hears, by the Jacobi-Anger expansion of :math:`e^{ikr\sin\vartheta
\cos(\theta-\varphi)}`,

.. math:: p_j(t) = \mathrm{Im}[B_j e^{i\tilde\omega_j (t - R/c)}],\quad
          B_j = -\rho\,\tilde\omega_j^2\, i^m \cos m(\varphi-\theta_0)\,
                \Phi_j(\tilde k \sin\vartheta)\, Q_j / R,

with :math:`\Phi_j(\kappa) = \sum_n c_{jn}\Phi_n(\kappa)` the Hankel transform of
:attr:`RadialBasis.transform`, :math:`\tilde k = \tilde\omega_j / c`. On the axis
:math:`\Phi_j(0) = 0` for m >= 1: only the (0, n) modes reach a listener there.

The table level of a partial is :math:`20\log_{10}|B_j|` relative to the loudest partial;
:math:`|B_j|` itself is the peak pressure in Pa at the start of the partial per N s of
mallet impulse. The absolute blow strength is unknown, so only differences are meaningful.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .audio import complex_omega, save_wav, synthesize  # noqa: F401  (their old home: still importable here)
from .callable_module import make_callable
from .errors import InputError
from .modes import Mode, ModeSet

from .physics.cavity import plane_wave_stiffness
from .notation import LN1000, mode_list  # noqa: E402  (60 dB of decay: rate * t = 3 ln 10)

# Presets (strike point, mallets, listener) are rules of thumb kept in presets.py.
from .presets import (DEFAULT_AT, DEFAULT_LISTENER_ANGLE, DEFAULT_LISTENER_DISTANCE,  # noqa: E402,F401
                      DEFAULT_MALLET, MALLETS, PEAK_DBFS, SEARCH_RANGE, SILENT_DB, contact_time)


@dataclass(frozen=True)
class Strike:
    """Where and with what the head is struck.

    Attributes
    ----------
    at : float
        Strike radius as a fraction of the head's radius, from the centre (0..1).
    contact_time : float
        Mallet contact time t_c in s (> 0).
    angle : float
        Strike angle theta0 on the head in rad.
    """

    at: float = DEFAULT_AT
    contact_time: float = MALLETS[DEFAULT_MALLET]
    angle: float = 0.0

    def __post_init__(self):
        if not (isinstance(self.at, (int, float)) and 0.0 <= self.at <= 1.0):
            raise InputError("strike radius", self.at,
                             "must be a fraction of the radius from 0 (centre) to 1 (rim)")
        if not (isinstance(self.contact_time, (int, float)) and
                0.0 < self.contact_time < math.inf):
            raise InputError("contact time", self.contact_time, "must be a positive time in s")
        if not math.isfinite(self.angle):
            raise InputError("strike angle", self.angle, "must be a finite angle")


@dataclass(frozen=True)
class Listener:
    """A far-field listening point.

    Attributes
    ----------
    angle : float
        Polar angle from the head's axis in rad (0 on the axis, up to pi/2 in the head's plane).
    distance : float
        Distance from the head's centre in m.
    azimuth : float or None
        Azimuth in rad on the same angle scale as the strike; None: the strike's azimuth
        (the listener in the plane through the axis and the strike point).
    """

    angle: float = DEFAULT_LISTENER_ANGLE
    distance: float = DEFAULT_LISTENER_DISTANCE
    azimuth: float | None = None

    def __post_init__(self):
        if not (0.0 <= self.angle <= math.pi / 2):
            raise InputError("listener angle", self.angle,
                             "must be from 0 (on the axis) to 90 degrees (in the head's plane)")
        if not (0.0 < self.distance < math.inf):
            raise InputError("listener distance", self.distance, "must be a positive distance in m")


@dataclass(frozen=True)
class Partial:
    """One mode as heard at the listener.

    Attributes
    ----------
    mode : Mode
        The mode.
    frequency : float
        Hz.
    decay : float or None
        T60 in s (None in vacuum).
    pressure : complex
        B_j: complex pressure amplitude in Pa per N s of impulse (module docstring).
    shape_at_strike : float
        The mode's radial shape at the strike radius, peak 1 on the head.
    level_db : float
        20 log10 |B_j| relative to the loudest partial (floored at SILENT_DB).
    """

    mode: Mode
    frequency: float
    decay: float | None
    pressure: complex
    shape_at_strike: float
    level_db: float

    def __repr__(self) -> str:
        return f"Partial({self.mode.label}, {self.frequency:.2f} Hz, {self.level_db:+.1f} dB)"


@dataclass(frozen=True)
class StrikeAdvice:
    """The strike radius that favours chosen modes.

    Attributes
    ----------
    at : float
        Best strike radius as a fraction of the head's radius.
    contrast_db : float
        The objective there: 10 log10 (sum over chosen |B|^2 / sum over the others |B|^2).
    partials : tuple of Partial
        The partials heard with a strike there.
    chosen : tuple of (int, int)
        The modes favoured.
    """

    at: float
    contrast_db: float
    partials: tuple
    chosen: tuple

    def __repr__(self) -> str:
        return (f"StrikeAdvice(at r/a = {self.at:.3f} for {mode_list(self.chosen)}, "
                f"contrast {self.contrast_db:+.1f} dB, {len(self.partials)} partials)")


def pulse_spectrum(omega, *, contact_time: float):
    r"""Spectrum of a half-sine force pulse per unit impulse, :math:`\hat F(\omega)/J`.

    Parameters
    ----------
    omega : array_like
        Angular frequency in rad/s (complex allowed: the spectrum is entire).
    contact_time : float
        t_c in s.

    Returns
    -------
    numpy.ndarray or complex
        Dimensionless; 1 at omega = 0.
    """
    x = np.asarray(omega) * contact_time
    # cos(x/2)/(pi^2 - x^2) = sinc(u)/(2 (pi + x)) with u = (pi - x)/2: no 0/0 at x = pi
    u = (np.pi - x) / 2
    return np.pi ** 2 * np.exp(-0.5j * x) * np.sinc(u / np.pi) / (2 * (np.pi + x))


def _complex_omega(mode: Mode, fallback_t60: float | None = None) -> complex:
    """2 pi f + i * (amplitude decay rate), from the mode's frequency and T60."""
    return complex_omega(mode.frequency, mode.decay if mode.decay is not None else fallback_t60)


def _coefficients(mode: Mode) -> np.ndarray:
    return np.asarray(mode.coefficients, dtype=complex)


def _stiffness_form(mode: Mode) -> complex:
    """c^T K c over the struck (and, for a shell, the resonant) head's basis."""
    total = 0j
    for coef, basis in ((mode.coefficients, mode.basis),
                        (mode.resonant_coefficients, mode.resonant_basis)):
        if coef is not None and basis is not None:
            c = np.asarray(coef, dtype=complex)
            total += np.sum(c * c * basis.omega ** 2 * basis.modal_mass)
    return total


def _volume_displacement(coef, basis) -> complex:
    """W = integral of w over the head = 2 pi sum_n c_n Phi_n(0), m^2 per unit coefficient."""
    return 2 * np.pi * complex(np.asarray(coef, dtype=complex) @ basis.transform(np.array([0.0]))[:, 0])


def body_stiffness(mode: Mode, drum, omega: complex) -> tuple[complex, complex]:
    r"""The body's uniform-pressure term :math:`c^T S c` and its omega-derivative.

    The duct's plane-wave (q = 0) term (docs/physics.md "The body") as a generalised stiffness,
    from :func:`membrane.physics.cavity.plane_wave_stiffness` with the struck head's volume
    displacement :math:`W_1 = \int w\, dA = 2\pi \sum_n c_n \Phi_n(0)` and, for a shell, the
    resonant head's :math:`W_2` (both outward); the duct's length is ``drum.air_depth``
    (V / (pi a^2) for a kettle). Zero for m >= 1 (no plane wave) and a head without a body.
    The duct's higher terms are mass-like and left inside A.

    Returns
    -------
    (complex, complex)
        S in N/m and dS/domega in N s/m (per unit coefficient scale squared).
    """
    body = drum.body
    if mode.m != 0 or body.kind not in ("kettle", "shell"):
        return 0j, 0j
    displacements = [_volume_displacement(mode.coefficients, mode.basis)]
    if body.kind == "shell":
        if mode.resonant_coefficients is None:  # an uncoupled head: no plane wave through it
            return 0j, 0j
        displacements.append(_volume_displacement(mode.resonant_coefficients, mode.resonant_basis))
    return plane_wave_stiffness(omega, volume_displacements=displacements, radius=mode.basis.radius,
                                depth=drum.air_depth, density=drum.air.density,
                                sound_speed=drum.air.sound_speed)


def effective_mass(mode: Mode, drum=None, physics: str = "full") -> complex:
    r"""The effective modal mass :math:`-c^T Z'(\tilde\omega) c / (2\tilde\omega)` in kg.

    With :math:`Z = K + S(\omega) - \omega^2 (M + A(\omega))`, S the body's
    uniform-pressure term (:func:`body_stiffness`, full physics only) and A every
    mass-like air load, the root condition :math:`c^T (K + S) c = \tilde\omega^2 c^T (M + A) c`
    gives :math:`\mathcal M = (c^T K c + S)/\tilde\omega^2 - S'/(2\tilde\omega)`, neglecting
    only :math:`dA/d\omega` (an approximation). In vacuum it is the plain modal mass.
    """
    w = _complex_omega(mode)
    s, ds = body_stiffness(mode, drum, w) if (drum is not None and physics == "full") else (0j, 0j)
    return (_stiffness_form(mode) + s) / (w * w) - ds / (2 * w)


def _gain(mode: Mode, strike: Strike, listener: Listener, drum, physics: str) -> complex:
    """B_j divided by phi_j(r0): everything but the strike radius (module docstring)."""
    if mode.head == "resonant" and mode.resonant_coefficients is None:
        return 0j  # a resonant head's own mode in vacuum: not coupled to the struck head
    w = _complex_omega(mode)
    if w.real <= 0:
        return 0j
    c = _coefficients(mode)
    air = drum.air
    k = w / air.sound_speed
    phi_far = complex(c @ mode.basis.transform(np.array([k * math.sin(listener.angle)]))[:, 0])
    azimuth = strike.angle if listener.azimuth is None else listener.azimuth
    q_per_shape = complex(pulse_spectrum(w, contact_time=strike.contact_time)) / \
        (w * effective_mass(mode, drum, physics))
    return (-air.density * w * w * (1j ** mode.m) * math.cos(mode.m * (azimuth - strike.angle))
            * phi_far * q_per_shape / listener.distance)


def _shape(mode: Mode, at) -> np.ndarray:
    """phi_j at strike radii ``at`` (fractions of the radius), complex, unnormalised."""
    r = np.atleast_1d(np.asarray(at, dtype=float)) * mode.basis.radius
    return _coefficients(mode) @ mode.basis.shape(r)


def _levels(pressures) -> np.ndarray:
    mag = np.abs(np.asarray(pressures))
    top = mag.max() if mag.size else 0.0
    if top == 0:
        return np.full(mag.shape, SILENT_DB)
    with np.errstate(divide="ignore"):
        return np.maximum(20 * np.log10(mag / top), SILENT_DB)


def strike_partials(modeset: ModeSet, *, strike: Strike = Strike(),
                    listener: Listener = Listener()) -> tuple[Partial, ...]:
    """Every solved mode as heard at the listener after a strike.

    Parameters
    ----------
    modeset : ModeSet
        Solved modes (any physics; decay times come from ``full``).
    strike : Strike
        Strike radius, angle and mallet contact time.
    listener : Listener
        Listening point.

    Returns
    -------
    tuple of Partial
        In the ModeSet's order (by frequency).
    """
    pressures = [_gain(mode, strike, listener, modeset.drum, modeset.physics) * complex(_shape(mode, strike.at)[0])
                 for mode in modeset]
    levels = _levels(pressures)
    out = []
    for mode, p, lev in zip(modeset, pressures, levels):
        shape = 0.0 if (mode.head == "resonant" and mode.resonant_coefficients is None) else \
            float(mode.radial_shape(np.array([strike.at * mode.basis.radius]))[0])
        out.append(Partial(mode=mode, frequency=mode.frequency, decay=mode.decay, pressure=p,
                           shape_at_strike=shape, level_db=float(lev)))
    return tuple(out)


def pressure_across_radius(modeset: ModeSet, *, at, contact_time: float = MALLETS[DEFAULT_MALLET],
                           listener: Listener = Listener(), angle: float = 0.0) -> np.ndarray:
    """B_j of every mode for strikes at each of several radii (vectorised in the radius).

    Parameters
    ----------
    modeset : ModeSet
        Solved modes.
    at : array_like
        Strike radii, fractions of the head's radius (0..1).
    contact_time, listener, angle
        As for :class:`Strike` and :class:`Listener`.

    Returns
    -------
    numpy.ndarray
        Complex, shape (len(modeset), len(at)), Pa per N s of impulse.
    """
    at = np.atleast_1d(np.asarray(at, dtype=float))
    probe = Strike(at=DEFAULT_AT, contact_time=contact_time, angle=angle)
    rows = []
    for mode in modeset:
        g = _gain(mode, probe, listener, modeset.drum, modeset.physics)
        rows.append(g * _shape(mode, at) if g != 0 else np.zeros(at.size, dtype=complex))
    return np.array(rows)


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
    def contrast(at) -> np.ndarray:
        power = np.abs(pressure_across_radius(modeset, at=at, contact_time=contact_time,
                                              listener=listener, angle=angle)) ** 2
        with np.errstate(divide="ignore"):
            return 10 * np.log10(power[mask].sum(axis=0)) - 10 * np.log10(power[~mask].sum(axis=0))

    lo, hi = search
    grid = np.linspace(lo, hi, 181)
    values = contrast(grid)
    i = int(np.argmax(values))
    a, b = grid[max(i - 1, 0)], grid[min(i + 1, len(grid) - 1)]
    import scipy.optimize  # only here: its import costs every strike about 0.1 s

    res = scipy.optimize.minimize_scalar(lambda x: -float(contrast(x)[0]), bounds=(a, b),
                                         method="bounded", options={"xatol": 1e-5})
    at, best = (float(res.x), -float(res.fun)) if -res.fun >= values[i] else \
        (float(grid[i]), float(values[i]))
    partials = strike_partials(modeset, strike=Strike(at=at, contact_time=contact_time, angle=angle),
                               listener=listener)
    return StrikeAdvice(at=at, contrast_db=best, partials=partials, chosen=chosen)


make_callable(__name__, "strike_partials")  # membrane.strike(modeset, ...) is strike_partials(...)
