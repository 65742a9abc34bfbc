"""Uneven lugs: the forward split table and the inverse, timed against a reference in the same run.

Run: python benchmarks/bench_lugs.py

An invented 26-inch head (0.3302 m, 4000 N/m, 0.2641 kg/m^2), 8 lugs with a seeded 3 % spread.
Times (wall clock, one core: BLAS threads pinned to 1 before numpy loads; best of 5):
  * reference: one in-vacuum stiff mode table (``solve(drum, "stiff")``, m 0..6, n 1..3) at
    a fresh tension;
  * forward: the exact split table (Ritz solve, all orders coupled), m <= 6, n <= 3, stiff;
  * forward, first order: the perturbation table, same size;
  * inverse: lug tensions from 8 tap pitches and the (1,1), (2,1) splits, plus the turns.
Targets from the issue: forward under 0.5 s, inverse under 2 s.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # one core, as the targets are stated

import time  # noqa: E402


def best(fn, repeat: int = 5) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def main() -> None:
    import numpy as np

    from membrane import Drum, Head, solve
    from membrane.lugs import MeasuredSplit, estimate_lugs, prescribe_turns, split_table
    from membrane.physics.prestress import rim_tension

    head = Head(radius=0.3302, tension=4000.0, areal_density=0.2641, thickness=0.19e-3,
                youngs_modulus=4.5e9, poisson_ratio=0.38)
    drum = Drum(head=head, name="invented 26-inch head")
    lugs = 4000.0 * (1 + 0.03 * np.random.default_rng(8).standard_normal(8))
    rim = rim_tension(lugs)
    fresh = iter(4000.0 + np.arange(1, 100))  # a new tension each time: nothing cached
    ref = best(lambda: solve(drum.with_tension(next(fresh)), "stiff", m_max=6, n_max=3))
    fwd = best(lambda: split_table(drum, rim, physics="stiff", m_max=6, n_max=3))
    first = best(lambda: split_table(drum, rim, physics="stiff", method="first-order", m_max=6, n_max=3))
    table = split_table(drum, rim, physics="stiff", m_max=2, n_max=1)
    pitches = 150.0 * np.sqrt(lugs / lugs.mean())
    splits = [MeasuredSplit(s.m, s.n, s.low_frequency, s.high_frequency) for s in table.splits if s.m > 0]

    def inverse():
        est = estimate_lugs(drum, count=8, pitches=pitches, splits=splits, physics="stiff")
        prescribe_turns(drum, est.tensions, cents_per_turn=40.0, physics="stiff")

    inv = best(inverse)
    print(f"reference: stiff mode table m 0..6, n 1..3: {ref:.4f} s")
    print(f"forward, exact split table (8 lugs, m <= 6, n <= 3): {fwd:.4f} s  ratio {fwd / ref:6.2f}  "
          f"(target 0.5 s: {'met' if fwd < 0.5 else 'NOT met'})")
    print(f"forward, first-order split table: {first:.4f} s  ratio {first / ref:6.2f}")
    print(f"inverse (8 pitches + 2 splits) and turns: {inv:.4f} s  ratio {inv / ref:6.2f}  "
          f"(target 2 s: {'met' if inv < 2 else 'NOT met'})")


if __name__ == "__main__":
    main()
