r"""Air inside the body: the kettle (one head) and the shell (two heads), docs/physics.md "The body".

The body is a rigid-walled cylinder of the head's radius a and depth L (a kettle of volume V
becomes L = V / (pi a^2): the bowl's shape enters only through its volume; say so in output).
Per angular order m the interior field is a sum of duct modes
:math:`\psi_q(r) = J_m(\gamma_q r)`, :math:`\gamma_q = j'_{mq}/a` (and :math:`\gamma = 0`,
:math:`\psi = 1` for m = 0), each with axial wavenumber :math:`\beta_q = \sqrt{k^2-\gamma_q^2}`.

With each head's displacement w positive *outward*, Euler's equation at the heads gives the
pressure on head i from inside,

.. math::

    p_i = -\omega^2\rho \sum_q \frac{\psi_q}{\|\psi_q\|^2}
          \Big[\frac{\cot\beta_q L}{\beta_q}\langle w_i,\psi_q\rangle
               + \frac{\csc\beta_q L}{\beta_q}\langle w_j,\psi_q\rangle\Big],

(a kettle is the same with no second head). For m = 0, q = 0 at low frequency this is
:math:`-\rho c^2\,\Delta V/V`: the enclosed air stiffens the (0,n) modes. The generalized force
on the heads is :math:`-S q`, so the coupled operator is :math:`K + S - \omega^2(M + A)` with

.. math::

    S = \rho\omega^2\pi_m \sum_q \frac{f_q}{\|\psi_q\|^2}\, v_q v_q^T,\quad
    v_{q,n} = \langle\phi_n,\psi_q\rangle = \Phi_n(\gamma_q),

:math:`f_q` the cot or csc term. Evanescent terms (:math:`\gamma_q > k`) have
:math:`\cot(\beta L)/\beta = -\coth(\mu L)/\mu`, :math:`\mu = \sqrt{\gamma^2-k^2}`: added mass.
Both terms are even in :math:`\beta`, so its branch does not matter; they are evaluated from
:math:`e^{-2\mu L}` (principal :math:`\mu`, Re >= 0), which never overflows.
"""

from __future__ import annotations

import numpy as np
from scipy import special

from ..bessel import jnp_zeros


def duct_wavenumbers(*, m: int, count: int, radius: float) -> np.ndarray:
    """Transverse wavenumbers gamma_q of a rigid circular duct, 1/m, ascending.

    For m = 0 the uniform mode (gamma = 0) comes first; ``count`` includes it.
    """
    if m == 0:
        return np.concatenate(([0.0], jnp_zeros(0, count - 1))) / radius if count > 1 \
            else np.zeros(1)
    return jnp_zeros(m, count) / radius


def duct_norms(*, m: int, gamma: np.ndarray, radius: float) -> np.ndarray:
    r""":math:`\int_0^a J_m(\gamma r)^2 r\,dr = \tfrac{a^2}{2}(1 - m^2/(\gamma a)^2) J_m(\gamma a)^2` (J_m'(γa) = 0), m^2."""
    x = gamma * radius
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 0.5 * radius**2 * (1.0 - (m / x) ** 2) * special.jv(m, x) ** 2
    return np.where(x == 0, 0.5 * radius**2, out)


def duct_terms(k, gamma, depth: float):
    r"""cot(βL)/β and csc(βL)/β for β² = k² − γ², overflow-safe, in m.

    Parameters
    ----------
    k : array_like
        Acoustic wavenumbers (complex allowed), shape (R,).
    gamma : array_like
        Duct wavenumbers, shape (Q,) or one row per k, (R, Q).
    depth : float or array_like
        Duct length L in m (a float, or one per k, shape (R,)).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Each (R, Q), complex.
    """
    k = np.asarray(k, dtype=complex).reshape(-1, 1)
    gamma = np.asarray(gamma, dtype=float)
    if gamma.ndim == 1:
        gamma = gamma[None, :]
    mu = np.sqrt(gamma * gamma - k * k)  # principal: Re mu >= 0
    x = mu * (depth if np.ndim(depth) == 0 else np.reshape(depth, (-1, 1)))
    e1 = np.exp(-x)
    # -coth / mu and -csch / mu, with 1 - e^{-2 mu L} from expm1 (accurate for small mu L);
    # one shared factor (the solver evaluates this hundreds of times per order)
    scale = 1.0 / (mu * np.expm1(-2.0 * x))
    return (1.0 + e1 * e1) * scale, (2.0 * e1) * scale


