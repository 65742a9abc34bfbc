r"""Air on an open, baffled face: the modal added-mass-and-damping matrix.

For radial shapes :math:`\phi_n(r)\cos m\theta` on a disk of radius a in an infinite rigid
baffle, the Rayleigh integral becomes, in the wavenumber domain (docs/physics.md, "Air on an open face"),

.. math::

    A_{nn'}(k) = \rho\,\pi_m \int_0^\infty
        \frac{\kappa\,\Phi_n(\kappa)\,\Phi_{n'}(\kappa)}{\sqrt{\kappa^2 - k^2}}\,d\kappa,
    \qquad \Phi_n(\kappa) = \int_0^a \phi_n(r) J_m(\kappa r)\, r\,dr,

in kg, with :math:`\pi_m = 2\pi` for m = 0 and :math:`\pi` otherwise, and the branch
:math:`1/\sqrt{\kappa^2-k^2} = -i/\sqrt{k^2-\kappa^2}` for :math:`\kappa < k` (time
dependence :math:`e^{i\omega t}`): Re A is the added mass, -Im A the radiation damping
(the radiation impedance is :math:`i\omega A`).

The integral is evaluated on a path on which every piece is smooth and analytic in k, so the
same code gives the analytic continuation to complex k that true resonances need:

1. :math:`\kappa = k\sin\varphi`, :math:`\varphi \in [0, \pi/2]`: removes the square root;
   contributes :math:`-i\int_0^{\pi/2} k\sin\varphi\,F(k\sin\varphi)\,d\varphi`.
2. :math:`\kappa = \sqrt{k^2 + u^2}`, u from 0 to :math:`\sqrt{K_0^2 - k^2}`: contributes
   :math:`\int F(\sqrt{k^2+u^2})\,du` (composite Gauss-Legendre panels).
3. :math:`\kappa > K_0`, beyond every removable pole of the transforms: each transform is
   written :math:`\Phi = A(\kappa) J_m(\kappa a) + B(\kappa) J_m'(\kappa a)` with rational A, B,
   and :math:`J = (H^{(1)} + H^{(2)})/2`. The :math:`H^{(1)}H^{(1)}` part is turned up the
   imaginary axis and the :math:`H^{(2)}H^{(2)}` part down (both then decay like
   :math:`e^{-2a|{\rm Im}\,\kappa|}`: Gauss-Laguerre); the mixed part does not oscillate and is
   integrated in :math:`s = K_0/\kappa` (Gauss-Legendre).

Here :math:`F = \Phi_n\Phi_{n'}`, an even entire function of :math:`\kappa`, so A(k) is an
entire function of k: :math:`A = X(k^2) - i k Y(k^2)` with X, Y entire. :class:`RadiationTable`
interpolates X and Y in :math:`t = k^2` by Chebyshev series from real-k quadrature and
evaluates them anywhere near the real axis, which is what the coupled solver uses.

A *radial space* here is any object with ``m``, ``radius``, ``size``, ``pole_bound`` (largest
real removable pole of its transforms, 1/m), ``transform(kappa)`` (N, len kappa) and
``parts(kappa)`` -> (A, B), each (N, len kappa). :class:`Piston` is one;
``membrane.physics.coupled.RitzSpace`` is the head's.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.polynomial import chebyshev
from scipy import special

from ..blas import one_blas_thread
from ..errors import SolverError


@dataclass(frozen=True)
class Quadrature:
    """Node counts of the wavenumber quadrature (defaults from tests/test_radiation.py).

    Attributes
    ----------
    arc : int
        Gauss-Legendre nodes on the arc kappa = k sin(phi).
    panel : int
        Gauss-Legendre nodes per panel on kappa = sqrt(k^2 + u^2).
    panel_width : float
        Panel length in u, in units of 1/a.
    laguerre : int
        Gauss-Laguerre nodes on each rotated tail.
    mixed : int
        Gauss-Legendre nodes on the non-oscillating tail.
    margin : float
        K0 = pole_bound + |k| + margin / a.
    """

    arc: int = 20
    panel: int = 10
    panel_width: float = 4.0
    laguerre: int = 16
    mixed: int = 16
    margin: float = 6.0

    def refined(self, factor: float = 1.5) -> "Quadrature":
        """The same quadrature with about ``factor`` times the nodes everywhere."""
        up = lambda n: int(np.ceil(n * factor))  # noqa: E731
        return Quadrature(up(self.arc), up(self.panel), self.panel_width, up(self.laguerre),
                          up(self.mixed), self.margin * factor)


@lru_cache(maxsize=64)
def _legendre(n: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes and weights on [0, 1]."""
    x, w = np.polynomial.legendre.leggauss(n)
    return 0.5 * (x + 1.0), 0.5 * w


