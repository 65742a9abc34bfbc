"""``membrane listen``: the partials of a tap recording, their modes, and the head's tension."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Annotated, List, Optional

import typer

from ..errors import InputError, RecordingError
from ..notation import mode_label
from .options import Force, FormatOpt
from .common import Format, Physics, emit, fail, num, signed, t60, write_atomic

COLUMNS = [
    ("frequency_hz", "f (Hz)", num(3)),
    ("level_db", "level (dB)", num(1)),
    ("decay_text", "T60 (s)", str),
    ("note", "note", str),
    ("cents_from_note", "cents off note", signed(0)),
    ("remarks", "remarks", str),
]
DRUM_COLUMNS = [
    ("mode", "mode", str),
    ("model_hz", "model (Hz)", num(2)),
    ("cents_from_model", "cents off model", signed(1)),
]
MODEL_NOTE = ("labels come from the drum model at the fitted tension (the tension is the one free "
              "parameter; the rest of the drum is taken from the drum file)")
DIAMETER_NOTE = ("the partials fix the head's wave speed over its radius, sqrt(T / sigma) / a, not "
                 "the tension alone: with another diameter or film in the drum file the fit "
                 "holds as well near T (a / a_file)^2 scaled, so the tension is only as good as "
                 "the drum file's size and film")


def parse_channel(text: str) -> int | None:
    """``mix`` -> None (mean of the channels); ``left``/``right`` or ``N`` (from 1) -> index."""
    t = str(text).strip().lower()
    if t == "mix":
        return None
    if t in ("left", "right"):
        return 0 if t == "left" else 1
    if t.isdigit() and int(t) >= 1:
        return int(t) - 1
    fail("--channel", text, "mix, left, right, or a channel number counting from 1")


def listen(
    recording: Annotated[Path, typer.Argument(
        metavar="RECORDING", help="Recording of one tap: WAV (PCM 8/16/24/32-bit or float), "
        "FLAC, OGG or MP3; any rate, mono or stereo.", show_default=False)],
    drum: Annotated[Optional[str], typer.Option(
        help="Drum file (TOML) or built-in example: label the partials with modes and fit the "
             "head's tension.")] = None,
    physics: Annotated[Physics, typer.Option(
        help="Model for the labels (with --drum): ideal, stiff, or full (air and body).")
    ] = Physics.full,
    channel: Annotated[str, typer.Option(
        help="mix (mean of the channels), left, right, or a channel number from 1.")] = "mix",
    floor: Annotated[float, typer.Option(
        help="Leave out partials weaker than this, in dB below the strongest.", max=-1.0)] = -50.0,
    max_partials: Annotated[int, typer.Option(
        help="Show at most this many partials (the strongest); the analysis and the fit use "
             "all of them.", min=1, max=500)] = 32,
    target: Annotated[Optional[List[str]], typer.Option(
        help="With --drum: M,N=PITCH (Hz or a note such as F2); the tension that puts the mode "
             "there, starting from the fitted drum. Repeat for several modes.",
        metavar="M,N=PITCH")] = None,
    plot: Annotated[Optional[Path], typer.Option(
        help="Also draw the spectrum with the partials and matched modes marked (PNG).",
        metavar="FILE.png")] = None,
    force: Force = False,
    format: FormatOpt = Format.table,
) -> None:
    """Find the partials of a tap recording: frequency, level and decay time (T60).

    With --drum, name each partial with a mode (m nodal diameters, n nodal circles) by
    fitting the head's tension, and show split degenerate modes and their beat rate.
    """
    from .. import recording as rec
    from ..units import note_name

    chan = parse_channel(channel)
    from ..ranges import FLOOR_DB
    from .common import check_float

    check_float("--floor", floor, FLOOR_DB)  # click's max= lets NaN and -inf through
    if target and drum is None:
        fail("--target", target[0], "needs --drum: the tension is worked out from the fitted drum model")
    if plot is not None:
        if plot.suffix.lower() != ".png":
            fail("--plot", str(plot), "a .png file name")
        if plot.exists() and not force:
            fail("--plot", str(plot), "exists already; add --force to overwrite it")
    model = _load_drum(drum) if drum is not None else None
    targets = _targets(target) if target else []

    try:
        audio = rec.read_recording(recording, channel=chan)
        analysis = rec.analyse(audio, floor_db=floor)
    except RecordingError as exc:
        message = str(exc)
        raise RecordingError(message if str(recording) in message else f"{recording}: {message}") from None
    for warning in analysis.warnings:
        print(f"warning: {warning}", file=sys.stderr)

    ident = None
    fit_failed = None
    if model is not None and analysis.partials:
        from ..errors import SolverError
        from ..identify import identify

        show = (lambda m: print(f"listen: {m}", file=sys.stderr)) if physics is Physics.full else None
        try:
            ident = identify(model, analysis.partials, physics=physics.value, progress=show)
        except (SolverError, InputError) as exc:
            # the measurement stands on its own: keep the partials, say why there is no fit
            fit_failed = " ".join(str(exc).split())
            print(f"warning: no tension fit: {fit_failed}", file=sys.stderr)
    elif model is not None:
        fit_failed = "no partials to fit"
    if targets and ident is None:
        print("warning: no --target tension without a tension fit", file=sys.stderr)
        targets = []
    rows = []
    labels = {id(mt.partial): mt for mt in ident.matches} if ident else {}
    shown = analysis.strongest(max_partials)
    partners = {}
    for sp in (ident.splits if ident else ()):
        partners[id(sp.low)] = (sp.high.frequency, sp.beat_frequency)
        partners[id(sp.high)] = (sp.low.frequency, sp.beat_frequency)
    for p in shown:
        note, off = note_name(p.frequency)
        decay, at_least = p.t60_shown
        row = {"frequency_hz": p.frequency, "level_db": p.level_db, "decay_s": decay,
               "decay_s_is_lower_bound": at_least, "decay_rate_per_s": p.decay_rate, "note": note, "cents_from_note": off,
               "settled_frequency_hz": p.settled, "glide_cents": p.glide_cents,
               "flags": list(p.flags), "remarks": _remarks(p),
               # a partial that does not decay within the record: its T60 exceeds the record
               "decay_text": f"> {decay:.3g}" if at_least else t60(decay)}
        mt = labels.get(id(p))
        if mt is not None:
            row.update(m=mt.m, n=mt.n, mode=mode_label(mt.m, mt.n), model_hz=mt.model_frequency,
                       cents_from_model=mt.cents)
            pair = partners.get(id(p))
            if pair is not None:
                row.update(pair=pair[0], beat_hz=pair[1])
            if mt.branch is not None:
                row["branch"] = mt.branch
                row["mode"] += f" {mt.branch}"
            if mt.head is not None:
                row["head"] = mt.head
                row["mode"] += " resonant" if mt.head == "resonant" else ""
        rows.append(row)

    payload = {"recording": str(recording), "sample_rate_hz": audio.rate, "channels": audio.channels,
               "encoding": audio.encoding, "strike_time_s": analysis.strike_time,
               "analysed_from_s": analysis.start_time, "analysed_to_s": analysis.end_time,
               "reference_time_s": analysis.reference_time,
               "floor_db": floor, "partials": [{k: v for k, v in r.items() if k not in ("mode", "remarks", "decay_text")}
                            for r in rows],
               "partials_found": len(analysis.partials), "warnings": list(analysis.warnings)}
    ref_ms = 1e3 * (analysis.reference_time - analysis.strike_time)
    notes = [f"levels in dB re the strongest partial, {ref_ms:.0f} ms after the strike; "
             f"T60 = time to fall 60 dB; strike at {analysis.strike_time:.3f} s, decay analysed "
             f"{analysis.start_time:.3f}-{analysis.end_time:.3f} s"]
    if len(shown) < len(analysis.partials):
        notes.append(f"showing the {len(shown)} strongest of {len(analysis.partials)} partials "
                     "(--max-partials); the fit uses all")
    glides = [p for p in shown if "glide" in p.flags]
    for p in glides:
        notes.append(f"{p.frequency:.1f} Hz glides {p.glide_cents:+.0f} cents to "
                     f"{p.settled:.1f} Hz as the head settles (one partial)")
    if any("fast" in p.flags for p in shown):
        notes.append("fast: decays faster than the analysis resolves well; its level and T60 "
                     "are uncertain")
    if any("steady" in p.flags for p in shown):
        notes.append("steady: does not fall within the analysed decay; its T60 is only known "
                     "to be longer than that stretch, shown as '> ' and its length in seconds; left out "
                     "of the tension fit")
    if any("rising" in p.flags for p in shown):
        notes.append("rising: its envelope grows after the reference time (fed by other modes "
                     "or the air, or lines that beat); level taken at the reference time, T60 "
                     "from the fall a long window sees")
    if not analysis.partials:
        notes.append(rec.NO_PARTIALS)
    if fit_failed is not None:
        payload["fit"] = {"tension_n_per_m": None, "uncertainty_n_per_m": None, "matched": 0,
                          "rms_cents": None, "verdict": f"no fit: {fit_failed}"}
        notes.append(f"no tension fit: {fit_failed}")
    if ident is not None:
        payload.update(_identification_payload(ident, physics.value))
        notes += _identification_notes(ident, physics.value)
        if physics is Physics.full and ident.matches:
            _fit_losses(ident, rows, payload, notes)
    tuning_result = None
    if targets:
        tuning_result = _tune(ident.drum, targets, physics.value)
        payload["tuning"] = tuning_result
        notes += _tuning_notes(tuning_result)
        for w in tuning_result["warnings"]:
            print(f"caution: {w}", file=sys.stderr)
    if plot is not None and not analysis.partials:
        print("warning: no partials, so no --plot picture", file=sys.stderr)
    elif plot is not None:
        spectrum = rec.decay_spectrum(audio, analysis)
        write_atomic(plot, lambda tmp: _draw(tmp, spectrum, analysis, ident, recording.name),
                     force=force, key="--plot")
        notes.append(f"spectrum picture written to {plot}")
    columns = COLUMNS + (DRUM_COLUMNS if ident else [])
    if format is Format.csv:
        columns = COLUMNS[:2] + [("decay_s", "decay_s", str),
                                 ("decay_s_is_lower_bound", "decay_s_is_lower_bound", str),
                                 ("decay_rate_per_s", "decay_rate_per_s", str)] + COLUMNS[3:5] + \
            [("settled_frequency_hz", "settled_frequency_hz", str), ("glide_cents", "glide_cents", str)] + \
            ([("m", "m", str), ("n", "n", str)] + DRUM_COLUMNS[1:] if ident else [])
    title = f"{recording.name}: {len(rows)} partials ({audio.encoding}, {audio.rate:g} Hz)"
    if ident is not None:
        title += f"; fitted tension {ident.tension:.0f} N/m ({ident.verdict.split(':')[0]})"
        if ident.verdict != "identified":
            print(f"warning: {ident.verdict}", file=sys.stderr)
    emit(format, payload=payload, rows=rows, columns=columns, title=title, notes=notes)


def _fit_losses(ident, rows, payload, notes) -> None:
    """Loss parameters from the matched partials' decay (loss_fit.py), into the output."""
    from ..errors import SolverError
    from ..loss_fit import fit_losses, rates_from_modes

    m_max = max(mt.m for mt in ident.matches)
    n_max = max(mt.n for mt in ident.matches)
    try:
        # the fit's last table (every loss, at the fitted tension less its last sub-cent
        # step) holds the roots: the mechanisms' rates from it need no further solve
        rates = rates_from_modes(ident.modes, m_max=m_max, n_max=n_max)
        lf = fit_losses(ident.drum, ident.matches, m_max=m_max, n_max=n_max, rates=rates)
    except SolverError as exc:
        notes.append(f"no loss fit: {' '.join(str(exc).split())}")
        return
    from ..losses import decay_note

    payload["loss_fit"] = {
        "parameters": {k: {"value": v, "uncertainty": u} for k, (v, u) in lf.fitted.items()},
        # which losses made predicted_decay_s: all of them, with the fitted parameters
        "losses": decay_note(lf.losses),
        "fitted_on": [{"m": m, "n": n, "branch": b} for m, n, b in lf.used],
        "rms_log_ratio": lf.rms_log_ratio,
        "partials": [{k: v for k, v in r.items() if k != "head"} for r in lf.rows],
    }
    by = {(r["m"], r["n"], r["branch"]): r for r in lf.rows}
    # the JSON's partials are copies of the table rows, in the same order: both get the prediction
    for row, out in zip(rows, payload.get("partials", rows)):
        r = by.get((row.get("m"), row.get("n"), row.get("branch")))
        if r is not None:
            for d in {id(row): row, id(out): out}.values():
                d["predicted_decay_s"] = r["predicted_t60_s"]
                d["dominant_loss"] = r["dominant"]
    if lf.fitted:
        said = ", ".join(f"{k.replace('_', ' ')} {v:.3g}" + (f" +- {u:.2g}" if u is not None else "")
                         for k, (v, u) in lf.fitted.items())
        notes.append(f"loss fit on {len(lf.used)} partials with T60 > 0.5 s: {said} "
                     f"(rms {100 * lf.rms_log_ratio:.0f} % in T60); the other loss parameters "
                     "keep the drum file's values (docs/losses.md)")
    else:
        notes.append("no loss fit: too few matched partials with T60 > 0.5 s")
    dominant = {}
    for r in lf.rows:
        dominant.setdefault(r["dominant"], []).append(mode_label(r["m"], r["n"]))
    notes.append("what damps each matched partial most: " +
                 "; ".join(f"{k}: {' '.join(v)}" for k, v in dominant.items()))


