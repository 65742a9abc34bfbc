r"""The head coupled to the air on its faces and in its body: complex frequencies (DESIGN.md 3.5).

For each angular order m the head's displacement is expanded over a Ritz space: its in-vacuum
modes (ideal or exact stiff) plus one *rim function*, the head's static response to a pressure
:math:`\propto r^m\cos m\theta`. The air pressure does not vanish at the rim, so without the
rim function the modal coefficients decay only algebraically and the frequencies converge like
:math:`N^{-3}`; with it they converge several orders faster (tests/test_coupled.py). On that
space, with q the Ritz coordinates,

.. math::

    Z(\omega)\,q = \big[K + S(\omega) - \omega^2 (M + A_{out}(\omega/c))\big]\,q = 0,

A_out the baffled radiation matrix of each open face (radiation.py; both faces when there is no
body), S the body's interior air (cavity.py). Roots are complex, :math:`\omega = \omega_r +
i\omega_i` with time dependence :math:`e^{i\omega t}`: f = ω_r / 2π and T60 = 3 ln 10 / ω_i
(radiation damping only: the film's internal losses and the air's viscosity are not modelled).

The root of each in-vacuum mode is followed by continuation: the outside air is switched on,
then the body's air density from 0 to its value, re-solving at each step by a secant iteration
on the tracked eigenvalue λ(ω) of :math:`(K + S)x = λ(M + A)x` (the one whose vector overlaps
most with the previous step's). This keeps a root from being captured by a body air resonance.
A root that does not converge raises :class:`membrane.errors.SolverError`.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from scipy import special

from ..errors import InputError, SolverError
from .cavity import Duct
from .radiation import Quadrature, RadiationTable
from .vacuum import RadialBasis, _ratio_i, ideal_basis, stiff_basis

LN1000 = 3.0 * np.log(10.0)


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

    def __init__(self, basis: RadialBasis, *, edge: str = "clamped", poisson_ratio: float = 0.38,
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
            yr = y * _ratio_i(m, y)
            if edge == "clamped":  # chi(a) = chi'(a) = 0
                self.b1 = 2.0 / (yr - m)
            else:  # chi(a) = 0, chi''(a) + nu chi'(a) / a = 0
                nu = poisson_ratio
                self.b1 = (4 * m + 2 + 2 * nu) / (y * y + m * (1 - nu) - (1 - nu) * yr)
            self.a1 = 1.0 - self.b1
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

    def _rim_transform(self, kappa):
        a, m = self.radius, self.m
        x = kappa * a
        t0 = _jx(m, 1, x)
        out = a * a * (t0 - 2.0 * _jx(m, 2, x) - self.a1 * t0)
        if self.ks is not None:
            du = self.ks * _ratio_i(m, self.ks * a)
            out = out - self.b1 * a * (kappa * special.jvp(m, x) - du * special.jv(m, x)) / \
                (-self.ks**2 - kappa * kappa)
        return out

    def _mode_parts(self, kappa, *, exact_poles: bool):
        b, a, m = self.basis, self.radius, self.m
        k1 = b.k1[:, None]
        kap = kappa[None, :]
        j1, dj1 = special.jv(m, k1 * a), special.jvp(m, k1 * a)
        den = k1 * k1 - kap * kap
        near = np.abs(den) < 1e-9 * k1 * k1
        safe = np.where(near, 1.0, den)
        A = -a * k1 * dj1 / safe
        B = a * kap * j1 / safe
        if b.k2 is not None:
            k2, c = b.k2[:, None], b.c[:, None]
            du = k2 * _ratio_i(m, k2 * a)
            A = A - c * a * du / (-k2 * k2 - kap * kap)
            B = B + c * a * kap / (-k2 * k2 - kap * kap)
        return A, B, near

    def parts(self, kappa):
        """(A, B) with transform = A J_m(kappa a) + B J_m'(kappa a), each (size, len kappa)."""
        kappa = np.atleast_1d(np.asarray(kappa))
        A, B, _ = self._mode_parts(kappa, exact_poles=False)
        if self.rim:
            a, m = self.radius, self.m
            x = kappa * a
            a0, b0 = m / x**2, -1.0 / x
            a2, b2 = (2.0 * m * (m + 1) / x**2 - 1.0) / x**2, -2.0 * (m + 1) / x**3
            ar = a * a * ((1.0 - self.a1) * a0 - 2.0 * a2)
            br = a * a * ((1.0 - self.a1) * b0 - 2.0 * b2)
            if self.ks is not None:
                du = self.ks * _ratio_i(m, self.ks * a)
                den = -self.ks**2 - kappa * kappa
                ar = ar + self.b1 * a * du / den
                br = br - self.b1 * a * kappa / den
            A = np.vstack([A, ar[None, :]])
            B = np.vstack([B, br[None, :]])
        return A, B

    def transform(self, kappa) -> np.ndarray:
        """Hankel transforms Phi(kappa), (size, len kappa), m^2; complex kappa allowed."""
        kappa = np.atleast_1d(np.asarray(kappa))
        a, m = self.radius, self.m
        A, B, near = self._mode_parts(kappa, exact_poles=True)
        x = kappa * a
        out = A * special.jv(m, x)[None, :] + B * special.jvp(m, x)[None, :]
        if np.any(near):  # removable pole kappa = k1: Lommel's equal-argument limit
            k1 = np.broadcast_to(self.basis.k1[:, None], near.shape)[near]
            xa = k1 * a
            lim = 0.5 * a * a * (special.jvp(m, xa) ** 2 + (1 - (m / xa) ** 2) * special.jv(m, xa) ** 2)
            if self.basis.k2 is not None:  # the I part has no pole there
                k2 = np.broadcast_to(self.basis.k2[:, None], near.shape)[near]
                c = np.broadcast_to(self.basis.c[:, None], near.shape)[near]
                du = k2 * _ratio_i(m, k2 * a)
                lim = lim + c * a * (k1 * special.jvp(m, xa) - du * special.jv(m, xa)) / (-k2 * k2 - k1 * k1)
            out[near] = lim
        if self.rim:
            out = np.vstack([out, self._rim_transform(kappa)[None, :]])
        return out

    def _assemble(self):
        """Modal mass and stiffness matrices on the Ritz space (kg, N/m)."""
        b = self.basis
        n = self.modes
        mass = b.modal_mass
        M = np.diag(mass).astype(float)
        K = np.diag(mass * b.omega**2)
        self.projection = np.zeros(n)
        if self.rim:
            r, w = _radial_nodes(self)
            chi = self.rim_shape(r)
            phi = b.shape(r)
            weight = b.angular_weight
            overlap = phi @ (w * r * chi)  # <chi, phi_n>
            sigma = b.areal_density
            mc = sigma * weight * overlap
            mcc = sigma * weight * np.sum(w * r * chi * chi)
            x = r / self.radius
            kcc = -4.0 * (self.m + 1) * self.tension / self.radius**2 * weight * \
                np.sum(w * r * chi * x**self.m)
            M = np.block([[M, mc[:, None]], [mc[None, :], np.array([[mcc]])]])
            K = np.block([[K, (mc * b.omega**2)[:, None]],
                          [(mc * b.omega**2)[None, :], np.array([[kcc]])]])
            self.projection = overlap / b.norm  # chi ~ sum_n projection_n phi_n
        self.M, self.K = M, K

    def to_basis(self, q: np.ndarray) -> np.ndarray:
        """Ritz coordinates -> coefficients over the in-vacuum basis (rim function projected)."""
        q = np.asarray(q)
        out = q[: self.modes].astype(complex)
        if self.rim:
            out = out + q[self.modes] * self.projection
        return out


