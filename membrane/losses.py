"""Loss parameters of a drum (the drum file's ``[losses]`` table) and their defaults.

Decay in ``--physics full`` comes from the complex roots of the coupled operator. With
``--losses radiation`` only sound radiation damps the head; with ``--losses all`` (the
default) four more mechanisms enter the same operator (``membrane/physics/dissipation.py``):

* the tension of the stretched head as a complex tension ``T (1 + i tension_loss_factor)``;
* the film's bending stiffness through a complex Young's modulus ``E (1 + i film_loss_factor)``;
* the viscous and thermal boundary layers of the air on the head's faces and on the walls
  of the kettle or shell (no parameter: the air's viscosity and heat conduction);
* an edge loss: the rim and hoop take the head's vertical edge force through a resistive
  line mobility ``edge_mobility`` (m per N s).

Where the defaults come from is said beside each one and in ``docs/losses.md``.
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import InputError
from .units import to_si

LOSS_CHOICES = ("radiation", "all")

# Loss factor of the stretched head, as mounted, applied as a complex tension. Set from
# measured decay of real kettledrums: the (2,1)..(4,1) partials of three timpani recordings
# (issue 19: T60 3.4-11.5 s at about 95-250 Hz) give 1/Q = 2 ln(1000) / (omega T60) of about
# 1e-3 to 5e-3; we take 2e-3. Checked on the recordings in tests/data (tests/test_loss_fit_real.py):
# every measured (m,1) partial, m = 1..5, within a factor 3 of the model with these defaults.
# Not a film datasheet value: linear membrane theory has no first-order in-plane strain for the
# film's own viscoelasticity to act on (docs/losses.md).
TENSION_LOSS_FACTOR = 2.0e-3
# Loss tangent of polyester (PET) film at room temperature in the audio band, about 0.01-0.02
# (from memory: the beta relaxation of PET, McCrum, Read & Williams, Anelastic and Dielectric
# Effects in Polymeric Solids, 1967); it damps the bending part of the head's stiffness.
FILM_LOSS_FACTOR = 0.015
# Resistive line mobility of the rim and hoop: no published value for drums is known to us.
# Fitted on the three recordings in tests/data it is 0.7e-4 to 3.5e-4 m/(N s), a factor 5 from
# drum to drum, and a joint value predicts them no better than the tension loss factor alone
# (docs/losses.md), so the default is none; `listen --drum` fits it where a recording shows it.
EDGE_MOBILITY = 0.0


@dataclass(frozen=True)
class Losses:
    """Loss parameters of a drum, SI.

    Attributes
    ----------
    tension_loss_factor : float
        eta_T of the complex tension T (1 + i eta_T), dimensionless; frequency independent
        (hysteretic), so a pure-tension membrane has Q = 1 / eta_T in every mode.
    film_loss_factor : float
        eta_E of the complex Young's modulus E (1 + i eta_E), dimensionless, acting on the
        bending stiffness D.
    boundary_layers : bool
        Include the air's viscous and thermal boundary layers.
    edge_mobility : float
        Real part of the rim's vertical line mobility, m/(N s): the rim's velocity per unit
        vertical force per unit length of rim.
    """

    tension_loss_factor: float = TENSION_LOSS_FACTOR
    film_loss_factor: float = FILM_LOSS_FACTOR
    boundary_layers: bool = True
    edge_mobility: float = EDGE_MOBILITY


_KEYS = {"tension_loss_factor", "film_loss_factor", "boundary_layers", "edge_mobility"}


def _factor(table: dict, key: str, default: float) -> float:
    value = table.get(key, default)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0.0 <= value <= 0.5:
        raise InputError(f"losses.{key}", value, "must be a loss factor from 0 to 0.5 (a number)")
    return float(value)


def parse_losses(table: dict) -> Losses:
    """The ``[losses]`` table of a drum file as :class:`Losses` (missing keys: defaults).

    Raises
    ------
    InputError
        Naming the key, the value and what is allowed.
    """
    if not isinstance(table, dict):
        raise InputError("losses", table, "must be a table")
    for key in table:
        if key not in _KEYS:
            raise InputError(f"losses.{key}", table[key],
                             f"unknown key; allowed keys here: {', '.join(sorted(_KEYS))}")
    layers = table.get("boundary_layers", True)
    if not isinstance(layers, bool):
        raise InputError("losses.boundary_layers", layers, "must be true or false")
    mobility = EDGE_MOBILITY
    if "edge_mobility" in table:
        mobility = to_si(table["edge_mobility"], "mobility", key="losses.edge_mobility")
        if not 0.0 <= mobility <= 1e-2:
            raise InputError("losses.edge_mobility", table["edge_mobility"],
                             "must be >= 0 and <= 0.01 m/(N s)")
    return Losses(tension_loss_factor=_factor(table, "tension_loss_factor", TENSION_LOSS_FACTOR),
                  film_loss_factor=_factor(table, "film_loss_factor", FILM_LOSS_FACTOR),
                  boundary_layers=layers, edge_mobility=mobility)


def check_choice(losses: str) -> str:
    """``"radiation"`` or ``"all"``, else an InputError."""
    if losses not in LOSS_CHOICES:
        raise InputError("losses", losses, f"must be one of: {', '.join(LOSS_CHOICES)}")
    return losses


def decay_note(losses: Losses | None) -> str:
    """The line said under every table and picture that shows T60: which losses made it."""
    if losses is None:
        return ("decay times (T60) with --losses radiation: sound radiation only; losses in the "
                "film, the rim and the air are left out, so real partials die sooner (tables "
                "show those beyond 100 s as > 100)")
    parts = [f"complex tension (loss factor {losses.tension_loss_factor:g})",
             f"complex film modulus in the bending stiffness (loss factor {losses.film_loss_factor:g})"]
    if losses.boundary_layers:
        parts.append("viscous and thermal boundary layers of the air on the head and the body's "
                     "walls (open face in its subsonic limit)")
    if losses.edge_mobility > 0:
        parts.append(f"a resistive rim (edge mobility {losses.edge_mobility:g} m/(N s))")
    else:
        parts.append("no rim loss (edge mobility 0)")
    return ("decay times (T60) with --losses all: sound radiation plus " + "; ".join(parts)
            + " (defaults and their sources: docs/losses.md)")
