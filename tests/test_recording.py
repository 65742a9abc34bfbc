"""Partials of a recorded decay: synthetic recordings whose partials we know exactly.

Every recording here is made in the test as a sum of damped sinusoids
``A exp(-r t) cos(2 pi f t + phi)`` (r = 3 ln 10 / T60) plus white noise, so the
reference values are the generator's own parameters, independent of the analysis.
The WAV files are written by scipy.io.wavfile, or for 24-bit PCM by a writer below
that follows the RIFF/WAVE layout byte by byte (scipy writes no 24-bit files).
"""

import math
import struct

import numpy as np
import pytest
import scipy.io.wavfile
from typer.testing import CliRunner

from membrane.cli import app
from membrane.errors import RecordingError
from membrane.recording import REFERENCE_TIME_S, analyse, find_partials, read_wav

RATE = 48000
# (frequency Hz, level dB re the strongest, T60 s): a close pair 0.8 Hz apart at 150 Hz,
# as a degenerate mode split by uneven tension would give, and partials down to -26 dB
PARTIALS = [(150.0, 0.0, 2.0), (150.8, -3.0, 1.8), (238.9, -6.0, 1.5), (320.4, -10.0, 1.2),
            (345.1, -20.0, 0.8), (441.2, -15.0, 1.0), (523.7, -24.0, 0.9), (801.3, -26.0, 0.7)]
FLOOR = -30.0
BELOW_FLOOR = (1203.5, -45.0, 0.4)  # present in the signal, weaker than the floor


def synth(partials, *, rate=RATE, duration=3.0, snr_db=30.0, lead=0.2, seed=0, scale=0.3):
    """Damped sinusoids from t = lead, white noise throughout at ``snr_db`` re the decay's RMS."""
    rng = np.random.default_rng(seed)
    t = np.arange(int(duration * rate)) / rate
    x = np.zeros_like(t)
    for f, level, t60 in partials:
        x += 10 ** (level / 20) * np.exp(-3 * math.log(10) / t60 * t) * \
            np.cos(2 * np.pi * f * t + rng.uniform(0, 2 * np.pi))
    sigma = np.sqrt(np.mean(x**2)) / 10 ** (snr_db / 20)
    x = np.concatenate([np.zeros(int(lead * rate)), x])
    return scale * (x + rng.normal(0.0, sigma, x.size))


def write_pcm24(path, x, rate):
    """24-bit PCM WAV (RIFF, fmt chunk with format tag 1, data chunk), little-endian."""
    x = np.atleast_2d(np.asarray(x).T).T  # (frames, channels)
    codes = np.clip(np.round(x * 2**23), -2**23, 2**23 - 1).astype("<i4")
    raw = codes.reshape(-1).view(np.uint8).reshape(-1, 4)[:, :3].tobytes()
    channels = x.shape[1]
    fmt = struct.pack("<HHIIHH", 1, channels, rate, rate * 3 * channels, 3 * channels, 24)
    body = b"WAVE" + b"fmt " + struct.pack("<I", len(fmt)) + fmt + \
        b"data" + struct.pack("<I", len(raw)) + raw
    path.write_bytes(b"RIFF" + struct.pack("<I", len(body)) + body)


def at_reference(truth, t_ref=REFERENCE_TIME_S):
    """The generator's levels (at its t = 0, the onset) carried to the reference time, re the
    strongest there: each partial has fallen by 60 dB * t_ref / T60 by then."""
    moved = [(f, level - 60.0 * t_ref / t60, t60) for f, level, t60 in truth]
    top = max(level for _, level, _ in moved)
    return [(f, level - top, t60) for f, level, t60 in moved]


def check_partials(found, truth, *, df=0.05, t60_rel=0.10, db=1.0, moved=True):
    """Every true partial matched by one found partial within the tolerances.

    ``truth`` levels are the generator's at its onset; with ``moved`` they are compared
    at the analysis's reference time."""
    freqs = np.array([p.frequency for p in found])
    for f, level, t60 in (at_reference(truth) if moved else truth):
        i = int(np.argmin(np.abs(freqs - f)))
        p = found[i]
        assert abs(p.frequency - f) < df, (f, p)
        assert p.t60 == pytest.approx(t60, rel=t60_rel), (f, p)
        assert p.level_db == pytest.approx(level, abs=db), (f, p)