@lru_cache(maxsize=64)
def _laguerre(n: int) -> tuple[np.ndarray, np.ndarray]:
    return np.polynomial.laguerre.laggauss(n)


def _dhankel(kind: int, m: int, z):
    """Exponentially scaled H_m^(kind)(z) and its derivative (same scaling)."""
    h = special.hankel1e if kind == 1 else special.hankel2e
    hm = h(m, z)
    return hm, h(m - 1, z) - (m / z) * hm  # H_m' = H_{m-1} - (m/z) H_m (|z| >= K0 a > 0)


def _tail_factor(space, kind: int, kappa):
    """A H_m(kappa a) + B H_m'(kappa a), exponentially scaled, shape (N, len kappa)."""
    A, B = space.parts(kappa)
    h, dh = _dhankel(kind, space.m, kappa * space.radius)
    return A * h + B * dh


def radiation_integral(space, k, *, quadrature: Quadrature = Quadrature()) -> np.ndarray:
    r"""The integral :math:`I_{nn'}(k) = \int_0^\infty \kappa\Phi_n\Phi_{n'}/\sqrt{\kappa^2-k^2}\,d\kappa`.

    Parameters
    ----------
    space : radial space
        See the module docstring.
    k : complex
        Acoustic wavenumber in 1/m; any value near the real axis, Re k >= 0.
    quadrature : Quadrature
        Node counts.

    Returns
    -------
    numpy.ndarray
        Complex (N, N) in m^3; A = rho pi_m I.
    """
    return radiation_integrals(space, np.array([complex(k)]), quadrature=quadrature)[0]


