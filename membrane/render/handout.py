"""A printable workshop handout (PDF, A4 or Letter): the drum, its modes, pictures, cautions.

Pages: 1 the drum and how to read the sheet (description, head data, model notes,
strike-point advice, cautions); 2 the mode table with ratios, harmonics and notes;
3 the grid of mode shapes; 4 the ratio chart comparing physics models. Written with
matplotlib's PdfPages: text stays text (TrueType fonts, so it can be searched and
copied) and lines stay vectors; only the colour fill of each mode shape is a small
raster.
"""

from __future__ import annotations

import textwrap

from .shape import physics_words
from .stills import mode_grid, ratio_chart

PAPER = {"a4": (8.27, 11.69), "letter": (8.5, 11.0)}  # inches: ISO 216 A4, US Letter
PAGES = 4

# Used only if membrane.tuning (which owns the wording) cannot be imported.
FALLBACK_CAUTIONS = (
    "An over-tensioned film can tear suddenly and violently: raise tension in small steps.",
    "Loud drums damage hearing: protect your ears when playing and testing up close.",
    "The numbers here come from a model: follow the head maker's rating and local practice.",
)

TABLE_COLUMNS = ("mode", "f (Hz)", "ratio", "note", "off note\n(cents)", "harmonic", "off harm.\n(cents)",
                 "T60 (s)")
TABLE_ROWS = 30  # what fits above the legend on one page
TABLE_WIDTHS = (0.16, 0.12, 0.11, 0.09, 0.12, 0.11, 0.12, 0.11)


def cautions() -> tuple[str, ...]:
    """The usual cautions, from :mod:`membrane.tuning` where it provides them."""
    try:
        from ..tuning import CAUTIONS
    except ImportError:
        return FALLBACK_CAUTIONS
    return tuple(CAUTIONS)


def strike_advice(modeset) -> list[str] | None:
    """Lines of strike-point advice for the modes the harmonic fit uses; None without the strike model."""
    try:
        from ..strike import DEFAULT_MALLET, best_strike_radius
    except ImportError:
        return None
    from ..errors import MembraneError

    fit = modeset.harmonic_fit()
    try:
        advice = best_strike_radius(modeset, modes=fit.fitted)
    except MembraneError as exc:  # e.g. too few modes solved to weigh some against the rest
        return [f"(no strike-point advice for these modes: {exc})"]
    a = modeset.drum.head.radius
    names = ", ".join(f"({m},{n})" for m, n in fit.fitted)
    loud = sorted(advice.partials, key=lambda p: -p.level_db)[:5]
    heard = "; ".join(f"{p.mode.label} {p.level_db:+.0f} dB" for p in loud)
    return [
        f"To favour {names} (the modes of the harmonic fit), strike at r/a = {advice.at:.2f}, "
        f"about {100 * a * (1 - advice.at):.0f} cm in from the rim ({DEFAULT_MALLET} mallet).",
        f"There their summed level is {advice.contrast_db:+.1f} dB against all other modes together "
        f"(the best of any strike point); loudest partials: {heard}.",
        "A model estimate for a listener 45 degrees off the axis: let your ears decide.",
    ]


def _fmt(value, spec: str) -> str:
    return "" if value is None else format(value, spec)


def table_cells(modeset, *, reference) -> list[list[str]]:
    """The mode table as strings, one row per mode (the numbers the handout prints)."""
    cells = []
    for row, mode in zip(modeset.table(reference=reference), modeset.modes):
        cells.append([mode.label, _fmt(row["frequency_hz"], ".2f"), _fmt(row["ratio"], ".4f"), row["note"],
                      _fmt(row["cents_from_note"], "+.1f"), str(row["harmonic"]),
                      _fmt(row["cents_from_harmonic"], "+.1f"), _fmt(row["decay_s"], ".2f")])
    return cells


