"""Tuning a two-headed drum: targets on either head and intervals between the heads.

Each head's tension is a free variable when a target names that head (an interval
frees the head on its left: ``resonant 0,1 = struck 0,1 + 3 semitones`` tunes the
resonant head against the struck head as it is, unless another target frees the
struck head too). All targets are met together in the least-squares sense in cents,
on one of two models of the drum:

* ``other="free"`` (the coupled model): both heads on the shell, coupled through
  the enclosed air. A head's (m, n) is the member of the in-phase / opposed pair
  that head moves most in, in the drum as given; the search follows that member
  (branch) while the tensions change. On a shell the air spring pushes the two
  heads' (0,n) modes far apart (about an octave on a tom), so an interval between
  the heads' (0,1) modes is mostly set by the shell, not by the tensions. A target
  the model cannot reach is reported as such, with the nearest it can get.
* ``other="damped"``: each head's modes with the other head held still, the way a
  maker taps one head with the other muted. The held head is taken as a rigid end
  of the shell (the shell is then a closed cylinder, as a kettle of the shell's
  volume); the heads no longer interact, so each head's targets set its own tension.

Everything here takes and returns SI floats (N/m, Hz) and cents.

One module of a little over 400 lines on purpose: the targets, the two models of the drum, the
Newton-Broyden search over both tensions (``_newton``: several residuals in several unknowns,
unlike the one-tension search of :mod:`membrane.tension_search`) and its report are one
calculation.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np
from scipy import optimize

from .blas import one_blas_thread
from .drum import Body, Drum, Head
from .errors import InputError, SolverError
from .modes import Mode, ModeSet
from .notation import cents as _cents
from .solver import solve

HEADS = ("struck", "resonant")
OTHER = ("free", "damped")
TOGETHER_CENTS = 1.0  # every residual within this: the targets are met together
SEMITONE_CENTS = 100.0


@dataclass(frozen=True)
class HeadTarget:
    """A mode of one head and its target pitch (Hz)."""

    head: str
    m: int
    n: int
    hz: float


@dataclass(frozen=True)
class Interval:
    """Mode ``(m, n)`` of ``head`` to sit ``cents`` above mode ``(ref_m, ref_n)`` of ``ref_head``."""

    head: str
    m: int
    n: int
    ref_head: str
    ref_m: int
    ref_n: int
    cents: float


@dataclass(frozen=True)
class Met:
    """How close one target or interval comes at the suggestion."""

    what: str          # words for people: "resonant head (0,1) = 130.8 Hz"
    kind: str          # "target" or "interval"
    head: str
    m: int
    n: int
    wanted: float      # Hz for a target, cents for an interval
    now: float         # Hz or cents, at the current tensions
    predicted: float   # Hz or cents, at the suggestion
    residual_cents: float


@dataclass(frozen=True)
class HeadsTuning:
    """Suggested tensions for each head, and what they do."""

    current: dict          # head -> N/m now
    tension: dict          # head -> N/m suggested (held heads keep their tension)
    free: tuple            # heads whose tension was free
    met: tuple             # Met per target and interval
    drum: Drum             # the drum at the suggestion
    modes: ModeSet | None  # the coupled mode table at the suggestion
    other: str
    together: bool
    solves: int
    branches: dict = None  # (head, m, n) -> its pair member in the drum as given (coupled shell)

    def __repr__(self) -> str:
        heads = ", ".join(f"{h} {self.current[h]:.1f} -> {self.tension[h]:.1f} N/m" for h in self.tension)
        return f"HeadsTuning({heads}, {len(self.met)} goals, rms {self.rms_cents:.3f} cents, other head {self.other})"

    @property
    def rms_cents(self) -> float:
        """Root-mean-square residual over targets and intervals, cents."""
        return float(np.sqrt(np.mean([t.residual_cents ** 2 for t in self.met])))

    def change_percent(self, head: str) -> float:
        """Tension change of a head in % of its current tension."""
        return 100.0 * (self.tension[head] / self.current[head] - 1.0)


def head_of(drum: Drum, head: str) -> Head:
    """The Head object of ``"struck"`` or ``"resonant"``."""
    if head not in HEADS:
        raise InputError("head", head, "must be struck or resonant")
    if head == "resonant":
        if drum.resonant_head is None:
            raise InputError("head", head, f"this drum has no resonant head (its body is {drum.body.kind!r}); "
                             "only a shell has two heads")
        return drum.resonant_head
    return drum.head


def with_head_tension(drum: Drum, head: str, tension: float) -> Drum:
    """The same drum with one head at another tension (N/m)."""
    if head == "struck":
        return drum.with_tension(tension)
    return replace(drum, resonant_head=replace(head_of(drum, head), tension=float(tension)))


def alone(drum: Drum, head: str) -> Drum:
    """One head of a shell with the other held still: a closed cylinder of the shell's volume."""
    h = head_of(drum, head)
    if drum.body.kind != "shell":
        return drum
    volume = math.pi * h.radius ** 2 * drum.body.depth
    return replace(drum, head=h, resonant_head=None, body=Body(kind="kettle", volume=volume))


