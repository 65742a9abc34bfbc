"""Roots followed along the tension: continuous through the bowl's air resonance, and the
same roots a whole solve finds at the ends (benchmarks/sweep_drums.py --continuity runs
20 generated drums)."""

import math

import numpy as np

from membrane.branches import follow, labelled_root, order_roots
from membrane.drum import load_drum

# d ln f / d ln T is the share of the mode's stiffness that comes from tension, over 2
# (first-order perturbation of K(T) = T K1 + K_bending, from memory): between 0 and 1/2;
# a little slack for the air's frequency-dependent load
SLOPE = 0.6


def test_the_kettle_roots_are_continuous_through_the_bowl_air_resonance():
    # the built-in kettle's (1,1) meets the bowl's first cross-wise air resonance (rigid
    # cylinder: c j'11 / (2 pi a), j'11 = 1.8412, A&S Table 9.5) between 15,000 and 25,000 N/m
    drum = load_drum("kettledrum")
    xs = np.linspace(math.log(15000.0), math.log(25000.0), 6)
    at = lambda x: drum.with_tension(math.exp(x))  # noqa: E731
    start = order_roots(at(xs[0]), m=1, n_max=2, losses=drum.losses)
    r11 = labelled_root(start, 1)
    pick = [r for r in range(len(start.omega)) if start.omega[r].real <= 1.05 * start.omega[labelled_root(start, 2)].real]
    track = follow(at, xs, m=1, n_max=2, roots=pick, losses=drum.losses)
    f = track.frequencies()
    assert np.all(np.isfinite(f))
    slope = np.abs(np.diff(np.log(f), axis=0)) / np.diff(xs)[:, None]
    assert np.all(slope <= SLOPE), slope.max()
    # every tracked root is a root of the whole solve at each value asked for
    assert all(lab is not None for row in track.labels for lab in row), track.labels
    # the root that starts as (1,1) stays below the air resonance and ends mostly air; the
    # label (1,1) has passed to the root above it (docs/mode-identity.md)
    k = pick.index(r11)
    f_air = drum.air.sound_speed * 1.8412 / (2 * np.pi * drum.head.radius)
    assert np.all(f[:, k] < f_air)
    assert track.head_fraction[-1][k] < 0.5 < track.head_fraction[0][k]
    assert track.labels[0][k] == ("head", 0, 1) and track.labels[-1][k] != ("head", 0, 1)
    assert ("head", 0, 1) in track.labels[-1]
