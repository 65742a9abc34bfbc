"""``membrane tune`` on a two-headed drum: targets on either head, intervals between heads.

Spelling (our own):

* ``--target resonant:0,1=C3`` puts the resonant head's (0,1) mode on C3; ``struck:`` or no
  prefix means the struck head (or the head named by ``--head``).
* ``--interval resonant:0,1=struck:0,1+3st`` puts the resonant head's (0,1) three semitones
  above the struck head's; ``-50c`` is 50 cents below; ``resonant:0,1=struck:0,1`` is unison.

The library does the work (:mod:`membrane.head_tuning`); this module parses and prints.
"""

from __future__ import annotations

import re
import sys

from .common import Format, decay_words, emit, fail, num, parse_mode, t60
from .options import parse_targets, split_head

INTERVAL_HELP = ("Interval between two modes, usually of the two heads: HEAD:M,N=HEAD:M,N+AMOUNT, the "
                 "left mode AMOUNT above the right one; AMOUNT in semitones ('+3st', '-2 semitones') or "
                 "cents ('+300c'); leave it out for unison. The left head's tension is tuned; repeat for more. "
                 "Example: --interval resonant:0,1=struck:0,1+3st")


def parse_head_targets(texts, mode: str | None, head: str):
    """``--target`` values -> ((head, (m, n)), Hz, text) (:func:`.options.parse_targets`)."""
    return parse_targets(texts, mode, head=head)


_AMOUNT = re.compile(r"^\s*([+-]?\s*\d+(?:\.\d+)?)\s*(st|semitones?|c|cents?)\s*$", re.IGNORECASE)


def parse_interval(text: str, head: str):
    """``"resonant:0,1=struck:0,1+3st"`` -> ((head, (m, n)), (ref_head, (m, n)), cents)."""
    if "=" not in text:
        fail("--interval", text, "expected HEAD:M,N=HEAD:M,N+AMOUNT, e.g. resonant:0,1=struck:0,1+3st")
    left, right = text.split("=", 1)
    who, mode_text = split_head(left.strip(), head, key="--interval")
    found = re.match(r"^\s*([A-Za-z]+:)?\s*\(?\s*\d+\s*,\s*\d+\s*\)?", right)
    if not found:
        fail("--interval", text, "the right side must name a mode, e.g. struck:0,1+3st")
    ref_who, ref_mode = split_head(found.group(0).strip(), head, key="--interval")
    rest = right[found.end():].strip()
    cents = 0.0
    if rest:
        amount = _AMOUNT.match(rest)
        if not amount:
            fail("--interval", text, "the amount must be semitones or cents with a sign, e.g. +3st, -2st, +300c")
        value = float(amount.group(1).replace(" ", ""))
        cents = value * 100.0 if amount.group(2).lower().startswith("s") else value
        from ..ranges import INTERVAL_CENTS

        INTERVAL_CENTS.check(cents, key="--interval", given=text)
    return ((who, parse_mode(mode_text, key="--interval")), (ref_who, parse_mode(ref_mode, key="--interval")),
            cents)