@pytest.mark.parametrize("seed", [0, 1])
def test_every_partial_above_the_floor_and_nothing_else(seed):
    x = synth(PARTIALS + [BELOW_FLOOR], seed=seed)
    result = analyse(read_array(x), floor_db=FLOOR)
    check_partials(result.partials, PARTIALS)
    assert len(result.partials) == len(PARTIALS), [p.frequency for p in result.partials]
    assert result.strike_time == pytest.approx(0.2, abs=0.003)
    assert result.warnings == ()


def test_pair_closer_than_the_fft_bin_is_resolved():
    # 0.6 s of decay: its FFT bin is 1/0.6 s = 1.7 Hz, twice the pair's spacing
    pair = [(150.0, 0.0, 2.0), (150.8, -3.0, 1.8)]
    x = synth(pair, duration=0.6, lead=0.0, seed=3)
    found = find_partials(x, rate=RATE, floor_db=FLOOR)
    assert len(found) == 2
    check_partials(found, pair)


def test_more_partials_than_allowed_keeps_the_strongest():
    x = synth(PARTIALS, seed=4)
    result = analyse(read_array(x), floor_db=FLOOR, max_partials=3)
    assert [round(p.frequency, 1) for p in result.partials] == [150.0, 150.8, 238.9]


def read_array(x, rate=RATE):
    from membrane.recording import Recording
    return Recording(samples=np.asarray(x, float), rate=float(rate), channels=1, encoding="test")


# ----------------------------------------------------------------------------- WAV formats


@pytest.fixture(scope="module")
def decay():
    return synth(PARTIALS, seed=5, lead=0.35)


def test_the_same_decay_in_every_format_gives_the_same_partials(decay, tmp_path):
    files = {}
    files["pcm16"] = tmp_path / "pcm16.wav"
    scipy.io.wavfile.write(files["pcm16"], RATE, np.round(decay * 32767).astype(np.int16))
    files["pcm24"] = tmp_path / "pcm24.wav"
    write_pcm24(files["pcm24"], decay, RATE)
    files["pcm32"] = tmp_path / "pcm32.wav"
    scipy.io.wavfile.write(files["pcm32"], RATE, np.round(decay * (2**31 - 1)).astype(np.int32))
    files["float32"] = tmp_path / "float32.wav"
    scipy.io.wavfile.write(files["float32"], RATE, decay.astype(np.float32))
    files["float64"] = tmp_path / "float64.wav"
    scipy.io.wavfile.write(files["float64"], RATE, decay)
    files["stereo"] = tmp_path / "stereo.wav"
    scipy.io.wavfile.write(files["stereo"], RATE,
                           np.round(np.stack([decay, 0.5 * decay], axis=1) * 32767).astype(np.int16))
    reference = analyse(read_wav(files["float64"]), floor_db=FLOOR)
    check_partials(reference.partials, PARTIALS)
    truth = [(p.frequency, p.level_db, p.t60) for p in reference.partials]
    for name, path in files.items():
        for channel in ([None, 0, 1] if name == "stereo" else [None]):
            rec = read_wav(path, channel=channel)
            assert rec.rate == RATE and rec.samples.size == decay.size
            got = analyse(rec, floor_db=FLOOR).partials
            assert len(got) == len(truth), (name, channel)
            # 16-bit quantisation noise is far below the recording's own noise
            check_partials(got, truth, df=0.01, t60_rel=0.02, db=0.2, moved=False)


def test_pcm24_reads_back_its_codes(tmp_path):
    x = np.array([0.0, 0.5, -0.5, 1 - 2**-23, -1.0, 2**-23])
    write_pcm24(tmp_path / "a.wav", x, 8000)
    rec = read_wav(tmp_path / "a.wav")
    assert rec.encoding.startswith("PCM 24")
    np.testing.assert_array_equal(rec.samples, x)  # exact: 24-bit codes are exact in float64


