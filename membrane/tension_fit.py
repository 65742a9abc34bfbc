"""The tension for partials paired with modes: the model solved at each trial tension.

For fixed pairs the tension is the root in ln T of the weighted mean of
ln(f_model(T) / f_partial), found by :func:`membrane.tension_search.search` (the shared
search, which knows the jumps at the body's air resonances); :func:`refine` and
:func:`refine_full` alternate that with pairing again (:func:`membrane.mode_matching.assign`)
until the pairs hold; :func:`tension_uncertainty` is the tension's standard error from the
pairs' scatter.
"""

from __future__ import annotations

import math

import numpy as np

from .errors import SolverError
from .mode_matching import assign, by_label
from .modes import ModeSet
from .solver import solve

MAX_TENSION_FACTOR = 25.0  # search within this factor of the drum's nominal tension
FIT_CLOSE = 5e-5  # in ln f: 0.01 % in T (ln f ~ ln T / 2), far below the 1 % the fit can promise


MAX_ROUNDS = 6  # assignment / tension rounds


FULL_ROUNDS = 3  # tension searches on the full model, each followed by pairing again


SEARCH_CLOSE = 1e-4  # in ln f: 0.17 cents, where the search stops; the last step does the rest


def refine(drum, physics, fp, w, split_ok, pairs, labels, tension, m_max, n_max, double,
            max_cents, split_cents, say, *, known, rounds=MAX_ROUNDS):
    """Alternate: tension for the pairs (the model solved at each trial), then pair again."""
    modes = known
    edge = [k for k, lb in enumerate(labels) if lb[:2] in ((m_max, 1), (0, n_max))]
    for round_ in range(rounds):
        say(f"round {round_ + 1}: fitting the tension to {len(pairs)} paired partials")
        tension = fit_tension(drum, physics, fp, pairs, labels, tension, weight=w,
                               known=None if modes is None else by_label(modes, labels))
        say(f"round {round_ + 1}: pairing again at {tension:.1f} N/m")
        modes = solve(drum.with_tension(tension), physics, m_max=m_max, n_max=n_max)
        g = by_label(modes, labels)
        new_pairs = assign(fp, g, double, max_cents, split_cents, cover=np.nanmin(g[edge]),
                            weight=w, split_ok=split_ok)[1]
        if new_pairs == pairs:
            break
        pairs = new_pairs
    return tension, pairs, modes


def refine_full(drum, fp, w, split_ok, pairs, labels, tension, t0, m_max, n_max, double,
                 edge, max_cents, split_cents, say, seen=None, start=None):
    """The tension on the full model: the shared search, then one solve with every loss.

    For fixed pairs, G(x) = mean_w ln(f_mode(e^x) / f_partial) rises with x = ln T, with
    upward jumps where a paired label passes an air resonance of the body:
    :func:`membrane.tension_search.search` finds its root (or the jump, or the bound),
    each evaluation a full-model table with radiation damping only. The partials are then
    paired again on the last table and the search repeated (at most :data:`FULL_ROUNDS`
    times) until the pairs hold. Last, the full model with every loss of the drum file
    (``solve(..., losses="all")``) is solved there once and the small remaining step (the
    losses move frequencies by under a cent) is taken with the slope of ln f against ln T
    that the search saw (1/2, the sqrt law, if it saw none).

    ``start`` is the table at the drum file's tension ``t0`` that the global start used:
    scaled by sqrt(T) it stands in for the model at the start's tension in the first
    round (when that tension was not solved already), so a start already on target costs
    no radiation solve there; the solve with every loss follows in any case.

    Returns the last table's tension [N/m], the pairs, that table, the last step in ln T and
    the factor it moves the table's frequencies by.
    """
    from .tension_search import Beyond, Found, Jump, search

    x = math.log(tension)
    lo = math.log(t0 / MAX_TENSION_FACTOR)
    hi = math.log(t0 * MAX_TENSION_FACTOR)
    seen: dict[float, ModeSet] = {} if seen is None else seen  # radiation tables by ln T

    def offset(modes, pairs_):
        i = np.array([a for a, _ in pairs_])
        r = np.log(by_label(modes, labels)[[k for _, k in pairs_]] / fp[i])
        ok = np.isfinite(r)
        if not ok.any():
            raise SolverError("the paired modes vanished from the full model's table")
        return float(np.sum(w[i][ok] * r[ok]) / np.sum(w[i][ok]))

    def table(xx, losses="radiation"):
        if losses == "radiation" and xx in seen:
            return seen[xx]
        modes = solve(drum.with_tension(math.exp(xx)), "full", m_max=m_max, n_max=n_max,
                      losses=losses)
        if losses == "radiation":
            seen[xx] = modes
        return modes

    slope = 0.5
    for round_ in range(FULL_ROUNDS):
        say(f"full model: searching the tension for {len(pairs)} paired partials "
            f"(round {round_ + 1}), from {math.exp(x):.1f} N/m")
        fixed = list(pairs)
        g = lambda xx: offset(table(xx), fixed)  # noqa: E731
        if round_ == 0 and start is not None and x not in seen:
            # the start table carried by sqrt(T): the pairs' offset there, without a solve
            g0 = offset(start, fixed) + 0.5 * (x - math.log(t0))
        else:
            g0 = g(x)
        found = search(g, x0=x, g0=g0, lo=lo, hi=hi, close=SEARCH_CLOSE, max_solves=12)
        if isinstance(found, Found) and found.solves == 0 and x not in seen:
            break  # on target by the start table already: the solve with every loss checks
        if isinstance(found, Found):
            x = found.x
        elif isinstance(found, Jump):
            # the pairs' mean jumps over the target at an air resonance: the nearer end
            x = found.x_lo if abs(found.g_lo) <= abs(found.g_hi) else found.x_hi
        else:
            x = found.x
        known = sorted(seen)
        if len(known) >= 2:
            xa, xb = known[-2], known[-1]
            ga, gb = offset(seen[xa], fixed), offset(seen[xb], fixed)
            if xb != xa and 0.1 < (gb - ga) / (xb - xa) < 1.5:
                slope = (gb - ga) / (xb - xa)
        modes = table(x)
        g_tab = by_label(modes, labels)
        new_pairs = assign(fp, g_tab, double, max_cents, split_cents,
                            cover=np.nanmin(g_tab[edge]), weight=w, split_ok=split_ok)[1]
        if new_pairs == pairs or isinstance(found, Beyond):
            break
        pairs = new_pairs
    say(f"full model with every loss at {math.exp(x):.1f} N/m")
    modes = table(x, losses="all")
    g_tab = by_label(modes, labels)
    pairs = assign(fp, g_tab, double, max_cents, split_cents, cover=np.nanmin(g_tab[edge]),
                    weight=w, split_ok=split_ok)[1]
    step = -offset(modes, pairs) / slope
    return math.exp(x), pairs, modes, step, math.exp(slope * step)