def _radial_nodes(space: RitzSpace):
    """Composite Gauss-Legendre nodes on [0, a] (r, weights), refined near the rim of a stiff
    head, whose modes have a boundary layer of width about 1 / k2 there."""
    a = space.radius
    kmax = float(np.max(space.basis.k1))
    edges = np.linspace(0.0, a, int(np.ceil(kmax * a / 2.0)) + 4)
    if space.ks is not None:
        ks = max(space.ks, float(np.max(space.basis.k2)))
        layer = a - np.array([60.0, 20.0, 6.0, 2.0]) / ks
        layer = layer[layer > 0.5 * a]
        if len(layer):
            edges = np.concatenate([edges[edges < layer[0]], layer, [a]])
    x, w = np.polynomial.legendre.leggauss(20)
    lo, hi = edges[:-1], edges[1:]
    r = (0.5 * (hi - lo)[:, None] * (x + 1.0)[None, :] + lo[:, None]).ravel()
    wr = (0.5 * (hi - lo)[:, None] * w[None, :]).ravel()
    return r, wr


# ----------------------------------------------------------------------------- settings
@dataclass(frozen=True)
class Settings:
    """Numerical settings of the coupled solve (defaults from tests/test_coupled.py).

    Attributes
    ----------
    extra_modes : int
        In-vacuum modes kept beyond n_max in each order's Ritz space.
    duct_modes : int
        Duct modes beyond the Ritz space's size.
    quadrature : Quadrature
        Wavenumber quadrature of the radiation tables.
    rim : bool
        Add the rim function to the Ritz space.
    tol : float
        Relative change of omega at which a root is converged.
    max_iter : int
        Secant iterations per continuation step before the step is halved.
    """

    extra_modes: int = 16
    duct_modes: int = 8
    quadrature: Quadrature = Quadrature()
    rim: bool = True
    tol: float = 1e-11
    max_iter: int = 30


