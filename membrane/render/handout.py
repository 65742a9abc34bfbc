"""A printable workshop handout (PDF, A4 or Letter): the drum, its modes, pictures, cautions.

Pages: 1 the drum (description, head data, a labelled picture of where to strike, the
cautions in a box, how to read the sheet); 2 the mode table with ratios, nearest notes,
the harmonic fit and T60, and what the model leaves out; 3 the grid of mode shapes;
4 the ratio chart, one panel per physics model across the page. Written with
matplotlib's PdfPages: text stays text (TrueType fonts, so it can be searched and
copied) and lines stay vectors; only the colour fill of each mode shape is a small
raster. Every page is laid out in inches from its top, so A4 and Letter both fit.

One module for about 430 lines on purpose: it is one document, its pages laid out by one
writer (``_Writer``) on one set of measures (paper, margins, type size); the pictures it places
are drawn in :mod:`membrane.render.stills` and :mod:`membrane.render.ratio_chart`.
"""

from __future__ import annotations

import math
import textwrap

import numpy as np

from ..notation import mode_list
from .shape import physics_words, reference_of, wrap_title
from .ratio_chart import ratio_chart
from .stills import draw_nodal_lines, mode_grid

PAPER = {"a4": (8.27, 11.69), "letter": (8.5, 11.0)}  # inches: ISO 216 A4, US Letter
PAGES = 4
MARGIN = 0.75  # inches on every side: inside what office printers can print
BODY_PT = 10.0
GLYPH_EM = 0.56  # average glyph width of the default sans-serif, in em (for wrapping)

TABLE_COLUMNS = ("mode", "f (Hz)", "ratio", "note", "cents\noff note", "harmonic\n(fit)",
                 "cents off\nharmonic", "T60 (s)")
TABLE_ROWS = 30  # what fits on one page with its legend
TABLE_WIDTHS = (0.27, 0.10, 0.09, 0.07, 0.10, 0.10, 0.11, 0.09)
ROW_IN = 0.23  # table row height, inches


def cautions() -> tuple[str, ...]:
    """The usual cautions (:data:`membrane.safety.CAUTIONS`, the one wording)."""
    from ..safety import CAUTIONS

    return tuple(CAUTIONS)


def sentence(text: str) -> str:
    """A model note as a sentence: capital first letter, full stop at the end."""
    text = text.strip()
    if not text:
        return text
    text = text[0].upper() + text[1:]
    return text if text[-1] in ".!?)" or text.endswith(")") else text + "."


def strike_advice(modeset):
    """Strike-point advice for the modes of the harmonic fit.

    Returns
    -------
    (StrikeAdvice or None, list of str)
        The advice (None without a fit or a strike model) and sentences saying it.
    """
    from ..presets import DEFAULT_LISTENER_ANGLE, DEFAULT_MALLET
    from ..strike_point import best_strike_radius
    from ..errors import MembraneError

    fit = modeset.harmonic_fit()
    if fit is None:
        return None, ["No strike-point advice: fewer than three modes were solved."]
    try:
        advice = best_strike_radius(modeset, modes=fit.fitted)
    except MembraneError as exc:  # e.g. too few modes solved to weigh some against the rest
        return None, [f"No strike-point advice for these modes: {exc}."]
    a = modeset.drum.head.radius
    names = mode_list(fit.fitted)
    loud = sorted(advice.partials, key=lambda p: -p.level_db)[:5]
    heard = "; ".join(f"{p.mode.label} {p.level_db:+.0f} dB" for p in loud)
    return advice, [
        f"To favour {names}, the modes of the harmonic fit, strike at r/a = {advice.radius_fraction:.2f}: "
        f"about {100 * a * (1 - advice.radius_fraction):.0f} cm in from the rim, with a {DEFAULT_MALLET} mallet.",
        f"Struck there, these modes together are {advice.contrast_db:+.1f} dB against all the other "
        "modes together, the best contrast of any strike point.",
        f"Loudest partials there: {heard} (relative to the loudest).",
        f"This is a model estimate for a listener {math.degrees(DEFAULT_LISTENER_ANGLE):.0f} degrees off the axis: let your ears decide.",
    ]


