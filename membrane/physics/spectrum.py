r"""Every root of one order of the coupled operator in a frequency window: scan, refine, weigh.

The operator :math:`Z(\omega) = K + S(\omega) - \omega^2 (M + A(\omega))` (operator.py) has
poles where the body's air, with the heads held still, resonates: the duct terms
:math:`\cot(\beta L)/\beta` and :math:`\csc(\beta L)/\beta`. For the contour method
(contour.py) the operator must be analytic, so the duct modes that can propagate in the
window are taken out of S and their fields given unknowns of their own; their rows hold only
entire functions of ω (cos and β sin of βx, and sin(βx)/β, all even in β). One head (a
kettle, or one symmetric half of a shell of identical heads), with A_q the amplitude of the
duct mode's axial field:

.. math::

    \begin{bmatrix} Z_{ev}(\omega) & V G(\omega) \\ \rho\pi_m\omega^2 V^T & -N D(\omega)
    \end{bmatrix} \begin{bmatrix} q \\ A \end{bmatrix} = 0,

with :math:`Z_{ev}` the operator with the evanescent duct modes only (analytic below their
cut-on), N the duct modes' norms, G the field's value at the head and D its slope there
(the head's motion), :math:`G/D` the duct term: a kettle's field cos βu from the bottom, cos βL
over β sin βL; for a shell's in-phase half, from mid-depth, a kettle of depth L/2
(cot(βL/2)/β, a rigid plane at mid-depth), for its opposed half sin(βu)/β, sin(βL/2)/β over
-cos(βL/2) (-tan(βL/2)/β, a pressure-release plane there). Two unequal heads: the same two
halves, the in-phase one driven by the sum of the heads' motions and the opposed one by their
difference; head 1 feels the sum of the halves' values, head 2 their difference
(:meth:`OrderProblem.evaluate`). D vanishes exactly where the duct term has its poles and
nowhere else, so the Schur complement is Z and the augmented
operator has the drum's roots and no others: the heads' face pressures as unknowns of a shell
(G = cos βL on a head's own face, 1 across) made it singular at every rigid-walled resonance,
where the field from either head is one standing wave, and, for identical heads, wherever a
half has no pole (in-phase at odd half-waves, opposed at a duct mode's cut-on): lossless roots
the drum does not have, which with the boundary layers' loss on spread into clouds
(tests/test_coupled_robust.py counts the zeros there by the argument principle). Roots that
are mostly the body's air (the kettle's or shell's own resonances, loaded by the head) are
roots like any other here, not poles to avoid.

The walls' boundary-layer loss (dissipation.py) is a first-order term built on the
rigid-walled field, so on a propagating duct mode it has a double pole at each of its
rigid-walled resonances (the field's pole, squared): in :math:`Z_{ev}` it would leave the
augmented operator not analytic there, and a shell of unequal heads held clouds of roots that
are no roots of Z (seed 1 drum 240 of benchmarks/sweep_drums.py: 9 to 19 within 2 % of c/2L,
by the form of the other unknowns; at each of the 9, Z's smallest singular value no lower
than 1e-6 away). On the fields' own amplitudes y that form has no pole
(duct_walls.field_wall_blocks), and a second set of unknowns carries it:
with B and D the fields' rows (y = -D^-1 B q), rows [F, G, D] and columns [B^T; 0; D] give
the Schur complement Z + (the form on the fields), the same operator to round-off, with every
block entire. :math:`Z_{ev}` keeps the form on the evanescent fields alone. The first-order
form does give Z a root of its own near each such resonance, on the growing side; it is
dropped with the other growing roots (:func:`_growing`).

Roots are found in overlapping circles along the real axis (radius half the centre, centres
1.5 apart), then each group of nearby roots is refined on small circles until it moves less
than the tolerance. Nothing is continued from a starting guess, so nothing can be lost on the
way or captured by a neighbour.

One module of about 700 lines, on purpose: the scan, the refinement, the Newton polish and the
local solve of a continuation (:func:`local_roots`) are one method on one augmented operator,
and share its scales and tolerances; split, each part would
import the others' constants. What a root holds (head fractions) is energy_share.py.
"""

from __future__ import annotations

import numpy as np

from ..errors import SolverError
from .contour import TooMany, eigen_in_circle
from .energy_share import body_weights, head_fractions, mass_normalised  # noqa: F401  (their old address)

