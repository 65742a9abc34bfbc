"""``membrane tune``: the tension that lands chosen modes on target pitches, and lug by lug."""

from __future__ import annotations

import sys
from enum import Enum
from typing import Annotated, List, Optional

import typer

from ..errors import InputError
from ..notation import mode_label
from ..units import note_name, parse_pitch
from .tune_heads import INTERVAL_HELP
from .options import FormatOpt, PhysicsOpt, parse_targets
from .common import (DrumFile, Format, LossChoice, LossesOpt, Physics, check_float, decay_words, drum_from,
                     emit, fail, num, parse_mode, t60, with_drum_flags)

SLACK_SHOWN = 10.0  # the slack limit is shown when the suggestion is within this factor of it
TARGET_HELP = ("Target pitch: Hz ('87.3', '87.3 Hz'), a note ('F2', 'F#2', 'Bb2') or either with cents "
               "('F2+15c', 'D3 -8 cents'). With --mode give one bare PITCH; for several modes give "
               "M,N=PITCH and repeat: --target 1,1=F2 --target 2,1=C3. On a two-headed drum name the "
               "head: --target struck:1,1=A2 --target resonant:0,1=C3.")


class Head(str, Enum):
    """Which head of a two-headed drum."""

    struck = "struck"
    resonant = "resonant"


class OtherHead(str, Enum):
    """How the other head is treated when tuning one head of a shell."""

    free = "free"
    damped = "damped"


class Free(str, Enum):
    """A second parameter the several-target fit may change."""

    areal_density = "areal-density"
    volume = "volume"


def _cli_name(free: str) -> str:
    """The library's name of a free parameter as the command line spells it (areal-density)."""
    return free.replace("_", "-")


def parse_lug_pitches(texts: list[str]) -> tuple[float, ...]:
    """``--lug-pitches`` (comma-separated, or repeated) -> Hz, each positive."""
    items = [item.strip() for text in texts for item in text.split(",") if item.strip()]
    hz = []
    for item in items:
        if item.startswith("-"):
            fail("--lug-pitches", item, "tap pitches must be positive frequencies or notes, e.g. D3,D3+6c,147")
        hz.append(parse_pitch(item, key="--lug-pitches"))
    if len(hz) < 3:
        fail("--lug-pitches", ",".join(items), "give the tap pitch at each of at least 3 lugs")
    return tuple(hz)


def _note(hz: float) -> str:
    note, off = note_name(hz)
    return f"{note}{round(off) + 0:+d}c"


def _hz_note(hz: float) -> str:
    return f"{hz:.2f} ({_note(hz)})"


def _signed(digits: int):
    """Like common.signed, but a value that rounds to zero prints as +0 (no '-0.000')."""
    return lambda v: f"{round(v, digits) + 0.0:+.{digits}f}"


