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
judged again on the full model solved at each (judged costs within :data:`START_TIE` of
the cheapest are a tie, won by the start that pairs the most weight of strong,
long-ringing partials); the start is then refined on the
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

The concepts live in three modules: :mod:`membrane.mode_matching` (weights, the pairing,
the global start, split pairs), :mod:`membrane.tension_fit` (the tension for fixed pairs,
on the model solved at each trial, and its uncertainty) and this one (the search as a
whole, the result and its verdict). This one is about 450 lines on purpose: the start, the
refinement, the finishing solve and the verdict read one another's intermediate tables, and
split further each part would pass those tables through another module's arguments.

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

from . import notation
from .blas import one_blas_thread
from .callable_module import make_callable
from .drum import Drum
from .errors import InputError, SolverError
from .mode_matching import (MAX_CENTS, SPLIT_CENTS, assign, beats, best_start, by_label, orders,
                            splittable, start_tensions, weights)
from .modes import ModeSet
from .recording import Partial
from .renamed import renamed_attribute
from .solver import solve
from .tension_fit import MAX_TENSION_FACTOR, refine, refine_full, tension_uncertainty

__all__ = ["Identification", "Match", "SplitPair", "identify", "weights", "beats", "MAX_CENTS",
           "SPLIT_CENTS", "MIN_MATCHED", "POOR_RMS_CENTS"]

# Choices of this method (tuned on synthetic taps, no external source):
# model modes up to this ratio to the ideal (0,1) mode: the table grows as its square, and a
# full-physics solve takes about 0.1 s a mode, so the full model gets the smaller range
MAX_RANGE = {"ideal": 10.0, "stiff": 10.0, "full": 4.5}


START_MARGIN = 0.05  # start tensions costing within 5 % of the cheapest are judged again


START_RIVALS = 4  # at most this many, each a full-model solve


START_DISTINCT = 0.05  # in ln T: start tensions closer than 5 % are one


# judged starts costing within this of the cheapest are a tie, settled by the weight of the
# partials each pairs (the strong, long-ringing partials are the head's modes, see
# :func:`weights`). The margin is the cost's own spread: on timpani_high_1 with a 29-inch
# drum file, the same two starts' judged costs moved by 2 % (the 811 N/m start, 1189 ->
# 1164) and 4 % (the start near 2200 N/m: 2258 N/m, 1137 -> 2140 N/m, 1183) between a band
# fit cut at 25 evaluations and one run to convergence, reversing their order (measured,
# no source)
START_TIE = 0.04


MIN_MATCHED = 3  # fewer matched partials than this: the drum is not identified


# an rms residual above this is a poor match: half the rms of residuals spread evenly over
# the match window (+-MAX_CENTS has rms MAX_CENTS / sqrt 3), i.e. the fit pairs the partials
# with modes little better than a chance pairing would (judgement, no source)
POOR_RMS_CENTS = MAX_CENTS / (2.0 * math.sqrt(3.0))


