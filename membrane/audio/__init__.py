"""Sound out: the decaying partials of a strike as samples, and WAV files.

- :mod:`membrane.audio.synthesis`: :func:`synthesize`, partials -> samples (no loop over samples).
- :mod:`membrane.audio.wav`: :func:`save_wav`, samples -> a 16-bit or 32-bit float WAV file.

What a strike excites and what a listener hears is :mod:`membrane.strike`; this package only
turns its partials into a sound. The old names ``membrane.strike.synthesize`` and
``membrane.strike.save_wav`` still work.
"""

from .synthesis import complex_omega, synthesize
from .wav import save_wav

__all__ = ["complex_omega", "save_wav", "synthesize"]
