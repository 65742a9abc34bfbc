"""``membrane lugs``: which partials uneven lugs split, the lug tensions behind a split, the turns."""

from __future__ import annotations

import math
import sys
from pathlib import Path
from typing import Annotated, List, Optional

import typer

from ..notation import mode_label
from .options import Force, FormatOpt
from .common import DrumFile, Format, Physics, drum_from, emit, fail, num, signed, with_drum_flags, write_atomic

SPLIT_COLUMNS = [
    ("mode", "mode", str),
    ("low_hz", "low (Hz)", num(3)),
    ("high_hz", "high (Hz)", num(3)),
    ("beat_hz", "beat (Hz)", num(3)),
    ("cents", "split (cents)", num(2)),
    ("orientation_deg", "nodal diameter of high (deg)", num(1)),
]
LUG_COLUMNS = [
    ("lug", "lug", str),
    ("angle_deg", "angle (deg)", num(1)),
    ("tension_n_per_m", "tension (N/m)", num(1)),
    ("deviation_percent", "off mean (%)", signed(2)),
    ("change_n_per_m", "change (N/m)", signed(1)),
    ("tap_cents", "tap change (cents)", signed(1)),
    ("turns", "turns (+ tighten)", signed(3)),
]
ANGLES_NOTE = ("angles: lug 1 at 0 degrees, counted round the rim in the order the lugs are given; "
               "a split pair's higher member has its antinodes 90/m degrees from the nodal diameter shown")


def _values(texts: list[str], key: str, kind: str) -> list[float]:
    from ..units import to_si

    from ..ranges import TENSION

    items = [item.strip() for text in texts for item in text.split(",") if item.strip()]
    return [TENSION.check(to_si(item, kind, key=key), key=key, given=item) for item in items]