def find_mode(modes: ModeSet, head: str, m: int, n: int) -> Mode:
    """The mode (m, n) that belongs to ``head`` in a solved table.

    On a shell with two different heads each root carries the head it grows from.
    With two identical heads every pair member belongs to both heads alike, so a
    head cannot be named: that is an input error saying so.
    """
    drum = modes.drum
    if drum.resonant_head is None:
        if head == "resonant":
            head_of(drum, "resonant")  # the error for a drum without one
        return modes.find(m, n)
    found = [mo for mo in modes.modes if (mo.m, mo.n) == (m, n) and mo.head == head]
    if found:
        return found[0]
    if any((mo.m, mo.n) == (m, n) for mo in modes.modes):
        raise InputError("head", f"{head}:{m},{n}", "the two heads are identical, so both members of the "
                         "(m,n) pair belong to both heads alike; make the heads differ (tension, film) "
                         "or name the mode without a head")
    return modes.find(m, n)  # raises the usual 'not solved' error


class _Model:
    """Frequencies of the named modes as functions of the free heads' tensions (cached)."""

    def __init__(self, drum: Drum, wanted, *, physics: str, other: str, n_max: int, losses: str = "all"):
        self.drum, self.wanted, self.physics, self.other = drum, list(wanted), physics, other
        self.losses = losses
        self.m_max = max(m for _, m, _ in self.wanted)
        self.n_max = max(n_max, max(n for _, _, n in self.wanted))
        self.cache = {}
        self.solves = 0
        self.branch = None  # (head, m, n) -> its pair member (in-phase/opposed) in the drum as given

    def _pick(self, result: ModeSet, head: str, m: int, n: int) -> float:
        """A head's mode, followed along its pair branch from the drum as given.

        On a shell the two heads' (m, n) modes are one in-phase / opposed pair whose
        members never cross. Which head moves most in a member (the head the solver's
        row names) flips where the heads' own tunings cross, and a search on that label
        would meet a jump it cannot cross; the branch does not flip. So a named mode
        keeps the branch it had in the drum as given, and the search follows that
        branch, smooth in the tensions (the output says when the row's head word has
        changed at the suggestion).
        """
        branch = (self.branch or {}).get((head, m, n))
        if branch is None or result.drum.resonant_head is None:
            return find_mode(result, head, m, n).frequency
        return result.find(m, n, branch).frequency

    def variant(self, tensions: dict) -> Drum:
        drum = self.drum
        for head, t in tensions.items():
            drum = with_head_tension(drum, head, t)
        return drum

    def frequencies(self, tensions: dict) -> dict:
        key = tuple(sorted((h, float(t)) for h, t in tensions.items()))
        if key not in self.cache:
            drum = self.variant(tensions)
            out = {}
            if self.other == "damped" and drum.body.kind == "shell":
                for head in {h for h, _, _ in self.wanted}:
                    result = solve(alone(drum, head), self.physics, m_max=self.m_max, n_max=self.n_max,
                                   losses=self.losses)
                    self.solves += 1
                    out.update({(h, m, n): result.find(m, n).frequency
                                for h, m, n in self.wanted if h == head})
            else:
                result = solve(drum, self.physics, m_max=self.m_max, n_max=self.n_max, losses=self.losses)
                self.solves += 1
                out = {(h, m, n): self._pick(result, h, m, n) for h, m, n in self.wanted}
                if self.branch is None and drum.resonant_head is not None and drum.body.kind == "shell":
                    # the pair member each named mode is in the drum as given, for the output
                    self.branch = {(h, m, n): find_mode(result, h, m, n).branch for h, m, n in self.wanted}
            self.cache[key] = out
        return self.cache[key]


