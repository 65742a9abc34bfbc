"""`tune kettledrum --mode 1,1 --target X` for every semitone E2..A#4, timed.

Run: python benchmarks/tune_sweep.py

Each target is either met within 0.01 cent or refused with a reason in words (an InputError:
below the slack limit, beyond the film's strength, or inside a crossing with an air
resonance of the bowl); any other outcome is a failure and is printed. Times are given
against one full solve of the kettledrum's default table in the same run.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # one core, as the target is stated

import time  # noqa: E402


def main() -> None:
    from membrane import load_drum, solve
    from membrane.errors import InputError
    from membrane.tuning import tension_for
    from membrane.units import parse_pitch

    drum = load_drum("kettledrum")
    t0 = time.perf_counter()
    solve(drum.with_tension(3517.0), "full")
    reference = time.perf_counter() - t0
    names = ["C", "C#", "D", "D#", "E", "F", "F#", "G", "G#", "A", "A#", "B"]
    targets = [f"{names[i % 12]}{i // 12}" for i in range(12 * 2 + 4, 12 * 4 + 11)]
    met = refused = failed = 0
    start = time.perf_counter()
    for name in targets:
        hz = parse_pitch(name)
        t = time.perf_counter()
        try:
            result = tension_for(drum, targets=[((1, 1), hz)], table=False)
            off = result.targets[0].residual_cents
            ok = abs(off) <= 0.01
            met += ok
            failed += not ok
            what = f"met at {result.tension:.1f} N/m ({off:+.4f} cents)"
        except InputError as exc:
            refused += 1
            what = f"refused: {exc}"
        except Exception as exc:  # noqa: BLE001 - the sweep reports every failure
            failed += 1
            what = f"FAILED {type(exc).__name__}: {exc}"
        print(f"{name:4s} {hz:8.2f} Hz  {time.perf_counter() - t:6.1f} s  {what}", flush=True)
    total = time.perf_counter() - start
    print(f"{len(targets)} targets: {met} met, {refused} refused in words, {failed} failed; "
          f"{total:.0f} s ({total / reference:.1f} x one full solve of {reference:.2f} s)")


if __name__ == "__main__":
    main()
