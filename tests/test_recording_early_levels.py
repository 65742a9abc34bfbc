"""Levels and decay times at the reference time, judged by a decay-aware envelope.

A periodogram averages a line's energy over its window, so it cannot judge a level 20 ms
after the strike when the line dies fast, and it under-weights lines that die fast. The
check here is written independently of the analysis: the complex demodulation of the
recording at one line's frequency through a Hann window of :data:`WINDOW_S` (a narrow-band
heterodyne; its main lobe is 4 Hz wide at each side for a 0.5 s window, so neighbours 4 Hz
away fall on its first null), slid along the decay from 20 ms after the onset in steps of
20 ms. For a damped line ``A exp(-r t) cos(2 pi f t + phi)`` the window starting at time
``tau`` measures ``(A / 2) exp(-r tau) sum_t w(t) exp(-r t)``: a straight line in ``ln |M|``
against ``tau`` whose slope is ``-r`` and whose value at ``tau = 20 ms`` gives ``A`` once the
decay inside the window (``sum w exp(-r t)``) is divided out (Smith, Spectral Audio Signal
Processing, "Short-Time Fourier Transform": the windowed DFT of a damped exponential). The
scatter of ``ln |M|`` about that line says whether the line is a clean exponential; only
clean, isolated, strong lines are judged. Onset: the first sample above a tenth of the
peak, as in tests/test_real_recordings.py.
"""

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import scipy.signal
import soundfile

from membrane.recording import analyse, read_recording

from test_real_recordings import DATA, TIMPANI, TOMS, reference_peaks

WINDOW_S = 0.5
STEP_S = 0.02
SPAN_S = 0.5  # window starts from 20 ms to 20 ms + this (less for a short file)
CLEAN_DB = 1.0  # rms scatter of 20 log10 |M| about its straight line: a clean exponential
ISOLATED_HZ = 3.5  # no other reference peak within 10 dB of it this close
STRONG_DB = -20.0  # within this of the long-window spectrum's highest peak
MIN_T60_S = 0.3  # the criterion: levels agree for partials with T60 > 0.3 s
NEAR_HZ = 2.5  # the analysis' partials within this of the line are what the window sees


def onset_and_samples(name):
    x, rate = soundfile.read(DATA / name, always_2d=True)
    x = x.mean(axis=1)
    return x, rate, int(np.argmax(np.abs(x) > 0.1 * np.abs(x).max()))


def envelope_line(x, rate, onset, f, *, t_ref=0.02):
    """(amplitude at t_ref, decay rate r [1/s], scatter [dB]) of the line at ``f`` Hz."""
    n = int(WINDOW_S * rate)
    w = scipy.signal.get_window("hann", n)
    t = np.arange(n) / rate
    span = min(SPAN_S, (x.size - onset - n) / rate - t_ref - 0.01)
    taus = np.arange(t_ref, t_ref + span, STEP_S)
    # the peak within half a hertz: the long-window spectrum's frequency is an average
    probes = np.exp(-2j * np.pi * np.outer(f + np.linspace(-0.5, 0.5, 5), t))
    mags = []
    for tau in taus:
        i = onset + int(round(tau * rate))
        mags.append(np.max(np.abs(probes @ (x[i:i + n] * w))))
    lm = np.log(np.array(mags))
    slope, icept = np.polyfit(taus - t_ref, lm, 1)
    r = -slope
    scatter = float(np.std(lm - (slope * (taus - t_ref) + icept)) * 20 / np.log(10))
    amplitude = 2 * np.exp(icept) / np.sum(w * np.exp(-r * t))
    return float(amplitude), float(r), scatter


def judged_lines(name):
    """[(f Hz, checked amplitude, checked r, analysis amplitude or None, its T60)] for the
    strong, isolated lines whose envelope is a clean exponential with T60 > 0.3 s."""
    x, rate, onset = onset_and_samples(name)
    peaks = reference_peaks(DATA / name, f_max=1000.0)
    analysis = analyse(read_recording(DATA / name))
    out = []
    for f, level in peaks:
        if level < STRONG_DB or any(g != f and abs(g - f) < ISOLATED_HZ and v > level - 10
                                    for g, v in peaks):
            continue
        a, r, scatter = envelope_line(x, rate, onset, f)
        if scatter > CLEAN_DB or not (r > 0 and 3 * np.log(10) / r > MIN_T60_S):
            continue
        near = [p for p in analysis.partials
                if min(abs(p.frequency - f), abs(p.settled - f)) < NEAR_HZ]
        # partials within the window's main lobe add their energies there
        amp = float(np.sqrt(sum(p.amplitude ** 2 for p in near))) if near else None
        out.append((f, a, r, amp))
    return out


OFF = {
    "timpani_high_1.flac": "172.9 Hz is reported 10.5 dB below the envelope's level, relative "
                           "to the median of the five judged lines (4 of 5 within 3 dB)",
    "tom_low_2.flac": "lines at 23.2, 33.8, 43.4, 66.7, 140.1, 167.0, 174.7 and 233.7 Hz (clean "
                      "decays by the envelope) are not reported at all (1 of 9 judged lines "
                      "found). Below 89 Hz there is no seed, so no band: the seeds' noise is "
                      "the median of blocks of 94 Hz of the whole decay's spectrum, and the "
                      "block from 0 to 94 Hz is all partials (its median -9.4 dB re the "
                      "spectrum's highest peak), so 23.1, 33.1, 43.1 and 66.9 Hz (peaks at "
                      "-6.3, -5.9, -2.1 and -13.0 dB) stay under the seed height, that median "
                      "+ 8 dB (-1.4 dB)",
}