@one_blas_thread  # many small matrix products (membrane/blas.py)
def tune_heads(drum: Drum, *, targets: Sequence[HeadTarget] = (), intervals: Sequence[Interval] = (), physics: str = "full", other: str = "free",
               m_max: int = 6, n_max: int = 3, table: bool = True, losses: str = "all") -> HeadsTuning:
    """Tensions of one or both heads that put modes on pitches and intervals between heads.

    Parameters
    ----------
    drum : Drum
        The drum as it is now (its heads' tensions are the current tensions).
    targets : sequence of HeadTarget
        Modes of a head and their target frequencies in Hz.
    intervals : sequence of Interval
        Modes of one head to sit a number of cents above a mode of the other (or the same) head.
    physics : {"ideal", "stiff", "full"}
        Model, as in :func:`membrane.solve`.
    other : {"free", "damped"}
        ``free``: the coupled drum; ``damped``: each head with the other held still.
    m_max, n_max : int
        Orders of the mode table reported at the suggestion.
    table : bool
        Solve the coupled mode table at the suggestion.
    losses : {"all", "radiation"}
        What damps the heads in full physics, as in :func:`membrane.solve`.

    Returns
    -------
    HeadsTuning

    Notes
    -----
    Least squares in cents over the logarithms of the free heads' tensions (scipy's
    trust-region solver, bounded by the films' breaking stress and the slack limit);
    with as many targets as free heads this is a root, met to well under 0.01 cent
    where the model can reach it. Each residual evaluation is one solve of the model.
    """
    from .safety import slack_tension, tension_ceiling

    targets, intervals = list(targets), list(intervals)
    if not targets and not intervals:
        raise InputError("target", None, "give at least one target or interval")
    if other not in OTHER:
        raise InputError("other head", other, "must be free or damped")
    for t in targets:
        if not (math.isfinite(t.hz) and t.hz > 0):
            raise InputError("target", t.hz, "a target must be a positive frequency in Hz")
    named = [(t.head, t.m, t.n) for t in targets] + \
        [k for iv in intervals for k in ((iv.head, iv.m, iv.n), (iv.ref_head, iv.ref_m, iv.ref_n))]
    for head, _, _ in named:
        head_of(drum, head)
    if len({(t.head, t.m, t.n) for t in targets}) < len(targets):
        raise InputError("target", [f"{t.head}:{t.m},{t.n}" for t in targets], "each mode may have one target only")
    for iv in intervals:
        if (iv.head, iv.m, iv.n) == (iv.ref_head, iv.ref_m, iv.ref_n):
            raise InputError("interval", f"{iv.head}:{iv.m},{iv.n}", "an interval needs two different modes")
    free = tuple(h for h in HEADS if h in {t.head for t in targets} | {iv.head for iv in intervals})
    wanted = list(dict.fromkeys(named))
    model = _Model(drum, wanted, physics=physics, other=other, n_max=n_max, losses=losses)
    current = {h: head_of(drum, h).tension for h in HEADS if drum.resonant_head is not None or h == "struck"}
    f_now = model.frequencies({})

    def ratio_guess(head):
        # sqrt(T) scaling of the first target or interval on this head: the first guess only
        for t in targets:
            if t.head == head:
                return (t.hz / f_now[(head, t.m, t.n)]) ** 2
        for iv in intervals:
            if iv.head == head:
                want = f_now[(iv.ref_head, iv.ref_m, iv.ref_n)] * 2 ** (iv.cents / 1200)
                return (want / f_now[(head, iv.m, iv.n)]) ** 2
        return 1.0

    lo = [math.log(max(slack_tension(head_of(drum, h)), 1e-6 * current[h])) for h in free]
    hi = [math.log(tension_ceiling(head_of(drum, h))) for h in free]
    x0 = [min(max(math.log(current[h] * ratio_guess(h)), a + 1e-9), b - 1e-9) for h, a, b in zip(free, lo, hi)]

    def residuals_at(f):
        out = [_cents(f[(t.head, t.m, t.n)], t.hz) for t in targets]
        out += [_cents(f[(iv.head, iv.m, iv.n)], f[(iv.ref_head, iv.ref_m, iv.ref_n)]) - iv.cents
                for iv in intervals]
        return np.array(out)

    def residuals(x):
        return residuals_at(model.frequencies(dict(zip(free, np.exp(x)))))

    if len(targets) + len(intervals) == len(free):
        x = _newton(residuals, np.array(x0), np.array(lo), np.array(hi))
    else:
        fit = optimize.least_squares(residuals, x0, bounds=(lo, hi), x_scale=0.1, diff_step=1e-6,
                                     xtol=1e-12, ftol=1e-12, gtol=1e-12)
        if not np.all(np.isfinite(fit.fun)):
            raise SolverError(f"the tension fit did not converge ({fit.message})")
        x = fit.x
    tension = dict(current)
    tension.update({h: float(math.exp(v)) for h, v in zip(free, x)})
    suggested = model.variant({h: tension[h] for h in free})
    f_fit = model.frequencies({h: tension[h] for h in free})
    final = solve(suggested, physics, m_max=max(m_max, model.m_max), n_max=model.n_max,
                  losses=losses) if table else None
    res_now, res_fit = residuals_at(f_now), residuals_at(f_fit)
    met = []
    for i, t in enumerate(targets):
        met.append(Met(what=f"{t.head} head ({t.m},{t.n}) = {t.hz:.2f} Hz", kind="target", head=t.head,
                       m=t.m, n=t.n, wanted=t.hz, now=f_now[(t.head, t.m, t.n)],
                       predicted=f_fit[(t.head, t.m, t.n)], residual_cents=float(res_fit[i])))
    for j, iv in enumerate(intervals):
        i = len(targets) + j
        met.append(Met(what=f"{iv.head} head ({iv.m},{iv.n}) {interval_words(iv.cents)} "
                            f"{iv.ref_head} head ({iv.ref_m},{iv.ref_n})", kind="interval", head=iv.head,
                       m=iv.m, n=iv.n, wanted=iv.cents, now=float(res_now[i] + iv.cents),
                       predicted=float(res_fit[i] + iv.cents), residual_cents=float(res_fit[i])))
    together = all(abs(t.residual_cents) <= TOGETHER_CENTS for t in met)
    return HeadsTuning(current=current, tension=tension, free=free, met=tuple(met), drum=suggested,
                       modes=final, other=other, together=together, solves=model.solves + bool(table),
                       branches=dict(model.branch or {}))


