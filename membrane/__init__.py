"""membrane: modes, partials, tuning and pictures of circular drumheads.

The library works in SI floats. Typical use::

    from membrane import load_drum, solve
    drum = load_drum("kettledrum")          # a built-in invented example, or a file
    modes = solve(drum, physics="stiff")
    for row in modes.table(reference=(1, 1)):
        print(row["m"], row["n"], round(row["frequency_hz"], 1), round(row["ratio"], 3))

Nothing here imports matplotlib or pyvista; pictures live in ``membrane.render``.
"""

from .drum import Air, Body, Drum, Head, Lugs, load_drum, parse_drum
from .errors import InputError, MembraneError, RecordingError, SolverError
from .modes import HarmonicFit, Mode, ModeSet, harmonic_fit
from .solve import solve

__all__ = [
    "Air", "Body", "Drum", "Head", "Lugs", "load_drum", "parse_drum",
    "InputError", "MembraneError", "RecordingError", "SolverError",
    "HarmonicFit", "Mode", "ModeSet", "harmonic_fit", "solve",
]
__version__ = "0.1.0"
