r"""Modes of an unevenly tensioned head: which degenerate pairs split, by how much, which way.

The head obeys :math:`D\nabla^4 w - \nabla\cdot(N\nabla w) = \sigma\omega^2 w` with the
membrane forces N of :mod:`membrane.physics.prestress`: a uniform part :math:`T_0 I` and the
uneven part :math:`\delta N` from the rim-tension harmonics :math:`k \ge 1`.

*Exact (Ritz).* Expand w over the in-vacuum modes of the uniform head at :math:`T_0`
(ideal or stiff), in complex form :math:`\phi_{|m|n}(r) e^{im\theta}`, all orders
:math:`-M \le m \le M` together. In this basis the uniform operator is diagonal,
:math:`K^0 = M\,\omega_{mn}^2` (modal masses :math:`M = 2\pi\sigma\int\phi^2 r\,dr`), and

.. math:: \delta K_{ab} = 2\pi\,\hat c_h \int_0^a \Big[f^{rr}_{|h|}\phi_a'\phi_b'
          + \mathrm{sgn}(h)\, f^{r\theta}_{|h|}\,(m_b\phi_a'\tfrac{\phi_b}{r} - m_a\tfrac{\phi_a}{r}\phi_b')
          + f^{\theta\theta}_{|h|}\, m_a m_b \tfrac{\phi_a\phi_b}{r^2}\Big] r\,dr,

with :math:`h = m_a - m_b`, :math:`\hat c_h = c_h/2` (:math:`\bar c_{|h|}/2` for h < 0) the
rim harmonics :math:`c_k = A_k - iB_k` and f the Michell radial profiles. The angular
integral is done exactly (it only selects h); the radial one by Gauss-Legendre quadrature.
The Hermitian problem :math:`(K^0 + \delta K) v = \omega^2 M v` is solved whole, and each
root is named by the basis label carrying most of its energy (an assignment, so each
degenerate label gets its two roots).

*First order.* Of :math:`\delta K` only the 2x2 block of a pair :math:`(\pm m, n)` matters:
its diagonal is zero (the uneven part has no mean) and its corner is the harmonic 2m, so

.. math:: \frac{f_\pm}{f_{mn}} = 1 \pm \tfrac12 W_{mn}\frac{|c_{2m}|}{T_0},\qquad
          W_{mn} = \frac{T_0 \int [f^{rr}_{2m}\phi'^2 - 2m f^{r\theta}_{2m}\phi'\phi/r
          - m^2 f^{\theta\theta}_{2m}\phi^2/r^2]\, r\,dr}{\sigma\omega_{mn}^2\int\phi^2 r\,dr},

and the higher member has its antinodes at :math:`\theta = -\arg(c_{2m})/(2m)` (mod
:math:`\pi/m`): where the 2m-th harmonic of the rim tension peaks. A pair sees only the
2m-th harmonic at first order; the mean :math:`T_0` moves all modes together; harmonic 1 (a
tilt of the rim tension) splits nothing at first order.

*Air and body.* The coupled (full-physics) solve is not repeated with the uneven stress:
each pair's relative split is applied to the coupled frequency of the uniform head at
:math:`T_0`. To first order that is exact when the air loading does not change the mode's
shape: with :math:`\omega^2 = K/(M + A)` a change of K alone moves
:math:`\delta\omega/\omega = \delta K / 2K` whatever the added mass A. It is an
approximation for modes the air reshapes (the (0,n) modes with a kettle, which do not split).

One module of a little over 400 lines on purpose: the exact and the first-order methods are one
model (the same basis, quadrature and stress integrals, the first order being the 2x2 block
of the exact matrix), and the tests compare them against each other.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from scipy import linalg, optimize, special

from ..errors import InputError
from ..notation import cents
from ..renamed import renamed_attribute
from ..physics.vacuum import RadialBasis, i_hat, ideal_basis, stiff_basis
from .prestress import RimTension, stress_profiles

RADIAL_NODES = 96  # Gauss-Legendre nodes in r: J_m(j_mn r / a) for m, n in the basis
EXTRA_N = 4  # radial basis functions beyond n_max per order
EXTRA_M_MIN = 3  # orders beyond m_max, at least; more when the rim has higher harmonics
EXTRA_M_MAX = 10
SPLIT_FLOOR = 1e-12  # relative splits below this are round-off: orientation undefined

NOTE_FIRST_ORDER = ("splits to first order in the unevenness: each pair sees only the 2m-th "
                    "harmonic of the rim tension")
NOTE_EXACT = "splits from a Ritz solve of the uneven head with all angular orders coupled"
NOTE_AIR = ("air loading and the body: each pair's relative split from the in-vacuum uneven head "
            "is applied to the coupled frequency of the uniform head at the mean tension "
            "(first order; the air is assumed not to reshape the split modes)")


@dataclass(frozen=True)
class Split:
    """One (m, n) mode of the uneven head: a pair that splits (m >= 1) or a single (m = 0).

    Attributes
    ----------
    m, n : int
    low_frequency, high_frequency : float
        The two members' frequencies in Hz (equal for m = 0).
    uniform_frequency : float
        The uniform head's frequency at the mean tension, Hz.
    orientation_deg : float or None
        Angle of one nodal diameter of the higher member, degrees from lug 1 in the lugs'
        counting direction, in [0, 180/m); the lower member has a nodal diameter
        90/m degrees further on. None for m = 0 or a split below round-off.

    ``low_hz``, ``high_hz``, ``uniform_hz`` and ``beat_hz`` are the older names.
    """

    m: int
    n: int
    low_frequency: float
    high_frequency: float
    uniform_frequency: float
    orientation_deg: float | None

    @property
    def beat_frequency(self) -> float:
        """high - low in Hz: the beat rate heard."""
        return self.high_frequency - self.low_frequency

    @property
    def cents(self) -> float:
        """The split in cents."""
        return cents(self.high_frequency, self.low_frequency)

    @property
    def relative(self) -> float:
        """(high - low) / uniform, dimensionless."""
        return self.beat_frequency / self.uniform_frequency

    @property
    def high_antinode_deg(self) -> float | None:
        """Angle of an antinode of the higher member in degrees, [0, 180/m)."""
        if self.orientation_deg is None:
            return None
        return (self.orientation_deg + 90.0 / self.m) % (180.0 / self.m)

    low_hz = renamed_attribute("Split.low_hz", "low_frequency")
    high_hz = renamed_attribute("Split.high_hz", "high_frequency")
    uniform_hz = renamed_attribute("Split.uniform_hz", "uniform_frequency")
    beat_hz = renamed_attribute("Split.beat_hz", "beat_frequency")


@lru_cache(maxsize=8)
def _nodes(count: int, radius: float) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre radii on [0, a] (m) and weights times r (r dr, m^2)."""
    x, w = np.polynomial.legendre.leggauss(count)
    r = 0.5 * radius * (x + 1.0)
    return r, 0.5 * radius * w * r


