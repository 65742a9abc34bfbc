"""Real recordings of sampled drums, judged against an independent long-window spectrum.

The excerpts in tests/data (sources and licences in tests/data/README) are recordings of
real instruments. The reference for each is computed here, independently of the analysis
under test: a Welch average of 1 s Hann windows over the first 1.5 s of the decay (from
20 ms after the onset) with parabolic interpolation of its peaks in dB, the textbook way
to read a line's frequency from a spectrum (Smith, Spectral Audio Signal Processing,
"Quadratic interpolation of spectral peaks"). Timpani partials are named by their ratios
to the principal: (1,1), (2,1), (3,1) near 1 : 1.5 : 2 (Rossing, Science of Percussion
Instruments, ch. 2; Fletcher & Rossing, Physics of Musical Instruments, 18.2).
"""

import os
from pathlib import Path

import numpy as np
import pytest
import scipy.signal
import soundfile

from typer.testing import CliRunner

from membrane.cli import app
from membrane.analysis import DEFAULT_MAX_PARTIALS
from membrane.recording import analyse, read_recording

DATA = Path(__file__).parent / "data"
TIMPANI = ["timpani_low_1.flac", "timpani_mid_1.flac", "timpani_high_1.flac"]
TOMS = ["tom_floor_1.flac", "tom_low_1.flac", "tom_mid_1.flac", "tom_high_1.flac", "tom_low_2.flac"]


def reference_peaks(path, *, skip=0.02, seconds=1.5, f_max=2000.0, prominence=6.0):
    """(frequency Hz, level dB re the highest) of the long-window spectrum's peaks."""
    x, rate = soundfile.read(path, always_2d=True)
    x = x.mean(axis=1)
    onset = int(np.argmax(np.abs(x) > 0.1 * np.abs(x).max()))
    y = x[onset + int(skip * rate): onset + int((skip + seconds) * rate)]
    nper = min(y.size, int(rate))
    f, p = scipy.signal.welch(y, rate, window="hann", nperseg=nper, noverlap=nper // 2,
                              nfft=8 * nper, scaling="spectrum")
    level = 10 * np.log10(p + 1e-30)
    k = scipy.signal.find_peaks(level, prominence=prominence)[0]
    k = k[(f[k] > 20) & (f[k] < f_max)]
    out = []
    for i in k:
        a, b, c = level[i - 1], level[i], level[i + 1]
        d = 0.5 * (a - c) / (a - 2 * b + c)
        out.append((f[i] + d * (f[1] - f[0]), b - 0.25 * (a - c) * d))
    top = max(v for _, v in out)
    return [(fr, v - top) for fr, v in out]


def timpani_partials(peaks):
    """The principal, its fifth and (where the spectrum shows it) its octave among the
    strong reference peaks below 400 Hz: the strongest peak near ratios 1, 1.5 and 2 of a
    candidate principal, the candidate explaining the most level."""
    strong = [(f, v) for f, v in peaks if f < 400 and v > -25]
    best = None
    for f1, _ in strong:
        found = []
        for ratio in (1.0, 1.5, 2.0):
            near = [(f, v) for f, v in strong if abs(f / (ratio * f1) - 1) < 0.04]
            if not near:
                break
            found.append(max(near, key=lambda fv: fv[1]))
        if len(found) >= 2:
            score = sum(10 ** (v / 10) for _, v in found)
            if best is None or score > best[0]:
                best = (score, found)
    assert best is not None, strong
    return [f for f, _ in best[1]]


@pytest.fixture(scope="module")
def analysed():
    return {name: analyse(read_recording(DATA / name)) for name in TIMPANI + TOMS}


@pytest.mark.parametrize("name", TIMPANI)
def test_timpani_principal_fifth_and_octave_found_within_1_hz(analysed, name):
    partials = analysed[name].partials
    for f in timpani_partials(reference_peaks(DATA / name)):
        nearest = min(partials, key=lambda p: min(abs(p.frequency - f), abs(p.settled - f)))
        assert min(abs(nearest.frequency - f), abs(nearest.settled - f)) < 1.0, (name, f, nearest)


@pytest.mark.parametrize("name", TIMPANI)
def test_timpani_principal_fifth_and_octave_are_among_the_partials_shown(analysed, name):
    # what listen shows by default: the strongest DEFAULT_MAX_PARTIALS (the low timpano's
    # (2,1) was fitted by one nearly steady pole 21 dB too weak and fell outside them)
    shown = analysed[name].strongest(DEFAULT_MAX_PARTIALS)
    for f in timpani_partials(reference_peaks(DATA / name)):
        assert min(min(abs(p.frequency - f), abs(p.settled - f)) for p in shown) < 1.0, (name, f)


