"""Walk-through for a teacher: the circular membrane from Bessel zeros to a real kettledrum.

Run it as a script (``python examples/teacher.py``) or cell by cell (``# %%``). Everything is
computed at import (the tests check the numbers) and printed under ``__main__``. The drums are
made in code (numbers of our own, SI units) or are the built-in invented kettledrum.
"""

# %% An ideal membrane: a 30 cm radius head at 2000 N/m, 0.25 kg/m^2 (tension only)
import math

import membrane

head = membrane.Head(radius=0.30, tension=2000.0, areal_density=0.25)
drum = membrane.Drum(head=head)
IDEAL = membrane.solve(drum, physics="ideal", m_max=3, n_max=3)

# %% f_mn = j_mn / (2 pi a) sqrt(T / sigma): the lowest mode's frequency from the formula
J01 = 2.404825557695773  # first zero of J_0
F01_FORMULA = J01 / (2 * math.pi * head.radius) * math.sqrt(head.tension / head.areal_density)
F01_SOLVED = IDEAL.find(0, 1).frequency

# %% Two scalings a class can test: four times the tension doubles every frequency; twice the
# radius halves it
F01_4T = membrane.solve(drum.with_tension(4 * head.tension), physics="ideal", m_max=0, n_max=1).find(0, 1).frequency
bigger = membrane.Drum(head=membrane.Head(radius=2 * head.radius, tension=head.tension,
                                          areal_density=head.areal_density))
F01_2A = membrane.solve(bigger, physics="ideal", m_max=0, n_max=1).find(0, 1).frequency

# %% The overtones of a membrane are not harmonic: ratios to the (0,1)
RATIOS = {mode.label: mode.frequency / F01_SOLVED for mode in IDEAL.modes}

# %% A real film bends a little too: a polyester head (its data come with the film's name). The
# rise is mostly the clamped rim's doing: the head must leave the rim flat, over a boundary
# layer about sqrt(D / T) wide (here about 1 mm), which shortens the effective radius a little.
# The ideal frequencies are scaled to the film's areal density first, so only bending is compared.
film_head = membrane.Head(radius=0.30, tension=2000.0, areal_density=0.26, film="polyester", thickness=190e-6)
STIFF = membrane.solve(membrane.Drum(head=film_head), physics="stiff", m_max=3, n_max=3)
STIFF_CENTS = {mo.label: membrane.cents(mo.frequency, IDEAL.find(mo.m, mo.n).frequency * math.sqrt(0.25 / 0.26))
               for mo in STIFF.modes}

# %% What makes a kettledrum musical: the air and the bowl pull the (m,1) family toward harmonics
kettle = membrane.load_drum("kettledrum")  # invented demo data
KETTLE = membrane.solve(kettle, physics="full", m_max=4, n_max=1)
KETTLE_RATIOS = [KETTLE.find(m, 1).frequency / KETTLE.find(1, 1).frequency for m in range(1, 5)]

if __name__ == "__main__":
    print(f"(0,1) from the formula {F01_FORMULA:.3f} Hz, solved {F01_SOLVED:.3f} Hz")
    print(f"4 x tension: {F01_4T / F01_SOLVED:.4f} x the frequency; 2 x radius: {F01_2A / F01_SOLVED:.4f} x")
    print("ideal ratios:", ", ".join(f"{k} {v:.3f}" for k, v in RATIOS.items()))
    print("bending raises each mode by (cents):", ", ".join(f"{k} {v:+.2f}" for k, v in STIFF_CENTS.items()))
    print("kettledrum (m,1) / (1,1):", "  ".join(f"{x:.3f}" for x in KETTLE_RATIOS), "(near 1 : 1.5 : 2 : 2.5)")
