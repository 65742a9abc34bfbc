r"""The head coupled to the air on its faces and in its body: complex frequencies (docs/physics.md "Solving").

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
then the body's air density from 0 to its value (in geometric steps for a very stiff air
spring). At each step every root is re-solved by a Rayleigh-functional iteration: the scalar
root of :math:`x^T Z(\omega) x = 0` (Z is complex symmetric, so this is stationary in x;
secant), then an inverse-iteration update :math:`x \leftarrow Z(\omega)^{-1} M x`; a few
iterations reach 1e-10. A step is accepted only if every root of the order converged, still
resembles its previous vector more than any other root's, and no two roots coincide; otherwise
the order retries with half the step. This keeps a root from being captured by a body air
resonance or by a neighbour it hybridises with. A root that cannot be followed raises
:class:`membrane.errors.SolverError`: no root is returned unconverged.

All roots of all orders are iterated together (batched linear solves; the radiation matrices
come from Chebyshev tables in :math:`(ka)^2` that depend on dimensionless geometry only and
are cached in the process and kept on disk between runs, table_cache.py), which is what makes
the full table fast.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import lru_cache

import numpy as np
from scipy import special

from ..errors import InputError, SolverError
from . import dissipation, table_cache
from .cavity import duct_norms, duct_terms, duct_wavenumbers
from .radiation import Quadrature, RadiationTable
from .vacuum import RadialBasis, _ratio_i, ideal_basis, stiff_basis

from ..notation import LN1000, POISSON_RATIO  # noqa: E402


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
            yr = y * _ratio_i(m, y)
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
        self._du = None if b.k2 is None else (b.k2 * _ratio_i(m, b.k2 * a))[:, None]
        self._rim_du = None if self.ks is None else self.ks * _ratio_i(m, self.ks * a)

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
                du = k2 * _ratio_i(m, k2 * a)
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


# ----------------------------------------------------------------------------- settings
@dataclass(frozen=True)
class Settings:
    """Numerical settings of the coupled solve (defaults chosen by tests/test_coupled.py).

    Attributes
    ----------
    extra_modes : int
        In-vacuum modes kept beyond n_max in each order's Ritz space.
    duct_modes : int
        Duct modes kept beyond the Ritz space's size.
    quadrature : Quadrature
        Wavenumber quadrature of the radiation tables.
    rim : bool
        Add the rim function to the Ritz space.
    tol : float
        Relative change of omega at which a root is converged.
    max_iter : int
        Iterations per continuation step before the step is halved.
    """

    extra_modes: int = 16
    duct_modes: int = 8
    quadrature: Quadrature = Quadrature()
    rim: bool = True
    tol: float = 1e-10
    max_iter: int = 12


DEFAULT = Settings()


# ----------------------------------------------------------------------------- templates
@dataclass(frozen=True)
class _Shape:
    """Dimensionless description of a head's Ritz space: the cache key."""

    m: int
    count: int
    rim: bool
    s: float | None  # T a^2 / D, None for no bending stiffness
    edge: str
    nu: float


def _shape(head, *, m: int, count: int, rim: bool) -> _Shape:
    d = head.bending_stiffness
    s = None if d <= 0 else float(head.tension * head.radius**2 / d)
    return _Shape(m, count, rim, s, head.edge, float(head.poisson_ratio))


@lru_cache(maxsize=512)
def unit_space(shape: _Shape) -> RitzSpace:
    """The Ritz space of radius 1, areal density 1 and tension 1 (or s with D = 1)."""
    if shape.s is None:
        basis = ideal_basis(m=shape.m, count=shape.count, radius=1.0, tension=1.0,
                            areal_density=1.0)
    else:
        basis = stiff_basis(m=shape.m, count=shape.count, radius=1.0, tension=shape.s,
                            areal_density=1.0, bending_stiffness=1.0,
                            poisson_ratio=shape.nu, edge=shape.edge)
    return RitzSpace(basis, edge=shape.edge, poisson_ratio=shape.nu, rim=shape.rim)


@lru_cache(maxsize=512)
def unit_table(shape: _Shape, ka_max: float, quadrature: Quadrature) -> RadiationTable:
    """Radiation table of :func:`unit_space` up to k a = ka_max.

    Depends on dimensionless geometry only, so it is computed once per process and shared
    by every drum whose head has the same shape of basis (cached), and its Chebyshev
    coefficients are kept on disk between processes (table_cache.py; exact keys, so a table
    read back is the one a fresh build gives, bit for bit).
    """
    space = unit_space(shape)
    name = table_cache.key("radiation-table", shape, float(ka_max), quadrature)
    stored = table_cache.load(name, {"x": (None, space.size, space.size),
                                     "y": (None, space.size, space.size), "k_max": ()})
    if (stored is not None and float(stored["k_max"]) == ka_max
            and stored["x"].shape == stored["y"].shape and len(stored["x"]) > 0):
        return RadiationTable.from_coefficients(space, k_max=ka_max, x=stored["x"], y=stored["y"])
    table = RadiationTable(space, k_max=ka_max, quadrature=quadrature)
    table_cache.store(name, x=table._x, y=table._y, k_max=np.array(table.k_max))
    return table


@lru_cache(maxsize=512)
def _unit_duct(shape: _Shape, count: int):
    """Duct wavenumbers, norms and overlaps of the unit space (gamma a, /a^2, /a^2)."""
    space = unit_space(shape)
    gamma = duct_wavenumbers(m=shape.m, count=count, radius=1.0)
    return gamma, duct_norms(m=shape.m, gamma=gamma, radius=1.0), np.real(space.transform(gamma))


