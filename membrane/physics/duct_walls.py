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

:func:`field_wall_blocks` gives the same integrals on the fields the contour solve keeps as
unknowns (spectrum.py). Over 400 lines on purpose: the definition, its fast projection and
the form on those fields are three views of one set of integrals, checked against each other
(tests/test_dissipation.py, tests/test_coupled_robust.py); apart, each would repeat the
others' end values and closed forms.
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
        self.side = side
        self.tang = (m / a) ** 2
        self.face_norms = weight * np.asarray(norms, dtype=float)
        amp = np.asarray(amp, dtype=float)
        self.amp = amp
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


def _wall_integrals(pa, pb, ga, gb, same):
    r"""Side-wall integrals over the depth of pairs of axial fields, from their end values.

    Each field solves :math:`\phi'' = -(k^2 - \gamma^2)\phi`, so for two fields of different
    :math:`\gamma` Green's identity gives :math:`\int\phi\chi\,du = [\phi'\chi -
    \phi\chi']/(\gamma_\phi^2 - \gamma_\chi^2)` and :math:`\int\phi'\chi'\,du = [\phi\chi'] +
    (k^2 - \gamma_\chi^2)\int\phi\chi\,du`, brackets the difference between the two ends.

    Parameters
    ----------
    pa, pb : tuple of numpy.ndarray
        (value at the near end, slope there, value at the far end, slope there) of each
        field, each (P, A) and (P, B).
    ga, gb : numpy.ndarray
        Their duct wavenumbers, (A,) and (B,).
    same : numpy.ndarray
        (A, B) bool: pairs of one duct mode (left at zero: the caller has their closed form).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        :math:`\int\phi\chi` and the bracket :math:`[\phi\chi']`, each (P, A, B).
    """
    a0, da0, a1, da1 = (x[:, :, None] for x in pa)
    b0, db0, b1, db1 = (x[:, None, :] for x in pb)
    bracket = (da1 * b1 - a1 * db1) - (da0 * b0 - a0 * db0)
    diff = ga[:, None] ** 2 - gb[None, :] ** 2
    diff = np.where(same, 1.0, diff)
    i0 = np.where(same[None], 0.0, bracket / diff[None])
    return i0, (a1 * db1 - a0 * db0)