def _basis(head, *, m: int, count: int, tension: float, stiff: bool) -> RadialBasis:
    if stiff and head.bending_stiffness > 0:
        return stiff_basis(m=m, count=count, radius=head.radius, tension=tension,
                           areal_density=head.areal_density, bending_stiffness=head.bending_stiffness,
                           poisson_ratio=head.poisson_ratio, edge=head.edge)
    return ideal_basis(m=m, count=count, radius=head.radius, tension=tension,
                       areal_density=head.areal_density)


def _slope(basis: RadialBasis, r: np.ndarray) -> np.ndarray:
    """d phi_n / dr on radii r (1/m times the shape's unit), shape (N, len(r))."""
    m = basis.m
    out = basis.k1[:, None] * special.jvp(m, np.outer(basis.k1, r))
    if basis.k2 is not None:
        a = basis.radius
        for i in range(basis.size):
            k2 = basis.k2[i]
            # I_m' = I_{m+1} + (m / x) I_m, both scaled by I_m(k2 a) as in _i_hat
            up = special.ive(m + 1, k2 * r) / special.ive(m, k2 * a) * np.exp(k2 * (r - a))
            out[i] += basis.c[i] * k2 * (up + m / (k2 * r) * i_hat(m, k2, r, a))
    return out


@dataclass(frozen=True)
class RitzSystem:
    """The uneven head's operator over the complex in-vacuum basis.

    Attributes
    ----------
    orders : numpy.ndarray
        m of each basis function (-M..M), shape (B,).
    radial : numpy.ndarray
        n of each basis function (1..N), shape (B,).
    stiffness : numpy.ndarray
        K0 + dK in N/m times the basis' unit squared, Hermitian, shape (B, B).
    mass : numpy.ndarray
        Diagonal modal masses in kg, shape (B,).
    uniform_omega : numpy.ndarray
        In-vacuum angular frequencies of the uniform head at T0 in rad/s, shape (B,).
    """

    orders: np.ndarray
    radial: np.ndarray
    stiffness: np.ndarray
    mass: np.ndarray
    uniform_omega: np.ndarray

    def index(self, m: int, n: int) -> int:
        """Position of the basis function (m, n) (m may be negative)."""
        return int(np.flatnonzero((self.orders == m) & (self.radial == n))[0])


