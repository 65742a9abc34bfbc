r"""Modes of a circular head in vacuum: the ideal membrane and the stiff membrane.

The ideal membrane (tension only) has :math:`\phi_n(r) = J_m(j_{mn} r / a)` and
:math:`f_{mn} = j_{mn}\sqrt{T/\sigma}/(2\pi a)`.

With bending stiffness :math:`D`, :math:`D\nabla^4 w - T\nabla^2 w = \sigma\omega^2 w` has
regular solutions :math:`w = J_m(k_1 r) + C\,I_m(k_2 r)` with
:math:`k_2^2 = k_1^2 + T/D` and :math:`\sigma\omega^2 = D k_1^4 + T k_1^2`. We search for
:math:`x = k_1 a` and carry the I part normalised by its edge value,
:math:`\hat I(r) = I_m(k_2 r)/I_m(k_2 a)`, so nothing overflows however stiff or taut the
head. Edge conditions:

* clamped: :math:`w = w' = 0`, i.e. :math:`x J_m'(x) - J_m(x)\, y R(y) = 0`;
* hinged (simply supported): :math:`w = 0`, :math:`w'' + \nu w'/a = 0`, i.e.
  :math:`(1-\nu)\, x J_m'(x) + J_m(x)\,[x^2 + y^2 - (1-\nu)\, y R(y)] = 0`;

with :math:`y = k_2 a` and :math:`R(y) = I_m'(y)/I_m(y)`. Each root is bracketed between
consecutive zeros of :math:`J_m` and :math:`J_m'`, so none is missed or found twice.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from scipy import special

from ..bessel import jn_zeros, jnp_zeros, lommel
from ..errors import SolverError

from ..notation import EDGES  # noqa: E402

SHAPES_KEPT = 8  # radii arrays whose shapes each basis keeps (RadialBasis.shape)
SHAPES_MIN_POINTS = 16  # ... if they hold at least this many radii
SHAPES_MAX_POINTS = 4096  # ... and at most this many (a nodal-circle search samples 2001)


def _ratio_i(m: int, y):
    """I_m'(y) / I_m(y), without overflow (exponentially scaled Bessel functions)."""
    return special.ive(m + 1, y) / special.ive(m, y) + m / y


def _i_hat(m: int, k2: float, r, a: float):
    """I_m(k2 r) / I_m(k2 a) for 0 <= r <= a, without overflow."""
    r = np.asarray(r, dtype=float)
    return special.ive(m, k2 * r) / special.ive(m, k2 * a) * np.exp(k2 * (r - a))


def _edge_function(edge: str, m: int, x: float, s: float, nu: float) -> float:
    """Characteristic function in x = k1 a, with s = T a^2 / D (dimensionless)."""
    y = np.sqrt(x * x + s)
    j, dj = special.jv(m, x), special.jvp(m, x)
    yr = y * _ratio_i(m, y)
    if edge == "clamped":
        return x * dj - j * yr
    return (1.0 - nu) * x * dj + j * (x * x + y * y - (1.0 - nu) * yr)


def _edge_function_and_slope(edge: str, m: int, x, s: float, nu: float):
    """The characteristic function of :func:`_edge_function` and its derivative in x.

    With y = sqrt(x^2 + s) and g = y R(y): d(x J_m')/dx = -(x - m^2/x) J_m (Bessel's
    equation) and dg/dy = y + m^2/y - y R^2 (from I_m'' = (1 + m^2/y^2) I_m - I_m'/y).
    J_m' is taken from J_{m+1} by the recurrence (two Bessel evaluations, not three).
    """
    y = np.sqrt(x * x + s)
    j, j1 = special.jv(m, x), special.jv(m + 1, x)
    dj = (m / x) * j - j1
    ratio = _ratio_i(m, y)
    g = y * ratio
    g_x = (x / y) * (y + m * m / y - y * ratio * ratio)
    bessel = -(x - m * m / x) * j  # d(x J_m')/dx
    if edge == "clamped":
        return x * dj - j * g, bessel - dj * g - j * g_x
    q = x * x + y * y - (1.0 - nu) * g
    return (1.0 - nu) * x * dj + j * q, (1.0 - nu) * bessel + dj * q + j * (4.0 * x - (1.0 - nu) * g_x)