def field_wall_blocks(walls, k, thermal, viscous, *, q0: int, kind: str, half: float, shift):
    r"""The walls' loss form on the fields of the propagating duct modes, in closed form.

    The contour solve (spectrum.py) gives each duct mode q < q0 unknowns of its own: the
    amplitudes of its axial field in a basis that stays entire at every frequency, per unit
    duct amplitude (the w of :class:`DuctWalls`): a kettle's :math:`\cos\beta u` (u from the
    bottom), or over a shell, from mid-depth, the in-phase :math:`\cos\beta u` and the
    opposed :math:`\sin(\beta u)/\beta`. In those amplitudes the form of :class:`DuctWalls`
    has no pole (the rigid-walled field's pole is in the amplitudes), and it is split here
    into its part between two such fields and its part between one and the evanescent duct
    modes' fields (q >= q0), the latter already projected onto the Ritz coordinates. With the
    part between evanescent fields alone (:class:`DuctWalls` with the rows q < q0 of its map
    zeroed) the three give the whole form again.

    Parameters
    ----------
    walls : DuctWalls
        The order's wall forms (its map to duct amplitudes, its side-wall matrix).
    k : array_like
        Acoustic wavenumbers, (P,), 1/m.
    thermal, viscous : array_like
        t and v of :meth:`DuctWalls.forms`, (P,).
    q0 : int
        Propagating duct modes with unknowns.
    kind : {"kettle", "in-phase", "opposed", "both"}
        The basis: a kettle's cos, a symmetric shell's cos or sin / beta alone, or both (two
        unequal heads: in-phase amplitudes first, then opposed).
    half : float
        The depth the basis spans from its origin, m: a kettle's L, a shell's L/2.
    shift : array_like
        (q0,): each field is multiplied by exp(-shift_q) (spectrum.py's column scale).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Between fields, (P, F, F) with F = q0 (2 q0 for "both"); between a field and the
        Ritz coordinates through the evanescent fields, (P, F, n).
    """
    k = np.atleast_1d(np.asarray(k, dtype=complex))
    t = np.atleast_1d(np.asarray(thermal, dtype=complex))[:, None]
    v = np.atleast_1d(np.asarray(viscous, dtype=complex))[:, None]
    g = walls.gamma
    Q = len(g)
    gp, ge = g[:q0], g[q0:]
    beta = np.sqrt(k[:, None] ** 2 - gp[None, :] ** 2)
    b2 = beta * beta
    sig = np.exp(-np.asarray(shift, dtype=float))[None, :]
    x = beta * half
    ep, em = np.exp(1j * x) * sig, np.exp(-1j * x) * sig
    cos, sin = 0.5 * (ep + em), -0.5j * (ep - em)
    small = np.abs(x) < 0.5
    sinb = np.where(small, half * np.sinc(x / np.pi) * sig, sin / np.where(small, 1.0, beta))
    # integrals over the span of one mode's basis functions, scaled by sig^2: S2 =
    # sin(2 beta h) / (2 beta) and (h - S2) / beta^2 (its series where 2 beta h is small)
    e2p, e2m = np.exp(2j * x) * sig**2, np.exp(-2j * x) * sig**2
    y = 2.0 * x
    s2 = np.where(np.abs(y) < 0.5, half * np.sinc(y / np.pi) * sig**2,
                  (-0.5j * (e2p - e2m)) / np.where(np.abs(y) < 0.5, 1.0, 2.0 * beta))
    yy = y * y
    series = half**3 * 4.0 * (1 / 6 - yy / 120 + yy * yy / 5040 - yy**3 / 362880)
    hs = np.where(np.abs(y) < 0.5, series * sig**2, (half * sig**2 - s2) / np.where(np.abs(y) < 0.5, 1.0, b2))
    zero = np.zeros_like(cos)
    if kind == "kettle":  # cos(beta u) on [0, L]: bottom (u = 0) is the near end
        funcs = [((sig * np.ones_like(cos), zero, cos, -beta * sin), "c")]
        own = {"cc": (0.5 * (half * sig**2 + s2), 0.5 * b2 * (half * sig**2 - s2))}
    else:  # on [-h, h]: the near end is head 2's face (u = -h), the far one head 1's
        funcs = []
        if kind in ("in-phase", "both"):
            funcs.append(((cos, beta * sin, cos, -beta * sin), "c"))
        if kind in ("opposed", "both"):
            funcs.append(((-sinb, cos, sinb, cos), "s"))
        own = {"cc": (half * sig**2 + s2, b2 * (half * sig**2 - s2)), "ss": (hs, half * sig**2 + s2)}
        # over [-h, h]: int cos^2 = h + S2, int sin^2/beta^2 = (h - S2)/beta^2, the cross
        # term zero (odd); slopes: int (beta sin)^2 = beta^2 (h - S2), int cos^2 = h + S2
    F = q0 * len(funcs)
    P = len(k)
    n = walls.amp.shape[1]
    tang = walls.tang
    alpha = t + v * tang
    side = walls.side
    same = np.eye(q0, dtype=bool)
    Mpp = np.zeros((P, F, F), complex)
    for i, (fa, na) in enumerate(funcs):
        for j, (fb, nb) in enumerate(funcs):
            i0, br = _wall_integrals(fa, fb, gp, gp, same)
            i1 = br + (k[:, None, None] ** 2 - gp[None, None, :] ** 2) * i0
            key = "".join(sorted(na + nb))
            d0, d1 = own.get(key, (zero, zero))
            idx = np.arange(q0)
            i0[:, idx, idx] = d0
            i1[:, idx, idx] = d1
            blk = side[None, :q0, :q0] * (alpha[:, :, None] * i0 + v[:, :, None] * i1)
            # the end faces: the duct modes are orthogonal over a face, so only q = p
            faces = walls.face_norms[None, :q0] * (t + v * gp[None, :] ** 2) * (fa[0] * fb[0] + fa[2] * fb[2])
            blk[:, idx, idx] += faces
            Mpp[:, i * q0:(i + 1) * q0, j * q0:(j + 1) * q0] = blk
    Mpe = np.zeros((P, F, n), complex)
    if Q > q0:
        mu = np.sqrt(ge[None, :] ** 2 - k[:, None] ** 2)
        cot, csc = _cot_csc(mu, walls.depth)
        bb = 1j * mu
        fcot, fcsc = cot / bb, csc / bb
        one = np.ones_like(fcot)
        # the rigid-walled fields per unit duct amplitude, near end (u = 0) first:
        # e_1 = cos(beta u) / (beta sin beta L) from the head at u = L, e_2 from one at u = 0
        ev = [(fcsc, 0 * one, fcot, -one)]
        if walls.heads == 2:
            ev.append((fcot, one, fcsc, 0 * one))
        nope = np.zeros((q0, Q - q0), dtype=bool)
        for i, (fa, _) in enumerate(funcs):
            for h, fe in enumerate(ev):
                i0, br = _wall_integrals(fa, fe, gp, ge, nope)
                i1 = br + (k[:, None, None] ** 2 - ge[None, None, :] ** 2) * i0
                blk = side[None, :q0, q0:] * (alpha[:, :, None] * i0 + v[:, :, None] * i1)
                amp_e = walls.amp[h * Q + q0:(h + 1) * Q]  # (Q - q0, n)
                Mpe[:, i * q0:(i + 1) * q0, :] += blk @ amp_e
    return Mpp, Mpe


def _span(a):
    """The columns of ``a`` that are not all zero, as a slice if they are contiguous, else None."""
    cols = np.flatnonzero(np.any(a != 0, axis=0))
    if not len(cols) or cols[-1] - cols[0] + 1 != len(cols):
        return None
    return slice(int(cols[0]), int(cols[-1]) + 1)