def table_cells(modeset, *, reference) -> list[list[str]]:
    """The mode table as strings, one row per mode (the numbers the handout prints).

    T60 above :data:`membrane.modes.T60_SHOWN_MAX` shows as ``"> 100"``; the harmonic
    columns are filled only for the modes the fit used.
    """
    from ..modes import t60_text

    cells = []
    for row, mode in zip(modeset.table(reference=reference), modeset.modes):
        fitted = row["fitted"]
        cells.append([mode.label, f"{row['frequency_hz']:.2f}", f"{row['ratio']:.4f}", row["note"],
                      f"{row['cents_from_note']:+.1f}", str(row["harmonic"]) if fitted else "",
                      f"{row['cents_from_harmonic']:+.1f}" if fitted else "", t60_text(row["decay_s"])])
    return cells


class _Writer:
    """Text down a page, measured in inches from the top; wraps to the text width."""

    def __init__(self, fig, size):
        self.fig, self.width, self.height = fig, size[0], size[1]
        self.y = MARGIN  # inches from the top
        self.text_width = size[0] - 2 * MARGIN

    def _fy(self, y_in: float) -> float:
        return 1.0 - y_in / self.height

    def chars(self, pt: float, indent: float = 0.0) -> int:
        return int((self.text_width - indent) * 72.0 / (GLYPH_EM * pt))

    def line(self, text, *, pt=BODY_PT, x=0.0, weight="normal", colour="black"):
        self.fig.text((MARGIN + x) / self.width, self._fy(self.y), text, fontsize=pt, va="top",
                      fontweight=weight, color=colour)
        self.y += pt * 1.4 / 72.0

    def heading(self, text, pt=12.5):
        self.y += 0.08
        self.line(text, pt=pt, weight="bold")
        self.y += 0.03

    def para(self, text, *, pt=BODY_PT, x=0.0):
        for part in textwrap.wrap(text, self.chars(pt, x)) or [""]:
            self.line(part, pt=pt, x=x)
        self.y += 0.05

    def bullets(self, items, *, pt=BODY_PT, x=0.0):
        for item in items:
            parts = textwrap.wrap(item, self.chars(pt, x + 0.2))
            for k, part in enumerate(parts):
                if k == 0:
                    self.fig.text((MARGIN + x + 0.05) / self.width, self._fy(self.y), "\u2022",
                                  fontsize=pt, va="top")
                self.line(part, pt=pt, x=x + 0.2)
            self.y += 0.04

    def measure(self, items, *, pt=BODY_PT, x=0.0) -> float:
        """Height in inches that :meth:`bullets` would take for ``items``."""
        lines = sum(len(textwrap.wrap(item, self.chars(pt, x + 0.2))) for item in items)
        return lines * pt * 1.4 / 72.0 + 0.04 * len(items)

    def box(self, title, items, *, pt=BODY_PT):
        """Bulleted items in a framed box (the cautions)."""
        from matplotlib.patches import FancyBboxPatch

        top = self.y
        self.y += 0.12
        self.line(title, pt=pt + 1, x=0.15, weight="bold", colour="#8b0000")
        self.y += 0.03
        self.text_width -= 0.3
        self.bullets(items, pt=pt, x=0.15)
        self.text_width += 0.3
        self.y += 0.06
        h = self.y - top
        self.fig.patches.append(FancyBboxPatch(
            (MARGIN / self.width, self._fy(self.y)), self.text_width / self.width, h / self.height,
            boxstyle="round,pad=0,rounding_size=0.01", transform=self.fig.transFigure,
            facecolor="#fff4e5", edgecolor="#8b0000", linewidth=1.2, zorder=-1))
        self.y += 0.1

    def axes(self, height_in: float, *, left_in: float = 0.0, width_in: float | None = None):
        """An axes ``height_in`` tall at the cursor; the cursor moves below it."""
        w = width_in if width_in is not None else self.text_width - left_in
        ax = self.fig.add_axes(((MARGIN + left_in) / self.width, self._fy(self.y + height_in),
                                w / self.width, height_in / self.height))
        self.y += height_in
        return ax


def typeset_units(text: str) -> str:
    """``kg/m^2`` -> ``kg/m²``, ``m^3`` -> ``m³`` (printed text has no carets)."""
    return text.replace("^2", "\u00b2").replace("^3", "\u00b3")


