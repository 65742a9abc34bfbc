"""A synthetic timpani-like stroke with what real recordings have, and what the analysis must
make of it.

Invented test data (the generator's parameters are the reference): a principal (1,1) that
glides down as the head settles, its fifth (2,1), an octave (3,1) split by uneven tension
into two partials 0.6 Hz apart, an early loud (0,1) thud that dies in 80 ms, a 3 ms burst of
mallet noise, room noise, and a close microphone's low-frequency lift (a first-order
low shelf, +6 dB below about 60 Hz).
"""

import math

import numpy as np
import pytest
import scipy.signal

from membrane.recording import REFERENCE_TIME_S, Recording, analyse

RATE = 44100
GLIDE_CENTS = -60.0  # (1,1) starts this far above where it settles (as timpani_mid_1 does)
GLIDE_TAU_S = 0.3  # and settles with this time constant


def stroke(seed=0, seconds=3.0):
    rng = np.random.default_rng(seed)
    t = np.arange(int(seconds * RATE)) / RATE
    # (1,1): frequency settles exponentially to 100 Hz; phase is its running integral
    f11 = 100.0 * 2 ** (-GLIDE_CENTS / 1200 * np.exp(-t / GLIDE_TAU_S))
    phase = 2 * np.pi * np.cumsum(f11) / RATE
    x = np.exp(-3 * math.log(10) / 3.0 * t) * np.cos(phase)
    parts = [(150.0, -4.0, 2.5), (200.0, -8.0, 2.0), (200.6, -10.0, 1.8), (80.0, 6.0, 0.08)]
    for f, level, t60 in parts:
        x += 10 ** (level / 20) * np.exp(-3 * math.log(10) / t60 * t) * \
            np.cos(2 * np.pi * f * t + rng.uniform(0, 2 * np.pi))
    burst = int(0.003 * RATE)
    x[:burst] += rng.normal(0, 0.5, burst)  # the mallet's felt on the head
    x = np.concatenate([np.zeros(int(0.3 * RATE)), x])
    x += rng.normal(0, 10 ** (-50 / 20), x.size)  # room noise, 50 dB below the principal
    # low shelf: H(s) = (s + 2 w0) / (s + w0), +6 dB at DC, 0 dB high up, w0 = 2 pi 60 Hz
    w0 = 2 * np.pi * 60.0
    b, a = scipy.signal.bilinear([1.0, 2 * w0], [1.0, w0], RATE)
    return 0.2 * scipy.signal.lfilter(b, a, x), (b, a)


def gain_db(ba, f):
    return float(20 * np.log10(abs(scipy.signal.freqz(*ba, worN=[f], fs=RATE)[1][0])))


@pytest.fixture(scope="module")
def result():
    x, ba = stroke()
    return analyse(Recording(samples=x, rate=float(RATE), channels=1, encoding="test")), ba


def test_the_gliding_principal_is_one_partial_with_its_glide(result):
    analysis, _ = result
    near = [p for p in analysis.partials if 98.0 < p.settled < 103.0 and p.level_db > -30]
    assert len(near) == 1, [(p.frequency, p.settled, p.level_db, p.flags) for p in near]
    (p,) = near
    assert "glide" in p.flags
    assert p.settled == pytest.approx(100.0, abs=0.3)
    # from 20 ms on the glide left is GLIDE_CENTS * exp(-0.02 / tau) minus what remains at
    # the end of the track (nothing): about -56 cents; the track's first 0.1 s frame blurs it
    expected = GLIDE_CENTS * math.exp(-REFERENCE_TIME_S / GLIDE_TAU_S)
    assert p.glide_cents == pytest.approx(expected, abs=20.0)


def test_fifth_and_split_octave_are_resolved_and_the_thud_is_not_the_reference(result):
    analysis, ba = result
    freqs = np.array([p.frequency for p in analysis.partials])
    for f in (150.0, 200.0, 200.6):
        assert np.min(np.abs(freqs - f)) < 0.05, f
    strongest = max(analysis.partials, key=lambda p: p.level_db)
    assert 98.0 < strongest.settled < 103.0  # the principal, not the thud or the mallet
    # the fifth's level re the principal at the reference time: the generator's -4 dB, the
    # two decays over 20 ms, and the shelf's gain at each frequency
    fifth = analysis.partials[int(np.argmin(np.abs(freqs - 150.0)))]
    truth = -4.0 - 60 * REFERENCE_TIME_S * (1 / 2.5 - 1 / 3.0) + gain_db(ba, 150.0) - \
        gain_db(ba, 100.0)
    assert fifth.level_db == pytest.approx(truth, abs=1.0)
