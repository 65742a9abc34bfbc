"""The band fit's least-squares polish ends at a minimum, judged by another optimiser.

Each band the analysis polishes (:func:`membrane.analysis.esprit.polish`) is taken again
from the polish's result by :func:`scipy.optimize.least_squares` (trust-region reflective,
its own finite-difference Jacobian, tolerances near machine precision) on the same
variable-projection sum of squares ``min_c |z - E(s) c|^2`` (amplitudes by
:func:`numpy.linalg.lstsq`), written here, over the band's strong poles (the weak ones held
where the polish left them). At a minimum the other optimiser gains next to nothing: less
than a hundredth of one noise variance per degree of freedom (the residual over
2 m - 2 poles - 2 free). A polish stopped short of its minimum leaves the result to the
path of the optimiser that ran it.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import scipy.optimize

from membrane.analysis import esprit
from membrane.analysis.audio import read_recording
from membrane.analysis.partials import analyse

DATA = Path(__file__).parent / "data"
# the gain left to another optimiser, in noise variances per degree of freedom: 0.01 is a
# tenth of a standard deviation of the fitted poles in a locally quadratic model
# (common practice, no source)
GAIN = 1e-2


def polished_bands(path, monkeypatch):
    """(band signal, poles in, poles out, noise variance) of every band polished."""
    seen = []
    polish = esprit.polish

    def spy(z, poles, **kw):
        out = polish(z, poles, **kw)
        seen.append((z, poles, out, kw.get("noise_var", 0.0)))
        return out

    monkeypatch.setattr(esprit, "polish", spy)
    analyse(read_recording(path))
    return seen


def gain_left(z, poles_in, poles_out, noise_var):
    """What scipy's optimiser still gains on the strong poles, in noise variances."""
    t = np.arange(z.size, dtype=float)[:, None]
    s = np.log(poles_out)
    if s.size == 0:
        return 0.0
    basis = np.exp(t * s[None, :])
    c = np.linalg.lstsq(basis, z, rcond=None)[0]
    free = np.nonzero(np.abs(c) ** 2 * np.sum(np.abs(basis) ** 2, axis=0)
                      >= 30.0 * noise_var)[0]
    if free.size == 0:
        return 0.0

    def residual(v):
        trial = s.copy()
        trial[free] = v[: free.size] + 1j * v[free.size:]
        e = np.exp(t * trial[None, :])
        r = z - e @ np.linalg.lstsq(e, z, rcond=None)[0]
        return np.concatenate([r.real, r.imag])

    v0 = np.concatenate([s[free].real, s[free].imag])
    cost0 = float(np.sum(residual(v0) ** 2))
    sol = scipy.optimize.least_squares(residual, v0, method="trf", xtol=1e-15, ftol=1e-15,
                                       gtol=1e-15, max_nfev=400 * v0.size)
    dof = max(2 * z.size - 2 * s.size - 2 * free.size, 1)
    return (cost0 - 2.0 * sol.cost) / (cost0 / dof)


@pytest.fixture(scope="module")
def preview(tmp_path_factory):
    out = tmp_path_factory.mktemp("polish") / "kettledrum.wav"
    subprocess.run([sys.executable, "-m", "membrane", "strike", "kettledrum", "--out", str(out)],
                   check=True, capture_output=True)
    return out


@pytest.mark.xfail(strict=True, reason=(
    "the polish is a Levenberg-Marquardt run cut at 25 evaluations: on the strike preview it "
    "stops short in 12 of 17 bands, and from where it stops scipy's optimiser gains more than "
    "one noise variance in 8 of them (up to 375). A polish by variable projection on the "
    "strong poles, stopped when a Gauss-Newton step would gain under 1e-4 noise variances "
    "(tried, not landed), passes this check (at most 3e-4), but moves the real timpano's "
    "partials below 200 Hz: on timpani_high_1 with a 29-inch file the 811 N/m start (judged "
    "cost 1164) undercuts the 2140 N/m one (1183). With the start tie settled by paired "
    "weight (identify.START_TIE) the 2140 N/m start wins, but the fit ends at 2110 N/m with "
    "(1,1) on 96.9 Hz, not 99.0, rms 19 cents (a poor match); four tests of "
    "tests/test_real_recordings.py fail with it, so it is not landed"))
def test_the_polish_ends_at_a_minimum_on_the_strike_preview(preview, monkeypatch):
    bands = polished_bands(preview, monkeypatch)
    assert bands
    gains = [gain_left(*b) for b in bands]
    assert max(gains) < GAIN, np.round(gains, 3)
