"""Tap recordings: the names this module always had, now kept in :mod:`membrane.analysis`.

Reading (WAV, FLAC, OGG, MP3), the strike, and the partials of the decay live in the
one-concept modules of :mod:`membrane.analysis`; this module re-exports them so that
``from membrane.recording import analyse`` keeps working.
"""

from membrane.analysis import *  # noqa: F401,F403
from membrane.analysis import __all__  # noqa: F401
