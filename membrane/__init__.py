"""membrane: modes, partials, tuning and pictures of circular drumheads.

Everything a user needs is importable from here; the submodules are for the code. The library
works in SI floats (m, N/m, kg/m^2, Hz, s). Typical use::

    import membrane
    drum = membrane.load_drum("kettledrum")            # a built-in invented example, or a file
    modes = membrane.solve(drum, physics="full")       # air and kettle included
    print(modes.find(1, 1).frequency)                  # Hz
    tuning = membrane.tension_for(drum, targets=[((1, 1), membrane.parse_pitch("A2"))])

The map (names resolve on first use, so ``import membrane`` stays fast and loads no scipy,
matplotlib or pyvista):

Drums
    Drum, Head, Body, Air, Lugs -- frozen dataclasses that check themselves (SI)
    load_drum, parse_drum, builtin_names -- the drum file (TOML) and the built-in examples
Modes
    solve -- the modes of a drum under "ideal", "stiff" or "full" physics -> ModeSet
    Mode, ModeSet, HarmonicFit (ModeSet.harmonic_fit), harmonic_series (raw frequencies -> a tuple)
Tuning
    tension_for, Tuning, Target -- the tension that puts modes on target pitches
    tune_heads, HeadTarget, Interval, HeadsTuning -- both heads of a shell
    equalise_lugs -- lug by lug from tap pitches
    safety_warnings, CAUTIONS -- film stress, slack limit, and the cautions printed with them
Recordings
    read_recording (read_wav), analyse, Analysis, Recording -- a tap -> its partials
    identify, Identification -- partials -> (m, n) labels and the fitted tension
    fit_losses -- the loss parameters a recording implies
Striking and listening
    strike (strike_partials), Strike, Listener, SoundingMode -- a mode as heard at the listener
    best_strike_radius, StrikeAdvice -- the strike point that favours chosen modes
    synthesise, save_wav -- the sounding modes as samples and a WAV file
Uneven tension
    split_table, estimate_lugs, prescribe_turns
Notation
    cents, note_name, parse_pitch, mode_label, mode_list
Errors
    MembraneError, InputError, SolverError, RecordingError

Pictures live in ``membrane.render`` (matplotlib, pyvista), loaded only when asked for.
"""

from importlib import import_module

__version__ = "0.1.0"

# Names are resolved on first use (PEP 562), so ``import membrane`` and the command
# line's --help stay fast: scipy loads only when something is computed.
_WHERE = {
    # drums
    "Air": "drum", "Body": "drum", "Drum": "drum", "Head": "drum", "Lugs": "drum",
    "load_drum": "drumfile", "parse_drum": "drumfile", "builtin_names": "drumfile",
    # modes
    "HarmonicFit": "harmonics", "Mode": "modes", "ModeSet": "modes", "harmonic_series": "harmonics",
    "solve": "solver",
    # tuning
    "tension_for": "tuning", "Tuning": "tuning", "Target": "tuning", "equalise_lugs": "tuning",
    "tune_heads": "head_tuning", "HeadTarget": "head_tuning", "Interval": "head_tuning",
    "HeadsTuning": "head_tuning",
    "safety_warnings": "safety", "CAUTIONS": "safety",
    # recordings
    "read_recording": "analysis", "read_wav": "analysis", "analyse": "analysis", "Analysis": "analysis",
    "Recording": "analysis",
    "Identification": "identify", "fit_losses": "loss_fit",
    # striking and listening
    "strike_partials": "strike", "Strike": "strike", "Listener": "strike", "SoundingMode": "strike",
    "best_strike_radius": "strike_point", "StrikeAdvice": "strike_point",
    "synthesise": "audio", "save_wav": "audio",
    # uneven tension
    "estimate_lugs": "lugs", "prescribe_turns": "lugs", "split_table": "lugs",
    # notation
    "cents": "notation", "mode_label": "notation", "mode_list": "notation", "note_name": "units", "parse_pitch": "units",
    # errors
    "InputError": "errors", "MembraneError": "errors", "RecordingError": "errors", "SolverError": "errors",
}
# Submodules that are also called as their main function (membrane.callable_module):
# membrane.identify(drum, partials) and membrane.strike(modeset, strike=...).
_CALLABLE_MODULES = ("identify", "strike")
__all__ = sorted([*_WHERE, *_CALLABLE_MODULES, "__version__"])
# Older names, still resolved with a DeprecationWarning (membrane.renamed): one spelling per
# concept in the API.
_RENAMED = {"harmonic_fit": "harmonic_series",  # returned a tuple beside ModeSet.harmonic_fit's HarmonicFit
            "synthesize": "synthesise"}  # the project writes -ise (analyse, equalise_lugs)


def __getattr__(name: str):
    if name in _WHERE:
        value = getattr(import_module(f".{_WHERE[name]}", __name__), name)
        globals()[name] = value
        return value
    if name in _CALLABLE_MODULES:
        return import_module(f".{name}", __name__)
    if name in _RENAMED:
        from .renamed import warn_renamed
        warn_renamed(f"membrane.{name}", f"membrane.{_RENAMED[name]}")
        return __getattr__(_RENAMED[name])
    raise AttributeError(f"module 'membrane' has no attribute {name!r}")


def __dir__():
    return sorted(set(globals()) | set(__all__))
