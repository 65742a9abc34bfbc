"""Walk-through for an acoustician: what each piece of physics does, and a recording analysed.

The drum is the built-in 26-inch kettledrum, invented demo data. Run it as a script
(``python examples/acoustician.py``) or cell by cell (``# %%``). Everything is computed at
import (the tests check the numbers) and printed under ``__main__``; the solves are small.
"""

# %% The (m,1) family against the (1,1), model by model: tension only, + bending, + air and kettle
from dataclasses import replace

import numpy as np

import membrane

drum = membrane.load_drum("kettledrum")
ORDERS = dict(m_max=5, n_max=1)
RATIOS = {}
for name, d, physics in [("ideal", drum, "ideal"), ("stiff", drum, "stiff"),
                         ("air, no bowl", replace(drum, body=membrane.Body()), "full"),
                         ("air and kettle", drum, "full")]:
    modes = membrane.solve(d, physics=physics, **ORDERS)
    f11 = modes.find(1, 1).frequency
    RATIOS[name] = [modes.find(m, 1).frequency / f11 for m in range(1, 6)]

# %% How near a harmonic series the full model puts them, and how long each rings (T60, s)
FULL = membrane.solve(drum, physics="full", **ORDERS)
FIT = FULL.harmonic_fit()
DECAY = {(mo.m, mo.n): mo.decay for mo in FULL.modes if mo.kind == "head"}

# %% A tap of our own making: the stiff model's strike at a quarter of the way in, as a sound,
# played at a tension the drum file does not know (3600 N/m) ...
TRUE_TENSION = 3600.0
heard = membrane.solve(drum.with_tension(TRUE_TENSION), physics="stiff", m_max=4, n_max=2)
partials = membrane.strike(heard, strike=membrane.Strike(radius_fraction=0.75))
RATE = 16000
sound = membrane.synthesise(partials, rate=RATE, seconds=1.5, contact_time=1.5e-3, assume_t60=2.0)
recording = membrane.Recording(samples=np.concatenate([np.zeros(RATE // 20), sound]), rate=float(RATE),
                               channels=1, encoding="synthetic")

# %% ... analysed like any recording: partials found, labelled with modes, the tension fitted
ANALYSIS = membrane.analyse(recording)
IDENT = membrane.identify(drum, ANALYSIS.partials, physics="stiff")

if __name__ == "__main__":
    for name, r in RATIOS.items():
        print(f"{name:16s}", "  ".join(f"{x:.3f}" for x in r))
    print(f"harmonic fit: f0 = {FIT.fundamental:.2f} Hz, rms {FIT.rms_cents:.1f} cents through "
          f"{membrane.mode_list(FIT.fitted)}")
    print("T60 (s):", ", ".join(f"({m},{n}) {t:.2f}" for (m, n), t in DECAY.items()))
    print(ANALYSIS.__class__.__name__, len(ANALYSIS.partials), "partials")
    print(IDENT)
