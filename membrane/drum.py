"""The drum: frozen dataclasses for head, body, air and lugs, each holding its own invariants.

Values inside are plain SI floats. What every drum must satisfy to be one is checked when it
is made, so the physics never re-validates: sizes finite and positive, a known edge and a
Poisson ratio below 1/2, a kettle with a volume and a shell with a depth and a resonant head
of the struck head's diameter. A head made with a ``film`` name takes the film's modulus,
Poisson ratio and strength where none is given (so the tuning can check its stress).

The practical ranges of :mod:`membrane.ranges` are checked where values come in from people:
the drum file (:mod:`membrane.drumfile`, whose :func:`~membrane.drumfile.load_drum` and
friends are still importable from here) and the command line.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from . import materials
from . import ranges as R
from .errors import InputError
from .losses import Losses
from .notation import EDGES, POISSON_RATIO

BODY_KINDS = ("none", "kettle", "shell")

# Gas constants for dry air: R = 287.058 J/(kg K), gamma = 1.4 (docs/physics.md, "Air").
R_DRY_AIR = 287.058
GAMMA_AIR = 1.4
# First zero of J_1 (Abramowitz & Stegun Table 9.5), for the slack limit of the (1,1) mode.
J11 = 3.8317059702075125


def _require(obj, name: str, *, optional: bool = False) -> None:
    """Invariant of a drum dataclass: the field is a finite number > 0 (SI), or None if optional.

    Only what every drum must satisfy to be one. The practical ranges (membrane.ranges)
    are checked where values come in from people (the drum file, the command line);
    the library also accepts modelling limits outside them (air with rho -> 0 and
    c -> infinity at fixed rho c^2, say).
    """
    value = getattr(obj, name)
    if value is None and optional:
        return
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not (math.isfinite(value) and value > 0):
        raise InputError(f"{type(obj).__name__}.{name}", value, "must be a finite number > 0 (SI units)")


def check_plies(value, *, key: str = "Head.plies") -> int:
    """The number of plies, a whole number from 1 to 4, or InputError naming ``key``."""
    if isinstance(value, bool) or not isinstance(value, int) or not 1 <= value <= 4:
        raise InputError(key, value, "must be a whole number from 1 to 4")
    return value


@dataclass(frozen=True)
class Head:
    """One drumhead, SI units.

    Attributes
    ----------
    radius : float
        Radius of the vibrating area in m.
    tension : float
        Membrane tension per unit length in N/m.
    areal_density : float
        Mass per unit area in kg/m^2 (all plies).
    thickness : float or None
        Thickness of one ply in m, if known.
    plies : int
        Number of plies. Plies are taken as free to slide on each other, so their
        bending stiffnesses add (a bonded laminate would be stiffer).
    youngs_modulus : float or None
        E in Pa, if known; without it the head has no bending stiffness. With ``film`` and
        none given, the film's.
    poisson_ratio : float or None
        nu (dimensionless); None: the film's, else :data:`membrane.notation.POISSON_RATIO`.
    edge : {"clamped", "hinged"}
        How the rim holds the head (matters only with bending stiffness).
    film : str or None
        Film name from the materials data, if any.
    yield_stress, tensile_strength : float or None
        The film's strength in Pa, for the tuning cautions; with ``film`` and none given, the
        film's (none for natural skins).

    Examples
    --------
    >>> Head(radius=0.33, tension=3000.0, areal_density=0.26, film="polyester", thickness=188e-6).yield_stress
    100000000.0
    """

    radius: float
    tension: float
    areal_density: float
    thickness: float | None = None
    plies: int = 1
    youngs_modulus: float | None = None
    poisson_ratio: float | None = None
    edge: str = "clamped"
    film: str | None = None
    yield_stress: float | None = None
    tensile_strength: float | None = None

    def __post_init__(self) -> None:
        # The library is protected too, not only the drum file: no NaN, infinity, zero or
        # negative size reaches a solver (the practical ranges are the drum file's job).
        for name in ("radius", "tension", "areal_density"):
            _require(self, name)
        if self.film is not None:  # the film's data fill what is not given (frozen: set once here)
            film = materials.film(self.film, key="Head.film")
            for name in ("youngs_modulus", "poisson_ratio", "yield_stress", "tensile_strength"):
                if getattr(self, name) is None:
                    object.__setattr__(self, name, getattr(film, name))
        for name in ("thickness", "youngs_modulus", "yield_stress", "tensile_strength"):
            _require(self, name, optional=True)
        check_plies(self.plies)
        nu = POISSON_RATIO if self.poisson_ratio is None else self.poisson_ratio
        object.__setattr__(self, "poisson_ratio", R.POISSON_RATIO.check(nu, key="Head.poisson_ratio"))  # 0 <= nu < 0.5
        if self.edge not in EDGES:
            raise InputError("Head.edge", self.edge, f"must be one of: {', '.join(EDGES)}")

    def vibrates_like(self, other: "Head") -> bool:
        """Whether ``other`` has exactly this head's modes in vacuum: the same radius, tension,
        areal density, Poisson ratio, edge and bending stiffness (film and strength aside)."""
        keys = ("radius", "tension", "areal_density", "poisson_ratio", "edge", "bending_stiffness")
        return all(getattr(self, k) == getattr(other, k) for k in keys)

    @property
    def diameter(self) -> float:
        """Diameter in m."""
        return 2.0 * self.radius

    @property
    def bending_stiffness(self) -> float:
        """D = plies * E h^3 / (12 (1 - nu^2)) in N m; 0 when E or h is unknown."""
        if self.youngs_modulus is None or self.thickness is None:
            return 0.0
        h = self.thickness
        return self.plies * self.youngs_modulus * h**3 / (12.0 * (1.0 - self.poisson_ratio**2))

    @property
    def slack_tension(self) -> float:
        r"""Tension below which bending stiffness, not tension, sets the (1,1) frequency (N/m).

        In the stiff-membrane equation (docs/physics.md, "The stiff membrane") a mode of wavenumber k is held by
        :math:`T k^2` from tension and :math:`D k^4` from bending; they are equal for the
        (1,1) mode at :math:`T = D (j_{11}/a)^2`. Below it a tension change barely moves
        the pitch and the head is slack for tuning purposes. A head without bending
        stiffness (no modulus or thickness given) has no such limit (0).
        """
        k11 = J11 / self.radius
        return self.bending_stiffness * k11 * k11

    @property
    def stress(self) -> float | None:
        """In-plane film stress T / (plies h) in Pa, or None without a thickness."""
        if self.thickness is None:
            return None
        return self.tension / (self.plies * self.thickness)

    @property
    def wave_speed(self) -> float:
        """Transverse wave speed sqrt(T / sigma) of the ideal membrane, m/s."""
        return math.sqrt(self.tension / self.areal_density)


# the longest air column V / (pi a^2) a kettle may hold, in head diameters (Drum.__post_init__)
KETTLE_COLUMN = 8.0


@dataclass(frozen=True)
class Body:
    """What is under the head.

    Attributes
    ----------
    kind : {"none", "kettle", "shell"}
        ``none``: air on both faces; ``kettle``: a closed bowl under the head;
        ``shell``: an open cylinder with a second (resonant) head at the far end.
    volume : float
        Kettle volume in m^3 (a kettle only, and every kettle).
    depth : float
        Shell depth in m (a shell only, and every shell).
    """

    kind: str = "none"
    volume: float | None = None
    depth: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in BODY_KINDS:
            raise InputError("Body.kind", self.kind, f"must be one of: {', '.join(BODY_KINDS)}")
        _require(self, "volume", optional=True)
        _require(self, "depth", optional=True)
        if self.kind == "kettle" and self.volume is None:
            raise InputError("Body.volume", None, "missing: a kettle needs its volume, e.g. \"0.17 m^3\"")
        if self.kind == "shell" and self.depth is None:
            raise InputError("Body.depth", None, "missing: a shell needs its depth, e.g. \"14 in\"")
        if self.kind != "kettle" and self.volume is not None:
            raise InputError("Body.volume", self.volume, f"only a kettle has a volume (body.kind is {self.kind!r})")
        if self.kind != "shell" and self.depth is not None:
            raise InputError("Body.depth", self.depth, f"only a shell has a depth (body.kind is {self.kind!r})")


@dataclass(frozen=True)
class Air:
    """Air properties, SI.

    Attributes
    ----------
    density : float
        kg/m^3.
    sound_speed : float
        m/s.
    """

    density: float = 1.2041
    sound_speed: float = 343.24

    def __post_init__(self) -> None:
        _require(self, "density")
        _require(self, "sound_speed")

    @classmethod
    def from_conditions(cls, *, temperature: float = 293.15, pressure: float = 101325.0) -> "Air":
        """Dry air as an ideal gas.

        Parameters
        ----------
        temperature : float
            Absolute temperature in K.
        pressure : float
            Static pressure in Pa.

        Notes
        -----
        rho = P / (R T), c = sqrt(gamma R T) with R = 287.058 J/(kg K) and gamma = 1.4:
        343.24 m/s and 1.2041 kg/m^3 at 20 degC and 101.325 kPa (docs/references.md, "Air and pitch"). Humidity
        is neglected (it raises c by well under 1 % at room temperature).
        """
        for key, value in (("temperature", temperature), ("pressure", pressure)):
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not (
                    math.isfinite(value) and value > 0):
                raise InputError(key, value, "must be a finite number > 0 (K, Pa)")
        return cls(density=pressure / (R_DRY_AIR * temperature),
                   sound_speed=math.sqrt(GAMMA_AIR * R_DRY_AIR * temperature))

    @property
    def bulk_modulus(self) -> float:
        """Adiabatic bulk modulus rho c^2 in Pa."""
        return self.density * self.sound_speed**2


@dataclass(frozen=True)
class Lugs:
    """What is known of the tension lugs: tap pitches near each, and/or their tensions.

    Attributes
    ----------
    pitches : tuple of float or None
        Tap pitch near each lug in Hz, in order around the rim.
    cents_per_turn : float or None
        Measured pitch change for one full turn of a lug's rod, in cents.
    tensions : tuple of float or None
        Tension at each lug in N/m, in order around the rim (equally spaced lugs).
    """

    pitches: tuple[float, ...] | None = None
    cents_per_turn: float | None = None
    tensions: tuple[float, ...] | None = None

    @property
    def count(self) -> int:
        """Number of lugs."""
        return len(self.pitches if self.pitches is not None else self.tensions)


@dataclass(frozen=True)
class Drum:
    """A whole drum: the struck head, what is under it, and the air.

    Attributes
    ----------
    head : Head
        The struck head.
    body : Body
        Kettle, shell, or nothing.
    air : Air
        Air on both sides and inside.
    resonant_head : Head or None
        The far head of a shell.
    lugs : Lugs or None
        Tap pitches at the lugs, if measured.
    losses : Losses
        Loss parameters besides radiation (the drum file's ``[losses]``; defaults if absent).
    name, description : str
        Words for people.
    """

    head: Head
    body: Body = field(default_factory=Body)
    air: Air = field(default_factory=Air)
    resonant_head: Head | None = None
    lugs: Lugs | None = None
    losses: Losses = field(default_factory=Losses)
    name: str = "drum"
    description: str = ""

    def __post_init__(self) -> None:
        for name, kind in (("head", Head), ("body", Body), ("air", Air)):
            if not isinstance(getattr(self, name), kind):
                raise InputError(f"Drum.{name}", getattr(self, name), f"must be a membrane.{kind.__name__}")
        res = self.resonant_head
        if res is not None and self.body.kind != "shell":
            raise InputError("Drum.resonant_head", "...",
                             f"only a shell has a resonant head (body.kind is {self.body.kind!r})")
        if self.body.kind == "shell":
            if res is None:
                raise InputError("Drum.resonant_head", None, "missing: a shell needs a [resonant_head] table")
            if not isinstance(res, Head):
                raise InputError("Drum.resonant_head", res, "must be a membrane.Head")
            if abs(res.radius - self.head.radius) > 1e-9 * self.head.radius:
                raise InputError("Drum.resonant_head.diameter", 2 * res.radius,
                                 f"must equal the struck head's diameter {2 * self.head.radius:g} m for a shell")
        if self.body.kind == "kettle":
            # the model's kettle is a cylinder of the head's area holding the bowl's volume;
            # real bowls hold an air column V / (pi a^2) of about 0.2-1.5 head diameters (a
            # hemisphere 1/3, from memory). Far beyond that it is a pipe, whose ladder of air
            # resonances (c / 2L apart) packs hundreds of roots below the head modes: the sweep
            # of generated drums (benchmarks/sweep_drums.py) failed only above 11 diameters.
            # (No lower bound: a shallow bowl is a stiff air spring, a limit the tests take the
            # solver to, Raichel's lumped kettle.)
            ratio = self.air_depth / (2.0 * self.head.radius)
            if ratio > KETTLE_COLUMN:
                raise InputError("body.volume", f"{self.body.volume:.4g} m^3",
                                 f"its air column V / (pi a^2) is {ratio:.3g} head diameters, a pipe "
                                 f"rather than a kettle; at most {KETTLE_COLUMN:g} diameters "
                                 f"({KETTLE_COLUMN * 2 * math.pi * self.head.radius ** 3:.3g} m^3 "
                                 f"under this {2 * self.head.radius:.3g} m head)")

    @property
    def air_depth(self) -> float | None:
        """Length of the body's air column in m: the shell's depth, or V / (pi a^2) for a kettle.

        The kettle is modelled as the cylinder of the head's area holding the bowl's volume
        (docs/physics.md, "The body"); None without a body.
        """
        if self.body.kind == "kettle":
            return self.body.volume / (math.pi * self.head.radius ** 2)
        return self.body.depth

    def with_tension(self, tension: float) -> "Drum":
        """The same drum with the struck head at another tension (N/m)."""
        return replace(self, head=replace(self.head, tension=float(tension)))




# The drum file's names, at their old address (they live in membrane.drumfile). Resolved on
# first use, so the file layer (pint, TOML) loads only when a drum file is read.
_FILE_NAMES = {"load_drum", "parse_drum", "override_table", "read_drum_table", "builtin_names",
               "builtin_text", "MAX_FILE_BYTES"}


def __getattr__(name):
    if name in _FILE_NAMES:
        from . import drumfile

        return getattr(drumfile, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
