"""A partial as measured: one damped sinusoid of a recorded decay (a line of its spectrum)."""

from __future__ import annotations

from dataclasses import dataclass

from ..notation import LN1000  # 60 dB of decay: r t = 3 ln 10

__all__ = ["LN1000", "Partial", "RISE_DB"]

RISE_DB = 1.0  # an envelope growing this much after the reference time is flagged rising
#                (above the scatter of a fitted envelope; common practice, no source)


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
        T60 uncertain), ``"steady"`` (does not decay within the analysed stretch: hum, or a
        line still fed by others; its T60 is only known to exceed :attr:`t60_at_least`; left
        out of the tension fit), ``"rising"`` (its envelope grows after the reference time,
        by at least :data:`RISE_DB`: a line fed by other modes or the air after the strike,
        or the sum of lines that beat; its level is taken at the reference time all the
        same, and its T60 is that of its envelope's fall as a long window sees it).
    t60_at_least : float or None
        For a partial that does not decay within the analysed stretch (``decay_rate <= 0``):
        the length of that stretch from the reference time [s]; its T60 is longer than this
        (a T60 that short would have shown a fall of 60 dB). None for a partial that decays.
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
    t60_at_least: float | None = None

    @property
    def t60_shown(self) -> tuple[float, bool]:
        """(T60 [s], True when it is only a lower bound): the measured T60, or for a partial
        that does not decay within the analysed stretch, that stretch's length."""
        t60 = self.t60
        if t60 is not None:
            return t60, False
        return (self.t60_at_least if self.t60_at_least is not None else 0.0), True

    @property
    def t60(self) -> float | None:
        """Time to fall by 60 dB [s], ``3 ln 10 / r``; None if the partial does not decay."""
        return LN1000 / self.decay_rate if self.decay_rate > 0 else None

    @property
    def settled(self) -> float:
        """The settled frequency [Hz] (the frequency, for a partial that does not glide)."""
        return self.frequency if self.settled_frequency is None else self.settled_frequency