def bracketed_newton(f_and_slope, lo: np.ndarray, hi: np.ndarray, *, rtol: float = 4e-16,
                     maxiter: int = 60):
    """All roots of f in the brackets [lo, hi] at once: Newton's method kept inside each bracket.

    ``f_and_slope(x)`` returns f and df/dx; f must change sign across each bracket. A
    Newton step that would leave its (shrinking) bracket is replaced by bisection, so every
    root converges; a root is done when its step is below ``rtol`` relative (Newton's last
    step is far larger than its error). Returns None if some root has not converged within
    ``maxiter`` steps.
    """
    a, b = np.array(lo, dtype=float), np.array(hi, dtype=float)
    fa, _ = f_and_slope(a)
    x = 0.5 * (a + b)
    done = np.zeros(a.shape, dtype=bool)
    for _ in range(maxiter):
        fx, dfx = f_and_slope(x)
        left = np.sign(fx) == np.sign(fa)  # root in [x, b]
        a, fa = np.where(left, x, a), np.where(left, fx, fa)
        b = np.where(left, b, x)
        with np.errstate(invalid="ignore", divide="ignore"):
            step = fx / dfx
        converged = (fx == 0) | (np.abs(step) <= rtol * np.abs(x))
        new = x - step
        outside = ~np.isfinite(new) | (new < np.minimum(a, b)) | (new > np.maximum(a, b))
        new = np.where(outside, 0.5 * (a + b), new)
        x = np.where(done, x, np.where(converged, np.where(fx == 0, x, x - step), new))
        done = done | converged
        if np.all(done):
            return x
    return None


def _brackets(edge: str, m: int, count: int) -> tuple[np.ndarray, np.ndarray]:
    """Intervals in x = k1 a holding exactly one root each (see module docstring)."""
    j = jn_zeros(m, count)
    if m == 0:
        dj = np.concatenate(([0.0], jnp_zeros(0, count)))  # J_0' vanishes at 0 too
    else:
        dj = jnp_zeros(m, count + 1)
    if edge == "clamped":  # root between j_{m,n} and the next zero of J_m'
        return j, dj[1:]
    lo = dj[:count].copy()  # hinged: between the zero of J_m' before j_{m,n} and j_{m,n}
    lo[0] = max(lo[0], 1e-9)
    return lo, j


@lru_cache(maxsize=1024)
def stiff_roots(edge: str, m: int, count: int, s: float, nu: float) -> np.ndarray:
    """First ``count`` roots x = k1 a of the stiff-membrane edge condition.

    Parameters
    ----------
    edge : {"clamped", "hinged"}
        Edge condition.
    m : int
        Number of nodal diameters.
    count : int
        Number of roots.
    s : float
        Dimensionless tension T a^2 / D (0 for a plate, large for a nearly ideal head).
    nu : float
        Poisson ratio (used by the hinged edge only).

    Returns
    -------
    numpy.ndarray
        Read-only array of roots, ascending (dimensionless).
    """
    if edge not in EDGES:
        raise ValueError(f"edge must be one of {EDGES}, not {edge!r}")
    lo, hi = _brackets(edge, m, count)
    # all roots of this order at once; a hand-written bracketing solver rather than
    # scipy.optimize, whose import alone costs a command-line call about 0.4 s. Newton with
    # the analytic slope takes about 8 evaluations where regula falsi took 30 (the roots
    # agree to 1e-15); regula falsi remains the fallback.
    roots = bracketed_newton(lambda x: _edge_function_and_slope(edge, m, x, s, nu), lo, hi)
    if roots is None:
        roots = illinois(lambda x: _edge_function(edge, m, x, s, nu), lo, hi)
    if roots is None:
        raise SolverError(f"stiff-membrane edge roots did not converge (m = {m}, T a^2/D = {s:g})")
    roots.setflags(write=False)
    return roots


