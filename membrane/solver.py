"""One entry point from a drum to its modes, under a named physics model."""

from __future__ import annotations

import numpy as np

from .blas import one_blas_thread
from .drum import Drum, Head
from .errors import InputError
from .losses import Losses, check_choice
from .modes import PHYSICS, Mode, ModeSet, sort_modes
from .physics.vacuum import RadialBasis, ideal_basis, stiff_basis

M_MAX_LIMIT = 50  # beyond this the table is unreadable and the high modes meaningless
N_MAX_LIMIT = 50
# The coupled solve of 20 x 10 modes already takes half a minute; beyond that it is not
# a table anyone waits for (and modes that high hardly matter to the sound).
FULL_M_MAX = 20
FULL_N_MAX = 10

NOTE_VACUUM = "in vacuum: no air loading, no body; decay times are not modelled"
NOTE_STIFF_NONE = "the head has no Young's modulus or thickness, so no bending stiffness: stiff = ideal"


def head_basis(head: Head, *, m: int, count: int, stiff: bool) -> RadialBasis:
    """In-vacuum basis of order m for one head (stiff if asked and the head has stiffness)."""
    if stiff and head.bending_stiffness > 0:
        return stiff_basis(m=m, count=count, radius=head.radius, tension=head.tension,
                           areal_density=head.areal_density,
                           bending_stiffness=head.bending_stiffness,
                           poisson_ratio=head.poisson_ratio, edge=head.edge)
    return ideal_basis(m=m, count=count, radius=head.radius, tension=head.tension,
                       areal_density=head.areal_density)


def _check_orders(m_max, n_max) -> None:
    for key, value, hi, low in (("m_max", m_max, M_MAX_LIMIT, 0), ("n_max", n_max, N_MAX_LIMIT, 1)):
        if isinstance(value, bool) or not isinstance(value, int) or not low <= value <= hi:
            raise InputError(key, value, f"must be a whole number from {low} to {hi}")


def vacuum_modes(drum: Drum, *, m_max: int, n_max: int, stiff: bool) -> list[Mode]:
    """Modes of the drum's head(s) in vacuum, uncoupled (ideal or stiff)."""
    heads = [("struck", drum.head)]
    if drum.resonant_head is not None:
        heads.append(("resonant", drum.resonant_head))
    modes = []
    multiplicity = lambda m: 1 if m == 0 else 2  # noqa: E731  (cos and sin partners)
    unit = np.eye(n_max)
    unit.setflags(write=False)
    for label, head in heads:
        for m in range(m_max + 1):
            basis = head_basis(head, m=m, count=n_max, stiff=stiff)
            freqs = (basis.omega / (2 * np.pi)).tolist()
            omegas = basis.omega.tolist()
            for i in range(n_max):
                modes.append(Mode(
                    m=m, n=i + 1, frequency=freqs[i], decay=None, multiplicity=multiplicity(m),
                    omega=complex(omegas[i]), coefficients=unit[i], basis=basis,
                    head=label if drum.resonant_head is not None else None,
                ))
    return modes


@one_blas_thread  # many small matrix products: threads only contend (membrane/blas.py)
def solve(drum: Drum, physics: str = "full", *, m_max: int = 6, n_max: int = 3,
          losses: str = "all") -> ModeSet:
    """Solve a drum's modes.

    Parameters
    ----------
    drum : Drum
        The drum.
    physics : {"ideal", "stiff", "full"}
        ``ideal``: tension only, in vacuum. ``stiff``: adds the film's bending
        stiffness (exact clamped or hinged roots), in vacuum. ``full``: the stiff head
        with air on its faces (radiation loading and damping) and the air in the
        body, solved for complex frequencies.
    m_max : int
        Highest number of nodal diameters, 0..50.
    n_max : int
        Highest number of nodal circles (counting the rim), 1..50.
    losses : {"all", "radiation"}
        With ``full`` physics: ``all`` damps the head by radiation and by the drum's loss
        parameters (``drum.losses``: film, air boundary layers, rim); ``radiation`` by
        sound radiation only. Vacuum physics has no decay either way.

    Returns
    -------
    ModeSet
        Modes sorted by frequency.
    """
    if physics not in PHYSICS:
        raise InputError("physics", physics, f"must be one of: {', '.join(PHYSICS)}")
    _check_orders(m_max, n_max)
    check_choice(losses)
    notes = []
    if physics in ("ideal", "stiff"):
        stiff = physics == "stiff"
        if stiff and drum.head.bending_stiffness == 0:
            notes.append(NOTE_STIFF_NONE)
        notes.append(NOTE_VACUUM)
        modes = vacuum_modes(drum, m_max=m_max, n_max=n_max, stiff=stiff)
    else:
        if m_max > FULL_M_MAX or n_max > FULL_N_MAX:
            raise InputError("m_max, n_max", f"{m_max}, {n_max}",
                             f"with full physics at most m_max = {FULL_M_MAX} and n_max = {FULL_N_MAX} "
                             "(the coupled solve grows fast; use --physics stiff for bigger tables)")
        from .physics.coupled import full_modes, model_notes

        params = drum.losses if losses == "all" else None
        modes = full_modes(drum, m_max=m_max, n_max=n_max, losses=params, air=True)
        notes.extend(model_notes(drum, params))
        films = {h.film for h in (drum.head, drum.resonant_head) if h is not None}
        if params is not None and params == Losses() and films - {"polyester"}:
            notes.append("the default loss parameters are those of polyester heads; for other "
                         "films give the drum file a losses table (docs/losses.md)")
    notes.extend(material_notes(drum))
    if drum.resonant_head is not None:
        from .modes import HEAD_NOTE

        notes.append(HEAD_NOTE)
    return ModeSet(modes=sort_modes(modes), physics=physics, drum=drum, notes=tuple(notes),
                   losses=losses)


def material_notes(drum: Drum) -> list[str]:
    """What the head materials' data leave out (a natural skin changes with humidity)."""
    from . import materials

    heads = [("struck head", drum.head), ("resonant head", drum.resonant_head)]
    notes, seen = [], set()
    for where, head in heads:
        note = "" if head is None or head.film is None else materials.film(head.film).humidity_note
        if note and note not in seen:
            seen.add(note)
            notes.append(note if drum.resonant_head is None else f"{where}: {note}")
    return notes