def _remarks(p) -> str:
    """Flags in a few words for the table: the glide, fast decays, steady and rising lines."""
    out = []
    if "glide" in p.flags:
        out.append(f"glide {p.glide_cents:+.0f}c to {p.settled:.1f}")
    out += [f for f in p.flags if f != "glide"]
    return ", ".join(out)


def _load_drum(source: str):
    from ..drum import load_drum

    return load_drum(source)


def _targets(texts: list[str]) -> list[tuple[tuple[int, int], float]]:
    from .options import parse_targets

    for text in texts:
        if "=" not in text:
            fail("--target", text, "write the target as M,N=PITCH, e.g. 1,1=F2 or 1,1=87.3")
    return [(mn, hz) for mn, hz, _ in parse_targets(texts, None)]


def _identification_payload(ident, physics: str) -> dict:
    return {
        "physics": physics,
        "fitted_tension_n_per_m": ident.tension,
        "nominal_tension_n_per_m": ident.nominal_tension,
        "tension_change_percent": 100.0 * (ident.tension / ident.nominal_tension - 1.0),
        "rms_cents": ident.rms_cents,
        "matched": len(ident.matches),
        "fit": ident.fit,
        "unmatched": [{"frequency_hz": p.frequency, "level_db": p.level_db} for p in ident.unmatched],
        "beyond_model_range": [{"frequency_hz": p.frequency, "level_db": p.level_db} for p in ident.beyond],
        "splits": [{"m": s.m, "n": s.n, "low_hz": s.low.frequency, "high_hz": s.high.frequency,
                    "beat_hz": s.beat_frequency, "cents": s.cents} for s in ident.splits],
        "model_notes": list(ident.modes.notes) + [MODEL_NOTE],
    }


