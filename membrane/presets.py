"""The trade's usual choices, as named presets: strike point, mallets, listener.

These are rules of thumb, not measurements; they live apart from the physics so
the command line can show them without loading the numerical libraries.
"""

from __future__ import annotations

import math

from .errors import InputError

# The trade's usual strike point, about a quarter of the way in from the rim (r0/a).
DEFAULT_AT = 0.75  # common practice, no source
# Mallet contact times in s.
MALLETS = {"soft": 3.0e-3, "medium": 1.5e-3, "hard": 0.75e-3}  # common practice, no source
DEFAULT_MALLET = "medium"
# Where a player's ear or a microphone typically is: off the axis, in the far field.
DEFAULT_LISTENER_ANGLE = math.radians(45.0)  # common practice, no source
DEFAULT_LISTENER_DISTANCE = 1.5  # m, common practice, no source
SILENT_DB = -200.0  # levels are floored here: "silent to numerical precision"
SEARCH_RANGE = (0.05, 0.95)  # strike radii the search considers (a mallet has a size)
PEAK_DBFS = -1.0  # a written preview peaks here


def contact_time(mallet: str) -> float:
    """Contact time in s of a mallet preset (soft, medium, hard)."""
    if mallet not in MALLETS:
        raise InputError("mallet", mallet, f"must be one of: {', '.join(MALLETS)}")
    return MALLETS[mallet]