FD_STEP = 1e-2  # ln T step of the finite-difference Jacobian


def _newton(residuals, x0, lo, hi, *, tol_cents: float = 1e-3, max_iter: int = 30):
    """Root of as many residuals (cents) as unknowns (ln T per free head), within bounds.

    Newton's method with a finite-difference Jacobian, updated by Broyden's rule after
    each accepted step (each residual evaluation is a model solve, so the count matters).
    In ln T a mode moves about 600 cents per unit (f ~ sqrt(T)), nearly linearly, so a
    few steps suffice. A step is limited to a factor e^0.5 in tension, kept inside the
    bounds, and halved until it reduces the largest residual; a label passing to the
    other member of a pair makes a jump no step can cross, and when no step helps even
    with a fresh Jacobian the best point found is returned (the caller reports how far
    off it is).
    """
    def jacobian(x, r):
        # a step of 1 % in tension moves a mode by a few cents, far above the solver's own
        # convergence (about 1e-5 relative, 0.02 cent), so the slopes are not noise
        jac = np.empty((r.size, x.size))
        for j in range(x.size):
            dx = np.zeros_like(x)
            dx[j] = FD_STEP if x[j] + FD_STEP <= hi[j] else -FD_STEP
            jac[:, j] = (residuals(x + dx) - r) / dx[j]
        return jac

    x = np.clip(x0, lo, hi)
    r = residuals(x)
    jac, fresh = jacobian(x, r), True
    for _ in range(max_iter):
        size = float(np.max(np.abs(r)))
        if size < tol_cents:
            break
        try:
            step = np.linalg.solve(jac, -r)
        except np.linalg.LinAlgError:
            step = np.linalg.lstsq(jac, -r, rcond=None)[0]
        step = step * min(1.0, 0.5 / max(float(np.max(np.abs(step))), 1e-300))
        accepted = False
        for _halving in range(4):
            x_new = np.clip(x + step, lo, hi)
            dx = x_new - x
            if not np.any(dx):
                break  # pinned at a bound, pushing outward
            r_new = residuals(x_new)
            if float(np.max(np.abs(r_new))) < size:
                jac += np.outer((r_new - r) - jac @ dx, dx) / float(dx @ dx)
                x, r, accepted, fresh = x_new, r_new, True, False
                break
            step = 0.5 * step
        if not accepted:
            if fresh:
                break  # no step helps even with a fresh Jacobian: unreachable from here
            jac, fresh = jacobian(x, r), True
    return x


def interval_words(cents: float) -> str:
    """``+300`` -> "3 semitones above"; ``0`` -> "in unison with"; ``-50`` -> "50 cents below"."""
    if abs(cents) < 1e-9:
        return "in unison with"
    size = abs(cents)
    semis = size / SEMITONE_CENTS
    amount = f"{semis:g} semitone{'s' if semis != 1 else ''}" if abs(semis - round(semis)) < 1e-9 \
        else f"{size:g} cents"
    return f"{amount} {'above' if cents > 0 else 'below'}"


def pair_spread(modes: ModeSet, m: int, n: int) -> float | None:
    """Cents between the in-phase and opposed members of a shell's (m, n) pair, or None."""
    pair = {mo.branch: mo.frequency for mo in modes.modes if (mo.m, mo.n) == (m, n) and mo.branch}
    if {"in-phase", "opposed"} <= pair.keys():
        return _cents(pair["in-phase"], pair["opposed"])
    return None
