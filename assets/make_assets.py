"""Regenerate the README's pictures with the README's own commands.

Run from anywhere: python assets/make_assets.py
Each picture is the command shown in the README ("What it does"), run with this
checkout's membrane, writing into this folder (replacing the previous picture); the
animation alone is made smaller (frames, size) to keep the README light:

- kettledrum_mode21.gif   membrane render kettledrum --mode 2,1 --out mode21.gif
- kettledrum_modes.png    membrane render kettledrum --grid --out modes.png
- kettledrum_ratios.png   membrane render kettledrum --ratio-chart --compare ideal,stiff,full --out ratios.png
"""

from __future__ import annotations

import os
import shlex
import subprocess
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent

# (picture in this folder, the README's command verbatim, options added here)
PICTURES = (
    ("kettledrum_mode21.gif", "membrane render kettledrum --mode 2,1 --out mode21.gif",
     "--frames 36 --size 360 --fps 18"),  # keeps the GIF near 1 MB
    ("kettledrum_modes.png", "membrane render kettledrum --grid --out modes.png", ""),
    ("kettledrum_ratios.png", "membrane render kettledrum --ratio-chart --compare ideal,stiff,full --out ratios.png",
     ""),
)


def arguments(name: str, command: str, extra: str) -> list[str]:
    """The README's command as arguments of ``python -m membrane``, writing ``name`` here."""
    words = shlex.split(command)[1:]  # without the program name
    words[words.index("--out") + 1] = str(HERE / name)
    return words + shlex.split(extra) + ["--force"]


def main() -> None:
    start = time.perf_counter()
    env = dict(os.environ, PYTHONPATH=str(HERE.parent) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    for name, command, extra in PICTURES:
        print(f"{command}  {extra}".rstrip())
        subprocess.run([sys.executable, "-m", "membrane", *arguments(name, command, extra)], check=True,
                       env=env)  # this checkout's membrane, even if another is installed
        print(f"  {name:26s} {(HERE / name).stat().st_size / 1e3:8.0f} kB")
    print(f"done in {time.perf_counter() - start:.1f} s")


if __name__ == "__main__":
    main()
