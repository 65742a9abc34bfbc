"""Still pictures with matplotlib: a nodal diagram, a grid of modes, the ratio chart.

Each function returns a :class:`matplotlib.figure.Figure` (nothing is shown or
saved), so the same figure goes to a PNG, an SVG or a page of the handout. The
field is drawn with ``pcolormesh`` (Gouraud shading) on the polar grid of
:func:`membrane.render.shape.sample`, so its data can be read back from the axes;
the nodal lines are the zero contour of that same field. matplotlib is imported
inside the functions, so importing this module is cheap.
"""

from __future__ import annotations

import numpy as np

from ..notation import cents, mode_label

from .shape import (CMAP, drawn_head, head_words, mode_caption, nodal_lines, physics_words, reference_of,
                    sample, wrap_title)

NODAL_COLOUR = "black"
# A grid panel is small: a coarser polar grid looks the same and draws 2-3x faster.
PANEL_GRID = {"radial": 81, "angular": 121}
LABEL_ALL_UP_TO = 16  # the ratio chart names every mode only when there are this few
RIM_COLOUR = "0.15"


def _figure(size):
    from matplotlib.figure import Figure

    # A bare Figure needs no GUI backend: safe with no display.
    return Figure(figsize=size, layout="constrained")


NOISE_FLOOR = 1e-3  # fraction of the peak displacement below which the sign is not drawn
DIAMETER_GID = "nodal diameter"
CIRCLE_GID = "nodal circle"
CONTOUR_GID = "nodal contour"
ARC_POINTS = 361  # a nodal circle drawn as a closed polygon of this many points (1 degree apart)


def draw_nodal_lines(ax, lines, *, linewidth: float = 1.4):
    """Draw nodal diameters (whole, rim to rim through the centre) and circles (closed).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes in units of the head's radius.
    lines : membrane.render.shape.NodalLines
        Angles of the diameters (rad) and radii of the circles (r/a).

    Returns
    -------
    list of matplotlib.lines.Line2D
        One line per diameter (gid ``"nodal diameter"``) and per circle (``"nodal circle"``).
    """
    drawn = []
    for angle in lines.diameters:
        c, s = np.cos(angle), np.sin(angle)
        drawn += ax.plot([-c, c], [-s, s], color=NODAL_COLOUR, linewidth=linewidth, solid_capstyle="butt",
                         gid=DIAMETER_GID, zorder=3)
    phi = np.linspace(0.0, 2.0 * np.pi, ARC_POINTS)
    for radius in lines.circles:
        drawn += ax.plot(radius * np.cos(phi), radius * np.sin(phi), color=NODAL_COLOUR,
                         linewidth=linewidth, gid=CIRCLE_GID, zorder=3)
    return drawn


