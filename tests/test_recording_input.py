"""Recordings as files: formats read through libsndfile, and headers that lie.

The reference for each format is the same decay written as a float WAV: the partials must
not depend on the container (FLAC is lossless; Ogg Vorbis and MP3 are lossy, so they get
looser bounds). The header cases follow the RIFF/WAVE layout (a 12-byte RIFF header, then
chunks of a 4-byte id and a 4-byte little-endian size; ``fmt `` holds format tag, channels,
rate, byte rate, block align, bits per sample), each mangled in one field.
"""

import math
import struct

import numpy as np
import pytest
import soundfile
from typer.testing import CliRunner

from membrane.cli import app
from membrane.errors import RecordingError
from membrane.recording import NO_PARTIALS, analyse, read_recording

RATE = 48000
DECAY = [(150.0, 0.0, 2.0), (238.9, -6.0, 1.5), (320.4, -10.0, 1.2), (441.2, -15.0, 1.0)]


def tap(seconds=1.5, rate=RATE, seed=0, lead=0.1):
    """Damped sinusoids from t = lead with white noise 40 dB below them (invented test data)."""
    rng = np.random.default_rng(seed)
    t = np.arange(int(seconds * rate)) / rate
    x = sum(10 ** (lv / 20) * np.exp(-3 * math.log(10) / t60 * t) *
            np.cos(2 * np.pi * f * t + rng.uniform(0, 2 * np.pi)) for f, lv, t60 in DECAY)
    x = np.concatenate([np.zeros(int(lead * rate)), x])
    return 0.3 * (x + rng.normal(0, 0.01, x.size)) / 1.5


@pytest.fixture(scope="module")
def good_wav(tmp_path_factory):
    path = tmp_path_factory.mktemp("wav") / "tap.wav"
    soundfile.write(path, tap(seconds=0.6), RATE, subtype="PCM_16")
    return path


@pytest.mark.parametrize("fmt, subtype, df, db", [
    ("FLAC", "PCM_24", 1e-6, 1e-4),    # lossless: the same samples to 24 bits
    ("OGG", "VORBIS", 0.05, 1.0),      # lossy: a perceptual coder moves weak lines a little
    ("MP3", "MPEG_LAYER_III", 0.05, 1.0),
])
def test_every_container_gives_the_partials_of_the_float_wav(tmp_path, fmt, subtype, df, db):
    x = tap()
    ref_path = tmp_path / "ref.wav"
    soundfile.write(ref_path, x, RATE, subtype="DOUBLE")
    ref = analyse(read_recording(ref_path), floor_db=-30).partials
    path = tmp_path / f"tap.{fmt.lower()}"
    soundfile.write(path, x, RATE, format=fmt, subtype=subtype)
    rec = read_recording(path)
    assert rec.rate == RATE and rec.encoding.startswith({"FLAC": "FLAC", "OGG": "Ogg",
                                                          "MP3": "MP3"}[fmt]), rec.encoding
    got = analyse(rec, floor_db=-30).partials
    for f, _, _ in DECAY:
        p = min(got, key=lambda p: abs(p.frequency - f))
        q = min(ref, key=lambda p: abs(p.frequency - f))
        assert abs(p.frequency - q.frequency) < df and abs(p.level_db - q.level_db) < db, (fmt, p, q)


# ----------------------------------------------------------------------- lying headers

def mangle(data: bytes, offset: int, fmt: str, value) -> bytes:
    return data[:offset] + struct.pack(fmt, value) + data[offset + struct.calcsize(fmt):]


def header_cases(good: bytes):
    """Each defect the hardening fuzz run found (offsets: RIFF size at 4; in the 16-byte
    fmt chunk that soundfile writes first, channels at 22, block align at 32; data size at 40)."""
    assert good[12:16] == b"fmt " and good[36:40] == b"data"
    big = good[:40] + struct.pack("<I", 3 * 2**30) + good[44:44 + 66_000]
    return {
        "RIFF size 0": mangle(good, 4, "<I", 0),
        "RIFF size 1": mangle(good, 4, "<I", 1),
        "RIFF size 4": mangle(good, 4, "<I", 4),
        "corrupt header": good[:12] + b"\x00" * 24 + good[36:],
        "channels 0": mangle(good, 22, "<H", 0),
        "block align 0": mangle(good, 32, "<H", 0),
        "3 GB data chunk in 66 kB": mangle(big, 4, "<I", len(big) - 8),
    }


