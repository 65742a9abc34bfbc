r"""All eigenvalues of a nonlinear eigenproblem inside a closed curve, by contour integrals.

For an analytic matrix function T(z) (N x N), Keldysh's theorem writes

.. math::

    T(z)^{-1} = \sum_k \frac{v_k w_k^T}{z - \lambda_k} + H(z)

inside a curve C, with H analytic, for simple (or semi-simple) eigenvalues :math:`\lambda_k`.
The moments :math:`A_p = \frac{1}{2\pi i}\oint_C s^p\,T(z)^{-1}\,dz` (s the scaled variable
(z - c)/ρ) therefore hold only the eigenvalues inside C, and a block Hankel matrix of them
has the eigenvalues inside as the eigenvalues of a small linear pencil (Beyn, "An integral
method for solving nonlinear eigenvalue problems", Linear Algebra Appl. 436, 2012, sections 3
and 5). The trapezoidal rule on a circle converges exponentially, so a few dozen points
suffice. Near-coincident eigenvalues (a cluster) need no special care: they are found
together, as a subspace, which is what single-root iterations (secant, Newton) lack.

Everything here is generic: ``evaluate(z)`` returns T at an array of points, (P, N, N).
"""

from __future__ import annotations

import numpy as np

from ..errors import SolverError


class TooMany(SolverError):
    """The moments are of full rank: too many eigenvalues (or too much noise) inside."""


def circle_points(centre: complex, radius: float, count: int, aspect: float = 1.0):
    """Trapezoidal nodes on a circle (or an ellipse of height aspect * radius), offset by
    half a step from the real axis.

    Returns (z, s, w): the points, s = (z - centre) / radius and the weights
    w = (dz/dtheta) / (i radius) (w = s on a circle), each (count,).
    """
    theta = 2.0 * np.pi * (np.arange(count) + 0.5) / count
    s = np.cos(theta) + 1j * aspect * np.sin(theta)
    w = aspect * np.cos(theta) + 1j * np.sin(theta)
    return centre + radius * s, s, w


def moments_eigen(inverses, s, *, weights=None, blocks: int = 2, rank_tol: float = 1e-10):
    """Eigenvalues (in s) and eigenvectors from T^{-1} at the nodes of a circle.

    Parameters
    ----------
    inverses : numpy.ndarray
        T(z_j)^{-1} (or T^{-1} V for a probe block V), shape (P, N, L).
    s : numpy.ndarray
        Scaled nodes (z_j - c) / radius, (P,).
    weights : numpy.ndarray or None
        (dz/dtheta) / (i radius) at the nodes (None: s, a circle).
    blocks : int
        Moments per Hankel block row: up to blocks * L eigenvalues can be resolved.
    rank_tol : float
        Singular values of the Hankel matrix below rank_tol times the median norm of
        T^{-1} on the curve count as zero. (Relative to that, not to the largest singular
        value: a circle with no eigenvalue inside has only noise in its moments; the
        median, because a node next to a root just outside inflates the largest.)

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Eigenvalues in the scaled variable, (r,), and eigenvectors, (r, N), unit 2-norm.
    """
    P, N, L = inverses.shape
    w = s if weights is None else weights

    def hankel(idx):
        powers = s[None, idx] ** np.arange(2 * blocks)[:, None] * w[None, idx]
        A = np.einsum("pj,jnl->pnl", powers, inverses[idx]) / len(idx)
        H0 = np.block([[A[i + j] for j in range(blocks)] for i in range(blocks)])
        H1 = np.block([[A[i + j + 1] for j in range(blocks)] for i in range(blocks)])
        return H0, H1

    # A_p = (1/P) sum_j s_j^p w_j T_j^{-1}: the trapezoidal rule of (1/2 pi i) oint s^p T^-1 dz / radius
    H0, H1 = hankel(np.arange(P))
    U, sv, Wh = np.linalg.svd(H0, full_matrices=False)
    scale = float(np.median(np.linalg.norm(inverses, axis=(1, 2))))
    r = int(np.sum(sv > rank_tol * scale))
    if r == 0:
        return np.zeros(0, complex), np.zeros((0, N), complex)
    if r == len(sv):
        raise TooMany("contour solve: more eigenvalues inside the curve than the moments "
                      "can hold (the curve should be split)")
    Ur, Wr = U[:, :r], np.conj(Wh[:r]).T
    B = np.conj(Ur).T @ H1 @ Wr / sv[:r][None, :]
    lam, y = np.linalg.eig(B)
    vecs = (Ur @ y)[:N].T
    norms = np.linalg.norm(vecs, axis=1)
    vecs = vecs / np.where(norms > 0, norms, 1.0)[:, None]
    return lam, vecs


def _phase(T):
    """det T / |det T| at each of (P, N, N), from its LU factors (numpy's slogdet)."""
    sign, _ = np.linalg.slogdet(T)
    if not np.all(np.isfinite(sign)) or np.any(sign == 0):
        raise TooMany("contour solve: the operator is singular at a node of the curve")
    return sign