class HeadOrder:
    """One head's Ritz space of order m at its physical size, tension and density.

    Scales the cached unit space: M = sigma a^2 M^, K = (T / T^) K^, Phi(kappa) = a^2 Phi^(kappa a),
    A(k) = rho a^3 A^(k a).
    """

    def __init__(self, head, *, m: int, count: int, rim: bool, radius: float | None = None):
        self.head = head
        self.radius = float(head.radius if radius is None else radius)
        self.shape = _shape(head, m=m, count=count, rim=rim)
        self.unit = unit_space(self.shape)
        t_unit = 1.0 if self.shape.s is None else self.shape.s
        a, sigma, tension = self.radius, head.areal_density, head.tension
        self.M = sigma * a * a * self.unit.M
        self.K = (tension / t_unit) * self.unit.K
        self.omega = np.sqrt(tension / (sigma * a * a * t_unit)) * self.unit.basis.omega
        self.size, self.modes = self.unit.size, self.unit.modes
        self.m = m

    def basis(self) -> RadialBasis:
        """The physical in-vacuum basis (for Mode shapes)."""
        h = self.head
        if self.shape.s is None:
            return ideal_basis(m=self.m, count=self.modes, radius=self.radius, tension=h.tension,
                               areal_density=h.areal_density)
        return stiff_basis(m=self.m, count=self.modes, radius=self.radius, tension=h.tension,
                           areal_density=h.areal_density, bending_stiffness=h.bending_stiffness,
                           poisson_ratio=h.poisson_ratio, edge=h.edge)

    def table(self, ka_max: float, quadrature: Quadrature) -> RadiationTable:
        return unit_table(self.shape, float(ka_max), quadrature)

    def duct(self, count: int):
        """(gamma in 1/m, norms in m^2, overlaps in m^2 of shape (size, Q))."""
        g, nrm, v = _unit_duct(self.shape, count)
        a = self.radius
        return g / a, nrm * a * a, v * a * a


# ----------------------------------------------------------------------------- stacked roots
@dataclass
class Order:
    """One eigenproblem of order m: its head(s), open faces and body.

    ``heads`` holds one HeadOrder, or two for a shell with unequal heads; ``cross_sign`` is
    +1 (in-phase) or -1 (opposed) for a shell of two identical heads solved on one head's
    space by symmetry, else None. ``depth`` is the body's depth in m (None: no body).
    """

    m: int
    heads: list
    faces: int
    depth: float | None = None
    cross_sign: int | None = None


