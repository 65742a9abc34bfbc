"""Notation and constants used all over the package, each defined once.

Cents, the 60 dB decay constant, the default Poisson ratio, the edge conditions, how a
mode is written ("(m,n)", air rows "air (m,q,p)") and the words that describe the three
physics models. Light to import (no numpy at module load), so the command line's
``--help`` can use the help texts.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # for the annotations only: numpy loads when an array is given
    import numpy as np
    from numpy.typing import ArrayLike

#: ln 1000 = 3 ln 10: an amplitude decaying as exp(-r t) has fallen 60 dB when r t = ln 1000,
#: so T60 = LN1000 / r (r in 1/s).
LN1000 = 3.0 * math.log(10.0)

#: Poisson ratio of a head whose film gives none: polyester film's (0.38 to 0.40 is quoted for
#: PET film, from memory; membrane/data/films.toml). It enters only the small bending stiffness.
POISSON_RATIO = 0.38

#: How the rim holds the head (matters only with bending stiffness).
EDGES = ("clamped", "hinged")

#: The physics models of :func:`membrane.solve`, and the one sentence the commands print for them.
PHYSICS_MODELS = ("ideal", "stiff", "full")
PHYSICS_HELP = "ideal: tension only; stiff: + bending stiffness; full: + air on the faces and in the body."


#: Cents per unit of ln f (1200 / ln 2): a step of x cents is a factor exp(x / CENTS_PER_LN).
CENTS_PER_LN = 1200.0 / math.log(2.0)


def cents(frequency: float | ArrayLike, reference: float | ArrayLike) -> float | np.ndarray:
    """Interval from ``reference`` up to ``frequency`` in cents, 1200 log2(frequency / reference).

    Parameters
    ----------
    frequency, reference : float or array_like
        Frequencies in Hz (any one unit; only the ratio matters), > 0.

    Returns
    -------
    float or numpy.ndarray
        A float for two scalars, else an array (broadcast).

    Examples
    --------
    >>> cents(880.0, 440.0)
    1200.0
    """
    if isinstance(frequency, (int, float)) and isinstance(reference, (int, float)):
        return 1200.0 * math.log2(frequency / reference)
    import numpy as np

    return 1200.0 * np.log2(np.asarray(frequency, dtype=float) / np.asarray(reference, dtype=float))


def mode_label(m: int, n: int, *, branch: str | None = None, head: str | None = None,
               hybrid: bool = False) -> str:
    """A head mode as the package writes it: ``"(m,n)"``, m nodal diameters and n nodal circles.

    ``branch`` (a shell's ``"in-phase"`` / ``"opposed"``) and ``head`` (``"struck"`` /
    ``"resonant"``) follow in words: ``"(0,1) in-phase, resonant head"``; ``hybrid`` (a root
    shared between head and body air) last: ``"(0,1) hybrid"``.
    """
    words = [w for w in (branch, f"{head} head" if head else None, "hybrid" if hybrid else None) if w]
    return f"({m},{n})" + (" " + ", ".join(words) if words else "")


def air_label(m: int, q: int, p: int, *, hybrid: bool = False) -> str:
    """A root that is mostly the body's air: ``"air (m,q,p)"`` (order m, q nodal circles across,
    p half-waves along the depth of the rigid-walled body), ``", hybrid"`` when it is shared."""
    return f"air ({m},{q},{p})" + (", hybrid" if hybrid else "")


def mode_list(pairs) -> str:
    """``[(1, 1), (2, 1)]`` -> ``"(1,1), (2,1)"``."""
    return ", ".join(mode_label(m, n) for m, n in pairs)