STEP = 1.5  # ratio of successive scan circles' centres
RADIUS = 0.5  # scan circle radius / centre
KEEP = 0.92  # roots kept only this far inside a circle (relative to its radius)
OVERLAP = 1.15  # and only within this factor of its share of the axis (neighbours overlap)
SCAN_POINTS = 48
FLAT_KA, FLAT_ASPECT = 3.0, 0.5  # above k a = 3 the scan curves are ellipses half as high
REFINE_POINTS = 24
# the operator is evaluated to about 1e-13; near a root T^-1 amplifies that by its condition,
# so the refining moments are noise below this fraction of their largest singular value
REFINE_RANK = 1e-8
SCAN_RANK = 1e-11
# a cluster's subspace values are trusted to this relative change between rounds (the
# contour's noise floor is about 1e-9), then isolated roots are polished by Newton's method
SETTLE = 1e-7
NOISE_FLOOR = 1e-5
# a decay rate below this fraction of the frequency is round-off: the mode has no loss
ROUND_OFF = 1e-10
# a root growing faster than this (relative) is an artefact of the continued operator far from
# the real axis, not a mode; between it and 0 it is a lossless root seen through round-off
GROWTH = 1e-6
# Newton's polish reuses T' while the iterate stays this close (relative) to where it was taken
CHORD = 1e-7
# the scan stops refining a curve's roots early only where the coverage test passes at the
# next root's frequency over this (see scan_order)
EARLY = 1.3


def _balance(T0):
    """Row and column scales that equilibrate T0 (two sweeps of max-norm scaling)."""
    n = T0.shape[0]
    r, c = np.ones(n), np.ones(n)
    A = np.abs(T0)
    for _ in range(3):
        r = 1.0 / np.maximum((A * c[None, :]).max(axis=1), 1e-300)
        c = 1.0 / np.maximum((A * r[:, None]).max(axis=0), 1e-300)
    return r, c


def _standing(beta, x: float, shift):
    """cos(beta x), beta sin(beta x) and sin(beta x) / beta, each times exp(-shift), (P, Q).

    Entire in beta^2 (even in beta), so the branch of beta does not matter; sin / beta from
    its series where |beta x| is small (there is no cancellation to lose digits to).
    """
    shift = np.asarray(shift)[None, :]
    ep, em = np.exp(1j * beta * x - shift), np.exp(-1j * beta * x - shift)
    cos = 0.5 * (ep + em)
    sin = -0.5j * (ep - em)
    small = np.abs(beta * x) < 0.5
    safe = np.where(small, 1.0, beta)
    sinb = np.where(small, x * np.sinc(beta * x / np.pi) * np.exp(-shift), sin / safe)
    return cos, beta * sin, sinb