def winding(evaluate, T, centre: complex, radius: float, aspect: float = 1.0, *,
            largest: float = 0.5 * np.pi, passes: int = 6) -> int:
    r"""Zeros of det T inside the curve of :func:`circle_points`: the turns of its phase.

    For T analytic inside and on the curve (no poles), the argument principle,
    :math:`N = \frac{1}{2\pi i}\oint \mathrm{tr}(T^{-1}T')\,dz
    = \frac{1}{2\pi}\oint d\arg\det T`, counts the eigenvalues inside, each exactly once
    however small its residue. The phase of det T comes from an LU factorisation at each
    node (no T', no second evaluation). It is summed over the steps between neighbouring
    nodes, each taken as its principal value, which is right only where the phase turns by
    less than pi from one node to the next: wherever a step exceeds ``largest`` (pi / 2: a
    root close to the curve between those nodes), the arc is halved with a node of its own
    (all such arcs in one evaluation per pass), up to ``passes`` times; an arc still turning
    faster raises :class:`TooMany` (the caller splits the curve) rather than guessing.

    Parameters
    ----------
    evaluate : callable
        z (P,) complex -> T(z), (P, N, N).
    T : numpy.ndarray
        T at the nodes of ``circle_points(centre, radius, P, aspect)``, (P, N, N).
    centre, radius, aspect : complex, float, float
        The curve (see :func:`circle_points`).
    largest : float
        Largest phase step between neighbouring nodes accepted, rad.
    passes : int
        Halvings of the fast arcs allowed.

    Returns
    -------
    int
        The number of eigenvalues inside.
    """
    P = T.shape[0]
    theta = 2.0 * np.pi * (np.arange(P) + 0.5) / P
    phase = _phase(T)
    for done in range(passes + 1):
        step = np.angle(np.roll(phase, -1) / phase)
        fast = np.flatnonzero(np.abs(step) > largest)
        if not len(fast):
            return int(round(float(np.sum(step)) / (2.0 * np.pi)))
        if done == passes:
            break
        ahead = np.roll(theta, -1)[fast]
        ahead = np.where(ahead < theta[fast], ahead + 2.0 * np.pi, ahead)  # the arc over 0
        mid = 0.5 * (theta[fast] + ahead)
        zm = centre + radius * (np.cos(mid) + 1j * aspect * np.sin(mid))
        Tm = evaluate(zm)
        if not np.all(np.isfinite(Tm)):
            raise TooMany("contour solve: the operator is not finite on the curve")
        theta = np.concatenate([theta, np.mod(mid, 2.0 * np.pi)])
        phase = np.concatenate([phase, _phase(Tm)])
        order = np.argsort(theta)
        theta, phase = theta[order], phase[order]
    raise TooMany("contour solve: the phase of det T along the curve turns too fast to count "
                  "its eigenvalues (a root on or next to the curve)")


def eigen_in_circle(evaluate, centre: complex, radius: float, *, points: int = 32,
                    blocks: int = 2, rank_tol: float = 1e-10, margin: float = 1.0,
                    aspect: float = 1.0, count: bool = False):
    r"""Eigenvalues of T inside a circle (or ellipse), with their eigenvectors.

    Parameters
    ----------
    evaluate : callable
        z (P,) complex -> T(z), (P, N, N) complex; analytic inside and on the circle.
    centre, radius : complex, float
        The circle.
    points : int
        Trapezoidal nodes.
    blocks : int
        Hankel block size (see :func:`moments_eigen`).
    rank_tol : float
        Relative rank threshold.
    margin : float
        Keep only eigenvalues this far inside (relative; those near the curve are less
        accurate).
    aspect : float
        Height of the ellipse over its half-width (1: a circle).
    count : bool
        Also count the eigenvalues inside by the argument principle (:func:`winding`: the
        turns of det T along the curve, from the nodes already evaluated, more only where
        its phase moves fast) and raise :class:`TooMany` if it holds more than the moments
        resolved. Each eigenvalue adds exactly 1 to the count however small its residue,
        while the moments lose those whose share of the Hankel matrix falls below its noise
        (a crowd of weakly coupled roots: a long kettle's ladder of air resonances above a
        duct mode's cut-on).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        z (r,) and vectors (r, N).
    """
    z, s, w = circle_points(centre, radius, points, aspect)
    T = evaluate(z)
    # a node on (or within round-off of) an eigenvalue, or an operator that overflows there
    # (a very long air column), leaves T^-1 unusable: the caller's remedy is the same as
    # for a crowded curve, another curve
    if not np.all(np.isfinite(T)):
        raise TooMany("contour solve: the operator is not finite on the curve")
    try:
        inv = np.linalg.inv(T)
    except np.linalg.LinAlgError:
        raise TooMany("contour solve: the operator is singular at a node of the curve") from None
    if not np.all(np.isfinite(inv)):
        raise TooMany("contour solve: the operator is singular at a node of the curve")
    lam, vecs = moments_eigen(inv, s, weights=w, blocks=blocks, rank_tol=rank_tol)
    inside = np.isfinite(lam) & (np.abs(lam.real + 1j * lam.imag / aspect) < 1.0)
    if count:
        held = winding(evaluate, T, centre, radius, aspect)
        if held > np.sum(inside):
            raise TooMany(f"contour solve: {held} eigenvalues inside the curve by the "
                          f"argument principle, {int(np.sum(inside))} from the moments")
    keep = np.isfinite(lam) & (np.abs(lam.real + 1j * lam.imag / aspect) < margin)
    return centre + radius * lam[keep], vecs[keep]
