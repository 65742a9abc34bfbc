"""membrane: modes, partials, tuning and pictures of circular drumheads.

The library works in SI floats. Typical use::

    from membrane import load_drum, solve
    drum = load_drum("kettledrum")          # a built-in invented example, or a file
    modes = solve(drum, physics="stiff")
    for row in modes.table(reference=(1, 1)):
        print(row["m"], row["n"], round(row["frequency_hz"], 1), round(row["ratio"], 3))

Nothing here imports matplotlib or pyvista; pictures live in ``membrane.render``.
"""

from importlib import import_module

# Names are resolved on first use (PEP 562), so ``import membrane`` and the command
# line's --help stay fast: scipy loads only when something is computed.
_WHERE = {
    "Air": "drum", "Body": "drum", "Drum": "drum", "Head": "drum", "Lugs": "drum",
    "load_drum": "drum", "parse_drum": "drum",
    "InputError": "errors", "MembraneError": "errors", "RecordingError": "errors", "SolverError": "errors",
    "HarmonicFit": "modes", "Mode": "modes", "ModeSet": "modes", "harmonic_fit": "modes",
    "solve": "solver",
    "estimate_lugs": "lugs", "prescribe_turns": "lugs", "split_table": "lugs",
}
__all__ = sorted(_WHERE)
__version__ = "0.1.0"


def __getattr__(name):
    if name in _WHERE:
        value = getattr(import_module(f".{_WHERE[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'membrane' has no attribute {name!r}")


def __dir__():
    return sorted(list(globals()) + __all__)
