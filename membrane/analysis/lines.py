"""From the damped exponentials of a band to its physical lines: one partial per line.

A band's fit by damped exponentials is exact for partials that decay exponentially at one
frequency. A real line often does not: its envelope rises for a while after the strike
(energy still flowing in from other modes and the air), or its frequency glides down as
the head settles. The fit then spends several components on that one line, close
together in frequency and partly cancelling one another; read one by one, they give a
comb of partials with inflated levels and wrong decay times.

Two lines of a band (at first, each component is one) are taken as one line when they are
not resolved by their envelopes: they beat fewer than once while the longer-lived of the two
rings, ``|f_a - f_b| * max(T60_a, T60_b) < 1`` (:data:`MIN_BEATS`), both ringing at least
:data:`.esprit.FAST_T60_S` (a faster component is flagged ``fast`` and left as it is: its
frequency and decay are uncertain already). Two halves of a split mode that beat within
their ring stay two partials. Only components of one band (fitted together) are grouped. A
line is reported with

- its *level and decay time from the line's own envelope*: the envelope is the magnitude of
  the sum of its components over the analysed decay, and the reported exponential
  ``A exp(-r t)`` is the one with the same energy and the same energy centroid in time
  over that stretch (the decay's first two time moments). For a single exponential this
  is the exponential itself; for a line that rises and falls, or for an unresolved pair,
  it is the exponential that puts the same energy into a long-window spectrum, which is
  what such a spectrum measures;
- its *frequency*: the energy-weighted mean of the line's instantaneous frequency over the
  decay (:func:`mean_frequency`), or, for a line that falls by at least
  :data:`.glide.GLIDE_MIN_CENTS` from its first :data:`INITIAL_S` to its stretch after
  :data:`SETTLED_FROM_S`, that glide (initial and settled frequencies).

A glide's comb is joined into one line across bands (:func:`glide_chains`): from a
long-ringing line up through the next lines above, each dying faster than the one below
and within its own line width of it (the early part of a falling partial is higher and
dies first), when the joined line falls by at least :data:`.glide.GLIDE_MIN_CENTS`. Lines
the short-time spectrum's ridge shows gliding (:mod:`.glide`) are merged the same way,
over the comb that follows the ridge.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.optimize

from . import esprit
from ..notation import cents
from .glide import GLIDE_MIN_CENTS, WOBBLE_FACTOR, Frames, Track, frames, track
from .partial import LN1000, RISE_DB, Partial

MIN_BEATS = 1.0  # lines beating fewer times than this while they ring are one line
FEW_BEATS = LN1000 / math.pi  # within a line's width r / pi: fewer beats than this as it rings
INITIAL_S = 0.1  # a line's initial frequency: over this long from the reference time [s]
#                  (what a 0.1 s window there would show)
SETTLED_FROM_S = 0.3  # its settled frequency: from this time on [s] (a struck head's glide
#                       is mostly over by a few tenths of a second; common practice, no source)
GLIDE_TRACK_DB = -30.0  # lines this strong (re the strongest) are tracked for glide
GLIDE_MIN_T60_S = 0.2  # and ring at least this long


def group(comps: list[esprit.Component], *, duration: float) -> list[list[esprit.Component]]:
    """Components of one band grouped into lines (see the module's docstring).

    Lines are merged two at a time, the pair that beats least first, each line taken with
    the frequency and decay of its own envelope (:func:`mean_frequency`,
    :func:`envelope_fit`), until no two lines meet the rule.

    Parameters
    ----------
    comps : list of Component
        The band's components.
    duration : float
        The analysed decay [s].
    """
    lines = [[c] for c in sorted(comps, key=lambda c: c.frequency)]

    def summary(line):
        r = envelope_fit(line, duration=duration)[1]
        # its own ring, not capped by the recording: a model of exponentials resolves two
        # clean lines that beat within their ring from a shorter stretch of it
        ring = LN1000 / r if r > 0 else math.inf
        return mean_frequency(line, 0.0, duration), ring

    info = [summary(line) for line in lines]
    while len(lines) > 1:
        best = None
        for i in range(len(lines)):
            for j in range(i + 1, len(lines)):
                (fi, ti), (fj, tj) = info[i], info[j]
                beats = abs(fi - fj) * max(ti, tj)
                if beats < MIN_BEATS and min(ti, tj) >= esprit.FAST_T60_S:
                    if best is None or beats < best[0]:
                        best = (beats, i, j)
        if best is None:
            break
        _, i, j = best
        lines[i] = lines[i] + lines.pop(j)
        info.pop(j)
        info[i] = summary(lines[i])
    return lines


def glide_chains(lines: list[list[esprit.Component]], *, shift: float, duration: float,
                 y: np.ndarray | None = None,
                 rate: float | None = None) -> list[list[esprit.Component]]:
    """Join the comb along each glide, over the lines of every band: from a line (the
    longest-ringing first), the lines above it one by one (none skipped: a glide's comb is
    contiguous), each dying faster than the one below and within its own line width of it (``gap * T60 < 3 ln 10 / pi``: fewer than 2.2 beats
    while it rings), as long as together they fall by a glide's worth (:func:`glide_of`).
    A glide may cross from one band into the next; the model of the line is the sum of
    its components whichever band fitted them.

    With the decay ``y`` (sample rate ``rate`` [Hz]) a chain is also held against the
    short-time spectrum's ridge (:func:`ridge_refutes`): a chain the ridge shows steady is
    left as its lines. Decay times alone do not tell a glide's comb from a steady line
    joined to fast components beside it: on the real timpani the comb's top line rings 4 to
    13 times shorter than its settled line, on the strike preview's false glide 7.5 times.
    """
    rates = [envelope_fit(line, duration=duration)[1] for line in lines]
    rings = [LN1000 / r if r > 0 else math.inf for r in rates]
    lo = [min(c.frequency for c in line) for line in lines]
    hi = [max(c.frequency for c in line) for line in lines]
    free = set(range(len(lines)))
    out = []
    shared = None
    for a in sorted(range(len(lines)), key=lambda k: -rings[k]):
        if a not in free:
            continue
        chain, top = [a], a
        while True:
            # the next line up, none skipped: a glide's comb is contiguous
            above = [k for k in free if k not in chain and lo[k] > hi[top]]
            if not above:
                break
            k = min(above, key=lambda k: lo[k])
            if not (esprit.FAST_T60_S <= rings[k] < rings[top]
                    and (lo[k] - hi[top]) * rings[k] < FEW_BEATS):
                break
            top = k
            chain.append(top)
        comps = [c for k in chain for c in lines[k]]
        if len(chain) < 2:
            continue
        glide = glide_of(comps, shift=shift, duration=duration)
        if glide is None:
            continue
        if y is not None and rate is not None:
            if shared is None:
                f_top = max(c.frequency for line in lines for c in line)
                shared = frames(y, rate=rate, t_from=max(shift, 0.0), f_max=1.6 * f_top + 10.0)
            if ridge_refutes(comps, glide, y=y, rate=rate, shift=shift, duration=duration,
                             shared=shared):
                continue
        free.difference_update(chain)
        out.append(comps)
    return out + [lines[k] for k in sorted(free)]


def ridge_refutes(comps: list[esprit.Component], glide: tuple[float, float, float], *,
                  y: np.ndarray, rate: float, shift: float, duration: float,
                  shared: Frames | None) -> bool:
    """Whether the short-time spectrum's ridge shows the line steady where the band model's
    chain ``comps`` (its ``glide``: initial Hz, settled Hz, cents) has it fall.

    The ridge (:func:`.glide.track`) is followed from the chain's settled frequency, anchored
    where the line has fallen 15 dB (as :func:`merge_glides` does). It refutes the glide when
    it is the same line (settled within its tolerance ``WOBBLE_FACTOR * wobble + 0.5`` Hz of
    the chain's), flat (its first frame within that tolerance of its settled frequency), and
    clean enough to have shown the fall (the chain falls by more than twice the tolerance).
    A ridge that is lost, wobbles (beating) or rises (a neighbour taking over) refutes
    nothing. Components fitted beside a steady line (a band mask's skirt, or a fast line
    near it) make such a chain: the sum of steady exponentials has no ridge that falls.
    """
    initial, settled, _ = glide
    p = line_partial(comps, shift=shift, duration=duration)
    if p.t60 is None:
        return False
    anchor = min(15.0 / 60.0 * p.t60, 0.6 * y.size / rate)
    tr = track(y, frequency=settled, rate=rate, t_from=max(shift, 0.0), anchor_s=anchor,
               shared=shared)
    if tr is None:
        return False
    tol = WOBBLE_FACTOR * tr.wobble + 0.5
    return (abs(tr.settled - settled) <= tol and abs(tr.initial - tr.settled) <= tol
            and initial - settled > 2.0 * tol)


def glide_of(comps: list[esprit.Component], *, shift: float,
             duration: float) -> tuple[float, float, float] | None:
    """(initial Hz, settled Hz, cents) of a line that falls by :data:`.glide.GLIDE_MIN_CENTS`
    or more from its first :data:`INITIAL_S` after the reference time (``shift`` [s] after
    the start of the decay) to its stretch from :data:`SETTLED_FROM_S` on; else None."""
    if len(comps) < 2:
        return None
    t0 = min(max(shift, 0.0), 0.5 * duration)
    initial = mean_frequency(comps, t0, min(duration, t0 + INITIAL_S))
    settled = mean_frequency(comps, min(SETTLED_FROM_S, 0.5 * duration), duration)
    fall = float(cents(settled, initial))
    return (initial, settled, fall) if fall <= -GLIDE_MIN_CENTS else None


def _pair_integrals(sig: np.ndarray, t1: float, t2: float) -> tuple[np.ndarray, np.ndarray]:
    """Integrals of exp(sig t) and t exp(sig t) over [t1, t2], element by element."""
    with np.errstate(all="ignore"):
        small = np.abs(sig) * max(abs(t1), abs(t2)) < 1e-7
        safe = np.where(small, 1.0, sig)
        e1, e2 = np.exp(sig * t1), np.exp(sig * t2)
        i0 = np.where(small, t2 - t1, (e2 - e1) / safe)
        i1 = np.where(small, 0.5 * (t2 * t2 - t1 * t1),
                      (e2 * (safe * t2 - 1.0) - e1 * (safe * t1 - 1.0)) / safe ** 2)
    return i0, i1


def _poles(comps):
    s = np.array([-c.decay_rate + 2j * math.pi * c.frequency for c in comps])
    a = np.array([c.amplitude * np.exp(1j * c.phase) for c in comps])
    return s, a


def mean_frequency(comps: list[esprit.Component], t1: float, t2: float) -> float:
    """The line's energy-weighted instantaneous frequency over [t1, t2] [Hz].

    For ``z = sum a_k exp(s_k t)`` it is ``Im(int conj(z) z' dt) / (2 pi int |z|^2 dt)``, the
    mean of the phase's rate of change weighted by the envelope squared (closed-form).
    """
    if len(comps) == 1:
        return comps[0].frequency
    s, a = _poles(comps)
    sig = np.conj(s)[:, None] + s[None, :]
    i0, _ = _pair_integrals(sig, t1, t2)
    w = np.conj(a)[:, None] * a[None, :] * i0
    power = float(np.real(np.sum(w)))
    if not power > 0:
        return float(np.mean([c.frequency for c in comps]))
    return float(np.imag(np.sum(w * s[None, :])) / (2 * math.pi * power))


def envelope_fit(comps: list[esprit.Component], *, duration: float) -> tuple[float, float]:
    """The exponential ``A exp(-r t)`` with the energy and energy centroid of the line.

    The line is ``sum_k a_k exp(s_k t)`` (complex amplitudes ``a_k`` of the real partial,
    ``s_k = -r_k + i 2 pi f_k``) over ``0 <= t <= duration``; its energy and first time
    moment are closed-form sums over pairs of components.

    Returns
    -------
    amplitude : float
        ``A``, at the start of the decay (full scale = 1).
    rate : float
        ``r`` [1/s]; 0 when the line's energy does not lean towards the start (it rises
        as much as it falls).
    """
    if len(comps) == 1:
        return comps[0].amplitude, comps[0].decay_rate
    s, a = _poles(comps)
    T = duration
    i0, i1 = _pair_integrals(s[:, None] + np.conj(s)[None, :], 0.0, T)
    w = a[:, None] * np.conj(a)[None, :]
    e0 = float(np.real(np.sum(w * i0)))
    e1 = float(np.real(np.sum(w * i1)))
    if not e0 > 0:
        return 0.0, 0.0
    centroid = e1 / e0

    def mean_time(r):  # centroid of exp(-2 r t) over [0, T]
        x = 2.0 * r * T
        if x < 1e-8:
            return T / 2
        return 1.0 / (2.0 * r) - (T / math.expm1(x) if x < 700.0 else 0.0)

    if centroid >= 0.5 * T * (1 - 1e-9):
        return math.sqrt(e0 / T), 0.0
    # no line dies faster than the fastest component the bands resolve
    centroid = max(centroid, 0.5 / esprit.FASTEST_RATE)
    hi = 1.0
    while mean_time(hi) > centroid:
        hi *= 4.0
    r = scipy.optimize.brentq(lambda v: mean_time(v) - centroid, 0.0, hi, xtol=1e-9, rtol=1e-10)
    return math.sqrt(e0 / _ring(r, T)), float(r)


def line_partial(comps: list[esprit.Component], *, shift: float, duration: float) -> Partial:
    """One partial for a line: its envelope's exponential carried ``shift`` [s] on from the
    start of the decay to the reference time.

    A line of several components also has its frequency from the model of the line: the
    energy-weighted frequency over the decay, or, when the line falls by at least
    :data:`.glide.GLIDE_MIN_CENTS` from its first :data:`INITIAL_S` after the reference
    time to its stretch from :data:`SETTLED_FROM_S` on, a glide between the two.
    """
    amplitude, rate = envelope_fit(comps, duration=duration)
    flags = []
    at_least = None
    if rate <= 0:
        flags.append("steady")
        # it did not fall within the stretch analysed from the reference time on
        at_least = duration - max(shift, 0.0)
    elif LN1000 / rate < esprit.FAST_T60_S:
        flags.append("fast")
    if rise_db(comps, shift=shift, duration=duration) >= RISE_DB:
        flags.append("rising")
    amplitude *= math.exp(-rate * shift)
    if len(comps) == 1:
        return Partial(frequency=comps[0].frequency, amplitude=amplitude, decay_rate=rate,
                       flags=tuple(flags), t60_at_least=at_least)
    glide = glide_of(comps, shift=shift, duration=duration)
    if glide is not None:
        initial, settled, fall = glide
        return Partial(frequency=initial, amplitude=amplitude, decay_rate=rate,
                       glide_cents=fall, settled_frequency=settled,
                       flags=("glide",) + tuple(flags), t60_at_least=at_least)
    members = tuple(line_partial([c], shift=shift, duration=duration) for c in comps)
    return Partial(frequency=mean_frequency(comps, 0.0, duration), amplitude=amplitude,
                   decay_rate=rate, flags=tuple(flags), members=members,
                   t60_at_least=at_least)


RISE_FROM_S = 0.05  # a rise counts from this long after the reference time [s] (a beat of
#                     two lines a few hertz apart, or energy still flowing in; not the
#                     band filter's start-up, which is over by then)


def rise_db(comps: list[esprit.Component], *, shift: float, duration: float,
            points: int = 256) -> float:
    """How far the line's envelope ``|sum_k a_k exp(s_k t)|`` climbs above its value at the
    reference time (``shift`` [s] after the start of the decay), at its highest from
    :data:`RISE_FROM_S` later to the end of the decay [dB]; 0 when it never climbs."""
    t0 = max(shift, 0.0)
    if t0 + RISE_FROM_S >= duration:
        return 0.0
    s, a = _poles(comps)
    t = np.concatenate(([t0], np.linspace(t0 + RISE_FROM_S, duration, points)))
    env = np.abs(np.exp(np.outer(t, s)) @ a)
    if not env[0] > 0:
        return 0.0
    return max(0.0, float(20.0 * np.log10(np.max(env[1:]) / env[0])))


def _ring(r: float, duration: float) -> float:
    """Integral of exp(-2 r t) over the decay [s]."""
    x = 2.0 * r * duration
    return duration if abs(x) < 1e-8 else -math.expm1(-x) / (2.0 * r)


def merge_glides(lines: list[list[esprit.Component]], *, y: np.ndarray, rate: float,
                 shift: float, duration: float) -> list[Partial]:
    """A partial per line, the lines along each gliding partial merged into that one partial.

    Each strong, ringing line (within :data:`GLIDE_TRACK_DB` of the strongest, T60 above
    :data:`GLIDE_MIN_T60_S`), strongest first, has its frequency tracked over the decay
    (:func:`.glide.track`); when it glides, every line between its settled frequency and
    its initial one is part of it.
    """
    parts = [line_partial(c, shift=shift, duration=duration) for c in lines]
    if not parts:
        return []
    top = max(p.amplitude for p in parts)
    order = sorted(range(len(parts)), key=lambda i: -parts[i].amplitude)
    tracked = [i for i in order if parts[i].amplitude >= top * 10 ** (GLIDE_TRACK_DB / 20)
               and parts[i].t60 is not None and parts[i].t60 >= GLIDE_MIN_T60_S]
    if not tracked:
        return parts
    t_ref = max(shift, 0.0)
    used: set[int] = set()
    out: list[Partial] = []
    ranges: list[tuple[float, float]] = []
    shared = frames(y, rate=rate, t_from=t_ref,
                    f_max=1.6 * max(parts[i].frequency for i in tracked) + 10.0)
    for i in tracked:
        if i in used:
            continue
        p = parts[i]
        # anchor where the partial has fallen 15 dB: late enough to have settled
        anchor = min(15.0 / 60.0 * p.t60, 0.6 * y.size / rate)
        tr = track(y, frequency=p.settled, rate=rate, t_from=t_ref, anchor_s=anchor,
                   shared=shared)
        if tr is None or not tr.is_glide or any(lo_ <= tr.settled <= hi_ for lo_, hi_ in ranges):
            continue
        lo = tr.settled - max(1.5, 3.0 * tr.wobble)
        hi = float(np.max(tr.frequencies[:2])) + max(1.5, 0.02 * tr.initial)
        members = [j for j in range(len(parts)) if j not in used and
                   lo <= parts[j].settled and parts[j].frequency <= hi]
        if not members:
            continue
        used.update(members)
        ranges.append((lo, hi))
        comps = [c for j in members for c in lines[j]]
        out.append(_glide_partial(comps, tr, shift=shift, duration=duration))
    out += [p for j, p in enumerate(parts) if j not in used]
    return out


def _glide_partial(comps, tr: Track, *, shift: float, duration: float) -> Partial:
    """One partial from the comb that fits a glide: the comb's envelope, the track's
    initial and settled frequencies."""
    p = line_partial(comps, shift=shift, duration=duration)
    return Partial(frequency=tr.initial, amplitude=p.amplitude, decay_rate=p.decay_rate,
                   glide_cents=tr.cents, settled_frequency=tr.settled,
                   flags=("glide",) + tuple(f for f in p.flags if f != "glide"),
                   t60_at_least=p.t60_at_least)