def _text_page(fig, blocks, *, top: float = 0.95, width: int = 92) -> None:
    """Write (heading, lines) blocks down a page."""
    y = top
    for heading, lines in blocks:
        if heading:
            fig.text(0.08, y, heading, fontsize=12, fontweight="bold", va="top")
            y -= 0.028
        for line in lines:
            for part in textwrap.wrap(line, width) or [""]:
                fig.text(0.08, y, part, fontsize=9.5, va="top")
                y -= 0.019
        y -= 0.014


def _drum_lines(drum) -> list[str]:
    h = drum.head
    lines = [f"Head: {100 * h.diameter:.1f} cm ({h.diameter / 0.0254:.1f} in) across, "
             f"tension {h.tension:.0f} N/m, areal density {h.areal_density:.4f} kg/m^2, edge {h.edge}."]
    if h.thickness is not None:
        lines.append(f"Film: {h.film or 'custom'}, {1000 * h.thickness:.3f} mm per ply x {h.plies}"
                     + (f"; stress in the film {h.stress / 1e6:.1f} MPa" if h.stress else "")
                     + (f" (yield about {h.yield_stress / 1e6:.0f} MPa)" if h.yield_stress else "") + ".")
    body = drum.body
    if body.kind == "kettle":
        lines.append(f"Body: kettle of {1000 * body.volume:.0f} L.")
    elif body.kind == "shell":
        lines.append(f"Body: shell {100 * body.depth:.1f} cm deep"
                     + (", with a resonant head." if drum.resonant_head is not None else "."))
    else:
        lines.append("Body: none (a single head in open air).")
    lines.append(f"Air: {drum.air.density:.3f} kg/m^3, sound speed {drum.air.sound_speed:.1f} m/s.")
    return lines


