"""Bessel-function zeros and the overlap integrals every model here is built from.

Zeros come from scipy and are polished by Newton steps on ``scipy.special.jv``,
so they agree with mpmath's ``besseljzero`` to about 1e-15 relative. Overlap
integrals are Lommel's closed forms, valid for complex arguments, which the
radiation and cavity models need off the real axis.

The zeros are universal constants, so the package ships them for m, n <= 50
(``data/bessel_zeros.npz``, written by ``python -m membrane.bessel`` with the same
functions and checked against mpmath by the tests); beyond that they are computed.
"""

from __future__ import annotations

from functools import lru_cache
from importlib import resources

import numpy as np
from scipy import special

TABLE_ORDERS = 51  # m = 0..50
TABLE_ZEROS = 51   # n = 1..51


@lru_cache(maxsize=1)
def _table() -> dict:
    try:
        with resources.files("membrane").joinpath("data/bessel_zeros.npz").open("rb") as fh:
            data = np.load(fh)
            return {"j": data["j"], "jp": data["jp"]}
    except (FileNotFoundError, OSError, KeyError):
        return {}


def _lookup(kind: str, m: int, count: int):
    table = _table()
    if kind in table and m < table[kind].shape[0] and count <= table[kind].shape[1]:
        out = table[kind][m, :count]
        out.setflags(write=False)
        return out
    return None


@lru_cache(maxsize=256)
def _jn_zeros_cached(m: int, count: int) -> np.ndarray:
    found = _lookup("j", m, count)
    return found if found is not None else compute_jn_zeros(m, count)


def compute_jn_zeros(m: int, count: int) -> np.ndarray:
    """Zeros of J_m computed afresh: scipy's values polished by Newton steps."""
    x = np.array(special.jn_zeros(m, count), dtype=float)
    for _ in range(3):  # Newton polish: J_m(x) / J_m'(x)
        x = x - special.jv(m, x) / special.jvp(m, x)
    x.setflags(write=False)
    return x


def jn_zeros(m: int, count: int) -> np.ndarray:
    """First ``count`` positive zeros j_{m,1} < j_{m,2} < ... of J_m.

    Parameters
    ----------
    m : int
        Order, m >= 0.
    count : int
        How many zeros, count >= 1.

    Returns
    -------
    numpy.ndarray
        Read-only array of shape ``(count,)`` (dimensionless).

    Examples
    --------
    >>> round(float(jn_zeros(0, 1)[0]), 10)
    2.4048255577
    """
    return _jn_zeros_cached(int(m), int(count))


@lru_cache(maxsize=256)
def _jnp_zeros_cached(m: int, count: int) -> np.ndarray:
    found = _lookup("jp", m, count)
    return found if found is not None else compute_jnp_zeros(m, count)


def compute_jnp_zeros(m: int, count: int) -> np.ndarray:
    """Positive zeros of J_m' computed afresh: scipy's values polished by Newton steps."""
    x = np.array(special.jnp_zeros(m, count), dtype=float)
    for _ in range(3):  # Newton polish on J_m'(x): J_m'' from Bessel's equation
        jp = special.jvp(m, x)
        jpp = -jp / x - (1.0 - m * m / (x * x)) * special.jv(m, x)
        x = x - jp / jpp
    x.setflags(write=False)
    return x


def jnp_zeros(m: int, count: int) -> np.ndarray:
    """First ``count`` positive zeros of J_m' (x = 0 is never counted).

    Abramowitz & Stegun and DLMF count x = 0 as the first zero of J_0'; this
    function, like scipy's ``jnp_zeros``, does not. The rigid-wall cavity adds the
    uniform (x = 0) mode for m = 0 itself.

    Parameters
    ----------
    m : int
        Order, m >= 0.
    count : int
        How many zeros, count >= 1.

    Returns
    -------
    numpy.ndarray
        Read-only array of shape ``(count,)`` (dimensionless).
    """
    return _jnp_zeros_cached(int(m), int(count))


def lommel(m: int, alpha, beta, a: float):
    r"""Overlap of two Bessel functions of one order on a disk.

    .. math::

        \int_0^a J_m(\alpha r)\, J_m(\beta r)\, r\, dr
        = \frac{a\,[\beta J_m(\alpha a) J_m'(\beta a) - \alpha J_m'(\alpha a) J_m(\beta a)]}
               {\alpha^2 - \beta^2},

    with the limit :math:`\tfrac{a^2}{2}[J_m'(\alpha a)^2 + (1 - m^2/(\alpha a)^2) J_m(\alpha a)^2]`
    where :math:`\alpha = \beta`.

    Parameters
    ----------
    m : int
        Order.
    alpha, beta : float, complex or array_like
        Wavenumbers in 1/m; they broadcast against each other and may be complex.
    a : float
        Radius of the disk in m.

    Returns
    -------
    numpy.ndarray
        The integral in m^2 (complex if either wavenumber is).
    """
    alpha = np.asarray(alpha)
    beta = np.asarray(beta)
    xa, xb = alpha * a, beta * a
    ja, jb = special.jv(m, xa), special.jv(m, xb)
    dja, djb = special.jvp(m, xa), special.jvp(m, xb)
    den = alpha * alpha - beta * beta
    scale = np.maximum(np.abs(alpha * alpha), np.abs(beta * beta))
    near = np.abs(den) <= 1e-9 * np.where(scale > 0, scale, 1.0)
    safe = np.where(near, 1.0, den)
    general = a * (beta * ja * djb - alpha * dja * jb) / safe
    with np.errstate(divide="ignore", invalid="ignore"):
        same = 0.5 * a * a * (dja**2 + (1.0 - m * m / (xa * xa)) * ja**2)
    if m == 0:
        same = np.where(xa == 0, 0.5 * a * a, same)
    return np.where(near, same, general)


def write_table(path) -> None:
    """Write the shipped table of zeros (m = 0..50, 51 zeros each of J_m and J_m')."""
    j = np.array([compute_jn_zeros(m, TABLE_ZEROS) for m in range(TABLE_ORDERS)])
    jp = np.array([compute_jnp_zeros(m, TABLE_ZEROS) for m in range(TABLE_ORDERS)])
    np.savez_compressed(path, j=j, jp=jp)


if __name__ == "__main__":
    import sys

    target = sys.argv[1] if len(sys.argv) > 1 else str(resources.files("membrane").joinpath("data/bessel_zeros.npz"))
    write_table(target)
    print(f"wrote {target}")