def tension_uncertainty(fp, w, pairs, g, tension) -> float:
    """Standard error of the tension [N/m] from the weighted scatter of the pairs.

    ln f goes as ln T / 2 (exactly for the ideal membrane, nearly so for the others), so
    sigma(ln T) = 2 s / sqrt(N_eff - 1), with s the weighted standard deviation of the
    pairs' ln(f_partial / f_mode) and N_eff = (sum w)^2 / sum w^2 the pairs' effective count.
    """
    if len(pairs) < 3:
        return math.nan
    i = np.array([a for a, _ in pairs])
    r = np.log(fp[i] / g[[k for _, k in pairs]])
    ww = w[i]
    ok = np.isfinite(r)
    r, ww = r[ok], ww[ok]
    if r.size < 3:
        return math.nan
    mean = np.sum(ww * r) / np.sum(ww)
    spread = math.sqrt(float(np.sum(ww * (r - mean) ** 2) / np.sum(ww)))
    n_eff = float(np.sum(ww) ** 2 / np.sum(ww**2))
    return float(tension * 2.0 * spread / math.sqrt(max(n_eff - 1.0, 1.0)))


def fit_tension(drum, physics, fp, pairs, labels, tension, *, weight=None, known=None) -> float:
    """The tension at which the paired partials sit on their modes on average.

    The root in ln T of the weighted mean of ln(f_model(T) / f_partial) over the pairs: the
    least-squares tension in cents when every mode scales alike (exactly so for the ideal
    membrane, nearly so with stiffness; with air loading the modes' slopes differ a little
    and this is the zero-mean-residual tension), found by the shared
    :func:`membrane.tension_search.search` within :data:`MAX_TENSION_FACTOR` of the drum
    file's tension (at a jump, the nearer end; past a bound, the bound).
    """
    from .tension_search import Found, Jump, search

    idx_f = np.array([i for i, _ in pairs])
    wanted = [labels[k] for _, k in pairs]
    wp = np.ones(idx_f.size) if weight is None else np.asarray(weight, float)[idx_f]
    # solve only the orders the pairs need: each m is a separate problem, and the basis
    # the full model uses does not depend on the table's size beyond 1e-7 relative
    m_max = max(lb[0] for lb in wanted)
    n_max = max(lb[1] for lb in wanted)

    def mean_log(g):
        # a mode of a two-headed drum may change branch label as the tension moves (the
        # branches veer); such a pair drops out of the mean rather than spoiling it
        r = np.log(g / fp[idx_f])
        ok = np.isfinite(r)
        if not ok.any():
            raise SolverError("the paired modes vanished from the model's table while fitting")
        return float(np.sum(wp[ok] * r[ok]) / np.sum(wp[ok]))

    def g(x):
        modes = solve(drum.with_tension(math.exp(x)), physics, m_max=m_max, n_max=n_max)
        return mean_log(by_label(modes, wanted))

    x = math.log(tension)
    # the model's frequencies at this tension, when the caller has them already
    gx = g(x) if known is None else mean_log(known[[k for _, k in pairs]])
    t0 = drum.head.tension
    found = search(g, x0=x, g0=gx, lo=math.log(t0 / MAX_TENSION_FACTOR),
                   hi=math.log(t0 * MAX_TENSION_FACTOR), close=FIT_CLOSE)
    if isinstance(found, Found):
        return math.exp(found.x)
    if isinstance(found, Jump):
        return math.exp(found.x_lo if abs(found.g_lo) <= abs(found.g_hi) else found.x_hi)
    return math.exp(found.x)