def plane_wave_stiffness(omega: complex, *, volume_displacements, radius: float, depth: float,
                         density: float, sound_speed: float) -> tuple[complex, complex]:
    r"""The duct's plane-wave (m = 0, q = 0) term of S as one number, and its omega-derivative.

    For heads of outward volume displacements :math:`W_i = \int w_i\,dA` (one for a kettle, two
    for a shell) the q = 0 term of :meth:`Duct.matrix` (:math:`\psi = 1`,
    :math:`\|\psi\|^2 = a^2/2`, :math:`\langle w,\psi\rangle = W/2\pi`) is

    .. math:: S = \frac{\rho\,\omega^2}{\pi a^2}\Big[f_{\cot}\sum_i W_i^2
              + 2 f_{\csc} W_1 W_2\Big],

    with :math:`f_{\cot}, f_{\csc}` = :func:`duct_terms` at :math:`\gamma = 0` (cot kL / k,
    csc kL / k); at low frequency :math:`\rho c^2 W_1^2 / V` for a kettle, the lumped air spring.

    Parameters
    ----------
    omega : complex
        Angular frequency in rad/s.
    volume_displacements : sequence of complex
        W_1 (the struck head) and, for a shell, W_2, in m^2 per unit modal coordinate.
    radius, depth : float
        Duct radius a and length L in m.
    density, sound_speed : float
        Air in the body, kg/m^3 and m/s.

    Returns
    -------
    (complex, complex)
        S in N/m and dS/domega in N s/m.
    """
    w = tuple(complex(v) for v in volume_displacements) + (0j,)
    self_, cross = w[0] * w[0] + w[1] * w[1], 2 * w[0] * w[1]
    k = complex(omega) / sound_speed
    fcot, fcsc = (complex(f[0, 0]) for f in duct_terms(k, [0.0], depth))
    # d/dk [cot kL / k] = -f_cot/k - L k f_csc^2;  d/dk [csc kL / k] = -f_csc/k - L k f_csc f_cot
    dcot, dcsc = -fcot / k - depth * k * fcsc * fcsc, -fcsc / k - depth * k * fcsc * fcot
    scale = density / (np.pi * radius * radius)
    value = scale * omega * omega * (fcot * self_ + fcsc * cross)
    slope = scale * (2 * omega * (fcot * self_ + fcsc * cross)
                     + omega * omega / sound_speed * (dcot * self_ + dcsc * cross))
    return value, slope


class Duct:
    """The interior of a kettle or shell for one angular order, ready to evaluate.

    Parameters
    ----------
    spaces : sequence of radial spaces
        One (kettle) or two (shell: the struck head at z = 0, the other at z = -L) spaces of
        the same m and radius (see ``membrane.physics.radiation``).
    depth : float
        L in m.
    count : int
        Number of duct modes kept (the convergence tests choose it).
    """

    def __init__(self, spaces, *, depth: float, count: int):
        self.spaces = tuple(spaces)
        m, a = self.spaces[0].m, self.spaces[0].radius
        self.m, self.depth = m, float(depth)
        self.gamma = duct_wavenumbers(m=m, count=count, radius=a)
        self.norms = duct_norms(m=m, gamma=self.gamma, radius=a)
        self.weight = 2 * np.pi if m == 0 else np.pi
        # overlaps <phi_n, psi_q> are Hankel transforms at gamma_q (real)
        self.overlaps = [np.real(s.transform(self.gamma)) for s in self.spaces]
        self.sizes = [s.size for s in self.spaces]

    def matrix(self, omega, *, density: float, sound_speed: float) -> np.ndarray:
        """S(omega) in N/m, shape (len omega, N_total, N_total), complex.

        Parameters
        ----------
        omega : array_like
            Complex angular frequencies in rad/s.
        density, sound_speed : float
            Air in the body, kg/m^3 and m/s. (Density 0 switches the body's air off.)
        """
        omega = np.atleast_1d(np.asarray(omega, dtype=complex))
        fcot, fcsc = duct_terms(omega / sound_speed, self.gamma, self.depth)
        scale = (density * self.weight) * omega[:, None] ** 2 / self.norms[None, :]
        v = self.overlaps
        blocks = [[None] * len(v) for _ in v]
        for i in range(len(v)):
            for j in range(len(v)):
                f = fcot if i == j else fcsc
                blocks[i][j] = np.einsum("nq,rq,pq->rnp", v[i], scale * f, v[j])
        return np.concatenate([np.concatenate(row, axis=2) for row in blocks], axis=1)


def kettle_matrix(space, *, omega: complex, density: float, sound_speed: float,
                  depth: float, count: int = 40) -> np.ndarray:
    """S for a kettle (one head over a closed cylinder of depth L), N/m, (N, N) complex.

    The pressure under the head is -S q in modal terms (positive S stiffens).
    """
    duct = Duct([space], depth=depth, count=count)
    return duct.matrix([omega], density=density, sound_speed=sound_speed)[0]


def shell_matrices(struck, resonant, *, omega: complex, density: float, sound_speed: float,
                   depth: float, count: int = 40) -> np.ndarray:
    """S for a shell with a head at each end, N/m: the 2x2 block matrix (self: cot, cross: csc)."""
    duct = Duct([struck, resonant], depth=depth, count=count)
    return duct.matrix([omega], density=density, sound_speed=sound_speed)[0]