def run(drum, *, targets, intervals, physics: str, other: str, m_max: int, n_max: int, fmt: Format,
        losses: str = "all") -> None:
    """Solve and print a two-headed tuning (targets and intervals on named heads)."""
    from .. import safety
    from ..head_tuning import HeadTarget, Interval, find_mode, head_of, pair_spread, tune_heads

    result = tune_heads(
        drum, physics=physics, other=other, m_max=m_max, n_max=n_max, losses=losses,
        targets=[HeadTarget(h, m, n, hz) for (h, (m, n)), hz, _ in targets],
        intervals=[Interval(h, m, n, rh, rm, rn, c) for (h, (m, n)), (rh, (rm, rn)), c in intervals])
    heads = {}
    warnings = []
    for name in result.current:
        h = head_of(result.drum, name)
        t = result.tension[name]
        s = safety.stress(h, t)
        w = safety.safety_warnings(h, t) if name in result.free else []
        warnings += [f"{name} head: {x}" for x in w]
        heads[name] = {"current_tension_n_per_m": result.current[name], "tension_n_per_m": t,
                       "change_percent": result.change_percent(name), "free": name in result.free,
                       "stress_pa": s, "yield_stress_pa": h.yield_stress,
                       "practical_minimum_n_per_m": safety.practical_minimum(h), "warnings": w}
    notes = []
    if result.modes is not None and result.branches and _distinct(result.drum):
        for t in result.met:
            before = result.branches.get((t.head, t.m, t.n))
            after = find_mode(result.modes, t.head, t.m, t.n).branch
            if before is not None and after != before:
                notes.append(f"the {t.head} head's ({t.m},{t.n}) was followed as the pair's {before} member; at "
                             f"the suggestion the heads' own tunings have crossed, so the other head moves "
                             f"most in it and the table names it the {after} member of the {t.head} head")
    statement = _statement(result)
    first = next((t for t in result.met if t.kind == "target"), None)
    spreads = {}
    if result.modes is not None and result.drum.body.kind == "shell":
        for t in result.met:
            spread = pair_spread(result.modes, t.m, t.n)
            if spread is not None:
                spreads[f"{t.m},{t.n}"] = spread
    payload = {
        "drum": drum.name, "physics": physics, "losses": losses, "other_head": other,
        "tension_n_per_m": result.tension["struck"],
        "current_tension_n_per_m": result.current["struck"],
        "change_percent": result.change_percent("struck"),
        "predicted_hz": first.predicted if first else None,
        "heads": heads,
        "targets": [{"kind": t.kind, "head": t.head, "m": t.m, "n": t.n, "what": t.what,
                     ("target_hz" if t.kind == "target" else "interval_cents"): t.wanted,
                     ("current_hz" if t.kind == "target" else "current_cents"): t.now,
                     ("predicted_hz" if t.kind == "target" else "predicted_cents"): t.predicted,
                     "residual_cents": t.residual_cents} for t in result.met],
        "rms_cents": result.rms_cents, "together": result.together, "statement": statement,
        "pair_spread_cents": spreads,
        "warnings": warnings + notes,
        "cautions": list(safety.CAUTIONS),
        "solves": result.solves,
    }
    if result.modes is not None:
        payload["modes"] = result.modes.table(reference=(result.met[0].m, result.met[0].n))
        payload["notes"] = list(result.modes.notes) + [OTHER_NOTE[other]]
    if fmt is Format.json:
        emit(fmt, payload=payload, rows=[], columns=[])
        return
    if fmt is Format.csv:
        rows = payload["targets"]
        emit(fmt, payload=payload, rows=rows, columns=[(k, k, str) for k in
                                                       ("kind", "head", "m", "n", "what", "residual_cents")])
        for w in payload["warnings"]:
            print(f"caution: {w}", file=sys.stderr)
        return
    rows = [{"head": f"{name} head" + ("" if v["free"] else " (held)"),
             "now": f"{v['current_tension_n_per_m']:.1f} N/m",
             "suggested": f"{v['tension_n_per_m']:.1f} N/m ({v['change_percent']:+.1f} %)",
             "stress": "" if v["stress_pa"] is None else f"{v['stress_pa'] / 1e6:.1f} MPa"}
            for name, v in heads.items()]
    emit(fmt, payload=payload, rows=rows, title=f"{drum.name}: tune both heads with {physics} physics, "
         f"other head {'damped (held still)' if other == 'damped' else 'free (coupled through the air)'}",
         columns=[("head", "head", str), ("now", "tension now", str), ("suggested", "suggested", str),
                  ("stress", "film stress", str)])
    print()
    rows = [{"what": t.what, "now": _value(t.kind, t.now), "predicted": _value(t.kind, t.predicted),
             "residual": t.residual_cents} for t in result.met]
    emit(fmt, payload=payload, rows=rows, title="targets",
         columns=[("what", "target", str), ("now", "now", str), ("predicted", "at suggestion", str),
                  ("residual", "error (cents)", lambda v: f"{round(v, 3) + 0.0:+.3f}")],
         notes=[statement])
    print()
    if result.modes is not None:
        ref = result.met[0]
        mode_rows = [dict(row, mode=mode.label) for row, mode in zip(payload["modes"], result.modes.modes)]
        emit(fmt, payload=payload, rows=mode_rows,
             title=f"modes at the suggestion, ratios to the ({ref.m},{ref.n}) of the {ref.head} head"
             f"{decay_words(physics, losses)}",
             columns=[("mode", "mode", str), ("frequency_hz", "f (Hz)", num(2)), ("decay_s", "T60 (s)", t60),
                      ("ratio", "ratio", num(4)), ("note", "note", str)],
             notes=payload["notes"])
        print()
    for line in [f"caution: {w}" for w in payload["warnings"]] + list(safety.CAUTIONS):
        print(line)


OTHER_NOTE = {
    "free": "both heads free, coupled through the air in the shell: a head's (m,n) is the member of the "
            "in-phase / opposed pair it was in the drum as given, followed as the tensions change",
    "damped": "each head tuned with the other held still (as when one head is tapped with the other "
              "muted), the held head taken as a rigid end; the table above is the drum with both heads free",
}


def _distinct(drum) -> bool:
    return drum.resonant_head is not None and not drum.head.vibrates_like(drum.resonant_head)


def _value(kind: str, v: float) -> str:
    return f"{v:.2f} Hz" if kind == "target" else f"{v:+.1f} cents"


def _statement(result) -> str:
    from ..head_tuning import pair_spread

    if result.together:
        return (f"all {len(result.met)} targets met within 1 cent" if len(result.met) > 1 else "target met")
    worst = max(result.met, key=lambda t: abs(t.residual_cents))
    text = (f"No tensions of the {' and '.join(result.free)} head{'s' if len(result.free) > 1 else ''} meet these "
            f"together: the best leaves {worst.what} {worst.residual_cents:+.1f} cents off.")
    if result.other == "free" and result.modes is not None:
        for t in result.met:
            spread = pair_spread(result.modes, t.m, t.n)
            if t.kind == "interval" and t.m == 0 and spread is not None:
                text += (f" The two heads' ({t.m},{t.n}) modes are one in-phase / opposed pair pushed apart by "
                         f"the air in the shell ({spread:.0f} cents apart here), so the tensions barely move "
                         "the interval between them; to set each head's own pitch as a maker taps it with "
                         "the other muted, add --other-head damped.")
                break
    return text