def radiation_integrals(space, k, *, quadrature: Quadrature = Quadrature()) -> np.ndarray:
    r""":func:`radiation_integral` at many wavenumbers at once, (len k, N, N) complex, m^3.

    The same quadrature at each k; the transforms of all the nodes of all the k are
    evaluated together (a table fit needs tens of k, and one evaluation per k was mostly
    the cost of calling numpy, not of the Bessel functions).
    """
    q = quadrature
    k = np.atleast_1d(np.asarray(k, dtype=complex))
    D = len(k)
    a = space.radius
    k0 = space.pole_bound + np.abs(k) + q.margin / a
    # On the real axis (every node of a table fit) the arc and the straight path are real:
    # the transforms then take real Bessel functions, about twice as fast as complex ones.
    kk = k.real if np.all(k.imag == 0.0) else k
    xs, ws = _legendre(q.arc)
    phi = 0.5 * np.pi * xs
    kap = kk[:, None] * np.sin(phi)[None, :]  # (D, arc)
    # straight path in u from 0 to U0, split into panels of about panel_width / a: as many
    # panels as the longest path needs, the extra ones of a shorter path with zero weight
    u0 = np.sqrt(k0 * k0 - kk * kk)
    panels = np.maximum(1, np.ceil(np.abs(u0) * a / q.panel_width).astype(int))
    top = int(panels.max())
    xp, wp = _legendre(q.panel)
    idx = np.arange(top)[:, None] + xp[None, :]  # panel number + node, (top, panel)
    s_nodes = (idx.ravel()[None, :] / panels[:, None]).astype(float)  # (D, top * panel)
    live = (np.repeat(np.arange(top), q.panel)[None, :] < panels[:, None])
    s_nodes = np.where(live, s_nodes, 0.0)
    wu = np.where(live, np.tile(wp, top)[None, :] / panels[:, None], 0.0) * u0[:, None]
    straight = np.sqrt((kk * kk)[:, None] + (u0[:, None] * s_nodes) ** 2)
    nodes = np.concatenate([kap, straight], axis=1)  # (D, arc + top * panel)
    both = space.transform(nodes.ravel()).reshape(-1, D, nodes.shape[1]).transpose(1, 0, 2)
    f, g = both[:, :, :q.arc], both[:, :, q.arc:]
    warc = (0.5 * np.pi * ws)[None, :] * kap
    total = -1j * ((f * warc[:, None, :]) @ np.swapaxes(f, 1, 2)) \
        + (g * wu[:, None, :]) @ np.swapaxes(g, 1, 2)
    # tails beyond K0: rotated H1 H1 (up), H2 H2 (down), mixed on the real axis
    xl, wl = _laguerre(q.laguerre)
    t = xl / (2 * a)
    kc = k[:, None]
    for kind, sign in ((1, 1.0), (2, -1.0)):
        kap = k0[:, None] + sign * 1j * t[None, :]  # (D, laguerre)
        g = _tail_factor(space, kind, kap.ravel()).reshape(-1, D, len(t)).transpose(1, 0, 2)
        wt = wl[None, :] * kap / np.sqrt(kap * kap - kc * kc) * (sign * 1j / (2 * a))
        total = total + (0.25 * np.exp(sign * 2j * k0 * a))[:, None, None] * \
            ((g * wt[:, None, :]) @ np.swapaxes(g, 1, 2))
    xm, wm = _legendre(q.mixed)
    kap = k0[:, None] / xm[None, :]  # (D, mixed)
    g1 = _tail_factor(space, 1, kap.ravel()).reshape(-1, D, len(xm)).transpose(1, 0, 2)
    g2 = _tail_factor(space, 2, kap.ravel()).reshape(-1, D, len(xm)).transpose(1, 0, 2)
    wt = wm[None, :] * k0[:, None] / xm[None, :] ** 2 * kap / np.sqrt(kap * kap - kc * kc)
    mix = (g1 * wt[:, None, :]) @ np.swapaxes(g2, 1, 2)
    return total + 0.25 * (mix + np.swapaxes(mix, 1, 2))


def radiation_matrix(space, *, k, density: float,
                     quadrature: Quadrature = Quadrature()) -> np.ndarray:
    """Modal added-mass-and-damping matrix of one baffled face, kg.

    Parameters
    ----------
    space : radial space
        The head's radial functions of one angular order (module docstring).
    k : complex
        Acoustic wavenumber omega / c in 1/m (complex at a damped resonance).
    density : float
        Air density in kg/m^3.
    quadrature : Quadrature
        Node counts.

    Returns
    -------
    numpy.ndarray
        Complex (N, N). The pressure on the face is -omega^2 A q in modal terms.
    """
    weight = 2 * np.pi if space.m == 0 else np.pi
    return density * weight * radiation_integral(space, k, quadrature=quadrature)


@dataclass(frozen=True)
class Piston:
    """A rigid piston of radius a (m = 0): Phi(kappa) = a J_1(kappa a) / kappa.

    The classical check of the quadrature (Kinsler & Frey; Beranek).
    """

    radius: float
    m: int = 0
    size: int = 1
    pole_bound: float = 0.0

    def transform(self, kappa) -> np.ndarray:
        kappa = np.atleast_1d(np.asarray(kappa))
        return (self.radius * special.jv(1, kappa * self.radius) / kappa)[None, :]

    def parts(self, kappa):
        kappa = np.atleast_1d(np.asarray(kappa))
        return np.zeros((1, len(kappa))), (-self.radius / kappa)[None, :]  # J_1 = -J_0'