def _identification_notes(ident, physics: str) -> list[str]:
    unc = f" +- {ident.uncertainty:.0f}" if ident.uncertainty == ident.uncertainty else ""
    out = [f"fitted tension {ident.tension:.1f}{unc} N/m ({100 * (ident.tension / ident.nominal_tension - 1):+.1f} % "
           f"from the drum file's {ident.nominal_tension:.0f} N/m), {physics} physics; "
           f"{len(ident.matches)} partials matched, rms {ident.rms_cents:.1f} cents; {ident.verdict}"]
    for s in ident.splits:
        out.append(f"mode ({s.m},{s.n}) is split: {s.low.frequency:.2f} and {s.high.frequency:.2f} Hz, "
                   f"beating at {s.beat_frequency:.2f} Hz ({s.cents:.1f} cents) - uneven tension round the rim")
    if ident.unmatched:
        few = sorted(ident.unmatched, key=lambda p: -p.amplitude)[:8]
        out.append("no mode within reach: " + ", ".join(f"{p.frequency:.1f} Hz" for p in
                                                        sorted(few, key=lambda p: p.frequency))
                   + (f" and {len(ident.unmatched) - 8} weaker" if len(ident.unmatched) > 8 else ""))
    if ident.beyond:
        out.append(f"{len(ident.beyond)} partials from {ident.beyond[0].frequency:.0f} Hz up are above "
                   f"the range of the {physics} model's mode table and are not labelled")
    out += list(ident.modes.notes) + [MODEL_NOTE]
    if ident.verdict == "identified":
        out.append(DIAMETER_NOTE)
    return out


