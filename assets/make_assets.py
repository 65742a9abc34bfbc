"""Regenerate the README's pictures from the built-in (invented) example drums.

Run from anywhere: python assets/make_assets.py [--physics full]
Writes into this folder, replacing the previous pictures:

- kettledrum_mode21.gif   3D animation of the kettledrum's (2,1) mode (small, looping)
- kettledrum_modes.png    its first 12 modes, sorted by frequency
- kettledrum_ratios.png   ratio chart: ideal, stiff and full physics side by side
- kettledrum_nodal22.png  nodal diagram of the (2,2) mode
- snare_mode01.png        3D still of the snare's lowest mode, both heads
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))  # the checkout's membrane, even if not installed

from membrane import load_drum, solve  # noqa: E402
from membrane.render import animate, stills  # noqa: E402

GIF_VIEW = animate.View(frames=36, width=360, height=360, fps=18)  # keeps the GIF near 1 MB


def _write(name: str, writer) -> None:
    """Write whole or not at all, as the command line does."""
    path = HERE / name
    fd, tmp = tempfile.mkstemp(prefix=f".{path.stem}-", suffix=path.suffix, dir=HERE)
    os.close(fd)
    try:
        writer(tmp)
        os.chmod(tmp, 0o644)  # mkstemp makes it private; these are for everyone
        os.replace(tmp, path)
    finally:
        Path(tmp).unlink(missing_ok=True)
    print(f"  {name:26s} {path.stat().st_size / 1e3:8.0f} kB")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--physics", default="full", choices=("ideal", "stiff", "full"))
    args = parser.parse_args()
    start = time.perf_counter()
    kettle = load_drum("kettledrum")
    print(f"solving the kettledrum ({args.physics}, ideal, stiff) ...")
    main_set = solve(kettle, args.physics)
    others = [solve(kettle, p) for p in ("ideal", "stiff") if p != args.physics]
    ref = (1, 1)  # a kettledrum's principal tone
    _write("kettledrum_mode21.gif",
           lambda p: animate.render_mode(main_set, main_set.find(2, 1), p, view=GIF_VIEW, reference=ref))
    _write("kettledrum_modes.png", lambda p: stills.save(stills.mode_grid(main_set, reference=ref), p, dpi=72))
    _write("kettledrum_ratios.png", lambda p: stills.save(stills.ratio_chart([*others, main_set]), p, dpi=90))
    _write("kettledrum_nodal22.png",
           lambda p: stills.save(stills.nodal_diagram(main_set, main_set.find(2, 2), reference=ref), p, dpi=90))
    print(f"solving the snare ({args.physics}) ...")
    snare = solve(load_drum("snare"), args.physics)
    _write("snare_mode01.png", lambda p: animate.render_mode(
        snare, snare.modes[0], p, view=animate.View(width=480, height=400)))
    print(f"done in {time.perf_counter() - start:.1f} s")


if __name__ == "__main__":
    main()
