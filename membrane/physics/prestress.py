r"""The head's in-plane stress from uneven lugs: a disk pulled at its rim (plane stress).

The film is a disk of radius a under membrane forces :math:`N_{rr}, N_{\theta\theta},
N_{r\theta}` (force per unit length, N/m: stress times thickness). The lugs pull it through
the hoop with a radial rim tension given as a Fourier series,

.. math:: N_{rr}(a,\theta) = T(\theta) = T_0 + \sum_{k \ge 1} (A_k \cos k\theta + B_k \sin k\theta),

and no shear at the rim except for the k = 1 term (below). With no body force the
membrane forces derive from an Airy function :math:`\chi`:
:math:`N_{rr} = \chi_r / r + \chi_{\theta\theta}/r^2`, :math:`N_{\theta\theta} = \chi_{rr}`,
:math:`N_{r\theta} = -\partial_r(\chi_\theta / r)`. Michell's regular terms
:math:`\chi = (a_k r^k + b_k r^{k+2}) \cos k\theta` (k >= 2) with zero rim shear and rim
pull :math:`A_k` give, with :math:`\rho = r/a`,

.. math::
    N_{rr} &= A_k \cos k\theta\,[\tfrac{k}{2}\rho^{k-2} + \tfrac{k+2-k^2}{2(k+1)}\rho^k],\\
    N_{\theta\theta} &= A_k \cos k\theta\,[-\tfrac{k}{2}\rho^{k-2} + \tfrac{k+2}{2}\rho^k],\\
    N_{r\theta} &= A_k \sin k\theta\,\tfrac{k}{2}(\rho^k - \rho^{k-2}),

and the same with :math:`\cos \to \sin`, :math:`\sin \to -\cos` for :math:`B_k`. A pure
radial pull :math:`A_1\cos\theta` is not in equilibrium (it pushes the head sideways with
force :math:`\pi a A_1`); the hoop, which holds the head's edge, supplies the balancing rim
shear :math:`A_1 \sin\theta`, and the field is :math:`\chi = A_1 r^3 \cos\theta / (2a)`:
:math:`N_{rr} = A_1\rho\cos\theta`, :math:`N_{\theta\theta} = 3A_1\rho\cos\theta`,
:math:`N_{r\theta} = A_1\rho\sin\theta`. The stress of a disk loaded only at its edge does
not depend on the film's elastic constants (a simply connected body under given tractions).

From lugs to rim tension. Two models (``docs/uneven_tension.md``):

* ``"smooth"`` (default): the lug values are the rim tension at each lug, and between lugs
  the rim tension is their trigonometric interpolation: the smoothest periodic curve through
  them, with harmonics up to N/2 only. This is a hoop stiff enough in bending that it spreads
  each lug's pull to its neighbours and adds no ripple at the lug spacing, so uniform lugs
  give a uniform head.
* ``"hoop"``: each lug pulls as a point force on a hoop that bends like a ring resting on the
  film (an elastic foundation). Harmonic k of the point loads reaches the film reduced by
  :math:`1/(1 + \beta\,k^2(k^2-1)^2/(k^2+\chi))` (out-of-plane bending of a ring with torsion,
  :math:`\chi = EI/GJ`), :math:`\beta = EI/(a^4 k_f)` the hoop's bending stiffness relative to
  the film's foundation stiffness :math:`k_f`. Here even equal lugs leave a ripple of
  harmonic N (it splits the modes with m = N/2, N, ... : the lug count's own symmetry).

Everything is SI: m, rad, N/m.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError

SPREADS = ("smooth", "hoop")
# EI/GJ of a hoop of solid round section: E/G = 2(1 + nu) and J = 2I, so EI/GJ = 1 + nu,
# about 1.3 for steel (nu = 0.3). Only the "hoop" model uses it.
HOOP_BENDING_TORSION = 1.3
HOOP_HARMONICS = 64  # harmonics kept of the "hoop" model's point loads


@dataclass(frozen=True)
class RimTension:
    """Radial tension around the rim as a Fourier series, N/m.

    ``T(theta) = mean + sum_k cos_k[k-1] cos(k theta) + sin_k[k-1] sin(k theta)``.

    Attributes
    ----------
    mean : float
        T0 in N/m.
    cos_k, sin_k : tuple of float
        A_k, B_k for k = 1, 2, ... in N/m.
    """

    mean: float
    cos_k: tuple = ()
    sin_k: tuple = ()

    @property
    def order(self) -> int:
        """Highest harmonic carried."""
        return len(self.cos_k)

    def harmonic(self, k: int) -> complex:
        """Complex harmonic c_k = A_k - i B_k in N/m (T = Re sum c_k e^{ik theta}); c_0 = T0."""
        if k == 0:
            return complex(self.mean)
        if k > self.order:
            return 0j
        return complex(self.cos_k[k - 1], -self.sin_k[k - 1])

    def relative(self, k: int) -> complex:
        """c_k / T0 (dimensionless)."""
        return self.harmonic(k) / self.mean

    def at(self, theta) -> np.ndarray:
        """T(theta) in N/m at angles theta (rad)."""
        theta = np.asarray(theta, dtype=float)
        out = np.full(theta.shape, float(self.mean))
        for k in range(1, self.order + 1):
            out = out + self.cos_k[k - 1] * np.cos(k * theta) + self.sin_k[k - 1] * np.sin(k * theta)
        return out

    def scaled(self, factor: float) -> "RimTension":
        """Every harmonic times ``factor``."""
        return RimTension(self.mean * factor, tuple(factor * np.asarray(self.cos_k)),
                          tuple(factor * np.asarray(self.sin_k)))

    def uneven_part(self, eps: float = 1.0) -> "RimTension":
        """The same mean with the harmonics k >= 1 times ``eps``."""
        return RimTension(self.mean, tuple(eps * np.asarray(self.cos_k)), tuple(eps * np.asarray(self.sin_k)))


def lug_angles(count: int, first: float = 0.0) -> np.ndarray:
    """Angles of ``count`` equally spaced lugs in rad, the first at ``first``."""
    return first + 2 * np.pi * np.arange(count) / count


def rim_tension(lug_values, *, angles=None, spread: str = "smooth", hoop_stiffness: float = 0.0) -> RimTension:
    """Rim tension from the lugs.

    Parameters
    ----------
    lug_values : sequence of float
        Per lug: for ``"smooth"`` the rim tension at the lug, for ``"hoop"`` the lug's pull
        spread over its share of the rim (force / (2 pi a / N)); N/m, all > 0, at least 3.
    angles : sequence of float or None
        Lug angles in rad; None: equally spaced from 0. ``"smooth"`` needs equal spacing.
    spread : {"smooth", "hoop"}
        How the hoop spreads the lugs' pulls (module docstring).
    hoop_stiffness : float
        beta = EI / (a^4 k_f) of the ``"hoop"`` model (> 0), dimensionless.

    Returns
    -------
    RimTension
    """
    t = np.asarray(lug_values, dtype=float)
    n = t.size
    if n < 3 or not np.all(np.isfinite(t)) or np.any(t <= 0):
        raise InputError("lug tensions", list(t), "must be at least 3 positive values, one per lug")
    if spread not in SPREADS:
        raise InputError("spread", spread, f"must be one of: {', '.join(SPREADS)}")
    theta = lug_angles(n) if angles is None else np.asarray(angles, dtype=float)
    if theta.shape != t.shape:
        raise InputError("lug angles", list(theta), f"must give one angle per lug ({n})")
    if spread == "smooth":
        even = np.allclose(np.diff(np.unwrap(theta - theta[0])) % (2 * np.pi), 2 * np.pi / n)
        if not even:
            raise InputError("lug angles", list(np.degrees(theta)),
                             "the smooth spread needs equally spaced lugs")
        top = n // 2
        ks = np.arange(1, top + 1)
        c = 2.0 / n * np.array([np.sum(t * np.cos(k * theta)) for k in ks])
        s = 2.0 / n * np.array([np.sum(t * np.sin(k * theta)) for k in ks])
        if n % 2 == 0:  # the Nyquist harmonic is shared by +-N/2: half weight, cosine form
            c[-1] *= 0.5
            s[-1] *= 0.5
        return RimTension(float(np.mean(t)), tuple(c), tuple(s))
    if not hoop_stiffness > 0:
        raise InputError("hoop stiffness", hoop_stiffness,
                         "must be > 0 (a hoop with no bending stiffness puts point loads on the film)")
    ks = np.arange(1, HOOP_HARMONICS + 1)
    gain = 1.0 / (1.0 + hoop_stiffness * ks**2 * (ks**2 - 1) ** 2 / (ks**2 + HOOP_BENDING_TORSION))
    c = gain * 2.0 / n * np.array([np.sum(t * np.cos(k * theta)) for k in ks])
    s = gain * 2.0 / n * np.array([np.sum(t * np.sin(k * theta)) for k in ks])
    return RimTension(float(np.mean(t)), tuple(c), tuple(s))


def stress_profiles(k: int, rho):
    """Radial factors (f_rr, f_tt, f_rt) of harmonic k >= 1 (module docstring)."""
    rho = np.asarray(rho, dtype=float)
    if k == 1:
        return rho, 3.0 * rho, rho
    lo, hi = rho ** (k - 2), rho**k
    f_rr = 0.5 * k * lo + (k + 2 - k * k) / (2.0 * (k + 1)) * hi
    f_tt = -0.5 * k * lo + 0.5 * (k + 2) * hi
    f_rt = 0.5 * k * (hi - lo)
    return f_rr, f_tt, f_rt


def membrane_forces(rim: RimTension, *, radius: float, r, theta, uneven_only: bool = False):
    """Membrane forces N_rr, N_tt, N_rt (N/m) at points (r, theta).

    Parameters
    ----------
    rim : RimTension
    radius : float
        Head radius a in m.
    r, theta : array_like
        Points (broadcast together), r in m (0..a), theta in rad.
    uneven_only : bool
        Leave out the uniform part T0 (the isotropic N_rr = N_tt = T0).

    Returns
    -------
    tuple of numpy.ndarray
        (N_rr, N_tt, N_rt), each of the broadcast shape.
    """
    r, theta = np.broadcast_arrays(np.asarray(r, dtype=float), np.asarray(theta, dtype=float))
    rho = r / radius
    base = 0.0 if uneven_only else rim.mean
    n_rr = np.full(r.shape, base)
    n_tt = np.full(r.shape, base)
    n_rt = np.zeros(r.shape)
    for k in range(1, rim.order + 1):
        a_k, b_k = rim.cos_k[k - 1], rim.sin_k[k - 1]
        if a_k == 0 and b_k == 0:
            continue
        f_rr, f_tt, f_rt = stress_profiles(k, rho)
        along = a_k * np.cos(k * theta) + b_k * np.sin(k * theta)
        across = a_k * np.sin(k * theta) - b_k * np.cos(k * theta)
        n_rr = n_rr + along * f_rr
        n_tt = n_tt + along * f_tt
        n_rt = n_rt + across * f_rt
    return n_rr, n_tt, n_rt


def rim_traction(rim: RimTension, theta):
    """Traction the hoop puts on the film's edge, (radial, tangential) in N/m at angles theta.

    Radial is T(theta); tangential is the k = 1 balancing shear A_1 sin - B_1 cos.
    """
    theta = np.asarray(theta, dtype=float)
    shear = np.zeros(theta.shape)
    if rim.order >= 1:
        shear = rim.cos_k[0] * np.sin(theta) - rim.sin_k[0] * np.cos(theta)
    return rim.at(theta), shear
