"""One entry point from a drum to its modes, under a named physics model."""

from __future__ import annotations

from dataclasses import replace

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


def check_orders(m_max, n_max) -> None:
    """Raise InputError unless m_max is a whole number 0..M_MAX_LIMIT and n_max 1..N_MAX_LIMIT."""
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
    check_orders(m_max, n_max)
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
        from .physics.assembly import model_notes

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


def full_modes(drum, *, m_max: int, n_max: int, settings=None,
               losses=None, air: bool = False) -> list:
    """Modes of a drum with air on its faces and in its body (``--physics full``).

    Parameters
    ----------
    drum : membrane.drum.Drum
        The drum (body ``none``: air on both faces; ``kettle``; ``shell`` with a resonant head).
    m_max, n_max : int
        Orders 0..m_max and n = 1..n_max per order (and per branch for a shell).
    settings : membrane.physics.operator.Settings or None
        Numerical settings (None: the defaults, which converge the frequencies to about 1e-5 or better).
    losses : membrane.losses.Losses or None
        Losses besides radiation (film, air boundary layers, rim: dissipation.py); None
        for radiation damping only.

    Returns
    -------
    list of membrane.modes.Mode
        (m, n) is the root that is most the in-vacuum mode (m, n) (see physics.assembly.label_roots);
        for a shell each (m, n) appears once per branch, ``"in-phase"`` or ``"opposed"``.
        Decay is T60 from radiation damping only. With ``air``, the roots that are mostly
        the body's air are rows of their own (kind "air", n = -1, -2, ... in order of
        frequency within their m, a key no head mode has).
    """
    from .physics.assembly import decay_time, solve_drum
    from .physics.operator import DEFAULT

    solved = solve_drum(drum, m_max=m_max, n_max=n_max, settings=settings or DEFAULT, losses=losses)
    bases = {}
    out = []
    pair = {}
    for od in solved:
        order = od.order
        m = order.m
        h1 = order.heads[0]
        if m not in bases:
            bases[m] = h1.basis()
        for r, lab in enumerate(od.labels):
            if lab is None or (lab[0] == "air" and not air):
                continue
            kind, air_mode = "head", None
            if lab[0] == "air":  # n = -1, -2, ... up the order: a key of its own, never a head's
                n_air = sum(1 for lb in od.labels[:r + 1] if lb is not None and lb[0] == "air")
                kind, air_mode, hidx, n = "air", (lab[1], lab[2]), 0, -n_air
            else:
                _, hidx, n = lab
            x = od.vectors[r]
            coef = h1.unit.to_basis(x[: h1.size])
            res_coef = res_basis = None
            branch = head = None
            if drum.body.kind == "shell":
                if order.cross_sign is not None:
                    branch = "in-phase" if order.cross_sign > 0 else "opposed"
                    res_coef = coef * order.cross_sign
                    res_basis = bases[m]
                else:
                    h2 = order.heads[1]
                    res_coef = h2.unit.to_basis(x[h1.size:])
                    if kind == "head":
                        head = "struck" if hidx == 0 else "resonant"
                        pair.setdefault((m, n), []).append(len(out))
                    res_basis = h2.basis()
            scale = np.max(np.abs(coef)) if res_coef is None else max(np.max(np.abs(coef)),
                                                                      np.max(np.abs(res_coef)))
            w = complex(od.omega[r])
            out.append(Mode(m=m, n=n, frequency=w.real / (2 * np.pi), decay=decay_time(w),
                            multiplicity=1 if m == 0 else 2, omega=w,
                            coefficients=coef / scale, basis=bases[m], branch=branch, head=head,
                            resonant_coefficients=None if res_coef is None else res_coef / scale,
                            resonant_basis=res_basis, kind=kind,
                            head_fraction=float(od.head_fraction[r]), air_mode=air_mode))
    for (m, n), (i, j) in pair.items():  # unequal heads: label the pair's branches
        s = [_phase_score(out[k], n) for k in (i, j)]
        hi, lo = (i, j) if s[0] >= s[1] else (j, i)
        out[hi] = replace(out[hi], branch="in-phase")
        out[lo] = replace(out[lo], branch="opposed")
    return out


def _phase_score(mode, n) -> float:
    """Signed agreement of the two heads' outward displacement in the pair's own shape n."""
    a, b = mode.coefficients[n - 1], mode.resonant_coefficients[n - 1]
    den = abs(a) * abs(b)
    return float(np.real(a * np.conj(b)) / den) if den > 0 else 0.0