# The recordings with at least two clean, isolated, strong lines to compare (the mid timpano
# has one, its principal: its other strong lines rise or beat; the 1 s toms glide)
JUDGED = ["timpani_low_1.flac", "timpani_high_1.flac", "tom_low_2.flac"]


@pytest.mark.parametrize("name", [
    pytest.param(n, marks=pytest.mark.xfail(strict=True, reason=OFF[n])) if n in OFF else n
    for n in JUDGED])
def test_levels_at_20_ms_agree_with_a_decay_aware_envelope(name):
    rows = judged_lines(name)
    assert len(rows) >= 2, rows
    missing = [round(f, 1) for f, _, _, amp in rows if amp is None]
    assert not missing, (name, "not reported", missing)
    diffs = [(f, 20 * np.log10(amp / a)) for f, a, _, amp in rows]
    offset = float(np.median([d for _, d in diffs]))
    off = [(round(f, 1), round(d - offset, 1)) for f, d in diffs if abs(d - offset) > 3.0]
    assert not off, (name, off)


def test_no_partial_has_a_blank_decay_time():
    # every partial either decays (a T60) or is flagged as not decaying within the record,
    # with the record's length as a lower bound; a rise after the strike is flagged
    for name in TIMPANI + TOMS:
        analysis = analyse(read_recording(DATA / name))
        record = analysis.end_time - analysis.reference_time
        for p in analysis.partials:
            t60, lower = p.t60_shown
            assert t60 > 0, (name, p)
            if lower:
                assert "steady" in p.flags and t60 == pytest.approx(record, abs=0.01), (name, p)
            else:
                assert p.t60 == t60


def test_the_mid_timpanos_110_hz_line_rises_and_is_flagged():
    # the independent evidence: 1 s Hann windows at 110.1 Hz from 20 ms, 0.3 s and 0.6 s
    # after the onset hold more, not less (the line is fed after the strike)
    x, rate, onset = onset_and_samples("timpani_mid_1.flac")
    n = rate
    t = np.arange(n) / rate
    w = np.hanning(n)

    def mag(t0):
        seg = x[onset + int(t0 * rate): onset + int(t0 * rate) + n] * w
        return max(abs(np.sum(seg * np.exp(-2j * np.pi * g * t))) for g in (109.9, 110.1, 110.3))

    assert mag(0.3) > 1.3 * mag(0.02) and mag(0.6) > 1.3 * mag(0.02)  # the premise
    analysis = analyse(read_recording(DATA / "timpani_mid_1.flac"))
    (p,) = [p for p in analysis.partials if abs(p.frequency - 110.1) < 0.5]
    assert "rising" in p.flags


def test_json_decay_is_never_null(tmp_path):
    out = subprocess.run([sys.executable, "-m", "membrane", "listen",
                          str(DATA / "timpani_mid_1.flac"), "--format", "json"],
                         capture_output=True, text=True, check=True).stdout
    rows = json.loads(out)["partials"]
    assert all(r["decay_s"] is not None and r["decay_s"] > 0 for r in rows)
    assert any(r["decay_s_is_lower_bound"] for r in rows)


def synthetic(lines, *, rate=44100, seconds=1.5, pre=0.1, noise=1e-5, seed=3):
    """A tap: silence, then sum of ``envelope(t) * cos(2 pi f t)`` over ``lines`` =
    [(f Hz, envelope function of t s)], with a little white noise."""
    from membrane.analysis.audio import Recording

    t = np.arange(int(seconds * rate)) / rate
    x = np.zeros(int((pre + seconds) * rate))
    body = sum(env(t) * np.cos(2 * np.pi * f * t + 0.3 * k) for k, (f, env) in enumerate(lines))
    x[int(pre * rate):] = body
    x += noise * np.random.default_rng(seed).standard_normal(x.size)
    return Recording(samples=x, rate=float(rate), channels=1, encoding="test")


def test_a_line_fed_after_the_strike_is_flagged_rising_and_a_hum_steady():
    # analytic truth: 220 Hz is fed by a faster mode, 0.5 (exp(-2 t) - exp(-12 t)), which
    # peaks at t = ln(6) / 10 = 0.18 s about 7 dB above its value at 20 ms; 330 Hz holds a
    # constant amplitude (a hum) for the whole record; 150 Hz decays plainly (T60 1.4 s)
    rec = synthetic([
        (150.0, lambda t: 0.5 * np.exp(-5.0 * t)),
        (220.0, lambda t: 0.5 * (np.exp(-2.0 * t) - np.exp(-12.0 * t))),
        (330.0, lambda t: 0.02 + 0 * t),
    ])
    # the premise, from the envelope itself
    env = lambda t: 0.5 * (np.exp(-2.0 * t) - np.exp(-12.0 * t))  # noqa: E731
    assert 20 * np.log10(env(np.log(6) / 10) / env(0.02)) > 6.0
    analysis = analyse(rec)
    by = {round(p.frequency): p for p in analysis.partials if p.level_db > -40}
    plain, fed, hum = by[150], by[220], by[330]
    assert "rising" not in plain.flags and "steady" not in plain.flags
    assert plain.t60 == pytest.approx(3 * np.log(10) / 5.0, rel=0.05)
    assert "rising" in fed.flags
    assert "steady" in hum.flags
    t60, lower = hum.t60_shown
    assert lower and t60 == pytest.approx(analysis.end_time - analysis.reference_time, abs=0.01)
