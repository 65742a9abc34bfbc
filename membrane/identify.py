"""Name the partials of a recording with the drum model's modes, and fit the head's tension.

Given measured partials and a drum model, find the tension T at which the model's modes
best explain the partials. Partials and modes are paired by an optimal assignment
(:func:`scipy.optimize.linear_sum_assignment`) on their distance in cents, with a cap so
that a spurious partial or a missing mode costs a fixed amount instead of spoiling the
fit; T then minimises the squared cents of the pairs; the two steps alternate until the
pairing stops changing.

Close partials (within a few cents of each other) are taken together: on a real head a
mode with nodal diameters (m >= 1) is a degenerate pair (cos and sin) that uneven tension
splits into two partials beating at their difference frequency. They are labelled with
the same mode and reported as a split pair.

Partials count by weight: strong, long-ringing partials most (a level and a sustain
factor, :func:`weights`); partials flagged steady (hum) are left out, and a gliding
partial is fitted at its settled frequency (the head's small-amplitude tension, which the
model describes). A split pair is claimed only for two steady components, each with its
own decay, that beat audibly (:func:`beats`), never for a glide.

The search: a global start over tension, every pairing of a strong partial with a low
mode proposing a tension (the model's table scaled by sqrt(T)). With ``physics="full"``
that table is the full model's own, solved once at the drum file's tension with radiation
damping only (air loading lowers the low modes by far more than a match's width, so the
in-vacuum pattern pairs the wrong modes on a kettledrum), the cheapest few start tensions
judged again on the full model solved at each; the start is then refined on the
full model with :func:`membrane.tension_search.search` (the shared search, which knows the
jumps at the body's air resonances), and finished by one solve with every loss of the
drum file. With ``"stiff"`` or ``"ideal"`` the start and the refinement use that model.

The result carries the matched count, the rms cents, the tension's uncertainty (the
weighted scatter of the pairs over the root of their count, through the slope of
ln f against ln T) and a verdict: fewer than :data:`MIN_MATCHED` matched partials is "not
identified"; a film stress past the film's yield is "implausible"; an rms residual above
:data:`POOR_RMS_CENTS` is a "poor match". What the verdict cannot tell: a kettledrum's
pattern of (m,1) modes changes little with its diameter, so a drum file of the wrong size
fits the same partials at another tension nearly as well (a 23-inch file on a 29-inch
timpano's recording: 15.7 against 15.2 cents rms); the tension is then wrong by the
square of the diameters' ratio, and only the drum file can say which drum it is.

Approximations: the start scales one table by sqrt(T) (exact for the ideal membrane);
every refinement solves the model at the trial tension, so stiffness and air loading
(which break the sqrt(T) law) are honoured. The full model's refinement uses radiation
damping only (the other losses move a frequency by under a cent: 0.8 cents at most on the
built-in kettledrum); its last solve has every loss, and the step left (well under a cent)
is taken along the slope of ln f against ln T that the search measured.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import linear_sum_assignment

from .blas import one_blas_thread
from .bessel import jn_zeros
from .drum import Drum
from .errors import InputError, SolverError
from .modes import ModeSet
from . import notation
from .callable_module import make_callable
from .recording import Partial
from .solver import solve

# Choices of this method (tuned on synthetic taps, no external source):
MAX_CENTS = 60.0  # a partial further than this from its mode is no match (0.6 semitone)
SPLIT_CENTS = 25.0  # partials closer than this are one split mode (0.8 Hz at 150 Hz is 9 cents)
MISSING_MODE_COST = 0.3  # a model mode without a partial, in units of MAX_CENTS
MAX_TENSION_FACTOR = 25.0  # search within this factor of the drum's nominal tension
# model modes up to this ratio to the ideal (0,1) mode: the table grows as its square, and a
# full-physics solve takes about 0.1 s a mode, so the full model gets the smaller range
MAX_RANGE = {"ideal": 10.0, "stiff": 10.0, "full": 4.5}
_SECANT_TOL = 1e-4  # in ln T: 0.01 %, far below the 1 % the fit can promise
_MAX_ROUNDS = 6  # assignment / tension rounds
START_MARGIN = 0.05  # start tensions costing within 5 % of the cheapest are judged again
START_RIVALS = 4  # at most this many, each a full-model solve
START_DISTINCT = 0.05  # in ln T: start tensions closer than 5 % are one
MIN_MATCHED = 3  # fewer matched partials than this: the drum is not identified
# an rms residual above this is a poor match: half the rms of residuals spread evenly over
# the match window (+-MAX_CENTS has rms MAX_CENTS / sqrt 3), i.e. the fit pairs the partials
# with modes little better than a chance pairing would (judgement, no source)
POOR_RMS_CENTS = MAX_CENTS / (2.0 * math.sqrt(3.0))
MAX_FIT_PARTIALS = 24  # the heaviest partials fitted (bounded work; the rest are labelled)
SPLIT_MIN_T60_S = 0.3  # both halves of a split ring at least this long


@dataclass(frozen=True)
class Match:
    """A partial named with a mode.

    Attributes
    ----------
    partial : Partial
    m, n : int
        Nodal diameters and nodal circles (counting the rim).
    model_frequency : float
        The mode's frequency at the fitted tension [Hz].
    cents : float
        Partial minus model, in cents.
    branch, head : str or None
        For a drum with two heads: which branch / which head, as in the mode table.
    """

    partial: Partial
    m: int
    n: int
    model_frequency: float
    cents: float
    branch: str | None = None
    head: str | None = None


@dataclass(frozen=True)
class SplitPair:
    """Two partials from one degenerate mode, split by uneven tension.

    Attributes
    ----------
    m, n : int
    low, high : Partial
    beat_hz : float
        Their difference frequency: the beat heard [Hz].
    """

    m: int
    n: int
    low: Partial
    high: Partial

    @property
    def beat_hz(self) -> float:
        """Beat rate [Hz]."""
        return self.high.frequency - self.low.frequency

    @property
    def cents(self) -> float:
        """Split in cents."""
        return notation.cents(self.high.frequency, self.low.frequency)


@dataclass(frozen=True)
class Identification:
    """Partials named with modes, and the tension that names them best.

    Attributes
    ----------
    drum : Drum
        The drum at the fitted tension.
    tension, nominal_tension : float
        Fitted and nominal (the drum file's) tension of the struck head [N/m].
    matches : tuple of Match
        Sorted by frequency; both partials of a split pair appear.
    unmatched : tuple of Partial
        Partials no mode explains within :data:`MAX_CENTS` (or above the model's range).
    splits : tuple of SplitPair
    modes : ModeSet
        The model's modes at the fitted tension.
    beyond : tuple of Partial
        Partials above the range where the model's table is complete (:data:`MAX_RANGE`),
        not labelled.
    """

    drum: Drum
    tension: float
    nominal_tension: float
    matches: tuple[Match, ...]
    unmatched: tuple[Partial, ...]
    splits: tuple[SplitPair, ...]
    modes: ModeSet
    beyond: tuple[Partial, ...] = ()
    uncertainty: float = math.nan
    physics: str = "full"

    def __repr__(self) -> str:
        return (f"Identification({self.tension:.1f} N/m fitted, {len(self.matches)} partials matched, "
                f"{len(self.unmatched)} unmatched, rms {self.rms_cents:.1f} cents, {self.physics} physics)")

    @property
    def rms_cents(self) -> float:
        """Root-mean-square residual of the matches [cents]."""
        return float(np.sqrt(np.mean([mt.cents**2 for mt in self.matches]))) if self.matches else math.nan

    @property
    def stress(self) -> float | None:
        """Film stress at the fitted tension [Pa], None without a thickness."""
        return self.drum.head.stress

    @property
    def verdict(self) -> str:
        """``"identified"``, ``"not identified: ..."``, ``"implausible: ..."`` (past the
        film's yield, or below the tension at which the head holds a pitch at all:
        :func:`membrane.safety.practical_minimum`) or ``"poor match: ..."`` (rms residual
        above :data:`POOR_RMS_CENTS`)."""
        head = self.drum.head
        if len(self.matches) < MIN_MATCHED:
            return (f"not identified: {len(self.matches)} partials matched, at least "
                    f"{MIN_MATCHED} needed")
        if self.stress is not None and head.yield_stress is not None and \
                self.stress > head.yield_stress:
            return (f"implausible: film stress {self.stress / 1e6:.0f} MPa at this tension is "
                    f"past the film's yield stress {head.yield_stress / 1e6:.0f} MPa")
        from .safety import below_minimum

        slack = below_minimum(head, self.tension)
        if slack is not None:
            return f"implausible: {slack}"
        if self.rms_cents > POOR_RMS_CENTS:
            return (f"poor match: rms {self.rms_cents:.0f} cents over {len(self.matches)} matched "
                    f"partials, more than {POOR_RMS_CENTS:.0f} (a pairing little better than "
                    "chance: another drum, or partials the analysis did not resolve)")
        return "identified"

    @property
    def fit(self) -> dict:
        """The fit in one record (JSON ``fit``)."""
        return {"tension_n_per_m": self.tension,
                "uncertainty_n_per_m": None if not math.isfinite(self.uncertainty) else self.uncertainty,
                "matched": len(self.matches), "rms_cents": self.rms_cents if self.matches else None,
                "verdict": self.verdict, "physics": self.physics}


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


@one_blas_thread  # many small matrix products (membrane/blas.py)
def identify(drum: Drum, partials, *, physics: str = "full", max_cents: float = MAX_CENTS,
             split_cents: float = SPLIT_CENTS, splits: str = "beating",
             progress=None) -> Identification:
    """Fit the struck head's tension to measured partials and label them (m, n).

    Parameters
    ----------
    drum : Drum
        The drum model; its head tension is the starting guess [N/m].
    partials : sequence of Partial
        Measured partials (any order).
    physics : {"ideal", "stiff", "full"}
        The model, as in :func:`membrane.solve`; full physics (air and body) by default,
        as ``membrane listen --drum`` has it.
    max_cents : float
        Largest distance of a partial from its mode to count as a match [cents].
    split_cents : float
        Partials closer than this are taken as one split degenerate mode [cents].
    splits : {"beating", "resolved"}
        Which close pairs are claimed as a split mode: ``"beating"`` (default) only pairs
        that beat audibly (:func:`beats`); ``"resolved"`` every pair the analysis resolved,
        however slowly it beats, the members of a line of close components
        (:attr:`membrane.analysis.Partial.members`) included (a lug estimate from a clean
        recording reads those too).
    progress : callable or None
        Called with a short message at each stage (the full model takes seconds a solve).

    Returns
    -------
    Identification
        Check its ``verdict``: a result with fewer than :data:`MIN_MATCHED` matches is
        returned, marked "not identified".

    Raises
    ------
    InputError
        If there are fewer than two usable partials or the options are out of range.
    SolverError
        If no tension explains at least two partials.
    """
    if not 0 < max_cents <= 600:
        raise InputError("max_cents", max_cents, "between 0 and 600 cents")
    if not 0 <= split_cents < max_cents:
        raise InputError("split_cents", split_cents, f"between 0 and max_cents ({max_cents})")
    if splits not in ("beating", "resolved"):
        raise InputError("splits", splits, "beating or resolved")
    if splits == "resolved":
        # every pair the band fit resolved: an unresolved line's members count one by one
        partials = [m for p in partials for m in (getattr(p, "members", ()) or (p,))]
    usable = sorted((p for p in partials if "steady" not in p.flags), key=lambda p: p.settled)
    if len(usable) < 2:
        raise InputError("partials", len(usable), "need at least two partials that decay (not "
                         "flagged steady) to fit a tension")
    heavy = np.argsort(-weights(usable), kind="stable")[:MAX_FIT_PARTIALS]
    parts = [usable[i] for i in sorted(heavy)]
    fp = np.array([p.settled for p in parts])
    w = weights(parts)
    split_ok = _splittable(parts)
    t0 = drum.head.tension
    say = progress or (lambda message: None)
    scale = 1.0
    if physics == "full":
        # the global start on the full model's own modes (radiation damping only: the other
        # losses move a frequency by under a cent) at the drum file's tension, scaled by
        # sqrt(T): air loading lowers the low modes by far more than a match's width, so
        # the in-vacuum pattern would pair the wrong modes
        m_max, n_max = _orders(fp.max() / fp.min() * 1.6, MAX_RANGE["full"])
        say(f"global start on the full model at {t0:.0f} N/m, m <= {m_max}, n <= {n_max}")
        modes = solve(drum, "full", m_max=m_max, n_max=n_max, losses="radiation")
        labels = [(md.m, md.n, md.branch, md.head) for md in modes.modes]
        edge = [k for k, lb in enumerate(labels) if lb[:2] in ((m_max, 1), (0, n_max))]
        double = np.array([md.multiplicity == 2 for md in modes.modes])
        ranked = [c for c in _starts(fp, w, split_ok, _by_label(modes, labels), t0, double,
                                     edge, max_cents, split_cents, MAX_TENSION_FACTOR)
                  if len(c[2]) >= 2]
        if not ranked:
            raise SolverError("no tension within a factor of 25 of the drum's puts two of its "
                              "modes on the partials; check the drum file (diameter, film)")
        # sqrt(T) scaling of one table misjudges tensions far from the drum file's (air
        # loading does not scale so): the cheapest few, at distinct tensions, within
        # START_MARGIN of the cheapest, are each judged on the full model solved there
        rivals = []
        for c in ranked:
            if c[0] > ranked[0][0] * (1.0 + START_MARGIN) or len(rivals) == START_RIVALS:
                break
            if all(abs(math.log(c[1] / r[1])) > START_DISTINCT for r in rivals):
                rivals.append(c)
        seen = {}
        if len(rivals) > 1:
            say(f"judging {len(rivals)} start tensions on the full model: "
                + ", ".join(f"{r[1]:.0f}" for r in rivals) + " N/m")
            judged = []
            for r in rivals:
                x_r = math.log(r[1])
                seen[x_r] = solve(drum.with_tension(r[1]), "full", m_max=m_max, n_max=n_max,
                                  losses="radiation")
                g_r = _by_label(seen[x_r], labels)
                cost, pairs_r = _assign(fp, g_r, double, max_cents, split_cents,
                                        cover=np.nanmin(g_r[edge]), weight=w, split_ok=split_ok)
                judged.append((cost, r[1], pairs_r))
            _, tension, pairs = min(judged, key=lambda c: c[0])
        else:
            _, tension, pairs = rivals[0]
        tension, pairs, modes, last, scale = _refine_full(
            drum, fp, w, split_ok, pairs, labels, tension, t0, m_max, n_max, double, edge,
            max_cents, split_cents, say, seen=seen, start=modes)
        tension = tension * math.exp(last)
    else:
        # the table reaches 1.6 times the partials' span (the lowest partial may be the
        # (1,1), 1.59 times the (0,1), when the (0,1) is missed), at most MAX_RANGE times
        # the (0,1)
        m_max, n_max = _orders(fp.max() / fp.min() * 1.6, MAX_RANGE.get(physics, 6.0))
        say(f"searching tensions with the {physics} model, m <= {m_max}, n <= {n_max}")
        base = solve(drum, physics, m_max=m_max, n_max=n_max)
        labels = [(md.m, md.n, md.branch, md.head) for md in base.modes]
        edge = [k for k, lb in enumerate(labels) if lb[:2] in ((m_max, 1), (0, n_max))]
        double = np.array([md.multiplicity == 2 for md in base.modes])
        f_base = np.array([md.frequency for md in base.modes])
        # start: every pairing of a strong partial with a low mode proposes a tension
        best = _start(fp, w, split_ok, f_base, t0, double, edge, max_cents, split_cents,
                      MAX_TENSION_FACTOR)
        if best is None or len(best[2]) < 2:
            raise SolverError("no tension within a factor of 25 of the drum's puts two of its "
                              "modes on the partials; check the drum file (diameter, film)")
        _, tension, pairs = best
        tension, pairs, modes = _refine(drum, physics, fp, w, split_ok, pairs, labels, tension,
                                        m_max, n_max, double, max_cents, split_cents, say,
                                        known=None)
    g = _by_label(modes, labels) * scale  # the table carried to the fitted tension
    cover = np.nanmin(g[edge])
    # every usable partial labelled at the fitted tension (the fit used the heaviest)
    fa = np.array([p.settled for p in usable])
    all_pairs = _assign(fa, g, double, max_cents, split_cents, cover=cover,
                        weight=weights(usable), split_ok=_splittable(usable))[1]
    sigma = _uncertainty(fp, w, pairs, g, tension)
    return _result(drum, tension, t0, usable, all_pairs, labels, g, modes, cover=cover,
                   uncertainty=sigma, physics=physics, split_cents=split_cents,
                   need_beat=splits == "beating")


def _start(fp, w, split_ok, f_base, t_base, double, edge, max_cents, split_cents, factor):
    """The best (cost, tension, pairs) over tensions that put a strong partial on a low mode.

    ``f_base`` are the model's modes at ``t_base`` [N/m], scaled by sqrt(T / t_base) to each
    trial; trials are limited to within ``factor`` of ``t_base``.
    """
    ranked = _starts(fp, w, split_ok, f_base, t_base, double, edge, max_cents, split_cents,
                     factor)
    return ranked[0] if ranked else None


def _starts(fp, w, split_ok, f_base, t_base, double, edge, max_cents, split_cents, factor):
    """Every trial of :func:`_start` as (cost, tension, pairs), cheapest first."""
    out = []
    for i in np.argsort(-w)[:6]:
        for k in range(min(12, f_base.size)):
            if not np.isfinite(f_base[k]):
                continue
            t = t_base * (fp[i] / f_base[k]) ** 2
            if not 1 / factor <= t / t_base <= factor:
                continue
            g = f_base * math.sqrt(t / t_base)
            cost, pairs = _assign(fp, g, double, max_cents, split_cents,
                                  cover=np.nanmin(g[edge]), weight=w, split_ok=split_ok)
            out.append((cost, t, pairs))
    return sorted(out, key=lambda c: c[0])


BEAT_RING_DB = 40.0  # a split pair beats at least once before its shorter member falls this far
BEAT_LEVEL_DB = 20.0  # and its weaker member is within this of the stronger (an audible beat)


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


def _splittable(parts) -> np.ndarray:
    """Partials that may be half of a split pair: steady frequency, a decay of their own."""
    return np.array([("glide" not in p.flags) and (p.t60 or 0.0) >= SPLIT_MIN_T60_S
                     for p in parts])


def _refine(drum, physics, fp, w, split_ok, pairs, labels, tension, m_max, n_max, double,
            max_cents, split_cents, say, *, known, rounds=_MAX_ROUNDS):
    """Alternate: tension for the pairs (the model solved at each trial), then pair again."""
    modes = known
    edge = [k for k, lb in enumerate(labels) if lb[:2] in ((m_max, 1), (0, n_max))]
    for round_ in range(rounds):
        say(f"round {round_ + 1}: fitting the tension to {len(pairs)} paired partials")
        tension = _fit_tension(drum, physics, fp, pairs, labels, tension, weight=w,
                               known=None if modes is None else _by_label(modes, labels))
        say(f"round {round_ + 1}: pairing again at {tension:.1f} N/m")
        modes = solve(drum.with_tension(tension), physics, m_max=m_max, n_max=n_max)
        g = _by_label(modes, labels)
        new_pairs = _assign(fp, g, double, max_cents, split_cents, cover=np.nanmin(g[edge]),
                            weight=w, split_ok=split_ok)[1]
        if new_pairs == pairs:
            break
        pairs = new_pairs
    return tension, pairs, modes


FULL_ROUNDS = 3  # tension searches on the full model, each followed by pairing again
SEARCH_CLOSE = 1e-4  # in ln f: 0.17 cents, where the search stops; the last step does the rest


def _refine_full(drum, fp, w, split_ok, pairs, labels, tension, t0, m_max, n_max, double,
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
        r = np.log(_by_label(modes, labels)[[k for _, k in pairs_]] / fp[i])
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
        g_tab = _by_label(modes, labels)
        new_pairs = _assign(fp, g_tab, double, max_cents, split_cents,
                            cover=np.nanmin(g_tab[edge]), weight=w, split_ok=split_ok)[1]
        if new_pairs == pairs or isinstance(found, Beyond):
            break
        pairs = new_pairs
    say(f"full model with every loss at {math.exp(x):.1f} N/m")
    modes = table(x, losses="all")
    g_tab = _by_label(modes, labels)
    pairs = _assign(fp, g_tab, double, max_cents, split_cents, cover=np.nanmin(g_tab[edge]),
                    weight=w, split_ok=split_ok)[1]
    step = -offset(modes, pairs) / slope
    return math.exp(x), pairs, modes, step, math.exp(slope * step)


def _uncertainty(fp, w, pairs, g, tension) -> float:
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


def _orders(ratio: float, limit: float) -> tuple[int, int]:
    """m_max, n_max so that every ideal mode up to ``ratio`` (at most ``limit``) times the
    lowest is in the table."""
    top = min(max(ratio, 3.0), limit) * float(jn_zeros(0, 1)[0])
    m_max = 0
    while float(jn_zeros(m_max + 1, 1)[0]) <= top:
        m_max += 1
    n_max = int(np.count_nonzero(jn_zeros(0, 20) <= top))
    return m_max, max(n_max, 1)


def _assign(f: np.ndarray, g: np.ndarray, double: np.ndarray, max_cents: float,
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


def _by_label(modes: ModeSet, labels) -> np.ndarray:
    """The frequencies of ``modes`` in the order of ``labels`` [Hz]."""
    table = {(md.m, md.n, md.branch, md.head): md.frequency for md in modes.modes}
    return np.array([table.get(lb, math.nan) for lb in labels])


def _fit_tension(drum, physics, fp, pairs, labels, tension, *, weight=None, known=None) -> float:
    """The tension at which the paired partials sit on their modes on average.

    The root in ln T of the mean of ln(f_partial / f_model(T)) over the pairs: the
    least-squares tension in cents when every mode scales alike (exactly so for the ideal
    membrane, nearly so with stiffness; with air loading the modes' slopes differ a little
    and this is the zero-mean-residual tension). Secant steps in ln T, started with the
    sqrt(T) slope of 1/2, converge in a few solves.
    """
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
        r = np.log(fp[idx_f] / g)
        ok = np.isfinite(r)
        if not ok.any():
            raise SolverError("the paired modes vanished from the model's table while fitting")
        return float(np.sum(wp[ok] * r[ok]) / np.sum(wp[ok]))

    def h(x):
        modes = solve(drum.with_tension(math.exp(x)), physics, m_max=m_max, n_max=n_max)
        return mean_log(_by_label(modes, wanted))

    x = math.log(tension)
    # the model's frequencies at this tension, when the caller has them already
    hx = h(x) if known is None else mean_log(known[[k for _, k in pairs]])
    slope = 0.5
    for _ in range(30):
        step = hx / slope
        x_new = x + step
        if abs(step) < _SECANT_TOL:
            return math.exp(x_new)
        h_new = h(x_new)
        if h_new != hx:
            slope = min(max(-(h_new - hx) / (x_new - x), 0.05), 2.0)
        x, hx = x_new, h_new
    raise SolverError("the tension fit did not settle in 30 model solves")


def _result(drum, tension, t0, parts, pairs, labels, freqs, modes, cover, uncertainty=math.nan,
            physics="stiff", split_cents=SPLIT_CENTS, need_beat=True) -> Identification:
    matches, splits, by_mode = [], [], {}
    for i, k in pairs:
        m, n, branch, head = labels[k]
        matches.append(Match(partial=parts[i], m=m, n=n, model_frequency=float(freqs[k]),
                             cents=float(notation.cents(parts[i].settled, freqs[k])),
                             branch=branch, head=head))
        by_mode.setdefault(k, []).append(parts[i])
    for k, group in by_mode.items():
        if len(group) == 2:
            low, high = sorted(group, key=lambda p: p.frequency)
            splits.append(SplitPair(m=labels[k][0], n=labels[k][1], low=low, high=high))
    # a split is two partials close to each other, not merely each close to the mode, and
    # heard as one: they beat (see :func:`beats`); otherwise the mode keeps the partial
    # that the assignment gains most by (its weight times what it saves on MAX_CENTS)
    kept = [sp for sp in splits
            if sp.cents <= split_cents and (beats(sp.low, sp.high) or not need_beat)]
    gain = {id(p): (MAX_CENTS - abs(notation.cents(p.settled, freqs[k]))) * wt
            for (i, k), wt in zip(pairs, weights([parts[i] for i, _ in pairs]))
            for p in (parts[i],)}
    dropped = {id(min((sp.low, sp.high), key=lambda p: gain[id(p)]))
               for sp in splits if sp not in kept}
    splits = kept
    matches = [mt for mt in matches if id(mt.partial) not in dropped]
    paired = {i for i, _ in pairs if id(parts[i]) not in dropped}
    return Identification(drum=drum.with_tension(tension), tension=float(tension),
                          nominal_tension=float(t0),
                          matches=tuple(sorted(matches, key=lambda mt: mt.partial.frequency)),
                          unmatched=tuple(p for i, p in enumerate(parts)
                                          if i not in paired and p.settled <= cover),
                          splits=tuple(sorted(splits, key=lambda sp: sp.low.frequency)),
                          modes=modes, beyond=tuple(p for p in parts if p.settled > cover),
                          uncertainty=uncertainty, physics=physics)


make_callable(__name__, "identify")  # membrane.identify(...) is this module's identify(...)
