"""Every float option is finite and in range, and absurd pitches and pictures are refused up front.

Click's own number ranges let NaN through (every comparison with NaN is false), so each
case here used to run: `strike --listener-azimuth nan` printed every level as null with
exit 0, `--listener-distance "1e-300 m"` gave 9e301 Pa, `render --elevation inf` drew
with a NaN camera, `tune --target "A4+999999999999c"` raised OverflowError. Now each is
one line on stderr and exit code 2, before any solving.
"""

import math

import pytest
from typer.testing import CliRunner

from membrane.cli import app
from membrane.errors import InputError
from membrane.render.animate import View, check_view, memory_needed
from membrane.units import parse_pitch

from conftest import one_line_error  # noqa: E402  (the shared bad-input check)

runner = CliRunner()


@pytest.mark.parametrize("args, words", [
    (["strike", "kettledrum", "--listener-azimuth", "nan"], "--listener-azimuth"),
    (["strike", "kettledrum", "--listener-azimuth", "inf"], "--listener-azimuth"),
    (["strike", "kettledrum", "--angle", "nan"], "--angle"),
    (["strike", "kettledrum", "--at", "nan"], "--at"),
    (["strike", "kettledrum", "--listener-angle", "nan"], "--listener-angle"),
    (["strike", "kettledrum", "--listener-distance", "1e-300 m"], "--listener-distance"),
    (["strike", "kettledrum", "--listener-distance", "inf m"], "--listener-distance"),
    (["strike", "kettledrum", "--contact-time", "1e-300 s"], "--contact-time"),
    (["strike", "kettledrum", "--assume-t60", "1e-300 s"], "--assume-t60"),
    (["strike", "kettledrum", "--seconds", "nan"], "--seconds"),
    (["tune", "kettledrum", "--cents-per-turn", "nan"], "--cents-per-turn"),
    (["tune", "kettledrum", "--cents-per-turn", "-inf"], "--cents-per-turn"),
    (["tune", "kettledrum", "--mode", "1,1", "--target", "A4+999999999999c"], "--target"),
    (["tune", "kettledrum", "--mode", "1,1", "--target", "A99999999999999"], "--target"),
    (["tune", "kettledrum", "--mode", "1,1", "--target", "1e300 Hz"], "--target"),
    (["tune", "kettledrum", "--lug-pitches", "D3,D3,D3-99999999c"], "--lug-pitches"),
    (["render", "kettledrum", "--mode", "1,1", "--out", "x.gif", "--elevation", "inf"], "--elevation"),
    (["render", "kettledrum", "--mode", "1,1", "--out", "x.gif", "--elevation", "nan"], "--elevation"),
    (["render", "kettledrum", "--mode", "1,1", "--out", "x.gif", "--azimuth", "nan"], "--azimuth"),
    (["render", "kettledrum", "--mode", "1,1", "--out", "x.gif", "--amplitude", "nan"], "--amplitude"),
    (["render", "kettledrum", "--mode", "1,1", "--out", "x.gif", "--fps", "nan"], "--fps"),
    (["render", "kettledrum", "--mode", "1,1", "--out", "x.gif", "--frames", "1000", "--size", "4096"],
     "--frames and --size"),
    (["lugs", "kettledrum", "--lug-tensions", "1e-300,4000,4000,4000"], "--lug-tensions"),
    (["lugs", "kettledrum", "--turns-per-newton", "1e-300"], "--turns-per-newton"),
    (["lugs", "kettledrum", "--cents-per-turn", "1e-300"], "--cents-per-turn"),
    (["listen", "no-such.wav", "--floor", "nan"], "--floor"),
    (["listen", "no-such.wav", "--floor", "-inf"], "--floor"),
])
def test_bad_float_options_are_one_line(tmp_path, monkeypatch, args, words):
    monkeypatch.chdir(tmp_path)
    one_line_error(runner.invoke(app, [*args, "--physics", "ideal"]), words)
    assert list(tmp_path.iterdir()) == []  # nothing written


@pytest.mark.parametrize("text", ["A4+999999999999c", "A4-1300c", "C-99", "C11", "A4+1e9c", "1e-300",
                                  "200000 Hz", "0.05 Hz", "Bbbbbbbbbb4"])
def test_absurd_pitches_are_refused(text):
    with pytest.raises(InputError):
        parse_pitch(text)


@pytest.mark.parametrize("text, hz", [
    ("A4+1200c", 880.0),          # one octave up: the largest offset allowed
    ("A0", 27.5),                 # the lowest A of a piano (ISO 16: A4 = 440 Hz)
    ("C8", 4186.009),
    ("A-1", 13.75),
])
def test_sensible_pitches_still_parse(text, hz):
    assert parse_pitch(text) == pytest.approx(hz, rel=1e-6)


def test_the_picture_memory_bound():
    # the GIF holds every frame (about 8 bytes a pixel each); an MP4 streams them
    big = View(frames=1000, width=4096, height=4096)
    assert memory_needed(big, "gif") > 1e11 > memory_needed(big, "mp4")
    with pytest.raises(InputError, match="GB of memory"):
        check_view(big, "gif")
    check_view(View(), "gif")  # the default 48 frames at 480x480 (about 0.1 GB) is fine
    assert memory_needed(View(), "gif") < 0.2e9
    assert not math.isnan(memory_needed(View(), "png"))
