"""``membrane modes``: the table of partials, ratios, harmonic fit and notes."""

from __future__ import annotations

from typing import Annotated, List, Optional

import typer

from ..notation import mode_list
from .options import FormatOpt, MMax, NMax, PhysicsOpt
from .common import (HEAD_HELP, REFERENCE_HELP, DrumFile, Format, LossChoice, LossesOpt, Physics,
                     decay_words, drum_from, emit, fail, num, parse_mode, parse_reference, signed, t60,
                     with_drum_flags)

COLUMNS = [
    ("mode", "mode", str),
    ("frequency_hz", "f (Hz)", num(2)),
    ("decay_s", "T60 (s)", t60),
    ("ratio", "ratio", num(4)),
    ("fit_mark", "in fit", str),
    ("harmonic", "harmonic", str),
    ("cents_from_harmonic", "cents to harmonic", signed(1)),
    ("note", "note", str),
    ("cents_from_note", "cents to note", signed(1)),
]


@with_drum_flags
def modes(
    drum_file: DrumFile = None,
    drum_flags: dict = None,
    physics: PhysicsOpt = Physics.full,
    losses: LossesOpt = LossChoice.all,
    m_max: MMax = 6,
    n_max: NMax = 3,
    reference: Annotated[Optional[str], typer.Option(help=REFERENCE_HELP, show_default=False)] = None,
    head: Annotated[Optional[str], typer.Option(help=HEAD_HELP, show_default=False)] = None,
    fit: Annotated[Optional[List[str]], typer.Option(
        help="Mode to include in the harmonic-series fit, M,N; repeat, at least 3 modes. "
             "Default (1,1)...(5,1) as far as solved.")] = None,
    format: FormatOpt = Format.table,
) -> None:
    """Solve a drum's modes: frequencies, decay, ratios, harmonic fit and nearest notes."""
    from ..solver import solve

    drum = drum_from(drum_file, **drum_flags)
    if head is not None and head not in ("struck", "resonant"):
        fail("--head", head, "must be struck or resonant")
    ref = parse_reference(reference, drum, head)
    fit_modes = [parse_mode(f, key="--fit") for f in fit] if fit else None
    result = solve(drum, physics.value, m_max=m_max, n_max=n_max, losses=losses.value)
    ref_mode = result.find(*ref[:2], head=ref[2] if len(ref) > 2 else None)  # a clear error if not solved
    rows = result.table(reference=ref, fit_modes=fit_modes)
    harmonic = result.harmonic_fit(fit_modes)
    for row, mode in zip(rows, result.modes):
        row["mode"] = mode.label
        row["fit_mark"] = "yes" if row["fitted"] else None
    payload = {
        "drum": drum.name,
        "physics": physics.value,
        "losses": losses.value,
        "reference": {"m": ref[0], "n": ref[1], **({"head": ref_mode.head} if ref_mode.head else {})},
        "harmonic_fit": None if harmonic is None else {
            "fundamental_hz": harmonic.fundamental,
            "rms_cents": harmonic.rms_cents,
            "modes": [{"m": m, "n": n, "harmonic": harmonic.harmonics[(m, n)]} for m, n in harmonic.fitted],
        },
        "notes": list(result.notes),
        "modes": [{k: v for k, v in row.items() if k not in ("mode", "fit_mark")} for row in rows],
    }
    title = (f"{drum.name}: {physics.value} physics{decay_words(physics.value, losses.value)}; "
             f"ratios to ({ref[0]},{ref[1]})" + (f" of the {ref_mode.head} head" if ref_mode.head else ""))
    if harmonic is None:
        title += "; no harmonic fit (fewer than 3 modes solved)"
        fit_note = []
    else:
        title += f"; harmonic fit f0 = {harmonic.fundamental:.2f} Hz, rms {harmonic.rms_cents:.1f} cents"
        fit_note = [f"harmonic fit through {mode_list(harmonic.fitted)} "
                    "(marked 'in fit'); the harmonic columns are left empty for the other modes"]
    columns = COLUMNS if format is not Format.csv else \
        [("m", "m", str), ("n", "n", str)] + [c for c in COLUMNS if c[0] not in ("mode", "fit_mark")] + \
        [("fitted", "fitted", str), ("multiplicity", "multiplicity", str), ("branch", "branch", str),
         ("head", "head", str)]
    emit(format, payload=payload, rows=rows, columns=columns, title=title, notes=fit_note + list(result.notes))
