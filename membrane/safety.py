"""Safety and validity of a tension: film stress, the slack limit, the practical minimum, cautions.

Shared by tuning (``membrane tune``, one head and two), the strike preview and the handout, so
each caution is worded once. The physics behind each limit is in docs/physics.md ("Limits of a
tension").

* Stress: film stress T / (plies h) against the film's yield stress (for polyester the
  producer's stress at 5 % elongation, membrane/data/films.toml). A suggestion above
  :data:`SAFE_STRESS_FRACTION` = 0.5 of it gets a caution (a safety factor of 2 on yield:
  common practice, no source); one that would need more than the tensile strength is
  refused (:func:`tension_ceiling`). The maker's rating of a head always wins over these numbers.
* Slack limit: the tension D (j11/a)^2 at which bending stiffness holds the (1,1) mode
  as much as tension does (:func:`slack_tension`).
* Practical minimum: below a strain of :data:`MIN_HOLDING_STRAIN` the head is taken to wrinkle
  (our own threshold, :data:`MIN_RULE`).

Everything takes SI floats (N/m, Pa).
"""

from __future__ import annotations

from .drum import Head
from .ranges import TENSION

# A suggestion above this fraction of the film's yield stress gets a caution: a
# safety factor of 2 on yield, as for static loads on ductile materials.
SAFE_STRESS_FRACTION = 0.5  # common practice, no source
# A head stretched by less than this strain (T / (E h), one part in 5000) is taken to wrinkle
# and not hold a pitch. This threshold is our own choice (no published or trade figure behind
# it): it only flags suggestions far below any tension a playable head is set to (a 26-inch
# polyester kettledrum head is set near 0.5 % strain).
MIN_HOLDING_STRAIN = 2e-4  # our own threshold, no source
MIN_RULE = ("a threshold of our own, not a published figure: a head stretched by less than about "
            "0.02 % (one part in 5000) is taken to wrinkle and not hold a pitch")
TENSION_CEILING = TENSION.hi  # N/m: the top of the drum-file range (membrane.ranges)

TEAR = ("An over-tensioned film can tear suddenly and violently: raise tension in small steps "
        "and keep your face out of the plane of the head while tightening.")
HEARING = "Loud drums damage hearing: wear hearing protection when playing and testing at close range."
MODEL_NOT_RATING = ("These tensions come from a model: follow the head maker's rating and local practice, "
                    "and never exceed a maker's limit on the strength of a computed number.")
#: The cautions printed with every tension the tool suggests (tune, lugs, listen) and on the handout.
CAUTIONS = (TEAR, HEARING, MODEL_NOT_RATING)
#: The caution printed with a sound preview (``membrane strike``): it is played, so start quietly.
PREVIEW_HEARING = "caution: the preview peaks at -1 dBFS; start playback quietly. " + HEARING


def slack_tension(head: Head) -> float:
    r"""Tension below which bending stiffness, not tension, sets the (1,1) frequency (N/m).

    In the stiff-membrane equation (docs/physics.md, "The stiff membrane") a mode of
    wavenumber k is held by :math:`T k^2` from tension and :math:`D k^4` from bending; they
    are equal for the (1,1) mode at :math:`T = D (j_{11}/a)^2`. Below it a tension change
    barely moves the pitch and the head is slack for tuning purposes. A head without bending
    stiffness (no modulus or thickness given) has no such limit here (returns 0).
    """
    return head.slack_tension  # one home for the formula (membrane.drum.Head)


def practical_minimum(head: Head) -> float | None:
    """Lowest tension (N/m) at which the head holds a pitch, by :data:`MIN_RULE`; None if unknown.

    T_min = MIN_HOLDING_STRAIN * E * plies * h, the tension that stretches the film by
    that strain (E Young's modulus in Pa, h ply thickness in m).
    """
    if head.youngs_modulus is None or head.thickness is None:
        return None
    return MIN_HOLDING_STRAIN * head.youngs_modulus * head.plies * head.thickness


def below_minimum(head: Head, tension: float) -> str | None:
    """The warning for a tension below the practical minimum, in a maker's words, or None."""
    t_min = practical_minimum(head)
    if t_min is None or tension >= t_min:
        return None
    strain = tension / (head.youngs_modulus * head.plies * head.thickness)
    return (f"{tension:.3g} N/m is below the practical minimum of about {t_min:.0f} N/m for this head: "
            f"the film would be stretched by only {100 * strain:.2g} %, so it would wrinkle and not hold "
            f"a pitch ({MIN_RULE})")


def stress(head: Head, tension: float) -> float | None:
    """Film stress T / (plies h) in Pa at a tension in N/m, or None without a thickness."""
    return None if head.thickness is None else tension / (head.plies * head.thickness)


def tension_ceiling(head: Head) -> float:
    """Highest tension (N/m) a search may try: the film's breaking point, or the file range's top."""
    if head.thickness is not None and head.tensile_strength is not None:
        return min(TENSION_CEILING, head.tensile_strength * head.plies * head.thickness)
    return TENSION_CEILING


def safety_warnings(head: Head, tension: float) -> list[str]:
    """Cautions for a suggested tension (N/m) on this head: stress and slackness.

    The stress is measured against the film's yield stress; for a film with no known
    yield but a known breaking stress (taken as elastic to break) against that; for a
    material with neither (natural skins) no check is made and the output says why.
    """
    warnings = []
    s = stress(head, tension)
    limit, what = (head.yield_stress, "yield stress") if head.yield_stress is not None else \
        (head.tensile_strength, "breaking stress (no yield stress is known for this film)")
    if s is None or limit is None:
        note = strength_note(head)
        warnings.append("no stress check: " + (note if note else "the drum gives no film thickness or "
                                               "yield stress; follow the head maker's rating"))
    elif s > limit:
        warnings.append(f"{tension:.0f} N/m puts the film at {s / 1e6:.1f} MPa, above its {what} "
                        f"({limit / 1e6:.0f} MPa): it will stretch permanently and may tear")
    elif s > SAFE_STRESS_FRACTION * limit:
        warnings.append(f"{tension:.0f} N/m puts the film at {s / 1e6:.1f} MPa, "
                        f"{100 * s / limit:.0f} % of its {what}, above the "
                        f"{100 * SAFE_STRESS_FRACTION:.0f} % taken here as a safe limit")
    low = below_minimum(head, tension)
    if low:
        warnings.append(low)
    slack = slack_tension(head)
    if tension < slack:
        warnings.append(f"{tension:.3g} N/m is below the slack limit {slack:.3g} N/m, where bending "
                        "stiffness sets the (1,1) frequency as much as tension does")
    return warnings


def strength_note(head: Head) -> str:
    """The catalogue's plain statement on a film's missing strength data, if it has one."""
    if head.film is None or head.thickness is None:
        return ""
    from . import materials

    return materials.film(head.film).strength_note