def draw_field(ax, mode, *, signs: bool = False, hatch: bool = False, radial: int | None = None,
               angular: int | None = None, resonant: bool | None = None, linewidth: float = 1.4):
    """Draw one mode's displacement on an axes: colour, nodal lines, rim.

    The nodal lines come from the mode's own structure (:func:`~membrane.render.shape.nodal_lines`:
    m diameters where cos(m theta) vanishes, circles at the zeros of the solver's radial
    shape), each drawn whole. Only a mode whose structure is unknown gets the zero
    contour of the sampled field instead.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Cartesian axes; x and y are in units of the head's radius.
    mode : membrane.modes.Mode
        The mode; its solver shape is sampled (see :func:`~membrane.render.shape.sample`).
    signs : bool
        Write + and - on each antinode region (reads in grey print).
    hatch : bool
        Hatch the regions moving down, for print without colour.
    radial, angular : int, optional
        Grid size (defaults from :mod:`membrane.render.shape`).
    resonant : bool, optional
        Draw a shell's resonant head; default the head the mode is counted on.
    linewidth : float
        Width of the nodal lines in points.

    Returns
    -------
    matplotlib.collections.QuadMesh
        The coloured field; ``get_array()`` holds w, ``get_coordinates()`` x, y.
    """
    kw = {k: v for k, v in (("radial", radial), ("angular", angular)) if v}
    if resonant is None:
        resonant = drawn_head(mode)
    field = sample(mode, resonant=resonant, **kw)
    w_all = field.w
    if resonant:  # the resonant head on its own colour scale (its motion can be far smaller)
        peak = np.max(np.abs(w_all))
        w_all = w_all / peak if peak > 0 else w_all
    x, y = field.xy
    mesh = ax.pcolormesh(x, y, w_all, shading="gouraud", cmap=CMAP, vmin=-1.0, vmax=1.0,
                         rasterized=True)
    inner = field.r < 0.995  # the rim is a node anyway: drawn as the rim, not as a line
    w = np.ma.masked_where(np.abs(w_all) < NOISE_FLOOR, w_all)[:, inner]
    lines = nodal_lines(mode, resonant=resonant)
    if lines is not None:
        draw_nodal_lines(ax, lines, linewidth=linewidth)
    else:  # structure unknown: the zero contour of the sampled field
        ax.contour(x[:, inner], y[:, inner], w, levels=[0.0], colors=NODAL_COLOUR, linewidths=linewidth)
    if hatch:
        ax.contourf(x[:, inner], y[:, inner], w, levels=[-2.0, 0.0], colors="none",
                    hatches=["///"])
    from matplotlib.patches import Circle

    ax.add_patch(Circle((0.0, 0.0), 1.0, fill=False, edgecolor=RIM_COLOUR, linewidth=2.0))
    if signs:
        for xs, ys, sign in antinodes(field.r, w_all[0], mode.m):
            ax.text(xs, ys, "+" if sign > 0 else "\u2212", ha="center", va="center",
                    fontsize=14, fontweight="bold", color="black",
                    bbox=dict(boxstyle="circle,pad=0.05", fc="white", ec="none", alpha=0.6))
    ax.set_aspect("equal")
    ax.set_xlim(-1.08, 1.08)
    ax.set_ylim(-1.08, 1.08)
    ax.set_axis_off()
    # No ticks at all (the axis is off, so none is drawn): otherwise the layout still sets
    # out every tick label of every panel, most of the time of saving a grid.
    ax.set_xticks([])
    ax.set_yticks([])
    return mesh


def antinodes(r, shape, m: int):
    """Centre and sign of each region between nodal lines.

    Parameters
    ----------
    r : numpy.ndarray
        Radii r/a.
    shape : numpy.ndarray
        Radial shape at theta = 0 on those radii.
    m : int
        Nodal diameters.

    Returns
    -------
    list of (x, y, sign)
    """
    inner = r < 0.995
    r, shape = r[inner], shape[inner]
    shape = np.where(np.abs(shape) < NOISE_FLOOR, 0.0, shape)  # noise is no region
    cuts = np.flatnonzero(np.sign(shape[1:]) * np.sign(shape[:-1]) < 0) + 1
    out = []
    for seg in np.split(np.arange(r.size), cuts):
        i = seg[np.argmax(np.abs(shape[seg]))]
        rad, value = r[i], shape[i]
        if m == 0:
            out.append((0.0 if i == 0 else rad * np.cos(np.pi / 4), 0.0 if i == 0 else rad * np.sin(np.pi / 4),
                        np.sign(value)))
            continue
        for k in range(2 * m):
            angle = k * np.pi / m
            out.append((rad * np.cos(angle), rad * np.sin(angle), np.sign(value) * (-1) ** k))
    return out


