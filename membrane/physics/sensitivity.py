r"""How a root moves with a parameter of the drum: first-order perturbation of Z(omega; p).

For a simple root :math:`\omega` of :math:`Z(\omega; p) x = 0` with Z complex symmetric
(K, M, the radiation and duct terms and the loss terms are all symmetric, so x is its own
left eigenvector), differentiating :math:`x^T Z x = 0` gives

.. math::

    \frac{d\omega}{dp} = -\frac{x^T\,\partial_p Z\,x}{x^T\,\partial_\omega Z\,x}

(the derivative of a simple eigenvalue of a nonlinear eigenproblem, e.g. Güttel & Tisseur,
"The nonlinear eigenvalue problem", Acta Numerica 26, 2017, section 2). The tension search
uses it for Newton steps in place of secants (tension_search.py): one solve per step instead
of a finite-difference Jacobian's two or three.

The parameters, each as a logarithm (``ln T``, ``ln sigma``, ``ln V``):

* tension of the struck head: :math:`\partial Z / \partial\ln T = T\,G`, G the Gram matrix
  :math:`\int|\nabla\phi|^2 dA` of the Ritz space (the bending part does not change with T);
  ``tensions``: every head's tension scaled together (both heads of a shell);
* areal density of the struck head: :math:`-\omega^2 M`;
* kettle volume (the air column's length L = V / (pi a^2)): :math:`L\,\partial Z/\partial L`
  by central differences of the duct terms.

The Ritz space is held fixed at the solved drum's (exact to first order: the root is
stationary in the space). Losses' own dependence on the parameter (a small imaginary part)
is left out: only the real part, the frequency, is used.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from .operator import block_diag

PARAMETERS = ("tension", "areal_density", "volume", "tensions")


@lru_cache(maxsize=512)
def _unit_gram(shape):
    """Tension Gram matrix of the unit space of ``shape`` (dissipation.tension_gram)."""
    from .dissipation import tension_gram
    from .operator import unit_space

    space = unit_space(shape)
    return space.K if shape.s is None else tension_gram(space)


def _struck_block(rs, i, block):
    """A matrix acting on the struck head's block of order i only (other heads: zero)."""
    order = rs.orders[i]
    blocks = [block] + [np.zeros_like(h.M) for h in order.heads[1:]]
    return block_diag(blocks)


def parameter_operator(rs, i: int, omega: complex, parameter: str) -> np.ndarray:
    """dZ / d ln p of order i at omega, (size, size) complex."""
    order = rs.orders[i]
    head = order.heads[0]
    if parameter == "tension":
        gram = _unit_gram(head.shape)
        return _struck_block(rs, i, head.head.tension * gram).astype(complex)
    if parameter == "tensions":  # every head's tension scaled together (a shell's both)
        return block_diag([h.head.tension * _unit_gram(h.shape) for h in order.heads]).astype(complex)
    if parameter == "areal_density":
        return -(omega**2) * _struck_block(rs, i, head.M)
    if parameter == "volume":
        if order.depth is None:
            raise ValueError("only a body has a volume")
        depth, h = order.depth, 1e-6
        out = []
        try:
            for f in (1.0 + h, 1.0 - h):
                order.depth = depth * f
                out.append(rs.order_operator(i, np.array([omega]))[0])
        finally:
            order.depth = depth
        return (out[0] - out[1]) / (2.0 * h)
    raise ValueError(f"parameter must be one of {PARAMETERS}")


def frequency_derivatives(rs, i: int, omega, vectors) -> np.ndarray:
    r"""The denominator :math:`x^T\,\partial_\omega Z\,x` of each root's first-order shift: (R,).

    One batch of central differences of order i's operator (step 1e-6 of each |omega|);
    ``omega`` (R,) in rad/s, ``vectors`` (R, size) the roots' null vectors.
    """
    omega = np.atleast_1d(np.asarray(omega, dtype=complex))
    x = np.atleast_2d(np.asarray(vectors, dtype=complex))
    R = len(omega)
    h = 1e-6 * np.abs(omega)
    Z = rs.order_operator(i, np.concatenate([omega + h, omega - h]))
    return np.einsum("rn,rnk,rk->r", x, (Z[:R] - Z[R:]) / (2.0 * h)[:, None, None], x)


def shift(x, term, dz) -> complex:
    r"""First-order change of a root, :math:`-x^T W x / x^T Z' x`, for an operator change W
    (rad/s per unit of whatever W is the change of); ``dz`` from :func:`frequency_derivatives`."""
    return complex(-(x @ term @ x) / dz)


def root_slopes(rs, i: int, omega, vectors, parameters) -> np.ndarray:
    """Complex d omega / d ln p of each root for each parameter named: (R, P), rad/s."""
    omega = np.atleast_1d(np.asarray(omega, dtype=complex))
    x = np.atleast_2d(np.asarray(vectors, dtype=complex))
    dz = frequency_derivatives(rs, i, omega, x)
    return np.array([[shift(x[r], parameter_operator(rs, i, omega[r], p), dz[r])
                      for p in parameters] for r in range(len(omega))], dtype=complex).reshape(
        len(omega), len(parameters))


def log_slopes(rs, i: int, omega: complex, vector, parameters) -> np.ndarray:
    """d ln f / d ln p of one root (f = Re omega / 2 pi) for each parameter named, (P,)."""
    dw = root_slopes(rs, i, [omega], [vector], parameters)[0]
    return np.real(dw) / np.real(omega)