def _tune(drum, targets, physics: str) -> dict:
    from .. import tuning

    result = tuning.tension_for(drum, targets=targets, physics=physics)
    return {"tension_n_per_m": result.tension, "current_tension_n_per_m": result.current_tension,
            "change_percent": result.change_percent,
            "predicted_hz": result.targets[0].predicted_frequency,
            "targets": [{"m": t.m, "n": t.n, "target_hz": t.target_frequency, "current_hz": t.current_frequency,
                         "predicted_hz": t.predicted_frequency, "residual_cents": t.residual_cents}
                        for t in result.targets],
            "stress_pa": result.stress, "warnings": list(result.warnings),
            "cautions": list(tuning.CAUTIONS)}


def _tuning_notes(t: dict) -> list[str]:
    modes = ", ".join(f"{mode_label(x['m'], x['n'])} {x['current_hz']:.2f} -> {x['predicted_hz']:.2f} Hz "
                      f"(target {x['target_hz']:.2f})" for x in t["targets"])
    return [f"to reach the target: tension {t['tension_n_per_m']:.1f} N/m "
            f"({t['change_percent']:+.1f} % from the fitted {t['current_tension_n_per_m']:.1f} N/m); {modes}"] + \
        t["cautions"]


def shown_partials(analysis):
    """The partials a picture marks: all of them (the table may show fewer)."""
    return analysis.partials


def _draw(path: Path, spectrum, analysis, ident, name: str) -> None:
    """The spectrum picture, drawn by :mod:`membrane.render.spectrum`."""
    from ..render.spectrum import write_spectrum_png

    freqs, level = spectrum
    write_spectrum_png(path, freqs, level, shown_partials(analysis), ident=ident, name=name)


__all__ = ["listen", "parse_channel"]