@with_drum_flags
def lugs(
    drum_file: DrumFile = None,
    lug_tensions: Annotated[Optional[List[str]], typer.Option(
        help="Tension at each lug in order round the rim, comma-separated or repeated "
             "('4000,4100,3950,...' in N/m, or with units '4 kN/m').")] = None,
    lug_pitches: Annotated[Optional[List[str]], typer.Option(
        help="Tap pitch near each lug in order round the rim (Hz or notes, e.g. D3,D3+6c). "
             "Rule of thumb: tap pitch taken as proportional to sqrt(local tension).")] = None,
    recording: Annotated[Optional[Path], typer.Option(
        help="A tap recording (WAV): its split pairs give the size of the tension harmonics "
             "they see.", metavar="TAP.wav")] = None,
    count: Annotated[Optional[int], typer.Option(
        "--lugs", help="Number of equally spaced lugs (default: as many as values given).",
        min=3, max=64)] = None,
    cents_per_turn: Annotated[Optional[float], typer.Option(
        help="Calibration: tap-pitch change near a lug for one full turn, in cents.")] = None,
    turns_per_newton: Annotated[Optional[float], typer.Option(
        help="Calibration: turns of a lug per newton of its pull.")] = None,
    hoop_stiffness: Annotated[Optional[float], typer.Option(
        help="Model the hoop as a ring bending on the film, with this stiffness ratio EI/(a^4 k_f) "
             "(> 0): each lug a point pull, spread by the hoop. Default: the smooth spread (rim "
             "tension interpolated through the lug values).")] = None,
    method: Annotated[str, typer.Option(
        help="exact (Ritz solve, all orders coupled) or first-order (perturbation).")] = "exact",
    drum_flags: dict = None,
    physics: Annotated[Physics, typer.Option(
        help="ideal: tension only; stiff: + bending stiffness; full: + air and body (to first order).")
    ] = Physics.full,
    m_max: Annotated[int, typer.Option(help="Highest number of nodal diameters in the table (1-20).",
                                       min=1, max=20)] = 6,
    n_max: Annotated[int, typer.Option(help="Highest number of nodal circles in the table (1-10).",
                                       min=1, max=10)] = 3,
    plot: Annotated[Optional[Path], typer.Option(
        help="Draw the rim from above: each lug's deviation and turn, the (1,1) pair's nodal lines (PNG, SVG, PDF).")] = None,
    force: Force = False,
    format: FormatOpt = Format.table,
) -> None:
    """Uneven lugs: which partials split, by how much and which way, and which lugs to turn.

    From lug tensions or tap pitches: the split table, and turns that clear it while
    keeping the (1,1) on pitch. From a recording: the size of the tension harmonics the
    split pairs see (add --lug-pitches for their direction and the turns).
    """
    import numpy as np

    from .. import lugs as lugmod
    from ..physics.prestress import lug_angles, rim_tension
    from ..safety import CAUTIONS
    from ..tuning import LUG_RULE
    from .tune import parse_lug_pitches

    if hoop_stiffness is not None and not (math.isfinite(hoop_stiffness) and hoop_stiffness > 0):
        fail("--hoop-stiffness", hoop_stiffness, "must be a positive number (EI / (a^4 k_f))")
    if method not in lugmod.METHODS:
        fail("--method", method, "exact or first-order")
    if cents_per_turn is not None and turns_per_newton is not None:
        fail("--cents-per-turn", cents_per_turn, "give one calibration: --cents-per-turn or --turns-per-newton")
    from .. import ranges
    from .common import check_float

    check_float("--cents-per-turn", cents_per_turn, ranges.CENTS_PER_TURN)
    check_float("--turns-per-newton", turns_per_newton, ranges.TURNS_PER_NEWTON)
    drum = drum_from(drum_file, **drum_flags)
    tensions = _values(lug_tensions, "--lug-tensions", "tension") if lug_tensions else None
    pitches = list(parse_lug_pitches(lug_pitches)) if lug_pitches else None
    if pitches is None and tensions is None and recording is None and drum.lugs is not None:
        # the drum file's [lugs] table: tap pitches and/or tensions
        pitches = None if drum.lugs.pitches is None else list(drum.lugs.pitches)
        tensions = None if drum.lugs.tensions is None else list(drum.lugs.tensions)
        cents_per_turn = cents_per_turn if cents_per_turn is not None or turns_per_newton is not None \
            else drum.lugs.cents_per_turn
    if tensions is None and pitches is None and recording is None:
        fail("--lug-tensions", None, "give --lug-tensions, --lug-pitches or --recording TAP.wav")
    sizes = {len(v) for v in (tensions, pitches) if v is not None}
    if len(sizes) > 1:
        fail("--lug-pitches", len(pitches), f"give as many pitches as tensions ({len(tensions)})")
    n_lugs = sizes.pop() if sizes else count
    if count is not None and n_lugs != count:
        fail("--lugs", count, f"the lug values given number {n_lugs}")
    if n_lugs is None:
        fail("--lugs", None, "say how many lugs the drum has (with --recording alone)")
    if tensions is not None and len(tensions) < 3:
        fail("--lug-tensions", ",".join(map(str, tensions)), "give the tension at each of at least 3 lugs")

    measured, notes = [], []
    if recording is not None:
        from ..identify import identify
        from ..recording import analyse, read_wav

        if not recording.is_file():
            fail("--recording", str(recording), "no such file")
        analysis = analyse(read_wav(recording))
        # the full model's fit takes seconds a solve; the splits need only the labels
        fit_physics = "stiff" if physics.value == "full" else physics.value
        ident = identify(drum, analysis.partials, physics=fit_physics, splits="resolved")
        measured = lugmod.measured_splits(ident)
        drum = ident.drum
        notes.append(f"tension fitted to the recording: {ident.tension:.1f} N/m ({fit_physics} model)")
        if not measured:
            notes.append("the recording shows no split pair")
    estimate = lugmod.estimate_lugs(drum, count=n_lugs, tensions=tensions, pitches=pitches,
                                    splits=measured, physics=physics.value)
    payload = {"drum": drum.name, "physics": physics.value, "method": method, "lug_count": n_lugs,
               "mean_tension_n_per_m": estimate.mean_tension,
               "harmonics": {str(k): v for k, v in sorted(estimate.harmonics.items())},
               "seen": list(estimate.seen), "unseen": list(estimate.unseen),
               "measured_splits": [{"m": s.m, "n": s.n, "low_hz": s.low_frequency, "high_hz": s.high_frequency,
                                    "beat_hz": s.beat_frequency} for s in measured]}
    split_rows, lug_rows, turns, table = [], [], None, None
    if estimate.tensions is not None:
        spread = {} if hoop_stiffness is None else {"spread": "hoop", "hoop_stiffness": hoop_stiffness}
        rim = rim_tension(estimate.tensions, **spread)
        table = lugmod.split_table(drum, rim, physics=physics.value, method=method, m_max=m_max, n_max=n_max)
        notes.extend(table.notes)
        turns = lugmod.prescribe_turns(drum, estimate.tensions, cents_per_turn=cents_per_turn,
                                       turns_per_newton=turns_per_newton,
                                       physics="ideal" if physics.value == "ideal" else "stiff")
        after = lugmod.split_table(drum, rim_tension(lugmod.apply_turns(estimate.tensions, turns), **spread),
                                   physics="ideal" if physics.value == "ideal" else "stiff",
                                   method=method, m_max=1, n_max=1).find(1, 1)
        for s in table.splits:
            split_rows.append({"mode": mode_label(s.m, s.n), "m": s.m, "n": s.n, "low_hz": s.low_frequency,
                               "high_hz": s.high_frequency, "frequency_hz": [s.low_frequency, s.high_frequency],
                               "beat_hz": s.beat_frequency, "cents": s.cents, "orientation_deg": s.orientation_deg})
        angles = np.degrees(lug_angles(n_lugs))
        for j in range(n_lugs):
            lug_rows.append({"lug": str(j + 1), "angle_deg": angles[j], "tension_n_per_m": estimate.tensions[j],
                             "deviation_percent": 100 * (estimate.tensions[j] / estimate.mean_tension - 1),
                             "change_n_per_m": turns.change[j], "tap_cents": turns.tap_cents[j],
                             "turns": None if turns.turns is None else turns.turns[j]})
        payload.update({
            "splits": split_rows,
            "lug_tensions_n_per_m": list(estimate.tensions),
            "target_tension_n_per_m": turns.target_tension,
            "tension_changes_n_per_m": list(turns.change),
            "tap_cents_changes": list(turns.tap_cents),
            "turns": None if turns.turns is None else list(turns.turns),
            "calibration": {"cents_per_turn": cents_per_turn, "turns_per_newton": turns_per_newton},
            "after_turns_beat_11_hz": after.beat_frequency,
        })
        if hoop_stiffness is not None:
            notes.append(f"hoop model: each lug a point pull spread by a hoop bending on the film "
                         f"(EI / (a^4 k_f) = {hoop_stiffness:g}); equal lugs still leave a ripple of "
                         f"harmonic {n_lugs}, which no turn removes")
        if pitches is not None:
            notes.append(LUG_RULE)
        if turns.turns is None:
            notes.append("no calibration given (--cents-per-turn or --turns-per-newton): changes in "
                         "tension and tap pitch only")
    notes.extend(f"seen: {s}" for s in estimate.seen)
    notes.extend(f"not seen: {s}" for s in estimate.unseen)
    notes.append(ANGLES_NOTE)
    payload["notes"] = notes
    payload["cautions"] = list(CAUTIONS)

    if plot is not None:
        if table is None:
            fail("--plot", str(plot), "needs lug tensions or pitches (a recording alone does not say "
                 "which way the tension varies)")
        suffix = plot.suffix.lower().lstrip(".")
        if suffix not in ("png", "svg", "pdf"):
            fail("--plot", str(plot), "must end in .png, .svg or .pdf")
        from ..render.lugs import lug_map
        from ..render.stills import save

        fig = lug_map(drum, estimate.tensions, turns=turns, split=table.find(1, 1), physics=physics.value,
                      rim=rim)
        write_atomic(plot, lambda tmp: save(fig, tmp), force=force, key="--plot")

    if format is Format.json:
        emit(format, payload=payload, rows=[], columns=[])
        return
    harmonic_rows = [{"k": str(k), "rel": 100 * v} for k, v in sorted(estimate.harmonics.items())]
    if not split_rows:
        emit(format, payload=payload, rows=harmonic_rows,
             columns=[("k", "harmonic k", str), ("rel", "|c_k| / mean (%)", num(3))],
             title="Rim-tension harmonics seen in the recording", notes=notes + list(CAUTIONS))
        return
    emit(format, payload=payload, rows=split_rows, columns=SPLIT_COLUMNS,
         title=f"Split pairs of {drum.name} ({physics.value} physics, {method})")
    sys.stdout.write("\n")  # a blank line between the two tables, in every text format
    emit(format, payload=payload, rows=lug_rows, columns=LUG_COLUMNS,
         title=f"Lugs: mean {estimate.mean_tension:.1f} N/m; even them at {turns.target_tension:.1f} N/m "
               f"(keeps the (1,1) pitch); (1,1) beat after: {payload['after_turns_beat_11_hz']:.4f} Hz",
         notes=() if format is Format.csv else notes + list(CAUTIONS))