DEFAULT = Settings()


def head_space(head, *, m: int, count: int, rim: bool = True, radius: float | None = None) -> RitzSpace:
    """Ritz space of order m for a head (exact stiff modes when it has bending stiffness)."""
    a = head.radius if radius is None else radius
    d = head.bending_stiffness
    if d > 0:
        basis = stiff_basis(m=m, count=count, radius=a, tension=head.tension,
                            areal_density=head.areal_density, bending_stiffness=d,
                            poisson_ratio=head.poisson_ratio, edge=head.edge)
    else:
        basis = ideal_basis(m=m, count=count, radius=a, tension=head.tension,
                            areal_density=head.areal_density)
    return RitzSpace(basis, edge=head.edge, poisson_ratio=head.poisson_ratio, rim=rim)


@lru_cache(maxsize=256)
def _unit_table(m: int, count: int, rim: bool, s: float | None, edge: str, nu: float,
                ka_max: float, quadrature: Quadrature) -> RadiationTable:
    """Radiation table of the unit-radius space with dimensionless tension s = T a^2 / D.

    Depends on dimensionless geometry only, so it is computed once per process and reused
    for every drum with the same shape of basis (cached).
    """
    if s is None:
        basis = ideal_basis(m=m, count=count, radius=1.0, tension=1.0, areal_density=1.0)
    else:
        basis = stiff_basis(m=m, count=count, radius=1.0, tension=s, areal_density=1.0,
                            bending_stiffness=1.0, poisson_ratio=nu, edge=edge)
    return RadiationTable(RitzSpace(basis, edge=edge, poisson_ratio=nu, rim=rim),
                          k_max=ka_max, quadrature=quadrature)


def head_table(head, space: RitzSpace, *, k_max: float, quadrature: Quadrature):
    """A(k)/rho of a head's face: callable on arrays of k (1/m) -> (R, N, N) in m^3."""
    a = space.radius
    d = head.bending_stiffness
    s = None if d <= 0 else float(head.tension * a * a / d)
    ka_max = 4.0 * np.ceil(k_max * a / 4.0)  # buckets, so nearby drums share a table
    table = _unit_table(space.m, space.modes, space.rim, s, head.edge,
                        float(head.poisson_ratio), float(ka_max), quadrature)
    return lambda k: a**3 * table(np.asarray(k) * a)