def test_the_low_timpanos_fifth_carries_its_long_window_energy(analysed):
    # the (2,1) near 97.6 Hz swells after the strike and beats; its band's energy in the
    # independent long window, relative to the other bands' (the median), within 3 dB
    name = "timpani_low_1.flac"
    fifth = timpani_partials(reference_peaks(DATA / name))[1]
    rows = long_window_level_check(name, analysed[name])
    offset = float(np.median([d for _, d in rows]))
    (d,) = [d for f, d in rows if abs(f - fifth) < 1.0]
    assert abs(d - offset) <= 3.0, (fifth, round(d - offset, 1))


@pytest.mark.parametrize("name", TIMPANI + TOMS)
def test_strongest_partial_is_a_drum_partial(analysed, name):
    partials = analysed[name].partials
    top = max(partials, key=lambda p: p.level_db)
    assert top.settled < 400.0, (name, top)
    # the reference spectrum puts its highest peak within a few Hz of one of the tool's
    # five strongest partials
    f_ref = max(reference_peaks(DATA / name), key=lambda fv: fv[1])[0]
    five = sorted(partials, key=lambda p: -p.level_db)[:5]
    assert min(min(abs(p.frequency - f_ref), abs(p.settled - f_ref)) for p in five) < 3.0, \
        (name, f_ref, five)


@pytest.mark.parametrize("name", [
    "timpani_low_1.flac", "timpani_mid_1.flac",
    pytest.param("timpani_high_1.flac", marks=pytest.mark.xfail(
        strict=True, reason="the recording itself has lines above 1 kHz louder than -20 dB: "
        "near 1041 Hz (T60 1.7 s) about -17 dB re its strongest line (the (2,1), 147.7 Hz) 20 "
        "ms after the onset (1 s Hann window, energy within 3 Hz, decay from windows 50 ms "
        "apart); a second measure, a 0.2 s Hann window from 20 ms zero-padded 8x, gives peaks "
        "at 1044 Hz -16.9 dB, 1276 Hz -15.8 dB and 1429 Hz -17.7 dB re its highest (149 Hz), "
        "and 0.2 s windows 0.1 s apart (energy within 6 Hz) put 1041 Hz at -16.4 dB re 147.5 "
        "Hz at 20 ms: the -20 dB criterion does not hold for this recording. The analysis "
        "also over-reports there: 1040.4 Hz at -6.7 dB and 1045.4 Hz at -9.5 dB (two fast "
        "components, T60 0.5 and 0.4 s, that partly cancel), 1277.5 Hz at -11.4 dB")),
])
def test_timpani_nothing_loud_above_1_khz(analysed, name):
    # a timpano's partials above 1 kHz are weak (Rossing, Science of Percussion Instruments,
    # ch. 2: the principal and its overtones below 400 Hz carry the tone); the old analysis
    # put 1.7 and 2.8 kHz mallet components at 0 dB
    loud_high = [p for p in analysed[name].partials if p.frequency > 1000.0 and p.level_db > -20.0]
    assert not loud_high, (name, loud_high)


