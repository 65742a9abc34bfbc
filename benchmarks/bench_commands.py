"""Whole commands as a user runs them: CPU seconds per process, and the ratio to a reference.

Run: python benchmarks/bench_commands.py [--repeat 5] [--only modes,tune] [--skip two-target]

Each command runs as a fresh process of the installed ``membrane`` script (the one next to
this interpreter), so imports, the drum file, the solve and the printing are all counted.
Runs are paired: every repetition first times the reference process

    python -c "import numpy, scipy.special, scipy.linalg"

and then each command, so a machine that speeds up or slows down during the run moves both.
CPU time (user + system of the child) is reported rather than wall time, because a busy
machine inflates wall time most. The reference as defined (the issue's) lets OpenBLAS start its
thread pool, which the commands do not (the command line asks for one BLAS thread before numpy
loads); its single-threaded time is printed beside it, not used in the ratios. The table
gives the median over the repetitions, the median of the per-repetition ratios to the
reference, and the goals: an absolute goal in CPU seconds
(stated for the machine the goals were measured on) and, where one is stated, a ratio goal,
which is the one that carries over to another machine.

The radiation-table cache is pointed at a private temporary folder; "cold" runs get a fresh,
empty folder each time, "warm" runs share one that an untimed run has filled.

Python's bytecode cache is allowed (PYTHONDONTWRITEBYTECODE is removed from the children's
environment, and the untimed runs write it), as on an installed copy: with it set and no
``__pycache__`` beside an editable checkout, every command recompiles the package's source,
measured at 0.08 s of CPU per command, which no user pays.
"""

from __future__ import annotations

import argparse
import os
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
from pathlib import Path

REFERENCE = [sys.executable, "-c", "import numpy, scipy.special, scipy.linalg"]

# name, arguments, absolute goal (CPU s), ratio goal (or None), cache ("warm" | "cold")
COMMANDS = [
    ("--help", ["--help"], 0.15, None, "warm"),
    ("modes kettledrum (warm cache)", ["modes", "kettledrum"], 0.55, 1.8, "warm"),
    ("modes kettledrum (cold cache)", ["modes", "kettledrum"], 0.70, None, "cold"),
    ("modes snare", ["modes", "snare"], 0.70, None, "warm"),
    ("tune kettledrum (1,1) -> C3", ["tune", "kettledrum", "--mode", "1,1", "--target", "C3"], 0.80, 2.2, "warm"),
    ("two-target tune", ["tune", "kettledrum", "--target", "1,1=C3", "--target", "2,1=G3", "--free", "volume"],
     1.20, None, "warm"),
    ("strike kettledrum --out x.wav", ["strike", "kettledrum", "--out", "{tmp}/x.wav", "--force"], 0.80, 2.0, "warm"),
    ("listen x.wav --drum kettledrum", ["listen", "{tmp}/x.wav", "--drum", "kettledrum"], 2.0, 4.0, "warm"),
    ("render --mode 2,1 (GIF, 48 frames)", ["render", "kettledrum", "--mode", "2,1", "--out", "{tmp}/m.gif", "--force"],
     3.0, None, "warm"),
    ("render --grid (PNG)", ["render", "kettledrum", "--grid", "--out", "{tmp}/g.png", "--force"], 2.5, None, "warm"),
    ("handout", ["handout", "kettledrum", "--out", "{tmp}/h.pdf", "--force"], 4.0, None, "warm"),
]


def script() -> list[str]:
    """The installed console script next to this interpreter (else ``python -m membrane``)."""
    here = os.path.dirname(sys.executable)
    exe = shutil.which("membrane", path=here + os.pathsep + os.environ.get("PATH", ""))
    return [exe] if exe else [sys.executable, "-m", "membrane"]


def cpu_seconds(argv: list[str], env: dict[str, str]) -> float:
    """CPU time (user + system) of one child process; raises if it fails."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    done = subprocess.run(argv, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode != 0:
        raise SystemExit(f"failed: {' '.join(argv)}\n{done.stderr}")
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5, help="paired repetitions (median reported)")
    parser.add_argument("--only", default="", help="comma-separated words; run commands whose name has one")
    parser.add_argument("--skip", default="", help="comma-separated words; leave out commands whose name has one")
    args = parser.parse_args()
    words = [w for w in args.only.split(",") if w]
    skip = [w for w in args.skip.split(",") if w]
    chosen = [c for c in COMMANDS if (not words or any(w in c[0] for w in words))
              and not any(w in c[0] for w in skip)]

    exe = script()
    with tempfile.TemporaryDirectory() as tmp:
        env = dict(os.environ, MPLBACKEND="Agg", MEMBRANE_CACHE_DIR=os.path.join(tmp, "cache"))
        env.pop("MEMBRANE_CACHE", None)
        env.pop("PYTHONDONTWRITEBYTECODE", None)  # see the module docstring
        # untimed: the package's bytecode, the warm cache and the recording that listen reads
        subprocess.run([sys.executable, "-c", "import compileall, os, membrane; "
                        "compileall.compile_dir(os.path.dirname(membrane.__file__), quiet=1)"],
                       env=env, capture_output=True, check=True)
        subprocess.run([*exe, "modes", "kettledrum"], env=env, capture_output=True, check=True)
        subprocess.run([*exe, "modes", "snare"], env=env, capture_output=True, check=True)
        subprocess.run([*exe, "strike", "kettledrum", "--out", f"{tmp}/x.wav"], env=env,
                       capture_output=True, check=True)
        times = {c[0]: [] for c in chosen}
        ratios = {c[0]: [] for c in chosen}
        refs, refs_single = [], []
        for rep in range(args.repeat):
            ref = cpu_seconds(REFERENCE, env)
            refs.append(ref)
            refs_single.append(cpu_seconds(REFERENCE, dict(env, OPENBLAS_NUM_THREADS="1")))
            for name, argv, _, _, cache in chosen:
                run_env = env
                if cache == "cold":
                    run_env = dict(env, MEMBRANE_CACHE_DIR=tempfile.mkdtemp(dir=tmp))
                t = cpu_seconds([*exe, *[a.format(tmp=tmp) for a in argv]], run_env)
                times[name].append(t)
                ratios[name].append(t / ref)
            print(f"repetition {rep + 1}/{args.repeat} done (reference {ref:.3f} s)", file=sys.stderr)

    print(f"{'command':<36} {'CPU s':>7} {'goal s':>7} {'ratio':>6} {'goal':>6}  met")
    for name, _, goal_s, goal_ratio, _ in chosen:
        t = statistics.median(times[name])
        r = statistics.median(ratios[name])
        met = (r <= goal_ratio) if goal_ratio else (t <= goal_s)
        ratio_goal = f"{goal_ratio:.1f}x" if goal_ratio else "-"
        print(f"{name:<36} {t:7.3f} {goal_s:7.2f} {r:5.2f}x {ratio_goal:>6}  {'yes' if met else 'no'}")
    print("\nratio goals carry over between machines; absolute goals were set on a busy 2-core machine.")
    print(f"reference: median {statistics.median(refs):.3f} s; with OPENBLAS_NUM_THREADS=1 (as every "
          f"membrane command runs) {statistics.median(refs_single):.3f} s: the difference is OpenBLAS "
          "starting its threads, which the commands do not pay")
    print(f"script: {Path(exe[0]).name}; reference: {' '.join(REFERENCE[1:])}")


if __name__ == "__main__":
    main()
