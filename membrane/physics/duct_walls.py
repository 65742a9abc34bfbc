r"""Surface integrals of a kettle's or shell's interior field over its walls, for the wall losses.

The boundary-layer losses on the body's walls (dissipation.py) need, at each complex
frequency, :math:`\int p^2\,dS` (thermal layer) and :math:`\int|\nabla_t p|^2\,dS` (viscous
layer) over the side wall and the two end faces, as quadratic forms in the heads' duct-mode
amplitudes. :func:`duct_wall_forms` gives the full (2Q, 2Q) matrices in closed form (the
definition, checked against quadrature in tests/test_dissipation.py); :class:`DuctWalls` gives
the same forms already projected onto a head's Ritz coordinates, which is what the solver
needs hundreds of times per order, at a fraction of the cost.

Why the projection is cheap. The side-wall integrals of two duct modes q, p are integrals of
:math:`\cos\beta_q u\,\cos\beta_p u` and the like over the depth, and since
:math:`\beta_q^2 - \beta_p^2 = \gamma_p^2 - \gamma_q^2` does not depend on the frequency, each
off-diagonal entry is a divided difference (Green's identity along the axis):

.. math::

    \int_0^L e_{1q} e_{1p}\,du = \frac{f_p - f_q}{\gamma_p^2 - \gamma_q^2},\quad
    f = \frac{\cot\beta L}{\beta};\qquad
    \int_0^L e_{1q}' e_{1p}'\,du = \frac{g_p - g_q}{\gamma_p^2 - \gamma_q^2},\quad
    g = \beta\cot\beta L,

and the cross terms of a shell the same with csc for cot. With :math:`H_{qp} = s_{qp}/
(\gamma_p^2 - \gamma_q^2)` (s the side wall's angular and radial factor, H antisymmetric, zero
diagonal, fixed per order) a form's off-diagonal part :math:`H_{qp}(u_p - u_q)` is
HU - UH, U = diag(u); with its diagonal D, projected on amplitudes w = A x, it is

.. math::

    A^T (HU - UH + D) A = \sum_q d_q\,a_q a_q^T - u_q\,(b_q a_q^T + a_q b_q^T),\qquad B = HA,

(a_q, b_q the rows of A and B): linear in the per-mode weights (d, u), whose outer products
are fixed per order. Each frequency then costs one real matrix product of its 2Q (4Q for a
shell) weights with them, instead of building and multiplying (Q, Q) arrays.
"""

from __future__ import annotations

import numpy as np
from scipy import special


def _cot_csc(mu, depth):
    """cot(beta L) and csc(beta L) for beta = i mu (Re mu >= 0), overflow-safe."""
    x = mu * depth
    e1 = np.exp(-x)
    den = -np.expm1(-2.0 * x)
    return -1j * (1.0 + e1 * e1) / den, -1j * 2.0 * e1 / den