WORDS = {"RIFF size 0": "RIFF size 0", "RIFF size 1": "RIFF size 1", "RIFF size 4": "RIFF size 4",
         "corrupt header": "corrupt WAV header", "channels 0": "0 channels",
         "block align 0": "block align 0", "3 GB data chunk in 66 kB": "data chunk declares"}


@pytest.mark.parametrize("case", list(WORDS))
def test_a_lying_wav_header_is_one_line_exit_2(good_wav, tmp_path, case):
    # Regression (hardening fuzz run): these gave UnboundLocalError, ZeroDivisionError or
    # MemoryError tracebacks from the old hand-rolled reader.
    path = tmp_path / "bad.wav"
    path.write_bytes(header_cases(good_wav.read_bytes())[case])
    with pytest.raises(RecordingError, match=WORDS[case]):
        read_recording(path)
    result = CliRunner().invoke(app, ["listen", str(path)])
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and WORDS[case] in lines[0] and "bad.wav" in lines[0], lines


def test_fuzzed_wav_headers_never_give_a_traceback(good_wav, tmp_path):
    # seeded, bounded: 60 files with one to four random header bytes or one size field
    # changed, some also cut short; each is read (exit 0) or refused in one line (exit 2), nothing else
    rng = np.random.default_rng(2026)
    good = good_wav.read_bytes()
    runner = CliRunner()
    outcomes = set()
    for i in range(60):
        cut = len(good) if rng.random() < 0.8 else 44 + int(rng.integers(0, 20000))
        data = bytearray(good[:cut])
        if rng.random() < 0.5:
            for _ in range(int(rng.integers(1, 5))):
                data[int(rng.integers(0, 44))] = int(rng.integers(0, 256))
        else:
            off = int(rng.choice([4, 16, 22, 24, 28, 32, 34, 40]))
            size = 2 if off in (22, 32, 34) else 4
            data[off:off + size] = int(rng.integers(0, 2 ** (8 * size))).to_bytes(size, "little")
        path = tmp_path / f"fuzz{i}.wav"
        path.write_bytes(bytes(data))
        result = runner.invoke(app, ["listen", str(path), "--format", "json"])
        assert result.exit_code in (0, 2), (i, result.output, result.exception)
        assert "Traceback" not in result.output
        if result.exit_code == 2:
            assert len(result.stderr.strip().splitlines()) == 1, (i, result.stderr)
        outcomes.add(result.exit_code)
    assert outcomes == {0, 2}  # the mangling both breaks headers and leaves some readable


# ----------------------------------------------------------------------- nothing but noise

@pytest.mark.parametrize("kind", ["dc", "white noise", "dc and noise"])
def test_noise_or_dc_claims_no_partials(tmp_path, kind):
    # Regression (hardening fuzz run): DC gave a "partial" at 106 Hz and white noise ones at
    # 1.8 and 5.7 kHz, with exit 0. Now: exit 0, no partials, and a warning that says so.
    rng = np.random.default_rng(7)
    x = {"dc": np.full(2 * RATE, 0.25),
         "white noise": rng.normal(0, 0.05, 2 * RATE),
         "dc and noise": 0.2 + rng.normal(0, 0.02, 2 * RATE)}[kind]
    path = tmp_path / "hiss.wav"
    soundfile.write(path, x, RATE, subtype="PCM_16")
    assert analyse(read_recording(path)).partials == ()
    result = CliRunner().invoke(app, ["listen", str(path), "--format", "json"])
    assert result.exit_code == 0, result.output
    import json
    data = json.loads(result.stdout)
    assert data["partials"] == [] and NO_PARTIALS in result.stderr
    with_drum = CliRunner().invoke(app, ["listen", str(path), "--drum", "kettledrum",
                                         "--physics", "ideal", "--format", "json"])
    assert with_drum.exit_code == 0, with_drum.output
    assert json.loads(with_drum.stdout)["fit"]["verdict"].startswith("no fit")