class OrderProblem:
    """One order's roots as an analytic eigenproblem (the augmented operator above).

    Parameters
    ----------
    rs : membrane.physics.operator.RootSet
        The drum's operators.
    i : int
        Order index in ``rs``.
    """

    def __init__(self, rs, i: int):
        self.rs, self.i = rs, i
        self.order = rs.orders[i]
        self.size = rs.size

    def propagating(self, k_top: float) -> int:
        """Duct modes cut on below 1.25 k_top (they get unknowns of their own)."""
        if self.order.depth is None:
            return 0
        gamma = self.rs.data[self.i]["gamma"]
        return int(np.sum(gamma < 1.25 * k_top))

    def shifts(self, centre: complex, radius: float, q0: int) -> np.ndarray:
        """Per duct mode, the largest |Im beta L| on a circle: the rows' constant scale."""
        if q0 == 0:
            return np.zeros(0)
        z = centre + radius * np.exp(2j * np.pi * np.arange(64) / 64)
        k = z / self.rs.c
        beta = np.sqrt(k[:, None] ** 2 - self.rs.data[self.i]["gamma"][None, :q0] ** 2)
        return np.max(np.abs(beta.imag), axis=0) * self.order.depth

    def kind(self) -> str:
        """The basis of the propagating duct modes' fields (duct_walls.field_wall_blocks)."""
        if len(self.order.heads) == 2:
            return "both"
        return {None: "kettle", 1: "in-phase", -1: "opposed"}[self.order.cross_sign]

    def half(self) -> float:
        """The depth the fields' basis spans from its origin: a kettle's L, a shell's L/2."""
        return self.order.depth if self.kind() == "kettle" else 0.5 * self.order.depth

    def walls(self):
        """The order's DuctWalls where the walls' loss is on, else None."""
        losses = self.rs.losses
        return None if losses is None or self.order.depth is None else losses.walls(self.i)

    def resonances_within(self, centre: complex, radius: float) -> bool:
        """Whether a rigid-walled resonance of the body, c sqrt(gamma^2 + (p pi / L)^2), lies
        within ``radius`` of ``centre`` (where the body's air can have roots of its own)."""
        if self.order.depth is None:
            return False
        c, L = self.rs.c, self.order.depth
        lo, hi = (abs(centre) - radius) / c, (abs(centre) + radius) / c
        g = self.rs.data[self.i]["gamma"]
        g = g[g < hi]
        if not len(g):
            return False
        p = np.arange(int(np.ceil(hi * L / np.pi)) + 1)
        k = np.sqrt(g[:, None] ** 2 + (p[None, :] * np.pi / L) ** 2)
        return bool(np.any((k > lo) & (k < hi)))

    def unknowns(self, q0: int) -> int:
        """Size of the augmented operator with q0 propagating duct modes."""
        fields = q0 * (2 if self.kind() == "both" else 1) if q0 else 0
        return self.size + fields * (2 if fields and self.walls() is not None else 1)

    def evaluate(self, omega, q0: int, w_ref: float, shift=None):
        """T(omega) of the augmented operator, (P, unknowns, unknowns), complex.

        The unknowns after the Ritz coordinates are the propagating duct modes' field
        amplitudes (module docstring), their columns multiplied by the constant exp(-shift_q)
        so that cos and sin of a complex beta L never overflow (a constant column scale
        changes no root); with the walls' loss on, as many again, whose rows carry the
        loss's form on those fields.
        """
        rs, d, order = self.rs, self.rs.data[self.i], self.order
        omega = np.asarray(omega, dtype=complex)
        Z = rs.order_operator(self.i, omega, skip_ducts=q0)
        if q0 == 0:
            return Z
        n, P = self.size, len(omega)
        V, off = d["V"], d["offsets"]
        kind, half = self.kind(), self.half()
        nf = q0 * (2 if kind == "both" else 1)
        walls = self.walls()
        N = n + nf * (2 if walls is not None else 1)
        T = np.zeros((P, N, N), complex)
        T[:, :n, :n] = Z
        k = omega / rs.c
        beta = np.sqrt(k[:, None] ** 2 - d["gamma"][None, :q0] ** 2)
        shift = np.zeros(q0) if shift is None else np.asarray(shift)
        if kind != "kettle":
            shift = 0.5 * shift  # the shift is for the whole depth, the basis spans half
        rhow = rs.rho * d["weight"] * w_ref**2
        coef = (omega / w_ref) ** 2
        norms = d["norms"][None, :q0] / rhow
        cos, bsin, sinb = _standing(beta, half, shift)
        f = slice(n, n + nf)
        idx = np.arange(q0)
        # each head feels the fields' values at its face; each field's row says that its
        # slope there is the head's motion (X = V^T q): for a kettle, A cos(beta u) from the
        # bottom, coef X = N beta sin(beta L) A; for a shell, from mid-depth, the in-phase
        # A+ cos(beta u) driven by (X_1 + X_2) / 2 and the opposed A- sin(beta u) / beta by
        # (X_1 - X_2) / 2 (one of them for identical heads, X_1 = +-X_2)
        if kind in ("kettle", "in-phase", "opposed"):
            value, slope = (sinb, norms * cos) if kind == "opposed" else (cos, -norms * bsin)
            T[:, :n, f] = V[0][None, :, :q0] * value[:, None, :]
            T[:, f, :n] = coef[:, None, None] * V[0][:, :q0].T[None, :, :]
            T[:, n + idx, n + idx] = slope
        else:
            rp, rm = slice(n, n + q0), slice(n + q0, n + 2 * q0)
            for h, sign in ((0, 1.0), (1, -1.0)):
                rows = slice(off[h], off[h + 1])
                T[:, rows, rp] = V[h][None, :, :q0] * cos[:, None, :]
                T[:, rows, rm] = sign * V[h][None, :, :q0] * sinb[:, None, :]
                vt = 0.5 * coef[:, None, None] * V[h][:, :q0].T[None, :, :]
                T[:, rp, rows] = vt
                T[:, rm, rows] = sign * vt
            T[:, n + idx, n + idx] = -norms * bsin
            T[:, n + q0 + idx, n + q0 + idx] = norms * cos
        if walls is None:
            return T
        # the walls' loss on the fields: with B the fields' rows on q, D their own block
        # (diagonal) and y = -D^-1 B q the fields, a second set of unknowns with rows
        # [F, G, D] and columns [B^T; 0; D] in the head's rows and their own makes the Schur
        # complement Z + (F^T y + y^T F + y^T G y) exactly, the form on the fields: every
        # block entire, so the loss's double pole at a rigid-walled resonance, which the
        # form on the rigid-walled field had, is not in T (that pole is all in y)
        from .duct_walls import field_wall_blocks

        t, v = rs.losses.wall_coefficients(omega)
        Mpp, Mpe = field_wall_blocks(walls, k, t, v, q0=q0, kind=kind, half=half,
                                     shift=shift)
        kappa = (rhow * coef)[:, None, None]  # the fields' unknowns per unit duct amplitude
        g = slice(n + nf, n + 2 * nf)
        T[:, :n, g] = np.swapaxes(T[:, f, :n], 1, 2)
        T[:, g, g] = T[:, f, f]
        T[:, g, :n] = Mpe / kappa
        T[:, g, f] = Mpp / kappa**2
        T[:, :n, f] += np.swapaxes(Mpe, 1, 2) / kappa
        return T

    def prepared(self, centre: complex, radius: float):
        """T near a circle, balanced: (evaluate, column scales) (see :func:`_balance`).

        The scales come from T at the centre, evaluated with the first batch of points
        (one operator call, not two; a batch that holds the centre itself costs no extra
        point). The column scales are filled in on that first call: read them after it.
        """
        k_top = (abs(centre) + radius) / self.rs.c
        self.rs.ensure_range(self.i, k_top)
        q0 = self.propagating(k_top)
        w_ref = abs(centre)
        shift = self.shifts(centre, radius, q0)
        centre = complex(centre)
        n = self.unknowns(q0)
        r, c = np.ones(n), np.ones(n)
        balanced = []

        def evaluate(z):
            z = np.asarray(z, dtype=complex)
            if balanced:
                return r[None, :, None] * self.evaluate(z, q0, w_ref, shift) * c[None, None, :]
            hit = np.flatnonzero(z == centre)
            if len(hit):
                T = self.evaluate(z, q0, w_ref, shift)
                T0 = T[hit[0]]
            else:
                T = self.evaluate(np.concatenate([[centre], z]), q0, w_ref, shift)
                T0, T = T[0], T[1:]
            r[:], c[:] = _balance(T0)
            balanced.append(True)
            return r[None, :, None] * T * c[None, None, :]

        return evaluate, c

    def circle(self, centre: complex, radius: float, *, points: int, margin: float = 1.0,
               blocks: int = 2, rank_tol: float = SCAN_RANK, aspect: float = 1.0,
               count: bool = False):
        """Roots inside a circle (or ellipse): (omega, Ritz vectors of the heads).

        ``count``: check the moments against the argument principle (contour.py)."""
        evaluate, c = self.prepared(centre, radius)
        z, vecs = eigen_in_circle(evaluate, centre, radius, points=points, margin=margin,
                                  blocks=blocks, rank_tol=rank_tol, aspect=aspect,
                                  count=count)
        grow = _growing(z)  # not a decaying mode: an artefact of the continued operator
        z, vecs = z[~grow], vecs[~grow]  # far from the real axis (or see _growing)
        vecs = vecs * c[None, :]  # undo the column scaling
        return z, vecs[:, : self.size]

    def polish(self, z0: complex, *, tol: float, iterations: int = 8, reach: float = 1e-6):
        """Newton's method on det T from a close estimate; (omega, vector) or None.

        The step is 1 / tr(T^-1 T'), T' by a forward difference (relative step 1e-6: its
        error, about 1e-6 of T'' / T', slows the quadratic convergence only by that factor
        per step). T' is taken afresh only where the iterate has moved more than 1e-7
        (relative) from where it was last taken; closer, the same T' serves (a chord step,
        one evaluation instead of two, contracting the error by about that distance). None
        if it wanders further than ``reach`` (relative) or does not converge (then the
        estimate stays).
        """
        evaluate, c = self.prepared(z0, 1e-3 * abs(z0))
        z = complex(z0)
        D, zd, step = None, None, np.inf
        for _ in range(iterations):
            try:
                if D is None or abs(z - zd) > CHORD * abs(z):
                    h = 1e-6 * abs(z)
                    T = evaluate(np.array([z, z + h]))
                    D, zd = (T[1] - T[0]) / h, z
                else:
                    T = evaluate(np.array([z]))
                step = 1.0 / np.trace(np.linalg.solve(T[0], D))
            except np.linalg.LinAlgError:  # singular at z: a root to round-off
                step = np.inf
                break
            z = z - step
            if not np.isfinite(z) or abs(z - z0) > reach * abs(z0):
                return None
            if abs(step) <= tol * abs(z):
                break
        else:
            return None
        # the vector: from T where the last step was taken if that step was below round-off
        # level (1e-3 tol; the vector moves by about as much), else from T at the root
        if abs(step) > 1e-3 * tol * abs(z):
            T = evaluate(np.array([z]))
        _, _, vh = np.linalg.svd(T[0])
        v = np.conj(vh[-1]) * c
        return z, v[: self.size]


