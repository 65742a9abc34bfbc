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


def _turns(Ta, Tb):
    """The turn of det T from each node a to the next b, (P,), rad, and the largest turn of
    one eigenvalue of Ta^-1 Tb on the way, (P,).

    det(Ta^-1 Tb) is the ratio of the two determinants; summing its eigenvalues' phases
    (each a principal value) unwraps the ratio's phase far beyond pi wherever the roots
    that turn it act on different eigenvalues (a crowd of roots does), which the principal
    value of the ratio itself cannot: a curve 24 nodes round 22 roots turns by 5.8 rad from
    node to node, which that value reads as -0.5 (tests/test_winding.py).
    """
    try:
        R = np.linalg.solve(Ta, Tb)
    except np.linalg.LinAlgError:
        raise TooMany("contour solve: the operator is singular at a node of the curve") from None
    if not np.all(np.isfinite(R)):
        raise TooMany("contour solve: the operator is singular at a node of the curve")
    N = R.shape[1]
    # every eigenvalue of R lies within ||R - I||_2 <= ||R - I||_F = e of 1, and (Schur)
    # sum |mu - 1|^2 <= e^2, so sum |mu - 1| <= sqrt(N) e; each turns by at most
    # arcsin|mu - 1| <= (pi / 2) |mu - 1|: for sqrt(N) e < 1 all together turn by less than
    # pi / 2 and the principal value of det R is the turn itself (an LU, not an
    # eigenvalue solve)
    e = np.linalg.norm(R - np.eye(N)[None], axis=(1, 2))
    near = np.sqrt(N) * e < 1.0
    sign, _ = np.linalg.slogdet(R[near])
    if np.any(sign == 0):
        raise TooMany("contour solve: the operator is singular at a node of the curve")
    turn = np.zeros(len(R))
    most = np.arcsin(np.minimum(e, 1.0))
    turn[near] = np.angle(sign)
    if not np.all(near):
        mu = np.linalg.eigvals(R[~near])
        if np.any(mu == 0):
            raise TooMany("contour solve: the operator is singular at a node of the curve")
        phase = np.angle(mu)
        turn[~near] = phase.sum(axis=1)
        most[~near] = np.max(np.abs(phase), axis=1)
    return turn, most


def _deflated_steps(T, centre: complex, radius: float, aspect: float, roots):
    """Per arc (node j to node j + 1), the turn of prod (z - r_i) and the principal value of
    the turn of q = det T / prod (z - r_i), each (P,), rad; None where that cannot be said
    (det T zero at a node, or a root between an arc and its chord)."""
    P = T.shape[0]
    _, s, _ = circle_points(centre, radius, P, aspect)
    sign, _ = np.linalg.slogdet(T)
    if np.any(sign == 0):
        return None
    r = np.asarray(roots, complex)
    rs = (r[np.isfinite(r)] - centre) / radius  # in the curve's own coordinates
    with np.errstate(all="ignore"):
        a = np.angle(s[:, None] - rs[None, :])  # (P, R)
    turns = np.angle(np.exp(1j * (np.roll(a, -1, axis=0) - a)))
    # each factor's steps sum to its own turn (2 pi for a root inside, 0 outside) unless the
    # root lies between an arc and its chord (or on the curve), where a chord's step is not
    # the arc's: then nothing is said
    inside = np.abs(rs.real + 1j * rs.imag / aspect) < 1.0
    if not np.all(np.isfinite(turns)) or \
            np.any(np.abs(turns.sum(axis=0) - 2.0 * np.pi * inside) > 1e-6):
        return None
    product = turns.sum(axis=1)
    det = np.angle(np.roll(sign, -1) / sign)
    return product, np.angle(np.exp(1j * (det - product)))


def deflated_winding(T, centre: complex, radius: float, aspect: float, roots,
                     *, largest: float = 0.5 * np.pi) -> int | None:
    r"""Zeros of det T inside the curve, from det T divided by the polynomial of ``roots``.

    For any points r_i, arg det T = arg prod (z - r_i) + arg q(z) with
    q = det T / prod (z - r_i), so the zeros of det T inside number those r_i inside (a
    geometric test) plus the turns of q round the curve. That identity holds whatever the
    r_i are; they are chosen to be the moments' estimates of the roots in and near the
    curve, which leave q without the fast-turning factors of roots close to the curve or
    crowded inside, so the turn of q from node to node is its principal value (the phase
    of one LU's determinant per node, not an eigenvalue solve of T_a^-1 T_b per arc). A
    root the moments missed still counts: it turns q by 2 pi. Returns None when q turns by
    more than ``largest`` between neighbouring nodes (a root missed next to the curve, or
    a crowd missed together): :func:`winding` then counts those arcs by the eigenvalues.
    """
    got = _deflated_steps(T, centre, radius, aspect, roots)
    if got is None or np.max(np.abs(got[1])) > largest:
        return None
    return int(round(float(np.sum(got[0] + got[1])) / (2.0 * np.pi)))


