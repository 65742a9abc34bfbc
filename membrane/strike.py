r"""Strike and sound: what a listener hears of a mallet blow, mode by mode.

A :class:`Strike` (where, with what mallet) and a :class:`Listener` (where) give each solved
mode a :class:`SoundingMode`: its complex pressure at the listener and its level. What the blow
puts into each mode is :mod:`membrane.excitation`; the strike point that favours chosen modes is
:mod:`membrane.strike_point`; the partials as a sound and a WAV file are :mod:`membrane.audio`.

Model (time dependence :math:`e^{i\omega t}`, SI units throughout)
--------------------------------------------------------------------
The blow gives mode j the modal coordinate :math:`q_j(t) = \mathrm{Im}[Q_j e^{i\tilde\omega_j t}]`,
:math:`Q_j = \phi_j(r_0) \hat F(\tilde\omega_j) / (\tilde\omega_j \mathcal M_j)`
(:mod:`membrane.excitation`).

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

from .audio import complex_omega, save_wav, synthesise  # noqa: F401  (their old home: still importable here)
from .callable_module import make_callable
from .errors import InputError
from .excitation import (body_stiffness, effective_mass, modal_amplitude_per_shape,  # noqa: F401
                         mode_omega, pulse_spectrum)
from .modes import Mode, ModeSet
from .notation import LN1000  # noqa: F401  (60 dB of decay: rate * t = 3 ln 10)
# Presets (strike point, mallets, listener) are rules of thumb kept in presets.py.
from .presets import (DEFAULT_AT, DEFAULT_LISTENER_ANGLE, DEFAULT_LISTENER_DISTANCE,  # noqa: F401
                      DEFAULT_MALLET, MALLETS, PEAK_DBFS, SEARCH_RANGE, SILENT_DB, contact_time)
from .renamed import old_names, warn_renamed


@dataclass(frozen=True, init=False)
class Strike:
    """Where and with what the head is struck.

    Attributes
    ----------
    radius_fraction : float
        Strike radius r0/a as a fraction of the head's radius, from the centre (0..1); the
        command line's ``--at``.
    contact_time : float
        Mallet contact time t_c in s (> 0).
    angle : float
        Strike angle theta0 on the head in rad.
    """

    radius_fraction: float = DEFAULT_AT
    contact_time: float = MALLETS[DEFAULT_MALLET]
    angle: float = 0.0

    def __init__(self, radius_fraction: float = DEFAULT_AT, contact_time: float = MALLETS[DEFAULT_MALLET],
                 angle: float = 0.0, *, at: float | None = None):
        if at is not None:  # the older keyword
            warn_renamed("Strike(at=...)", "Strike(radius_fraction=...)")
            radius_fraction = at
        object.__setattr__(self, "radius_fraction", radius_fraction)
        object.__setattr__(self, "contact_time", contact_time)
        object.__setattr__(self, "angle", angle)
        if not (isinstance(radius_fraction, (int, float)) and 0.0 <= radius_fraction <= 1.0):
            raise InputError("strike radius", radius_fraction,
                             "must be a fraction of the radius from 0 (centre) to 1 (rim)")
        if not (isinstance(contact_time, (int, float)) and 0.0 < contact_time < math.inf):
            raise InputError("contact time", contact_time, "must be a positive time in s")
        if not math.isfinite(angle):
            raise InputError("strike angle", angle, "must be a finite angle")

    @property
    def at(self) -> float:
        """The older name of :attr:`radius_fraction`."""
        warn_renamed("Strike.at", "Strike.radius_fraction")
        return self.radius_fraction


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
class SoundingMode:
    """One mode as heard at the listener after a strike: a partial of the sound.

    (A measured sinusoid of a recording is :class:`membrane.analysis.Partial`.)

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
        20 log10 |B_j| relative to the loudest mode heard (floored at SILENT_DB).
    """

    mode: Mode
    frequency: float
    decay: float | None
    pressure: complex
    shape_at_strike: float
    level_db: float

    def __repr__(self) -> str:
        return f"SoundingMode({self.mode.label}, {self.frequency:.2f} Hz, {self.level_db:+.1f} dB)"


def _gain(mode: Mode, strike: Strike, listener: Listener, drum, physics: str) -> complex:
    """B_j divided by phi_j(r0): everything but the strike radius (module docstring)."""
    if mode.head == "resonant" and mode.resonant_coefficients is None:
        return 0j  # a resonant head's own mode in vacuum: not coupled to the struck head
    w = mode_omega(mode)
    if w.real <= 0:
        return 0j
    c = np.asarray(mode.coefficients, dtype=complex)
    air = drum.air
    k = w / air.sound_speed
    phi_far = complex(c @ mode.basis.transform(np.array([k * math.sin(listener.angle)]))[:, 0])
    azimuth = strike.angle if listener.azimuth is None else listener.azimuth
    q_per_shape = modal_amplitude_per_shape(mode, contact_time=strike.contact_time, drum=drum,
                                            physics=physics)
    return (-air.density * w * w * (1j ** mode.m) * math.cos(mode.m * (azimuth - strike.angle))
            * phi_far * q_per_shape / listener.distance)


def _shape(mode: Mode, radius_fraction) -> np.ndarray:
    """phi_j at strike radii (fractions of the radius), complex, unnormalised."""
    r = np.atleast_1d(np.asarray(radius_fraction, dtype=float)) * mode.basis.radius
    return np.asarray(mode.coefficients, dtype=complex) @ mode.basis.shape(r)


def _levels(pressures) -> np.ndarray:
    mag = np.abs(np.asarray(pressures))
    top = mag.max() if mag.size else 0.0
    if top == 0:
        return np.full(mag.shape, SILENT_DB)
    with np.errstate(divide="ignore"):
        return np.maximum(20 * np.log10(mag / top), SILENT_DB)


def strike_partials(modeset: ModeSet, *, strike: Strike = Strike(),
                    listener: Listener = Listener()) -> tuple[SoundingMode, ...]:
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
    tuple of SoundingMode
        In the ModeSet's order (by frequency).
    """
    pressures = [_gain(mode, strike, listener, modeset.drum, modeset.physics)
                 * complex(_shape(mode, strike.radius_fraction)[0]) for mode in modeset]
    levels = _levels(pressures)
    out = []
    for mode, p, lev in zip(modeset, pressures, levels):
        shape = 0.0 if (mode.head == "resonant" and mode.resonant_coefficients is None) else \
            float(mode.radial_shape(np.array([strike.radius_fraction * mode.basis.radius]))[0])
        out.append(SoundingMode(mode=mode, frequency=mode.frequency, decay=mode.decay, pressure=p,
                                shape_at_strike=shape, level_db=float(lev)))
    return tuple(out)


