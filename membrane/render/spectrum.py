"""The spectrum picture of a tap recording (``membrane listen --plot``), from data.

One level scale: the upper panel is the measured spectrum in dB re its highest peak,
and each partial found is marked on it at the spectrum's own level; the lower panel
shows each partial's decay time (T60) on the same frequency axis. With a drum model,
the matched modes are dashed lines labelled (m,n), placed so no label covers another.
The frequency axis defaults to the band that holds the identified partials (1.5 times
the highest matched one), so a low drum's partials are not crowded into a corner.
matplotlib is imported inside the function.
"""

from __future__ import annotations

import numpy as np

from ..notation import mode_label
BAND_FACTOR = 1.5  # the axis runs to this many times the highest matched (or loud) partial
LOUD_DB = -40.0  # without a model: the band holds the partials within this of the strongest
MODEL_COLOUR = "tab:blue"
PARTIAL_COLOUR = "tab:red"
# label offsets (points) above a peak, nearest first: straight up, then stepped up and aside
_LABEL_OFFSETS = tuple((dx, dy) for dy in (8.0, 20.0, 32.0, 44.0, 56.0) for dx in (0.0, -14.0, 14.0))


def band_top(partials, matches=()) -> float:
    """Upper end of the frequency axis in Hz (see the module docstring)."""
    if matches:
        return BAND_FACTOR * max(max(mt.partial.frequency, mt.model_frequency) for mt in matches)
    loudest = max(p.level_db for p in partials)
    loud = [p.frequency for p in partials if p.level_db >= loudest + LOUD_DB] or [p.frequency for p in partials]
    return BAND_FACTOR * max(loud)


def spectrum_figure(frequencies, level_db, partials, *, ident=None, name: str = "", top: float | None = None):
    """The spectrum picture as a matplotlib Figure.

    Parameters
    ----------
    frequencies, level_db : numpy.ndarray
        The measured spectrum: Hz, and dB re its highest peak.
    partials : sequence
        Partials found, each with ``frequency`` (Hz), ``level_db`` and ``t60`` (s or None).
    ident : membrane.identify.Identification, optional
        Modes matched to the partials (``matches``, ``splits``, ``tension``, ``rms_cents``).
    name : str
        The recording's name, for the title.
    top : float, optional
        Upper end of the frequency axis in Hz; default :func:`band_top`.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.figure import Figure

    from .labels import place_labels
    from .shape import wrap_title

    freqs = np.asarray(frequencies, dtype=float)
    level = np.asarray(level_db, dtype=float)
    matches = list(ident.matches) if ident is not None else []
    top = top or band_top(partials, matches)
    shown = [p for p in partials if p.frequency <= top]
    hidden = len(partials) - len(shown)
    keep = freqs <= top
    fig = Figure(figsize=(11, 7.5), dpi=110, layout="constrained")
    ax, bx = fig.subplots(2, 1, sharex=True, gridspec_kw={"height_ratios": [3, 1.6]})
    ax.plot(freqs[keep], level[keep], color="0.35", lw=0.7,
            label="measured spectrum (falling half-Hann window from the strike)")
    f_found = np.array([p.frequency for p in shown])
    at_level = np.interp(f_found, freqs, level) if shown else np.array([])
    ax.plot(f_found, at_level, "o", ms=4.5, color=PARTIAL_COLOUR, label="partials found", zorder=3)
    floor = max(float(level[keep].min()) if keep.any() else -100.0, -100.0)
    ax.set_ylim(floor, 12.0)
    spots, texts = [], []
    if ident is not None:
        seen = set()
        for mt in matches:
            key = (mt.m, mt.n, mt.branch, mt.head)
            if key in seen or mt.model_frequency > top:
                continue  # the other half of a split: one line, one label
            seen.add(key)
            for axis in (ax, bx):
                axis.axvline(mt.model_frequency, color=MODEL_COLOUR, lw=0.7, ls="--", zorder=1,
                             label="model modes at the fitted tension" if len(seen) == 1 and axis is ax else None)
            peak = float(np.interp(mt.partial.frequency, freqs, level))
            spots.append((mt.partial.frequency, peak))
            texts.append(mode_label(mt.m, mt.n) + (" res." if mt.head == "resonant" else ""))
        title = (f"{name}: fitted tension {ident.tension:.0f} N/m, {len(ident.matches)} partials "
                 f"labelled, rms {ident.rms_cents:.1f} cents")
    else:
        title = f"{name}: {len(partials)} partials"
    if hidden:
        title += f" ({hidden} above {top:.0f} Hz not shown)"
    ax.set_ylabel("level (dB re the highest peak)")
    ax.set_title(title)
    ax.legend(loc="upper right", fontsize=8, framealpha=0.9)
    ax.grid(alpha=0.3)
    # lower panel: how long each partial rings, on the same frequency axis
    t60 = np.array([p.t60 if p.t60 is not None else np.nan for p in shown], dtype=float)
    finite = np.isfinite(t60) & (t60 > 0)
    if finite.any():
        bx.vlines(f_found[finite], 1e-3, t60[finite], color="0.7", lw=1.0)
        bx.plot(f_found[finite], t60[finite], "o", ms=4.5, color=PARTIAL_COLOUR, zorder=3)
        low, high = np.nanmin(t60[finite]), np.nanmax(t60[finite])
        bx.set_yscale("log")
        bx.set_ylim(low / 2.0, high * 2.0)
    if (~finite).any():
        bx.plot(f_found[~finite], np.full((~finite).sum(), bx.get_ylim()[0] * 1.2 if finite.any() else 0.5),
                "s", ms=4, color="k", label="no decay measured")
        bx.legend(loc="upper right", fontsize=8)
    splits = [sp for sp in (ident.splits if ident is not None else ()) if sp.high.frequency <= top]
    if splits:  # ringed on the spectrum, named in one line (labels on the peaks would collide)
        ring = [f for sp in splits for f in (sp.low.frequency, sp.high.frequency)]
        ax.plot(ring, np.interp(ring, freqs, level), "o", ms=9, mfc="none", mec=PARTIAL_COLOUR, mew=1.0,
                label="split pairs (uneven tension)", zorder=3)
        ax.legend(loc="upper right", fontsize=8, framealpha=0.9)
        words = "; ".join(f"{mode_label(sp.m, sp.n)} beat {sp.beat_frequency:.2f} Hz" for sp in splits)
        bx.set_title(wrap_title(f"split pairs: {words}", 10.5, 9), fontsize=9, color=PARTIAL_COLOUR, loc="left")
    bx.set_xlim(0, top)
    bx.set_xlabel("frequency (Hz)")
    bx.set_ylabel("measured T60 (s)")  # the recording's decay, not a model's: no losses to name
    bx.grid(alpha=0.3, which="both")
    if spots:
        place_labels(ax, spots, texts, candidates=_LABEL_OFFSETS, fontsize=8,
                     colors=[MODEL_COLOUR] * len(texts), obstacles=list(zip(f_found, at_level)),
                     gid_prefix="mode", background=True)
        fig.set_layout_engine("none")  # keep the layout the labels were placed in
    return fig


def write_spectrum_png(path, frequencies, level_db, partials, *, ident=None, name: str = "") -> None:
    """:func:`spectrum_figure` written to ``path`` as a PNG (the caller makes it atomic)."""
    spectrum_figure(frequencies, level_db, partials, ident=ident, name=name).savefig(path, format="png")
