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

from .shape import CMAP, mode_caption, physics_words, sample

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


def draw_field(ax, mode, *, signs: bool = False, hatch: bool = False, radial: int | None = None,
               angular: int | None = None):
    """Draw one mode's displacement on an axes: colour, nodal lines, rim.

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

    Returns
    -------
    matplotlib.collections.QuadMesh
        The coloured field; ``get_array()`` holds w, ``get_coordinates()`` x, y.
    """
    kw = {k: v for k, v in (("radial", radial), ("angular", angular)) if v}
    field = sample(mode, **kw)
    x, y = field.xy
    mesh = ax.pcolormesh(x, y, field.w, shading="gouraud", cmap=CMAP, vmin=-1.0, vmax=1.0,
                         rasterized=True)
    inner = field.r < 0.995  # the rim is a node anyway: drawn as the rim, not as a contour
    # Where the head barely moves (below 0.1 % of the peak, e.g. near the centre of a mode
    # with many nodal diameters) the sign is numerical noise: no nodal line is drawn there.
    w = np.ma.masked_where(np.abs(field.w) < NOISE_FLOOR, field.w)[:, inner]
    ax.contour(x[:, inner], y[:, inner], w, levels=[0.0], colors=NODAL_COLOUR, linewidths=1.4)
    if hatch:
        ax.contourf(x[:, inner], y[:, inner], w, levels=[-2.0, 0.0], colors="none",
                    hatches=["///"])
    from matplotlib.patches import Circle

    ax.add_patch(Circle((0.0, 0.0), 1.0, fill=False, edgecolor=RIM_COLOUR, linewidth=2.0))
    if signs:
        for xs, ys, sign in antinodes(field.r, field.w[0], mode.m):
            ax.text(xs, ys, "+" if sign > 0 else "\u2212", ha="center", va="center",
                    fontsize=14, fontweight="bold", color="black")
    ax.set_aspect("equal")
    ax.set_xlim(-1.08, 1.08)
    ax.set_ylim(-1.08, 1.08)
    ax.set_axis_off()
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


def nodal_diagram(modeset, mode, *, reference: tuple[int, int] = (0, 1), size: float = 5.0):
    """One mode's nodal diagram: nodal diameters and circles, + and - regions.

    Parameters
    ----------
    modeset : membrane.modes.ModeSet
        Solved modes (for the ratio in the caption).
    mode : membrane.modes.Mode
        The mode, e.g. ``modeset.find(2, 1)``; for a shell, its struck head is drawn.
    reference : (int, int)
        Mode the ratio in the caption is taken to.
    size : float
        Figure width in inches.
    """
    fig = _figure((size, size * 1.12))
    ax = fig.add_subplot()
    draw_field(ax, mode, signs=True, hatch=True)
    ax.set_title(f"{mode_caption(modeset, mode, reference=reference)}\n"
                 f"{physics_words(modeset.physics)}", fontsize=10)
    fig.text(0.5, 0.01, "black lines: nodes (no motion); + and \u2212 (hatched) move in opposite directions",
             ha="center", va="bottom", fontsize=8)
    return fig


