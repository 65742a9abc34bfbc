"""The spectrum picture of `listen --plot`: the band of the identified partials, one level
scale, labels apart. Built from invented data (a made-up set of partials), no recording."""

from types import SimpleNamespace as NS

import numpy as np

from membrane.render.labels import laid_out_renderer, boxes_overlap
from membrane.render.spectrum import BAND_FACTOR, spectrum_figure


def invented_tap():
    # invented demo data: peaks of a made-up low drum, two of them close together
    freqs = np.linspace(0.0, 4000.0, 8001)
    centres = [(90.0, 0.0), (140.0, -3.0), (187.0, -6.0), (192.0, -9.0), (233.0, -12.0), (3000.0, -45.0)]
    level = np.full_like(freqs, -80.0)
    for f, db in centres:
        level = np.maximum(level, db - 40.0 * np.abs(freqs - f) / 10.0)
    partials = [NS(frequency=f, level_db=db, t60=1.0 + i) for i, (f, db) in enumerate(centres)]
    matches = [NS(partial=p, m=m, n=1, model_frequency=p.frequency * 1.002, branch=None, head=None, cents=3.0)
               for p, m in zip(partials[:5], (0, 1, 2, 3, 4))]
    ident = NS(matches=matches, splits=(), tension=4000.0, rms_cents=3.0)
    return freqs, level, partials, ident


def test_the_axis_holds_the_identified_partials_and_labels_stay_apart():
    freqs, level, partials, ident = invented_tap()
    fig = spectrum_figure(freqs, level, partials, ident=ident, name="invented.wav")
    ax = fig.axes[0]
    highest = max(mt.model_frequency for mt in ident.matches)
    assert fig.axes[1].get_xlim()[1] == BAND_FACTOR * highest  # not out to the 3 kHz stray partial
    assert "1 above" in ax.get_title()
    labels = [t for t in ax.texts if (t.get_gid() or "").startswith("mode")]
    assert len(labels) == 5
    assert boxes_overlap(labels, laid_out_renderer(fig)) == []
    # one level scale: each partial is marked at the spectrum's own level at its frequency
    dots = next(line for line in ax.get_lines() if line.get_label() == "partials found")
    x, y = dots.get_xdata(), dots.get_ydata()
    assert np.allclose(y, np.interp(x, freqs, level))
    assert fig.axes[1].get_ylabel() == "measured T60 (s)"  # the lower panel is decay, not a second level scale
