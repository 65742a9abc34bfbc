"""Pairing measured partials with a drum model's modes: weights, the assignment, split pairs.

The pieces of :func:`membrane.identify.identify` that do not solve the model: how much each
partial counts (:func:`weights`), the optimal pairing of partials with modes on their
distance in cents (:func:`assign`, :func:`scipy.optimize.linear_sum_assignment`), the
global start over tension on one table scaled by sqrt(T) (:func:`start_tensions`), and
which close pairs are a split mode that beats (:func:`beats`).
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import linear_sum_assignment

from . import notation
from .bessel import jn_zeros
from .modes import ModeSet
from .recording import Partial

# Choices of this method (tuned on synthetic taps, no external source):
# Choices of this method (tuned on synthetic taps, no external source):
MAX_CENTS = 60.0  # a partial further than this from its mode is no match (0.6 semitone)


SPLIT_CENTS = 25.0  # partials closer than this are one split mode (0.8 Hz at 150 Hz is 9 cents)


MISSING_MODE_COST = 0.3  # a model mode without a partial, in units of MAX_CENTS


SPLIT_MIN_T60_S = 0.3  # both halves of a split ring at least this long


BEAT_RING_DB = 40.0  # a split pair beats at least once before its shorter member falls this far


BEAT_LEVEL_DB = 20.0  # and its weaker member is within this of the stronger (an audible beat)


def weights(partials) -> np.ndarray:
    """How much each partial counts in the fit (0..1): level times sustain.

    The level factor falls from 1 at the strongest partial to 0.1 at 40 dB below it; the
    sustain factor from 1 at T60 >= 1 s to 0.1 at 0.1 s (common practice, no source: the
    strong, long-ringing partials are the head's modes, the weak and short ones are as often
    the mallet, the stand or the room).
    """
    level = np.array([p.level_db for p in partials], dtype=float)
    t60 = np.array([p.t60 if p.t60 is not None else 0.0 for p in partials], dtype=float)
    w_level = np.clip(1.0 + level / 40.0 * 0.9, 0.1, 1.0)
    w_sustain = np.clip(t60, 0.1, 1.0)
    return w_level * w_sustain



def beats(low: Partial, high: Partial) -> bool:
    """Whether two partials of one mode are resolved as a split pair that beats.

    Each has its own envelope, and one beat period 1 / (f_high - f_low) fits in the time
    the shorter-ringing one takes to fall :data:`BEAT_RING_DB` (T60 x 40 / 60), with the
    weaker within :data:`BEAT_LEVEL_DB` of the stronger; otherwise the two cannot be told
    from one partial with a slow swell (common practice, no source).
    """
    if low.t60 is None or high.t60 is None or high.frequency <= low.frequency:
        return False
    ring = min(low.t60, high.t60) * BEAT_RING_DB / 60.0
    return 1.0 / (high.frequency - low.frequency) <= ring and \
        abs(low.level_db - high.level_db) <= BEAT_LEVEL_DB


def splittable(parts) -> np.ndarray:
    """Partials that may be half of a split pair: steady frequency, a decay of their own."""
    return np.array([("glide" not in p.flags) and (p.t60 or 0.0) >= SPLIT_MIN_T60_S
                     for p in parts])


def orders(ratio: float, limit: float) -> tuple[int, int]:
    """m_max, n_max so that every ideal mode up to ``ratio`` (at most ``limit``) times the
    lowest is in the table."""
    top = min(max(ratio, 3.0), limit) * float(jn_zeros(0, 1)[0])
    m_max = 0
    while float(jn_zeros(m_max + 1, 1)[0]) <= top:
        m_max += 1
    n_max = int(np.count_nonzero(jn_zeros(0, 20) <= top))
    return m_max, max(n_max, 1)


def assign(f: np.ndarray, g: np.ndarray, double: np.ndarray, max_cents: float,
            split_cents: float, cover: float, weight: np.ndarray | None = None,
            split_ok: np.ndarray | None = None) -> tuple[float, list[tuple[int, int]]]:
    """Pair partials ``f`` with modes ``g`` (both Hz) at least cost; returns cost and pairs.

    A pair costs its distance in cents (no pair beyond ``max_cents``). An unpaired partial
    costs ``max_cents``; a mode inside the partials' range left without a partial costs
    :data:`MISSING_MODE_COST` of that (a strike on a mode's nodal line leaves it out, but a
    model far too dense must not win by pairing everything). A degenerate mode
    (``double``) has a second place, for the other half of a split, within ``split_cents``.
    Partials above ``cover`` [Hz], where the table is no longer complete, stay unpaired.
    Each partial's costs are scaled by its ``weight`` (a strong, long partial left unpaired
    or paired far off costs most); only partials in ``split_ok`` may take a second place.
    """
    w = np.ones(f.size) if weight is None else np.asarray(weight, dtype=float)
    cents = np.abs(notation.cents(f[:, None], g[None, :]))
    big = 1e6
    n_f, n_g = cents.shape
    second = np.nonzero(double)[0]
    second_ok = np.ones(f.size, bool) if split_ok is None else np.asarray(split_ok, bool)
    cost = np.concatenate([np.where(cents <= max_cents, cents * w[:, None], big),
                           np.where((cents[:, second] <= split_cents) & second_ok[:, None],
                                    cents[:, second] * w[:, None] + 1e-3, big)],
                          axis=1)
    cols = np.concatenate([np.arange(n_g), second])
    n_c = cols.size
    in_range = (g >= f.min() * 2 ** (-max_cents / 1200)) & (g <= f.max() * 2 ** (max_cents / 1200))
    # a missing mode costs as much as a partial of average weight left out would, scaled
    missing = np.concatenate([np.where(in_range, MISSING_MODE_COST * max_cents * float(np.mean(w)),
                                       0.0),
                              np.zeros(second.size)])
    full = np.full((n_f + n_c, n_c + n_f), big)
    cost[f > cover, :] = big
    full[:n_f, :n_c] = cost
    full[np.arange(n_f), n_c + np.arange(n_f)] = max_cents * w  # partial left unpaired
    full[n_f + np.arange(n_c), np.arange(n_c)] = missing
    full[n_f:, n_c:] = 0.0
    rows, picked = linear_sum_assignment(full)
    total = float(full[rows, picked].sum())
    pairs = sorted((int(r), int(cols[c])) for r, c in zip(rows, picked) if r < n_f and c < n_c)
    return total, pairs


def by_label(modes: ModeSet, labels) -> np.ndarray:
    """The frequencies of ``modes`` in the order of ``labels`` [Hz]."""
    table = {(md.m, md.n, md.branch, md.head): md.frequency for md in modes.modes}
    return np.array([table.get(lb, math.nan) for lb in labels])


def best_start(fp, w, split_ok, f_base, t_base, double, edge, max_cents, split_cents, factor):
    """The best (cost, tension, pairs) over tensions that put a strong partial on a low mode.

    ``f_base`` are the model's modes at ``t_base`` [N/m], scaled by sqrt(T / t_base) to each
    trial; trials are limited to within ``factor`` of ``t_base``.
    """
    ranked = start_tensions(fp, w, split_ok, f_base, t_base, double, edge, max_cents, split_cents,
                     factor)
    return ranked[0] if ranked else None


def start_tensions(fp, w, split_ok, f_base, t_base, double, edge, max_cents, split_cents, factor):
    """Every trial of :func:`best_start` as (cost, tension, pairs), cheapest first."""
    out = []
    for i in np.argsort(-w)[:6]:
        for k in range(min(12, f_base.size)):
            if not np.isfinite(f_base[k]):
                continue
            t = t_base * (fp[i] / f_base[k]) ** 2
            if not 1 / factor <= t / t_base <= factor:
                continue
            g = f_base * math.sqrt(t / t_base)
            cost, pairs = assign(fp, g, double, max_cents, split_cents,
                                  cover=np.nanmin(g[edge]), weight=w, split_ok=split_ok)
            out.append((cost, t, pairs))
    return sorted(out, key=lambda c: c[0])