MAX_FIT_PARTIALS = 24  # the heaviest partials fitted (bounded work; the rest are labelled)


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
    beat_frequency : float
        Their difference frequency: the beat heard [Hz] (``beat_hz`` is the older name).
    """

    m: int
    n: int
    low: Partial
    high: Partial

    beat_hz = renamed_attribute("SplitPair.beat_hz", "beat_frequency")

    @property
    def beat_frequency(self) -> float:
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
    split_ok = splittable(parts)
    t0 = drum.head.tension
    say = progress or (lambda message: None)
    scale = 1.0
    if physics == "full":
        # the global start on the full model's own modes (radiation damping only: the other
        # losses move a frequency by under a cent) at the drum file's tension, scaled by
        # sqrt(T): air loading lowers the low modes by far more than a match's width, so
        # the in-vacuum pattern would pair the wrong modes
        m_max, n_max = orders(fp.max() / fp.min() * 1.6, MAX_RANGE["full"])
        say(f"global start on the full model at {t0:.0f} N/m, m <= {m_max}, n <= {n_max}")
        modes = solve(drum, "full", m_max=m_max, n_max=n_max, losses="radiation")
        labels = [(md.m, md.n, md.branch, md.head) for md in modes.modes]
        edge = [k for k, lb in enumerate(labels) if lb[:2] in ((m_max, 1), (0, n_max))]
        double = np.array([md.multiplicity == 2 for md in modes.modes])
        ranked = [c for c in start_tensions(fp, w, split_ok, by_label(modes, labels), t0, double,
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
                g_r = by_label(seen[x_r], labels)
                cost, pairs_r = assign(fp, g_r, double, max_cents, split_cents,
                                        cover=np.nanmin(g_r[edge]), weight=w, split_ok=split_ok)
                judged.append((cost, r[1], pairs_r))
            _, tension, pairs = _settle_tie(judged, w)
            say("judged costs: " + ", ".join(f"{c[1]:.0f} N/m {c[0]:.0f} ({len(c[2])} pairs, "
                                              f"weight {_paired_weight(c[2], w):.2f})"
                                              for c in sorted(judged)))
        else:
            _, tension, pairs = rivals[0]
        tension, pairs, modes, last, scale = refine_full(
            drum, fp, w, split_ok, pairs, labels, tension, t0, m_max, n_max, double, edge,
            max_cents, split_cents, say, seen=seen, start=modes)
        tension = tension * math.exp(last)
    else:
        # the table reaches 1.6 times the partials' span (the lowest partial may be the
        # (1,1), 1.59 times the (0,1), when the (0,1) is missed), at most MAX_RANGE times
        # the (0,1)
        m_max, n_max = orders(fp.max() / fp.min() * 1.6, MAX_RANGE.get(physics, 6.0))
        say(f"searching tensions with the {physics} model, m <= {m_max}, n <= {n_max}")
        base = solve(drum, physics, m_max=m_max, n_max=n_max)
        labels = [(md.m, md.n, md.branch, md.head) for md in base.modes]
        edge = [k for k, lb in enumerate(labels) if lb[:2] in ((m_max, 1), (0, n_max))]
        double = np.array([md.multiplicity == 2 for md in base.modes])
        f_base = np.array([md.frequency for md in base.modes])
        # start: every pairing of a strong partial with a low mode proposes a tension
        best = best_start(fp, w, split_ok, f_base, t0, double, edge, max_cents, split_cents,
                      MAX_TENSION_FACTOR)
        if best is None or len(best[2]) < 2:
            raise SolverError("no tension within a factor of 25 of the drum's puts two of its "
                              "modes on the partials; check the drum file (diameter, film)")
        _, tension, pairs = best
        tension, pairs, modes = refine(drum, physics, fp, w, split_ok, pairs, labels, tension,
                                        m_max, n_max, double, max_cents, split_cents, say,
                                        known=None)
    g = by_label(modes, labels) * scale  # the table carried to the fitted tension
    cover = np.nanmin(g[edge])
    # every usable partial labelled at the fitted tension (the fit used the heaviest)
    fa = np.array([p.settled for p in usable])
    all_pairs = assign(fa, g, double, max_cents, split_cents, cover=cover,
                        weight=weights(usable), split_ok=splittable(usable))[1]
    sigma = tension_uncertainty(fp, w, pairs, g, tension)
    return _result(drum, tension, t0, usable, all_pairs, labels, g, modes, cover=cover,
                   uncertainty=sigma, physics=physics, split_cents=split_cents,
                   need_beat=splits == "beating")


def _paired_weight(pairs, w) -> float:
    """The summed weight (:func:`weights`) of the partials a pairing names."""
    return float(sum(w[i] for i in {i for i, _ in pairs}))


def _settle_tie(judged, w):
    """The judged start (cost, tension, pairs) to refine: the cheapest, unless another costs
    within :data:`START_TIE` of it and pairs more weight of partials, then that one.

    A knife-edge in cost is noise of the analysis; which start names more of the strong,
    long-ringing partials is not (a wrong start leaves some of them unpaired)."""
    best = min(c[0] for c in judged)
    close = [c for c in judged if c[0] <= best * (1.0 + START_TIE)]
    return max(close, key=lambda c: (_paired_weight(c[2], w), -c[0]))


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