def drum_lines(drum) -> list[str]:
    """The drum in a few sentences, units typeset."""
    h = drum.head
    lines = [f"Head: {100 * h.diameter:.1f} cm ({h.diameter / 0.0254:.1f} in) across, tension "
             f"{h.tension:.0f} N/m, areal density {h.areal_density:.4f} kg/m\u00b2, {h.edge} edge."]
    if h.thickness is not None:
        lines.append(f"Film: {h.film or 'custom'}, {1000 * h.thickness:.3f} mm per ply, "
                     f"{h.plies} {'ply' if h.plies == 1 else 'plies'}"
                     + (f"; stress in the film {h.stress / 1e6:.1f} MPa" if h.stress else "")
                     + (f" (yield about {h.yield_stress / 1e6:.0f} MPa)" if h.yield_stress else "") + ".")
    body = drum.body
    if body.kind == "kettle":
        lines.append(f"Body: a kettle of {1000 * body.volume:.0f} L ({body.volume:.3f} m\u00b3).")
    elif body.kind == "shell":
        lines.append(f"Body: a shell {100 * body.depth:.1f} cm ({body.depth / 0.0254:.1f} in) deep"
                     + (", with a resonant head." if drum.resonant_head is not None else "."))
        r = drum.resonant_head
        if r is not None:
            lines.append(f"Resonant head: {100 * r.diameter:.1f} cm across, tension {r.tension:.0f} N/m, "
                         f"areal density {r.areal_density:.4f} kg/m\u00b2.")
    else:
        lines.append("Body: none (a single head in open air).")
    lines.append(f"Air: {drum.air.density:.3f} kg/m\u00b3, sound speed {drum.air.sound_speed:.1f} m/s.")
    return lines


def strike_picture(ax, modeset, advice, *, fontsize: float = 9.0) -> None:
    """The head seen from above: rim, centre, the nodal lines of (1,1), and where to strike."""
    from matplotlib.patches import Circle

    from .shape import nodal_lines

    ax.set_aspect("equal")
    ax.set_axis_off()
    ax.add_patch(Circle((0, 0), 1.0, facecolor="#f3efe6", edgecolor="0.15", linewidth=2.5))
    ax.plot([0], [0], marker="+", color="0.3", markersize=8)
    ax.annotate("centre", (0, 0), xytext=(6, 4), textcoords="offset points", fontsize=fontsize - 1,
                color="0.3")
    try:
        lines = nodal_lines(modeset.find(1, 1))
    except Exception:  # (1,1) not solved: no guide line
        lines = None
    if lines is not None:
        for line in draw_nodal_lines(ax, lines, linewidth=0.9):
            line.set_color("0.55")
            line.set_linestyle((0, (4, 3)))
        ax.annotate("nodal line\nof (1,1)", (0, -0.62), xytext=(-6, 0), textcoords="offset points",
                    fontsize=fontsize - 1, color="0.4", va="center", ha="right")
    ax.annotate("rim", (np.cos(2.4), np.sin(2.4)), xytext=(-14, 10), textcoords="offset points",
                fontsize=fontsize - 1, color="0.2", ha="right")
    if advice is not None:
        at = advice.radius_fraction
        ax.add_patch(Circle((0, 0), at, fill=False, edgecolor="#b2182b", linewidth=1.0, linestyle=":"))
        ax.plot([at], [0.0], marker="X", color="#b2182b", markersize=13, markeredgecolor="white")
        cm = 100 * modeset.drum.head.radius * (1 - at)
        ax.annotate("", (1.0, -0.12), xytext=(at, -0.12),
                    arrowprops=dict(arrowstyle="<->", color="0.2", lw=0.9, shrinkA=0, shrinkB=0))
        ax.text((1 + at) / 2, -0.17, f"{cm:.0f} cm", ha="center", va="top", fontsize=fontsize)
        ax.annotate(f"strike here\nr/a = {at:.2f}", (at, 0.0), xytext=(at - 0.2, 0.42), fontsize=fontsize,
                    ha="center", color="#b2182b", fontweight="bold",
                    bbox=dict(boxstyle="round,pad=0.15", fc="white", ec="none", alpha=0.9),
                    arrowprops=dict(arrowstyle="->", color="#b2182b", lw=1.0))
        ax.text(0.0, -1.12, "dotted: every point at this radius works as well", ha="center", va="top",
                fontsize=fontsize - 1, color="0.3")
    ax.set_xlim(-1.15, 1.15)
    ax.set_ylim(-1.3, 1.12)


