"""Lugs: the split table of an unevenly tensioned drum, the lug tensions behind measured
splits, and the lug turns that clear them.

Forward: lug tensions -> rim tension (:func:`membrane.physics.prestress.rim_tension`) ->
split pairs (:mod:`membrane.physics.uneven`), with air and body carried to first order.

Inverse (:func:`estimate_lugs`), to first order in the unevenness. Write the lug values as
``T_j = T0 (1 + x_j)`` with ``sum x_j = 0``. The rim harmonics are linear in x,
``c_k / T0 = (2/N) sum_j x_j exp(-i k theta_j)`` (half weight at k = N/2), and a pair (m, n)
splits by ``(f_high - f_low) / f = W_mn |c_2m| / T0``. The data and what each can see:

* lug tensions: x itself (every harmonic up to N/2, with its phase);
* tap pitches at the lugs, by the rule of thumb "tap pitch proportional to the square root
  of the local tension" (common practice, no source; :data:`membrane.tuning.LUG_RULE`):
  x_j = (p_j / p_rms)^2 - 1, relative values only;
* split pairs from a recording: only the magnitudes |c_2m| of the harmonics 2m <= N/2, not
  their phases (which way the nodal lines point is not in a recording from one point),
  nothing of harmonic 1 or of the odd harmonics, and a pair whose 2m exceeds N/2 sees a
  harmonic the lugs cannot hold apart from N - 2m.

All are fitted together by least squares (``scipy.optimize.least_squares``), each datum
weighted by its uncertainty. With splits alone the lug tensions are not determined (phases
unseen) and only the harmonic magnitudes are returned.

Turns (:func:`prescribe_turns`): the lugs that clear every split are equal lugs; the common
value keeps the principal (1,1) pitch (the mean of its two members) where it is. A turn
changes a lug's value by a calibration: ``cents_per_turn`` (the tap pitch near the lug per
turn, so T scales by 2^(2 c t / 1200)) or ``turns_per_newton`` (turns per newton of the
lug's pull, the pull being T 2 pi a / N).

One module of a little over 400 lines on purpose: the forward table, its inverse and the turns are
one model read three ways, and share its harmonic rows (``_harmonic_rows``) and the
first-order split weights; split apart, each part would import the others' internals.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy import optimize

from .drum import Drum
from .errors import InputError
from .notation import cents
from .physics.prestress import RimTension, lug_angles, rim_tension
from .renamed import renamed_attribute, warn_renamed
from .physics.uneven import (NOTE_AIR, NOTE_EXACT, NOTE_FIRST_ORDER, Split, exact_splits,
                             first_order_splits, split_weight, with_air)

PHYSICS = ("ideal", "stiff", "full")
METHODS = ("exact", "first-order")
# Uncertainties that weight the data against each other in the fit (common practice, no
# source): a tap pitch read to about 2 cents; a split read to about 0.05 Hz, or 2 % of it.
PITCH_CENTS = 2.0
SPLIT_HZ = 0.05
SPLIT_FRACTION = 0.02
TENSION_FRACTION = 0.005  # a lug tension given as measured: 0.5 %


@dataclass(frozen=True)
class SplitTable:
    """Split pairs of an uneven drum.

    Attributes
    ----------
    splits : tuple of Split
        One per (m, n), sorted by the uniform head's frequency.
    rim : RimTension
        The rim tension used (N/m).
    physics, method : str
    notes : tuple of str
        What the model includes and how.
    """

    splits: tuple
    rim: RimTension
    physics: str
    method: str
    notes: tuple = ()

    def __repr__(self) -> str:
        worst = max(self.splits, key=lambda s: s.beat_frequency, default=None)
        most = f", widest ({worst.m},{worst.n}) beating {worst.beat_frequency:.2f} Hz" if worst is not None else ""
        return f"SplitTable({len(self.splits)} modes, {self.physics} physics, {self.method}{most})"

    def find(self, m: int, n: int) -> Split:
        """The split of (m, n)."""
        for s in self.splits:
            if (s.m, s.n) == (m, n):
                return s
        raise InputError("mode", f"{m},{n}", "not in the split table")


def split_table(drum: Drum, rim: RimTension, *, physics: str = "full", method: str = "exact",
                m_max: int = 6, n_max: int = 3) -> SplitTable:
    """The split pairs of ``drum`` with rim tension ``rim``.

    Parameters
    ----------
    drum : Drum
        The drum; its head tension is replaced by the rim's mean.
    rim : RimTension
        Rim tension in N/m.
    physics : {"ideal", "stiff", "full"}
        ``full`` applies each pair's relative split to the coupled frequency (air, body).
    method : {"exact", "first-order"}
        Ritz solve with all orders coupled, or first-order perturbation.
    m_max, n_max : int
        Table size.
    """
    if physics not in PHYSICS:
        raise InputError("physics", physics, f"must be one of: {', '.join(PHYSICS)}")
    if method not in METHODS:
        raise InputError("method", method, f"must be one of: {', '.join(METHODS)}")
    stiff = physics != "ideal"
    solver = exact_splits if method == "exact" else first_order_splits
    splits = solver(drum.head, rim, m_max=m_max, n_max=n_max, stiff=stiff)
    notes = [NOTE_EXACT if method == "exact" else NOTE_FIRST_ORDER]
    if physics == "full":
        from .solver import solve

        modes = solve(drum.with_tension(rim.mean), "full", m_max=m_max, n_max=n_max)
        coupled = {(s.m, s.n): modes.find(s.m, s.n).frequency for s in splits}
        splits = with_air(splits, coupled)
        notes.append(NOTE_AIR)
        notes.extend(modes.notes)
        if drum.resonant_head is not None:
            notes.append("shell: the split is applied to the lower branch of each (m, n) as if the "
                         "struck head alone carried it (an overestimate where both heads move)")
    else:
        notes.append("in vacuum: no air loading, no body")
    splits = sorted(splits, key=lambda s: s.uniform_frequency)
    return SplitTable(splits=tuple(splits), rim=rim, physics=physics, method=method, notes=tuple(notes))


# ------------------------------------------------------------------ inverse
@dataclass(frozen=True, init=False)
class MeasuredSplit:
    """A split pair as measured: mode and both members' frequencies in Hz.

    ``MeasuredSplit(m, n, low_frequency, high_frequency)``; ``low_hz`` and ``high_hz`` are the
    older names (keywords and attributes).
    """

    m: int
    n: int
    low_frequency: float
    high_frequency: float

    def __init__(self, m: int, n: int, low_frequency: float | None = None,
                 high_frequency: float | None = None, *, low_hz: float | None = None,
                 high_hz: float | None = None):
        if low_hz is not None or high_hz is not None:
            warn_renamed("MeasuredSplit(low_hz=, high_hz=)", "MeasuredSplit(low_frequency=, high_frequency=)")
        low = low_frequency if low_frequency is not None else low_hz
        high = high_frequency if high_frequency is not None else high_hz
        if low is None or high is None:
            raise TypeError("MeasuredSplit needs low_frequency and high_frequency (Hz)")
        for name, value in (("m", m), ("n", n), ("low_frequency", low), ("high_frequency", high)):
            object.__setattr__(self, name, value)

    @property
    def relative(self) -> float:
        return 2 * (self.high_frequency - self.low_frequency) / (self.high_frequency + self.low_frequency)

    @property
    def beat_frequency(self) -> float:
        """high - low in Hz: the beat rate heard."""
        return self.high_frequency - self.low_frequency

    low_hz = renamed_attribute("MeasuredSplit.low_hz", "low_frequency")
    high_hz = renamed_attribute("MeasuredSplit.high_hz", "high_frequency")


@dataclass(frozen=True)
class LugEstimate:
    """Lug tensions estimated from measurements.

    Attributes
    ----------
    count : int
        Number of lugs.
    mean_tension : float
        T0 in N/m.
    tensions : numpy.ndarray or None
        Per-lug tension in N/m; None when the data do not fix it (splits alone).
    harmonics : dict
        k -> |c_k| / T0 of every harmonic the data see (dimensionless).
    seen, unseen : tuple of str
        What the data determine and what they cannot see, in words.
    rms_residual : float
        Root-mean-square weighted residual of the fit (about 1 when the data agree).
    """

    count: int
    mean_tension: float
    tensions: np.ndarray | None
    harmonics: dict
    seen: tuple
    unseen: tuple
    rms_residual: float

    def __repr__(self) -> str:
        return (f"LugEstimate({self.count} lugs, mean {self.mean_tension:.1f} N/m, "
                f"{'tensions per lug' if self.tensions is not None else 'no per-lug tensions'}, "
                f"rms residual {self.rms_residual:.2f})")

    def rim(self) -> RimTension | None:
        """The estimated rim tension (smooth spread), or None without lug tensions."""
        return None if self.tensions is None else rim_tension(self.tensions)


def _harmonic_rows(count: int, k: int) -> np.ndarray:
    """Row vector F_k with c_k / T0 = F_k @ x (complex), smooth spread."""
    theta = lug_angles(count)
    row = 2.0 / count * np.exp(-1j * k * theta)
    if count % 2 == 0 and k == count // 2:
        row = row / 2
    return row


def tensions_from_pitches(pitches, *, mean_tension: float) -> np.ndarray:
    """Lug tensions (N/m) from tap pitches (Hz) by the rule of thumb T_j ~ p_j^2, mean T0."""
    p = np.asarray(pitches, dtype=float)
    if p.size < 3 or not np.all(np.isfinite(p)) or np.any(p <= 0):
        raise InputError("lug pitches", list(p), "must be at least 3 positive pitches, one per lug")
    rel = p**2 / np.mean(p**2)
    return mean_tension * rel


def estimate_lugs(drum: Drum, *, count: int, tensions: Sequence[float] | None = None,
                  pitches: Sequence[float] | None = None, splits: Sequence[MeasuredSplit] = (),
                  physics: str = "stiff", radial: Sequence[int] = (1,)) -> LugEstimate:
    """Least-squares lug tensions from lug tensions, tap pitches and/or measured splits.

    Parameters
    ----------
    drum : Drum
        The drum; its head tension is the mean T0 unless lug tensions are given (N/m).
    count : int
        Number of equally spaced lugs (>= 3).
    tensions : sequence of float or None
        Measured lug tensions in N/m.
    pitches : sequence of float or None
        Tap pitches near each lug in Hz (rule of thumb, module docstring).
    splits : sequence of MeasuredSplit
        Measured split pairs.
    physics : {"ideal", "stiff", "full"}
        Bending stiffness in the split weights unless ``ideal`` (air does not change them at
        first order).
    radial : tuple of int
        Split pairs with these n are used. Default the (m,1) family: on a synthetic tap of
        a 3 % uneven head the (2,2) pair, near the (4,2) and (0,3), came out 40 % off the
        first-order link, the (m,1) pairs within 6 %.

    Returns
    -------
    LugEstimate
    """
    if isinstance(count, bool) or not isinstance(count, int) or not 3 <= count <= 64:
        raise InputError("lug count", count, "must be a whole number from 3 to 64")
    splits = list(splits)
    if tensions is None and pitches is None and not splits:
        raise InputError("lug data", "none", "give lug tensions, lug pitches or a recording with split pairs")
    t0 = float(drum.head.tension)
    rows, data, weights, kinds = [], [], [], []
    if tensions is not None:
        t = np.asarray(tensions, dtype=float)
        if t.size != count or np.any(~np.isfinite(t)) or np.any(t <= 0):
            raise InputError("lug tensions", list(t), f"must be {count} positive tensions")
        t0 = float(np.mean(t))
        rows.append(np.eye(count))
        data.append(t / t0 - 1)
        weights.append(np.full(count, 1 / TENSION_FRACTION))
        kinds.append("tensions")
    if pitches is not None:
        p = np.asarray(pitches, dtype=float)
        if p.size != count:
            raise InputError("lug pitches", list(p), f"must be {count} pitches, one per lug")
        rel = tensions_from_pitches(p, mean_tension=1.0)
        rows.append(np.eye(count))
        data.append(rel - 1)
        weights.append(np.full(count, 1 / (2 * math.log(2) * PITCH_CENTS / 1200)))
        kinds.append("pitches")
    stiff = physics != "ideal"
    top = count // 2
    seen_k, alias = {}, []
    split_terms = []
    for s in splits:
        k = 2 * s.m
        if s.m < 1:
            continue
        if s.n not in radial:
            alias.append(f"the ({s.m},{s.n}) split is not used: pairs with n > 1 lie near other modes, "
                         "where the first-order link between split and harmonic fails")
            continue
        if k > top:
            alias.append(f"the ({s.m},{s.n}) split sees harmonic {k}, which {count} equally spread lugs "
                         "do not make: it is a second-order effect here and is not used")
            continue
        w = split_weight(drum.head, m=s.m, n=s.n, stiff=stiff, tension=t0)
        sigma = max(SPLIT_FRACTION * s.relative, SPLIT_HZ / (0.5 * (s.low_frequency + s.high_frequency)))
        split_terms.append((_harmonic_rows(count, k), s.relative / abs(w), abs(w) / sigma, k))
        seen_k.setdefault(k, []).append((s.relative / abs(w), abs(w) / sigma))
    A = np.vstack(rows) if rows else np.zeros((0, count))
    b = np.concatenate(data) if data else np.zeros(0)
    wl = np.concatenate(weights) if weights else np.zeros(0)
    # the mean is T0: x sums to zero (a strong row)
    A = np.vstack([A, np.ones((1, count))])
    b = np.concatenate([b, [0.0]])
    wl = np.concatenate([wl, [1e6]])

    def residual(x):
        lin = wl * (A @ x - b)
        mag = [wt * (abs(row @ x) - target) for row, target, wt, _ in split_terms]
        return np.concatenate([lin, mag])

    if rows:
        x0 = np.linalg.lstsq(A * wl[:, None], b * wl, rcond=None)[0]
    else:
        # splits alone: start from the seen harmonics, each put at phase 0 (phases unseen)
        theta = lug_angles(count)
        x0 = sum(np.mean([v for v, _ in vals]) * np.cos(k * theta) for k, vals in seen_k.items())
        x0 = np.asarray(x0, dtype=float)
    fit = optimize.least_squares(residual, x0, method="lm" if residual(x0).size >= count else "trf",
                                 xtol=1e-12, ftol=1e-12)
    x = fit.x
    res = residual(x)
    rms = float(np.sqrt(np.mean(res[:-1] ** 2))) if res.size > 1 else 0.0
    harmonics = {k: float(abs(_harmonic_rows(count, k) @ x)) for k in range(1, top + 1)}
    seen, unseen = [], []
    if rows:
        seen.append(f"every harmonic of the rim tension up to {top} (the lug values themselves), "
                    f"from the lug {' and '.join(kinds)}")
        unseen.append(f"harmonics above {top} between the lugs: {count} lugs cannot tell them from lower ones")
        if "pitches" in kinds and "tensions" not in kinds:
            unseen.append("the absolute tension from tap pitches: they give relative values only "
                          "(rule of thumb), the mean is the drum's tension")
    if seen_k:
        ks = ", ".join(str(k) for k in sorted(seen_k))
        seen.append(f"the size of harmonic(s) {ks} from the split pairs")
        if not rows:
            unseen.append("which way each harmonic points (its phase): a recording from one point "
                          "does not show the nodal lines, so no lug turns can be prescribed from it alone")
            unseen.append("harmonic 1 and the odd harmonics, which split no pair at first order")
    unseen.extend(alias)
    tensions_out = None if not rows else t0 * (1 + x)
    if not rows:
        harmonics = {k: float(np.average([v for v, _ in vals], weights=[w**2 for _, w in vals]))
                     for k, vals in seen_k.items()}
    return LugEstimate(count=count, mean_tension=t0, tensions=tensions_out, harmonics=harmonics,
                       seen=tuple(seen), unseen=tuple(unseen), rms_residual=rms)


def measured_splits(identification) -> list[MeasuredSplit]:
    """Split pairs out of :func:`membrane.identify.identify`'s result."""
    out = []
    for pair in getattr(identification, "splits", ()):
        out.append(MeasuredSplit(m=int(pair.m), n=int(pair.n), low_frequency=float(pair.low.frequency),
                                 high_frequency=float(pair.high.frequency)))
    return out