class RootSet:
    """Every root of a drum solved at once.

    Each order keeps its own matrices (shared by its roots, so the Chebyshev and duct sums
    are small matrix products); the linear solves of all roots are batched together.

    Parameters
    ----------
    orders : list of Order
        All of the same Ritz-space size.
    which : array_like of int
        Order index of each root.
    air : (density, sound_speed)
        kg/m^3, m/s (outside and inside alike).
    settings : Settings
    k_max : sequence of float
        Largest acoustic wavenumber needed per order, 1/m (sets the radiation tables' range).
    losses : membrane.losses.Losses or None
        Losses besides radiation (dissipation.py), or None for radiation only.
    """

    def __init__(self, orders, which, *, air, settings: Settings, k_max, losses=None):
        self.rho, self.c = air
        self.orders = orders
        self.which = np.asarray(which)
        self.settings = settings
        self.k_max = list(k_max)
        self.data = [self._order_data(o, km, settings) for o, km in zip(orders, k_max)]
        sizes = {d["K"].shape[0] for d in self.data}
        if len(sizes) != 1:
            raise SolverError("internal: orders of different sizes in one root set")
        self.size = sizes.pop()
        self.has_duct = orders[0].depth is not None
        rho_c2 = self.rho * self.c**2
        self.air_spring = max([rho_c2 * np.pi * h.radius**2 / (h.head.tension * o.depth)
                               for o in orders if o.depth is not None for h in o.heads] + [0.0])
        self.M = np.stack([self.data[i]["M"] for i in self.which])
        self.losses = None if losses is None else dissipation.RootLosses(self, losses)

    def _order_data(self, order, kmax, settings):
        d = {"K": _block_diag([h.K for h in order.heads]),
             "M": _block_diag([h.M for h in order.heads]),
             "offsets": np.cumsum([0] + [h.size for h in order.heads]), "faces": []}
        for h in order.heads:
            ka = 4.0 * np.ceil(kmax * h.radius / 4.0)  # buckets: nearby drums share a table
            t = h.table(ka, settings.quadrature)
            n = h.size
            xy = np.vstack([t._x.reshape(t.degree, n * n), t._y.reshape(t.degree, n * n)])
            d["faces"].append((xy, t.degree, t.t_max, order.faces * t.weight * h.radius**3,
                               h.radius))
        if order.depth is not None:
            ducts = [h.duct(order.heads[0].size + settings.duct_modes) for h in order.heads]
            d["gamma"], d["norms"] = ducts[0][0], ducts[0][1]
            d["V"] = [v for (_, _, v) in ducts]
            d["weight"] = 2 * np.pi if order.m == 0 else np.pi
        return d

    def _groups(self, idx):
        w = self.which[idx]
        for i in np.unique(w):
            yield i, np.nonzero(w == i)[0]

    def _duct_terms(self, d, depth, omega):
        fcot, fcsc = duct_terms(omega / self.c, d["gamma"], depth)
        scale = (self.rho * d["weight"]) * (omega**2)[:, None] / d["norms"][None, :]
        return scale * fcot, scale * fcsc

    def _duct_weights(self, order, fcot, fcsc, i, j):
        if order.cross_sign is not None:
            return fcot + order.cross_sign * fcsc
        return fcot if i == j else fcsc

    def pencil(self, idx, omega, *, outer, body):
        """(K + S, M + A) at complex omega for roots idx: each (len idx, size, size)."""
        n = self.size
        Keff = np.empty((len(idx), n, n), complex)
        Meff = np.empty((len(idx), n, n), complex)
        for i, sel in self._groups(idx):
            d, order, w = self.data[i], self.orders[i], omega[sel]
            Kg = np.broadcast_to(d["K"], (len(sel), n, n)).astype(complex)
            Mg = np.broadcast_to(d["M"], (len(sel), n, n)).astype(complex)
            k = w / self.c
            if outer:
                for h, (XY, P, tmax, scale, a) in enumerate(d["faces"]):
                    lo, hi = d["offsets"][h], d["offsets"][h + 1]
                    ka = k * a
                    T = np.polynomial.chebyshev.chebvander(2.0 * ka * ka / tmax - 1.0, P - 1)
                    TT = (outer * self.rho * scale) * np.hstack([T, -1j * ka[:, None] * T])
                    Mg[:, lo:hi, lo:hi] += _cmul(TT, XY).reshape(len(sel), hi - lo, hi - lo)
            if body and order.depth is not None:
                fcot, fcsc = self._duct_terms(d, order.depth, w)
                V, off = d["V"], d["offsets"]
                for a_ in range(len(V)):
                    for b_ in range(len(V)):
                        f = body * self._duct_weights(order, fcot, fcsc, a_, b_)
                        Kg[:, off[a_]:off[a_ + 1], off[b_]:off[b_ + 1]] += \
                            (V[a_][None, :, :] * f[:, None, :]) @ V[b_].T
            if self.losses is not None:
                Kg = Kg + self.losses.matrix(i, w, outer=outer, body=body)
            Keff[sel], Meff[sel] = Kg, Mg
        return Keff, Meff

    def order_operator(self, i, omega, *, outer: float = 1.0, body: float = 1.0,
                       head: bool = True, skip_ducts: int = 0, only_ducts: int | None = None,
                       duct_weights=None):
        r"""Z(omega) of order i, N/m: (len omega, size, size) complex.

        ``outer`` and ``body`` scale the outside and inside air (0 switches them off);
        ``head`` False leaves out K - omega^2 M (with outer 0: the body's S alone);
        ``skip_ducts`` leaves out the lowest duct modes (the contour solve gives them
        unknowns of their own, spectrum.py); ``only_ducts`` keeps only the lowest ones;
        ``duct_weights`` scales each duct mode's term.
        """
        d, order = self.data[i], self.orders[i]
        w = np.atleast_1d(np.asarray(omega, dtype=complex))
        n, P = self.size, len(w)
        if head:
            Z = np.broadcast_to(d["K"], (P, n, n)) - (w**2)[:, None, None] * d["M"][None]
        else:
            Z = np.zeros((P, n, n), complex)
        Z = Z.astype(complex)
        k = w / self.c
        if outer:
            for h, (XY, Pd, tmax, scale, a) in enumerate(d["faces"]):
                lo, hi = d["offsets"][h], d["offsets"][h + 1]
                ka = k * a
                T = np.polynomial.chebyshev.chebvander(2.0 * ka * ka / tmax - 1.0, Pd - 1)
                TT = (outer * self.rho * scale) * np.hstack([T, -1j * ka[:, None] * T])
                Z[:, lo:hi, lo:hi] -= (w**2)[:, None, None] * \
                    _cmul(TT, XY).reshape(P, hi - lo, hi - lo)
        if body and order.depth is not None:
            fcot, fcsc = self._duct_terms(d, order.depth, w)
            fcot[:, :skip_ducts] = 0.0
            fcsc[:, :skip_ducts] = 0.0
            if only_ducts is not None:
                fcot[:, only_ducts:] = 0.0
                fcsc[:, only_ducts:] = 0.0
            if duct_weights is not None:  # (P, Q) or (Q,): each duct mode's term scaled
                fcot = fcot * duct_weights
                fcsc = fcsc * duct_weights
            V, off = d["V"], d["offsets"]
            for a_ in range(len(V)):
                for b_ in range(len(V)):
                    f = body * self._duct_weights(order, fcot, fcsc, a_, b_)
                    Z[:, off[a_]:off[a_ + 1], off[b_]:off[b_ + 1]] += \
                        (V[a_][None, :, :] * f[:, None, :]) @ V[b_].T
        if head and self.losses is not None:
            Z = Z + self.losses.matrix(i, w, outer=outer, body=body)
        return Z

    def ensure_range(self, i, k_top: float) -> None:
        """Rebuild order i's radiation tables if they do not reach wavenumber k_top (1/m)."""
        d = self.data[i]
        if all((k_top * a) ** 2 <= tmax for (_, _, tmax, _, a) in d["faces"]):
            return
        self.k_max[i] = 1.3 * k_top
        self.data[i] = self._order_data(self.orders[i], self.k_max[i], self.settings)

    def rayleigh(self, idx, x, *, outer, body):
        r"""The scalar :math:`r(\omega) = x^T Z(\omega) x` for vectors x (len idx, size).

        Z is complex symmetric, so this bilinear Rayleigh functional is stationary at an
        eigenvector: its root is second-order accurate in the vector's error. The returned
        function is vectorised over all roots at once (no loop over orders).
        """
        R = len(idx)
        P = max(f[1] for d in self.data for f in d["faces"])
        nheads = len(self.orders[0].heads)
        kx, mx = np.empty(R, complex), np.empty(R, complex)
        cx = np.zeros((nheads, R, P), complex)
        cy = np.zeros((nheads, R, P), complex)
        tmax, scale, rad = np.empty((3, nheads, R))
        duct = body and self.has_duct
        if duct:
            Q = len(self.data[0]["gamma"])
            gamma, norms, depth = np.empty((R, Q)), np.empty((R, Q)), np.empty(R)
            dweight, cross = np.empty(R), np.zeros(R)
            proj = np.zeros((nheads, nheads, R, Q), complex)
        for i, sel in self._groups(idx):
            d, order, xs = self.data[i], self.orders[i], x[sel]
            kx[sel] = np.einsum("rn,nk,rk->r", xs, d["K"], xs)
            mx[sel] = np.einsum("rn,nk,rk->r", xs, d["M"], xs)
            for h, (XY, Ph, tm, sc, a) in enumerate(d["faces"]):
                xh = xs[:, d["offsets"][h]:d["offsets"][h + 1]]
                q = _quad(XY, xh)
                cx[h, sel, :Ph], cy[h, sel, :Ph] = q[:, :Ph], q[:, Ph:]
                tmax[h, sel], scale[h, sel], rad[h, sel] = tm, sc, a
            if duct:
                gamma[sel], norms[sel], depth[sel] = d["gamma"], d["norms"], order.depth
                dweight[sel] = d["weight"]
                ps = [xs[:, d["offsets"][h]:d["offsets"][h + 1]] @ v for h, v in enumerate(d["V"])]
                for a_ in range(len(ps)):
                    for b_ in range(len(ps)):
                        proj[a_, b_, sel] = ps[a_] * ps[b_]
                cross[sel] = order.cross_sign or 0.0
        rho, c = self.rho, self.c
        extra = None if self.losses is None else \
            self.losses.rayleigh(self.which[idx], x, outer=outer, body=body)

        def r(omega):
            k = omega / c
            mass = mx.copy()
            for h in range(nheads):
                ka = k * rad[h]
                T = np.polynomial.chebyshev.chebvander(2.0 * ka * ka / tmax[h] - 1.0, P - 1)
                mass += (outer * rho) * scale[h] * (np.sum(T * cx[h], axis=1)
                                                    - 1j * ka * np.sum(T * cy[h], axis=1))
            val = kx - omega**2 * mass
            if duct:
                fcot, fcsc = duct_terms(k, gamma, depth)
                sc = (rho * dweight)[:, None] * (omega**2)[:, None] / norms
                fcot, fcsc = sc * fcot, sc * fcsc
                if nheads == 1:
                    val = val + body * np.sum((fcot + cross[:, None] * fcsc) * proj[0, 0], axis=1)
                else:
                    for a_ in range(nheads):
                        for b_ in range(nheads):
                            f = fcot if a_ == b_ else fcsc
                            val = val + body * np.sum(f * proj[a_, b_], axis=1)
            if extra is not None:
                val = val + extra(omega)
            return val

        return r