def nodal_diagram(modeset, mode, *, reference: tuple[int, int] | None = None, size: float = 5.0):
    """One mode's nodal diagram: nodal diameters and circles, + and - regions.

    Parameters
    ----------
    modeset : membrane.modes.ModeSet
        Solved modes (for the ratio in the caption).
    mode : membrane.modes.Mode
        The mode, e.g. ``modeset.find(2, 1)``; drawn on the head it is counted on.
    reference : (int, int), optional
        Mode the ratio in the caption is taken to; default the drum's principal.
    size : float
        Figure width in inches.
    """
    fig = _figure((size, size * 1.16))
    ax = fig.add_subplot()
    draw_field(ax, mode, signs=True, hatch=True)
    head = head_words(modeset, mode)
    title = f"{mode_caption(modeset, mode, reference=reference_of(modeset, reference))}\n" \
        f"{physics_words(modeset.physics)}" + (f"; {head} shown" if head else "")
    # a figure title: the layout engine makes room for it (an axes title can be pushed off the top)
    fig.suptitle(wrap_title(title, size * 0.92, 10), fontsize=10)
    fig.text(0.5, 0.01, wrap_title("black lines: nodes (no motion); + and \u2212 (hatched) move in "
                                   "opposite directions", size * 0.95, 8), ha="center", va="bottom", fontsize=8)
    return fig


def grid_caption(modeset, mode, reference) -> str:
    """A grid panel's caption: the mode, its frequency and ratio, and for two heads which one is shown."""
    label, rest = mode_caption(modeset, mode, reference=reference, short=True).split("  ", 1)
    head = head_words(modeset, mode)
    if head and "head" not in label:
        label = f"{label}\n{head}"
    elif head:  # the label names the resonant head already
        label = label.replace(", resonant head", "\nresonant head").replace(", struck head", "\nstruck head")
    return f"{label}\n{rest.replace('  ', '   ')}"