def duct_wall_forms(k, *, gamma, norms, radius: float, depth: float, m: int, faces: bool = True,
                    heads: int = 2):
    r"""Surface integrals of the interior field over the duct's walls and end faces.

    The field is :math:`p = -\omega^2\rho\sum_q \psi_q(r)\cos m\theta\,[w_{1q} e_{1q}(u) +
    w_{2q} e_{2q}(u)]`, u = z + L from the far end (u = 0) to the struck head (u = L),
    :math:`e_{1q} = \cos(\beta_q u)/(\beta_q\sin\beta_q L)` (from the head at u = L),
    :math:`e_{2q} = \cos(\beta_q(L-u))/(\beta_q\sin\beta_q L)` (from a head at u = 0), and
    :math:`w_{hq} = \langle w_h,\psi_q\rangle/\|\psi_q\|^2`. Returns the matrices of
    :math:`\int p^2 dS` and :math:`\int|\nabla_t p|^2 dS` over the side wall and both end faces
    (per :math:`(\omega^2\rho)^2`), as quadratic forms in the stacked amplitudes (w_1, w_2).

    Parameters
    ----------
    k : array_like
        Acoustic wavenumbers (complex allowed), (R,), 1/m.
    gamma, norms : array_like
        Duct wavenumbers (1/m) and norms (m^2), (Q,).
    radius, depth : float
        a and L in m.
    m : int
        Angular order.
    faces : bool
        Include the two end faces (False: the side wall alone).
    heads : {1, 2}
        1 for a kettle: the far end is a rigid wall (w_2 = 0), and only the (Q, Q) block of
        w_1 is returned.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Pi (thermal) and Ups (viscous), each (R, 2Q, 2Q), complex.
    """
    k = np.atleast_1d(np.asarray(k, dtype=complex))[:, None]
    gamma = np.asarray(gamma, dtype=float)
    norms = np.asarray(norms, dtype=float)
    a, L = float(radius), float(depth)
    weight = 2 * np.pi if m == 0 else np.pi
    mu = np.sqrt(gamma[None, :] ** 2 - k * k)
    b = 1j * mu
    cot, csc = _cot_csc(mu, L)
    Q = len(gamma)
    b1, b2 = b[:, :, None], b[:, None, :]
    c1, c2 = cot[:, :, None], cot[:, None, :]
    s1, s2 = csc[:, :, None], csc[:, None, :]
    dp = b1 + b2
    eye = np.eye(Q, dtype=bool)[None]
    dm = np.where(eye, 1.0, b1 - b2)
    # (f(b2) - f(b1)) / (b1 - b2) -> -f'(b) on the diagonal: L csc^2 for cot, L csc cot for csc
    dcot = np.where(eye, L * s1 * s1, (c2 - c1) / dm)
    dcsc = np.where(eye, L * s1 * c1, (s2 - s1) / dm)
    ccc = 0.5 * (dcot + (c2 + c1) / dp)  # csc csc * int cos(b1 u) cos(b2 u)
    css = 0.5 * (dcot - (c2 + c1) / dp)  # csc csc * int sin(b1 u) sin(b2 u)
    xcc = 0.5 * ((s2 + s1) / dp + dcsc)  # csc csc * int cos(b1 u) cos(b2 (L - u))
    xss = 0.5 * ((s2 + s1) / dp - dcsc)  # csc csc * int sin(b1 u) sin(b2 (L - u))
    bb = b1 * b2
    e11, e12 = ccc / bb, xcc / bb
    d11, d12 = css, -xss  # products of the u-derivatives
    jw = special.jv(m, gamma * a)
    tang = (m / a) ** 2
    if heads == 1:
        side = a * weight * np.outer(jw, jw)[None]
        pi_side, ups_side = side * e11, side * (tang * e11 + d11)
    else:
        side = a * weight * np.tile(np.outer(jw, jw), (2, 2))[None]
        pi_side = side * np.block([[e11, e12], [np.swapaxes(e12, 1, 2), e11]])
        ups_side = side * np.block([[tang * e11 + d11, tang * e12 + d12],
                                    [np.swapaxes(tang * e12 + d12, 1, 2), tang * e11 + d11]])
    if not faces:
        return pi_side, ups_side
    # end faces: u = L (struck head) has amplitudes w1 cot/b + w2 csc/b, u = 0 the reverse
    fcot, fcsc = cot / b, csc / b
    nq = weight * norms[None, :]
    if heads == 1:  # faces at u = L (amplitude w1 cot/b) and u = 0 (w1 csc/b): diagonal
        diag = nq * (fcot * fcot + fcsc * fcsc)
        idx = np.arange(Q)
        pi_faces = np.zeros((k.shape[0], Q, Q), complex)
        pi_faces[:, idx, idx] = diag
        ups_faces = np.zeros_like(pi_faces)
        ups_faces[:, idx, idx] = diag * gamma[None, :] ** 2
        return pi_side + pi_faces, ups_side + ups_faces
    pi_faces = np.zeros((k.shape[0], 2 * Q, 2 * Q), complex)
    idx = np.arange(Q)
    for (u1, u2) in ((fcot, fcsc), (fcsc, fcot)):
        vec = np.concatenate([u1, u2], axis=1)  # (R, 2Q): the face amplitude per w
        # sum_q N_q (vec_1q w_1q + vec_2q w_2q)^2: a rank-structured 2Q x 2Q form
        for i0 in (0, Q):
            for j0 in (0, Q):
                pi_faces[:, i0 + idx, j0 + idx] += nq * vec[:, i0 + idx] * vec[:, j0 + idx]
    grad = np.concatenate([gamma, gamma]) ** 2
    ups_faces = pi_faces * np.sqrt(grad)[None, :, None] * np.sqrt(grad)[None, None, :]
    return pi_side + pi_faces, ups_side + ups_faces


