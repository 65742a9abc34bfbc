"""The whole ``listen RECORDING --drum DRUM`` process with full physics, against a bare start.

Run: python benchmarks/bench_listen.py

Recordings: the built-in kettledrum's own strike preview (``membrane strike kettledrum
--out``, 4 s: the fit must give back the drum file's 4000 N/m), a synthetic timpani-like
stroke of 4 s at 44.1 kHz (the generator of tests/test_recording_timpani.py, stretched to
4 s: gliding (1,1), fifth, split octave, thud, mallet noise, room noise, low-frequency
lift), and the real excerpt tests/data/timpani_high_1.flac (2 s at 32 kHz). Each is run as
a fresh process (``python -m membrane listen FILE --drum kettledrum``, full physics), best
of three, with OPENBLAS_NUM_THREADS=1 as the CLI's users have it. CPU time is the child
process's user + system time (resource.getrusage), wall time is beside it.

The reference, same run: a process that only imports numpy, scipy.special and
scipy.linalg, so the ratio says how many bare starts the whole analysis and fit cost on
this machine (goal: 4 for the strike preview).
"""

from __future__ import annotations

import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
REFERENCE = [sys.executable, "-c", "import numpy, scipy.special, scipy.linalg"]


def run(cmd, repeat=3):
    """Best (CPU s, wall s) of ``repeat`` runs, and the last run's result."""
    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", MPLBACKEND="Agg")
    best = None
    for _ in range(repeat):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        t = time.perf_counter()
        done = subprocess.run(cmd, capture_output=True, text=True, env=env)
        wall = time.perf_counter() - t
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
        if done.returncode != 0:
            raise SystemExit(f"{' '.join(map(str, cmd))} failed: {done.stderr.strip()}")
        if best is None or cpu < best[0]:
            best = (cpu, wall)
    return best[0], best[1], done


def main() -> None:
    sys.path.insert(0, str(ROOT / "tests"))
    import soundfile

    from test_recording_timpani import RATE, stroke

    x, _ = stroke(seconds=3.7)  # 0.3 s of silence first: 4 s in all
    with tempfile.TemporaryDirectory() as tmp:
        wav = Path(tmp) / "stroke_4s.wav"
        soundfile.write(wav, x, RATE, subtype="PCM_16")
        preview = Path(tmp) / "kettledrum_preview.wav"
        run([sys.executable, "-m", "membrane", "strike", "kettledrum", "--out", str(preview)],
            repeat=1)
        bare, bare_wall, _ = run(REFERENCE)
        print(f"reference: python -c 'import numpy, scipy.special, scipy.linalg': "
              f"{bare:5.2f} s CPU ({bare_wall:5.2f} s wall)")
        for path in (preview, wav, ROOT / "tests" / "data" / "timpani_high_1.flac"):
            info = soundfile.info(path)
            cpu, wall, done = run([sys.executable, "-m", "membrane", "listen", str(path),
                                   "--drum", "kettledrum", "--format", "json"])
            fit = json.loads(done.stdout).get("fit", {})
            print(f"listen {path.name} ({info.duration:.1f} s) --drum kettledrum, full: "
                  f"{cpu:5.2f} s CPU = {cpu / bare:5.1f} x reference ({wall:5.2f} s wall); "
                  f"fit {fit.get('tension_n_per_m') or 0:.0f} +- "
                  f"{fit.get('uncertainty_n_per_m') or 0:.0f} N/m, {fit.get('matched')} matched, "
                  f"{fit.get('verdict')}")


if __name__ == "__main__":
    main()