@with_drum_flags
def tune(
    drum_file: DrumFile = None,
    target: Annotated[Optional[List[str]], typer.Option(help=TARGET_HELP, metavar="[M,N=]PITCH")] = None,
    mode: Annotated[Optional[str], typer.Option(
        help="The mode a bare --target PITCH is for, M,N (m nodal diameters, n nodal circles).")] = None,
    free: Annotated[Optional[Free], typer.Option(
        help="With several targets, also fit the head's areal density or the kettle's volume.")] = None,
    lug_pitches: Annotated[Optional[List[str]], typer.Option(
        help="Tap pitch near each lug in order round the rim, comma-separated or repeated "
             "(e.g. D3,D3+6c,D3-4c); default the drum file's lugs table. Rule of thumb: tap pitch "
             "taken as proportional to sqrt(local tension).")] = None,
    cents_per_turn: Annotated[Optional[float], typer.Option(
        help="Calibration: pitch change in cents for one full turn of a lug; gives turns in 1/8.")] = None,
    head: Annotated[Head, typer.Option(
        help="Which head a target without a HEAD: prefix is for (a shell has a struck and a resonant head).")
    ] = Head.struck,
    interval: Annotated[Optional[List[str]], typer.Option(
        help=INTERVAL_HELP, metavar="HEAD:M,N=HEAD:M,N+AMOUNT")] = None,
    other_head: Annotated[OtherHead, typer.Option(
        help="With two heads: free (both heads coupled through the shell's air) or damped (each head "
             "with the other held still, as when a maker taps one head with the other muted).")
    ] = OtherHead.free,
    drum_flags: dict = None,
    physics: PhysicsOpt = Physics.full,
    losses: LossesOpt = LossChoice.all,
    m_max: Annotated[int, typer.Option(help="Highest number of nodal diameters in the new mode table (0-50).")] = 6,
    n_max: Annotated[int, typer.Option(help="Highest number of nodal circles in the new mode table (1-50).")] = 3,
    format: FormatOpt = Format.table,
) -> None:
    """Find the head tension that puts chosen modes on target pitches, and each lug's change.

    One target, met by root-finding on the model: --mode 1,1 --target F2

    Several, met in the least-squares sense in cents: --target 1,1=F2 --target 2,1=C3

    The suggestion is checked against the film's yield stress and the slack limit.
    """
    from .. import ranges, tuning

    check_float("--cents-per-turn", cents_per_turn, ranges.CENTS_PER_TURN)
    drum = drum_from(drum_file, **drum_flags)
    named = any(":" in t for t in target or []) or head is not Head.struck
    if interval or named or other_head is not OtherHead.free:
        from . import tune_heads

        if lug_pitches or free is not None:
            fail("--interval" if interval else "--head", (interval or [head.value])[0],
                 "targets on named heads and intervals go without --free and --lug-pitches")
        heads_targets = tune_heads.parse_head_targets(target or [], mode, head.value)
        intervals = [tune_heads.parse_interval(text, head.value) for text in interval or []]
        if not heads_targets and not intervals:
            fail("--target", None, "give a target (--target HEAD:M,N=PITCH) or an interval (--interval)")
        tune_heads.run(drum, targets=heads_targets, intervals=intervals, physics=physics.value,
                       other=other_head.value, m_max=m_max, n_max=n_max, fmt=format, losses=losses.value)
        return
    targets = parse_targets(target or [], mode)
    if mode is not None and not targets:
        fail("--mode", mode, "needs a --target PITCH")
    pitches = parse_lug_pitches(lug_pitches) if lug_pitches else (drum.lugs.pitches if drum.lugs else None)
    per_turn = cents_per_turn if cents_per_turn is not None else (drum.lugs.cents_per_turn if drum.lugs else None)
    if not targets and pitches is None:
        fail("--target", None, "give a target (--mode M,N --target PITCH, or --target M,N=PITCH) "
             "and/or lug tap pitches (--lug-pitches)")
    if free is not None and len(targets) < 2:
        fail("--free", free.value, "a second free parameter needs at least two --target M,N=PITCH")

    payload = {"drum": drum.name, "physics": physics.value, "losses": losses.value,
               "current_tension_n_per_m": drum.head.tension,
               "tension_n_per_m": drum.head.tension, "change_percent": 0.0, "predicted_hz": None,
               "warnings": [], "cautions": list(tuning.CAUTIONS)}
    result = None
    if targets:
        try:
            result = tuning.tension_for(drum, targets=[(mn, hz) for mn, hz, _ in targets],
                                        physics=physics.value, free=free.value.replace("-", "_") if free else None,
                                        m_max=m_max, n_max=n_max, losses=losses.value)
        except InputError as exc:
            if exc.key == "target" and len(targets) == 1:
                raise InputError("--target", targets[0][2], exc.allowed) from None
            raise
        payload.update(_result_payload(result))
    ratio = result.tension / result.current_tension if result else 1.0
    if pitches is not None:
        lug_target, lugs = tuning.equalise_lugs(pitches, tension_ratio=ratio, cents_per_turn=per_turn,
                                                key="--lug-pitches" if lug_pitches else "lugs.pitches")
        payload["lugs"] = {"rule": tuning.LUG_RULE, "target_tap_hz": lug_target, "cents_per_turn": per_turn,
                           "turn_step": tuning.TURN_STEP if per_turn else None,
                           "lugs": [vars(lug) for lug in lugs]}
    if format is Format.json:
        emit(format, payload=payload, rows=[], columns=[])
    elif format is Format.csv:
        _print_csv(payload)
    else:
        _print_human(format, drum, payload, result)


