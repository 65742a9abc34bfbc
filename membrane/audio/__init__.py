"""Sound out: the decaying partials of a strike as samples, and WAV files.

- :mod:`membrane.audio.synthesis`: :func:`synthesise`, partials -> samples (no loop over samples).
- :mod:`membrane.audio.wav`: :func:`save_wav`, samples -> a 16-bit or 32-bit float WAV file.

What a strike excites and what a listener hears is :mod:`membrane.strike`; this package only
turns its sounding modes into a sound. The old names ``membrane.strike.save_wav`` and
``membrane.strike.synthesise`` still work; ``synthesize`` (American spelling) resolves to
:func:`synthesise` with a DeprecationWarning.
"""

from ..renamed import old_names
from .synthesis import complex_omega, synthesise
from .wav import save_wav

__all__ = ["complex_omega", "save_wav", "synthesise"]
__getattr__ = old_names(__name__, {"synthesize": "synthesise"})
