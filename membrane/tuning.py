"""Tuning: the tension that puts chosen modes on target pitches.

With air loading and a body, a mode's frequency is not proportional to sqrt(T) (the
air's added mass and the kettle's air spring do not scale with tension), so the
tension is found by root-finding on the model in use; the sqrt(T) scaling only
supplies the first guess. Several targets are met in the least-squares sense in
cents, optionally freeing the head's areal density or the kettle's volume.

Safety and validity (film stress, the slack limit, the practical minimum, the cautions) live in
:mod:`membrane.safety`, shared with the strike preview and the handout; their names are
importable from here as before. A target the model cannot reach above the slack limit is
refused; a suggestion below it (several targets) gets a caution.

The refusals in words are :mod:`membrane.tune_refusals`; lug by lug equalisation from tap
pitches lives in :mod:`membrane.lug_changes` (its names are
importable from here as before).

Everything here takes and returns SI floats (N/m, Hz, kg/m^2, m^3, Pa).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .blas import one_blas_thread
from .drum import Drum, Head
from .errors import InputError, SolverError
from .modes import ModeSet
from .notation import CENTS_PER_LN, cents as _cents
from .renamed import renamed_attribute
from .safety import (CAUTIONS, MIN_HOLDING_STRAIN, MIN_RULE, SAFE_STRESS_FRACTION, TENSION_CEILING,  # noqa: F401
                     below_minimum, practical_minimum, safety_warnings, slack_tension, stress, tension_ceiling)
from . import tension_search
from . import tune_refusals as refusals
from .tune_refusals import BRANCH_RANGE  # noqa: F401  (its old address)
from .lug_changes import LUG_RULE, TURN_STEP, LugChange, equalise_lugs, turns_text  # noqa: F401  (their old address)
from .solver import solve
from .tune_model import TuneModel as _Model

# Targets count as met together when every residual is within this many cents.
TOGETHER_CENTS = 1.0
# The root is polished until the mode is within this many cents of its target.
TOLERANCE_CENTS = 1e-3

FREE = ("areal_density", "volume")


# ------------------------------------------------------------------ results
@dataclass(frozen=True)
class Target:
    """One mode's target and how close the suggestion gets.

    Attributes
    ----------
    m, n : int
        The mode.
    target_frequency : float
        The pitch asked for [Hz].
    current_frequency : float
        The mode's frequency at the drum's present tension (and body) [Hz].
    predicted_frequency : float
        The mode's frequency at the suggested tension [Hz].

    ``target_hz``, ``current_hz`` and ``predicted_hz`` are the older names.
    """

    m: int
    n: int
    target_frequency: float
    current_frequency: float
    predicted_frequency: float

    target_hz = renamed_attribute("Target.target_hz", "target_frequency")
    current_hz = renamed_attribute("Target.current_hz", "current_frequency")
    predicted_hz = renamed_attribute("Target.predicted_hz", "predicted_frequency")

    @property
    def residual_cents(self) -> float:
        """Predicted minus target, in cents."""
        return float(_cents(self.predicted_frequency, self.target_frequency))


@dataclass(frozen=True)
class Tuning:
    """A suggested tension (and free parameter) with what it does.

    Attributes
    ----------
    current_tension, tension : float
        The drum's tension and the suggestion, N/m.
    naive_tension : float
        What sqrt(T) scaling of the first target would suggest, N/m (for comparison).
    targets : tuple of Target
        Each target with its predicted frequency at the suggestion.
    drum : Drum
        The drum at the suggestion.
    modes : ModeSet or None
        All modes solved at the suggestion (the new ratio table), if asked for.
    free, current_value, value : str, float or None
        The freed parameter ("areal_density" kg/m^2 or "volume" m^3), before and after.
    together : bool
        Whether every target is met within :data:`TOGETHER_CENTS`.
    warnings : tuple of str
        Cautions about the suggestion.
    solves : int
        Model solves the search took.
    """

    current_tension: float
    tension: float
    naive_tension: float
    targets: tuple
    drum: Drum
    modes: ModeSet | None
    free: str | None
    current_value: float | None
    value: float | None
    together: bool
    warnings: tuple
    solves: int

    def __repr__(self) -> str:
        goals = ", ".join(f"({t.m},{t.n}) {t.target_frequency:.2f} Hz" for t in self.targets)
        return (f"Tuning({self.current_tension:.1f} -> {self.tension:.1f} N/m ({self.change_percent:+.1f} %), "
                f"targets {goals}, rms {self.rms_cents:.3f} cents, {len(self.warnings)} warnings)")

    @property
    def change_percent(self) -> float:
        """Tension change in % of the current tension."""
        return 100.0 * (self.tension / self.current_tension - 1.0)

    @property
    def stress(self) -> float | None:
        """Film stress at the suggestion, Pa (None without a thickness)."""
        return stress(self.drum.head, self.tension)

    @property
    def rms_cents(self) -> float:
        """Root-mean-square residual over the targets, cents."""
        return float(np.sqrt(np.mean([t.residual_cents ** 2 for t in self.targets])))


# ------------------------------------------------------------------ single target: a root
# (membrane.tension_search: the one search for a tension, shared by every tension fit)


@one_blas_thread  # many small matrix products (membrane/blas.py)
def tension_for(drum: Drum, *, targets, physics: str = "full", free: str | None = None,
                n_max: int = 3, m_max: int = 6, table: bool = True, losses: str = "all") -> Tuning:
    """The tension (and optionally one more parameter) that puts modes on target pitches.

    Parameters
    ----------
    drum : Drum
        The drum as it is now (its head tension is the current tension).
    targets : sequence of ((int, int), float)
        Modes (m, n) and their target frequencies in Hz.
    physics : {"ideal", "stiff", "full"}
        Model, as in :func:`membrane.solve`.
    free : {None, "areal_density", "volume"}
        A second parameter to fit with several targets: the head's areal density
        (kg/m^2) or the kettle's volume (m^3).
    n_max, m_max : int
        Orders of the mode table reported at the suggestion (the search solves only
        the orders the targets need, with the same n_max, hence the same basis).
    table : bool
        Solve the whole mode table at the suggestion (one more solve); without it
        ``modes`` is None and the predictions come from the search's last solve.
    losses : {"all", "radiation"}
        What damps the head in full physics, as in :func:`membrane.solve`.

    Returns
    -------
    Tuning

    Notes
    -----
    One target: a root of ln(f_mn(T) / f*) in ln T (membrane.tension_search), to within
    0.001 cent, or a refusal in words (below the slack limit, beyond the film's strength,
    or across an air resonance of the body, where the labelled mode jumps). Several: least squares in cents over
    ln T (and the free parameter's log), tension_search.fit: Gauss-Newton with the
    perturbation Jacobian of the solved roots for full physics on one head (physics/
    sensitivity.py), else scipy's trust-region solver.

    With full physics on one head, trial solves after the first are carried from the nearest
    solved point (physics/continuation.py) instead of scanning the whole window; the answer
    (or a refusal's bracket) is confirmed by a whole solve, and the search is run again with
    whole solves throughout if the two disagree by more than the tolerance.
    """
    targets = [((int(m), int(n)), float(hz)) for (m, n), hz in targets]
    if not targets:
        raise InputError("target", None, "give at least one target pitch")
    for (m, n), hz in targets:
        if not (math.isfinite(hz) and hz > 0):
            raise InputError("target", hz, "a target must be a positive frequency in Hz")
    if len({mode for mode, _ in targets}) < len(targets):
        raise InputError("target", [f"{m},{n}" for (m, n), _ in targets], "each mode may have one target only")
    if free is not None:
        _check_free(drum, free, physics, len(targets))
    modes = [mode for mode, _ in targets]
    wanted = np.array([hz for _, hz in targets])
    model = _Model(drum, modes, physics, n_max, losses)
    t_now = drum.head.tension
    f_now = model.frequencies(t_now)
    naive = t_now * float(np.exp(2.0 * np.mean(np.log(wanted / f_now))))
    lo = math.log(max(slack_tension(drum.head), 1e-6 * t_now))
    hi = math.log(tension_ceiling(drum.head))
    current_value = value = None

    close = TOLERANCE_CENTS / CENTS_PER_LN
    for attempt in range(2):  # carried trial solves; once more solving each whole if the check fails
        if len(targets) == 1 and free is None:
            (m, n), hz = targets[0]
            g = lambda x: float(np.log(model.frequencies(math.exp(x))[0] / hz))  # noqa: E731
            slope = (lambda x: float(model.slopes(math.exp(x))[0, 0])) if model.by_order else None  # noqa: E731
            out = tension_search.search(g, x0=math.log(t_now), g0=float(np.log(f_now[0] / hz)),
                                        lo=lo, hi=hi, close=close, slope=slope)
            if not isinstance(out, tension_search.Found):
                # a refusal is said only from whole solves: its ends confirmed first
                ends = [out.x_lo, out.x_hi] if isinstance(out, tension_search.Jump) else [out.x]
                signs = [out.g_lo, out.g_hi] if isinstance(out, tension_search.Jump) else [out.g]
                if model.carried and not all(
                        (math.log(model.whole_frequencies(math.exp(x))[0] / hz) > 0) == (s > 0)
                        for x, s in zip(ends, signs)):
                    model.exact()
                    continue
                model.exact()
                if isinstance(out, tension_search.Beyond):
                    refusals.no_root(drum, (m, n), hz, model, lo, hi)
                refusals.crossing(drum, (m, n), hz, model, out, lo, hi)
            tension = math.exp(out.x)
        else:
            x0 = [math.log(min(max(naive, math.exp(lo)), math.exp(hi)))]
            bounds = ([lo], [hi])
            if free is not None:
                current_value = drum.head.areal_density if free == "areal_density" else drum.body.volume
                x0.append(math.log(current_value))
                # within a factor of 10 either way, and the drum-file range (10 kg/m^2, 10 m^3)
                bounds = ([lo, math.log(current_value / 10)], [hi, math.log(min(current_value * 10, 10.0))])

            def residuals(p):
                v = math.exp(p[1]) if free else None
                return _cents(model.frequencies(math.exp(p[0]), free, v), wanted)

            def jacobian(p):  # cents per unit of each log, at a point residuals() just solved
                v = math.exp(p[1]) if free else None
                return CENTS_PER_LN * model.slopes(math.exp(p[0]), free, v)

            fit = tension_search.fit(residuals, x0=x0, lower=bounds[0], upper=bounds[1],
                                     jacobian=jacobian if model.by_order else None)
            tension = math.exp(fit.x[0])
            value = math.exp(fit.x[1]) if free else None

        suggested = model.variant(tension, free, value)
        searched = model.frequencies(tension, free, value)
        if table:
            final = solve(suggested, physics, m_max=max(m_max, model.m_max), n_max=model.n_max, losses=losses)
            predicted = np.array([final.find(m, n).frequency for m, n in modes])
        else:  # the search's own solve at the suggestion (same orders and basis), whole
            final, predicted = None, model.whole_frequencies(tension, free, value)
        # the carried roots confirmed by a whole solve at the answer (a root that entered the
        # window, or a label the carried set gave otherwise, would show here)
        if not model.carried or np.max(np.abs(np.log(predicted / searched))) < close:
            break
        model.exact()
    found = [Target(m=m, n=n, target_frequency=hz, current_frequency=float(f0), predicted_frequency=float(f1))
             for ((m, n), hz), f0, f1 in zip(targets, f_now, predicted)]
    together = all(abs(t.residual_cents) <= TOGETHER_CENTS for t in found)
    if len(found) == 1 and free is None and not together:
        raise SolverError(f"the tension search ended {found[0].residual_cents:+.2f} cents from the target "
                          f"for mode ({m},{n}); the mode may change character near this tension")
    warnings = safety_warnings(suggested.head, tension)
    if free is not None and not 0.5 <= value / current_value <= 2.0:
        # a fit may buy a cent or two with a drum nobody would build: say so
        what = "areal density" if free == "areal_density" else "kettle volume"
        warnings.append(f"the fit changes the {what} by a factor of {value / current_value:.2f} "
                        f"({current_value:.4g} -> {value:.4g} SI): check it is a drum you can build")
    return Tuning(current_tension=t_now, tension=tension, naive_tension=naive, targets=tuple(found),
                  drum=suggested, modes=final, free=free, current_value=current_value, value=value,
                  together=together, warnings=tuple(warnings), solves=model.solves + bool(table))


def _check_free(drum: Drum, free: str, physics: str, count: int) -> None:
    if free not in FREE:
        raise InputError("free", free, f"must be one of: {', '.join(FREE)}")
    if count < 2:
        raise InputError("free", free, "a second free parameter needs at least two targets")
    if free == "volume" and drum.body.kind != "kettle":
        raise InputError("free", free, f"only a kettle has a volume (this drum's body is {drum.body.kind!r})")
    if free == "volume" and physics != "full":
        raise InputError("free", free, "the volume acts through the air in the body: use physics full")
    if free == "areal_density" and physics == "ideal":
        raise InputError("free", free, "with ideal physics the mass scales every mode alike and cannot "
                         "change their ratios: use physics stiff or full")