# ----------------------------------------------------------------------------- one order
class OrderProblem:
    """Z(omega) of one angular order: heads, faces, body.

    Parameters
    ----------
    spaces : list of RitzSpace
        One head, or two (struck first) for a shell.
    tables : list of callables
        A(k)/rho per head (see :func:`head_table`).
    faces : int
        Open faces per head: 2 with no body, 1 with a kettle or shell.
    duct : Duct or None
        The body's interior.
    air : (density, sound_speed)
    cross_sign : +1, -1 or None
        For a shell of two identical heads: solve the in-phase (+1) or opposed (-1) half on
        one head's space (exact, by symmetry).
    """

    def __init__(self, spaces, tables, *, faces: int, duct, air, cross_sign=None):
        self.spaces, self.tables, self.faces, self.duct = spaces, tables, faces, duct
        self.rho, self.c = air
        self.cross_sign = cross_sign
        heads = spaces if cross_sign is None else spaces[:1]
        self.K = _block_diag([s.K for s in heads])
        self.M = _block_diag([s.M for s in heads])
        self.offsets = np.cumsum([0] + [s.size for s in heads])
        self.size = int(self.offsets[-1])

    def pencil(self, omega, *, outer: float, body: float):
        """(K + S, M + A) at complex omega (R,), each (R, size, size); outer, body scale the air."""
        omega = np.asarray(omega, dtype=complex)
        R = len(omega)
        Keff = np.broadcast_to(self.K, (R, self.size, self.size)).astype(complex)
        Meff = np.broadcast_to(self.M, (R, self.size, self.size)).astype(complex)
        if outer:
            k = omega / self.c
            for i, tab in enumerate(self.tables[: len(self.offsets) - 1]):
                lo, hi = self.offsets[i], self.offsets[i + 1]
                Meff[:, lo:hi, lo:hi] += (outer * self.rho * self.faces) * tab(k)
        if body and self.duct is not None:
            S = self.duct.matrix(omega, density=body * self.rho, sound_speed=self.c)
            if self.cross_sign is not None:
                n = self.spaces[0].size
                S = S[:, :n, :n] + self.cross_sign * S[:, :n, n:]
            Keff += S
        return Keff, Meff


def _block_diag(blocks):
    n = sum(b.shape[0] for b in blocks)
    out = np.zeros((n, n))
    i = 0
    for b in blocks:
        out[i:i + b.shape[0], i:i + b.shape[0]] = b
        i += b.shape[0]
    return out


# ----------------------------------------------------------------------------- root tracking
def _eigs(problem: OrderProblem, omega, vecs, *, outer, body):
    """Tracked eigenvalue of (K+S) x = lam (M+A) x at each omega: (lam, vector, overlap, margin)."""
    Keff, Meff = problem.pencil(omega, outer=outer, body=body)
    lam, vec = np.linalg.eig(np.linalg.solve(Meff, Keff))
    Mx = vecs @ problem.M  # (R, n): x^H M with x real or complex (M symmetric)
    num = np.abs(np.einsum("rn,rnj->rj", np.conj(Mx), vec))
    nv = np.sqrt(np.abs(np.einsum("rnj,nk,rkj->rj", np.conj(vec), problem.M, vec)))
    nx = np.sqrt(np.abs(np.einsum("rn,rn->r", np.conj(Mx), vecs)))
    ovl = num / (nv * nx[:, None])
    order = np.argsort(-ovl, axis=1)
    best = order[:, 0]
    idx = np.arange(len(omega))
    second = ovl[idx, order[:, 1]] if ovl.shape[1] > 1 else np.zeros(len(omega))
    return lam[idx, best], vec[idx, :, best], ovl[idx, best], ovl[idx, best] - second


def _sqrt_root(lam):
    w = np.sqrt(lam.astype(complex))
    return np.where(w.real < 0, -w, w)


