"""Recordings of taps: reading, the strike, and the partials of the decay.

One concept a module: :mod:`.audio` (reading files), :mod:`.onset` (the strike and its
end), :mod:`.seeding` (where to look), :mod:`.esprit` (damped exponentials in a band),
:mod:`.lines` (components grouped into lines), :mod:`.glide` (frequency over the decay),
:mod:`.partial` (a measured partial), :mod:`.partials` (the whole analysis).
"""

from .audio import FORMATS, Recording, read_recording
from .onset import find_strike
from .partials import (DEFAULT_FLOOR_DB, DEFAULT_MAX_PARTIALS, LN1000, MAX_DURATION_S,
                       MIN_DURATION_S, MIN_FREQUENCY_HZ, NO_PARTIALS, REFERENCE_TIME_S,
                       Analysis, Partial, analyse, decay_spectrum, find_partials)

read_wav = read_recording  # the older name: every format goes through the same reader

__all__ = ["FORMATS", "Recording", "read_recording", "read_wav", "find_strike", "Analysis",
           "Partial", "analyse", "decay_spectrum", "find_partials", "DEFAULT_FLOOR_DB",
           "DEFAULT_MAX_PARTIALS", "LN1000", "MAX_DURATION_S", "MIN_DURATION_S",
           "MIN_FREQUENCY_HZ", "NO_PARTIALS", "REFERENCE_TIME_S"]