def _print_csv(payload: dict) -> None:
    """One machine-readable table (targets, else lugs); cautions go to stderr."""
    if "targets" in payload:
        keys = ("tension_n_per_m", "current_tension_n_per_m", "change_percent", "stress_pa")
        rows = [dict(t, **{k: payload[k] for k in keys}) for t in payload["targets"]]
        columns = [(k, k, str) for k in ("m", "n", "target_hz", "current_hz", "predicted_hz",
                                         "residual_cents") + keys]
    else:
        rows = payload["lugs"]["lugs"]
        columns = [(k, k, str) for k in rows[0]]
    emit(Format.csv, payload=payload, rows=rows, columns=columns)
    for w in payload["warnings"]:
        print(f"caution: {w}", file=sys.stderr)


def _result_payload(result: tuning.Tuning) -> dict:
    from .. import tuning

    first = result.targets[0]
    head = result.drum.head
    s = result.stress
    ref = (first.m, first.n)
    data = {
        "tension_n_per_m": result.tension,
        "change_percent": result.change_percent,
        "predicted_hz": first.predicted_frequency,
        "target_hz": first.target_frequency,
        "error_cents": first.residual_cents,
        "mode": {"m": first.m, "n": first.n},
        "naive_tension_n_per_m": result.naive_tension,
        "targets": [{"m": t.m, "n": t.n, "target_hz": t.target_frequency, "current_hz": t.current_frequency,
                     "predicted_hz": t.predicted_frequency, "residual_cents": t.residual_cents}
                    for t in result.targets],
        "rms_cents": result.rms_cents,
        "together": result.together,
        "statement": _statement(result),
        "free": None if result.free is None else
        {"parameter": _cli_name(result.free), "unit": "kg/m^2" if result.free == "areal_density" else "m^3",
         "current": result.current_value, "value": result.value},
        "stress_pa": s,
        "yield_stress_pa": head.yield_stress,
        "stress_fraction_of_yield": None if s is None or head.yield_stress is None else s / head.yield_stress,
        "safe_stress_fraction": tuning.SAFE_STRESS_FRACTION,
        "slack_tension_n_per_m": tuning.slack_tension(head),
        "practical_minimum_n_per_m": tuning.practical_minimum(head),
        "reference": {"m": ref[0], "n": ref[1]},
        "modes": result.modes.table(reference=ref),
        "warnings": list(result.warnings),
        "notes": list(result.modes.notes),
        "solves": result.solves,
    }
    return data


def _statement(result: tuning.Tuning) -> str:
    from .. import tuning

    if result.together:
        met = (f"all {len(result.targets)} targets met within {tuning.TOGETHER_CENTS:g} cent"
               if len(result.targets) > 1 else "target met")
        t_min = tuning.practical_minimum(result.drum.head)
        if t_min is not None and result.tension < t_min:
            return (f"{met} in the model, but not on a real head: {result.tension:.3g} N/m is below the "
                    f"practical minimum of about {t_min:.0f} N/m, where the head wrinkles and does not hold "
                    "a pitch; choose a higher target (or a thinner, lighter head)")
        return met
    worst = max(result.targets, key=lambda t: abs(t.residual_cents))
    hint = "" if result.free else " To change the modes' ratios, free the head's mass (--free areal-density) " \
        "or, for a kettle, its volume (--free volume)."
    return (f"No {'tension and ' + _cli_name(result.free) if result.free else 'single tension'} puts these targets "
            f"on pitch together: the best compromise (least squares in cents) leaves ({worst.m},{worst.n}) "
            f"{worst.residual_cents:+.1f} cents off, rms {result.rms_cents:.1f} cents.{hint}")