def _solve_step(problem, omega, vecs, *, outer, body, settings):
    """Secant iteration on lam(omega) - omega^2 from the given starts; returns
    (omega, vecs, ok) with ok False where it did not converge or the tracking was ambiguous."""
    lam0, v0, o0, g0m = _eigs(problem, omega, vecs, outer=outer, body=body)
    w0, g0 = omega, lam0 - omega**2
    w1 = _sqrt_root(lam0)
    ok_track = (o0 > 0.7) & (g0m > 0.15)
    R = len(omega)
    done = np.zeros(R, bool)
    w_out, v_out = w1.copy(), v0.copy()
    active = np.arange(R)
    for _ in range(settings.max_iter):
        lam1, v1, o1, m1 = _eigs(problem, w1[active], v0[active], outer=outer, body=body)
        ok_track[active] &= (o1 > 0.7) & (m1 > 0.15)
        g1 = lam1 - w1[active] ** 2
        dg = g1 - g0[active]
        safe = np.where(dg == 0, 1.0, dg)
        w2 = np.where(dg == 0, w1[active], w1[active] - g1 * (w1[active] - w0[active]) / safe)
        conv = np.abs(w2 - w1[active]) <= settings.tol * np.abs(w1[active])
        w_out[active], v_out[active] = w2, v1
        w0[active], g0[active], v0[active] = w1[active], g1, v1
        w1[active] = w2
        done[active[conv]] = True
        active = active[~conv]
        if not len(active):
            break
    return w_out, v_out, done & ok_track & np.isfinite(w_out)


def _advance(problem, state, roots, start, target, *, settings, depth=0):
    """Move the given roots from parameter point start to target (outer, body), halving
    the step where a root fails; raises SolverError when halving does not help."""
    omega, vecs = state
    w, v, ok = _solve_step(problem, omega[roots], vecs[roots], outer=target[0], body=target[1],
                           settings=settings)
    good = roots[ok]
    omega[good], vecs[good] = w[ok], v[ok]
    bad = roots[~ok]
    if len(bad):
        if depth >= 8:
            raise SolverError(
                f"coupled solve did not converge for order m = {problem.spaces[0].m} at air "
                f"scale {target} (roots near {np.round(omega[bad].real / (2 * np.pi), 2)} Hz)")
        mid = (0.5 * (start[0] + target[0]), 0.5 * (start[1] + target[1]))
        _advance(problem, state, bad, start, mid, settings=settings, depth=depth + 1)
        _advance(problem, state, bad, mid, target, settings=settings, depth=depth + 1)


def track_roots(problem: OrderProblem, omega0, vectors0, *, settings: Settings = DEFAULT):
    """Complex roots of Z(omega) continued from in-vacuum starts.

    Parameters
    ----------
    problem : OrderProblem
    omega0 : array_like
        In-vacuum angular frequencies (rad/s), one per root.
    vectors0 : array_like
        In-vacuum Ritz vectors, (R, size).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Complex omega (R,) in rad/s and Ritz vectors (R, size).
    """
    omega = np.array(omega0, dtype=complex)
    vecs = np.array(vectors0, dtype=complex)
    path = [(0.0, 0.0), (0.5, 0.0), (1.0, 0.0)]
    if problem.duct is not None:
        path += [(1.0, 0.25), (1.0, 0.5), (1.0, 0.75), (1.0, 1.0)]
    roots = np.arange(len(omega))
    for start, target in zip(path[:-1], path[1:]):
        _advance(problem, (omega, vecs), roots, start, target, settings=settings)
    _check_distinct(problem, omega)
    return omega, vecs


def _check_distinct(problem, omega):
    w = np.sort_complex(omega)
    gaps = np.abs(np.diff(w)) <= 1e-8 * np.abs(w[1:])
    if np.any(gaps):
        raise SolverError(f"two roots of order m = {problem.spaces[0].m} converged to the same "
                          f"resonance near {w[1:][gaps][0].real / (2 * np.pi):.2f} Hz")
