"""Tension to put the kettledrum's principal (1,1) mode on C3, with and without air.

With the ideal membrane the frequency goes as sqrt(T), so one scaling step lands the
target; with air loading and the kettle it does not, and the model has to be solved at
each trial tension. This compares the naive sqrt(T) answer with the full model's.

Run ``python examples/tune_kettledrum.py``.
"""

from membrane import cents, load_drum, parse_pitch, solve, tension_for

DRUM = load_drum("kettledrum")  # invented demo data
TARGET_HZ = parse_pitch("C3")
RESULT = tension_for(DRUM, targets=[((1, 1), TARGET_HZ)], physics="full")
NAIVE_HZ = solve(DRUM.with_tension(RESULT.naive_tension), "full").find(1, 1).frequency
NAIVE_MISS_CENTS = cents(NAIVE_HZ, TARGET_HZ)

if __name__ == "__main__":
    print(f"target C3 = {TARGET_HZ:.2f} Hz")
    print(f"current tension {RESULT.current_tension:.0f} N/m")
    print(f"full model:      {RESULT.tension:.1f} N/m -> (1,1) at "
          f"{RESULT.targets[0].predicted_frequency:.3f} Hz")
    print(f"sqrt(T) scaling: {RESULT.naive_tension:.1f} N/m -> (1,1) at {NAIVE_HZ:.3f} Hz "
          f"({NAIVE_MISS_CENTS:+.1f} cents)")
    for warning in RESULT.warnings:
        print("caution:", warning)