@pytest.mark.parametrize("name", [
    "tom_low_1.flac", "tom_mid_1.flac", "tom_high_1.flac",
    pytest.param("tom_floor_1.flac", marks=pytest.mark.xfail(strict=True, reason=(
        "the floor tom falls from 78.6 to 70.1 Hz (-197 cents) mostly within 0.1 s, beside "
        "a partial at 67.4 Hz. The comb (80.3, 75.1, 71.1, 69.4 Hz) is now one partial (the "
        "band model's glide chain, 74.9 Hz settling to 69.7 Hz, no rival within 6 dB), but its "
        "glide reads -125 cents: the initial frequency is the line's energy-weighted mean over "
        "the first 0.1 s, where the reference reads the peak of one 0.1 s window (-197 +- 69 "
        "cents allowed)"))),
])
def test_a_gliding_tom_fundamental_is_one_partial_with_its_glide(analysed, name):
    # the independent glide: the spectral peak of the fundamental in a 0.1 s Hann window
    # at 20 ms after the onset and in one at 0.4 s, within 20 % below the first
    x, rate = soundfile.read(DATA / name)
    onset = int(np.argmax(np.abs(x) > 0.1 * np.abs(x).max()))

    def peak(t, lo, hi):
        y = x[onset + int(t * rate): onset + int((t + 0.1) * rate)]
        n = 64 * y.size
        p = np.abs(np.fft.rfft(y * np.hanning(y.size), n)) ** 2
        f = np.arange(p.size) * rate / n
        sel = (f > lo) & (f < hi)
        return float(f[sel][np.argmax(p[sel])])

    f_late = reference_peaks(DATA / name)
    f_late = max(f_late, key=lambda fv: fv[1])[0]  # the settled fundamental
    f_early = peak(0.02, f_late * 0.98, f_late * 1.25)
    measured = 1200 * np.log2(f_late / f_early)
    assert measured < -50  # the premise: these toms glide by more than half a semitone
    partials = analysed[name].partials
    glides = [p for p in partials if "glide" in p.flags and abs(p.settled - f_late) < 2.0]
    assert len(glides) == 1, [(p.frequency, p.settled, p.flags) for p in partials
                              if f_late * 0.95 < p.settled < f_early * 1.05]
    (g,) = glides
    assert g.glide_cents == pytest.approx(measured, abs=0.35 * abs(measured))
    # one partial: nothing else as strong within the glide's range
    rivals = [p for p in partials if p is not g and f_late - 1.0 < p.frequency < f_early + 1.0
              and p.level_db > g.level_db - 6.0]
    assert not rivals, rivals


# A plausible drum for timpani_high_1 (principal near 99.5 Hz, G2): a 29-inch kettledrum,
# whose usual range is about F2 to C3 (common practice, no source), with the usual
# 0.19 mm polyester head and a bowl of 0.22 m^3 (from memory: a 29-inch bowl holds
# roughly 0.2 m^3). Invented for the test, as a player would write it.
KETTLE_29 = """
name = "29-inch kettledrum (test)"
[head]
diameter = "29 in"
film = "polyester"
thickness = "0.19 mm"
tension = "3000 N/m"
[body]
kind = "kettle"
volume = "0.22 m^3"
"""


def assert_labels_and_tension(drum, path, partials):
    """(1,1) and (2,1) on the reference's principal and fifth, the tension within 10 %.

    The reference is a long-window spectrum of the recording (reference_peaks); the tension
    is checked against the one at which the same model puts (1,1) on the measured principal
    (the tuning routine, a separate path through the model). Returns the identification.
    """
    from membrane.identify import identify
    from membrane.tuning import tension_for

    ref = timpani_partials(reference_peaks(path))
    result = identify(drum, partials, physics="full")
    assert result.verdict == "identified" and len(result.matches) >= 3, result.verdict
    labels = {}
    for mt in result.matches:
        labels.setdefault((mt.m, mt.n), []).append(mt.partial.settled)
    # within 1.5 Hz: a split pair's two halves straddle the long-window peak
    for mn, f in zip([(1, 1), (2, 1)], ref[:2]):
        assert min(abs(g - f) for g in labels[mn]) < 1.5, (mn, f, labels.get(mn))
    target = tension_for(drum, targets=[((1, 1), ref[0])], physics="full").tension
    assert result.tension == pytest.approx(target, rel=0.10)
    return result


def test_a_timpano_with_a_plausible_drum_file_labels_and_tension(analysed, tmp_path):
    from membrane.drum import load_drum

    path = tmp_path / "kettle29.toml"
    path.write_text(KETTLE_29)
    drum = load_drum(str(path))
    result = assert_labels_and_tension(drum, DATA / "timpani_high_1.flac",
                                       analysed["timpani_high_1.flac"].partials)
    assert 0 < result.uncertainty < 0.1 * result.tension