def handout_pages(modeset, *, compare=(), paper: str = "a4", reference=(0, 1), count: int = 12) -> list:
    """The handout's pages as matplotlib figures (see :func:`write_handout` for the parameters)."""
    from matplotlib.figure import Figure

    from ..errors import InputError

    if paper not in PAPER:
        raise InputError("--paper", paper, f"must be one of: {', '.join(PAPER)}")
    size = PAPER[paper]
    drum = modeset.drum
    fit = modeset.harmonic_fit()
    advice = strike_advice(modeset)
    pages = []
    # -- page 1: the drum and how to read the sheet
    fig = Figure(figsize=size)
    fig.text(0.08, 0.965, drum.name or "Drum", fontsize=16, fontweight="bold", va="top")
    blocks = [
        ("", [drum.description] if drum.description else []),
        ("The drum", _drum_lines(drum)),
        ("The model", [f"Physics: {physics_words(modeset.physics)}.", *modeset.notes,
                       f"Best harmonic series through {', '.join(f'({m},{n})' for m, n in fit.fitted)}: "
                       f"f0 = {fit.fundamental:.2f} Hz, rms deviation {fit.rms_cents:.1f} cents."]),
        ("Where to strike", advice if advice else ["(no strike model available in this version)"]),
        ("Cautions", [f"- {c}" for c in cautions()]),
        ("How to read the pages", [
            "(m,n): m nodal diameters and n nodal circles counting the rim. Ratios are to "
            f"({reference[0]},{reference[1]}). Page 2 lists every solved mode with its nearest note; "
            "page 3 draws their shapes (black lines are nodes: they do not move); page 4 places each "
            "mode against the best harmonic series, in cents."]),
    ]
    _text_page(fig, blocks, top=0.92)
    pages.append(fig)
    # -- page 2: the mode table
    fig = Figure(figsize=size)
    fig.text(0.08, 0.965, f"Modes of {drum.name}", fontsize=13, fontweight="bold", va="top")
    fig.text(0.08, 0.94, f"{physics_words(modeset.physics)}; ratios to ({reference[0]},{reference[1]}); "
             f"harmonics of f0 = {fit.fundamental:.2f} Hz", fontsize=9, va="top")
    cells = table_cells(modeset, reference=reference)
    columns, widths = list(TABLE_COLUMNS), list(TABLE_WIDTHS)
    if all(mode.decay is None for mode in modeset.modes):  # in vacuum: no decay column
        columns, widths, cells = columns[:-1], widths[:-1], [c[:-1] for c in cells]
    rows = min(len(cells), TABLE_ROWS)
    ax = fig.add_axes((0.08, 0.30, 0.84, 0.62))
    ax.set_axis_off()
    table = ax.table(cellText=cells[:rows], colLabels=columns, colWidths=widths, loc="upper center",
                     cellLoc="right", colLoc="right")
    table.auto_set_font_size(False)
    table.set_fontsize(8.5)
    table.scale(1.0, 1.2)
    for col in range(len(columns)):
        table[0, col].set_height(table[0, col].get_height() * 1.8)
        table[0, col].set_text_props(fontweight="bold")
    legend = [
        f"ratio: f / f({reference[0]},{reference[1]}). note: nearest equal-tempered note (A4 = 440 Hz), "
        "and how many cents the mode lies above (+) or below (-) it.",
        f"harmonic: nearest whole multiple of f0 = {fit.fundamental:.2f} Hz, and the mode's distance from "
        "it in cents (100 cents = one semitone).",
        *modeset.notes,
    ]
    if len(cells) > rows:
        legend.insert(0, f"The lowest {rows} of {len(cells)} solved modes (membrane modes lists them all).")
    y = 0.31
    for line in legend:
        for part in textwrap.wrap(line, 100):
            fig.text(0.08, y, part, fontsize=8.5, va="top")
            y -= 0.017
    pages.append(fig)
    # -- page 3: the mode grid
    grid = mode_grid(modeset, count=count, columns=3, reference=reference, width=size[0])
    grid.set_size_inches(*size)
    pages.append(grid)
    # -- page 4: the ratio chart, landscape content on a portrait page
    chart = ratio_chart([*compare, modeset], width=size[0] * 1.0, height=size[1] * 0.42)
    chart.set_size_inches(*size)
    chart.get_layout_engine().set(rect=(0.02, 0.45, 0.96, 0.53))
    explain = ("Each marker is one mode: across, its frequency over the fitted f0 (a perfectly "
               "harmonic partial sits on a whole number); up, how many cents it lies from the "
               "nearest harmonic (100 cents = one semitone). A drum sounds clearly pitched when "
               "its strongest partials crowd the zero line.")
    for i, part in enumerate(textwrap.wrap(explain, 95)):
        chart.text(0.08, 0.40 - 0.02 * i, part, fontsize=9.5, va="top")
    pages.append(chart)
    return pages


def write_handout(path, modeset, *, compare=(), paper: str = "a4", reference=(0, 1), count: int = 12,
                  progress=None) -> int:
    """Write the handout PDF.

    Parameters
    ----------
    path : path-like
        Output ``.pdf``.
    modeset : membrane.modes.ModeSet
        The drum solved under the physics the handout reports (table, grid).
    compare : sequence of ModeSet
        The same drum under other physics, shown beside it in the ratio chart.
    paper : {"a4", "letter"}
        Page size.
    reference : (int, int)
        Mode the ratios are taken to.
    count : int
        Modes in the grid.
    progress : callable, optional
        ``progress(page, total)`` after each page.

    Returns
    -------
    int
        Number of pages written.
    """
    import matplotlib
    from matplotlib.backends.backend_pdf import PdfPages

    pages = handout_pages(modeset, compare=compare, paper=paper, reference=reference, count=count)
    with matplotlib.rc_context({"pdf.fonttype": 42}), \
            PdfPages(path, metadata={"Title": f"membrane handout: {modeset.drum.name}",
                                     "Creator": "membrane", "CreationDate": None}) as pdf:
        for i, fig in enumerate(pages, 1):
            pdf.savefig(fig)
            if progress is not None:
                progress(i, len(pages))
    return len(pages)
