"""How long a 48-frame 480x480 GIF of the (2,1) mode takes, off screen.

Target: under 10 s for the GIF (scene set-up, 48 frames, palette and file). The
reference, measured in the same run, is one frame of the same scene: the ratio says
how close the whole GIF is to the frames it renders (25 of the 48: a standing wave's
second half period repeats the first, HeadScene.frames) and how much set-up and
writing cost on top. Run: python benchmarks/bench_render.py
"""

from __future__ import annotations

import os
import tempfile
import time

import numpy as np

from membrane import load_drum, solve
from membrane.render.animate import HeadScene, View, render_mode

TARGET_S = 10.0


def main() -> None:
    physics = os.environ.get("MEMBRANE_BENCH_PHYSICS", "stiff")
    drum = load_drum("kettledrum")
    t = time.perf_counter()
    modeset = solve(drum, physics)
    solve_s = time.perf_counter() - t
    mode = modeset.find(2, 1)
    view = View(frames=48, width=480, height=480)

    # reference: one frame of a scene already set up (best of 5)
    scene = HeadScene(modeset, mode, view)
    scene.frame(0.0)
    one = []
    for k in range(5):
        t = time.perf_counter()
        scene.frame(0.3 + k)
        one.append(time.perf_counter() - t)
    scene.close()
    frame_s = min(one)

    with tempfile.TemporaryDirectory() as folder:
        path = os.path.join(folder, "mode21.gif")
        t = time.perf_counter()
        render_mode(modeset, mode, path, view=view)
        gif_s = time.perf_counter() - t
        size = os.path.getsize(path)

    print(f"solve ({physics})             {solve_s:7.2f} s (not counted)")
    print(f"one frame, 480x480           {1000 * frame_s:7.1f} ms (reference)")
    print(f"GIF, 48 frames, 480x480      {gif_s:7.2f} s  ({size / 1e6:.2f} MB)")
    rendered = view.frames // 2 + 1
    print(f"ratio GIF / one frame        {gif_s / frame_s:7.1f}  ({rendered} = the rendered frames alone)")
    print(f"target < {TARGET_S:g} s: {'met' if gif_s < TARGET_S else 'MISSED'}")
    print(f"cpu count {os.cpu_count()}, load average {np.round(os.getloadavg(), 2).tolist()}")


if __name__ == "__main__":
    main()