def long_window_level_check(name, analysis, *, window_s=1.0, band_hz=3.0, min_t60=0.3,
                            strong_db=-20.0, f_max=1000.0):
    """Each strong line's energy in a long window of the recording, against what the
    reported partials predict there; returns [(frequency Hz, predicted - measured dB)].

    The measurement is independent of the analysis: one Hann window (scipy.signal) of
    ``window_s`` from 20 ms after the onset (the first sample above a tenth of the peak),
    its DFT, and the energy of the bins within ``band_hz`` of each strong peak of the
    reference spectrum (:func:`reference_peaks`, within ``strong_db`` of its highest).
    The prediction carries each reported partial in that band from its level at the
    reference time through the window with its measured decay: a damped line of amplitude
    A and decay rate r puts (N / 4) A^2 sum_t w(t)^2 exp(-2 r t) into its bins of an
    N-point DFT (Parseval; partials a few Hz apart add their energies). A band counts
    when partials with T60 above ``min_t60`` carry most of its predicted energy, and not
    when a gliding partial crosses it (a glide spreads over the band in a long window).
    Relative levels agree when predicted minus measured is the same for every band.
    """
    x, rate = soundfile.read(DATA / name, always_2d=True)
    x = x.mean(axis=1)
    onset = int(np.argmax(np.abs(x) > 0.1 * np.abs(x).max()))
    n = int(window_s * rate)
    w = scipy.signal.get_window("hann", n)
    start = onset + int(round(0.02 * rate))
    spectrum = np.abs(np.fft.rfft(x[start:start + n] * w)) ** 2
    freqs = np.fft.rfftfreq(n, 1.0 / rate)
    t = 0.02 + np.arange(n) / rate - (analysis.reference_time - analysis.strike_time)
    out = []
    for f, level in reference_peaks(DATA / name):
        if level < strong_db or f > f_max:
            continue
        near = [p for p in analysis.partials if abs(p.frequency - f) <= band_hz]
        if any("glide" in p.flags and min(p.settled, p.frequency) - band_hz <= f
               <= max(p.settled, p.frequency) + band_hz for p in analysis.partials):
            continue
        energy = [n / 4 * p.amplitude**2 * np.sum(w**2 * np.exp(-2 * p.decay_rate * t))
                  for p in near]
        long_ = sum(e for e, p in zip(energy, near) if p.t60 is not None and p.t60 > min_t60)
        if not near or long_ < 0.5 * sum(energy):
            continue
        measured = float(np.sum(spectrum[np.abs(freqs - f) <= band_hz]))
        out.append((f, 10 * np.log10(sum(energy) / measured)))
    return out


@pytest.mark.parametrize("name", [
    pytest.param("timpani_low_1.flac", marks=pytest.mark.xfail(strict=True, reason=(
        "7 of 10 bands within 3 dB of the median (predicted - measured, -3.5 dB): 105.9 Hz "
        "+6.9, 161.2 Hz -3.6, 189.7 Hz +3.3 dB; the (2,1) at 97.6 Hz is within (-2.2 dB, "
        "-8.8 before the narrow refit of order-starved bands)"))),
    "timpani_mid_1.flac",
    pytest.param("timpani_high_1.flac", marks=pytest.mark.xfail(strict=True, reason=(
        "8 of 15 bands within 3 dB of the median: 90.1 Hz -3.7, 178.4 Hz -6.5, 275.1 Hz -6.7, "
        "278.5 Hz -4.1, 284.0 Hz -4.4, 297.0 Hz -7.7, 565.3 Hz +3.4 dB. The bands sit in two "
        "clusters (near 0 and near -5 dB before the median is taken out), so one band moves "
        "the median: 565.3 Hz, refitted in a narrow band, went from -4.3 to +3.2 dB and the "
        "median from -1.6 to -0.3 dB (11 of 15 within 3 dB before)"))),
])
def test_levels_agree_with_a_long_window_of_the_recording(analysed, name):
    rows = long_window_level_check(name, analysed[name])
    assert len(rows) >= 2, rows
    offset = float(np.median([d for _, d in rows]))
    off = [(round(f, 1), round(d - offset, 1)) for f, d in rows if abs(d - offset) > 3.0]
    assert not off, (name, off, [(round(f, 1), round(d - offset, 1)) for f, d in rows])


# The whole sample that timpani_high_1.flac is the start of, where the SoundFont it comes from
# is installed (Debian fluid-soundfont-gm; tests/data/README has its licence). Another path
# may be given in MEMBRANE_TEST_SOUNDFONT.
SOUNDFONT = Path(os.environ.get("MEMBRANE_TEST_SOUNDFONT", "/usr/share/sounds/sf2/FluidR3_GM.sf2"))


