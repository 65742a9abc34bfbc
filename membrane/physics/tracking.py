r"""Roots of a parameter-dependent eigenproblem followed continuously: matching and stepping.

Generic: nothing here knows about drums. A root is an eigenvalue :math:`\omega` of
:math:`T(\omega; x)` with its eigenvector; along a parameter x it moves continuously, and so
does its vector. A root is followed from one value of x to the next by

* a *predictor*: the secant through the last two points (a constant at the start), which
  says where to look;
* a *corrector*: the caller's local solve, every root inside a small circle round the
  prediction (``roots_near``);
* a *match*: the successor is the root whose vector overlaps most with the previous one
  (:math:`|x^H M y|`, normalised, times a closeness factor in frequency), and must beat every
  other candidate clearly; otherwise the step is halved.

:func:`match` does the same for many roots at once (one-to-one, by an optimal assignment).
The step grows by half after each clear match, so a smooth branch costs a few solves and a
near-crossing as many as its sharpness needs.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

# a step is accepted when the successor matches at least this well and no other candidate
# comes within MARGIN of that match
MATCH = 0.8
MARGIN = 0.15
CLOSE = 0.05  # frequency change (relative) over which the closeness factor falls by 1/e
MIN_STEP = 1e-7  # parameter step below which the best match is taken as it is


def overlaps(a, b, M) -> np.ndarray:
    """|a_i^H M b_j| / (|a_i|_M |b_j|_M) for vectors a (I, n), b (J, n) and a Hermitian M."""
    a, b = np.atleast_2d(a), np.atleast_2d(b)
    num = np.abs(np.conj(a) @ M @ b.T)
    na = np.sqrt(np.abs(np.einsum("in,nk,ik->i", np.conj(a), M, a)))
    nb = np.sqrt(np.abs(np.einsum("in,nk,ik->i", np.conj(b), M, b)))
    return num / np.maximum(na[:, None] * nb[None, :], 1e-300)


def scores(prev, new, M) -> np.ndarray:
    """Match scores (I, J): shape overlap times exp(-relative frequency change / CLOSE).

    ``prev`` and ``new`` are (omega, vectors) pairs. Roots of nearly the same shape far apart
    in frequency are not the same root.
    """
    (wp, vp), (wn, vn) = prev, new
    rel = np.abs(np.asarray(wp)[:, None] - np.asarray(wn)[None, :]) / np.abs(wp)[:, None]
    return overlaps(vp, vn, M) * np.exp(-rel / CLOSE)


def match(prev, new, M):
    """Successor of each previous root among the new ones: (index array, worst score, margin).

    One-to-one by an optimal assignment of :func:`scores`; -1 where a root has no successor.
    ``margin`` is the smallest amount by which a match beats its runner-up.
    """
    from ..assignment import linear_sum_assignment  # scipy's algorithm without scipy.optimize's import

    score = scores(prev, new, M)
    rows, cols = linear_sum_assignment(-score)
    succ = -np.ones(score.shape[0], int)
    succ[rows] = cols
    worst, margin = 1.0, 1.0
    for r, c in zip(rows, cols):
        worst = min(worst, score[r, c])
        others = np.delete(score[r], c)
        if len(others):
            margin = min(margin, score[r, c] - others.max())
    return succ, worst, margin


@dataclass
class Trail:
    """One root followed along a parameter.

    Attributes
    ----------
    x : list of float
        Parameter values visited, in the order visited.
    omega : list of complex
        The root at each value.
    vectors : list of numpy.ndarray
        Its eigenvector at each value.
    extra : list
        Whatever ``roots_near`` returned with the root (e.g. a head fraction).
    solves : int
        Local solves made.
    """

    x: list = field(default_factory=list)
    omega: list = field(default_factory=list)
    vectors: list = field(default_factory=list)
    extra: list = field(default_factory=list)
    solves: int = 0


def follow_one(roots_near, mass, *, x0: float, omega0: complex, vector0, x1: float,
               step: float, extra0=None, stop=None, max_solves: int = 200,
               slope0=None) -> Trail:
    """Follow one root from x0 towards x1 by predictor, local solve and shape match.

    Parameters
    ----------
    roots_near : callable
        (x, centre, radius) -> (omega (J,), vectors (J, n), extra list of J) every root
        inside the circle at parameter x (``omega`` empty if none or too many to tell).
    mass : callable
        x -> the Hermitian matrix M of the overlap at x.
    x0, omega0, vector0 : float, complex, array
        The start.
    x1 : float
        Where to go.
    step : float
        First step in x (its sign is taken from x1 - x0).
    extra0 : object
        ``extra`` of the start.
    stop : callable or None
        (x, omega, extra) -> bool: stop early once it holds (the trail ends there).
    max_solves : int
        Local solves allowed.
    slope0 : complex or None
        d omega / dx at the start (see :func:`follow_many`).

    Returns
    -------
    Trail
        Ends at x1, where ``stop`` first held, or where the solves ran out.
    """
    stops = None if stop is None else (lambda x, w, e: stop(x, w[0], e[0]))
    trails = follow_many(roots_near, mass, x0=x0, omega0=[omega0], vectors0=[vector0], x1=x1,
                         step=step, extra0=[extra0], stop=stops, max_solves=max_solves,
                         slope0=None if slope0 is None else [slope0])
    return trails[0]


def follow_many(roots_near, mass, *, x0: float, omega0, vectors0, x1: float, step: float,
                extra0=None, stop=None, max_solves: int = 400, slope0=None) -> list:
    """Follow several roots together from x0 towards x1 (the same steps for all).

    As :func:`follow_one`, with ``omega0`` (R,) and ``vectors0`` (R, n); a step is taken
    only when every root matches clearly, and halved otherwise, so roots that meet are
    followed as finely as the closest pair needs while the operators are built once per
    step for all of them. ``stop`` gets (x, omegas, extras). ``max_solves`` counts steps
    tried. ``slope0`` (R,) is d omega / dx at the start (e.g. by perturbation,
    physics/sensitivity.root_slopes): the first predictor is then a tangent, not a
    constant, so the first step need not be halved down to where a root has hardly moved
    (a heavily damped root, whose shape changes fastest, was lost so). Returns one Trail per
    root (all with the same x).
    """
    w = np.array(omega0, dtype=complex)
    v = np.array(vectors0)
    R = len(w)
    ex = list(extra0) if extra0 is not None else [None] * R
    trails = [Trail([float(x0)], [complex(w[k])], [v[k]], [ex[k]]) for k in range(R)]
    x = float(x0)
    h = abs(step) * (1.0 if x1 >= x0 else -1.0)
    # d omega / dx: given at the start, then of the last accepted step
    slope = np.zeros(R, complex) if slope0 is None else np.array(slope0, dtype=complex)
    tried = 0
    while x != x1 and tried < max_solves:
        xn = x1 if abs(x1 - x) <= abs(h) else x + h
        small = abs(xn - x) <= MIN_STEP
        tried += 1
        M = mass(xn)
        new_w, new_v, new_e, ok = np.empty(R, complex), np.empty_like(v), [None] * R, True
        for k in range(R):
            pred = w[k] + slope[k] * (xn - x)
            radius = max(1.5 * abs(pred - w[k]), 2e-3 * abs(w[k]))
            z, vs, e = roots_near(xn, pred, radius)
            if not len(z):
                ok = False
                break
            sc = scores((np.array([pred]), v[k][None, :]), (z, vs), M)[0]
            best = int(np.argmax(sc))
            runner = np.max(np.delete(sc, best)) if len(sc) > 1 else 0.0
            if (sc[best] < MATCH or sc[best] - runner < MARGIN) and not small:
                ok = False
                break
            new_w[k], new_v[k], new_e[k] = z[best], vs[best], e[best]
        if ok and R > 1:  # one-to-one: two roots must not land on one
            same = np.abs(new_w[:, None] - new_w[None, :]) <= 1e-9 * np.abs(new_w)[:, None]
            ok = not np.any(same[~np.eye(R, dtype=bool)]) or small
        if not ok:
            if small:
                break
            h *= 0.5
            continue
        slope = (new_w - w) / (xn - x)
        x, w, v = xn, new_w, new_v
        for k in range(R):
            trails[k].x.append(x)
            trails[k].omega.append(complex(w[k]))
            trails[k].vectors.append(v[k])
            trails[k].extra.append(new_e[k])
        if stop is not None and stop(x, w, new_e):
            break
        h *= 1.5
    for t in trails:
        t.solves = tried
    return trails
