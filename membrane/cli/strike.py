"""``membrane strike``: which partials a strike excites, as heard off the axis; a WAV preview."""

from __future__ import annotations

import math
import re
from pathlib import Path
from typing import Annotated, List, Optional

import typer

from .. import presets, ranges
from ..notation import mode_label
from .options import Force, FormatOpt, MMax, NMax, PhysicsOpt
from ..units import to_si
from .common import (DrumFile, Format, LossChoice, LossesOpt, Physics, check_float, check_target,
                     decay_words, drum_from, emit, fail, num, parse_mode, t60, with_drum_flags,
                     write_atomic)

COLUMNS = [
    ("mode", "mode", str),
    ("frequency_hz", "f (Hz)", num(2)),
    ("decay_s", "T60 (s)", t60),
    ("level_db", "level (dB)", lambda v: level_text(v)),
    ("shape_at_strike", "shape at strike", num(3)),
]
# A model level far below the loudest partial says "inaudible", not a number to a tenth
# of a dB: whole dB below LEVEL_WHOLE_DB, and a bound below LEVEL_SHOWN_MIN.
LEVEL_WHOLE_DB = -60.0  # common practice, no source: the range of a tap recording's partials
LEVEL_SHOWN_MIN = -120.0


def level_text(value: float) -> str:
    """A level in dB for a table: 0.1 dB near the top, whole dB lower, ``< -120`` or silent below."""
    if value <= presets.SILENT_DB:
        return "silent"
    if value < LEVEL_SHOWN_MIN:
        return f"< {LEVEL_SHOWN_MIN:.0f}"
    return f"{value:.0f}" if value < LEVEL_WHOLE_DB else f"{value:.1f}"


MODE_TOKEN = re.compile(r"^\(?\d+,\d+\)?$")
RATE_RANGE = (8000, 192000)
MAX_SECONDS = 60.0

NOTE_MODEL = ("model: point blow with a half-sine force pulse; far field of the struck head set in a "
              "rigid baffle (approximate for a kettle or shell); the degenerate partner of each "
              "(m>=1) mode has a nodal line through the strike point and is silent")
NOTE_LEVELS = "levels in dB relative to the loudest partial at the start of the sound"
from ..safety import PREVIEW_HEARING as NOTE_HEARING  # noqa: E402  (one wording of the caution)


def _parse_best_for(values: list[str] | None, drum_file: str | None,
                    extra: list[str]) -> tuple[list[tuple[int, int]], str | None]:
    """Modes from ``--best-for 1,1 2,1`` (spaces), repeated flags or one quoted list.

    Unquoted modes after ``--best-for`` reach us as extra arguments, and when the drum
    file comes after them the first of them as DRUM_FILE: sort that out here.
    """
    tokens = [t for v in (values or []) for t in re.split(r"[\s;]+", v.strip()) if t]
    if extra and not values:
        fail("argument", " ".join(extra), "unexpected; strike takes one DRUM_FILE")
    loose = ([drum_file] if values and drum_file and MODE_TOKEN.match(drum_file) else []) + list(extra)
    if loose and loose[0] == drum_file:
        drum_file = None
    others = [t for t in loose if not MODE_TOKEN.match(t)]
    if len(others) > 1 or (others and drum_file is not None):
        fail("argument", others[-1], "unexpected; after --best-for give modes as M,N, e.g. 1,1 2,1")
    if others:
        drum_file = others[0]
    modes = [parse_mode(t, key="--best-for") for t in tokens + [t for t in loose if MODE_TOKEN.match(t)]]
    return modes, drum_file