def _clusters(z, tol):
    """Groups of indices of z (sorted by real part) whose neighbours lie within tol |z|."""
    order = np.argsort(z.real)
    groups, cur = [], [order[0]] if len(z) else []
    for a, b in zip(order[:-1], order[1:]):
        if abs(z[b] - z[a]) <= tol * abs(z[b]):
            cur.append(b)
        else:
            groups.append(cur)
            cur = [b]
    if cur:
        groups.append(cur)
    return groups


def refine(problem: OrderProblem, z, *, tol: float, rounds: int, context=None):
    """Polish coarse roots on small circles, group by group, until they settle.

    Each group of estimates gets a circle; what it finds is split again into groups of
    near-coincident roots, each with a smaller circle, until a circle returns the same
    roots as the one before (to SETTLE); then isolated roots are polished by Newton's
    method to ``tol``. Returns (omega, vectors); raises SolverError if a group does not
    settle in ``rounds`` circles. ``context`` holds other coarse roots nearby (refined
    separately) that an isolated root's Newton step must not reach towards.
    """
    z = np.asarray(z, dtype=complex)
    out_z, out_v = [], []
    work = []
    for group in _clusters(z, 0.005):
        cur = np.sort_complex(z[group])
        c = complex(np.mean(cur))
        if len(cur) == 1:  # isolated: Newton's method straight from the coarse estimate
            rest = np.delete(z, group)
            if context is not None:
                rest = np.concatenate([rest, [w for w in context if abs(w - c) > 0]])
            gap = np.min(np.abs(rest - c)) / abs(c) if len(rest) else 1.0
            got = problem.polish(c, tol=tol, iterations=rounds, reach=min(0.3 * gap, 5e-3))
            if got is not None:
                out_z.append(np.array([got[0]]))
                out_v.append(got[1][None, :])
                continue
        work.append((c, max(1.5 * _spread(cur), 0.01 * abs(c)), None, 0, False))
    while work:
        centre, radius, prev, depth, widened = work.pop()
        if depth >= rounds:
            raise SolverError(
                f"coupled solve did not converge (order m = {problem.order.m}, roots near "
                f"{np.round(np.atleast_1d(prev if prev is not None else centre).real / (2 * np.pi), 2).tolist()} Hz)")
        try:
            new, vecs = problem.circle(centre, radius, points=REFINE_POINTS, blocks=2,
                                       rank_tol=REFINE_RANK)
        except TooMany:  # noise or a crowd: a smaller circle
            work.append((centre, radius / 3.0, prev, depth + 1, widened))
            continue
        if not len(new):
            if prev is None and not widened:  # a poor coarse estimate: look wider once
                work.append((centre, 3.0 * radius, None, depth + 1, True))
            continue  # otherwise the estimate was spurious: nothing is there
        order = np.argsort(new.real)
        new, vecs = new[order], vecs[order]
        change = np.max(np.abs(new - prev) / np.abs(new)) \
            if prev is not None and len(new) == len(prev) else np.inf
        # settled; or, after a few rounds, wandering at the operator's noise floor (a very
        # stiff head's high modes make Z noisy at about 1e-7): the roots are known to that
        # (and a root still wandering when the rounds run out, far above any tolerance a
        # table needs, is taken where it is rather than lost; a budget below 4 rounds is a
        # request for strictness and raises instead)
        last = depth + 1 >= rounds and rounds >= 4
        if change <= SETTLE or (depth >= 4 and change <= NOISE_FLOOR) or last:
            _polish_group(problem, new, vecs, tol=tol)
            out_z.append(new)
            out_v.append(vecs)
            continue
        for group in _clusters(new, 1e-4):
            cur = new[np.sort(group)]
            c = complex(np.mean(cur))
            rest = np.delete(new, group)
            gap = np.min(np.abs(rest - c)) if len(rest) else abs(c)
            r = max(2.0 * _spread(cur), min(0.3 * gap, 1e-3 * abs(c)), 1e-6 * abs(c))
            work.append((c, r, cur, depth + 1, widened))
    if not out_z:
        return np.zeros(0, complex), np.zeros((0, problem.size), complex)
    z, v = np.concatenate(out_z), np.concatenate(out_v)
    keep = ~_growing(z)  # polished (or settled) past the real axis: not a mode either
    return _dedupe(z[keep], v[keep])