@pytest.mark.skipif(not SOUNDFONT.is_file(), reason="the SoundFont of tests/data is not installed")
def test_the_whole_high_timpano_sample_with_a_plausible_drum_file(tmp_path):
    # 3.5 s instead of the 2 s excerpt: the same drum, so the same labels and tension
    from membrane.drum import load_drum
    from soundfont import sample

    x, rate = sample(SOUNDFONT, "Timpani 3(L)")
    path = tmp_path / "timpani_high_whole.wav"
    soundfile.write(path, x, rate, subtype="PCM_16")
    (tmp_path / "kettle29.toml").write_text(KETTLE_29)
    drum = load_drum(str(tmp_path / "kettle29.toml"))
    assert_labels_and_tension(drum, path, analyse(read_recording(path)).partials)


# A drum file of the wrong size for the low timpano (principal near 64.5 Hz, C2, a 32-inch
# drum's range; common practice, no source): a 23-inch kettle, whose usual range is about
# D3 to A3. Invented for the test.
KETTLE_23 = KETTLE_29.replace("29-inch", "23-inch").replace('"29 in"', '"23 in"')


def test_a_wrong_drum_file_is_a_poor_match_not_a_confident_fit(tmp_path):
    # the independent evidence: the reference spectrum's principal, which a right fit
    # would label (1,1); the fit must not call itself identified when its residuals are
    # no better than about half a chance pairing
    from membrane.drum import load_drum
    from membrane.identify import POOR_RMS_CENTS, identify

    path = tmp_path / "kettle23.toml"
    path.write_text(KETTLE_23)
    drum = load_drum(str(path))
    partials = analyse(read_recording(DATA / "timpani_low_1.flac")).partials
    result = identify(drum, partials, physics="full")
    principal = timpani_partials(reference_peaks(DATA / "timpani_low_1.flac"))[0]
    on_principal = [mt for mt in result.matches if abs(mt.partial.settled - principal) < 1.5]
    assert not any((mt.m, mt.n) == (1, 1) for mt in on_principal)  # the premise: a wrong fit
    assert result.rms_cents > POOR_RMS_CENTS
    assert result.verdict.startswith("poor match"), result.verdict


def test_each_flag_is_listed_once(analysed):
    # regression: a line the band model calls a glide, merged again along the glide
    # tracker's ridge, once carried "glide" twice (tom_mid_1)
    for name, analysis in analysed.items():
        for p in analysis.partials:
            assert len(set(p.flags)) == len(p.flags), (name, p)


def test_a_steady_partial_shows_its_lower_bound_and_the_note_explains_it():
    # the mid timpano's 110 Hz line does not fall within the 2 s excerpt: its T60 is shown
    # as a lower bound, the record's length from the reference time, and the note says so
    # (regression: the note once read "(> s)")
    out = CliRunner().invoke(app, ["listen", str(DATA / "timpani_mid_1.flac")],
                             env={"COLUMNS": "200"})
    assert out.exit_code == 0, out.output
    assert "steady" in out.output and "> 1." in out.output
    assert "(> s)" not in out.output
    assert "shown as '> ' and its length in seconds" in out.output


def test_a_wrong_diameter_fits_as_well_at_the_scaled_tension_and_the_output_says_so(analysed, tmp_path):
    # an ideal membrane's partials go as sqrt(T / sigma) / a (f_mn = j_mn c / (2 pi a),
    # c = sqrt(T / sigma); Fletcher & Rossing, Physics of Musical Instruments, 3.5), so a
    # recording fixes T / a^2, not T: the high timpano with a 23-inch file fits about as
    # well as with the plausible 29-inch one, near 2194 N/m x (23/29)^2 = 1380 N/m (air
    # loading moves it: 1238 N/m measured, 10 % below). The verdict cannot tell the sizes
    # apart from the residuals; the output says what the tension rests on.
    from membrane.drum import load_drum
    from membrane.identify import identify

    partials = analysed["timpani_high_1.flac"].partials
    fits = {}
    for name, text in (("29", KETTLE_29), ("23", KETTLE_23)):
        (tmp_path / f"k{name}.toml").write_text(text)
        fits[name] = identify(load_drum(str(tmp_path / f"k{name}.toml")), partials, physics="full")
    assert fits["23"].tension / fits["29"].tension == pytest.approx((23 / 29) ** 2, rel=0.15)
    assert abs(fits["23"].rms_cents - fits["29"].rms_cents) < 3.0
    out = CliRunner().invoke(app, ["listen", str(DATA / "timpani_high_1.flac"),
                                   "--drum", str(tmp_path / "k23.toml")])
    assert out.exit_code == 0 and "not the tension alone" in " ".join(out.output.split())