def ritz_system(head, rim: RimTension, *, m_basis: int, n_basis: int, stiff: bool = False,
                radial_nodes: int = RADIAL_NODES) -> RitzSystem:
    """Assemble the uneven head's stiffness and mass over orders -m_basis..m_basis.

    Parameters
    ----------
    head : Head
        Radius, areal density and bending stiffness are used; the tension is ``rim.mean``.
    rim : RimTension
        Rim tension (N/m).
    m_basis, n_basis : int
        Highest |m| and number of radial functions per order.
    stiff : bool
        Use the stiff in-vacuum basis (bending stiffness) if the head has one.
    radial_nodes : int
        Gauss-Legendre nodes for the radial integrals.
    """
    a = head.radius
    r, wr = _nodes(radial_nodes, a)
    ms = np.arange(-m_basis, m_basis + 1)
    slopes, over_r, masses, omegas = [], [], [], []
    for m in range(m_basis + 1):
        basis = _basis(head, m=m, count=n_basis, tension=rim.mean, stiff=stiff)
        slopes.append(_slope(basis, r))
        over_r.append(basis.shape(r) / r)
        masses.append(head.areal_density * 2 * np.pi * basis.norm)
        omegas.append(basis.omega)
    P = np.stack([slopes[abs(m)] for m in ms])  # (O, N, R)
    Q = np.stack([over_r[abs(m)] for m in ms])
    h = ms[:, None] - ms[None, :]
    top = min(rim.order, 2 * m_basis)
    rho = r / a
    frr = np.zeros((top + 1, r.size))
    ftt = np.zeros_like(frr)
    frt = np.zeros_like(frr)
    chat = np.zeros(2 * top + 1, dtype=complex)  # c_hat at h = -top..top
    for k in range(1, top + 1):
        frr[k], ftt[k], frt[k] = stress_profiles(k, rho)
        ck = rim.harmonic(k)
        chat[top + k] = ck / 2
        chat[top - k] = np.conj(ck) / 2
    habs = np.minimum(np.abs(h), top + 1)  # |h| > top: no such harmonic
    frr = np.vstack([frr, np.zeros(r.size)])
    ftt = np.vstack([ftt, np.zeros(r.size)])
    frt = np.vstack([frt, np.zeros(r.size)])
    coef = np.where(np.abs(h) <= top, chat[np.clip(h + top, 0, 2 * top)], 0.0)
    sgn = np.sign(h)
    Krr = frr[habs] * wr  # (O, O, R)
    Krt = frt[habs] * wr * sgn[:, :, None]
    Ktt = ftt[habs] * wr
    mm = ms.astype(float)
    term = np.einsum("anr,abr,bpr->anbp", P, Krr, P, optimize=True)
    term += np.einsum("anr,abr,bpr->anbp", P, Krt * mm[None, :, None], Q, optimize=True)
    term -= np.einsum("anr,abr,bpr->anbp", Q, Krt * mm[:, None, None], P, optimize=True)
    term += np.einsum("anr,abr,bpr->anbp", Q, Ktt * (mm[:, None] * mm[None, :])[:, :, None], Q,
                      optimize=True)
    dK = 2 * np.pi * coef[:, None, :, None] * term
    size = ms.size * n_basis
    dK = dK.reshape(size, size)
    mass = np.concatenate([masses[abs(m)] for m in ms])
    omega = np.concatenate([omegas[abs(m)] for m in ms])
    K = dK + np.diag(mass * omega**2)
    K = 0.5 * (K + K.conj().T)
    return RitzSystem(orders=np.repeat(ms, n_basis), radial=np.tile(np.arange(1, n_basis + 1), ms.size),
                      stiffness=K, mass=mass, uniform_omega=omega)