def mode_grid(modeset, *, count: int = 12, columns: int = 4, reference: tuple[int, int] = (0, 1),
              title: str | None = None, width: float = 10.0):
    """The first ``count`` modes by frequency, each labelled (m,n), frequency and ratio.

    Parameters
    ----------
    modeset : membrane.modes.ModeSet
        Solved modes (sorted by frequency).
    count : int
        How many modes to draw (at most the number solved).
    columns : int
        Panels per row.
    reference : (int, int)
        Mode the ratios are taken to.
    title : str, optional
        Figure title; default the drum's name and the physics.
    width : float
        Figure width in inches.
    """
    modes = list(modeset.modes)[:count]
    rows = -(-len(modes) // columns)
    fig = _figure((width, width / columns * rows * 1.2 + 0.6))
    axes = fig.subplots(rows, columns, squeeze=False).ravel()
    mesh = None
    for ax, mode in zip(axes, modes):
        mesh = draw_field(ax, mode, **PANEL_GRID)
        ax.set_title(mode_caption(modeset, mode, reference=reference, short=True).replace("  ", "\n", 1),
                     fontsize=9)
    for ax in axes[len(modes):]:
        ax.set_axis_off()
    drum = getattr(modeset.drum, "name", "") or "drum"
    fig.suptitle(title or f"{drum}\nfirst {len(modes)} modes by frequency, {physics_words(modeset.physics)}; "
                 f"ratios to ({reference[0]},{reference[1]})", fontsize=10)
    if mesh is not None:
        bar = fig.colorbar(mesh, ax=list(axes), shrink=0.5, aspect=30, pad=0.02)
        bar.set_label("displacement (peak 1); black lines are nodes", fontsize=8)
    return fig


def ratio_points(modeset, *, fit_modes=None, span: float = 1.3):
    """What the ratio chart plots for one physics model.

    Returns
    -------
    (HarmonicFit, list of dict)
        The fit, and one dict per mode up to ``span`` times the highest fitted
        frequency: ``label, m, n, harmonic_ratio`` (f / f0), ``cents`` (from the
        nearest harmonic) and ``fitted`` (bool).
    """
    fit = modeset.harmonic_fit(fit_modes)
    f0 = fit.fundamental
    top = span * max(modeset.find(m, n).frequency for m, n in fit.fitted)
    points = []
    for mode in modeset.modes:
        if mode.frequency > top:
            continue
        h = mode.frequency / f0
        nearest = max(1, int(round(h)))
        fitted = (mode.m, mode.n) in fit.harmonics and mode.head != "resonant" and \
            modeset.find(mode.m, mode.n) is mode
        points.append({"label": mode.label, "m": mode.m, "n": mode.n, "harmonic_ratio": h,
                       "cents": 1200.0 * np.log2(h / nearest), "fitted": fitted})
    return fit, points


def ratio_chart(modesets, *, fit_modes=None, width: float = 11.0, height: float = 4.2):
    """Each mode against the best harmonic series, one panel per physics model.

    x is the mode's frequency in units of the fitted f0 (so harmonics sit on whole
    numbers), y its deviation in cents from the nearest harmonic. Filled markers are
    the modes the fit used, hollow ones the rest.

    Parameters
    ----------
    modesets : sequence of membrane.modes.ModeSet
        The same drum solved under one or more physics models, drawn side by side.
    fit_modes : list of (int, int), optional
        Modes for the harmonic fit; default :meth:`ModeSet.harmonic_fit`'s.
    """
    modesets = list(modesets)
    fig = _figure((max(width * len(modesets) / 3.0, 5.5), height))
    axes = fig.subplots(1, len(modesets), sharey=True, squeeze=False)[0]
    for ax, modeset in zip(axes, modesets):
        fit, points = ratio_points(modeset, fit_modes=fit_modes)
        hmax = max(p["harmonic_ratio"] for p in points)
        label_all = len(points) <= LABEL_ALL_UP_TO  # else only the fitted modes, to stay legible
        for h in range(1, int(hmax) + 2):
            ax.axvline(h, color="0.8", linewidth=0.8, zorder=0)
        ax.axhline(0.0, color="0.4", linewidth=0.8, zorder=0)
        ax.axhspan(-10, 10, color="0.92", zorder=0)
        for p in points:
            filled = p["fitted"]
            ax.plot([p["harmonic_ratio"]], [p["cents"]], marker="o" if filled else "s",
                    markersize=7 if filled else 5, linestyle="none",
                    markerfacecolor="#b2182b" if filled else "white",
                    markeredgecolor="#b2182b" if filled else "0.35", gid=p["label"])
            if filled or label_all:
                ax.annotate(f"({p['m']},{p['n']})", (p["harmonic_ratio"], p["cents"]),
                            textcoords="offset points", xytext=(4, 4), fontsize=7 if filled else 6,
                            color="black" if filled else "0.35")
        top = int(hmax) + 1
        ax.set_xlim(0.5, top + 0.5)
        ax.set_xticks(range(1, top + 1, 1 if top <= 10 else 2))
        ax.set_xlabel("f / f0")
        ax.set_title(f"{modeset.physics}: f0 = {fit.fundamental:.1f} Hz\n"
                     f"rms {fit.rms_cents:.1f} cents over {len(fit.fitted)} modes", fontsize=9)
    axes[0].set_ylabel("cents from nearest harmonic")
    drum = getattr(modesets[0].drum, "name", "") or "drum"
    fig.suptitle(f"{drum}\nmodes against the best harmonic series (harmonics at whole numbers)\n"
                 "filled: modes in the fit; hollow: the others; grey band: within 10 cents", fontsize=10)
    return fig


def save(fig, path, *, dpi: int = 150) -> None:
    """Write a figure to ``path`` (format from the suffix), fonts embedded as text."""
    import matplotlib

    with matplotlib.rc_context({"pdf.fonttype": 42, "ps.fonttype": 42, "svg.fonttype": "none"}):
        fig.savefig(path, dpi=dpi, format=str(path).rsplit(".", 1)[-1].lower())
