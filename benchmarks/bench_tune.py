"""A single-target tune with full physics, timed against one full solve in the same run.

Run: python benchmarks/bench_tune.py

The builtin 26-inch kettledrum (invented demo) at 4000 N/m; the (1,1) mode is tuned to
several target pitches, each a fresh tension the process has not solved before. Times
(wall clock, one core: BLAS threads pinned to 1 before numpy loads):
  * reference: one full solve of the default table (m = 0..6, n = 1..3) at a fresh tension;
  * search only: ``tension_for(..., table=False)``, the root-finding (solves of the orders
    the target needs, m = 0..1 for (1,1), n = 1..3);
  * tune: ``tension_for`` as ``membrane tune`` calls it, search plus the new mode table.
Then the two-target tune with the volume freed. Also prints the solves each search took, the suggested and naive tensions, and how far
the naive (f*/f)^2 tension misses the target under the same model.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # one core, as the target is stated

import time  # noqa: E402

TARGETS = ("A2", "C3", "D3", "F2")


def main() -> None:
    from membrane import load_drum, solve
    from membrane.tuning import tension_for
    from membrane.units import cents, parse_pitch

    drum = load_drum("kettledrum")
    solve(drum, "full")  # the drum as it is: what `membrane modes` would already have shown

    t0 = time.perf_counter()
    solve(drum.with_tension(3517.0), "full")
    reference = time.perf_counter() - t0
    print(f"reference: one full solve (m 0..6, n 1..3) at a fresh tension: {reference:.3f} s")

    print(f"{'target':>6} {'search s':>9} {'ratio':>6} {'tune s':>7} {'ratio':>6} {'solves':>6} "
          f"{'T (N/m)':>9} {'naive T':>9} {'naive miss (cents)':>18}")
    searches = []
    for i, name in enumerate(TARGETS):
        target = parse_pitch(name) * 2 ** ((i + 1) / 1200)  # a cent apart each, so nothing is cached
        t0 = time.perf_counter()
        result = tension_for(drum, targets=[((1, 1), target)], physics="full", table=False)
        search = time.perf_counter() - t0
        t0 = time.perf_counter()
        tension_for(drum, targets=[((1, 1), target * 2 ** (0.5 / 1200))], physics="full")
        tune = time.perf_counter() - t0
        naive = solve(drum.with_tension(result.naive_tension), "full", m_max=1).find(1, 1).frequency
        searches.append(search)
        print(f"{name:>6} {search:9.3f} {search / reference:6.2f} {tune:7.3f} {tune / reference:6.2f} "
              f"{result.solves:6d} {result.tension:9.1f} {result.naive_tension:9.1f} "
              f"{cents(naive, target):18.1f}")
    print(f"search mean {sum(searches) / len(searches):.3f} s (target < 1 s)")

    # two targets and the kettle's volume freed, as `membrane tune kettledrum --target 1,1=C3
    # --target 2,1=G3 --free volume` runs it (Gauss-Newton with the perturbation Jacobian)
    targets = [((1, 1), parse_pitch("C3")), ((2, 1), parse_pitch("G3"))]
    t0 = time.perf_counter()
    result = tension_for(drum, targets=targets, physics="full", free="volume")
    two = time.perf_counter() - t0
    print(f"two targets, free volume: {two:.3f} s ({two / reference:.2f} x the reference), "
          f"{result.solves} solves, T {result.tension:.1f} N/m, V {result.value:.4g} m^3, residuals "
          + ", ".join(f"{t.residual_cents:+.3f}" for t in result.targets) + " cents")


if __name__ == "__main__":
    main()