def _growing(z) -> np.ndarray:
    r"""Roots that grow in time faster than round-off (:data:`GROWTH`): bool.

    A passive drum has none; besides the continued operator's artefacts far from the real
    axis, the walls' loss makes them near a rigid-walled resonance: first order in the
    rigid-walled field, it adds :math:`\epsilon/x^2` to the field's pole :math:`s/x` (x the
    distance from the resonance), and :math:`s/x + \epsilon/x^2` vanishes at
    :math:`x = -\epsilon/s`, the mirror of the damped air resonance's own shift
    :math:`+\epsilon/s`: a root of the first-order model, not of the drum, on the growing
    side (a 7-inch head over a 1.42 m kettle has one 0.66 Hz from its (0,3), growing at
    0.73 Hz, tests/test_coupled_robust.py)."""
    z = np.asarray(z, dtype=complex)
    return z.imag < -GROWTH * np.abs(z)


def _polish_group(problem, z, vecs, *, tol):
    """Newton-polish the roots of a settled group that have no close neighbour (in place)."""
    for j in range(len(z)):
        others = np.delete(z, j)
        if len(others) and np.min(np.abs(others - z[j])) < 1e-5 * abs(z[j]):
            continue  # a tight cluster keeps its subspace values: Newton cannot tell them apart
        got = problem.polish(z[j], tol=tol)
        if got is not None:
            z[j], vecs[j] = got