def _cmul(T, X):
    """Complex (R, P) times real (P, n) without a complex copy of X."""
    return T.real @ X + 1j * (T.imag @ X)


def _quad(C, x):
    """x^T C_p x for each root and p: C (P, n*n) real, x (R, n) -> (R, P)."""
    P = C.shape[0]
    n = x.shape[1]
    Cx = C.reshape(P * n, n) @ x.T  # (P n, R)
    return np.einsum("pnr,rn->rp", Cx.reshape(P, n, -1), x)


def _block_diag(blocks):
    n = sum(b.shape[0] for b in blocks)
    out = np.zeros((n, n))
    i = 0
    for b in blocks:
        out[i:i + b.shape[0], i:i + b.shape[0]] = b
        i += b.shape[0]
    return out


# ----------------------------------------------------------------------------- root tracking
def _secant(f, w0, *, tol, max_iter=40):
    """Roots of the vectorised scalar function f near w0 (complex secant)."""
    w0 = np.asarray(w0, dtype=complex)
    w1 = w0 * (1.0 + 1e-5)
    f0, f1 = f(w0), f(w1)
    ok = np.zeros(len(w0), bool)
    for _ in range(max_iter):
        df = f1 - f0
        zero = df == 0
        step = np.where(zero, 0.0, f1 * (w1 - w0) / np.where(zero, 1.0, df))
        w0, f0 = w1, f1
        w1 = w1 - step
        ok = np.abs(step) <= tol * np.abs(w1)
        if np.all(ok):
            break
        f1 = f(w1)
    return w1, ok


def _mnorm(x, M):
    return np.sqrt(np.abs(np.einsum("rn,rnk,rk->r", np.conj(x), M, x)))


def _normalise(x, M):
    """Scale vectors (R, n) to unit M-norm with the largest entry real and positive."""
    big = x[np.arange(len(x)), np.argmax(np.abs(x), axis=1)]
    return x * (np.abs(big) / big / _mnorm(x, M))[:, None]


def _overlap(x, y, M):
    """|x^H M y| / (|x|_M |y|_M), per row."""
    num = np.abs(np.einsum("rn,rnk,rk->r", np.conj(x), M, y))
    return num / (_mnorm(x, M) * _mnorm(y, M))