def _antinode(cp: complex, cm: complex, m: int) -> float:
    """Antinode angle (rad, in [0, pi/m)) of the real shape cp e^{im t} + cm e^{-im t}."""
    return float((-(np.angle(cp) - np.angle(cm)) / (2 * m)) % (np.pi / m))


def _orientation(high_antinode: float, m: int, relative: float) -> float | None:
    if relative < SPLIT_FLOOR:
        return None
    return float(np.degrees(high_antinode + np.pi / (2 * m)) % (180.0 / m))


def _m_basis(rim: RimTension, m_max: int) -> int:
    significant = [k for k in range(1, rim.order + 1) if abs(rim.harmonic(k)) > 1e-6 * rim.mean]
    extra = min(EXTRA_M_MAX, max([EXTRA_M_MIN] + significant))
    return m_max + extra


def _check(m_max, n_max):
    for key, value, low in (("m_max", m_max, 0), ("n_max", n_max, 1)):
        if isinstance(value, bool) or not isinstance(value, int) or not low <= value <= 30:
            raise InputError(key, value, f"must be a whole number from {low} to 30")


def exact_splits(head, rim: RimTension, *, m_max: int = 6, n_max: int = 3, stiff: bool = False,
                 m_basis: int | None = None, n_basis: int | None = None) -> list[Split]:
    """Split table of the uneven head in vacuum from the exact (Ritz) solve.

    Parameters
    ----------
    head : Head
        The head (its own tension is ignored: the mean rim tension is used).
    rim : RimTension
        Rim tension in N/m.
    m_max, n_max : int
        Modes (m, n) reported: 0 <= m <= m_max, 1 <= n <= n_max.
    stiff : bool
        Include bending stiffness (if the head has it).
    m_basis, n_basis : int or None
        Basis size (highest |m|, radial functions per order); None: chosen from the table
        size and the rim's harmonics.

    Returns
    -------
    list of Split
        Sorted by (m, n).
    """
    _check(m_max, n_max)
    mb = _m_basis(rim, m_max) if m_basis is None else m_basis
    nb = n_max + EXTRA_N if n_basis is None else n_basis
    system = ritz_system(head, rim, m_basis=mb, n_basis=nb, stiff=stiff)
    s = 1.0 / np.sqrt(system.mass)
    lam, vec = linalg.eigh(system.stiffness * s[:, None] * s[None, :])
    energy = np.abs(vec) ** 2
    labels = [(m, n) for m in range(m_max + 1) for n in range(1, n_max + 1)]
    slots, cols = [], []
    for m, n in labels:
        rows = (np.abs(system.orders) == m) & (system.radial == n)
        share = energy[rows].sum(axis=0)
        for _ in range(1 if m == 0 else 2):
            slots.append((m, n))
            cols.append(share)
    # only the lowest roots can carry these labels: limit the assignment to them
    keep = min(lam.size, 2 * len(slots) + 10)
    cost = -np.array(cols)[:, :keep]
    rows_i, picked = optimize.linear_sum_assignment(cost)
    found: dict = {}
    for i, j in zip(rows_i, picked):
        found.setdefault(slots[i], []).append(j)
    out = []
    for m, n in labels:
        js = sorted(found[(m, n)], key=lambda j: lam[j])
        f = [math.sqrt(max(lam[j], 0.0)) / (2 * np.pi) for j in js]
        f0 = float(system.uniform_omega[system.index(m, n)] / (2 * np.pi))
        orient = None
        if m > 0:
            v = vec[:, js[1]]
            ant = _antinode(v[system.index(m, n)], v[system.index(-m, n)], m)
            orient = _orientation(ant, m, (f[1] - f[0]) / f0)
        out.append(Split(m=m, n=n, low_frequency=f[0], high_frequency=f[-1], uniform_frequency=f0,
                         orientation_deg=orient))
    return out