def _spread(z) -> float:
    return float(np.ptp(z.real) + np.ptp(z.imag)) if len(z) > 1 else 0.0


def _dedupe(z, v):
    """Drop roots found twice (same omega to 1e-9 and the same vector)."""
    order = np.argsort(z.real)
    z, v = z[order], v[order]
    keep = []
    for i in range(len(z)):
        dup = False
        for j in keep:
            if abs(z[i] - z[j]) <= 1e-9 * abs(z[i]):
                a, b = v[i], v[j]
                ov = abs(np.vdot(a, b)) / max(np.linalg.norm(a) * np.linalg.norm(b), 1e-300)
                if ov > 0.99:
                    dup = True
                    break
        if not dup:
            keep.append(i)
    return z[keep], v[keep]


def scan_order(rs, i: int, *, covered, lowest: float, tol: float, rounds: int,
               ceiling: float, floor: float = 0.0):
    """All roots of order i from about ``lowest`` up, until the heads' modes are covered.

    Parameters
    ----------
    rs : RootSet
    i : int
    covered : callable
        (omega, vectors, head fractions, top, margin=1) -> bool: whether the roots found
        below the angular frequency ``top`` (every root there is found) hold every head mode
        wanted, tested at top / margin (the scan stops then).
    lowest : float
        Lowest in-vacuum angular frequency of the order, rad/s (the scan starts at 1/8 of it).
    tol : float
        Relative tolerance of the refined roots.
    rounds : int
        Refinement rounds allowed per cluster.
    ceiling : float
        Highest angular frequency the scan may reach before giving up, rad/s.
    floor : float
        An angular frequency no root lies below, rad/s (assembly.root_floor): the curves
        whose share of the axis lies wholly below it are not scanned (they would be empty;
        the curves above are the same as without it, so are the roots). On a very slack
        shell they were not always empty: a generated 28-inch one at 2.6 x its slack limit
        had three near-equal spurious roots at 0.586 Hz (its lowest in-vacuum mode 3.05 Hz,
        the floor 1.27 Hz), labelled (0,1)..(0,3) opposed; the floor leaves them out.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray, numpy.ndarray)
        Angular frequencies (complex), Ritz vectors and head fractions, ascending.
    """
    problem = OrderProblem(rs, i)
    low = lowest / 8.0
    centre = low * np.sqrt(STEP)
    zs, vs = [np.zeros(0, complex)], [np.zeros((0, rs.size), complex)]
    known, fracs = np.zeros(0, complex), np.zeros(0)
    allz, allv = known, np.zeros((0, rs.size), complex)

    def absorb(z, v):
        """Refined roots joined to those known (deduped), with their head fractions."""
        nonlocal zs, vs, known, fracs, allz, allv
        zs.append(z)
        vs.append(v)
        allz = np.concatenate(zs)
        allv = np.concatenate(vs)
        if len(allz) > len(known):
            allz, allv = _dedupe(allz, allv)
            zs, vs = [allz], [allv]
            allv = mass_normalised(rs, i, allv)
            # a root kept from before keeps its head fraction (found again from the next
            # circle it may differ in the last digits: matched within 1e-12, not by equality,
            # else it would count as no head at all and the scan run on far too high)
            frac = np.zeros(len(allz))
            fresh = np.ones(len(allz), bool)
            for j, w in enumerate(allz):
                if len(known):
                    k = int(np.argmin(np.abs(known - w)))
                    if abs(known[k] - w) <= 1e-12 * abs(w):
                        frac[j], fresh[j] = fracs[k], False
            frac[fresh] = head_fractions(rs, i, allz[fresh], allv[fresh])
            known, fracs = allz, frac

    while True:
        lo, hi = centre / np.sqrt(STEP), centre * np.sqrt(STEP)
        if hi * OVERLAP < floor:  # wholly below every root: nothing to find
            centre *= STEP
            continue
        z = _coarse(problem, lo, hi, centre, RADIUS * centre)
        if len(known):  # found (and refined) already from the circle before
            z = np.array([w for w in z if np.min(np.abs(known - w)) > 1e-3 * abs(w)], complex)
        done = False
        # refined (kept wherever they settle; found twice: deduped) group by group upwards:
        # once the roots below the next group hold every head mode wanted with room to
        # spare (the coverage test passed at a top EARLY times lower, so that no root above
        # can hold more of a mode than the one chosen: a shell's (0,3) in-phase moved from
        # 368 to 236 Hz with the test's own 1.25), the rest of the curve's roots, above what
        # any row needs, are not refined
        groups = sorted(_clusters(z, 0.005), key=lambda g: float(np.min(z[g].real))) if len(z) else []
        for k, group in enumerate(groups):
            absorb(*refine(problem, z[group], tol=tol, rounds=rounds, context=z))
            nxt = float(np.min(z[groups[k + 1]].real)) * (1.0 - 0.005) if k + 1 < len(groups) else None
            if nxt is not None and nxt < hi and len(allz) \
                    and covered(allz, mass_normalised(rs, i, allv), fracs, nxt, EARLY):
                done = True
                break
        if done or (len(allz) and covered(allz, mass_normalised(rs, i, allv), fracs, hi)):
            break
        if hi > ceiling:
            raise SolverError(
                f"coupled solve: order m = {rs.orders[i].m} does not have the head modes wanted "
                f"below {hi / (2 * np.pi):.4g} Hz")
        centre *= STEP
    frac = fracs
    return allz, mass_normalised(rs, i, allv), frac