def _cover(modeset, size, reference, fit, advice, sentences):
    from matplotlib.figure import Figure

    drum = modeset.drum
    fig = Figure(figsize=size)
    page = _Writer(fig, size)
    page.line(wrap_title(drum.name or "Drum", page.text_width, 17).split("\n")[0], pt=17, weight="bold")
    page.line("A workshop sheet made by membrane from a physical model of the drum", pt=9, colour="0.35")
    page.y += 0.05
    if drum.description:
        page.para(drum.description, pt=BODY_PT + 0.5)
    page.heading("The drum")
    page.bullets(drum_lines(drum))
    page.heading("Where to strike")
    picture_in = min(2.9, page.text_width * 0.45)
    top = page.y
    ax = page.axes(picture_in, width_in=picture_in)
    strike_picture(ax, modeset, advice)
    after = page.y
    page.y = top  # the advice beside the picture
    page.bullets(sentences, pt=BODY_PT - 0.5, x=picture_in + 0.25)
    page.y = max(page.y, after) + 0.1
    page.box("Cautions", [c for c in cautions()])
    page.heading("How to read these pages")
    page.bullets([
        "(m,n): m nodal diameters and n nodal circles, counting the rim. Nodal lines do not move.",
        f"Ratios are to ({reference[0]},{reference[1]}), "
        + ("the principal tone of a drum with a kettle." if reference == (1, 1) and
           drum.body.kind == "kettle" else "the reference mode."),
        "Page 2 lists the solved modes with their nearest notes; page 3 draws their shapes; page 4 "
        "places each mode against the best harmonic series, in cents (100 cents = one semitone).",
        f"Physics: {physics_words(modeset.physics)}."
        + (f" Best harmonic series through {mode_list(fit.fitted)}: "
           f"f0 = {fit.fundamental:.2f} Hz, rms deviation {fit.rms_cents:.1f} cents." if fit else
           " Too few modes were solved for a harmonic fit."),
    ], pt=BODY_PT - 0.5)
    return fig


def _table_page(modeset, size, reference, fit):
    from matplotlib.figure import Figure

    from ..modes import T60_SHOWN_MAX

    drum = modeset.drum
    fig = Figure(figsize=size)
    page = _Writer(fig, size)
    page.line(f"Modes of {drum.name}", pt=14, weight="bold")
    sub = f"{physics_words(modeset.physics)}; ratios to ({reference[0]},{reference[1]})"
    if fit is not None:
        sub += f"; harmonics of f0 = {fit.fundamental:.2f} Hz"
    page.para(sub, pt=9)
    cells = table_cells(modeset, reference=reference)
    columns, widths = list(TABLE_COLUMNS), list(TABLE_WIDTHS)
    columns[2] = f"ratio to\n({reference[0]},{reference[1]})"
    # a two-headed drum's labels name the head and branch: widen the mode column to fit them
    widths[0] = max(widths[0], 0.0125 * max((len(c[0]) for c in cells), default=0))
    if all(mode.decay is None for mode in modeset.modes):  # in vacuum: no decay column
        columns, widths, cells = columns[:-1], widths[:-1], [c[:-1] for c in cells]
    legend = [
        f"ratio: the mode's frequency over that of ({reference[0]},{reference[1]}). note: the nearest "
        "equal-tempered note (A4 = 440 Hz), and how many cents the mode lies above (+) or below (\u2212) it.",
    ]
    if fit is not None:
        legend.append(f"harmonic (fit): for the modes of the harmonic fit (shaded rows: "
                      f"{mode_list(fit.fitted)}), the whole multiple of "
                      f"f0 = {fit.fundamental:.2f} Hz each is taken as, and its distance from it in cents "
                      "(100 cents = one semitone). Other modes are not part of the fit.")
    if any(mode.decay is not None for mode in modeset.modes):
        source = "sound radiation alone" if getattr(modeset, "losses", "all") == "radiation" else \
            "sound radiation and the modelled losses in the film, the air and the rim"
        legend.append(f"T60: time for the mode to die away by 60 dB, from {source}; values "
                      f"beyond {T60_SHOWN_MAX:g} s show as \"> {T60_SHOWN_MAX:g}\".")
    notes = [sentence(n) for n in modeset.notes]
    # as many rows as leave room for the legend and the notes below the table
    below = page.measure(legend + ["The lowest 00 of 000 solved modes (membrane modes lists them all)."], pt=9) \
        + 0.45 + page.measure(notes, pt=9) + 0.15
    fit_rows = int((size[1] - MARGIN - page.y - below) / ROW_IN) - 2
    rows = max(1, min(len(cells), TABLE_ROWS, fit_rows))
    ax = page.axes(ROW_IN * (rows + 2))
    ax.set_axis_off()
    total = sum(widths)
    table = ax.table(cellText=cells[:rows], colLabels=columns, colWidths=[w / total for w in widths],
                     bbox=(0, 0, 1, 1), cellLoc="right", colLoc="right")
    table.auto_set_font_size(False)
    table.set_fontsize(9)
    fitted_rows = {i for i, row in enumerate(modeset.table(reference=reference)[:rows]) if row["fitted"]}
    for (r, c), cell in table.get_celld().items():
        cell.set_edgecolor("0.75")
        cell.set_linewidth(0.5)
        if c == 0:  # mode labels (with branch and head for two heads) read from the left
            cell._loc = "left"  # matplotlib's table takes one alignment for all cells, else this
            cell.get_text().set_horizontalalignment("left")
            cell.PAD = 0.03
        if r == 0:
            cell.set_height(cell.get_height() * 2)
            cell.set_text_props(fontweight="bold")
            cell.set_facecolor("#eeeeee")
        elif r - 1 in fitted_rows:
            cell.set_facecolor("#fbeaea")
    page.y += 0.15
    if len(cells) > rows:
        legend.insert(0, f"The lowest {rows} of {len(cells)} solved modes (membrane modes lists them all).")
    page.bullets(legend, pt=9)
    page.heading("What the model leaves out", pt=11)
    page.bullets(notes, pt=9)
    return fig


