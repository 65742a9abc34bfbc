r"""The blow and the modal amplitude it gives each mode: what a strike puts into the head.

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
The amplitude is independent of how the coefficients are scaled. What a listener hears of
:math:`Q_j` is :mod:`membrane.strike`.
"""

from __future__ import annotations

import numpy as np

from .audio import complex_omega
from .modes import Mode
from .physics.cavity import plane_wave_stiffness


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


def mode_omega(mode: Mode, fallback_t60: float | None = None) -> complex:
    """The mode's complex angular frequency 2 pi f + i (amplitude decay rate), rad/s.

    From its frequency and T60 (``fallback_t60`` where the physics models no decay).
    """
    return complex_omega(mode.frequency, mode.decay if mode.decay is not None else fallback_t60)


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
    w = mode_omega(mode)
    s, ds = body_stiffness(mode, drum, w) if (drum is not None and physics == "full") else (0j, 0j)
    return (_stiffness_form(mode) + s) / (w * w) - ds / (2 * w)


def modal_amplitude_per_shape(mode: Mode, *, contact_time: float, drum=None,
                              physics: str = "full") -> complex:
    r""":math:`Q_j / \phi_j(r_0)`: the modal coordinate per unit shape at the strike point.

    :math:`\hat F(\tilde\omega_j) / (\tilde\omega_j \mathcal M_j)` per N s of impulse
    (module docstring), in m / (N s) per unit coefficient scale.
    """
    w = mode_omega(mode)
    return complex(pulse_spectrum(w, contact_time=contact_time)) / (w * effective_mass(mode, drum, physics))
