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
:class:`Beyond`, and :func:`fit` with :class:`Fit`.

Secant steps (slope clamped to what sqrt(T) scaling and the air allow) find a bracket, then
regula falsi (Illinois: the end kept is weighted half as much each time) shrinks it, with a
bisection whenever the bracket is steep (a jump) or has not halved in two steps (a flat
stretch before a crossing); each evaluation is a model solve, so the count matters more than
the arithmetic. Used by the single-target tune and meant for every
tension fit (listen's included).
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
           max_solves: int = 80):
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
    xb = min(max(x0 - 2.0 * g0, lo), hi)  # sqrt(T) scaling: the first guess only
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
            stalled = len(widths) >= 3 and widths[-1] > 0.5 * widths[-3]
            if steep or stalled or not (x1 + 0.01 * width < x < x2 - 0.01 * width):
                x = 0.5 * (x1 + x2)  # bisect: a steep bracket, or one that shrinks too slowly
                widths.clear()
            xa, ga, xb = xb, gb, x
            continue
        slope = (gb - ga) / (xb - xa) if xb != xa else 0.5
        x = xb - gb / min(max(slope, 0.02), 2.0)  # keep the extrapolation sane
        if abs(gb) > 0.5 * abs(ga) and abs(x - xb) < 2.0 * abs(xb - xa):
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


def fit(residuals, *, x0, lower, upper, step: float = 1e-6) -> Fit:
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
    from scipy import optimize

    from .errors import SolverError

    count = [0]

    def counted(x):
        count[0] += 1
        return residuals(x)

    out = optimize.least_squares(counted, np.asarray(x0, dtype=float), bounds=(lower, upper),
                                 x_scale=0.1, diff_step=step, xtol=1e-12, ftol=1e-12, gtol=1e-12)
    if not np.all(np.isfinite(out.fun)):
        raise SolverError(f"the least-squares fit did not converge ({out.message})")
    return Fit(x=out.x, residuals=out.fun, solves=count[0], message=str(out.message))
