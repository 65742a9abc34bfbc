"""A decay with many strong, fast-dying lines: every line found, nothing else reported.

Invented test data: 25 damped sinusoids with the frequencies, levels (at the onset, dB re
the strongest) and decay times that the built-in kettledrum's strike gives (``membrane
strike kettledrum``, rounded), used here only as a plausible pattern: slow (m,1) modes
beside strong lines that die within 0.1 to 0.3 s. The reference is the generator itself.
"""

import pytest

from membrane.recording import analyse

from test_recording import at_reference, read_array, synth

LINES = [(118.87, -15.6, 0.145), (151.01, -15.2, 1.141), (227.39, -20.0, 2.081),
         (249.84, -12.3, 0.310), (299.79, -27.0, 2.539), (308.78, -32.6, 4.135),
         (344.82, -3.4, 0.261), (370.22, -35.1, 2.366), (379.11, -18.6, 0.094),
         (411.51, -16.2, 0.676), (439.39, -43.9, 2.067), (442.07, -9.0, 0.107),
         (480.95, -10.9, 0.305), (492.40, -23.1, 0.871), (507.66, -53.4, 1.809),
         (516.84, 0.0, 0.916), (533.71, -3.7, 0.110), (570.21, -32.8, 1.123),
         (594.49, -44.9, 1.104), (646.05, -44.8, 1.245), (677.21, -32.0, 0.869),
         (720.40, -61.2, 1.231), (762.55, -33.6, 0.598), (842.49, -39.4, 0.691),
         (920.64, -49.7, 0.788)]


@pytest.mark.xfail(strict=True, reason=(
    "at 90 dB SNR six partials above -40 dB are in no line (391.8 Hz -15.6 dB, 626.3, 696.3, "
    "700.8, 739.8, 742.7 Hz, T60 0.15-0.2 s) and 533.71 Hz (-13.3 dB at 20 ms, T60 0.11 s) "
    "is missing. The missing line: it makes no seed (a fast line's peak is broad), and it "
    "falls between two bands' keep ranges: the band at 512.2 Hz finds it (533.92 Hz, T60 "
    "0.11 s) but keeps only to its flat part's end, 532.2 Hz, and the next, at 570.3 Hz, "
    "finds it too (533.66 Hz) but keeps only from 550.3 Hz; keeping to the middle of the taper finds it but adds spurious lines (10 "
    "instead of 7 on the strike preview). The spurious lines: on the noiseless sum they "
    "come in pairs about 20 Hz either side of a line at a band's centre (822.9 and 862.6 "
    "about 842.5 Hz, 900.5 and 940.3 about 920.6 Hz), where the raised-cosine mask's flat "
    "part meets its taper: the mask's second derivative jumps there, and a strong, broad "
    "line's skirt leaves a tail in the band signal that ESPRIT fits as fast components. A "
    "Planck taper (every derivative continuous) leaves one (376.1 Hz, the 379.1 Hz line "
    "3 Hz off) and 1 of 12 on the noiseless sum, but moves the real timpani (the low "
    "timpano's (2,1) back to one component 1.06 Hz off; with the narrow refit on every "
    "capped band the 29-inch identification fails), so it is not landed"))
def test_a_strike_with_many_fast_strong_lines_gives_its_lines_and_nothing_else():
    x = synth(LINES, duration=4.0, snr_db=90.0, seed=0)
    found = analyse(read_array(x)).partials
    truth = at_reference(LINES)
    missed = [(f, round(level, 1)) for f, level, _ in truth if level > -30.0
              and min(min(abs(p.frequency - f), abs(p.settled - f)) for p in found) > 1.0]
    spurious = [(round(p.frequency, 1), round(p.level_db, 1)) for p in found
                if p.level_db > -40.0 and min(abs(p.frequency - f) for f, _, _ in LINES) > 1.0]
    assert not missed and not spurious, (missed, spurious)


# The built-in kettledrum's strike: its modes as `membrane strike kettledrum` lists them
# (frequency Hz, T60 s, level dB); the generator is a sum of these damped sinusoids at fixed
# frequencies, so nothing in it glides. (3,3) sits 18.6 Hz below two fast components the
# band model fits beside it (695.8, 700.6 Hz, T60 0.11 s), which once made a false glide
# from 688.3 Hz down to 677.2 Hz.
MODE_33 = (677.21, 0.869, -32.0)


def test_the_strike_preview_has_no_glide_and_its_steady_line_keeps_its_frequency(tmp_path):
    import subprocess
    import sys

    from membrane.recording import read_recording

    wav = tmp_path / "kettledrum.wav"
    subprocess.run([sys.executable, "-m", "membrane", "strike", "kettledrum", "--out", str(wav)],
                   check=True, capture_output=True)
    found = analyse(read_recording(wav)).partials
    glides = [(round(p.frequency, 2), round(p.settled, 2)) for p in found if "glide" in p.flags]
    assert not glides, glides
    f, t60, _ = MODE_33
    near = [p for p in found if abs(p.frequency - f) < 1.0]
    assert len(near) == 1, [(p.frequency, p.t60) for p in found if abs(p.frequency - f) < 15]
    assert near[0].t60 == pytest.approx(t60, rel=0.05)