def _solve_step(rs: RootSet, idx, omega, vecs, *, outer, body, settings):
    """Rayleigh-functional iteration at one continuation point, for roots idx.

    Alternates the scalar root of x^T Z(omega) x (secant) with an inverse-iteration update
    x <- Z(omega)^{-1} M x. Returns (omega, vecs, ok); ok is False where it did not converge
    in ``max_iter`` steps or the vector turned away from the previous step's (a jump to
    another root).
    """
    x, w = vecs.copy(), omega.copy()
    done = np.zeros(len(idx), bool)
    active = np.arange(len(idx))
    change = np.ones(len(idx))  # last relative change of omega, sets the scalar tolerance
    for it in range(settings.max_iter):
        sub = idx[active]
        f = rs.rayleigh(sub, x[active], outer=outer, body=body)
        w_new, ok_s = _secant(f, w[active], tol=np.maximum(0.01 * settings.tol,
                                                            1e-3 * change[active]))
        Keff, Meff = rs.pencil(sub, w_new, outer=outer, body=body)
        rhs = np.einsum("rnk,rk->rn", rs.M[sub], x[active])[:, :, None]
        y = np.linalg.solve(Keff - (w_new**2)[:, None, None] * Meff, rhs)[:, :, 0]
        y = _normalise(y, rs.M[sub])
        change[active] = np.abs(w_new - w[active]) / np.abs(w_new)
        conv = ok_s & (change[active] <= settings.tol) & (it > 0)
        w[active], x[active] = w_new, y
        done[active[conv]] = True
        active = active[~conv]
        if not len(active):
            break
    return w, x, done & np.isfinite(w) & (w.real > 0)


def _accept(rs, state, roots, w, v, ok):
    """Which continued roots are still themselves.

    A root passes if it converged, its vector still resembles its previous one (overlap
    > 0.5) and resembles it more than any other tracked root's of its order (so a pair that
    hybridises must rotate by less than 45 degrees per step), and no two roots of one order
    sit on the same resonance. Otherwise the step is halved.
    """
    omega, vecs = state
    ok = ok & (_overlap(v, vecs[roots], rs.M[roots]) > 0.5)
    for i in np.unique(rs.which[roots]):
        mine = np.nonzero(rs.which[roots] == i)[0]  # positions in ``roots``
        peers = np.nonzero(rs.which == i)[0]  # all roots of the order
        M = rs.M[peers[0]]
        old = vecs[peers]
        new_v = old.copy()
        new_w = omega[peers].copy()
        where = np.searchsorted(peers, roots[mine])
        new_v[where], new_w[where] = v[mine], w[mine]
        mo, mn = old @ M, new_v @ M
        O = np.abs(np.conj(new_v) @ mo.T)
        O /= np.sqrt(np.abs(np.einsum("rn,rn->r", np.conj(new_v), mn)))[:, None]
        O /= np.sqrt(np.abs(np.einsum("rn,rn->r", np.conj(old), mo)))[None, :]
        own = np.argmax(O[where], axis=1) == where
        same = np.abs(new_w[:, None] - new_w[None, :]) <= 1e-6 * np.abs(new_w)[:, None]
        np.fill_diagonal(same, False)
        ok[mine] &= own & ~same[where].any(axis=1)
    return ok


def _advance(rs, state, roots, start, target, *, settings, depth=0, final=True):
    """Move roots from parameter point start to target (outer, body), halving the step where
    a root fails; raises SolverError when halving does not help. Points short of the end
    of the path (final False) are solved to a loose tolerance only: they are starts."""
    omega, vecs = state
    step_settings = settings if final else replace(settings, tol=max(settings.tol, 1e-4))
    w, v, ok = _solve_step(rs, roots, omega[roots], vecs[roots], outer=target[0],
                           body=target[1], settings=step_settings)
    ok = _accept(rs, state, roots, w, v, ok)
    # an order moves as a whole: if one of its roots fails, all of it retries with a
    # shorter step (a root that jumped onto a neighbour's path may have passed the checks)
    failed = np.isin(rs.which[roots], rs.which[roots][~ok])
    good = roots[~failed]
    omega[good], vecs[good] = w[~failed], v[~failed]
    bad = roots[failed]
    if len(bad):
        if depth >= 10:
            ms = sorted({rs.orders[i].m for i in rs.which[bad]})
            raise SolverError(
                f"coupled solve did not converge (orders m = {ms}, air scale {target}, roots "
                f"near {np.round(omega[bad].real / (2 * np.pi), 2).tolist()} Hz)")
        mid = (0.5 * (start[0] + target[0]), 0.5 * (start[1] + target[1]))
        _advance(rs, state, bad, start, mid, settings=settings, depth=depth + 1, final=False)
        _advance(rs, state, bad, mid, target, settings=settings, depth=depth + 1, final=final)


def track_roots(rs: RootSet, omega0, vectors0, *, settings: Settings = DEFAULT):
    """Complex roots continued from in-vacuum starts: outside air on, then the body's air.

    Parameters
    ----------
    rs : RootSet
        All the drum's orders and roots.
    omega0 : array_like
        In-vacuum angular frequencies (rad/s), one per root.
    vectors0 : array_like
        In-vacuum Ritz vectors, (R, size).
    settings : Settings

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Complex omega (R,) in rad/s (Im omega > 0: decaying) and Ritz vectors (R, size).

    Raises
    ------
    SolverError
        If a root does not converge, or two roots end on the same resonance.
    """
    omega = np.array(omega0, dtype=complex)
    vecs = _normalise(np.array(vectors0, dtype=complex), rs.M)
    path = [(0.0, 0.0), (1.0, 0.0)]
    if rs.has_duct:
        # the body's air is switched on in steps; a very stiff air spring (Raichel's B =
        # rho c^2 pi a^4 / (T V) far above 10) moves the (0,n) roots far, so it gets
        # geometric steps from a small fraction
        b = rs.air_spring
        fractions = [0.5, 1.0] if b <= 16 else list(4.0 ** np.arange(np.ceil(np.log(b / 4) / np.log(4)) + 1)
                                                     * 4.0 / b)[:-1] + [1.0]
        path += [(1.0, float(f)) for f in fractions if f <= 1.0]
    roots = np.arange(len(omega))
    for start, target in zip(path[:-1], path[1:]):
        _advance(rs, (omega, vecs), roots, start, target, settings=settings,
                 final=target == path[-1])
    for i in np.unique(rs.which):
        w = np.sort_complex(omega[rs.which == i])
        same = np.abs(np.diff(w)) <= 1e-8 * np.abs(w[1:])
        if np.any(same):
            raise SolverError(f"two roots of order m = {rs.orders[i].m} converged to the same "
                              f"resonance near {w[1:][same][0].real / (2 * np.pi):.2f} Hz")
    return omega, vecs


