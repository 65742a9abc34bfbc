"""Why a single target has no tension: the refusals of the tension search, in words.

Below the slack limit, beyond the film's strength (or the largest tension accepted), or
inside a jump of the labelled mode's frequency where it crosses an air resonance of the body
(docs/mode-identity.md); for a crossing the continuous branch that does not carry the label
is followed to the target if it gets there near the crossing (branches.branch_tension), and
its tension given with a caution. ``model`` is tuning's model of the drum (its frequencies
at a tension, and for one head the solved orders).
"""

from __future__ import annotations

import math

from .drum import Drum
from .errors import InputError
from .safety import TENSION_CEILING, stress

# the other branch of a crossing is offered only within this factor of the crossing's tension
BRANCH_RANGE = 1.5  # our choice: beyond it the branch is usually another partial


def no_root(drum: Drum, mode, hz: float, model, lo: float, hi: float):
    """Raise the error that says why no tension reaches the target."""
    m, n = mode
    f_lo = float(model.frequencies(math.exp(lo))[0])
    if hz < f_lo:
        raise InputError("target", f"{hz:.4g} Hz",
                         f"below the slack limit: at {math.exp(lo):.3g} N/m, where bending stiffness sets "
                         f"the (1,1) frequency as much as tension, mode ({m},{n}) is already at {f_lo:.4g} Hz; "
                         f"choose a higher target")
    f_hi = float(model.frequencies(math.exp(hi))[0])
    why = "the film's tensile strength" if math.exp(hi) < TENSION_CEILING else "the largest tension accepted"
    raise InputError("target", f"{hz:.4g} Hz",
                     f"unreachable: even at {math.exp(hi):.0f} N/m ({why}) mode ({m},{n}) reaches only "
                     f"{f_hi:.4g} Hz; choose a lower target")


def crossing(drum: Drum, mode, hz: float, model, jump, lo: float, hi: float):
    """Raise the refusal for a target inside a jump of the labelled mode's frequency.

    Only full physics has such jumps: where the head mode crosses an air resonance of the
    body, the label (m,n) passes from the lower root to the upper one (docs/mode-identity.md).
    The refusal names the body's air resonance crossed (its rigid-walled value) and the two
    tensions the crossing lies between. If the continuous branch that does not carry the
    label reaches the target near the crossing, that tension is given too, with a caution:
    there the root is partly (or mostly) the body's air. That branch is followed by local
    solves from the search's own solve at the crossing (branches.branch_tension): a few
    seconds, not a re-solve of the drum at every step.
    """
    from . import branches

    m, n = mode
    t1, t2 = math.exp(jump.x_lo), math.exp(jump.x_hi)
    f1, f2 = hz * math.exp(jump.g_lo), hz * math.exp(jump.g_hi)
    kind = drum.body.kind
    where = {"kettle": ("kettle", "the bowl's air resonance"),
             "shell": ("drum", "the shell's air resonance")}.get(kind, ("drum", "an air resonance"))
    dec = max(0, -math.floor(math.log10(max(t2 - t1, 1e-12))))  # enough digits to tell them apart
    words = (f"({m},{n}) cannot sit at {hz:.4g} Hz on this {where[0]}: between {t1:,.{dec}f} and "
             f"{t2:,.{dec}f} N/m it crosses {where[1]}")
    # a crossing the film could not bear in any case: say so, so no one tightens towards it
    s, limit = stress(drum.head, t1), drum.head.yield_stress
    yielded = (f" (past the film's yield: {s / 1e6:.0f} MPa there against its yield stress of "
               f"{limit / 1e6:.0f} MPa; it would stretch permanently)") if s is not None and limit is not None \
        and s > limit else ""
    other = ""
    if model.by_order:
        od_lo, od_hi = model.order_roots(t1)[m], model.order_roots(t2)[m]
        air, f_lo, f_hi, r_lo, r_hi = branches.crossing_note(
            drum, m=m, n=n, n_max=model.n_max, lo=od_lo, hi=od_hi, sound_speed=drum.air.sound_speed)
        words += f" near {air:.0f} Hz{yielded}"
        # the continuous branches repel at the air resonance: the lower one (the label's
        # below the jump) rises towards it with tension, the upper one (the label's above)
        # falls towards it as the tension drops; a target below the air resonance can only be
        # on the first, one above only on the second; near the crossing only (further on, a
        # branch meets other crossings and becomes other partials)
        start, od, r = (t1, od_lo, r_lo) if hz < air else (t2, od_hi, r_hi)
        losses = drum.losses if model.losses == "all" else None
        got = branches.branch_tension(drum, m=m, n_max=model.n_max, start_tension=start,
                                      start_omega=complex(od.omega[r]), start_vector=od.vectors[r],
                                      target_hz=hz, t_min=max(math.exp(lo), t1 / BRANCH_RANGE),
                                      t_max=min(math.exp(hi), t2 * BRANCH_RANGE), losses=losses)
        if got is not None:
            t, frac, _ = got
            other = (f"; the other branch does reach {hz:.4g} Hz, at {t:,.{dec}f} N/m, but there only "
                     f"{100 * frac:.0f} % of its energy is in the head, the rest in the body's air "
                     f"(caution: a partly air-like partial, not the principal ({m},{n}); check it by ear)")
    else:
        words += " (or meets another root of its order)" + yielded
    words += (f"; below that the head-like ({m},{n}) reaches {f1:.4g} Hz, above it it continues on "
              f"the upper branch from {f2:.4g} Hz{other}; choose a target outside "
              f"{f1:.4g}-{f2:.4g} Hz")
    raise InputError("target", f"{hz:.4g} Hz", words)