def illinois(f, lo: np.ndarray, hi: np.ndarray, *, rtol: float = 1e-15, maxiter: int = 200):
    """All roots of f in the brackets [lo, hi] at once (Illinois regula falsi, vectorised).

    f(x) must change sign across each bracket; a step that would leave its bracket is
    replaced by bisection. Returns None if any root has not converged to ``rtol``
    relative within ``maxiter`` steps.
    """
    a, b = np.array(lo, dtype=float), np.array(hi, dtype=float)
    fa, fb = f(a), f(b)
    side = np.zeros(a.shape, dtype=int)
    for _ in range(maxiter):
        with np.errstate(invalid="ignore", divide="ignore"):
            c = (a * fb - b * fa) / (fb - fa)
        bad = ~np.isfinite(c) | (c <= np.minimum(a, b)) | (c >= np.maximum(a, b))
        c = np.where(bad, 0.5 * (a + b), c)
        fc = f(c)
        left = np.sign(fc) == np.sign(fa)  # root in [c, b]: c replaces a
        # Illinois: halve the kept end's value when the same end is kept twice running
        fb = np.where(left & (side == 1), 0.5 * fb, fb)
        fa = np.where(~left & (side == -1), 0.5 * fa, fa)
        a, fa = np.where(left, c, a), np.where(left, fc, fa)
        b, fb = np.where(left, b, c), np.where(left, fb, fc)
        side = np.where(left, 1, -1)
        if np.all((np.abs(b - a) <= rtol * np.abs(c)) | (fc == 0)):
            return np.where(fc == 0, c, 0.5 * (a + b))
    return None


@dataclass(frozen=True)
class RadialBasis:
    r"""In-vacuum modes of one angular order m: shapes, frequencies, transforms.

    Mode n has the radial shape :math:`\phi_n(r) = J_m(k_{1n} r) + c_n \hat I_m(k_{2n} r)`
    (times :math:`\cos m\theta`), with :math:`c_n = 0` and no I part for the ideal head.

    Attributes
    ----------
    m : int
        Number of nodal diameters.
    radius : float
        Head radius a in m.
    k1 : numpy.ndarray
        Wavenumbers of the J part in 1/m, shape (N,).
    k2 : numpy.ndarray or None
        Wavenumbers of the I part in 1/m, or None for the ideal head.
    c : numpy.ndarray
        Coefficients of the normalised I part (zeros for the ideal head).
    omega : numpy.ndarray
        In-vacuum angular frequencies in rad/s.
    areal_density : float
        sigma in kg/m^2, for the modal masses.
    """

    m: int
    radius: float
    k1: np.ndarray
    k2: np.ndarray | None
    c: np.ndarray
    omega: np.ndarray
    areal_density: float

    @property
    def size(self) -> int:
        """Number of basis functions N."""
        return len(self.k1)

    @property
    def frequency(self) -> np.ndarray:
        """In-vacuum frequencies in Hz."""
        return self.omega / (2 * np.pi)

    @property
    def angular_weight(self) -> float:
        r"""The angular integral of :math:`\cos^2 m\theta`: 2 pi for m = 0, else pi."""
        return 2 * np.pi if self.m == 0 else np.pi

    def shape(self, r) -> np.ndarray:
        """Radial shapes phi_n(r), shape (N, len(r)); r in m, 0 <= r <= a.

        The result is read-only: the last few radii asked for are kept, since every mode of
        this order shares the basis and a picture, a strike or a nodal-line search asks
        for the same radii once per mode (the Bessel functions are the cost).
        """
        r = np.atleast_1d(np.asarray(r, dtype=float))
        kept = self.__dict__.get("_shapes")
        if kept is None:
            kept = {}
            object.__setattr__(self, "_shapes", kept)  # frozen: the cache is no field
        key = (r.shape, r.tobytes())
        out = kept.get(key)
        if out is not None:
            return out
        out = special.jv(self.m, np.outer(self.k1, r))
        if self.k2 is not None:  # all modes at once: the same numbers as one at a time
            out += self.c[:, None] * _i_hat(self.m, self.k2[:, None], r[None, :], self.radius)
        out.setflags(write=False)
        if not SHAPES_MIN_POINTS <= r.size <= SHAPES_MAX_POINTS:  # a root search's few points
            return out  # (cheap, never asked again), or more radii than a picture samples
        if len(kept) >= SHAPES_KEPT:
            del kept[next(iter(kept))]  # the oldest
        kept[key] = out
        return out

    def transform(self, kappa) -> np.ndarray:
        r"""Hankel transforms :math:`\Phi_n(\kappa) = \int_0^a \phi_n(r) J_m(\kappa r) r\,dr`.

        Parameters
        ----------
        kappa : array_like
            Wavenumbers in 1/m, real or complex.

        Returns
        -------
        numpy.ndarray
            Shape (N, len(kappa)), in m^2.
        """
        kappa = np.atleast_1d(np.asarray(kappa))
        a, m = self.radius, self.m
        out = lommel(m, self.k1[:, None], kappa[None, :], a)
        if self.k2 is not None:
            # I part: u = I_m(k2 r)/I_m(k2 a) solves Bessel's equation with eigenvalue -k2^2,
            # so Lommel's identity gives a (u v' - u' v) / (-k2^2 - kappa^2) at r = a.
            k2 = self.k2[:, None]
            kap = kappa[None, :]
            du = k2 * _ratio_i(m, k2 * a)
            v, dv = special.jv(m, kap * a), kap * special.jvp(m, kap * a)
            out = out + self.c[:, None] * a * (dv - du * v) / (-k2 * k2 - kap * kap)
        return out

    @property
    def norm(self) -> np.ndarray:
        r""":math:`\int_0^a \phi_n^2 r\,dr` in m^2 (closed forms, no quadrature; computed once, read-only)."""
        kept = self.__dict__.get("_norm")
        if kept is None:
            kept = self._norm_of()
            kept.setflags(write=False)
            object.__setattr__(self, "_norm", kept)  # frozen: the cache is no field
        return kept

    def _norm_of(self) -> np.ndarray:
        a, m = self.radius, self.m
        jj = lommel(m, self.k1, self.k1, a).real
        if self.k2 is None:
            return jj
        k1, k2, c = self.k1, self.k2, self.c
        x, y = k1 * a, k2 * a
        j, dj = special.jv(m, x), special.jvp(m, x)
        ri = _ratio_i(m, y)
        # cross term J * I_hat: Lommel with eigenvalues k1^2 and -k2^2
        ji = a * (j * k2 * ri - k1 * dj) / (k1 * k1 + k2 * k2)
        # I_hat^2: (a^2/2) [(1 + m^2/y^2) - R(y)^2] times I_hat(a)^2 = 1
        ii = 0.5 * a * a * (1.0 + m * m / (y * y) - ri * ri)
        return jj + 2 * c * ji + c * c * ii

    @property
    def modal_mass(self) -> np.ndarray:
        """sigma * integral of phi_n^2 over the head, in kg (per unit amplitude squared)."""
        return self.areal_density * self.angular_weight * self.norm