# ----------------------------------------------------------------------------- the drum
def _identical(h1, h2) -> bool:
    return h1.vibrates_like(h2)  # one home: membrane.drum.Head.vibrates_like


def _orders(drum, *, m_max: int, n_max: int, settings: Settings):
    """The eigenproblems of a drum, and each root's start: (orders, which, omega0, x0, tags)."""
    body, head, res = drum.body, drum.head, drum.resonant_head
    count = n_max + settings.extra_modes
    a = head.radius
    kind = body.kind
    # Drum holds its own invariants (a kettle has a volume, a shell a depth and a resonant head
    # of the same diameter), so nothing is re-validated here
    depth, faces = (drum.air_depth, 1) if kind in ("kettle", "shell") else (None, 2)
    orders, which, omega0, x0, tags = [], [], [], [], []
    for m in range(m_max + 1):
        h1 = HeadOrder(head, m=m, count=count, rim=settings.rim)
        if kind != "shell":
            groups = [(Order(m, [h1], faces, depth), [(h1, 0, None)])]
        elif _identical(head, res):
            groups = [(Order(m, [h1], faces, depth, cross_sign=+1), [(h1, 0, "in-phase")]),
                      (Order(m, [h1], faces, depth, cross_sign=-1), [(h1, 0, "opposed")])]
        else:
            h2 = HeadOrder(res, m=m, count=count, rim=settings.rim, radius=a)
            groups = [(Order(m, [h1, h2], faces, depth), [(h1, 0, "struck"), (h2, h1.size, "resonant")])]
        for order, starts in groups:
            orders.append(order)
            size = sum(h.size for h in order.heads)
            for h, offset, tag in starts:
                for n in range(n_max):
                    which.append(len(orders) - 1)
                    omega0.append(h.omega[n])
                    x = np.zeros(size)
                    x[offset + n] = 1.0
                    x0.append(x)
                    tags.append((m, n + 1, tag))
    return orders, which, omega0, x0, tags


@dataclass
class OrderRoots:
    """The roots of one order, weighed and labelled.

    Attributes
    ----------
    order : Order
    omega : numpy.ndarray
        Complex angular frequencies, rad/s, ascending in real part.
    vectors : numpy.ndarray
        Ritz vectors (R, size), unit M-norm.
    head_fraction : numpy.ndarray
        Share of each root's energy in the head(s) (spectrum.head_fractions).
    labels : list
        Per root: ("head", head index, n) for the root that is most the in-vacuum mode n of
        that head, ("air", q, p) for a root that is mostly the body's air (duct mode q
        radially, p half-waves along the depth), or None for a root left out (a head mode
        above n_max).
    """

    order: Order
    omega: np.ndarray
    vectors: np.ndarray
    head_fraction: np.ndarray
    labels: list


def _mode_energy(order, vectors) -> np.ndarray:
    """Energy share of each root in each in-vacuum mode of each head: (R, heads, modes)."""
    parts = []
    for h, head in enumerate(order.heads):
        lo = sum(x.size for x in order.heads[:h])
        coef = np.array([head.unit.to_basis(v[lo: lo + head.size]) for v in vectors])
        mass = head.head.areal_density * head.radius**2 * head.unit.basis.modal_mass
        parts.append(np.abs(coef) ** 2 * mass[None, :])
    e = np.stack(parts, axis=1)
    total = e.sum(axis=(1, 2))
    return e / np.where(total > 0, total, 1.0)[:, None, None]


def _mode_amplitudes(order, vectors, n_max: int):
    """Mass-weighted amplitudes of in-vacuum modes 1..n_max on the two heads, each (R, n_max)."""
    out = []
    for h, head in enumerate(order.heads):
        lo = sum(x.size for x in order.heads[:h])
        coef = np.array([head.unit.to_basis(v[lo: lo + head.size])[:n_max] for v in vectors])
        mass = head.head.areal_density * head.radius**2 * head.unit.basis.modal_mass[:n_max]
        out.append(coef * np.sqrt(mass)[None, :])
    return out[0], out[1]


def _covered(order, omega, vectors, frac, top: float, n_max: int) -> bool:
    """Whether the roots found below angular frequency ``top`` hold each head's first n_max
    in-vacuum modes (their energy shares, weighted by head fraction, add up to 0.6 or more
    over the roots) with room above the highest (a factor 1.25)."""
    e = _mode_energy(order, vectors)[:, :, :n_max] * frac[:, None, None]
    if np.all(e.sum(axis=0) >= 0.6):
        best = np.argmax(e, axis=0)  # the root holding most of each mode
        if top >= 1.25 * np.max(omega[best].real):
            return True
    # a body that reshapes the modes (a very stiff air spring) spreads each in-vacuum mode
    # over many roots: then enough head-like roots, with room above, is the test
    need = n_max * len(order.heads)
    head_like = np.sort(omega[frac >= 0.5].real)
    return bool(np.sum(frac) >= need + 0.5 and len(head_like) >= need
                and top >= 1.25 * head_like[need - 1])


