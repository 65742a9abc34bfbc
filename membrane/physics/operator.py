r"""The coupled operator Z(omega) of one angular order: the head(s) and the air around them.

On the Ritz space (ritz.py), with q the Ritz coordinates,

.. math::

    Z(\omega)\,q = \big[K + S(\omega) - \omega^2 (M + A_{out}(\omega/c))\big]\,q = 0,

A_out the baffled radiation matrix of each open face (radiation.py; both faces when there is no
body), S the body's interior air (cavity.py, as a sum over the duct modes), and losses besides
radiation as operator terms (dissipation.py). Roots are complex, :math:`\omega = \omega_r +
i\omega_i` with time dependence :math:`e^{i\omega t}`. The radiation matrices come from
Chebyshev tables in :math:`(ka)^2` that depend on dimensionless geometry only: computed once
per process per shape of Ritz space and kept on disk between processes (table_cache.py).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..errors import SolverError
from . import dissipation, table_cache
from .cavity import duct_norms, duct_terms, duct_wavenumbers
from .radiation import Quadrature, RadiationTable
from .ritz import RitzSpace
from .vacuum import RadialBasis, ideal_basis, stiff_basis


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
class Shape:
    """Dimensionless description of a head's Ritz space: the cache key."""

    m: int
    count: int
    rim: bool
    s: float | None  # T a^2 / D, None for no bending stiffness
    edge: str
    nu: float


def shape_of(head, *, m: int, count: int, rim: bool) -> Shape:
    d = head.bending_stiffness
    s = None if d <= 0 else float(head.tension * head.radius**2 / d)
    return Shape(m, count, rim, s, head.edge, float(head.poisson_ratio))


# Smallest part of the rim function outside the span of the in-vacuum modes (relative, in the
# mass norm) at which it is kept. Its direction chi - sum_n p_n phi_n has mass eps^2 relative to
# chi's own, so every matrix of the space is singular to eps^2 along it; the air's matrices
# (radiation tables, converged to 1e-11 of their largest term, radiation.py) carry errors of
# that size, which swamp the direction once eps^2 is below them and there put spurious, heavily
# damped roots: a generated 10-inch shell near its slack limit (benchmarks/sweep_drums.py seed 7
# drum 3, T a^2/D = 31, m = 0, 19 modes: eps = 1.95e-6, eps^2 = 3.8e-12) had 130 of them near
# 55 + 9j Hz. eps >= 1e-5 keeps eps^2 ten times above that error. Below it the rim function is
# replaced by the next in-vacuum mode (same size, so every order of a drum keeps one size). It
# is no free change: that drum's m = 0 head roots then converge in the number of modes as
# without a rim function, 2e-7..7.5e-6 from a 56-mode solve (the air-stiffened opposed (0,1)
# worst), where 11 modes and the rim function (eps above the floor) came within 1.5e-7; but
# the cloud is gone (tests/test_ritz_rim.py). Re-orthogonalising chi instead does not help:
# its outside part's mass and stiffness would be differences cancelling to 1e-16 / eps^2.
# Every built-in drum's head has eps >= 2.4e-5 for m <= 20 with up to 26 modes (tested), so
# their spaces and rows are unchanged.
RIM_RESIDUAL_FLOOR = 1e-5


def _unit_ritz(shape: Shape, count: int, rim: bool) -> RitzSpace:
    if shape.s is None:
        basis = ideal_basis(m=shape.m, count=count, radius=1.0, tension=1.0,
                            areal_density=1.0)
    else:
        basis = stiff_basis(m=shape.m, count=count, radius=1.0, tension=shape.s,
                            areal_density=1.0, bending_stiffness=1.0,
                            poisson_ratio=shape.nu, edge=shape.edge)
    return RitzSpace(basis, edge=shape.edge, poisson_ratio=shape.nu, rim=rim)


@lru_cache(maxsize=512)
def unit_space(shape: Shape) -> RitzSpace:
    """The Ritz space of radius 1, areal density 1 and tension 1 (or s with D = 1).

    With ``shape.rim``, the rim function is kept unless it lies within
    :data:`RIM_RESIDUAL_FLOOR` of the modes' span; then the space is ``count + 1`` in-vacuum
    modes instead (same size, ``rim`` False).
    """
    space = _unit_ritz(shape, shape.count, shape.rim)
    if shape.rim and space.rim_residual < RIM_RESIDUAL_FLOOR:
        space = _unit_ritz(shape, shape.count + 1, False)
    return space


@lru_cache(maxsize=512)
def unit_table(shape: Shape, ka_max: float, quadrature: Quadrature) -> RadiationTable:
    """Radiation table of :func:`unit_space` up to k a = ka_max.

    Depends on dimensionless geometry only, so it is computed once per process and shared
    by every drum whose head has the same shape of basis (cached), and its Chebyshev
    coefficients are kept on disk between processes (table_cache.py; exact keys, so a table
    read back is the one a fresh build gives, bit for bit).
    """
    space = unit_space(shape)
    # keyed by the space actually built (the rim function may have given way to one more mode)
    name = table_cache.key("radiation-table", shape, space.rim, space.modes, float(ka_max), quadrature)
    stored = table_cache.load(name, {"x": (None, space.size, space.size),
                                     "y": (None, space.size, space.size), "k_max": ()})
    if (stored is not None and float(stored["k_max"]) == ka_max
            and stored["x"].shape == stored["y"].shape and len(stored["x"]) > 0):
        return RadiationTable.from_coefficients(space, k_max=ka_max, x=stored["x"], y=stored["y"])
    table = RadiationTable(space, k_max=ka_max, quadrature=quadrature)
    table_cache.store(name, x=table._x, y=table._y, k_max=np.array(table.k_max))
    return table