def ideal_basis(*, m: int, count: int, radius: float, tension: float,
                areal_density: float) -> RadialBasis:
    """Ideal-membrane modes of order m.

    Parameters
    ----------
    m : int
        Number of nodal diameters.
    count : int
        Number of modes (nodal circles n = 1..count, counting the rim).
    radius : float
        Head radius in m.
    tension : float
        Tension per unit length in N/m.
    areal_density : float
        Mass per unit area in kg/m^2.
    """
    k1 = jn_zeros(m, count) / radius
    omega = k1 * np.sqrt(tension / areal_density)
    return RadialBasis(m, radius, k1, None, np.zeros(count), omega, areal_density)


def stiff_basis(*, m: int, count: int, radius: float, tension: float, areal_density: float,
                bending_stiffness: float, poisson_ratio: float, edge: str) -> RadialBasis:
    """Stiff-membrane (or, at zero tension, plate) modes of order m.

    Parameters
    ----------
    m, count, radius, tension, areal_density
        As for :func:`ideal_basis` (tension may be 0: a plate).
    bending_stiffness : float
        D = E h^3 / (12 (1 - nu^2)) in N m. Zero gives the ideal membrane.
    poisson_ratio : float
        nu, dimensionless (hinged edge only).
    edge : {"clamped", "hinged"}
        Edge condition.
    """
    if bending_stiffness <= 0:
        return ideal_basis(m=m, count=count, radius=radius, tension=tension,
                           areal_density=areal_density)
    a, d = radius, bending_stiffness
    s = tension * a * a / d
    x = np.array(stiff_roots(edge, m, count, float(s), float(poisson_ratio)))
    k1 = x / a
    k2 = np.sqrt(k1 * k1 + tension / d)
    c = -special.jv(m, x)  # w(a) = 0 with I_hat(a) = 1
    omega = np.sqrt((d * k1**4 + tension * k1**2) / areal_density)
    return RadialBasis(m, a, k1, k2, c, omega, areal_density)


ratio_i = _ratio_i  # the public name (ritz.py, dissipation.py)
i_hat = _i_hat  # the public name (uneven.py)
