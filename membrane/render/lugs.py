"""The lug map: the head from above with its uneven rim tension, the lugs and the split (1,1).

Drawn in units of the head's radius. Around the rim a band shows the rim tension of the
model (its deviation from the mean, exaggerated by a stated factor: outward and warm where
tighter, inward and cool where slacker). Each lug is a dial just outside: the filled wedge is
the prescribed turn (a full dial is one turn; warm to tighten, cool to loosen), with the lug's
deviation and turn written beside it. Across the head the (1,1) pair's two nodal diameters:
solid for the higher member, dashed for the lower, each with its frequency. matplotlib is
imported inside the function.
"""

from __future__ import annotations

import numpy as np

TIGHT = "#c0392b"
SLACK = "#2471a3"
BAND_HALF_WIDTH = 0.12  # the band's largest excursion, in head radii


def lug_map(drum, tensions, *, turns=None, split=None, physics: str = "", rim=None, size: float = 6.4):
    """Figure: rim tension band, lug dials with turns, (1,1) nodal lines.

    Parameters
    ----------
    drum : Drum
        For the title.
    tensions : sequence of float
        Lug tensions in N/m, lug 1 at angle 0, counterclockwise seen from above.
    turns : membrane.lugs.Turns or None
        Prescribed changes; without turns (no calibration) the dials show tap-pitch cents
        (a full dial is 50 cents).
    split : membrane.physics.uneven.Split or None
        The (1,1) pair.
    physics : str
        Physics words for the caption.
    rim : RimTension or None
        The rim tension to draw; default the smooth spread through ``tensions``.
    size : float
        Figure width in inches.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.figure import Figure
    from matplotlib.patches import Circle, Wedge

    from ..physics.prestress import lug_angles, rim_tension

    t = np.asarray(tensions, dtype=float)
    rim = rim_tension(t) if rim is None else rim
    fig = Figure(figsize=(size, size * 1.08), layout="constrained")
    ax = fig.add_subplot()
    ax.set_aspect("equal")
    ax.axis("off")
    theta = np.linspace(0, 2 * np.pi, 721)
    dev = rim.at(theta) / rim.mean - 1
    top = max(float(np.max(np.abs(dev))), 1e-9)
    gain = BAND_HALF_WIDTH / top
    outer = 1.0 + gain * dev
    ax.add_patch(Circle((0, 0), 1.0, facecolor="0.96", edgecolor="0.15", lw=1.2, zorder=1))
    # one polygon per stretch of rim that is all tighter or all slacker than the mean
    sign = np.sign(dev)
    cuts = np.flatnonzero(sign[1:] != sign[:-1]) + 1
    for seg in np.split(np.arange(theta.size), cuts):
        if sign[seg[0]] == 0:
            continue
        seg = np.concatenate([[max(seg[0] - 1, 0)], seg, [min(seg[-1] + 1, theta.size - 1)]])
        th = theta[seg]
        xs = np.concatenate([np.cos(th) * outer[seg], np.cos(th[::-1])])
        ys = np.concatenate([np.sin(th) * outer[seg], np.sin(th[::-1])])
        ax.fill(xs, ys, color=TIGHT if sign[seg[1]] > 0 else SLACK, alpha=0.35, lw=0, zorder=2)
    ax.plot(np.cos(theta) * outer, np.sin(theta) * outer, color="0.3", lw=0.8, zorder=3)

    angles = lug_angles(t.size)
    if turns is not None and turns.turns is not None:
        amount, full, unit = np.asarray(turns.turns), 1.0, "turn"
    elif turns is not None:
        amount, full, unit = np.asarray(turns.tap_cents), 50.0, "c"
    else:
        amount, full, unit = np.zeros(t.size), 1.0, "turn"
    for j, a in enumerate(angles):
        cx, cy = 1.32 * np.cos(a), 1.32 * np.sin(a)
        ax.add_patch(Circle((cx, cy), 0.085, facecolor="white", edgecolor="0.2", lw=1.0, zorder=4))
        frac = float(np.clip(amount[j] / full, -1, 1))
        if abs(frac) > 1e-4:
            start = 90.0
            span = 360.0 * abs(frac)
            # tighten: the wedge grows clockwise (a screw's tightening sense seen from above)
            th1, th2 = (start - span, start) if frac > 0 else (start, start + span)
            ax.add_patch(Wedge((cx, cy), 0.085, th1, th2, facecolor=TIGHT if frac > 0 else SLACK,
                               edgecolor="none", zorder=5))
        pct = 100 * (t[j] / rim.mean - 1)
        label = f"{j + 1}\n{pct:+.1f} %"
        if turns is not None:
            label += f"\n{amount[j]:+.2f} {unit}"
        lx, ly = 1.58 * np.cos(a), 1.58 * np.sin(a)
        ax.text(lx, ly, label, ha="center", va="center", fontsize=7.5, zorder=6)

    if split is not None and split.orientation_deg is not None:
        for deg, style, f, word in ((split.orientation_deg, "-", split.high_frequency, "higher"),
                                    (split.orientation_deg + 90.0, "--", split.low_frequency, "lower")):
            a = np.radians(deg)
            ax.plot([-np.cos(a), np.cos(a)], [-np.sin(a), np.sin(a)], style, color="0.1", lw=1.6, zorder=3)
            ax.text(0.62 * np.cos(a), 0.62 * np.sin(a), f"{word}\n{f:.2f} Hz", fontsize=7.5, ha="center",
                    va="center", zorder=6, bbox={"facecolor": "white", "edgecolor": "none", "alpha": 0.8,
                                                 "pad": 1.0})
    lim = 1.8
    ax.set_xlim(-lim, lim)
    ax.set_ylim(-lim, lim)
    title = f"{drum.name}: uneven lugs, seen from above"
    if split is not None:
        title += f"\n(1,1) pair beats at {split.beat_frequency:.2f} Hz"
    ax.set_title(title, fontsize=10)
    dial = "dial: turn to make, full circle = 1 turn (or more)" if unit == "turn" else \
        "dial: tap-pitch change to make, full circle = 50 cents"
    fig.text(0.5, 0.01,
             f"band: rim tension off its mean {rim.mean:.0f} N/m, drawn {gain:.1f}x (red tighter, blue slacker)\n"
             f"{dial}; red wedge: tighten (grows clockwise), blue: loosen\n"
             f"lines: nodal diameters of the (1,1) pair (solid higher, dashed lower); {physics} physics",
             ha="center", va="bottom", fontsize=7)
    return fig
