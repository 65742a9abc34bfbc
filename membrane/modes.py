"""A solved set of modes, and what is read off it: ratios, harmonic fit, notes, shapes.

:class:`ModeSet` is what every solver returns and every consumer (tables, tuning,
strike, pictures) takes. A mode keeps its expansion over the in-vacuum basis of its
angular order, so a loaded or stiff mode draws its real shape.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .drum import Drum
from .errors import InputError
from .physics.vacuum import RadialBasis
from .harmonics import MIN_FIT_MODES, HarmonicFit, harmonic_fit, harmonic_series  # noqa: F401
from .notation import PHYSICS_MODELS, air_label, cents, mode_label
from .units import note_name

PHYSICS = PHYSICS_MODELS  # one home: membrane.notation
# a root with a head fraction in this range is a hybrid of head and body air (our choice)
HYBRID = (0.2, 0.8)

HEAD_NOTE = ("', struck head' or ', resonant head' after a mode names the head it grows from, the one "
             "that moves most in it; in-phase: both heads move outward from the shell together, "
             "opposed: one moves out as the other moves in (identical heads share every mode alike, "
             "so their modes carry no head word)")


def principal_mode(drum) -> tuple[int, int]:
    """The mode a drum's partials are read against: its principal.

    A kettle's air pushes the (m,1) family towards a harmonic series whose
    principal tone is (1,1) (the trade's and Rossing's reading of a kettledrum);
    an open head or a shell is read against its lowest mode (0,1).
    """
    kind = getattr(getattr(drum, "body", None), "kind", "none")
    return (1, 1) if kind == "kettle" else (0, 1)


@dataclass(frozen=True)
class Mode:
    """One mode of the drum.

    Attributes
    ----------
    m, n : int
        Nodal diameters, and nodal circles counting the rim.
    frequency : float
        Hz.
    decay : float or None
        T60 in s from Im omega (radiation, plus the drum's losses with ``losses="all"``);
        None in vacuum.
    multiplicity : int
        1 for m = 0; 2 for the degenerate (cos, sin) pair when m >= 1.
    branch : str or None
        For a shell: ``"in-phase"`` or ``"opposed"``.
    head : str or None
        For uncoupled heads of a shell: ``"struck"`` or ``"resonant"``.
    omega : complex
        Complex angular frequency in rad/s (time dependence e^{i omega t}).
    coefficients : numpy.ndarray
        Expansion of the struck head's radial shape over ``basis``.
    basis : RadialBasis
        In-vacuum basis of order m of the struck head.
    resonant_coefficients, resonant_basis
        The same for the resonant head of a shell, else None.
    kind : {"head", "air"}
        ``"air"``: a root that is mostly the body's own air (docs/mode-identity.md); its
        n is -1, -2, ... (up the order m) and ``air_mode`` (q, p) names the body's rigid-walled resonance it is
        nearest: q nodal circles across, p half-waves along the depth.
    head_fraction : float
        Share of the root's vibrational energy in the head(s), 0..1 (1 without a body).
    air_mode : tuple or None
        (q, p) for an air row.
    """

    m: int
    n: int
    frequency: float
    decay: float | None
    multiplicity: int
    omega: complex
    coefficients: np.ndarray
    basis: RadialBasis
    branch: str | None = None
    head: str | None = None
    resonant_coefficients: np.ndarray | None = None
    resonant_basis: RadialBasis | None = None
    kind: str = "head"
    head_fraction: float = 1.0
    air_mode: tuple | None = None

    @property
    def label(self) -> str:
        """``"(m,n)"``, with the branch and, on a shell with two different heads, which head.

        ``"(0,1) in-phase, resonant head"``: the head named is the one the mode grows
        from (its in-vacuum origin, the head that moves most); see :data:`HEAD_NOTE`.
        Any root with a head fraction in :data:`HYBRID` is marked ``hybrid``, head and air
        rows alike (``"(0,1) hybrid"``).
        """
        if self.kind == "air":
            q, p = self.air_mode
            return air_label(self.m, q, p, hybrid=self.hybrid)
        return mode_label(self.m, self.n, branch=self.branch, head=self.head, hybrid=self.hybrid)

    def __repr__(self) -> str:
        t60 = f", T60 {self.decay:.3g} s" if self.decay else ""
        return f"Mode({self.label}, {self.frequency:.2f} Hz{t60})"

    @property
    def hybrid(self) -> bool:
        """Whether the root is a hybrid of head and body air (head fraction 0.2 to 0.8)."""
        return HYBRID[0] <= self.head_fraction <= HYBRID[1]

    def radial_shape(self, r, *, resonant: bool = False) -> np.ndarray:
        """Real radial shape on radii r (m), normalised to a peak of 1 on the struck head.

        The complex coefficients of a damped mode are rotated to be as real as
        possible first (a damped mode is nearly a standing wave).
        """
        coef, basis = (self.resonant_coefficients, self.resonant_basis) if resonant else \
            (self.coefficients, self.basis)
        if coef is None:
            return np.zeros_like(np.asarray(r, dtype=float))
        phase = _realising_phase(self.coefficients)
        values = np.real(phase * (np.asarray(coef) @ basis.shape(r)))
        peak = self.__dict__.get("_peak")  # the struck head's peak, once per mode (a picture
        if peak is None:  # samples the shape hundreds of times)
            ref = np.real(phase * (np.asarray(self.coefficients) @ self.basis.shape(
                np.linspace(0.0, self.basis.radius, 257))))
            peak = np.max(np.abs(ref))
            object.__setattr__(self, "_peak", peak)
        return values / peak if peak > 0 else values

    def field(self, r, theta, *, resonant: bool = False) -> np.ndarray:
        """Displacement w(r, theta) = shape(r) cos(m theta) on a grid (r in m, theta in rad)."""
        r = np.asarray(r, dtype=float)
        theta = np.asarray(theta, dtype=float)
        flat = self.radial_shape(r.ravel(), resonant=resonant).reshape(r.shape)
        return flat * np.cos(self.m * theta)


def _realising_phase(coef: np.ndarray) -> complex:
    """Unit complex number that makes ``coef`` as nearly real as possible."""
    coef = np.asarray(coef)
    if not np.iscomplexobj(coef):
        return 1.0
    s = np.sum(coef * coef)
    if abs(s) == 0:
        return 1.0
    return complex(np.exp(-0.5j * np.angle(s)))




@dataclass(frozen=True)
class ModeSet:
    """All solved modes of a drum under one physics model, sorted by frequency.

    Attributes
    ----------
    modes : tuple of Mode
        Sorted by frequency (stable: equal frequencies keep (m, n) order).
    physics : str
        ``"ideal"``, ``"stiff"`` or ``"full"``.
    drum : Drum
        The drum solved.
    notes : tuple of str
        What the model includes and leaves out, for the output.
    losses : str
        ``"all"`` or ``"radiation"``: which losses made the decay times (full physics).
    """

    modes: tuple
    physics: str
    drum: Drum
    notes: tuple = ()
    losses: str = "all"

    def __repr__(self) -> str:
        name = getattr(self.drum, "name", None)
        span = ""
        if self.modes:
            lo, hi = self.modes[0], self.modes[-1]
            span = f": {lo.label} {lo.frequency:.2f} Hz ... {hi.label} {hi.frequency:.2f} Hz"
        return f"ModeSet({name!r}, {self.physics} physics, {len(self.modes)} modes{span})"

    def __iter__(self):
        return iter(self.modes)

    def __len__(self):
        return len(self.modes)

    def find(self, m: int, n: int, branch: str | None = None, head: str | None = None) -> Mode:
        """The mode (m, n), of the given branch for a shell (default: the lower one).

        Where both heads of a shell have an (m, n) family, the struck head's is preferred
        unless ``head`` (``"struck"`` or ``"resonant"``) names one.
        """
        found = [mo for mo in self.modes if mo.m == m and mo.n == n and mo.kind == "head" and
                 (branch is None or mo.branch == branch)]
        if head is not None and self.drum is not None and getattr(self.drum, "resonant_head", None) is not None:
            if any(mo.head for mo in found):
                found = [mo for mo in found if mo.head == head]
        if found:
            struck = [mo for mo in found if mo.head != "resonant"]
            return (struck or found)[0]
        have = f"m <= {max(x.m for x in self.modes)}, n <= {max(x.n for x in self.modes)}"
        if branch is not None and any(mo.m == m and mo.n == n for mo in self.modes):
            have = "no branch " + repr(branch) + " for that mode"
        raise InputError("mode", f"{m},{n}" + (f" {branch}" if branch else ""),
                         f"this drum's solved modes have {have}")

    def reference_mode(self, reference=None) -> Mode:
        """The mode a reference names: (m, n), or (m, n, head) on a two-headed drum; default the principal."""
        reference = tuple(reference or self.principal)
        return self.find(*reference[:2], head=reference[2] if len(reference) > 2 else None)

    @property
    def principal(self) -> tuple[int, int]:
        """The default reference mode: (1,1) for a drum with a kettle, else (0,1)."""
        return principal_mode(self.drum)

    def ratios(self, reference: tuple[int, int] | None = None) -> np.ndarray:
        """Frequency of every mode divided by the reference mode's (default :attr:`principal`)."""
        ref = self.reference_mode(reference).frequency
        return np.array([mode.frequency / ref for mode in self.modes])

    def harmonic_fit(self, fit_modes=None) -> HarmonicFit | None:
        """Best harmonic series through ``fit_modes`` ((m, n) pairs), or None.

        By default the modes with one nodal circle and 1 to 5 nodal diameters, the
        family a kettledrum's air loading brings near a harmonic series; where fewer
        than three of them were solved, all of the struck head's modes are used.
        With fewer than three modes there is no fit (None): two frequencies always
        sit on some harmonic series. Modes named in ``fit_modes`` must exist and be
        at least three.
        """
        if fit_modes is None:  # the default family, as far as it was solved
            chosen = [self.find(m, 1) for m in range(1, 6) if self._has(m, 1)]
            if len(chosen) < MIN_FIT_MODES:
                chosen = [mode for mode in self.modes if mode.head != "resonant" and mode.kind == "head"]
        else:  # modes asked for by name must exist
            named = list(dict.fromkeys(tuple(mn) for mn in fit_modes))
            if len(named) < MIN_FIT_MODES:
                raise InputError("fit", ", ".join(f"{m},{n}" for m, n in named),
                                 f"name at least {MIN_FIT_MODES} different modes for a harmonic fit")
            chosen = [self.find(m, n) for m, n in named]
        if len(chosen) < MIN_FIT_MODES:
            return None
        f0, h, rms = harmonic_series([mode.frequency for mode in chosen])
        return HarmonicFit(fundamental=f0,
                           harmonics={(mo.m, mo.n): int(k) for mo, k in zip(chosen, h)},
                           rms_cents=rms, fitted=tuple((mo.m, mo.n) for mo in chosen))

    def _has(self, m: int, n: int) -> bool:
        return any(mode.m == m and mode.n == n and mode.kind == "head" for mode in self.modes)

    def is_fitted(self, mode: Mode, fit: HarmonicFit | None) -> bool:
        """Whether ``mode`` is one the harmonic fit used (the struck head's member of its (m, n))."""
        return fit is not None and (mode.m, mode.n) in fit.harmonics and \
            self.find(mode.m, mode.n) is mode

    def table(self, reference: tuple[int, int] | None = None, fit_modes=None) -> list[dict]:
        """One row per mode: frequency, decay, ratio, harmonic deviation, nearest note.

        ``reference`` defaults to :attr:`principal`. Only the modes the harmonic fit
        used get a harmonic number and a deviation from it (``fitted`` True); the
        others have None there, as every row has when there is no fit.

        Returns
        -------
        list of dict
            Keys ``m, n, frequency_hz, decay_s, ratio, multiplicity, fitted,
            harmonic, cents_from_harmonic, note, cents_from_note`` and, where they
            apply, ``branch`` and ``head``.
        """
        ratios = self.ratios(reference)
        fit = self.harmonic_fit(fit_modes)
        rows = []
        for mode, ratio in zip(self.modes, ratios):
            fitted = self.is_fitted(mode, fit)
            harmonic = fit.harmonics[(mode.m, mode.n)] if fitted else None
            note, off = note_name(mode.frequency)
            row = {
                "m": mode.m, "n": mode.n,
                "frequency_hz": mode.frequency,
                "decay_s": mode.decay,
                "ratio": float(ratio),
                "multiplicity": mode.multiplicity,
                "fitted": fitted,
                "harmonic": harmonic,
                "cents_from_harmonic": cents(mode.frequency, harmonic * fit.fundamental) if fitted else None,
                "note": note,
                "cents_from_note": off,
            }
            if mode.branch is not None:
                row["branch"] = mode.branch
            if mode.head is not None:
                row["head"] = mode.head
            if self.physics == "full":
                row["kind"] = mode.kind
                row["head_fraction"] = mode.head_fraction
                row["hybrid"] = mode.hybrid
                if mode.kind == "air":
                    row["air_mode"] = {"q": mode.air_mode[0], "p": mode.air_mode[1]}
            rows.append(row)
        return rows


T60_SHOWN_MAX = 100.0  # s; longer radiation-only decay times are shown as "> 100 s"


def t60_text(decay: float | None, digits: int = 3) -> str:
    """A T60 for people: 3 significant figures, and "> 100" beyond 100 s.

    Radiation alone barely damps the modes with many nodal diameters, so their
    radiation-only T60 runs to hours; what really stops them (film, rim and air losses)
    is not modelled, so such a number says only "radiation is not what stops it".
    The exact value stays in JSON and CSV output.
    """
    if decay is None:
        return ""
    return f"> {T60_SHOWN_MAX:g}" if decay > T60_SHOWN_MAX else f"{decay:.{digits}g}"


def sort_modes(modes) -> tuple:
    """Modes sorted by frequency; ties keep (m, n) order so the sort is stable."""
    return tuple(sorted(modes, key=lambda mo: (mo.frequency, mo.m, mo.n, mo.branch or "", mo.head or "")))