def pressure_across_radius(modeset: ModeSet, *, radius_fraction=None,
                           contact_time: float = MALLETS[DEFAULT_MALLET],
                           listener: Listener = Listener(), angle: float = 0.0, at=None) -> np.ndarray:
    """B_j of every mode for strikes at each of several radii (vectorised in the radius).

    Parameters
    ----------
    modeset : ModeSet
        Solved modes.
    radius_fraction : array_like
        Strike radii, fractions of the head's radius (0..1). (``at`` is its older name.)
    contact_time, listener, angle
        As for :class:`Strike` and :class:`Listener`.

    Returns
    -------
    numpy.ndarray
        Complex, shape (len(modeset), len(radius_fraction)), Pa per N s of impulse.
    """
    if at is not None:
        warn_renamed("pressure_across_radius(at=...)", "pressure_across_radius(radius_fraction=...)")
        radius_fraction = at
    if radius_fraction is None:
        raise TypeError("pressure_across_radius() needs radius_fraction, the strike radii r0/a")
    radii = np.atleast_1d(np.asarray(radius_fraction, dtype=float))
    return shapes_times_gains(modeset, radii, gains(modeset, contact_time=contact_time,
                                                    listener=listener, angle=angle))


def gains(modeset: ModeSet, *, contact_time: float, listener: Listener, angle: float) -> np.ndarray:
    """B_j / phi_j(r0) of every mode: everything of the pressure but the strike radius.

    Complex, shape (len(modeset),); a search over strike radii computes it once
    (:func:`shapes_times_gains` then needs only the shapes).
    """
    probe = Strike(radius_fraction=DEFAULT_AT, contact_time=contact_time, angle=angle)
    return np.array([_gain(mode, probe, listener, modeset.drum, modeset.physics) for mode in modeset],
                    dtype=complex)


def shapes_times_gains(modeset: ModeSet, radius_fraction: np.ndarray, g: np.ndarray) -> np.ndarray:
    """B_j(r0) = g_j phi_j(r0) for strike radii r0/a, shape (len(modeset), len(radius_fraction))."""
    rows = [g_j * _shape(mode, radius_fraction) if g_j != 0 else np.zeros(radius_fraction.size, dtype=complex)
            for mode, g_j in zip(modeset, g)]
    return np.array(rows).reshape(len(rows), radius_fraction.size)


# Older names (with a DeprecationWarning), and the strike-point search, whose module imports
# this one (so it is looked up on first use).
_RENAMED = {"Partial": "SoundingMode", "synthesize": "synthesise"}
_renamed_getattr = old_names(__name__, _RENAMED)


def __getattr__(name: str):
    if name in ("best_strike_radius", "StrikeAdvice"):
        from . import strike_point
        return getattr(strike_point, name)
    return _renamed_getattr(name)


make_callable(__name__, "strike_partials")  # membrane.strike(modeset, ...) is strike_partials(...)
