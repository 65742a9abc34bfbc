"""The strike-point picture: each partial's level at the listener against the strike radius.

Drawn for ``membrane strike --plot``: the loudest partials (and those chosen with
``--best-for``, drawn heavy) in dB relative to the loudest, across the head from the centre
to the rim, with the strike radius marked; with a strike-point search, a second panel with
the search's objective (the chosen partials against the rest, in dB). The levels are
:func:`membrane.strike.pressure_across_radius`, the model of the table. matplotlib is
imported inside the function (a bare Figure: no display needed).
"""

from __future__ import annotations

import textwrap

import numpy as np

from ..presets import SEARCH_RANGE

FLOOR_DB = -60.0  # levels drawn down to here (below, a partial is too quiet to matter in the picture)
LINES = 10  # partials drawn: the chosen ones and the loudest of the rest, this many in all


def strike_levels(result, *, radius_fraction: float, contact_time: float, listener, angle: float, chosen=(),
                  advice=None, title: str = "", head: str | None = None):
    """A matplotlib Figure of the partials' levels against the strike radius.

    Parameters
    ----------
    result : membrane.modes.ModeSet
        Solved modes.
    radius_fraction : float
        The strike radius used, r0/a (marked).
    contact_time : float
        Mallet contact time in s.
    listener : membrane.strike.Listener
        Listening point.
    angle : float
        Strike angle in rad.
    chosen : sequence of (int, int)
        Modes favoured by a strike-point search (drawn heavy).
    advice : membrane.strike_point.StrikeAdvice or None
        The search's result: adds the panel of its objective.
    title : str
        Title (wrapped to the width).
    head : {None, "struck", "resonant"}
        Whose (m, n) ``chosen`` names on a two-headed drum.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.figure import Figure

    from ..strike import pressure_across_radius

    radii = np.linspace(0.0, 1.0, 201)
    p = np.abs(pressure_across_radius(result, radius_fraction=radii, contact_time=contact_time, listener=listener,
                                      angle=angle))
    with np.errstate(divide="ignore", invalid="ignore"):
        db = np.maximum(20 * np.log10(p / p.max()), FLOOR_DB)
    # the same modes the advice weighs (find(): the struck head's member unless head names one)
    ids = {id(result.find(m, n, head=head)) for m, n in chosen}
    picked = [j for j, mo in enumerate(result.modes) if id(mo) in ids]
    loudest = picked + [j for j in np.argsort(-db.max(axis=1)) if j not in picked][:max(0, LINES - len(picked))]
    fig = Figure(figsize=(9.0, 6.5 if advice else 4.5))
    axes = fig.subplots(2 if advice else 1, 1, sharex=True, squeeze=False)
    ax = axes[0, 0]
    for j in loudest:
        mo = result.modes[j]
        strong = id(mo) in ids
        ax.plot(radii, db[j], lw=2.2 if strong else 1.0, ls="-" if strong or not chosen else "--",
                label=f"{mo.label} {mo.frequency:.0f} Hz")
    ax.axvline(radius_fraction, color="k", lw=0.8)
    ax.set_ylabel("level at the listener (dB re loudest)")
    ax.set_ylim(FLOOR_DB, 3)
    ax.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0))
    ax.set_title(textwrap.fill(title, 110), fontsize=8, loc="left")
    if advice:
        with np.errstate(divide="ignore"):
            power = p ** 2
            mask = np.array([id(mo) in ids for mo in result])
            c = 10 * np.log10(power[mask].sum(0)) - 10 * np.log10(power[~mask].sum(0))
        axes[1, 0].plot(radii, c, color="k")
        axes[1, 0].axvline(advice.radius_fraction, color="k", lw=0.8)
        axes[1, 0].set_ylabel("chosen vs the rest (dB)")
        axes[1, 0].axvspan(0, SEARCH_RANGE[0], color="0.9")
        axes[1, 0].axvspan(SEARCH_RANGE[1], 1, color="0.9")
    axes[-1, 0].set_xlabel("strike radius r/a (0 centre, 1 rim)")
    fig.tight_layout()
    return fig