# ------------------------------------------------------------------ turns
@dataclass(frozen=True)
class Turns:
    """Lug turns that even out the head.

    Attributes
    ----------
    target_tension : float
        The common lug value in N/m that keeps the (1,1) pitch.
    change : numpy.ndarray
        Per-lug tension change in N/m (+ tighten).
    turns : numpy.ndarray or None
        Per-lug turns (+ tighten), or None without a calibration.
    tap_cents : numpy.ndarray
        Per-lug change of the tap pitch in cents, by the rule of thumb.
    """

    target_tension: float
    change: np.ndarray
    turns: np.ndarray | None
    tap_cents: np.ndarray


def prescribe_turns(drum: Drum, tensions: Sequence[float], *, cents_per_turn: float | None = None,
                    turns_per_newton: float | None = None, physics: str = "stiff") -> Turns:
    """Turns per lug that clear the splits and keep the principal (1,1) on pitch.

    Parameters
    ----------
    drum : Drum
        The drum (radius, film).
    tensions : sequence of float
        Present lug tensions in N/m (equally spaced lugs).
    cents_per_turn : float or None
        Tap-pitch change near a lug for one turn, cents (> 0).
    turns_per_newton : float or None
        Turns per newton of a lug's pull (> 0).
    physics : {"ideal", "stiff", "full"}
        Model for keeping the (1,1) on pitch (vacuum part; air moves both states alike).
    """
    t = np.asarray(tensions, dtype=float)
    if cents_per_turn is not None and turns_per_newton is not None:
        raise InputError("calibration", "both", "give cents per turn or turns per newton, not both")
    for key, value in (("cents per turn", cents_per_turn), ("turns per newton", turns_per_newton)):
        if value is not None and not (math.isfinite(value) and value > 0):
            raise InputError(key, value, "must be a positive number")
    rim = rim_tension(t)
    stiff = physics != "ideal"
    now = exact_splits(drum.head, rim, m_max=1, n_max=1, stiff=stiff)[1]
    # uniform head at T: f11 = now.uniform_frequency at T0; keep the pair's mean
    mean_now = 0.5 * (now.low_frequency + now.high_frequency)
    target = rim.mean * (mean_now / now.uniform_frequency) ** 2  # sqrt(T) for the (1,1) near T0
    if stiff and drum.head.bending_stiffness > 0:
        # stiffness breaks the sqrt law a little: one secant-free correction step
        even = exact_splits(drum.head, rim_tension(np.full(t.size, target)), m_max=1, n_max=1,
                            stiff=True)[1].uniform_frequency
        target *= (mean_now / even) ** 2
    change = target - t
    tap = 0.5 * cents(target, t)  # f ~ sqrt(T)
    turns = None
    if cents_per_turn is not None:
        turns = tap / cents_per_turn
    elif turns_per_newton is not None:
        turns = turns_per_newton * change * 2 * math.pi * drum.head.radius / t.size
    return Turns(target_tension=float(target), change=change, turns=turns, tap_cents=tap)


def apply_turns(tensions, turns: Turns) -> np.ndarray:
    """Lug tensions after the prescribed changes (N/m)."""
    return np.asarray(tensions, dtype=float) + turns.change
