"""Analysing a tap recording, against plain FFTs of the same signal, same run.

Run: python benchmarks/bench_recording.py

The signal: 5 s at 48 kHz, 16 damped partials at the first 15 modes of the built-in
kettledrum's stiff model at 4400 N/m, the (1,1) split into a pair 0.8 Hz apart, levels 0 to
-24 dB, T60 4 to 0.8 s (so the whole 5 s holds signal), white noise at 30 dB SNR.
Times (best of several runs):
  * membrane.recording.analyse: strike, seeds, band fits, everything (target < 1 s);
  * membrane.identify.identify on those partials with the built-in kettledrum, stiff
    physics;
  * the references: one numpy rfft of the 5 s signal, and a zero-padded Hann spectrum
    with peak picking (what a plain FFT analysis would do, and which cannot resolve the
    pair nor give decay times).
Prints each time, the ratios, and the worst frequency and T60 errors, so a speed-up that
costs accuracy shows; then runs itself again with OPENBLAS_NUM_THREADS=1.
"""

from __future__ import annotations

import math
import time

import numpy as np
import scipy.signal


def best_of(fn, repeat=5):
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t)
    return min(times), out


def signal(rate=48000, seconds=5.0, seed=0):
    """The stiff model of the built-in kettledrum at 4400 N/m: its first 15 modes, (1,1) split."""
    from membrane.drum import load_drum
    from membrane.solver import solve

    modes = solve(load_drum("kettledrum").with_tension(4400.0), "stiff", m_max=8, n_max=3).modes[:15]
    freqs = [md.frequency for md in modes]
    i11 = next(i for i, md in enumerate(modes) if (md.m, md.n) == (1, 1))
    freqs[i11:i11 + 1] = [freqs[i11] - 0.4, freqs[i11] + 0.4]  # split by 0.8 Hz
    rng = np.random.default_rng(seed)
    levels = -np.linspace(0, 24, len(freqs))
    t60 = np.linspace(4.0, 0.8, len(freqs))
    t = np.arange(int(seconds * rate)) / rate
    x = np.zeros_like(t)
    for f, lv, d in zip(freqs, levels, t60):
        x += 10 ** (lv / 20) * np.exp(-3 * math.log(10) / d * t) * np.cos(2 * np.pi * f * t + rng.uniform(0, 6.3))
    x += rng.normal(0, np.sqrt(np.mean(x**2)) / 10 ** 1.5, x.size)
    return 0.3 * x / np.max(np.abs(x)), list(zip(freqs, levels, t60))


def main():
    from membrane.drum import load_drum
    from membrane.identify import identify
    from membrane.recording import Recording, analyse

    rate = 48000
    x, truth = signal(rate)
    rec = Recording(samples=x, rate=float(rate), channels=1, encoding="synthetic")
    analyse(rec, floor_db=-40)  # warm up (imports, FFT plans)
    t_an, result = best_of(lambda: analyse(rec, floor_db=-40))
    t_fft, _ = best_of(lambda: np.fft.rfft(x), repeat=20)

    def plain():
        n = 4 * x.size
        p = np.abs(np.fft.rfft(x * np.hanning(x.size), n)) ** 2
        return scipy.signal.find_peaks(10 * np.log10(p + 1e-30), prominence=10)[0]

    t_plain, _ = best_of(plain)
    kettle = load_drum("kettledrum")
    t_id, ident = best_of(lambda: identify(kettle, result.partials, physics="stiff"), repeat=3)

    found = np.array([p.frequency for p in result.partials])
    df = max(float(np.min(np.abs(found - f))) for f, _, _ in truth)
    dt = max(abs(result.partials[int(np.argmin(np.abs(found - f)))].t60 / d - 1) for f, _, d in truth)
    print(f"signal: {x.size / rate:.1f} s at {rate} Hz, {len(truth)} partials, 30 dB SNR; "
          f"analysed {result.end_time - result.start_time:.2f} s of it")
    print(f"analyse (partials, decays):        {t_an * 1e3:8.1f} ms  (target < 1000 ms)")
    print(f"  found {len(result.partials)} partials; worst error {df:.4f} Hz, T60 {100 * dt:.1f} %")
    print(f"reference: numpy rfft of the signal {t_fft * 1e3:8.2f} ms  -> analyse / rfft = {t_an / t_fft:.0f}x")
    print(f"reference: padded Hann spectrum + peaks {t_plain * 1e3:6.1f} ms  -> analyse / that = {t_an / t_plain:.1f}x")
    print(f"identify (kettledrum, stiff):      {t_id * 1e3:8.1f} ms  ({len(ident.matches)} matched, "
          f"{len(ident.splits)} split; tension {ident.tension:.1f} N/m, true 4400)")


if __name__ == "__main__":
    import os
    import subprocess
    import sys

    main()
    if "OPENBLAS_NUM_THREADS" not in os.environ:
        # the band fits are many small matrix problems: on a busy machine a threaded BLAS
        # spends more time waking threads than computing, so show the single-thread run too
        print("\nthe same with OPENBLAS_NUM_THREADS=1:")
        subprocess.run([sys.executable, __file__], env=dict(os.environ, OPENBLAS_NUM_THREADS="1"),
                       check=True)