def handout_pages(modeset, *, compare=(), paper: str = "a4", reference=None, count: int = 12) -> list:
    """The handout's pages as matplotlib figures (see :func:`write_handout` for the parameters)."""
    from ..errors import InputError

    if paper not in PAPER:
        raise InputError("--paper", paper, f"must be one of: {', '.join(PAPER)}")
    size = PAPER[paper]
    reference = reference_of(modeset, reference)
    fit = modeset.harmonic_fit()
    advice, sentences = strike_advice(modeset)
    pages = [_cover(modeset, size, reference, fit, advice, sentences),
             _table_page(modeset, size, reference, fit)]
    # -- page 3: the mode grid, as large as the page allows
    two = getattr(modeset.drum, "resonant_head", None) is not None
    title = (f"Mode shapes of {modeset.drum.name}\nthe lowest {min(count, len(modeset.modes))} modes, "
             f"{physics_words(modeset.physics)}; ratios to ({reference[0]},{reference[1]})"
             + ("\neach disc shows the head named under its mode: the struck head, or the resonant head "
                "for the modes counted on it" if two else ""))
    title = wrap_title(title, size[0] - 2 * MARGIN, 10.5)  # inside the margins, not the paper's edge
    grid = mode_grid(modeset, count=count, columns=3, reference=reference, title=title,
                     width=size[0], height=size[1], fontsize=9.5)
    grid.get_layout_engine().set(rect=(MARGIN / size[0] * 0.6, MARGIN / size[1] * 0.6,
                                       1 - 1.2 * MARGIN / size[0], 1 - 1.2 * MARGIN / size[1]))
    pages.append(grid)
    # -- page 4: the ratio chart across the page, one panel per physics model
    explain = ("Each marker is one mode: across, its frequency over the fitted f0 (a perfectly harmonic "
               "partial sits on a whole number); up, how many cents it lies from the nearest harmonic "
               "(100 cents = one semitone). A drum sounds clearly pitched when its strongest partials "
               "crowd the zero line. Filled: the modes of the fit; hollow: the others; a triangle on the "
               "edge is a mode beyond the chart, its deviation written beside it.")
    foot = 0.2 + 0.17 * len(textwrap.wrap(explain, int((size[0] - 2 * MARGIN) * 72 / (GLYPH_EM * 9.5))))
    chart = ratio_chart([*compare, modeset], width=size[0], height=size[1], stack="rows", fontsize=9.0,
                        rect=(MARGIN / size[0] * 0.6, (MARGIN + foot) / size[1],
                              1 - 1.2 * MARGIN / size[0], 1 - (1.3 * MARGIN + foot) / size[1]))
    page = _Writer(chart, size)
    page.y = size[1] - MARGIN - foot + 0.15
    page.para(explain, pt=9.5)
    pages.append(chart)
    return pages


def write_handout(path, modeset, *, compare=(), paper: str = "a4", reference=None, count: int = 12,
                  progress=None) -> int:
    """Write the handout PDF.

    Parameters
    ----------
    path : path-like
        Output ``.pdf``.
    modeset : membrane.modes.ModeSet
        The drum solved under the physics the handout reports (table, grid).
    compare : sequence of ModeSet
        The same drum under other physics, shown above it in the ratio chart.
    paper : {"a4", "letter"}
        Page size.
    reference : (int, int), optional
        Mode the ratios are taken to; default the drum's principal.
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