def mode_grid(modeset, *, count: int = 12, columns: int = 4, reference: tuple[int, int] | None = None,
              title: str | None = None, width: float = 10.0, height: float | None = None,
              fontsize: float = 9.0):
    """The first ``count`` modes by frequency, each labelled (m,n), frequency and ratio.

    Parameters
    ----------
    modeset : membrane.modes.ModeSet
        Solved modes (sorted by frequency).
    count : int
        How many modes to draw (at most the number solved).
    columns : int
        Panels per row.
    reference : (int, int), optional
        Mode the ratios are taken to; default the drum's principal.
    title : str, optional
        Figure title; default the drum's name and the physics.
    width, height : float
        Figure size in inches (height: default from the rows).
    fontsize : float
        Panel captions in points.
    """
    reference = reference_of(modeset, reference)
    modes = list(modeset.modes)[:count]
    rows = -(-len(modes) // columns)
    two_heads = getattr(modeset.drum, "resonant_head", None) is not None
    per_row = width / columns * (1.28 if two_heads else 1.18)
    fig = _figure((width, height or per_row * rows + 1.4))
    axes = fig.subplots(rows, columns, squeeze=False).ravel()
    mesh = None
    for ax, mode in zip(axes, modes):
        mesh = draw_field(ax, mode, **PANEL_GRID)
        ax.set_title(grid_caption(modeset, mode, reference), fontsize=fontsize, linespacing=1.15)
    for ax in axes[len(modes):]:
        ax.set_axis_off()
    drum = getattr(modeset.drum, "name", "") or "drum"
    if title is None:
        title = (f"{drum}\nfirst {len(modes)} modes by frequency, {physics_words(modeset.physics)}; "
                 f"ratios to ({reference[0]},{reference[1]})")
    fig.suptitle(wrap_title(title, width * 0.95, fontsize + 1), fontsize=fontsize + 1)
    if mesh is not None:
        bar = fig.colorbar(mesh, ax=list(axes), orientation="horizontal", shrink=0.45, aspect=35,
                           pad=0.02, ticks=[-1, 0, 1])
        bar.ax.set_xticklabels(["down", "0", "up"], fontsize=fontsize)
        bar.set_label("displacement at one instant (peak 1"
                      + ("; each head on its own scale" if two_heads else "")
                      + ")\nblack lines are nodes (no motion)", fontsize=fontsize)
    return fig


def _short_label(mode) -> str:
    """(m,n) with a shell's branch and head abbreviated, for crowded charts."""
    words = {"in-phase": " in-ph.", "opposed": " opp."}.get(mode.branch or "", "")
    return f"{mode_label(mode.m, mode.n)}{words}" + (" res." if mode.head == "resonant" else "")


def ratio_points(modeset, *, fit_modes=None, span: float = 1.3):
    """What the ratio chart plots for one physics model.

    Returns
    -------
    (HarmonicFit or None, list of dict)
        The fit, and one dict per mode up to ``span`` times the highest fitted
        frequency: ``label, short, m, n, harmonic_ratio`` (f / f0), ``cents`` (from
        the nearest harmonic) and ``fitted`` (bool). No fit (fewer than three modes):
        (None, []).
    """
    fit = modeset.harmonic_fit(fit_modes)
    if fit is None:
        return None, []
    f0 = fit.fundamental
    top = span * max(modeset.find(m, n).frequency for m, n in fit.fitted)
    points = []
    for mode in modeset.modes:
        if mode.frequency > top:
            continue
        h = mode.frequency / f0
        nearest = max(1, int(round(h)))
        points.append({"label": mode.label, "short": _short_label(mode), "m": mode.m, "n": mode.n,
                       "harmonic_ratio": h, "cents": cents(h, nearest),
                       "fitted": modeset.is_fitted(mode, fit)})
    return fit, points


CENTS_MIN_SPAN = 100.0  # the chart shows at least +/- this many cents
FIT_COLOUR = "#b2182b"


def cents_span(points) -> float:
    """Half-height of the chart in cents: room for the fitted modes, outliers clipped.

    The fitted modes decide the scale (1.3 x their largest deviation, at least
    +/- 100 cents, in steps of 10); any other mode beyond it is drawn on the edge,
    with its value written beside it, instead of squashing the band of interest.
    """
    fitted = [abs(p["cents"]) for p in points if p["fitted"]] or [abs(p["cents"]) for p in points] or [0.0]
    return float(min(600.0, max(CENTS_MIN_SPAN, 10.0 * np.ceil(1.3 * max(fitted) / 10.0))))


def ratio_chart(modesets, *, fit_modes=None, width: float = 11.0, height: float = 4.2,
                stack: str = "columns", fontsize: float = 8.0, title: bool = True, rect=None):
    """Each mode against the best harmonic series, one panel per physics model.

    x is the mode's frequency in units of the fitted f0 (so harmonics sit on whole
    numbers), y its deviation in cents from the nearest harmonic. Filled markers are
    the modes the fit used, hollow ones the rest; a mode beyond the chart's height is
    drawn as a triangle on its edge, with its deviation written out. Labels are placed
    so they do not overlap (leader lines where they had to move out).

    Parameters
    ----------
    modesets : sequence of membrane.modes.ModeSet
        The same drum solved under one or more physics models.
    fit_modes : list of (int, int), optional
        Modes for the harmonic fit; default :meth:`ModeSet.harmonic_fit`'s.
    width, height : float
        Figure size in inches.
    stack : {"columns", "rows"}
        Panels side by side, or one above the other (a portrait page).
    fontsize : float
        Labels in points (titles one larger).
    title : bool
        Give the figure its explaining title.
    rect : (float, float, float, float), optional
        Part of the figure the panels fill (left, bottom, width, height as fractions),
        leaving the rest for text; default all of it.
    """
    from .labels import _canvas, place_labels

    modesets = list(modesets)
    rows = stack == "rows"
    size = (width, height) if rows else (max(width * len(modesets) / 3.0, 5.5), height)
    fig = _figure(size)
    if rect is not None:
        fig.get_layout_engine().set(rect=rect)
    shape = (len(modesets), 1) if rows else (1, len(modesets))
    axes = fig.subplots(*shape, squeeze=False).ravel()
    pending = []
    for ax, modeset in zip(axes, modesets):
        fit, points = ratio_points(modeset, fit_modes=fit_modes)
        if fit is None:
            ax.set_axis_off()
            ax.text(0.5, 0.5, f"{modeset.physics}: no harmonic fit\n(fewer than 3 modes solved)",
                    ha="center", va="center", fontsize=fontsize + 1, transform=ax.transAxes)
            continue
        span = cents_span(points)
        hmax = max(p["harmonic_ratio"] for p in points)
        top = int(hmax) + 1
        for h in range(1, top + 1):
            ax.axvline(h, color="0.82", linewidth=0.8, zorder=0)
        ax.axhline(0.0, color="0.4", linewidth=0.8, zorder=0)
        ax.axhspan(-10, 10, color="0.92", zorder=0)
        label_all = len(points) <= LABEL_ALL_UP_TO  # else only the fitted modes, to stay legible
        spots, texts, colours, downs = [], [], [], []
        for p in points:
            filled = p["fitted"]
            y = p["cents"]
            clipped = abs(y) > span
            shown = float(np.clip(y, -0.94 * span, 0.94 * span))
            marker = ("^" if y > 0 else "v") if clipped else ("o" if filled else "s")
            ax.plot([p["harmonic_ratio"]], [shown], marker=marker,
                    markersize=7 if filled else 5.5, linestyle="none",
                    markerfacecolor=FIT_COLOUR if filled else "white",
                    markeredgecolor=FIT_COLOUR if filled else "0.35", gid=p["label"], clip_on=False)
            if filled or label_all or clipped:
                downs.append(clipped and y > 0)  # on the top edge: label it below, inside the chart
                spots.append((p["harmonic_ratio"], shown))
                texts.append(p["short"] + (f" {y:+.0f} c" if clipped else ""))
                colours.append("black" if filled else "0.3")
        pending.append((ax, spots, texts, colours, downs,
                        [(p["harmonic_ratio"], float(np.clip(p["cents"], -0.94 * span, 0.94 * span)))
                         for p in points]))
        ax.set_xlim(0.5, top + 0.5)
        ax.set_ylim(-span, span)
        ax.set_xticks(range(1, top + 1, 1 if top <= 12 else 2))
        ax.tick_params(labelsize=fontsize)
        ax.set_xlabel("f / f0 (harmonics at whole numbers)", fontsize=fontsize)
        if rows or ax is axes[0]:
            ax.set_ylabel("cents from nearest harmonic", fontsize=fontsize)
        panel_width = size[0] / (1 if rows else len(modesets))
        ax.set_title(wrap_title(f"{physics_words(modeset.physics)}\nf0 = {fit.fundamental:.1f} Hz, "
                                f"rms {fit.rms_cents:.1f} cents over {len(fit.fitted)} modes",
                                panel_width * 0.95, fontsize + 1), fontsize=fontsize + 1)
    if title:
        drum = getattr(modesets[0].drum, "name", "") or "drum"
        fig.suptitle(wrap_title(f"{drum}\nmodes against the best harmonic series; filled: modes in the fit; "
                                "hollow: the others; triangles: beyond the chart (value written); "
                                "grey band: within 10 cents", size[0] * 0.95, fontsize + 2), fontsize=fontsize + 2)
    renderer = _canvas(fig) if pending else None  # one layout for every panel's labels
    for ax, spots, texts, colours, downs, all_points in pending:  # last: labels need the final layout
        place_labels(ax, spots, texts, fontsize=fontsize - 0.5, colors=colours, below=downs,
                     renderer=renderer,
                     obstacles=[q for q in all_points if q not in spots])
    if pending:
        fig.set_layout_engine("none")  # keep the layout the labels were placed in
    return fig


def save(fig, path, *, dpi: int = 150) -> None:
    """Write a figure to ``path`` (format from the suffix), fonts embedded as text."""
    import matplotlib

    with matplotlib.rc_context({"pdf.fonttype": 42, "ps.fonttype": 42, "svg.fonttype": "none"}):
        fig.savefig(path, dpi=dpi, format=str(path).rsplit(".", 1)[-1].lower())