def winding(evaluate, T, centre: complex, radius: float, aspect: float = 1.0, *,
            largest: float = 0.5 * np.pi, passes: int = 6, roots=None) -> int:
    r"""Zeros of det T inside the curve of :func:`circle_points`: the turns of its phase.

    For T analytic inside and on the curve (no poles), the argument principle,
    :math:`N = \frac{1}{2\pi i}\oint \mathrm{tr}(T^{-1}T')\,dz
    = \frac{1}{2\pi}\oint d\arg\det T`, counts the eigenvalues inside, each exactly once
    however small its residue. The turn of det T from node to node is that of
    det(T_a^-1 T_b), summed over the eigenvalues of T_a^-1 T_b (:func:`_turns`; no T', no
    second evaluation of the operator). That sum is the turn only where no eigenvalue turns
    by pi or more between the nodes: wherever one turns by more than ``largest`` (pi / 2: a
    root close to the curve between those nodes, or a crowd acting on one eigenvalue), the
    arc is halved with a node of its own (all such arcs in one evaluation per pass), up to
    ``passes`` times; an arc still turning faster raises :class:`TooMany` (the caller splits
    the curve) rather than guessing. This samples the phase; it does not bound it between
    nodes: an eigenvalue turning by nearly 2 pi between two nodes with a small principal
    value would be missed (none did on the tests' crowds and the sweep).

    Parameters
    ----------
    evaluate : callable
        z (P,) complex -> T(z), (P, N, N).
    T : numpy.ndarray
        T at the nodes of ``circle_points(centre, radius, P, aspect)``, (P, N, N).
    centre, radius, aspect : complex, float, float
        The curve (see :func:`circle_points`).
    largest : float
        Largest turn of one eigenvalue between neighbouring nodes accepted, rad.
    passes : int
        Halvings of the fast arcs allowed.
    roots : array_like of complex, optional
        Estimates of the roots in and near the curve (the moments'): on each arc where
        det T / prod (z - r_i) turns by at most ``largest``, the turn is taken from the
        roots' factors and that quotient (:func:`deflated_winding`), with no eigenvalue
        solve; the other arcs are measured as above.

    Returns
    -------
    int
        The number of eigenvalues inside.
    """
    P = T.shape[0]
    theta = 2.0 * np.pi * (np.arange(P) + 0.5) / P
    # arc j runs from node j to node j + 1 (the last back to the first); only the arcs a
    # pass halves are measured again
    after = np.roll(T, -1, axis=0)
    got = None if roots is None else _deflated_steps(T, centre, radius, aspect, roots)
    if got is None:
        step, most = _turns(T, after)
    else:
        # an arc where q turns slowly has its turn from the roots' factors and q; only the
        # others are measured by the eigenvalues of T_a^-1 T_b (and halved as below)
        step, most = got[0] + got[1], np.zeros(P)
        fast = np.abs(got[1]) > largest
        if np.any(fast):
            step[fast], most[fast] = _turns(T[fast], after[fast])
    for done in range(passes + 1):
        fast = np.flatnonzero(most > largest)
        if not len(fast):
            return int(round(float(np.sum(step)) / (2.0 * np.pi)))
        if done == passes:
            break
        nxt = (fast + 1) % len(theta)
        ahead = np.where(theta[nxt] < theta[fast], theta[nxt] + 2.0 * np.pi, theta[nxt])
        mid = 0.5 * (theta[fast] + ahead)  # (the arc over theta = 0 wraps)
        zm = centre + radius * (np.cos(mid) + 1j * aspect * np.sin(mid))
        Tm = evaluate(zm)
        if not np.all(np.isfinite(Tm)):
            raise TooMany("contour solve: the operator is not finite on the curve")
        s1, m1 = _turns(T[fast], Tm)
        s2, m2 = _turns(Tm, T[nxt])
        # the new node goes after node j: its arc to node j + 1 is the second half
        step[fast], most[fast] = s1, m1
        at = fast + 1
        theta = np.insert(theta, at, np.mod(mid, 2.0 * np.pi))
        T = np.insert(T, at, Tm, axis=0)
        step, most = np.insert(step, at, s2), np.insert(most, at, m2)
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
        Also count the eigenvalues inside by the argument principle (the turns of det T
        along the curve, from the nodes already evaluated: :func:`winding` given the
        moments' roots, which are divided out of det T wherever that leaves it turning
        slowly; more nodes only where its phase still moves fast) and raise :class:`TooMany` if it holds more than the moments
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
        held = winding(evaluate, T, centre, radius, aspect, roots=centre + radius * lam)
        if held > np.sum(inside):
            raise TooMany(f"contour solve: {held} eigenvalues inside the curve by the "
                          f"argument principle, {int(np.sum(inside))} from the moments")
    keep = np.isfinite(lam) & (np.abs(lam.real + 1j * lam.imag / aspect) < margin)
    return centre + radius * lam[keep], vecs[keep]