def test_leading_silence_and_offset_strike(decay):
    later = np.concatenate([np.zeros(RATE), decay])
    a = analyse(read_array(decay), floor_db=FLOOR)
    b = analyse(read_array(later), floor_db=FLOOR)
    assert b.strike_time - a.strike_time == pytest.approx(1.0, abs=1e-9)
    check_partials(b.partials, [(p.frequency, p.level_db, p.t60) for p in a.partials], moved=False,
                   df=0.005, t60_rel=0.01, db=0.1)


def test_a_second_strike_ends_the_decay():
    first = synth(PARTIALS, seed=6, duration=1.5)
    second = synth([(200.0, 0.0, 1.0)], seed=7, duration=1.5, lead=0.0)
    result = analyse(read_array(np.concatenate([first, second])), floor_db=FLOOR)
    assert result.end_time == pytest.approx(1.7, abs=0.03)
    assert any("second strike" in w for w in result.warnings)
    assert all(abs(p.frequency - 200.0) > 1 for p in result.partials)


# ----------------------------------------------------------------------------- bad recordings


def test_clipped_recording_warns_and_still_analyses(tmp_path):
    x = synth(PARTIALS, seed=8, scale=3.0)  # peaks near 3x full scale
    path = tmp_path / "clipped.wav"
    scipy.io.wavfile.write(path, RATE, np.round(np.clip(x, -1, 1) * 32767).astype(np.int16))
    rec = read_wav(path)
    assert rec.clipped > 100
    result = analyse(rec, floor_db=FLOOR)
    assert any("clipped" in w for w in result.warnings)
    check_partials(result.partials, PARTIALS[:4], df=0.05, t60_rel=0.10, db=1.5)


def _bad_files(tmp_path):
    good = tmp_path / "good.wav"
    scipy.io.wavfile.write(good, RATE, np.round(synth(PARTIALS, seed=9) * 32767).astype(np.int16))
    cases = {}
    cases["empty"] = (tmp_path / "empty.wav", b"")
    cases["truncated header"] = (tmp_path / "truncated.wav", good.read_bytes()[:30])
    cases["not a WAV"] = (tmp_path / "notes.wav", b"tension 4000 N/m\nthis is a text file\n" * 10)
    files = {name: path for name, (path, data) in cases.items() if path.write_bytes(data) or True}
    files["all zeros"] = tmp_path / "zeros.wav"
    scipy.io.wavfile.write(files["all zeros"], RATE, np.zeros(RATE, np.int16))
    files["too short"] = tmp_path / "short.wav"
    scipy.io.wavfile.write(files["too short"], RATE,
                           np.round(synth(PARTIALS, duration=0.05, lead=0.0) * 32767).astype(np.int16))
    # 8 kHz: a partial at 4100 Hz is above the 4000 Hz Nyquist limit and folds to 3900 Hz
    files["8 kHz"] = tmp_path / "phone.wav"
    low = synth([(700.0, 0.0, 1.0), (1900.0, -6.0, 0.8), (4100.0, -3.0, 0.8)], rate=8000)
    scipy.io.wavfile.write(files["8 kHz"], 8000, np.round(low * 32767).astype(np.int16))
    return files


MESSAGES = {"empty": "empty file", "truncated header": "WAV", "not a WAV": "not a WAV file",
            "all zeros": "silent", "too short": "at least 0.1 s", "8 kHz": "Nyquist"}


def test_bad_recordings_raise_a_recording_error(tmp_path):
    for name, path in _bad_files(tmp_path).items():
        with pytest.raises(RecordingError, match=MESSAGES[name]):
            analyse(read_wav(path))


def test_below_nyquist_an_8_khz_recording_is_fine():
    x = synth([(700.0, 0.0, 1.0), (1900.0, -6.0, 0.8)], rate=8000, seed=10)
    check_partials(analyse(read_array(x, 8000), floor_db=FLOOR).partials,
                   [(700.0, 0.0, 1.0), (1900.0, -6.0, 0.8)])


