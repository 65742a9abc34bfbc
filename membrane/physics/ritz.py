r"""The Ritz space of one angular order: a head's in-vacuum modes plus one rim function.

For each angular order m the head's displacement is expanded over its in-vacuum modes (ideal
or exact stiff, vacuum.py) plus one *rim function*, the head's static response to a pressure
:math:`\propto r^m\cos m\theta`. The air pressure does not vanish at the rim, so without the
rim function the modal coefficients decay only algebraically and the coupled frequencies
converge like :math:`N^{-3}`; with it they converge several orders faster
(tests/test_coupled.py). Here: the space's mass and stiffness matrices and the Hankel
transforms of its functions (what the radiation and duct terms are built from).
"""

from __future__ import annotations

import numpy as np
from scipy import special

from ..notation import POISSON_RATIO
from .vacuum import RadialBasis, ratio_i

# k_s a = sqrt(T a^2 / D) from which the rim function's integrals take their closed forms
# (RitzSpace._rim_integrals); below it they cancel (a head nearly a plate) and are integrated.
CLOSED_FORM_KSA = 20.0


def _jx(m: int, p: int, x):
    """J_{m+p}(x) / x^p, with its series near x = 0."""
    x = np.asarray(x)
    small = np.abs(x) < 1e-4
    safe = np.where(small, 1.0, x)
    direct = special.jv(m + p, safe) / safe**p
    h = 0.5 * x
    series = h ** m / (2.0**p * special.factorial(m + p)) * (1.0 - h * h / (m + p + 1))
    return np.where(small, series, direct)