@lru_cache(maxsize=512)
def unit_duct(shape: Shape, count: int):
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
        self.shape = shape_of(head, m=m, count=count, rim=rim)
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
        g, nrm, v = unit_duct(self.shape, count)
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
    """The operators Z(omega) of a drum's orders, ready to evaluate at many omega at once.

    Each order keeps its own matrices (the Chebyshev coefficients of its radiation tables and
    its duct overlaps), so evaluating Z at a batch of frequencies is a few matrix products.

    Parameters
    ----------
    orders : list of Order
        All of the same Ritz-space size.
    air : (density, sound_speed)
        kg/m^3, m/s (outside and inside alike).
    settings : Settings
    k_max : sequence of float
        Largest acoustic wavenumber needed per order, 1/m (sets the radiation tables' range).
    losses : membrane.losses.Losses or None
        Losses besides radiation (dissipation.py), or None for radiation only.
    """

    def __init__(self, orders, *, air, settings: Settings, k_max, losses=None):
        self.rho, self.c = air
        self.orders = orders
        self.settings = settings
        self.k_max = list(k_max)
        self.data = [self._order_data(o, km, settings) for o, km in zip(orders, k_max)]
        sizes = {d["K"].shape[0] for d in self.data}
        if len(sizes) != 1:
            raise SolverError("internal: orders of different sizes in one root set")
        self.size = sizes.pop()
        self.losses = None if losses is None else dissipation.RootLosses(self, losses)

    def _order_data(self, order, kmax, settings):
        d = {"K": block_diag([h.K for h in order.heads]),
             "M": block_diag([h.M for h in order.heads]),
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

    def _duct_terms(self, d, depth, omega):
        fcot, fcsc = duct_terms(omega / self.c, d["gamma"], depth)
        scale = (self.rho * d["weight"]) * (omega**2)[:, None] / d["norms"][None, :]
        return scale * fcot, scale * fcsc

    def _duct_weights(self, order, fcot, fcsc, i, j):
        if order.cross_sign is not None:
            return fcot + order.cross_sign * fcsc
        return fcot if i == j else fcsc

    def order_operator(self, i, omega, *, outer: float = 1.0, body: float = 1.0,
                       head: bool = True, skip_ducts: int = 0, only_ducts: int | None = None,
                       duct_weights=None):
        r"""Z(omega) of order i, N/m: (len omega, size, size) complex.

        ``outer`` and ``body`` scale the outside and inside air (0 switches them off);
        ``head`` False leaves out K - omega^2 M (with outer 0: the body's S alone);
        ``skip_ducts`` leaves out the lowest duct modes, and the walls' loss on their
        fields (the contour solve gives them unknowns of their own, spectrum.py);
        ``only_ducts`` keeps only the lowest ones; ``duct_weights`` scales each duct mode's
        term.
        """
        d, order = self.data[i], self.orders[i]
        w = np.atleast_1d(np.asarray(omega, dtype=complex))
        n, P = self.size, len(w)
        if head:  # complex already (w is): no copy of it
            Z = (np.broadcast_to(d["K"], (P, n, n)) - (w**2)[:, None, None] * d["M"][None]).astype(complex, copy=False)
        else:
            Z = np.zeros((P, n, n), complex)
        k = w / self.c
        if outer:
            basis = {}  # two heads of one radius and table range share their Chebyshev values
            for h, (XY, Pd, tmax, scale, a) in enumerate(d["faces"]):
                lo, hi = d["offsets"][h], d["offsets"][h + 1]
                ka = k * a
                if (a, Pd, tmax) not in basis:
                    T = np.polynomial.chebyshev.chebvander(2.0 * ka * ka / tmax - 1.0, Pd - 1)
                    basis[a, Pd, tmax] = np.hstack([T, -1j * ka[:, None] * T])
                TT = (outer * self.rho * scale) * basis[a, Pd, tmax]
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
            Z += self.losses.matrix(i, w, outer=outer, body=body, skip=skip_ducts)
        return Z

    def ensure_range(self, i, k_top: float) -> None:
        """Rebuild order i's radiation tables if they do not reach wavenumber k_top (1/m)."""
        d = self.data[i]
        if all((k_top * a) ** 2 <= tmax for (_, _, tmax, _, a) in d["faces"]):
            return
        self.k_max[i] = 1.3 * k_top
        self.data[i] = self._order_data(self.orders[i], self.k_max[i], self.settings)

def _cmul(T, X):
    """Complex (R, P) times real (P, n) without a complex copy of X."""
    return T.real @ X + 1j * (T.imag @ X)


def block_diag(blocks):
    """A real block-diagonal matrix from square blocks."""
    n = sum(b.shape[0] for b in blocks)
    out = np.zeros((n, n))
    i = 0
    for b in blocks:
        out[i:i + b.shape[0], i:i + b.shape[0]] = b
        i += b.shape[0]
    return out
