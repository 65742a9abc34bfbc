r"""An order's roots carried from a solved drum to a nearby one: predictor and Newton corrector.

A tension search solves the same order at a handful of nearby tensions (tension_search.py).
Scanning the whole window anew at each (spectrum.scan_order: dozens of contour curves, a few
thousand operator evaluations) finds the same roots again, a little moved. Here every root of
the solved drum is moved instead:

* *predictor*: the first-order change of each root with the parameters,
  :math:`\Delta\omega = \sum_p (d\omega/d\ln p)\,\Delta\ln p` (sensitivity.py, the derivative
  of a simple eigenvalue of a nonlinear eigenproblem);
* *corrector*: Newton's method on det T of the new drum's augmented operator from the
  prediction (spectrum.OrderProblem.polish, to the same tolerance as a whole solve), allowed
  to move no further than a fraction of the distance to the nearest other root;
* *check*: each root's new mode shape must overlap its old one clearly (tracking.overlaps),
  the roots must stay distinct, and every head mode the order is labelled for must be found
  again below the top of the window the whole solve searched.

Whatever fails a check returns None, and the caller solves the order whole. The carried roots
are then weighed and labelled exactly as a whole solve's (assembly.label_roots). A root that
was not in the solved set (one entering the window from above) is not found this way: the
caller confirms its final answer with a whole solve (tuning.py).
"""

from __future__ import annotations

import numpy as np

from .energy_share import head_fractions, mass_normalised
from .sensitivity import root_slopes
from .spectrum import GROWTH, OrderProblem

# a carried root must keep at least this overlap with its old shape (tracking.MATCH is for
# the small steps of a tracker; a tension step of 30 % turns a hybrid's shape further)
KEEP_SHAPE = 0.6
# roots closer than this (relative) are a cluster: Newton cannot tell them apart
CLUSTER = 1e-4
# the largest step (in each log) a carry is tried over; further, the first-order predictor
# is too rough to trust and the order is solved whole
MAX_STEP = 0.5


def carry(prev, rs_prev, rs_new, steps: dict, *, tol: float):
    """The roots of order 0 of ``rs_new`` carried from ``prev`` (roots of ``rs_prev``).

    Parameters
    ----------
    prev : assembly.OrderRoots
        The solved roots (omega rad/s, vectors, labels).
    rs_prev, rs_new : operator.RootSet
        The operators of that order at the solved drum and at the new one (one order each).
    steps : dict
        Parameter name (sensitivity.PARAMETERS) -> change of its log.
    tol : float
        Relative tolerance of the corrected roots (as for a whole solve).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray, numpy.ndarray) or None
        Omega (ascending in real part), unit-M-norm vectors and head fractions; None where a
        root cannot be carried clearly (then solve the order whole).
    """
    names = [p for p, d in steps.items() if d != 0.0]
    if any(abs(steps[p]) > MAX_STEP for p in names):
        return None
    z0 = np.asarray(prev.omega, dtype=complex)
    if not len(z0):
        return None
    v0 = np.asarray(prev.vectors, dtype=complex)
    if names:
        dw = root_slopes(rs_prev, 0, z0, v0, names) @ np.array([steps[p] for p in names])
    else:
        dw = np.zeros(len(z0), complex)
    pred = z0 + dw
    R = len(pred)
    problem = OrderProblem(rs_new, 0)
    # each prediction's uncertainty: the first-order change itself (the error of the
    # predictor is of second order, below it for steps this size), at least 1e-3
    unc = np.maximum(np.abs(dw), 1e-3 * np.abs(pred))
    new_z = np.full(R, np.nan + 0j)
    new_v = np.zeros((R, rs_new.size), complex)
    # roots well above every head mode take no label: where one of them cannot be carried
    # it is left out (the whole solve's window there is not this one's either)
    heads = [r for r, lab in enumerate(prev.labels) if lab is not None and lab[0] == "head"]
    needed = pred.real <= 1.1 * max(pred[heads].real) if heads else np.ones(R, bool)
    for group in _groups(pred, unc):
        if len(group) == 1:
            r = group[0]
            others = np.delete(pred, r)
            gap = np.min(np.abs(others - pred[r])) if R > 1 else np.inf
            reach = min(0.45 * gap, 2.0 * unc[r]) / abs(pred[r])
            got = problem.polish(pred[r], tol=tol, iterations=12, reach=reach)
            if got is not None:
                new_z[r], new_v[r] = got
                continue
        got = _circle(problem, pred, unc, group, v0, tol=tol)
        if got is None:
            if np.any(needed[group]):
                return None
            continue
        new_z[group], new_v[group] = got
    kept = np.isfinite(new_z)
    new_z, new_v, v0, R = new_z[kept], new_v[kept], v0[kept], int(np.sum(kept))
    if np.any(new_z.imag < -GROWTH * np.abs(new_z)):
        return None
    same = np.abs(new_z[:, None] - new_z[None, :]) <= CLUSTER * np.abs(new_z)[:, None]
    if np.any(same[~np.eye(R, dtype=bool)]):
        return None
    new_v = mass_normalised(rs_new, 0, new_v)
    M = rs_new.data[0]["M"]
    from .tracking import overlaps

    shape = np.diag(overlaps(v0, new_v, M))
    if np.any(shape < KEEP_SHAPE):
        return None
    order = np.argsort(new_z.real)
    new_z, new_v = new_z[order], new_v[order]
    return new_z, new_v, head_fractions(rs_new, 0, new_z, new_v)