class RitzSpace:
    """In-vacuum modes of one order m plus the rim function: a radial space.

    Parameters
    ----------
    basis : RadialBasis
        In-vacuum modes (ideal or stiff), N of them.
    edge : {"clamped", "hinged"}
        Edge of a stiff head (ignored for an ideal one).
    poisson_ratio : float
        nu, for the hinged edge.
    rim : bool
        Add the rim function (default True).
    """

    def __init__(self, basis: RadialBasis, *, edge: str = "clamped", poisson_ratio: float = POISSON_RATIO,
                 rim: bool = True):
        self.basis = basis
        self.m, self.radius = basis.m, basis.radius
        self.rim = rim
        self.modes = basis.size
        self.size = basis.size + (1 if rim else 0)
        self.pole_bound = float(np.max(basis.k1))
        a, m, sigma = basis.radius, basis.m, basis.areal_density
        k1, omega = basis.k1, basis.omega
        if basis.k2 is None:
            self.tension = sigma * float((omega[0] / k1[0]) ** 2)
            self.ks, self.a1, self.b1 = None, 1.0, 0.0
        else:
            s2 = float(basis.k2[0] ** 2 - k1[0] ** 2)  # T / D
            d = sigma * float(omega[0] ** 2) / float(k1[0] ** 4 + s2 * k1[0] ** 2)
            self.tension = d * s2
            self.ks = np.sqrt(s2)
            y = self.ks * a
            yr = y * ratio_i(m, y)
            if edge == "clamped":  # chi(a) = chi'(a) = 0
                self.b1 = 2.0 / (yr - m)
            else:  # chi(a) = 0, chi''(a) + nu chi'(a) / a = 0
                nu = poisson_ratio
                self.b1 = (4 * m + 2 + 2 * nu) / (y * y + m * (1 - nu) - (1 - nu) * yr)
            self.a1 = 1.0 - self.b1
        self._constants()
        self._assemble()

    # -- the rim function chi(r) = (r/a)^(m+2) - a1 (r/a)^m - b1 I_m(ks r)/I_m(ks a)
    def rim_shape(self, r) -> np.ndarray:
        """chi(r), dimensionless, r in m."""
        a, m = self.radius, self.m
        x = np.asarray(r, dtype=float) / a
        out = x ** (m + 2) - self.a1 * x**m
        if self.ks is not None:
            out = out - self.b1 * special.ive(m, self.ks * x * a) / special.ive(m, self.ks * a) \
                * np.exp(self.ks * a * (x - 1.0))
        return out

    def _bessels(self, kappa):
        """J_m, J_m' and, for the rim function, J_{m+1}/x, J_{m+2}/x^2 at x = kappa a.

        Three Bessel evaluations per node (the derivative from the recurrence
        J_m' = (m/x) J_m - J_{m+1}); near x = 0 the quotients take their series.
        """
        m = self.m
        x = kappa * self.radius
        jm, jm1 = special.jv(m, x), special.jv(m + 1, x)
        small = np.abs(x) < 1e-4
        safe = np.where(small, 1.0, x)
        djm = np.where(small, 0.5 if m == 1 else 0.0, (m / safe) * jm - jm1)
        if not self.rim:
            return jm, djm, None, None
        q1 = jm1 / safe
        q2 = special.jv(m + 2, x) / safe**2
        if np.any(small):
            q1 = np.where(small, _jx(m, 1, x), q1)
            q2 = np.where(small, _jx(m, 2, x), q2)
        return jm, djm, q1, q2

    def _rim_transform(self, kappa, jm, djm, q1, q2):
        a = self.radius
        out = a * a * ((1.0 - self.a1) * q1 - 2.0 * q2)
        if self.ks is not None:
            out = out - self.b1 * a * (kappa * djm - self._rim_du * jm) / \
                (-self.ks**2 - kappa * kappa)
        return out

    def _constants(self):
        """Edge values that every transform evaluation reuses."""
        b, a, m = self.basis, self.radius, self.m
        self._j1 = special.jv(m, b.k1 * a)[:, None]
        self._dj1 = special.jvp(m, b.k1 * a)[:, None]
        self._du = None if b.k2 is None else (b.k2 * ratio_i(m, b.k2 * a))[:, None]
        self._rim_du = None if self.ks is None else self.ks * ratio_i(m, self.ks * a)

    def _mode_parts(self, kappa):
        b, a = self.basis, self.radius
        k1 = b.k1[:, None]
        kap = kappa[None, :]
        den = k1 * k1 - kap * kap
        near = np.abs(den) < 1e-9 * k1 * k1
        safe = np.where(near, 1.0, den)
        A = (-a * k1 * self._dj1) / safe
        B = (a * self._j1) * kap / safe
        if b.k2 is not None:
            k2, c = b.k2[:, None], b.c[:, None]
            inv = (c * a) / (-k2 * k2 - kap * kap)
            A = A - inv * self._du
            B = B + inv * kap
        return A, B, near

    def parts(self, kappa):
        """(A, B) with transform = A J_m(kappa a) + B J_m'(kappa a), each (size, len kappa)."""
        kappa = np.atleast_1d(np.asarray(kappa))
        A, B, _ = self._mode_parts(kappa)
        if self.rim:
            a, m = self.radius, self.m
            x = kappa * a
            a0, b0 = m / x**2, -1.0 / x
            a2, b2 = (2.0 * m * (m + 1) / x**2 - 1.0) / x**2, -2.0 * (m + 1) / x**3
            ar = a * a * ((1.0 - self.a1) * a0 - 2.0 * a2)
            br = a * a * ((1.0 - self.a1) * b0 - 2.0 * b2)
            if self.ks is not None:
                den = -self.ks**2 - kappa * kappa
                ar = ar + self.b1 * a * self._rim_du / den
                br = br - self.b1 * a * kappa / den
            A = np.vstack([A, ar[None, :]])
            B = np.vstack([B, br[None, :]])
        return A, B

    def transform(self, kappa) -> np.ndarray:
        """Hankel transforms Phi(kappa), (size, len kappa), m^2; complex kappa allowed."""
        kappa = np.atleast_1d(np.asarray(kappa))
        a, m = self.radius, self.m
        A, B, near = self._mode_parts(kappa)
        jm, djm, q1, q2 = self._bessels(kappa)
        out = A * jm[None, :] + B * djm[None, :]
        if np.any(near):  # removable pole kappa = k1: Lommel's equal-argument limit
            k1 = np.broadcast_to(self.basis.k1[:, None], near.shape)[near]
            xa = k1 * a
            lim = 0.5 * a * a * (special.jvp(m, xa) ** 2 + (1 - (m / xa) ** 2) * special.jv(m, xa) ** 2)
            if self.basis.k2 is not None:  # the I part has no pole there
                k2 = np.broadcast_to(self.basis.k2[:, None], near.shape)[near]
                c = np.broadcast_to(self.basis.c[:, None], near.shape)[near]
                du = k2 * ratio_i(m, k2 * a)
                lim = lim + c * a * (k1 * special.jvp(m, xa) - du * special.jv(m, xa)) / (-k2 * k2 - k1 * k1)
            out[near] = lim
        if self.rim:
            out = np.vstack([out, self._rim_transform(kappa, jm, djm, q1, q2)[None, :]])
        return out

    def _assemble(self):
        """Modal mass and stiffness matrices on the Ritz space (kg, N/m)."""
        b = self.basis
        n = self.modes
        mass = b.modal_mass
        M = np.diag(mass).astype(float)
        K = np.diag(mass * b.omega**2)
        self.projection = np.zeros(n)
        self.rim_residual = None  # relative part of chi outside the modes' span (rim only)
        if self.rim:
            overlap, chi_chi, chi_xm = self._rim_integrals()
            weight = b.angular_weight
            sigma = b.areal_density
            mc = sigma * weight * overlap
            mcc = sigma * weight * chi_chi
            kcc = -4.0 * (self.m + 1) * self.tension / self.radius**2 * weight * chi_xm
            M = np.block([[M, mc[:, None]], [mc[None, :], np.array([[mcc]])]])
            K = np.block([[K, (mc * b.omega**2)[:, None]],
                          [(mc * b.omega**2)[None, :], np.array([[kcc]])]])
            self.projection = overlap / b.norm  # chi ~ sum_n projection_n phi_n
            # share of chi's mass-norm outside the modes' span (the modes are M-orthogonal)
            inside = float(np.sum(mc * mc / mass)) / float(mcc)
            self.rim_residual = float(np.sqrt(max(1.0 - inside, 0.0)))
        self.M, self.K = M, K

    def _rim_integrals(self):
        r"""<chi, phi_n>, <chi, chi> and <chi, (r/a)^m> (integrals of r dr over [0, a], m^2).

        Closed forms (no quadrature) for the ideal head and for a stiff one with
        :math:`k_s a \ge` :data:`CLOSED_FORM_KSA` (every practical head: T a^2/D is
        1e3-1e7). The rim function is a static response, :math:`(D\nabla^4 - T\nabla^2)\chi
        = -4(m+1)(T/a^2)(r/a)^m`, and satisfies the modes' edge conditions, so Green's
        identity with :math:`L\phi_n = \sigma\omega_n^2\phi_n` gives
        :math:`\langle\chi,\phi_n\rangle = -4(m+1) T \langle (r/a)^m, \phi_n\rangle /
        (a^2\sigma\omega_n^2)`, and the rest are integrals of :math:`x^p` and
        :math:`x^p I_m` (:math:`\int_0^y u^{m+1} I_m = y^{m+1} I_{m+1}`, :math:`\int_0^y
        u^{m+3} I_m = y^{m+3} I_{m+1} - 2 y^{m+2} I_{m+2}`) and Lommel's :math:`\hat I^2`.
        Checked against a fine quadrature: within 1e-13 relative, where the former composite
        Gauss rule erred by up to 1e-5 on the highest modes of an order. Nearer a plate
        (small :math:`k_s a`) the closed forms cancel, and the quadrature of
        :func:`radial_nodes` is used.
        """
        b, a, m = self.basis, self.radius, self.m
        if self.ks is not None and self.ks * a < CLOSED_FORM_KSA:
            r, w = radial_nodes(self)
            chi = self.rim_shape(r)
            return (b.shape(r) @ (w * r * chi), np.sum(w * r * chi * chi),
                    np.sum(w * r * chi * (r / a) ** m))
        a1 = self.a1
        xm_phi = a * special.jv(m + 1, b.k1 * a) / b.k1  # <(r/a)^m, phi_n>
        if b.k2 is not None:
            y2 = b.k2 * a
            xm_phi = xm_phi + a * b.c * special.ive(m + 1, y2) / special.ive(m, y2) / b.k2
        overlap = -4.0 * (m + 1) * self.tension / (a * a * b.areal_density * b.omega**2) * xm_phi
        # chi = x^(m+2) - a1 x^m - b1 I_hat(ks r), x = r/a
        chi_chi = 1.0 / (2 * m + 6) - 2.0 * a1 / (2 * m + 4) + a1 * a1 / (2 * m + 2)
        chi_xm = 1.0 / (2 * m + 4) - a1 / (2 * m + 2)
        if self.ks is not None:
            y, b1 = self.ks * a, self.b1
            r1 = special.ive(m + 1, y) / special.ive(m, y)
            r2 = special.ive(m + 2, y) / special.ive(m, y)
            ratio = ratio_i(m, y)
            i_i = 0.5 * (1.0 + m * m / (y * y) - ratio * ratio)  # <I_hat, I_hat> / a^2
            chi_chi += (-2.0 * b1 * (r1 / y - 2.0 * r2 / (y * y)) + 2.0 * a1 * b1 * r1 / y
                        + b1 * b1 * i_i)
            chi_xm -= b1 * r1 / y
        return overlap, a * a * chi_chi, a * a * chi_xm

    def to_basis(self, q: np.ndarray) -> np.ndarray:
        """Ritz coordinates -> coefficients over the in-vacuum basis (rim function projected)."""
        q = np.asarray(q)
        out = q[: self.modes].astype(complex)
        if self.rim:
            out = out + q[self.modes] * self.projection
        return out


def radial_nodes(space: RitzSpace):
    """Composite Gauss-Legendre nodes on [0, a] (r, weights), refined near the rim of a stiff
    head, whose modes have a boundary layer of width about 1 / k2 there."""
    a = space.radius
    kmax = float(np.max(space.basis.k1))
    edges = np.linspace(0.0, a, int(np.ceil(kmax * a / 4.0)) + 4)
    if space.ks is not None:
        ks = max(space.ks, float(np.max(space.basis.k2)))
        layer = a - np.array([60.0, 20.0, 6.0, 2.0]) / ks
        layer = layer[layer > 0.5 * a]
        if len(layer):
            edges = np.concatenate([edges[edges < layer[0]], layer, [a]])
    x, w = np.polynomial.legendre.leggauss(16)
    lo, hi = edges[:-1], edges[1:]
    r = (0.5 * (hi - lo)[:, None] * (x + 1.0)[None, :] + lo[:, None]).ravel()
    wr = (0.5 * (hi - lo)[:, None] * w[None, :]).ravel()
    return r, wr
