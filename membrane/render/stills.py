"""Still pictures of mode shapes with matplotlib: a nodal diagram, a grid of modes.

The ratio chart (the modes against a harmonic series) is :mod:`membrane.render.ratio_chart`;
its names are importable from here too.

Each function returns a :class:`matplotlib.figure.Figure` (nothing is shown or
saved), so the same figure goes to a PNG, an SVG or a page of the handout. The
field is drawn with ``pcolormesh`` (Gouraud shading) on the polar grid of
:func:`membrane.render.shape.sample`, so its data can be read back from the axes;
the nodal lines are the zero contour of that same field. matplotlib is imported
inside the functions, so importing this module is cheap.
"""

from __future__ import annotations

import numpy as np

from .shape import (CMAP, drawn_head, head_words, mode_caption, nodal_lines, physics_words, reference_of,
                    sample, wrap_title)

NODAL_COLOUR = "black"
# A grid panel is small: a coarser polar grid looks the same and draws 2-3x faster.
PANEL_GRID = {"radial": 81, "angular": 121}
RIM_COLOUR = "0.15"
# zlib level 3 rather than Pillow's 6: measured on a mode grid (1500 x 1537 px), 0.14 s instead
# of 0.34 s to encode for a file 13 % larger (level 1: 0.10 s, 21 % larger). Lossless either way.
PNG_OPTIONS = {"compress_level": 3}


def blank_figure(size):
    """An empty constrained-layout Figure of ``size`` inches (no GUI backend needed)."""
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
    fig = blank_figure((size, size * 1.16))
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
    fig = blank_figure((width, height or per_row * rows + 1.4))
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


def save(fig, path, *, dpi: int = 150) -> None:
    """Write a figure to ``path`` (format from the suffix), fonts embedded as text."""
    import matplotlib

    fmt = str(path).rsplit(".", 1)[-1].lower()
    extra = {"pil_kwargs": PNG_OPTIONS} if fmt == "png" else {}
    with matplotlib.rc_context({"pdf.fonttype": 42, "ps.fonttype": 42, "svg.fonttype": "none"}):
        fig.savefig(path, dpi=dpi, format=fmt, **extra)


from .ratio_chart import cents_span, ratio_chart, ratio_points  # noqa: E402,F401  (their older home)