# ----------------------------------------------------------------------------- the command

def cli():
    return app  # the installed command's own app, with its one-line error handling


def test_listen_bad_recordings_exit_2_with_one_line(tmp_path):
    runner = CliRunner()
    for name, path in _bad_files(tmp_path).items():
        result = runner.invoke(cli(), ["listen", str(path)])
        assert result.exit_code == 2, (name, result.output)
        lines = result.stderr.strip().splitlines()
        assert len(lines) == 1 and MESSAGES[name] in lines[0] and path.name in lines[0], \
            (name, lines)
        assert "Traceback" not in result.output


def test_listen_json_and_clip_warning(tmp_path):
    import json
    path = tmp_path / "clipped.wav"
    x = synth(PARTIALS, seed=11, scale=3.0)
    scipy.io.wavfile.write(path, RATE, np.clip(x, -1, 1).astype(np.float32))
    result = CliRunner().invoke(cli(), ["listen", str(path), "--format", "json", "--floor", "-30"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert "clipped" in result.stderr
    freqs = [p["frequency_hz"] for p in data["partials"]]
    assert freqs == sorted(freqs) and min(abs(f - 150.0) for f in freqs) < 0.05
    assert set(data["partials"][0]) >= {"frequency_hz", "level_db", "decay_s"}
    assert max(p["level_db"] for p in data["partials"]) == 0.0


@pytest.mark.parametrize("fmt, head", [("table", "T60 (s)"), ("markdown", "| f (Hz) |"),
                                       ("csv", "frequency_hz,level_db,decay_s")])
def test_listen_other_formats(tmp_path, fmt, head):
    path = tmp_path / "tap.wav"
    scipy.io.wavfile.write(path, RATE, synth(PARTIALS[:3], seed=13, duration=1.0).astype(np.float32))
    result = CliRunner().invoke(cli(), ["listen", str(path), "--format", fmt, "--channel", "1"])
    assert result.exit_code == 0, result.output
    assert head in result.stdout and "150.8" in result.stdout


def test_gain_does_not_change_the_partials(decay):
    # a quieter recording of the same tap: same partials, same relative levels
    a = analyse(read_array(decay), floor_db=FLOOR)
    b = analyse(read_array(0.05 * decay), floor_db=FLOOR)
    check_partials(b.partials, [(p.frequency, p.level_db, p.t60) for p in a.partials], moved=False,
                   df=1e-6, t60_rel=1e-6, db=1e-6)
    assert b.partials[0].amplitude == pytest.approx(0.05 * a.partials[0].amplitude, rel=1e-6)


def test_a_decay_of_a_fifth_of_a_second():
    # a short tap (FFT bin 5 Hz): well-separated partials are still found and timed
    three = [(238.9, 0.0, 1.5), (441.2, -6.0, 1.0), (801.3, -10.0, 0.7)]
    x = synth(three, duration=0.2, lead=0.05, seed=15)
    result = analyse(read_array(x), floor_db=FLOOR)
    assert len(result.partials) == 3
    check_partials(result.partials, three, df=0.05, t60_rel=0.15, db=0.5)


def test_the_installed_command(tmp_path):
    import json
    import subprocess
    import sys
    from pathlib import Path

    path = tmp_path / "tap.wav"
    scipy.io.wavfile.write(path, RATE, np.round(synth(PARTIALS, seed=16) * 32767).astype(np.int16))
    from conftest import installed_command

    script = installed_command()[0]
    done = subprocess.run([str(script), "listen", str(path), "--format", "json", "--floor", "-30"],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    freqs = [p["frequency_hz"] for p in json.loads(done.stdout)["partials"]]
    assert len(freqs) == len(PARTIALS) and abs(freqs[1] - 150.8) < 0.05
    bad = subprocess.run([str(script), "listen", str(tmp_path / "missing.wav")],
                         capture_output=True, text=True, timeout=120)
    assert bad.returncode == 2 and len(bad.stderr.strip().splitlines()) == 1
    assert "missing.wav" in bad.stderr and "Traceback" not in bad.stderr
