"""Roots followed continuously along a parameter: branches, and what a crossing looks like.

The tables label each root by what it is at one drum (coupled.label_roots: the root most
like the in-vacuum (m,n)). Along a parameter (a tension, a volume, a depth) a root moves
continuously; :func:`follow` tracks every root of one order from step to step by matching
mode shapes (the overlap |x^H M y| of their Ritz vectors, one-to-one by an optimal
assignment), halving the step wherever the match is not clear. Through an avoided
crossing with an air resonance the continuous branch and the label part company: see
docs/mode-identity.md.

Full physics only (the vacuum models have no crossings to follow).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

# a step is accepted when every tracked root matches its successor at least this well
# and no other candidate comes within MARGIN of that match
MATCH = 0.8
MARGIN = 0.15
MIN_STEP = 1e-6  # relative parameter step below which the match is taken as it is


@dataclass
class Track:
    """Roots of one order followed along a parameter.

    Attributes
    ----------
    values : list of float
        Parameter values visited (ascending along the path).
    omega : list of numpy.ndarray
        Complex angular frequencies of the tracked roots at each value (rad/s), in the
        order of the roots at the start.
    head_fraction : list of numpy.ndarray
    labels : list of list
        coupled.label_roots labels of the tracked roots at each value.
    """

    values: list = field(default_factory=list)
    omega: list = field(default_factory=list)
    head_fraction: list = field(default_factory=list)
    labels: list = field(default_factory=list)

    def frequencies(self) -> np.ndarray:
        """(values, roots) frequencies in Hz."""
        return np.array([w.real for w in self.omega]) / (2 * np.pi)


def order_roots(drum, *, m: int, n_max: int, cross_sign=None):
    """The OrderRoots of order m (the branch ``cross_sign`` of identical shell heads)."""
    from .physics.coupled import solve_drum

    for od in solve_drum(drum, m_max=m, n_max=n_max, only=m):
        if od.order.m == m and (cross_sign is None or od.order.cross_sign in (None, cross_sign)):
            return od
    raise ValueError(f"order {m} not solved")


def _overlaps(a, b, M) -> np.ndarray:
    """|a_i^H M b_j| / (|a_i| |b_j|) for Ritz vectors a (I, n), b (J, n)."""
    num = np.abs(np.conj(a) @ M @ b.T)
    na = np.sqrt(np.abs(np.einsum("in,nk,ik->i", np.conj(a), M, a)))
    nb = np.sqrt(np.abs(np.einsum("in,nk,ik->i", np.conj(b), M, b)))
    return num / np.maximum(na[:, None] * nb[None, :], 1e-300)


def match(prev, new, M):
    """Successor of each previous root among the new ones: (index array, worst score).

    The score mixes shape overlap with closeness in frequency (roots of nearly the same
    shape far apart in frequency are not the same root); an optimal assignment keeps it
    one-to-one. Returns (-1 where a root has no successor) and the smallest margin by
    which each match beats its runner-up.
    """
    from scipy.optimize import linear_sum_assignment

    (wp, vp), (wn, vn) = prev, new
    O = _overlaps(vp, vn, M)
    rel = np.abs(wp[:, None] - wn[None, :]) / np.abs(wp)[:, None]
    score = O * np.exp(-rel / 0.05)
    rows, cols = linear_sum_assignment(-score)
    succ = -np.ones(len(wp), int)
    succ[rows] = cols
    worst, margin = 1.0, 1.0
    for r, c in zip(rows, cols):
        worst = min(worst, score[r, c])
        others = np.delete(score[r], c)
        if len(others):
            margin = min(margin, score[r, c] - others.max())
    return succ, worst, margin


def follow(make_drum, values, *, m: int, n_max: int, cross_sign=None, roots=None,
           max_steps: int = 400) -> Track:
    """Track the roots of order m along ``values`` (any monotone parameter path).

    Parameters
    ----------
    make_drum : callable
        Parameter value -> Drum.
    values : sequence of float
        Points the track must visit (it adds steps between them where the match needs).
    m, n_max : int
        Order and the head modes per order solved at each point.
    cross_sign : int or None
        For a shell of identical heads, which branch (+1 in-phase, -1 opposed).
    roots : sequence of int or None
        Indices of the starting roots to follow (default all of them).
    max_steps : int
        Solves allowed in all.

    Returns
    -------
    Track
        A root that leaves the solved window is dropped from the end of the track
        (its entries become NaN).
    """
    values = [float(v) for v in values]
    od = order_roots(make_drum(values[0]), m=m, n_max=n_max, cross_sign=cross_sign)
    pick = np.arange(len(od.omega)) if roots is None else np.asarray(roots)
    w, v = od.omega[pick], od.vectors[pick]
    M = od.order.heads[0].M if len(od.order.heads) == 1 else None
    track = Track()

    def record(p, od, idx):
        ok = idx >= 0
        om = np.full(len(idx), np.nan + 0j)
        hf = np.full(len(idx), np.nan)
        om[ok] = od.omega[idx[ok]]
        hf[ok] = od.head_fraction[idx[ok]]
        track.values.append(p)
        track.omega.append(om)
        track.head_fraction.append(hf)
        track.labels.append([od.labels[i] if i >= 0 else None for i in idx])

    record(values[0], od, pick)
    solves = 1
    p = values[0]
    for goal in values[1:]:
        step = goal - p
        while p != goal:
            q = goal if abs(goal - p) <= abs(step) else p + step
            new = order_roots(make_drum(q), m=m, n_max=n_max, cross_sign=cross_sign)
            solves += 1
            Mq = new.order.heads[0].M if M is not None else _block(new.order)
            alive = np.isfinite(w)
            succ, worst, margin = match((w[alive], v[alive]), (new.omega, new.vectors), Mq)
            small = abs(q - p) <= MIN_STEP * max(abs(p), 1e-300)
            if (worst < MATCH or margin < MARGIN) and not small and solves < max_steps:
                step = 0.5 * (q - p)
                continue
            idx = -np.ones(len(w), int)
            idx[np.nonzero(alive)[0]] = succ
            w = np.where(idx >= 0, new.omega[np.maximum(idx, 0)], np.nan)
            v = np.where((idx >= 0)[:, None], new.vectors[np.maximum(idx, 0)], 0.0)
            record(q, new, idx)
            p = q
            step = 2.0 * step if abs(2.0 * step) <= abs(goal - values[0]) else step
    return track


def _block(order):
    from .physics.coupled import _block_diag

    return _block_diag([h.M for h in order.heads])


def crossing_note(drum, *, m: int, n: int, n_max: int, t_lo: float, t_hi: float):
    """What happens to (m,n) between two close tensions where its label jumps.

    Returns (air_hz, lower_hz, upper_hz): the body's air resonance the head mode meets (the
    frequency of the root mostly of air there, Hz), and the (m,n) frequency just below and
    just above the jump.
    """
    lo = order_roots(drum.with_tension(t_lo), m=m, n_max=n_max)
    hi = order_roots(drum.with_tension(t_hi), m=m, n_max=n_max)

    def labelled(od):
        for r, lab in enumerate(od.labels):
            if lab is not None and lab[0] == "head" and lab[1] == 0 and lab[2] == n:
                return r
        return None

    r_lo, r_hi = labelled(lo), labelled(hi)
    f_lo = lo.omega[r_lo].real / (2 * np.pi)
    f_hi = hi.omega[r_hi].real / (2 * np.pi)
    # the partner: at the lower tension, the root next to where the label lands above;
    # the air resonance is the body's own (rigid-walled) one that root is named after
    partner = int(np.argmin(np.abs(lo.omega - hi.omega[r_hi])))
    air_hz = 0.5 * (f_lo + f_hi)
    lab = lo.labels[partner]
    if lab is not None and lab[0] == "air" and lo.order.depth is not None:
        from .physics.coupled import order_duct_gammas

        q, p = lab[1], lab[2]
        gamma = order_duct_gammas(lo.order, count=q + 1)[q]
        air_hz = drum.air.sound_speed * math.hypot(gamma, p * math.pi / lo.order.depth) / (2 * math.pi)
    return air_hz, f_lo, f_hi, lo, hi, r_lo, partner


def branch_tension(drum, *, m: int, n_max: int, start_tension: float, start_root: int,
                   target_hz: float, direction: int, t_min: float, t_max: float,
                   max_solves: int = 40):
    """The tension at which the continuous branch through a root reaches target_hz.

    Follows the branch from ``start_tension`` up (direction +1) or down (-1) in steps of
    ln T that grow while the branch is followed clearly; when the target is passed, the
    last step is refined by the secant method on the branch. Returns (tension, head
    fraction there, label there) or None if the branch does not reach it within
    [t_min, t_max].
    """
    od = order_roots(drum.with_tension(start_tension), m=m, n_max=n_max)
    M = _block(od.order)
    w, v = od.omega[start_root], od.vectors[start_root]
    x = math.log(start_tension)
    step = 0.01 * direction
    solves = 1
    g = math.log(w.real / (2 * np.pi) / target_hz)

    def at(xq, w, v):
        new = order_roots(drum.with_tension(math.exp(xq)), m=m, n_max=n_max)
        succ, worst, margin = match((np.array([w]), v[None, :]), (new.omega, new.vectors), M)
        j = succ[0]
        return new, j, worst

    while solves < max_solves:
        xq = x + step
        if not math.log(t_min) <= xq <= math.log(t_max):
            return None
        new, j, worst = at(xq, w, v)
        solves += 1
        if j < 0 or (worst < MATCH and abs(step) > 1e-5):
            step *= 0.5
            continue
        wq = new.omega[j]
        gq = math.log(wq.real / (2 * np.pi) / target_hz)
        if (gq > 0) != (g > 0):  # passed: secant inside the step, tracked from its start
            xa, ga, xb, gb = x, g, xq, gq
            for _ in range(20):
                xs = xb - gb * (xb - xa) / (gb - ga)
                new, j, _ = at(xs, w, v)
                solves += 1
                gs = math.log(new.omega[j].real / (2 * np.pi) / target_hz)
                if abs(gs) < 1e-6:
                    break
                xa, ga, xb, gb = xb, gb, xs, gs
            return math.exp(xs), float(new.head_fraction[j]), new.labels[j]
        x, g, w, v = xq, gq, wq, new.vectors[j]
        step *= 1.5
    return None