def _groups(pred, unc):
    """Indices of predicted roots whose uncertainty disks overlap (transitively), grouped."""
    R = len(pred)
    parent = list(range(R))

    def root(a):
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    for a in range(R):
        for b in range(a + 1, R):
            if abs(pred[a] - pred[b]) <= 1.5 * (unc[a] + unc[b]):
                parent[root(a)] = root(b)
    while True:  # a group's circle (see _circle) must hold no other prediction: merge those
        out = {}
        for a in range(R):
            out.setdefault(root(a), []).append(a)
        merged = False
        for g in out.values():
            centre, radius = _disk(pred, unc, g)
            for b in range(R):
                if root(b) != root(g[0]) and abs(pred[b] - centre) < 1.1 * radius:
                    parent[root(b)] = root(g[0])
                    merged = True
        if not merged:
            return list(out.values())


def _disk(pred, unc, group):
    """Centre and radius of the circle round a group's predictions and their uncertainty."""
    g = np.asarray(group)
    centre = complex(np.mean(pred[g]))
    return centre, float(np.max(np.abs(pred[g] - centre) + 1.2 * unc[g]))


def _circle(problem, pred, unc, group, old, *, tol):
    """The roots of a group found together on one contour circle round their predictions:
    (omega, vectors) in the group's order, or None. ``old`` holds all the roots' previous
    vectors (unit M-norm).

    The circle holds every prediction's uncertainty disk and no other prediction's; it must
    hold exactly as many roots as the group (a root gained or lost is the whole solve's to
    find), and they are matched to the group one-to-one by mode shape.
    """
    from ..assignment import linear_sum_assignment
    from .contour import TooMany
    from .spectrum import REFINE_POINTS, REFINE_RANK
    from .tracking import overlaps

    g = np.asarray(group)
    centre, radius = _disk(pred, unc, g)
    if len(g) > 6:  # more than a circle of these nodes resolves well: a smaller step
        return None
    try:
        z, v = problem.circle(centre, radius, points=4 * REFINE_POINTS, blocks=2,
                              rank_tol=REFINE_RANK, margin=0.95)
    except TooMany:
        return None
    # each found root polished by Newton's method; one that does not converge near where
    # the moments put it is noise of the curve (a node near a duct mode's cut-on), not a root
    zs, vs = [], []
    for j in range(len(z)):
        others = np.delete(z, j)
        gap = np.min(np.abs(others - z[j])) if len(others) else np.inf
        if gap < CLUSTER * abs(z[j]):
            return None
        got = problem.polish(z[j], tol=tol, reach=min(0.05 * radius, 0.45 * gap) / abs(z[j]))
        if got is not None:
            zs.append(got[0])
            vs.append(got[1])
    if len(zs) != len(g):
        return None
    z, v = np.array(zs), np.array(vs)
    M = problem.rs.data[0]["M"]
    score = overlaps(old[g], v, M) * np.exp(-np.abs(pred[g][:, None] - z[None, :])
                                            / (2.0 * radius))
    rows, cols = linear_sum_assignment(-score)
    at = np.empty(len(g), int)
    at[rows] = cols
    return z[at], v[at]