def label_roots(order, omega, vectors, frac, *, n_max: int, sound_speed: float) -> list:
    """Labels for one order's roots (see :class:`OrderRoots`).

    Head mode (h, n) goes to the root holding most of its energy, weighted by the root's head
    fraction, by an optimal assignment over all the order's roots: through an avoided
    crossing with an air resonance the label passes from one root to the other where the two
    are equally that mode (docs/mode-identity.md). The other roots below the order's highest
    head mode that are mostly air (head fraction < 0.5) are air rows, named by the nearest
    rigid-walled resonance of the body.
    """
    from ..assignment import linear_sum_assignment  # scipy's algorithm without scipy.optimize's import

    R = len(omega)
    labels = [None] * R
    if not R:
        return labels
    e = _mode_energy(order, vectors)[:, :, :n_max] * frac[:, None, None]
    heads = len(order.heads)
    top = -np.inf
    if heads == 1:
        rows, cols = linear_sum_assignment(-e[:, 0, :])
        # the chosen roots take n in order of frequency (a body that reshapes the modes
        # spreads each in-vacuum mode over several roots; the order is what stays)
        for n, (_, r) in enumerate(sorted((omega[r].real, r) for r in rows)):
            labels[r] = ("head", 0, n + 1)
            top = max(top, omega[r].real)
    else:
        # two heads of one shell: (m,n) is a pair of roots, the two holding most of the
        # heads' mode n together (so nearly equal heads, whose roots share both heads,
        # approach the identical pair continuously); each root is named after the head
        # that holds more of it
        pair = e.sum(axis=1)
        # one in-phase and one opposed member per pair, as the symmetric solve of identical
        # heads has: s = 2 Re(a b*) / (|a|^2 + |b|^2) over the mode's two coefficients
        # (mass-weighted) is +1 in phase, -1 opposed, 0 where one head holds the root
        a, b = _mode_amplitudes(order, vectors, n_max)
        s = 2.0 * np.real(a * np.conj(b)) / np.maximum(np.abs(a) ** 2 + np.abs(b) ** 2, 1e-300)
        score = np.empty((R, 2 * n_max))
        score[:, 0::2] = pair * 0.5 * (1.0 + s)
        score[:, 1::2] = pair * 0.5 * (1.0 - s)
        rows, cols = linear_sum_assignment(-score)
        members = {}
        for r, c in zip(rows, cols):
            members.setdefault(int(c // 2), []).append(r)
            top = max(top, omega[r].real)
        for n, rs_ in members.items():
            share = [e[r, 0, n] / max(pair[r, n], 1e-300) for r in rs_]
            for k, r in enumerate(sorted(rs_, key=lambda r: -share[rs_.index(r)])):
                labels[r] = ("head", min(k, 1), n + 1)
    if order.depth is not None:
        air = [r for r in range(R) if labels[r] is None and frac[r] < 0.5 and omega[r].real <= top]
        if air:
            gamma = order_duct_gammas(order, count=len(air) + 4)
            cands = [(q, p, sound_speed * np.hypot(g, p * np.pi / order.depth))
                     for q, g in enumerate(gamma) for p in range(len(air) + 4)]
            cost = np.array([[abs(np.log(omega[r].real / max(c[2], 1e-30))) for c in cands]
                             for r in air])
            ra, ca = linear_sum_assignment(cost)
            for i, j in zip(ra, ca):
                labels[air[i]] = ("air", cands[j][0], cands[j][1])
    return labels


def order_duct_gammas(order, *, count: int) -> np.ndarray:
    """Transverse wavenumbers of the body's duct modes of this order, 1/m."""
    return duct_wavenumbers(m=order.m, count=count, radius=order.heads[0].radius)


def _families(drum, *, m_max: int, n_max: int, settings: Settings):
    """The drum's eigenproblems (one per order, two per order for identical shell heads)."""
    orders, _, _, _, tags = _orders(drum, m_max=m_max, n_max=n_max, settings=settings)
    return orders


def solve_drum(drum, *, m_max: int, n_max: int, settings: Settings = DEFAULT,
               losses=None, only=None) -> list:
    """Every root of every order of a drum, weighed and labelled: a list of OrderRoots.

    Roots come from the contour solve of spectrum.py in a window that grows until each
    order's n_max head modes (per head) are inside; nothing is continued from a guess.
    ``only`` (an m) solves that order alone.
    """
    from . import spectrum

    orders = _families(drum, m_max=m_max, n_max=n_max, settings=settings)
    if only is not None:
        orders = [o for o in orders if o.m == only]
    air = (drum.air.density, drum.air.sound_speed)
    k_max = [1.6 * max(h.omega[n_max] for h in o.heads) / air[1] for o in orders]
    rs = RootSet(orders, np.arange(len(orders)), air=air, settings=settings, k_max=k_max,
                 losses=losses)
    out = []
    for i, order in enumerate(orders):
        lowest = min(h.omega[0] for h in order.heads)
        top = max(h.omega[n_max - 1] for h in order.heads)
        omega, vecs, frac = spectrum.scan_order(
            rs, i, covered=lambda w, v, f, hi, o=order: _covered(o, w, v, f, hi, n_max),
            lowest=lowest, tol=settings.tol, rounds=settings.max_iter, ceiling=60.0 * top)
        labels = label_roots(order, omega, vecs, frac, n_max=n_max, sound_speed=air[1])
        out.append(OrderRoots(order, omega, vecs, frac, labels))
    return out


def decay_time(omega: complex) -> float:
    """T60 in s from a complex angular frequency: 3 ln 10 / Im omega.

    A decay rate within round-off of zero (|Im omega| below spectrum.ROUND_OFF of |omega|,
    either sign) is no loss at all: T60 is infinite (tables show it as beyond their limit).
    """
    from .spectrum import ROUND_OFF

    if omega.imag <= ROUND_OFF * abs(omega):
        return math.inf
    return LN1000 / omega.imag


def full_modes(drum, *, m_max: int, n_max: int, settings: Settings = DEFAULT,
               losses=None, air: bool = False) -> list:
    """Modes of a drum with air on its faces and in its body (``--physics full``).

    Parameters
    ----------
    drum : membrane.drum.Drum
        The drum (body ``none``: air on both faces; ``kettle``; ``shell`` with a resonant head).
    m_max, n_max : int
        Orders 0..m_max and n = 1..n_max per order (and per branch for a shell).
    settings : Settings
        Numerical settings; the defaults converge the frequencies to about 1e-5 or better.
    losses : membrane.losses.Losses or None
        Losses besides radiation (film, air boundary layers, rim: dissipation.py); None
        for radiation damping only.

    Returns
    -------
    list of membrane.modes.Mode
        (m, n) is the root that is most the in-vacuum mode (m, n) (see :func:`label_roots`);
        for a shell each (m, n) appears once per branch, ``"in-phase"`` or ``"opposed"``.
        Decay is T60 from radiation damping only. With ``air``, the roots that are mostly
        the body's air are rows of their own (kind "air", n = -1, -2, ... in order of
        frequency within their m, a key no head mode has).
    """
    from ..modes import Mode

    solved = solve_drum(drum, m_max=m_max, n_max=n_max, settings=settings, losses=losses)
    bases = {}
    out = []
    pair = {}
    for od in solved:
        order = od.order
        m = order.m
        h1 = order.heads[0]
        if m not in bases:
            bases[m] = h1.basis()
        for r, lab in enumerate(od.labels):
            if lab is None or (lab[0] == "air" and not air):
                continue
            kind, air_mode = "head", None
            if lab[0] == "air":  # n = -1, -2, ... up the order: a key of its own, never a head's
                n_air = sum(1 for lb in od.labels[:r + 1] if lb is not None and lb[0] == "air")
                kind, air_mode, hidx, n = "air", (lab[1], lab[2]), 0, -n_air
            else:
                _, hidx, n = lab
            x = od.vectors[r]
            coef = h1.unit.to_basis(x[: h1.size])
            res_coef = res_basis = None
            branch = head = None
            if drum.body.kind == "shell":
                if order.cross_sign is not None:
                    branch = "in-phase" if order.cross_sign > 0 else "opposed"
                    res_coef = coef * order.cross_sign
                    res_basis = bases[m]
                else:
                    h2 = order.heads[1]
                    res_coef = h2.unit.to_basis(x[h1.size:])
                    if kind == "head":
                        head = "struck" if hidx == 0 else "resonant"
                        pair.setdefault((m, n), []).append(len(out))
                    res_basis = h2.basis()
            scale = np.max(np.abs(coef)) if res_coef is None else max(np.max(np.abs(coef)),
                                                                      np.max(np.abs(res_coef)))
            w = complex(od.omega[r])
            out.append(Mode(m=m, n=n, frequency=w.real / (2 * np.pi), decay=decay_time(w),
                            multiplicity=1 if m == 0 else 2, omega=w,
                            coefficients=coef / scale, basis=bases[m], branch=branch, head=head,
                            resonant_coefficients=None if res_coef is None else res_coef / scale,
                            resonant_basis=res_basis, kind=kind,
                            head_fraction=float(od.head_fraction[r]), air_mode=air_mode))
    for (m, n), (i, j) in pair.items():  # unequal heads: label the pair's branches
        s = [_phase_score(out[k], n) for k in (i, j)]
        hi, lo = (i, j) if s[0] >= s[1] else (j, i)
        out[hi] = replace(out[hi], branch="in-phase")
        out[lo] = replace(out[lo], branch="opposed")
    return out


def _phase_score(mode, n) -> float:
    """Signed agreement of the two heads' outward displacement in the pair's own shape n."""
    a, b = mode.coefficients[n - 1], mode.resonant_coefficients[n - 1]
    den = abs(a) * abs(b)
    return float(np.real(a * np.conj(b)) / den) if den > 0 else 0.0


def model_notes(drum, losses=None) -> list[str]:
    """What the full model includes and leaves out, for output (``losses`` as for
    :func:`full_modes`)."""
    from ..losses import decay_note

    notes = ["air loading from baffled radiation on each open face (an infinite rigid baffle "
             "at the rim: approximate for a drum without one)", decay_note(losses)]
    kind = drum.body.kind
    if kind == "kettle":
        notes.append("kettle modelled as a rigid cylinder of the bowl's volume under the head: "
                     "the bowl's shape enters only through its volume")
    elif kind == "shell":
        notes.append("shell modelled as a rigid cylinder of the given depth with a head at each "
                     "end, coupled through the enclosed air (in-phase / opposed pairs)")
    else:
        notes.append("no body: air on both faces of the head")
    if drum.head.bending_stiffness > 0:
        notes.append("bending stiffness of the film included (exact stiff in-vacuum modes)")
    return notes