def _coarse(problem, lo, hi, centre, radius, depth=0):
    """Coarse roots with lo <= Re omega < hi from one curve, or from three smaller ones (as
    many nodes each) if the curve holds more than its moments can resolve."""
    rs = problem.rs
    # the radiation tables are series in (k a)^2, accurate far from the real axis only at
    # small k a; higher up every root is lightly damped, so the curve flattens there
    ka = (centre + radius) / rs.c * problem.order.heads[0].radius
    # a crowd (a long duct's ladder of air resonances, 23 Hz apart under a 7-inch head on a
    # 0.18 m^3 kettle) needs more nodes, not more moments: the trapezoidal rule's error from
    # a root just outside the curve falls like |s_out|^-(points - moments), so extra moments
    # at a fixed node count only raise the noise the rank test sees
    try:
        # where the body has a rigid-walled resonance under the curve, the moments are
        # checked against the argument principle: a crowd of air resonances weakly coupled
        # to the head (a long kettle's ladder above a duct mode's cut-on), each close to its
        # rigid-walled one, can hold more roots than the moments resolve, with no gap in the
        # Hankel matrix's singular values to say so (the augmented operator is entire, so
        # the turns of det T count its roots exactly where its phase is resolved between
        # nodes: contour.winding); elsewhere the check would cost an LU per node (and the
        # nodes added where det T's phase turns fast) for nothing
        # a smaller curve keeps the node count: it already has 2.5 times the nodes per unit
        # of axis (of the crowd's spacing); doubling them per level as well cost the 1.7 m^3
        # kettle of benchmarks/bench_commands.py's two-target tune 2.8 times the time for
        # the same roots, and a curve that still misses some is split again on the count
        z, _ = problem.circle(centre, radius, points=SCAN_POINTS, margin=KEEP,
                              aspect=1.0 if ka <= FLAT_KA else FLAT_ASPECT, blocks=2,
                              count=problem.resonances_within(centre, radius))
    except TooMany:
        if depth >= 5:
            raise
        edges = np.linspace(lo, hi, 4)
        parts = [_coarse(problem, a, b, 0.5 * (a + b), radius / 2.5, depth + 1)
                 for a, b in zip(edges[:-1], edges[1:])]
        return _one_copy(parts)
    return z[(z.real >= lo / OVERLAP) & (z.real < hi * OVERLAP)]


