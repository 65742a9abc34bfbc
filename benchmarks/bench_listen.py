"""The whole ``listen RECORDING --drum DRUM`` process with full physics, against a bare start.

Run: python benchmarks/bench_listen.py

Recordings: a synthetic timpani-like stroke of 4 s at 44.1 kHz (the generator of
tests/test_recording_timpani.py, stretched to 4 s: gliding (1,1), fifth, split octave,
thud, mallet noise, room noise, low-frequency lift), and the real excerpt
tests/data/timpani_high_1.flac (2 s at 32 kHz). Each is run as a fresh process
(``python -m membrane listen FILE --drum kettledrum``, full physics), best of three, with
OPENBLAS_NUM_THREADS=1 as the CLI's users have it. The reference, same run: a process that
only imports numpy and scipy (``python -c "import numpy, scipy.signal"``), so the ratio says
how many bare starts the whole analysis and fit cost on this machine. Target: under 5 s
whole-process for the 4 s recording on an unloaded machine.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def best_of(cmd, repeat=3):
    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", MPLBACKEND="Agg")
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        done = subprocess.run(cmd, capture_output=True, text=True, env=env)
        times.append(time.perf_counter() - t)
        if done.returncode != 0:
            raise SystemExit(f"{' '.join(cmd)} failed: {done.stderr.strip()}")
    return min(times), done


def main() -> None:
    sys.path.insert(0, str(ROOT / "tests"))
    import numpy as np
    import soundfile

    from test_recording_timpani import RATE, stroke

    x, _ = stroke(seconds=3.7)  # 0.3 s of silence first: 4 s in all
    with tempfile.TemporaryDirectory() as tmp:
        wav = Path(tmp) / "stroke_4s.wav"
        soundfile.write(wav, x, RATE, subtype="PCM_16")
        bare, _ = best_of([sys.executable, "-c", "import numpy, scipy.signal"])
        print(f"reference: bare python + numpy + scipy start   {bare:6.2f} s")
        for path in (wav, ROOT / "tests" / "data" / "timpani_high_1.flac"):
            info = soundfile.info(path)
            t, done = best_of([sys.executable, "-m", "membrane", "listen", str(path),
                               "--drum", "kettledrum", "--format", "json"])
            import json
            fit = json.loads(done.stdout).get("fit", {})
            print(f"listen {path.name} ({info.duration:.1f} s) --drum kettledrum, full: "
                  f"{t:6.2f} s = {t / bare:5.1f} x reference; fit {fit.get('tension_n_per_m', 0):.0f} "
                  f"+- {fit.get('uncertainty_n_per_m') or 0:.0f} N/m, {fit.get('matched')} matched, "
                  f"{fit.get('verdict')}")


if __name__ == "__main__":
    main()
