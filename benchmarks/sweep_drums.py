"""Full physics over many generated drums: every solve must succeed and every T60 be shown.

Run: python benchmarks/sweep_drums.py [COUNT] [SEED]     (default 300 drums, seed 1)
     python benchmarks/sweep_drums.py --continuity [COUNT] [SEED] [POINTS]
         (default 20 drums, seed 11, 5 tension values each way)

Drums are drawn at random from what people build (invented, not real instruments):
6-32 inch heads of polyester, 0.1-0.4 mm in 1 or 2 plies, or a custom areal density with
no stiffness; tension from 1.5 x the slack limit to 80 % of the film's yield (or
200-8000 N/m without a yield); no body, a kettle whose air column V / (pi a^2) is 0.2-1.5
head diameters, or a shell 5-60 cm deep whose resonant head is equal, nearly equal
(relative 1e-12..1e-4) or unequal; air at -10..40 degC.

The kettle's volume follows the head: a fixed 0.03-0.35 m^3 under any head from 6 to 32 in
gave air columns up to 70 diameters (a 7-inch head over 0.34 m^3: a 12.8 m pipe), which no
one builds as a kettle (real bowls hold about 0.2-1.5 diameters; a 26-inch timpano's
0.17 m^3 is 0.75) and which membrane.drum.Drum now refuses beyond 8 diameters (the old
sweep failed on 4 drums of 300, all above 11). Each is solved with the default table (m 0..6,
n 1..3). Prints failures (with the drum), blank T60s, clouds of spurious roots (more roots of one
order within 2 % of one frequency than its heads and body can hold: see crowding), and the time
per drum against a reference solve of the builtin kettledrum in the same run (the time includes
a second solve_drum for every root, labelled or not, that the cloud check counts).
tests/test_sweep.py runs a small sample of the same drums.

With --continuity, each drum's roots of one order (m = index mod 3; the head modes n = 1, 2
and every air row below them) are followed in tension from T to 2T and from T to T/2
(membrane.branches.follow, five values each way unless POINTS says otherwise, each root's
first step predicted from its perturbation slope): every root must be followed to the end,
with |d ln f / d ln T| <= 0.6 between the values (the tension's share of the stiffness, over
2, is at most 1/2), and the roots reached at 2T are looked up in a whole solve there.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # one core, as the target is stated

import math  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402

INCH = 0.0254


def drum_table(rng) -> dict:
    """One random drum as a drum-file table (SI numbers, strings with units where needed)."""
    diameter = rng.uniform(6, 32) * INCH
    head = {"diameter": f"{diameter} m"}
    if rng.random() < 0.8:
        head.update(film="polyester", thickness=f"{rng.uniform(0.1, 0.4)} mm",
                    plies=int(rng.integers(1, 3)))
        h = float(head["thickness"].split()[0]) * 1e-3
        plies = head["plies"]
        d = plies * 4.5e9 * h**3 / (12 * (1 - 0.38**2))  # the film table's E and nu
        slack = d * (3.8317 / (diameter / 2)) ** 2  # D (j11/a)^2, A&S Table 9.5
        top = 0.8 * 100e6 * plies * h  # 80 % of the yield stress (films.toml)
        lo = max(1.5 * slack, 1.0)
    else:
        head["areal_density"] = f"{rng.uniform(0.05, 0.6)} kg/m^2"
        lo, top = 200.0, 8000.0
    tension = math.exp(rng.uniform(math.log(lo), math.log(max(top, 1.01 * lo))))
    head["tension"] = f"{tension} N/m"
    table = {"name": "generated drum (invented)", "head": head,
             "air": {"temperature": f"{rng.uniform(-10, 40)} degC"}}
    kind = rng.choice(["none", "kettle", "shell"])
    if kind == "kettle":
        # a bowl's air column V / (pi a^2) of 0.2-1.5 head diameters (timpani about 0.4-0.8)
        column = rng.uniform(0.2, 1.5) * diameter
        table["body"] = {"kind": "kettle", "volume": f"{column * math.pi * diameter**2 / 4} m^3"}
    elif kind == "shell":
        table["body"] = {"kind": "shell", "depth": f"{rng.uniform(0.05, 0.6)} m"}
        res = dict(head)
        how = rng.choice(["equal", "near", "unequal"])
        if how == "near":
            res["tension"] = f"{tension * (1 + 10 ** rng.uniform(-12, -4))} N/m"
        elif how == "unequal":
            res["tension"] = f"{tension * rng.uniform(0.5, 1.5)} N/m"
        table["resonant_head"] = res
    return table


def drums(count: int, seed: int = 1):
    """``count`` generated drums (membrane.drum.Drum) and their tables."""
    from membrane.drum import parse_drum

    rng = np.random.default_rng(seed)
    out = []
    for _ in range(count):
        t = drum_table(rng)
        out.append((parse_drum(t), t))
    return out


# A cloud test, per order: the roots within CLOUD_WIDTH (relative) of any root's frequency are
# at most two per head (a head mode and its neighbour of the other head, or of the other n),
# plus the body's rigid-walled duct resonances of that m within a factor SHIFT of it (the head
# moves them), plus SPARE. Common practice, no source: a bound to flag a cloud of spurious
# roots (a slack shell had 130 within 0.2 Hz of 55 Hz in one order), not a prediction.
CLOUD_WIDTH, SHIFT, SPARE = 0.02, 2.0, 3


def crowding(drum, solved):
    """Orders holding more roots near one frequency than the order can: a list of problems.

    ``solved`` is assembly.solve_drum's list of OrderRoots (every root, labelled or not).
    """
    from membrane.physics.cavity import duct_wavenumbers

    c = drum.air.sound_speed
    depth = drum.air_depth if drum.body.kind in ("kettle", "shell") else None
    problems = []
    for od in solved:
        order = od.order
        if depth is not None:
            gamma = duct_wavenumbers(m=order.m, count=40, radius=drum.head.radius)
            kz = np.arange(80) * math.pi / depth
            duct = np.sort((c * np.hypot(gamma[:, None], kz[None, :])).ravel())
        else:
            duct = np.zeros(0)
        w = np.sort(od.omega.real)
        for wk in w:
            near = int(np.sum(np.abs(w - wk) <= CLOUD_WIDTH * wk))
            allowed = (2 * len(order.heads) + SPARE
                       + int(np.sum((duct >= wk / SHIFT) & (duct <= SHIFT * wk))))
            if near > allowed:
                branch = "" if order.cross_sign is None else f" ({'+' if order.cross_sign > 0 else '-'})"
                problems.append(f"order m = {order.m}{branch}: {near} roots within "
                                f"{100 * CLOUD_WIDTH:g} % of {wk / (2 * math.pi):.2f} Hz, at most "
                                f"{allowed} expected: a cloud of spurious roots")
                break
    return problems


def check(drum, *, m_max=6, n_max=3):
    """Solve one drum; return a list of problems (empty when all is well)."""
    from membrane import solve
    from membrane.modes import t60_text
    from membrane.physics.assembly import solve_drum

    try:
        result = solve(drum, "full", m_max=m_max, n_max=n_max)
        # the same solve's every root, unlabelled ones too (solve shows only labelled rows)
        solved = solve_drum(drum, m_max=m_max, n_max=n_max, losses=drum.losses)
    except Exception as exc:  # noqa: BLE001 - the sweep reports every failure
        return [f"{type(exc).__name__}: {exc}"]
    problems = crowding(drum, solved)
    for md in result:
        if md.decay is None or t60_text(md.decay) == "":
            problems.append(f"blank T60 for {md.label} at {md.frequency:.2f} Hz")
    heads = [md for md in result if md.kind == "head"]
    if len(heads) != (m_max + 1) * n_max * (2 if drum.resonant_head is not None else 1):
        problems.append(f"{len(heads)} head modes")
    return problems


SLOPE = 0.6  # |d ln f / d ln T| allowed between two values of a track


def continuity(drum, index, *, points: int = 5):
    """Follow one order's roots over T/2..2T at ``points`` values each way (both ends
    included); (problems, roots followed, steps, kinds of the roots followed)."""
    from dataclasses import replace

    from membrane.branches import follow, order_roots

    m = index % 3
    t0 = drum.head.tension

    def at(x):  # both heads of a shell scaled together (equal heads stay equal)
        k = math.exp(x) / t0
        d = drum.with_tension(t0 * k)
        if drum.resonant_head is not None:
            d = replace(d, resonant_head=replace(drum.resonant_head,
                                                 tension=drum.resonant_head.tension * k))
        return d

    start = order_roots(drum, m=m, n_max=2, losses=drum.losses)
    top = max(start.omega[r].real for r, lab in enumerate(start.labels)
              if lab is not None and lab[0] == "head")
    pick = [r for r, lab in enumerate(start.labels) if lab is not None and start.omega[r].real <= top]
    problems, steps = [], 0
    for factor in (2.0, 0.5):
        xs = np.linspace(math.log(t0), math.log(factor * t0), points)
        track = follow(at, xs, m=m, n_max=2, roots=pick, losses=drum.losses, labels=False,
                       parameter="tensions")
        steps += track.steps
        f = track.frequencies()
        if not np.all(np.isfinite(f)):
            problems.append(f"x{factor:g}: followed only to value "
                            f"{int(np.sum(np.all(np.isfinite(f), axis=1)))} of {points}")
            continue
        slope = np.abs(np.diff(np.log(f), axis=0)) / np.abs(np.diff(xs))[:, None]
        if np.any(slope > SLOPE):
            problems.append(f"x{factor:g}: a jump, d ln f / d ln T = {slope.max():.2f}")
        if factor == 2.0:
            end = order_roots(at(xs[-1]), m=m, n_max=2, losses=drum.losses)
            lost = [(start.labels[r], w) for r, w in zip(pick, track.omega[-1])
                    if np.min(np.abs(end.omega - w)) > 1e-6 * abs(w)]
            for lab, w in lost:
                problems.append(f"x2: the root from {lab} at {w.real / (2 * np.pi):.2f} Hz is not in "
                                "the whole solve there")
    return problems, len(pick), steps, [start.labels[r][0] for r in pick]


def main_continuity(count: int, seed: int, points: int = 5) -> None:
    failures = 0
    start = time.perf_counter()
    for i, (drum, table) in enumerate(drums(count, seed)):
        t = time.perf_counter()
        problems, roots, steps, _ = continuity(drum, i, points=points)
        failures += bool(problems)
        print(f"drum {i} (m = {i % 3}, {table.get('body', {}).get('kind', 'none')}): {roots} roots, "
              f"{steps} local steps, {time.perf_counter() - t:.1f} s" +
              ("" if not problems else "\n   " + "\n   ".join(problems)), flush=True)
    print(f"{count} drums followed over T/2..2T at {points} values, {failures} with a problem; "
          f"{time.perf_counter() - start:.0f} s")


def main() -> None:
    args = sys.argv[1:]
    if args and args[0] == "--continuity":
        count = int(args[1]) if len(args) > 1 else 20
        seed = int(args[2]) if len(args) > 2 else 11
        points = int(args[3]) if len(args) > 3 else 5
        main_continuity(count, seed, points)
        return
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 300
    seed = int(sys.argv[2]) if len(sys.argv) > 2 else 1
    from membrane import load_drum, solve

    t0 = time.perf_counter()
    solve(load_drum("kettledrum").with_tension(3517.0), "full")
    reference = time.perf_counter() - t0
    failures = 0
    start = time.perf_counter()
    progress = os.environ.get("SWEEP_PROGRESS")  # set: each drum's time on stderr
    for i, (drum, table) in enumerate(drums(count, seed)):
        t = time.perf_counter()
        problems = check(drum)
        if progress:
            print(f"drum {i}: {time.perf_counter() - t:.2f} s", file=sys.stderr, flush=True)
        if problems:
            failures += 1
            print(f"drum {i}: {table}\n   " + "\n   ".join(problems), flush=True)
    total = time.perf_counter() - start
    print(f"{count} drums, {failures} with a problem; {total / count:.2f} s per drum "
          f"({total / count / reference:.2f} x one kettledrum solve of {reference:.2f} s)")


if __name__ == "__main__":
    main()