def _print_human(fmt: Format, drum, payload: dict, result) -> None:
    from .. import tuning

    def gap():
        print()

    if result is not None:
        head_rows = [
            {"what": "current tension", "value": f"{payload['current_tension_n_per_m']:.1f} N/m"},
            {"what": "suggested tension", "value": f"{payload['tension_n_per_m']:.1f} N/m "
                                                   f"({payload['change_percent']:+.1f} %)"},
            {"what": "sqrt(T) scaling would say", "value": f"{payload['naive_tension_n_per_m']:.1f} N/m"},
        ]
        if result.free:
            unit = payload["free"]["unit"]
            head_rows.append({"what": f"{_cli_name(result.free)}", "value": f"{result.current_value:.4g} -> "
                                                                 f"{result.value:.4g} {unit}"})
        if payload["stress_pa"] is not None:
            frac = payload["stress_fraction_of_yield"]
            head_rows.append({"what": "film stress T/(plies h)", "value": f"{payload['stress_pa'] / 1e6:.1f} MPa"
                              + (f" ({100 * frac:.0f} % of yield {payload['yield_stress_pa'] / 1e6:.0f} MPa)"
                                 if frac is not None else "")})
        if payload["tension_n_per_m"] < SLACK_SHOWN * payload["slack_tension_n_per_m"]:
            # only near it does the slack limit matter to the suggestion
            head_rows.append({"what": "slack limit", "value": f"{payload['slack_tension_n_per_m']:.3g} N/m "
                              "(below it the film's bending stiffness, not its tension, sets the pitch)"})
        if payload.get("practical_minimum_n_per_m") and \
                payload["tension_n_per_m"] < payload["practical_minimum_n_per_m"]:
            head_rows.append({"what": "practical minimum", "value": f"{payload['practical_minimum_n_per_m']:.0f} N/m "
                              "(below it the head wrinkles and does not hold a pitch)"})
        emit(fmt, payload=payload, rows=head_rows, columns=[("what", "", str), ("value", "", str)],
             title=f"{drum.name}: tune with {payload['physics']} physics")
        gap()
        rows = [{"mode": mode_label(t["m"], t["n"]), "target": _hz_note(t["target_hz"]), "now": t["current_hz"],
                 "predicted": t["predicted_hz"], "residual": t["residual_cents"]} for t in payload["targets"]]
        emit(fmt, payload=payload, rows=rows, title="targets",
             columns=[("mode", "mode", str), ("target", "target (Hz)", str), ("now", "now (Hz)", num(2)),
                      ("predicted", "at suggestion (Hz)", num(3)), ("residual", "error (cents)", _signed(3))],
             notes=[payload["statement"]])
        gap()
        ref = payload["reference"]
        # the mode's own label: air rows as "air (m,q,p)", heads and branches in words
        mode_rows = [dict(row, mode=mode.label) for row, mode in zip(payload["modes"], result.modes.modes)]
        emit(fmt, payload=payload, rows=mode_rows, title=f"modes at the suggestion, ratios to ({ref['m']},{ref['n']})"
             f"{decay_words(payload['physics'], payload['losses'])}",
             columns=[("mode", "mode", str), ("frequency_hz", "f (Hz)", num(2)), ("decay_s", "T60 (s)", t60),
                      ("ratio", "ratio", num(4)), ("note", "note", str), ("cents_from_note", "cents off", _signed(1))],
             notes=payload["notes"])
        gap()
    if "lugs" in payload:
        lugs = payload["lugs"]
        rows = [dict(lug, turns_text=None if lug["turns"] is None else tuning.turns_text(lug["turns"]),
                     tap=_hz_note(lug["tap_hz"])) for lug in lugs["lugs"]]
        columns = [("lug", "lug", str), ("tap", "tap (Hz)", str), ("relative_tension", "relative tension", num(3)),
                   ("change_cents", "change (cents)", _signed(1)),
                   ("tension_change_percent", "tension change (%)", _signed(1))]
        if lugs["cents_per_turn"]:
            columns.append(("turns_text", "turns (+ tighten)", str))
        emit(fmt, payload=payload, rows=rows, columns=columns,
             title=f"lugs: bring each to {lugs['target_tap_hz']:.2f} Hz ({_note(lugs['target_tap_hz'])})",
             notes=[lugs["rule"]] + ([f"turns from {lugs['cents_per_turn']:g} cents per turn, rounded to 1/8 turn"]
                                     if lugs["cents_per_turn"] else []))
    notes = [f"caution: {w}" for w in payload["warnings"]] + list(tuning.CAUTIONS)
    if fmt is Format.markdown:
        print("\n" + "\n".join(f"- {n}" for n in notes))
    else:
        for n in notes:
            print(n)
