"""Roots followed continuously along a parameter: branches, and what a crossing looks like.

The tables label each root by what it is at one drum (coupled.label_roots: the root most
like the in-vacuum (m,n)). Along a parameter (a tension, a volume, a depth) a root moves
continuously; :func:`follow` and :func:`follow_root` track roots from value to value by a
predictor, a local solve round the prediction (spectrum.local_roots) and a match of mode
shapes (physics/tracking.py), halving the step wherever the match is not clear. Through an
avoided crossing with an air resonance the continuous branch and the label part company:
see docs/mode-identity.md.

Full physics only (the vacuum models have no crossings to follow).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np


@dataclass
class Track:
    """Roots of one order followed along a parameter.

    Attributes
    ----------
    values : list of float
        The parameter values asked for, in order.
    omega : list of numpy.ndarray
        Complex angular frequencies of the tracked roots at each value (rad/s), in the
        order of the roots at the start; NaN where a root could not be followed.
    head_fraction : list of numpy.ndarray
    labels : list of list
        coupled.label_roots labels of the tracked roots at each value (from a whole solve
        of the order there; None where the tracked root is not among its labelled roots).
    steps : int
        Local solves the tracking took.
    """

    values: list = field(default_factory=list)
    omega: list = field(default_factory=list)
    head_fraction: list = field(default_factory=list)
    labels: list = field(default_factory=list)
    steps: int = 0

    def frequencies(self) -> np.ndarray:
        """(values, roots) frequencies in Hz."""
        return np.array([w.real for w in self.omega]) / (2 * np.pi)


def order_roots(drum, *, m: int, n_max: int, cross_sign=None, losses=None):
    """The OrderRoots of order m (the branch ``cross_sign`` of identical shell heads)."""
    from .physics.assembly import solve_drum

    for od in solve_drum(drum, m_max=m, n_max=n_max, only=m, losses=losses):
        if od.order.m == m and (cross_sign is None or od.order.cross_sign in (None, cross_sign)):
            return od
    raise ValueError(f"order {m} not solved")


def follow(make_drum, values, *, m: int, n_max: int, cross_sign=None, roots=None,
           losses=None, max_steps: int = 400, labels: bool = True, parameter=None) -> Track:
    """Track the roots of order m along ``values`` (any monotone parameter path).

    Parameters
    ----------
    make_drum : callable
        Parameter value -> Drum.
    values : sequence of float
        Points the track must visit (it adds steps between them where the match needs).
    m, n_max : int
        Order and the head modes per order solved at the start.
    cross_sign : int or None
        For a shell of identical heads, which branch (+1 in-phase, -1 opposed).
    roots : sequence of int or None
        Indices of the starting roots to follow (default all of them).
    losses : membrane.losses.Losses or None
        As for coupled.solve_drum.
    max_steps : int
        Local solves allowed per root.
    labels : bool
        Solve the whole order at each value too and carry its labels (else labels are None).
    parameter : str or None
        What the values are the logarithm of (physics/sensitivity.PARAMETERS: "tension" of
        the struck head, "tensions" of every head, "areal_density", "volume"). With it each
        root's first step is predicted along its tangent, d omega / d ln p by perturbation,
        instead of from standing still.

    Returns
    -------
    Track
        From a value the roots could not all be followed to, they are NaN.
    """
    values = [float(v) for v in values]
    od = order_roots(make_drum(values[0]), m=m, n_max=n_max, cross_sign=cross_sign, losses=losses)
    pick = np.arange(len(od.omega)) if roots is None else np.asarray(roots)
    R = len(pick)
    sets = {}  # operators by parameter value, shared by every root followed
    om = np.full((len(values), R), np.nan + 0j)
    hf = np.full((len(values), R), np.nan)
    om[0], hf[0] = od.omega[pick], od.head_fraction[pick]
    track = Track(values=values)
    x, w, v, f = values[0], om[0].copy(), od.vectors[pick], list(hf[0])
    slope = None
    if parameter is not None and R:
        from .physics.sensitivity import root_slopes

        slope = root_slopes(od.root_set, od.index, w, v, [parameter])[:, 0]
    for j, goal in enumerate(values[1:], start=1):
        trails = follow_roots(make_drum, m=m, n_max=n_max, x0=x, omega0=w, vectors0=v, x1=goal,
                              step=goal - x, losses=losses, cross_sign=cross_sign,
                              max_solves=max_steps, extra0=f, sets=sets, slope0=slope)
        if trails and len(trails[0].x) >= 2:  # the last step's secant for the next leg
            slope = np.array([(t.omega[-1] - t.omega[-2]) / (t.x[-1] - t.x[-2]) for t in trails])
        track.steps += trails[0].solves if trails else 0
        if not trails or trails[0].x[-1] != goal:
            break
        x = goal
        w = np.array([t.omega[-1] for t in trails])
        v = np.array([t.vectors[-1] for t in trails])
        f = [t.extra[-1] for t in trails]
        om[j], hf[j] = w, f
    for j, p in enumerate(values):
        track.omega.append(om[j])
        track.head_fraction.append(hf[j])
        if not labels:
            track.labels.append([None] * R)
            continue
        there = od if j == 0 else order_roots(make_drum(p), m=m, n_max=n_max,
                                               cross_sign=cross_sign, losses=losses)
        row = []
        for w in om[j]:
            near = np.abs(there.omega - w) <= 1e-6 * abs(w) if np.isfinite(w) else []
            row.append(there.labels[int(np.argmax(near))] if np.any(near) else None)
        track.labels.append(row)
    return track


def follow_root(drum_at, *, m: int, n_max: int, x0: float, omega0: complex, vector0, x1: float,
                step: float = 0.01, losses=None, cross_sign=None, stop=None,
                max_solves: int = 60, extra0=None, sets: dict | None = None):
    """One root of order m followed along a parameter x by local solves (physics/tracking.py).

    Parameters
    ----------
    drum_at : callable
        x -> Drum (e.g. ``lambda x: drum.with_tension(math.exp(x))``).
    m, n_max : int
        Order, and the head modes its operator is built for (as in the tables).
    x0, omega0, vector0 : float, complex, array
        The start: a root of the drum at x0 (rad/s) and its Ritz vector.
    x1 : float
        Where to go.
    step : float
        First step in x.
    losses : membrane.losses.Losses or None
        As for coupled.solve_drum.
    stop : callable or None
        (x, omega, head fraction) -> bool: end the trail once it holds.
    max_solves : int
        Local solves allowed.
    sets : dict or None
        Operators already built, by x (shared between roots followed along one path).

    Returns
    -------
    tracking.Trail
        ``extra`` holds the head fraction at each point.

    Each step solves only a small circle round the predicted root (a few dozen evaluations
    of the operator) instead of the whole window, so following a root costs far less than
    re-solving the drum at every value.
    """
    from .physics import tracking

    roots_near, mass = _local_search(drum_at, m=m, n_max=n_max, losses=losses,
                                     cross_sign=cross_sign, sets=sets)

    return tracking.follow_one(roots_near, mass, x0=x0,
                               omega0=omega0, vector0=vector0, x1=x1, step=step,
                               extra0=extra0, stop=stop, max_solves=max_solves)


def follow_roots(drum_at, *, m: int, n_max: int, x0: float, omega0, vectors0, x1: float,
                 step: float = 0.01, losses=None, cross_sign=None, stop=None,
                 max_solves: int = 400, extra0=None, sets: dict | None = None,
                 slope0=None) -> list:
    """Several roots of order m followed together (the same steps): one Trail per root.

    As :func:`follow_root`, with ``omega0`` (R,) and ``vectors0`` (R, size); ``slope0`` (R,)
    d omega / dx at the start, or None (tracking.follow_many).
    """
    from .physics import tracking

    roots_near, mass = _local_search(drum_at, m=m, n_max=n_max, losses=losses,
                                     cross_sign=cross_sign, sets=sets)

    if not len(omega0):
        return []
    return tracking.follow_many(roots_near, mass, x0=x0,
                                omega0=omega0, vectors0=vectors0, x1=x1, step=step,
                                extra0=extra0, stop=stop, max_solves=max_solves, slope0=slope0)


def labelled_root(od, n: int, head: int = 0):
    """Index of the root labelled (m, n) of head ``head`` in an OrderRoots, or None."""
    for r, lab in enumerate(od.labels):
        if lab is not None and lab[0] == "head" and lab[1] == head and lab[2] == n:
            return r
    return None


def rigid_resonances(order, sound_speed: float, top_hz: float) -> np.ndarray:
    """The body's rigid-walled air resonances of this order up to top_hz, Hz, ascending.

    c sqrt(gamma_q^2 + (p pi / L)^2) / 2 pi: gamma_q the zeros of J_m' over the head's radius
    (the duct's cross modes), p half-waves along the depth L. Empty without a body.
    """
    from .physics.assembly import order_duct_gammas

    if order.depth is None:
        return np.zeros(0)
    k_top = 2 * math.pi * top_hz / sound_speed
    count = 4
    while True:
        gamma = order_duct_gammas(order, count=count)
        if gamma[-1] > k_top:
            break
        count *= 2
    gamma = gamma[gamma <= k_top]
    p = np.arange(int(k_top * order.depth / math.pi) + 1)
    f = sound_speed * np.hypot(gamma[:, None], p[None, :] * math.pi / order.depth) / (2 * math.pi)
    f = np.sort(f.ravel())
    return f[f <= top_hz]


def crossing_note(drum, *, m: int, n: int, n_max: int, lo, hi, sound_speed: float):
    """What (m,n) crosses between two close tensions where its label jumps.

    Parameters
    ----------
    lo, hi : OrderRoots
        Order m solved just below and just above the jump.

    Returns
    -------
    (float, float, float, int, int)
        The body's air resonance the head mode crosses (the rigid-walled resonance of the
        body between the two labelled frequencies, the one nearest their geometric mean;
        Hz), the (m,n) frequency just below and just above the jump (Hz), and the labelled
        root's index in ``lo`` and in ``hi``.
    """
    r_lo, r_hi = labelled_root(lo, n), labelled_root(hi, n)
    f_lo = lo.omega[r_lo].real / (2 * np.pi)
    f_hi = hi.omega[r_hi].real / (2 * np.pi)
    mid = math.sqrt(f_lo * f_hi)
    rigid = rigid_resonances(lo.order, sound_speed, 2.0 * max(f_lo, f_hi))
    inside = rigid[(rigid >= min(f_lo, f_hi)) & (rigid <= max(f_lo, f_hi))]
    pool = inside if len(inside) else rigid
    air_hz = float(pool[np.argmin(np.abs(np.log(pool / mid)))]) if len(pool) else mid
    return air_hz, f_lo, f_hi, r_lo, r_hi


def branch_tension(drum, *, m: int, n_max: int, start_tension: float, start_omega: complex,
                   start_vector, target_hz: float, t_min: float, t_max: float, losses=None,
                   max_solves: int = 60):
    """The tension at which the continuous branch through a root reaches target_hz.

    Follows the root (:func:`follow_root`) from ``start_tension`` towards whichever bound
    the target lies on (up if the root is below the target), then closes in on the target
    by regula falsi along the branch, each trial followed from the nearer side.

    Returns
    -------
    (float, float, complex) or None
        Tension (N/m), head fraction and root (rad/s) there; None if the branch does not
        reach target_hz within [t_min, t_max] (or cannot be followed there).
    """
    w_target = 2 * math.pi * target_hz
    g0 = math.log(start_omega.real / w_target)
    x1 = math.log(t_max) if g0 < 0 else math.log(t_min)
    drum_at = lambda x: drum.with_tension(math.exp(x))  # noqa: E731

    def passed(x, w, f):
        return (math.log(w.real / w_target) > 0) != (g0 > 0)

    trail = follow_root(drum_at, m=m, n_max=n_max, x0=math.log(start_tension),
                        omega0=start_omega, vector0=start_vector, x1=x1, losses=losses,
                        stop=passed, max_solves=max_solves)
    solves = trail.solves
    if not passed(trail.x[-1], trail.omega[-1], None):
        return None
    a = (trail.x[-2], trail.omega[-2], trail.vectors[-2], trail.extra[-2])
    b = (trail.x[-1], trail.omega[-1], trail.vectors[-1], trail.extra[-1])
    ga, gb = math.log(a[1].real / w_target), math.log(b[1].real / w_target)
    side = 0
    for _ in range(30):
        if abs(gb) < 1e-9:
            break
        wa, wb = ga, gb
        if side >= 2:
            wa = 0.5 * ga
        elif side <= -2:
            wb = 0.5 * gb
        xs = a[0] - wa * (b[0] - a[0]) / (wb - wa)
        near = a if abs(xs - a[0]) <= abs(xs - b[0]) else b
        t = follow_root(drum_at, m=m, n_max=n_max, x0=near[0], omega0=near[1],
                        vector0=near[2], x1=xs, step=abs(xs - near[0]) or 1e-9,
                        losses=losses, max_solves=max(max_solves - solves, 1), extra0=near[3])
        solves += t.solves
        if t.x[-1] != xs or solves >= 2 * max_solves:
            return None
        s = (xs, t.omega[-1], t.vectors[-1], t.extra[-1])
        gs = math.log(s[1].real / w_target)
        if (gs > 0) == (gb > 0):  # replaces b: a kept once more
            b, gb, side = s, gs, side + 1 if side >= 0 else 1
        else:
            a, ga, b, gb, side = b, gb, s, gs, -1
    x, w, frac = b[0], b[1], b[3]
    return math.exp(x), float(frac), complex(w)


def _local_search(drum_at, *, m, n_max, losses, cross_sign, sets):
    """The two callbacks a tracker needs: the roots near a point at x, and the mass matrix.

    Root sets are kept in ``sets`` by parameter value, so a later call at the same value
    (another root followed over the same steps) solves nothing again.
    """
    from .physics import spectrum
    from .physics.assembly import order_root_set
    from .physics.operator import DEFAULT

    sets = {} if sets is None else sets

    def root_set(x):
        if x not in sets:
            sets[x] = order_root_set(drum_at(x), m=m, n_max=n_max, losses=losses,
                                     cross_sign=cross_sign)
        return sets[x]

    def roots_near(x, centre, radius):
        z, v, f = spectrum.local_roots(root_set(x), 0, centre, radius, tol=DEFAULT.tol)
        return z, v, list(f)

    return roots_near, lambda x: root_set(x).data[0]["M"]