class DuctWalls:
    r"""The wall forms of :func:`duct_wall_forms` projected onto Ritz coordinates, per order.

    For complex frequencies and per-frequency coefficients t (thermal) and v (viscous),
    :meth:`forms` returns :math:`A^T (t\,\Pi + v\,\Upsilon) A`, A the map from a head's Ritz
    coordinates to the duct amplitudes (w_1, w_2): the same numbers as building Pi and Ups
    and multiplying (to round-off; tests/test_dissipation.py), by the divided-difference
    structure in the module docstring.

    Parameters
    ----------
    amp : numpy.ndarray
        (heads * Q, n): Ritz coordinates -> stacked duct amplitudes (w_1, w_2), 1/m^2.
    gamma, norms : numpy.ndarray
        Duct wavenumbers (1/m) and norms (m^2), (Q,).
    radius, depth : float
        a and L in m.
    m : int
        Angular order.
    heads : {1, 2}
        1 for a kettle (rigid far end, w_2 = 0), 2 for a shell.
    """

    def __init__(self, amp, gamma, norms, radius: float, depth: float, m: int, heads: int):
        self.gamma = np.asarray(gamma, dtype=float)
        Q = len(self.gamma)
        self.depth, self.heads = float(depth), int(heads)
        a = float(radius)
        weight = 2 * np.pi if m == 0 else np.pi
        jw = special.jv(m, self.gamma * a)
        side = a * weight * np.outer(jw, jw)
        g2 = self.gamma**2
        diff = g2[None, :] - g2[:, None]  # gamma_p^2 - gamma_q^2: nonzero off the diagonal
        np.fill_diagonal(diff, 1.0)
        H = side / diff
        np.fill_diagonal(H, 0.0)
        self.side_diag = np.diag(side).copy()
        self.tang = (m / a) ** 2
        self.face_norms = weight * np.asarray(norms, dtype=float)
        amp = np.asarray(amp, dtype=float)
        n = amp.shape[1]
        A = [amp[h * Q:(h + 1) * Q] for h in range(self.heads)]  # (Q, n) per head
        B = [H @ a_ for a_ in A]

        def outer(x, y):  # per duct mode q, x_q y_q^T flattened: (Q, cols of x * cols of y)
            return np.einsum("qi,qj->qij", x, y).reshape(Q, x.shape[1] * y.shape[1])

        def pair(i, j, ci=slice(None), cj=slice(None)):
            # A_i^T (HU - UH + D) A_j = sum_q d_q a_iq a_jq^T - u_q (b_iq a_jq^T + a_iq b_jq^T)
            ai, aj, bi, bj = A[i][:, ci], A[j][:, cj], B[i][:, ci], B[j][:, cj]
            return outer(ai, aj), outer(bi, aj) + outer(ai, bj)

        # W = [d, -u] @ X: the form is linear in the per-mode weights (d, u), so the products
        # with the fixed A and B are done once here; per frequency one real matrix product
        self.n = n
        self.blocks = None
        if self.heads == 2:
            spans = [_span(a_) for a_ in A]
            if None not in spans and (spans[0].stop <= spans[1].start or spans[1].stop <= spans[0].start):
                # two different heads, each on its own coordinates: the own-head terms fill
                # the diagonal blocks only and the cross terms the off-diagonal ones, so each
                # block gets only its own products (a third of the work of the whole matrix)
                s0, s1 = spans
                own = [np.vstack(pair(h, h, sp, sp)) for h, sp in ((0, s0), (1, s1))]
                self.blocks = (s0, s1, own, np.vstack(pair(0, 1, s0, s1)))
                return
        own = [pair(h, h) for h in range(self.heads)]
        rows = [sum(p[0] for p in own), sum(p[1] for p in own)]
        if self.heads == 2:
            x01, x10 = pair(0, 1), pair(1, 0)
            rows += [x01[0] + x10[0], x01[1] + x10[1]]
        self.X = np.vstack(rows)

    def forms(self, k, thermal, viscous) -> np.ndarray:
        r""":math:`A^T (t\,\Pi(k) + v\,\Upsilon(k)) A`, (R, n, n) complex.

        Parameters
        ----------
        k : array_like
            Acoustic wavenumbers (complex), (R,), 1/m.
        thermal, viscous : array_like
            The coefficients t and v of the two forms, (R,) (complex).
        """
        k = np.atleast_1d(np.asarray(k, dtype=complex))[:, None]
        t = np.atleast_1d(np.asarray(thermal, dtype=complex))[:, None]
        v = np.atleast_1d(np.asarray(viscous, dtype=complex))[:, None]
        L = self.depth
        mu = np.sqrt(self.gamma[None, :] ** 2 - k * k)
        b = 1j * mu
        cot, csc = _cot_csc(mu, L)
        fcot, fcsc = cot / b, csc / b
        alpha = t + v * self.tang  # the coefficient of the side wall's p^2 integral
        grad = t + v * self.gamma[None, :] ** 2  # the end faces' p^2 and grad p^2 together
        bb = b * b
        # own head (cot): off the diagonal G (f_p - f_q) and G (g_p - g_q), f = cot/b,
        # g = b cot; on it the limits (L csc^2 + cot/b) / (2 b^2) and (L csc^2 - cot/b) / 2
        lcsc2 = L * csc * csc
        u_own = alpha * fcot + v * (b * cot)
        d_own = self.side_diag * (alpha * (0.5 * (lcsc2 + fcot) / bb) + v * (0.5 * (lcsc2 - fcot)))
        d_own = d_own + self.face_norms * (fcot * fcot + fcsc * fcsc) * grad
        if self.heads == 1:
            return self._combine([d_own, -u_own])
        # across (csc): the same with csc for cot; limits (csc/b + L csc cot) / (2 b^2) and
        # -(csc/b - L csc cot) / 2; the end faces couple w_1 and w_2 by 2 cot csc / b^2
        lcc = L * csc * cot
        u_x = alpha * fcsc + v * (b * csc)
        d_x = self.side_diag * (alpha * (0.5 * (fcsc + lcc) / bb) - v * (0.5 * (fcsc - lcc)))
        d_x = d_x + self.face_norms * (2.0 * fcot * fcsc) * grad
        if self.blocks is None:
            return self._combine([d_own, -u_own, d_x, -u_x])
        s0, s1, own, cross = self.blocks
        out = np.zeros((k.shape[0], self.n, self.n), complex)
        for sp, X in zip((s0, s1), own):
            size = sp.stop - sp.start
            out[:, sp, sp] = self._combine([d_own, -u_own], X, (size, size))
        x = self._combine([d_x, -u_x], cross, (s0.stop - s0.start, s1.stop - s1.start))
        out[:, s0, s1] = x
        out[:, s1, s0] = np.swapaxes(x, 1, 2)
        return out

    def _combine(self, weights, X=None, shape=None):
        """sum of weights @ X: complex (R, rows) times the real X, as (R, n, n) (or shape)."""
        X = self.X if X is None else X
        shape = (self.n, self.n) if shape is None else shape
        w = np.concatenate(weights, axis=1)
        R = w.shape[0]
        out = np.vstack([w.real, w.imag]) @ X
        return (out[:R] + 1j * out[R:]).reshape(R, *shape)


def _span(a):
    """The columns of ``a`` that are not all zero, as a slice if they are contiguous, else None."""
    cols = np.flatnonzero(np.any(a != 0, axis=0))
    if not len(cols) or cols[-1] - cols[0] + 1 != len(cols):
        return None
    return slice(int(cols[0]), int(cols[-1]) + 1)
