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
    rr, tt = np.meshgrid(r * a, theta)
    w = mode.field(rr, tt, resonant=resonant)
    return PolarField(r=r, theta=theta, w=w)


def ratio_to(modeset, mode, reference: tuple[int, int]) -> float | None:
    """Frequency ratio of ``mode`` to the reference mode, or None if that was not solved."""
    try:
        ref = modeset.find(*reference)
    except ValueError:
        return None
    return mode.frequency / ref.frequency


def mode_caption(modeset, mode, *, reference: tuple[int, int] = (0, 1), short: bool = False) -> str:
    """``"(2,1)  305.5 Hz  ratio 2.136 to (0,1)"``: label, frequency, ratio [, T60]."""
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
