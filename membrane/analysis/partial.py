"""A partial as measured: one damped sinusoid of a recorded decay (a line of its spectrum)."""

from __future__ import annotations

from dataclasses import dataclass

from ..notation import LN1000  # 60 dB of decay: r t = 3 ln 10

__all__ = ["LN1000", "Partial"]


@dataclass(frozen=True)
class Partial:
    """One damped sinusoid of a decay.

    Attributes
    ----------
    frequency : float
        Frequency at the reference time [Hz].
    amplitude : float
        Amplitude at the reference time (full scale = 1).
    decay_rate : float
        Amplitude decay rate r [1/s]; the partial goes as ``exp(-r t)``.
    level_db : float
        Amplitude at the reference time in dB relative to the strongest partial.
    glide_cents : float
        Settled minus initial frequency [cents], 0 for a steady partial.
    settled_frequency : float or None
        Frequency once the glide has settled [Hz]; None means the same as ``frequency``.
    flags : tuple of str
        ``"glide"``, ``"fast"`` (decays faster than the analysis resolves well: level and
        T60 uncertain), ``"steady"`` (does not decay: hum, not a drum partial).
    members : tuple of Partial
        For a line the fit found as several close components that beat fewer than once
        while they ring (:mod:`.lines`): those components, each with its own frequency,
        level and decay; empty otherwise. The line itself is what is heard and shown; lug
        work on a clean recording may read its members as the halves of a split mode.
    """

    frequency: float
    amplitude: float
    decay_rate: float
    level_db: float = 0.0
    glide_cents: float = 0.0
    settled_frequency: float | None = None
    flags: tuple[str, ...] = ()
    members: tuple["Partial", ...] = ()

    @property
    def t60(self) -> float | None:
        """Time to fall by 60 dB [s], ``3 ln 10 / r``; None if the partial does not decay."""
        return LN1000 / self.decay_rate if self.decay_rate > 0 else None

    @property
    def settled(self) -> float:
        """The settled frequency [Hz] (the frequency, for a partial that does not glide)."""
        return self.frequency if self.settled_frequency is None else self.settled_frequency
