"""How air loading and the kettle pull a kettledrum's partials toward a harmonic series.

The built-in 26-inch kettledrum (invented demo data) is solved four ways: the ideal
membrane, the stiff head in vacuum, the head with air on both faces and no bowl, and the
full drum with its kettle. For each, the ratios of the (m,1) modes to the (1,1) mode.
Published measurements put them near 1 : 1.5 : 2 : 2.5 for a real kettledrum
(Rossing 1982, as reproduced in secondary sources; see tests/test_examples.py).

Run ``python examples/kettledrum_harmonicity.py`` for the table and a chart.
"""

from dataclasses import replace

from membrane import Body, load_drum, solve

DRUM = load_drum("kettledrum")
CASES = {
    "ideal membrane": (DRUM, "ideal"),
    "stiff head, vacuum": (DRUM, "stiff"),
    "air both faces, no bowl": (replace(DRUM, body=Body(kind="none")), "full"),
    "with kettle": (DRUM, "full"),
}
FAMILY = [(m, 1) for m in range(1, 6)]


def family_ratios(drum, physics):
    """Ratios f(m,1)/f(1,1) for m = 1..5."""
    modes = solve(drum, physics, m_max=5, n_max=2)
    ref = modes.find(1, 1).frequency
    return [modes.find(m, n).frequency / ref for m, n in FAMILY]


RATIOS = {name: family_ratios(drum, physics) for name, (drum, physics) in CASES.items()}

if __name__ == "__main__":
    import matplotlib.pyplot as plt

    print(f"{'':26s}" + "".join(f"{f'({m},{n})':>8s}" for m, n in FAMILY))
    for name, ratios in RATIOS.items():
        print(f"{name:26s}" + "".join(f"{r:8.3f}" for r in ratios))
    fig, ax = plt.subplots(figsize=(7, 4))
    for name, ratios in RATIOS.items():
        ax.plot(range(1, 6), ratios, "o-", label=name)
    ax.plot(range(1, 6), [1, 1.5, 2, 2.5, 3], "k:", label="1 : 1.5 : 2 : 2.5 : 3")
    ax.set_xlabel("nodal diameters m of the (m,1) mode")
    ax.set_ylabel("f(m,1) / f(1,1)")
    ax.legend()
    fig.tight_layout()
    plt.show()
