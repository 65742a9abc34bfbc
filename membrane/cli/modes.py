"""``membrane modes``: the table of partials, ratios, harmonic fit and notes."""

from __future__ import annotations

from typing import Annotated, List, Optional

import typer

from .common import (DrumFile, Format, LossChoice, LossesOpt, Physics, decay_words, drum_from, emit,
                     num, parse_mode, signed, t60, with_drum_flags)

COLUMNS = [
    ("mode", "mode", str),
    ("frequency_hz", "f (Hz)", num(2)),
    ("decay_s", "T60 (s)", t60),
    ("ratio", "ratio", num(4)),
    ("harmonic", "harmonic", str),
    ("cents_from_harmonic", "cents to harmonic", signed(1)),
    ("note", "note", str),
    ("cents_from_note", "cents to note", signed(1)),
]


@with_drum_flags
def modes(
    drum_file: DrumFile = None,
    drum_flags: dict = None,
    physics: Annotated[Physics, typer.Option(
        help="ideal: tension only; stiff: + bending stiffness; full: + air on the faces and in the body.")
    ] = Physics.full,
    losses: LossesOpt = LossChoice.all,
    m_max: Annotated[int, typer.Option(help="Highest number of nodal diameters (0-50).")] = 6,
    n_max: Annotated[int, typer.Option(help="Highest number of nodal circles, counting the rim (1-50).")] = 3,
    reference: Annotated[str, typer.Option(help="Mode the ratios are taken to, M,N.")] = "0,1",
    fit: Annotated[Optional[List[str]], typer.Option(
        help="Mode to include in the harmonic-series fit, M,N; repeat. Default (1,1)...(5,1).")] = None,
    format: Annotated[Format, typer.Option("--format", help="Output format.")] = Format.table,
) -> None:
    """Solve a drum's modes: frequencies, decay, ratios, harmonic fit and nearest notes."""
    from ..solver import solve

    drum = drum_from(drum_file, **drum_flags)
    ref = parse_mode(reference, key="--reference")
    fit_modes = [parse_mode(f, key="--fit") for f in fit] if fit else None
    result = solve(drum, physics.value, m_max=m_max, n_max=n_max, losses=losses.value)
    result.find(*ref)  # a clear error if the reference mode was not solved
    rows = result.table(reference=ref, fit_modes=fit_modes)
    harmonic = result.harmonic_fit(fit_modes)
    for row, mode in zip(rows, result.modes):
        row["mode"] = mode.label
    payload = {
        "drum": drum.name,
        "physics": physics.value,
        "losses": losses.value,
        "reference": {"m": ref[0], "n": ref[1]},
        "harmonic_fit": {
            "fundamental_hz": harmonic.fundamental,
            "rms_cents": harmonic.rms_cents,
            "modes": [{"m": m, "n": n, "harmonic": harmonic.harmonics[(m, n)]} for m, n in harmonic.fitted],
        },
        "notes": list(result.notes),
        "modes": [{k: v for k, v in row.items() if k != "mode"} for row in rows],
    }
    title = (f"{drum.name}: {physics.value} physics{decay_words(physics.value, losses.value)}; "
             f"ratios to ({ref[0]},{ref[1]}); "
             f"harmonic fit f0 = {harmonic.fundamental:.2f} Hz, rms {harmonic.rms_cents:.1f} cents")
    columns = COLUMNS if format is not Format.csv else \
        [("m", "m", str), ("n", "n", str)] + [c for c in COLUMNS if c[0] != "mode"] + \
        [("multiplicity", "multiplicity", str), ("branch", "branch", str), ("head", "head", str)]
    emit(format, payload=payload, rows=rows, columns=columns, title=title, notes=result.notes)
