"""A mode's displacement sampled on a polar grid, and the words that label it.

Pure numpy: both the matplotlib stills and the pyvista animations draw from here,
so a picture always shows the solver's own mode vector (a stiff or air-loaded mode
its real shape, not the ideal Bessel function).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Enough points that a (6,3) mode looks smooth and a nodal circle found by linear
# interpolation between samples lands well inside 0.1 % of the radius.
RADIAL_POINTS = 121
ANGULAR_POINTS = 181

# Moreland's diverging map (blue - light grey - red): lightness runs smoothly from
# both ends to the middle, and blue against red stays apart for red-green colour
# blindness. Print in grey loses the sign, so the nodal diagram also marks +/- in text.
CMAP = "coolwarm"


@dataclass(frozen=True)
class PolarField:
    """Displacement on a polar grid, in units of the head's radius.

    Attributes
    ----------
    r : numpy.ndarray
        Radii r/a, shape (n_r,), from 0 to 1.
    theta : numpy.ndarray
        Angles in rad, shape (n_theta,), from 0 to 2 pi inclusive (the seam repeats).
    w : numpy.ndarray
        Displacement, shape (n_theta, n_r), peak |w| = 1 on the struck head.
    """

    r: np.ndarray
    theta: np.ndarray
    w: np.ndarray

    @property
    def xy(self) -> tuple[np.ndarray, np.ndarray]:
        """Cartesian coordinates x/a, y/a, each of shape (n_theta, n_r)."""
        rr, tt = np.meshgrid(self.r, self.theta)
        return rr * np.cos(tt), rr * np.sin(tt)


def sample(mode, *, radial: int = RADIAL_POINTS, angular: int = ANGULAR_POINTS,
           resonant: bool = False) -> PolarField:
    """Sample ``mode.field`` on a polar grid over the whole head.

    Parameters
    ----------
    mode : membrane.modes.Mode
        A solved mode; its own basis and coefficients give the shape.
    radial, angular : int
        Grid points along the radius and around the circle (the circle closes).
    resonant : bool
        Sample the resonant head of a shell instead of the struck head.
    """
    a = mode.basis.radius if not resonant else mode.resonant_basis.radius
    r = np.linspace(0.0, 1.0, radial)
    theta = np.linspace(0.0, 2.0 * np.pi, angular)
    # w = shape(r) cos(m theta) (Mode.field): the radial shape on the grid's radii once, not
    # at every grid point (the Bessel sums are the cost of a picture)
    shape = mode.radial_shape(r * a, resonant=resonant)
    w = np.cos(mode.m * theta)[:, None] * shape[None, :]
    return PolarField(r=r, theta=theta, w=w)


@dataclass(frozen=True)
class NodalLines:
    """Where a mode w = shape(r) cos(m theta) does not move, from its own structure.

    Attributes
    ----------
    diameters : tuple of float
        Angles in rad of the m nodal diameters (each a whole line through the centre,
        so theta and theta + pi are one diameter), the zeros of cos(m theta).
    circles : tuple of float
        Radii r/a of the nodal circles inside the rim: the zeros of the solver's radial
        shape (the rim itself is left out).
    """

    diameters: tuple
    circles: tuple


# Radial zeros are bracketed on this many samples, then refined: nodal circles of the
# solved orders (n <= 50) are far more than 1/RADIAL_SEARCH apart.
RADIAL_SEARCH = 2001
RIM_GAP = 0.002  # a zero closer than this to r/a = 1 is the clamped or hinged rim
QUIET = 1e-7  # |shape| below this fraction of its peak: round-off, not a sign
LOBE_FLOOR = 1e-3  # a region between nodal circles moving less than this (of the peak) is no region


def nodal_lines(mode, *, resonant: bool = False) -> NodalLines | None:
    """The nodal diameters and circles of one head of a mode, or None if unknown.

    The angular part of every solved mode is cos(m theta), so its m nodal diameters sit
    at theta = (2k + 1) pi / (2m); the nodal circles are the sign changes of the
    radial shape (:meth:`Mode.radial_shape`, the solver's mode vector), refined by
    regula falsi (all circles at once). None when the mode has no radial shape to read
    (draw a contour).
    """
    shape = getattr(mode, "radial_shape", None)
    basis = mode.resonant_basis if resonant else getattr(mode, "basis", None)
    if shape is None or basis is None:
        return None
    a = basis.radius
    m = int(mode.m)
    diameters = tuple((2 * k + 1) * np.pi / (2 * m) for k in range(m))
    r = np.linspace(0.0, a, RADIAL_SEARCH)
    w = shape(r, resonant=resonant)
    peak = np.max(np.abs(w))
    if not np.all(np.isfinite(w)) or peak == 0:
        return NodalLines(diameters=diameters, circles=()) if peak == 0 else None
    loud = np.abs(w) > QUIET * peak
    lo, hi = [], []
    for i in np.flatnonzero((np.sign(w[1:]) * np.sign(w[:-1]) <= 0) & loud[:-1]):
        j = i + 1 + int(np.argmax(loud[i + 1:])) if not loud[i + 1] else i + 1  # across a zero sample
        if j >= r.size or not loud[j] or np.sign(w[j]) == np.sign(w[i]):
            continue
        lo.append(r[i])
        hi.append(r[j])
    circles = []
    for root in _zeros_in(lambda x: shape(x, resonant=resonant), np.array(lo), np.array(hi)):
        if root < a * (1 - RIM_GAP) and (not circles or root / a - circles[-1] > 1e-6):
            circles.append(root / a)
    # A sign change that bounds a region moving less than LOBE_FLOOR of the peak (e.g.
    # near the centre of a mode with many diameters, where w ~ r^m) divides nothing a
    # listener or a hand could find: that region is merged with its neighbour.
    while circles:
        edges = [0.0, *circles, 1.0]
        lobes = [np.max(np.abs(w[(r / a >= lo) & (r / a <= hi)]), initial=0.0) for lo, hi in zip(edges, edges[1:])]
        weak = [k for k, v in enumerate(lobes) if v < LOBE_FLOOR * peak]
        if not weak:
            break
        k = weak[0]
        circles.pop(k if k < len(circles) else k - 1)  # the circle bounding the weak region
    return NodalLines(diameters=diameters, circles=tuple(circles))


def _zeros_in(f, lo: np.ndarray, hi: np.ndarray) -> np.ndarray:
    """The zero of the vectorised f in each bracket [lo, hi] (f changes sign across each).

    Illinois regula falsi on all brackets at once (the solver's edge-root finder), to a
    relative 1e-13; bisection to the same width if that does not converge.
    """
    from ..physics.vacuum import illinois

    if lo.size == 0:
        return lo
    roots = illinois(f, lo, hi, rtol=1e-13)
    if roots is not None:
        return roots
    a, b = lo.astype(float), hi.astype(float)
    fa = f(a)
    while np.any(b - a > 1e-13 * np.abs(b)):
        c = 0.5 * (a + b)
        fc = f(c)
        left = np.sign(fc) == np.sign(fa)
        a, fa = np.where(left, c, a), np.where(left, fc, fa)
        b = np.where(left, b, c)
    return 0.5 * (a + b)


def drawn_head(mode) -> bool:
    """Whether a picture of ``mode`` should show the resonant head (``resonant`` argument).

    A mode counted on a shell's resonant head hardly moves the struck head: it is drawn
    on the head it lives on. (An uncoupled resonant-head mode in vacuum carries that
    head as its own basis, so it is drawn as a struck head would be.)
    """
    return getattr(mode, "head", None) == "resonant" and getattr(mode, "resonant_coefficients", None) is not None


def head_words(modeset, mode) -> str:
    """``"struck head"`` or ``"resonant head"`` for a two-headed drum's picture, else ``""``."""
    if getattr(modeset.drum, "resonant_head", None) is None:
        return ""
    return "resonant head" if getattr(mode, "head", None) == "resonant" else "struck head"


def wrap_title(text: str, width_in: float, fontsize: float) -> str:
    """Break each line of a title so it fits ``width_in`` inches at ``fontsize`` points.

    An average glyph of matplotlib's default sans-serif is about 0.55 em wide; 0.6 leaves a margin.
    """
    import textwrap

    chars = max(12, int(width_in * 72.0 / (0.6 * fontsize)))
    return "\n".join(textwrap.fill(line, chars, break_on_hyphens=False) for line in text.split("\n"))


def ratio_to(modeset, mode, reference: tuple[int, int]) -> float | None:
    """Frequency ratio of ``mode`` to the reference mode, or None if that was not solved."""
    try:
        ref = modeset.reference_mode(reference)
    except ValueError:
        return None
    return mode.frequency / ref.frequency


def reference_of(modeset, reference) -> tuple[int, int]:
    """The reference mode asked for, or the drum's principal (see :func:`membrane.modes.principal_mode`)."""
    if reference is not None:
        return tuple(reference)
    from ..modes import principal_mode

    return principal_mode(modeset.drum)


def mode_caption(modeset, mode, *, reference: tuple[int, int] | None = None, short: bool = False) -> str:
    """``"(2,1)  305.5 Hz  ratio 1.341 to (1,1)"``: label, frequency, ratio [, T60].

    ``reference`` defaults to the drum's principal mode.
    """
    reference = reference_of(modeset, reference)
    ratio = ratio_to(modeset, mode, reference)
    parts = [mode.label, f"{mode.frequency:.1f} Hz"]
    if ratio is not None:
        parts.append(f"x{ratio:.3f}" if short else f"ratio {ratio:.3f} to ({reference[0]},{reference[1]})")
    if mode.decay is not None and not short:
        from ..modes import t60_text

        which = "radiation only" if getattr(modeset, "losses", "all") == "radiation" else "all losses"
        parts.append(f"T60 {t60_text(mode.decay)} s ({which})")
    return "  ".join(parts)


def physics_words(physics: str) -> str:
    """A few words saying what a physics model includes, for titles."""
    return {"ideal": "ideal membrane (tension only, in vacuum)",
            "stiff": "stiff membrane (tension + bending, in vacuum)",
            "full": "full physics (stiff head, air loading, body air)"}.get(physics, physics)