def split_weight(head, *, m: int, n: int, k: int | None = None, stiff: bool = False,
                 tension: float | None = None, radial_nodes: int = RADIAL_NODES) -> float:
    """W_mn: relative split (high - low)/f per unit relative rim harmonic |c_k|/T0 (k = 2m).

    Parameters
    ----------
    head : Head
    m, n : int
        The pair (m >= 1).
    k : int or None
        The rim harmonic; default 2m (the one that splits the pair at first order).
    stiff : bool
        Bending stiffness in the basis.
    tension : float or None
        T0 in N/m; default the head's tension.

    Returns
    -------
    float
        Dimensionless (module docstring).
    """
    k = 2 * m if k is None else k
    t0 = head.tension if tension is None else tension
    a = head.radius
    r, wr = _nodes(radial_nodes, a)
    basis = _basis(head, m=m, count=n, tension=t0, stiff=stiff)
    dphi, phi = _slope(basis, r)[n - 1], basis.shape(r)[n - 1]
    frr, ftt, frt = stress_profiles(k, r / a)
    g = np.sum(wr * (frr * dphi**2 - 2 * m * frt * dphi * phi / r - m * m * ftt * (phi / r) ** 2))
    k0 = 2 * head.areal_density * basis.omega[n - 1] ** 2 * basis.norm[n - 1]
    return float(t0 * g / k0)


def first_order_splits(head, rim: RimTension, *, m_max: int = 6, n_max: int = 3,
                       stiff: bool = False) -> list[Split]:
    """Split table to first order in the unevenness (degenerate perturbation theory).

    Parameters and result as :func:`exact_splits`.
    """
    _check(m_max, n_max)
    out = []
    for m in range(m_max + 1):
        basis = _basis(head, m=m, count=n_max, tension=rim.mean, stiff=stiff)
        for n in range(1, n_max + 1):
            f0 = float(basis.frequency[n - 1])
            if m == 0:
                out.append(Split(m=0, n=n, low_frequency=f0, high_frequency=f0, uniform_frequency=f0,
                                 orientation_deg=None))
                continue
            c = rim.harmonic(2 * m) / rim.mean
            weight = split_weight(head, m=m, n=n, stiff=stiff, tension=rim.mean)
            # the higher member points its antinodes where harmonic 2m peaks (if W > 0;
            # a negative W swaps the members, a quarter period further on)
            ant = (-np.angle(c * (1.0 if weight >= 0 else -1.0)) / (2 * m)) % (np.pi / m)
            rel = abs(weight * abs(c))
            out.append(Split(m=m, n=n, low_frequency=f0 * (1 - rel / 2), high_frequency=f0 * (1 + rel / 2),
                             uniform_frequency=f0, orientation_deg=_orientation(ant, m, rel)))
    return out


def with_air(splits: list[Split], coupled_hz: dict) -> list[Split]:
    """Carry each pair's relative split over to the coupled frequency (module docstring).

    Parameters
    ----------
    splits : list of Split
        In vacuum.
    coupled_hz : dict
        (m, n) -> frequency in Hz of the uniform head at the mean tension with air and body.
    """
    out = []
    for s in splits:
        f = coupled_hz[(s.m, s.n)]
        scale = f / s.uniform_frequency
        out.append(Split(m=s.m, n=s.n, low_frequency=s.low_frequency * scale,
                         high_frequency=s.high_frequency * scale, uniform_frequency=f,
                         orientation_deg=s.orientation_deg))
    return out
