"""The ratio chart: each mode against the best harmonic series, in cents, one panel per physics.

x is a mode's frequency in units of the fitted f0 (harmonics on whole numbers), y its distance
in cents from the nearest harmonic (:meth:`membrane.modes.ModeSet.harmonic_fit`). Returns a
matplotlib Figure; matplotlib is imported inside the functions.
"""

from __future__ import annotations

import numpy as np

from ..notation import cents, mode_label
from .shape import physics_words, wrap_title

LABEL_ALL_UP_TO = 16  # the ratio chart names every mode only when there are this few


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
    from .labels import laid_out_renderer, place_labels
    from .stills import blank_figure

    modesets = list(modesets)
    rows = stack == "rows"
    size = (width, height) if rows else (max(width * len(modesets) / 3.0, 5.5), height)
    fig = blank_figure(size)
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
    renderer = laid_out_renderer(fig) if pending else None  # one layout for every panel's labels
    for ax, spots, texts, colours, downs, all_points in pending:  # last: labels need the final layout
        place_labels(ax, spots, texts, fontsize=fontsize - 0.5, colors=colours, below=downs,
                     renderer=renderer,
                     obstacles=[q for q in all_points if q not in spots])
    if pending:
        fig.set_layout_engine("none")  # keep the layout the labels were placed in
    return fig
