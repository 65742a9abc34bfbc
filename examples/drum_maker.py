"""Walk-through for a drum maker: from a drum file to a tension, lug turns and a strike point.

The drum is the built-in 26-inch kettledrum, invented demo data. Run it as a script
(``python examples/drum_maker.py``) or cell by cell (``# %%``) in an editor that knows cells.
Everything is computed at import (so the tests can check the numbers); it prints under
``__main__``. The solves are kept small (a few orders) so it runs in seconds.
"""

# %% The drum: a file, or a built-in example, read into frozen SI dataclasses
import membrane

drum = membrane.load_drum("kettledrum")
HEAD = drum.head  # radius in m, tension in N/m, areal density in kg/m^2, the film's data

# %% Its partials now, with the air and the kettle ("full" physics), orders m <= 4, up to two circles
MODES = membrane.solve(drum, physics="full", m_max=4, n_max=2)
PRINCIPAL = MODES.find(1, 1)  # the kettledrum's principal mode

# %% The tension that puts the (1,1) on C3. With air the frequency is not proportional to
# sqrt(T), so the model is solved at each trial tension; the stress is checked against the film.
TARGET_HZ = membrane.parse_pitch("C3")
TUNING = membrane.tension_for(drum, targets=[((1, 1), TARGET_HZ)], physics="full", m_max=4, n_max=1)

# %% Lug by lug: the tap pitches measured at the 8 lugs (in the drum file) evened out, as turns
# of each rod. This is a rule of thumb (tap pitch taken as sqrt of the local tension), and says so.
from membrane.tuning import LUG_RULE, equalise_lugs  # noqa: E402

TAP_TARGET_HZ, LUG_CHANGES = equalise_lugs(drum.lugs.pitches, cents_per_turn=drum.lugs.cents_per_turn)

# %% Where to strike so that the singing (m,1) partials sound and the dull (0,1) does not
ADVICE = membrane.best_strike_radius(MODES, modes=[(1, 1), (2, 1), (3, 1), (4, 1)])

if __name__ == "__main__":
    print(drum.name)
    print(MODES)
    for row, mode in zip(MODES.table(reference=(1, 1)), MODES.modes):
        print(f"  {mode.label:18s} {row['frequency_hz']:7.2f} Hz  ratio {row['ratio']:.3f}  {row['note']}")
    print(TUNING)
    print(f"  film stress at the suggestion: {TUNING.stress / 1e6:.1f} MPa "
          f"(yield {HEAD.yield_stress / 1e6:.0f} MPa)")
    for warning in TUNING.warnings:
        print("  caution:", warning)
    print(f"lugs to {TAP_TARGET_HZ:.2f} Hz ({LUG_RULE}):")
    for i, change in enumerate(LUG_CHANGES, 1):
        print(f"  lug {i}: {change.change_cents:+5.1f} cents, {change.turns:+.2f} turns")
    print(ADVICE)
    for caution in membrane.CAUTIONS:
        print(caution)