@with_drum_flags
def strike(
    ctx: typer.Context,
    drum_file: DrumFile = None,
    at: Annotated[float, typer.Option(
        help="Strike radius as a fraction of the radius from the centre (0 centre, 1 rim); "
             "default 0.75, about a quarter in from the rim, the trade's usual point.")
    ] = presets.DEFAULT_AT,
    angle: Annotated[float, typer.Option(help="Strike angle on the head, degrees.")] = 0.0,
    mallet: Annotated[str, typer.Option(
        help="Mallet: soft (3 ms contact), medium (1.5 ms), hard (0.75 ms); rule of thumb.")
    ] = presets.DEFAULT_MALLET,
    contact_time: Annotated[Optional[str], typer.Option(
        help="Mallet contact time, e.g. '2 ms' (overrides --mallet).")] = None,
    listener_angle: Annotated[float, typer.Option(
        help="Listener's angle from the head's axis, degrees (0 on the axis hears only m = 0).")
    ] = round(math.degrees(presets.DEFAULT_LISTENER_ANGLE), 6),
    listener_distance: Annotated[str, typer.Option(help="Listener's distance, e.g. '1.5 m'.")] = f"{presets.DEFAULT_LISTENER_DISTANCE:g} m",
    listener_azimuth: Annotated[Optional[float], typer.Option(
        help="Listener's azimuth, degrees, on the strike angle's scale; default the strike's.")] = None,
    best_for: Annotated[Optional[List[str]], typer.Option(
        help="Find the strike radius favouring these modes, e.g. --best-for 1,1 2,1 3,1 4,1.")] = None,
    head: Annotated[Optional[str], typer.Option(
        help="Which head of a two-headed drum the --best-for modes belong to: struck or resonant.",
        show_default=False)] = None,
    out: Annotated[Optional[str], typer.Option(help="Write a sound preview to this WAV file.")] = None,
    rate: Annotated[int, typer.Option(help="Sample rate of the WAV, Hz.")] = 44100,
    seconds: Annotated[float, typer.Option(help="Length of the WAV, s.")] = 4.0,
    wav_format: Annotated[str, typer.Option(help="WAV samples: int16 or float32.")] = "int16",
    assume_t60: Annotated[Optional[str], typer.Option(
        help="T60 for every partial when the physics models no decay (ideal, stiff), e.g. '2 s'.")
    ] = None,
    plot: Annotated[Optional[str], typer.Option(
        help="Draw each partial's level against the strike radius to this PNG file.")] = None,
    force: Force = False,
    drum_flags: dict = None,
    physics: PhysicsOpt = Physics.full,
    losses: LossesOpt = LossChoice.all,
    m_max: MMax = 6,
    n_max: NMax = 3,
    format: FormatOpt = Format.table,
) -> None:
    """Strike the head: each partial's level at a listener, strike-point advice, a WAV preview."""
    chosen, drum_file = _parse_best_for(best_for, drum_file, list(ctx.args))
    if not 0.0 <= at <= 1.0:
        fail("--at", at, "must be from 0 (centre) to 1 (rim), a fraction of the radius")
    check_float("--angle", angle, ranges.ANGLE_DEG)
    check_float("--listener-azimuth", listener_azimuth, ranges.ANGLE_DEG)
    if contact_time is not None:
        t_c = ranges.CONTACT_TIME.check(to_si(contact_time, "time", key="--contact-time"),
                                        key="--contact-time", given=contact_time)
    elif mallet.strip().lower() in presets.MALLETS:
        t_c = presets.contact_time(mallet.strip().lower())
    else:
        fail("--mallet", mallet, f"must be one of: {', '.join(presets.MALLETS)}, or give --contact-time")
    if not 0.0 <= listener_angle <= 90.0:
        fail("--listener-angle", listener_angle, "must be from 0 (on the axis) to 90 degrees")
    distance = ranges.LISTENER_DISTANCE.check(to_si(listener_distance, "length", key="--listener-distance"),
                                              key="--listener-distance", given=listener_distance)
    t60 = None
    if assume_t60 is not None:
        t60 = ranges.T60.check(to_si(assume_t60, "time", key="--assume-t60"), key="--assume-t60",
                               given=assume_t60)
    if wav_format not in ("int16", "float32"):
        fail("--wav-format", wav_format, "must be int16 or float32")
    if not RATE_RANGE[0] <= rate <= RATE_RANGE[1]:
        fail("--rate", rate, f"must be from {RATE_RANGE[0]} to {RATE_RANGE[1]} Hz")
    if not 0.05 <= seconds <= MAX_SECONDS:
        fail("--seconds", seconds, f"must be from 0.05 to {MAX_SECONDS:g} s")
    for key, path in (("--out", out), ("--plot", plot)):
        if path is not None:  # refuse before the solve what write_atomic would refuse after it
            check_target(path, force=force, key=key)
    if plot is not None and Path(plot).suffix.lower() != ".png":
        fail("--plot", plot, "must be a .png file")
    drum = drum_from(drum_file, **drum_flags)
    from .. import strike as model
    from ..strike_point import best_strike_radius
    from ..solver import solve

    result = solve(drum, physics.value, m_max=m_max, n_max=n_max, losses=losses.value)
    if out is not None and t60 is None and any(mo.decay is None for mo in result
                                               if mo.head != "resonant"):
        fail("--physics", physics.value, "models no decay, so a sound preview cannot be made: use "
             "--physics full, or give --assume-t60 (e.g. '2 s') to assume one T60 for every partial")
    listener = model.Listener(angle=math.radians(listener_angle), distance=distance,
                              azimuth=None if listener_azimuth is None else math.radians(listener_azimuth))
    theta0 = math.radians(angle)
    advice = None
    if chosen:
        if head is not None and head not in ("struck", "resonant"):
            fail("--head", head, "must be struck or resonant")
        if head == "resonant" and drum.resonant_head is None:
            fail("--head", head, "this drum has no resonant head (only a shell has two heads)")
        advice = best_strike_radius(result, modes=chosen, contact_time=t_c,
                                          listener=listener, angle=theta0, head=head)
        partials, at = advice.partials, advice.radius_fraction
    else:
        partials = model.strike_partials(result, strike=model.Strike(radius_fraction=at, contact_time=t_c, angle=theta0),
                                         listener=listener)
    notes = list(result.notes) + [NOTE_MODEL, NOTE_LEVELS]
    if t60 is not None and out is not None:
        notes.append(f"decay not modelled by '{physics.value}' physics: every partial given T60 = {t60:g} s")
    wav = None
    if out is not None:
        from ..audio import save_wav, synthesise

        samples = synthesise(partials, rate=rate, seconds=seconds, contact_time=t_c, assume_t60=t60)
        write_atomic(out, lambda p: save_wav(p, samples, rate=rate, sample_format=wav_format),
                     force=force)
        dropped = [p.mode.label for p in partials if p.frequency >= rate / 2]
        if dropped:
            notes.append("left out of the WAV (above the Nyquist frequency): " + ", ".join(dropped))
        notes.append(NOTE_HEARING)
        wav = {"path": str(out), "rate_hz": rate, "seconds": seconds, "format": wav_format}
    rows = _rows(partials)
    mallet_name = None if contact_time is not None else mallet.strip().lower()
    how = f"{mallet_name} mallet" if mallet_name else f"contact time {t_c * 1e3:.2f} ms"
    title = (f"{drum.name}: {physics.value} physics{decay_words(physics.value, losses.value)}; strike at r/a = {at:.3f}, {how}; listener "
             f"{listener_angle:g} deg off the axis at {distance:g} m")
    if advice is not None:
        title += (f"; best for {' '.join(mode_label(m, n) for m, n in advice.chosen)}"
                  f"{' of the ' + head + ' head' if head else ''}: r/a = {advice.radius_fraction:.3f}, "
                  f"contrast {advice.contrast_db:+.1f} dB")
    payload = {
        "drum": drum.name, "physics": physics.value, "losses": losses.value,
        "strike": {"at": at, "angle_deg": angle, "contact_time_s": t_c, "mallet": mallet_name},
        "listener": {"angle_deg": listener_angle, "distance_m": distance,
                     "azimuth_deg": angle if listener_azimuth is None else listener_azimuth},
        "partials": [{k: v for k, v in row.items() if k != "mode"} for row in rows],
        "notes": notes,
    }
    if advice is not None:
        payload["best_for"] = {"modes": [{"m": m, "n": n, **({"head": head} if head else {})}
                                         for m, n in advice.chosen],
                               "at": advice.radius_fraction, "contrast_db": advice.contrast_db,
                               "search_range": list(presets.SEARCH_RANGE)}
    if wav is not None:
        payload["wav"] = wav
    if plot is not None:
        from ..render.stills import save
        from ..render.strike_levels import strike_levels

        figure = strike_levels(result, radius_fraction=at, contact_time=t_c, listener=listener, angle=theta0,
                               chosen=chosen, advice=advice, title=title, head=head)
        write_atomic(plot, lambda path: save(figure, path, dpi=120), force=force, key="--plot")
        payload["plot"] = str(plot)
    columns = COLUMNS if format is not Format.csv else \
        [("m", "m", str), ("n", "n", str)] + [c for c in COLUMNS if c[0] != "mode"] + \
        [("pressure_pa_per_n_s", "pressure_pa_per_n_s", str), ("branch", "branch", str),
         ("head", "head", str)]
    emit(format, payload=payload, rows=rows, columns=columns, title=title, notes=notes)


def _rows(partials) -> list[dict]:
    """Table rows, one per partial."""
    rows = []
    for p in partials:
        mo = p.mode
        row = {"m": mo.m, "n": mo.n, "frequency_hz": p.frequency, "decay_s": p.decay,
               "level_db": p.level_db, "pressure_pa_per_n_s": abs(p.pressure),
               "shape_at_strike": p.shape_at_strike}
        if mo.branch is not None:
            row["branch"] = mo.branch
        if mo.head is not None:
            row["head"] = mo.head
        row["mode"] = mo.label
        rows.append(row)
    return rows
