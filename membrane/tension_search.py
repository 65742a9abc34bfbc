"""The search for the tension at which a mode sits on a target frequency.

A labelled mode's frequency rises with tension. With air in a body it need not rise
continuously: where the head mode crosses one of the body's air resonances the label
passes from one root to the other (docs/mode-identity.md), and the frequency of "(m,n)"
jumps up. So the search works on g(x) = ln(f(e^x) / f*), x = ln T, which is increasing with
upward jumps, and has three outcomes, never a failure to settle:

* :class:`Found`: g = 0 within the tolerance;
* :class:`Jump`: the target lies in a jump: a bracket [x_lo, x_hi] narrower than the
  jump test with g(x_lo) < 0 < g(x_hi) and a slope far steeper than any smooth change;
* :class:`Beyond`: g keeps its sign up to a bound of the allowed range.

Several targets at once (or one target and a second free parameter) have no exact root: they
are met in the least-squares sense by :func:`fit`, the same module's other entry point, so that
every tension fit (the single- and multi-target tune, listen's fit to a recording) goes
through one place.

Public API (stable): :func:`search` with its outcomes :class:`Found`, :class:`Jump` and
:class:`Beyond`, and :func:`fit` with :class:`Fit` (and :func:`gauss_newton` behind it).

Where the caller has the derivative of g at each solved point (full physics on one head:
first-order perturbation of the solved root, physics/sensitivity.py), the steps are Newton's:
3-4 solves per target on the built-in kettledrum instead of 11-14 (benchmarks/bench_tune.py),
and the several-target fit is Gauss-Newton with that Jacobian (:func:`gauss_newton`, 10 solves
for two targets and the volume instead of 46). Otherwise secant steps (slope clamped to what
sqrt(T) scaling and the air allow) find a bracket, then
regula falsi (Illinois: the end kept is weighted half as much each time) shrinks it, with a
bisection whenever the bracket is steep (a jump) or has not halved in two steps (a flat
stretch before a crossing); each evaluation is a model solve, so the count matters more than
the arithmetic. Used by the single-target tune and meant for every
tension fit (listen's included).

The tune's trial solves after the first are carried from the nearest solved tension
(physics/continuation.py: each root moved by its perturbation derivative and corrected by
Newton's method, instead of a scan of the whole window), and the answer, or a refusal's
bracket, is confirmed by a whole solve (tuning.py).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

# a smooth branch has d ln f / d ln T between 0 and about 1 (1/2 for an ideal membrane);
# a bracket whose secant slope is this much steeper holds a jump, not a root
JUMP_SLOPE = 50.0
# brackets narrower than this in ln T are not split further: a jump that narrow is a jump
MIN_WIDTH = 1e-9


@dataclass(frozen=True)
class Found:
    """g(x) = 0 within the tolerance at x = ln T."""

    x: float
    g: float
    solves: int


@dataclass(frozen=True)
class Jump:
    """The target lies in an upward jump of g between x_lo and x_hi (ln T)."""

    x_lo: float
    x_hi: float
    g_lo: float
    g_hi: float
    solves: int


@dataclass(frozen=True)
class Beyond:
    """g keeps its sign up to the bound x (``side`` "low": the target is below g's range)."""

    side: str
    x: float
    g: float
    solves: int


def search(g, *, x0: float, g0: float, lo: float, hi: float, close: float,
           max_solves: int = 80, slope=None):
    """Solve g(x) = 0 for an increasing g with upward jumps on [lo, hi].

    Parameters
    ----------
    g : callable
        x (ln of tension in N/m) -> ln(f / f*), one model solve per call.
    x0, g0 : float
        The starting point and its value.
    lo, hi : float
        Bounds of x.
    close : float
        |g| below this is on target.
    max_solves : int
        Evaluations allowed; when they run out the bracket is reported as a Jump (it
        can then only be one: a smooth root is found long before).
    slope : callable or None
        x -> dg/dx at a point g was just evaluated at (no solve of its own: e.g. the
        perturbation derivative of the solved root, physics/sensitivity.py). With it the
        steps are Newton's (inside the bracket, once there is one) instead of secants.

    Returns
    -------
    Found, Jump or Beyond
    """
    solves = 0
    if abs(g0) < close:
        return Found(x0, g0, 0)
    below = (x0, g0) if g0 < 0 else None  # (x, g) with g < 0, the largest x so far
    above = (x0, g0) if g0 > 0 else None  # (x, g) with g > 0, the smallest x so far
    # Illinois: the value each end of the bracket is weighted with (halved every time that
    # end is kept), and the bracket widths of the last steps (bisect when they stall)
    w_below = w_above = None
    widths = []
    xa, ga = x0, g0
    def newton(x, gx):  # None without a usable derivative
        if slope is None:
            return None
        d = slope(x)
        if not (math.isfinite(d) and d > 0.02):
            return None
        return x - gx / min(d, 2.0)

    first = newton(x0, g0)
    xb = min(max(x0 - 2.0 * g0 if first is None else first, lo), hi)  # sqrt(T) scaling without
    gb = g0
    while solves < max_solves:
        gb = g(xb)
        solves += 1
        if abs(gb) < close:
            return Found(xb, gb, solves)
        if gb < 0:
            below = (xb, gb)
            w_below = gb
            if w_above is not None:
                w_above *= 0.5  # the upper end kept once more
        else:
            above = (xb, gb)
            w_above = gb
            if w_below is not None:
                w_below *= 0.5
        if below is not None and above is not None:
            (x1, g1), (x2, g2) = below, above
            if w_below is None:
                w_below = g1
            if w_above is None:
                w_above = g2
            width = x2 - x1
            steep = (g2 - g1) > JUMP_SLOPE * max(width, 1e-300)
            if width <= MIN_WIDTH or (steep and width < 1e-3):
                return Jump(x1, x2, g1, g2, solves)
            widths.append(width)
            x = x1 - w_below * (x2 - x1) / (w_above - w_below)
            step = None if steep else newton(xb, gb)
            if step is not None and x1 < step < x2 and abs(gb) < 0.5 * abs(ga):
                # Newton from the newest point, kept inside the bracket (it converges from
                # one side, so the bracket need not halve)
                xa, ga, xb = xb, gb, step
                widths.clear()
                continue
            stalled = len(widths) >= 3 and widths[-1] > 0.5 * widths[-3]
            if steep or stalled or not (x1 + 0.01 * width < x < x2 - 0.01 * width):
                x = 0.5 * (x1 + x2)  # bisect: a steep bracket, or one that shrinks too slowly
                widths.clear()
            xa, ga, xb = xb, gb, x
            continue
        secant = (gb - ga) / (xb - xa) if xb != xa else 0.5
        x = newton(xb, gb)
        by_newton = x is not None
        if not by_newton:
            x = xb - gb / min(max(secant, 0.02), 2.0)  # keep the extrapolation sane
        if not by_newton and abs(gb) > 0.5 * abs(ga) and abs(x - xb) < 2.0 * abs(xb - xa):
            # slow progress and no bracket yet (a flat stretch): at least double the step
            x = xb + math.copysign(2.0 * abs(xb - xa), x - xb)
        if x <= lo or x >= hi:
            if xb in (lo, hi):
                return Beyond("low" if gb > 0 else "high", xb, gb, solves)
            x = min(max(x, lo), hi)
        xa, ga, xb = xb, gb, x
    if below is not None and above is not None:
        (x1, g1), (x2, g2) = below, above
        return Jump(x1, x2, g1, g2, solves)
    return Beyond("low" if gb > 0 else "high", xb, gb, solves)


@dataclass(frozen=True)
class Fit:
    """A least-squares fit of log parameters (ln T first).

    Attributes
    ----------
    x : numpy.ndarray
        The parameters at the optimum (ln of tension in N/m, then any others, each a log).
    residuals : numpy.ndarray
        The residuals there (cents, as the caller's function returns them).
    solves : int
        Evaluations of the residual function (model solves).
    message : str
        The optimiser's account of why it stopped.
    """

    x: np.ndarray
    residuals: np.ndarray
    solves: int
    message: str


def fit(residuals, *, x0, lower, upper, step: float = 1e-6, jacobian=None) -> Fit:
    """Least squares of residuals(x) over log parameters within bounds.

    Parameters
    ----------
    residuals : callable
        x (array: ln T in N/m, then e.g. the log of an areal density or a volume) -> residuals
        in cents, one model solve per call.
    x0 : sequence of float
        The start (inside the bounds).
    lower, upper : sequence of float
        Bounds of each parameter.
    step : float
        Relative step of the finite-difference Jacobian.
    jacobian : callable or None
        x -> the Jacobian of the residuals (cents per unit of each log) at a point the
        residuals were just evaluated at, with no solve of its own (physics/sensitivity.py).
        With it the fit is Gauss-Newton (:func:`gauss_newton`): a solve per step.

    Returns
    -------
    Fit

    Raises
    ------
    membrane.errors.SolverError
        If the residuals are not finite at the optimum.

    Notes
    -----
    scipy's trust-region reflective least squares (scipy.optimize.least_squares), with a
    parameter scale of 0.1 in the logs (a tenth of e-fold is a typical tuning move).
    """
    from .errors import SolverError

    if jacobian is not None:
        out = gauss_newton(residuals, jacobian, x0=x0, lower=lower, upper=upper)
        if out is not None:
            return out
    from scipy import optimize

    count = [0]

    def counted(x):
        count[0] += 1
        return residuals(x)

    out = optimize.least_squares(counted, np.asarray(x0, dtype=float), bounds=(lower, upper),
                                 x_scale=0.1, diff_step=step, xtol=1e-12, ftol=1e-12, gtol=1e-12)
    if not np.all(np.isfinite(out.fun)):
        raise SolverError(f"the least-squares fit did not converge ({out.message})")
    return Fit(x=out.x, residuals=out.fun, solves=count[0], message=str(out.message))


def gauss_newton(residuals, jacobian, *, x0, lower, upper, max_solves: int = 40,
                 xtol: float = 1e-10, ftol: float = 1e-6):
    """Gauss-Newton least squares with bounds, the Jacobian given: a Fit, or None if it
    cannot make progress (then :func:`fit` falls back to scipy's trust-region solver).

    Each step solves J dx = -r in the least-squares sense over the parameters not held at
    a bound (a parameter at a bound whose descent direction points out stays there), halving
    the step until the sum of squares falls. Stops when the residuals are below ``ftol``
    (cents), the step below ``xtol`` (in the logs), or the sum of squares falls by less than
    1e-9 of itself: at a least-squares optimum with a residual left, Gauss-Newton converges
    linearly, fast when the residual is small.
    """
    lo, hi = np.asarray(lower, dtype=float), np.asarray(upper, dtype=float)
    x = np.clip(np.asarray(x0, dtype=float), lo, hi)
    r = np.asarray(residuals(x), dtype=float)
    solves = 1
    if not np.all(np.isfinite(r)):
        return None
    cost = float(r @ r)
    message = "the iteration limit was reached"
    while solves < max_solves:
        if np.max(np.abs(r)) < ftol:
            message = "the residuals are below the tolerance"
            break
        J = np.asarray(jacobian(x), dtype=float)
        grad = J.T @ r
        held = ((x <= lo) & (grad > 0)) | ((x >= hi) & (grad < 0))
        free = ~held
        if not np.any(free):
            message = "every parameter is held at a bound"
            break
        dx = np.zeros_like(x)
        dx[free] = np.linalg.lstsq(J[:, free], -r, rcond=None)[0]
        if float(np.max(np.abs(np.clip(x + dx, lo, hi) - x))) < xtol:
            message = "the step is below the tolerance"
            break
        t, accepted = 1.0, False
        while t >= 1 / 64 and solves < max_solves:
            xn = np.clip(x + t * dx, lo, hi)
            rn = np.asarray(residuals(xn), dtype=float)
            solves += 1
            cn = float(rn @ rn)
            if np.all(np.isfinite(rn)) and cn <= cost:
                accepted = True
                break
            t *= 0.5
        if not accepted:
            return None if solves >= max_solves else Fit(x=x, residuals=r, solves=solves,
                                                         message="no step lowers the residuals")
        moved = float(np.max(np.abs(xn - x)))
        fell = cost - cn
        x, r, cost = xn, rn, cn
        if moved < xtol:
            message = "the step is below the tolerance"
            break
        if fell <= 1e-9 * cost:  # a residual left that no step reduces further
            message = "the sum of squares no longer falls"
            break
    else:
        return None
    return Fit(x=x, residuals=r, solves=solves, message=message)