class RadiationTable:
    r"""A(k) / rho for one radial space, as Chebyshev series in :math:`t = k^2`.

    Built from real-k quadrature on :math:`0 < k \le k_{max}`; evaluated at complex k by the
    analytic continuation of the series (A is entire in k, so the series converges fast in a
    neighbourhood of the real segment). Degree is raised until the last coefficients are
    below ``tol`` of the largest.

    Parameters
    ----------
    space : radial space
    k_max : float
        Largest wavenumber needed, 1/m.
    quadrature : Quadrature
    tol : float
        Relative size of the discarded Chebyshev coefficients.
    """

    @one_blas_thread
    def __init__(self, space, *, k_max: float, quadrature: Quadrature = Quadrature(),
                 tol: float = 1e-11):
        self.k_max = float(k_max)
        self.t_max = self.k_max**2
        self.weight = 2 * np.pi if space.m == 0 else np.pi
        degree = 8 + int(np.ceil(1.5 * self.k_max * space.radius))
        while True:
            x, y = self._fit(space, degree, quadrature)
            scale = max(np.abs(x).max(), 1e-300), max(np.abs(y).max(), 1e-300)
            # Y (the damping) of a high order is many decades below X near the real axis
            # and reaches the quadrature's noise floor first: its tail counts against
            # its own size or against what it adds to A = X - i k Y, whichever is larger
            ty = np.abs(y[-3:]).max()
            tail = max(np.abs(x[-3:]).max() / scale[0],
                       min(ty / scale[1], ty * self.k_max / scale[0]))
            if tail < tol:
                break
            if degree > 400:
                raise SolverError(f"radiation table did not converge (k_max a = "
                                  f"{self.k_max * space.radius:.3g}, tail {tail:.2e})")
            degree = int(degree * 1.5)
        self.degree = degree
        self._x, self._y = x, y

    @classmethod
    def from_coefficients(cls, space, *, k_max: float, x: np.ndarray, y: np.ndarray) -> "RadiationTable":
        """A table from Chebyshev coefficients computed before (e.g. read from the disk cache).

        Parameters
        ----------
        space : radial space
            The space the coefficients belong to (its order m sets the angular weight).
        k_max : float
            Largest wavenumber of the table, 1/m.
        x, y : numpy.ndarray
            Coefficients of X and Y in t = k^2, each (degree, N, N), as :attr:`coefficients`.
        """
        x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
        if x.shape != y.shape or x.ndim != 3 or x.shape[1] != x.shape[2] or len(x) == 0:
            raise ValueError(f"coefficients of shape {x.shape} and {y.shape}: expected two equal "
                             "(degree, N, N) arrays")
        table = cls.__new__(cls)
        table.k_max = float(k_max)
        table.t_max = table.k_max**2
        table.weight = 2 * np.pi if space.m == 0 else np.pi
        table.degree = len(x)
        table._x, table._y = x, y
        return table

    @property
    def coefficients(self) -> tuple[np.ndarray, np.ndarray]:
        """Chebyshev coefficients (x, y) of X and Y in t = k^2, each (degree, N, N), m^3."""
        return self._x, self._y

    def _fit(self, space, degree, quadrature):
        nodes = np.cos(np.pi * (np.arange(degree) + 0.5) / degree)  # Chebyshev points
        t = 0.5 * self.t_max * (nodes + 1.0)
        k = np.sqrt(t)
        vals = radiation_integrals(space, k, quadrature=quadrature)
        x = vals.real
        y = -vals.imag / k[:, None, None]
        cx = chebyshev.chebfit(nodes, x.reshape(degree, -1), degree - 1)
        cy = chebyshev.chebfit(nodes, y.reshape(degree, -1), degree - 1)
        n = vals.shape[1]
        return cx.reshape(degree, n, n), cy.reshape(degree, n, n)

    def __call__(self, k) -> np.ndarray:
        """A(k) / rho in m^3 for an array of k (1/m): shape (len k, N, N), complex."""
        k = np.atleast_1d(np.asarray(k, dtype=complex))
        t = k * k
        if np.any(np.abs(t) > 1.05 * self.t_max):
            raise SolverError(f"wavenumber {np.abs(k).max():.4g} 1/m is beyond the radiation "
                              f"table's range {self.k_max:.4g} 1/m")
        s = 2.0 * t / self.t_max - 1.0
        x = np.moveaxis(chebyshev.chebval(s, self._x, tensor=True), -1, 0)
        y = np.moveaxis(chebyshev.chebval(s, self._y, tensor=True), -1, 0)
        return self.weight * (x - 1j * k[:, None, None] * y)