def _one_copy(parts, tol: float = 1e-6):
    """Coarse roots of neighbouring curves with each root once: (R,) complex.

    The curves' shares of the axis overlap, so a root near a share's edge comes from two
    curves; the two estimates of it would make a group of one root,
    refined on a circle instead of by Newton's method, which a near-singular operator (a
    kettle in vanishing air) does not resolve. Of the estimates within ``tol`` (relative) of
    each other, those of the one curve that has the most of them are kept (so a close pair
    seen by both curves stays two roots).
    """
    z = np.concatenate(parts) if parts else np.zeros(0, complex)
    if not len(z):
        return z
    source = np.concatenate([np.full(len(p), j) for j, p in enumerate(parts)])
    keep = np.zeros(len(z), bool)
    for group in _clusters(z, tol):
        group = np.asarray(group)
        counts = np.bincount(source[group])
        keep[group[source[group] == int(np.argmax(counts))]] = True
    return z[keep]


def local_roots(rs, i: int, centre: complex, radius: float, *, tol: float):
    """Every root of order i inside one small circle, polished: (omega, vectors, head fractions).

    The corrector of a continuation (branches.py): where a root was a step ago, and where it
    is predicted to be, only a small circle needs looking at instead of the whole window.
    Roots are polished by Newton's method to ``tol`` where they have no close neighbour;
    an empty answer means none inside, or more than the circle can tell apart (a smaller
    step gives a smaller circle).
    """
    problem = OrderProblem(rs, i)
    empty = (np.zeros(0, complex), np.zeros((0, rs.size), complex), np.zeros(0))
    for attempt in range(4):  # a crowd, or noise: more nodes on a smaller circle
        try:
            z, v = problem.circle(centre, radius, points=REFINE_POINTS * 2**attempt, blocks=2,
                                  rank_tol=REFINE_RANK)
            break
        except TooMany:
            radius *= 0.5
    else:
        return empty
    if not len(z):
        return empty
    order = np.argsort(z.real)
    z, v = z[order], v[order]
    # a root near the curve is known only roughly from the moments: Newton's method may
    # move it as far as the circle reaches, but no nearer to a neighbour than half the gap
    for j in range(len(z)):
        others = np.delete(z, j)
        gap = np.min(np.abs(others - z[j])) if len(others) else np.inf
        if gap < 1e-5 * abs(z[j]):
            continue  # a tight cluster keeps its subspace values
        reach = min(2.0 * radius, 0.5 * gap) / abs(z[j])
        got = problem.polish(z[j], tol=tol, reach=reach)
        if got is not None:
            z[j], v[j] = got
    keep = ~_growing(z)
    z, v = z[keep], v[keep]
    v = mass_normalised(rs, i, v)
    return z, v, head_fractions(rs, i, z, v)
