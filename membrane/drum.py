"""The drum: frozen dataclasses for head, body and air, and the drum file (TOML).

Values inside are plain SI floats. Text with units is accepted only at the edge,
by :func:`parse_drum`, which also checks every value against a physically
sensible range and names the key when one is wrong.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field, replace
from importlib import resources
from pathlib import Path

from . import materials
from . import ranges as R
from .errors import InputError
from .losses import Losses, parse_losses
from .nesting import check_nesting
from .notation import EDGES, POISSON_RATIO
from .units import parse_pitch, to_si

BODY_KINDS = ("none", "kettle", "shell")

# Gas constants for dry air: R = 287.058 J/(kg K), gamma = 1.4 (SOURCES.md, "Air and pitch").
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
        E in Pa, if known; without it the head has no bending stiffness.
    poisson_ratio : float
        nu (dimensionless).
    edge : {"clamped", "hinged"}
        How the rim holds the head (matters only with bending stiffness).
    film : str or None
        Film name from the materials data, if any.
    yield_stress, tensile_strength : float or None
        The film's strength in Pa, for the tuning cautions.
    """

    radius: float
    tension: float
    areal_density: float
    thickness: float | None = None
    plies: int = 1
    youngs_modulus: float | None = None
    poisson_ratio: float = POISSON_RATIO
    edge: str = "clamped"
    film: str | None = None
    yield_stress: float | None = None
    tensile_strength: float | None = None

    def __post_init__(self) -> None:
        # The library is protected too, not only the drum file: no NaN, infinity, zero or
        # negative size reaches a solver (the practical ranges are the drum file's job).
        for name in ("radius", "tension", "areal_density"):
            _require(self, name)
        for name in ("thickness", "youngs_modulus", "yield_stress", "tensile_strength"):
            _require(self, name, optional=True)
        if isinstance(self.plies, bool) or not isinstance(self.plies, int) or not 1 <= self.plies <= 4:
            raise InputError("Head.plies", self.plies, "must be a whole number from 1 to 4")
        R.POISSON_RATIO.check(self.poisson_ratio, key="Head.poisson_ratio")  # 0 <= nu < 0.5
        if self.edge not in EDGES:
            raise InputError("Head.edge", self.edge, f"must be one of: {', '.join(EDGES)}")

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

        In the stiff-membrane equation (DESIGN.md 3.2) a mode of wavenumber k is held by
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


@dataclass(frozen=True)
class Body:
    """What is under the head.

    Attributes
    ----------
    kind : {"none", "kettle", "shell"}
        ``none``: air on both faces; ``kettle``: a closed bowl under the head;
        ``shell``: an open cylinder with a second (resonant) head at the far end.
    volume : float or None
        Kettle volume in m^3.
    depth : float or None
        Shell depth in m.
    """

    kind: str = "none"
    volume: float | None = None
    depth: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in BODY_KINDS:
            raise InputError("Body.kind", self.kind, f"must be one of: {', '.join(BODY_KINDS)}")
        _require(self, "volume", optional=True)
        _require(self, "depth", optional=True)


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
        343.24 m/s and 1.2041 kg/m^3 at 20 degC and 101.325 kPa (SOURCES.md). Humidity
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

    def with_tension(self, tension: float) -> "Drum":
        """The same drum with the struck head at another tension (N/m)."""
        return replace(self, head=replace(self.head, tension=float(tension)))


# ------------------------------------------------------------------ the drum file
_HEAD_KEYS = {"diameter", "radius", "film", "thickness", "plies", "density", "areal_density",
              "youngs_modulus", "poisson_ratio", "tension", "edge", "yield_stress",
              "tensile_strength"}
_BODY_KEYS = {"kind", "volume", "depth"}
_AIR_KEYS = {"temperature", "pressure", "density", "sound_speed"}
_LUG_KEYS = {"pitches", "cents_per_turn", "tensions"}
_TOP_KEYS = {"name", "description", "head", "body", "resonant_head", "air", "lugs", "losses"}


def _ranged(table: dict, key: str, kind: str, where: str, rng: R.Range) -> float | None:
    """The value at ``key`` in SI units, checked against its practical range; None if absent."""
    if key not in table:
        return None
    name = f"{where}.{key}"
    return rng.check(to_si(table[key], kind, key=name), key=name, given=table[key])


def _check_keys(table, allowed: set[str], where: str) -> None:
    if not isinstance(table, dict):
        raise InputError(where, table, "must be a table")
    for key in table:
        if key not in allowed:
            raise InputError(f"{where}.{key}" if where else key, table[key],
                             f"unknown key; allowed keys here: {', '.join(sorted(allowed))}")


def _parse_head(table: dict, where: str) -> Head:
    _check_keys(table, _HEAD_KEYS, where)
    if "diameter" in table and "radius" in table:
        raise InputError(f"{where}.radius", table["radius"], "give diameter or radius, not both")
    diameter = _ranged(table, "diameter", "length", where, R.DIAMETER)
    radius = _ranged(table, "radius", "length", where, R.RADIUS)
    if diameter is None and radius is None:
        raise InputError(f"{where}.diameter", None, "missing: give diameter (or radius), e.g. \"26 in\"")
    radius = radius if radius is not None else diameter / 2
    tension = _ranged(table, "tension", "tension", where, R.TENSION)
    if tension is None:
        raise InputError(f"{where}.tension", None, "missing: give tension per unit length, e.g. \"4000 N/m\"")
    plies = table.get("plies", 1)
    if isinstance(plies, bool) or not isinstance(plies, int) or not 1 <= plies <= 4:
        raise InputError(f"{where}.plies", plies, "must be a whole number from 1 to 4")
    edge = table.get("edge", "clamped")
    if edge not in EDGES:
        raise InputError(f"{where}.edge", edge, f"must be one of: {', '.join(EDGES)}")

    film = materials.film(table["film"], key=f"{where}.film") if "film" in table else None
    thickness = _ranged(table, "thickness", "length", where, R.THICKNESS)
    density = _ranged(table, "density", "density", where, R.DENSITY)
    areal = _ranged(table, "areal_density", "areal_density", where, R.AREAL_DENSITY)
    if areal is None:
        rho = density if density is not None else (film.density if film else None)
        if rho is None or thickness is None:
            raise InputError(f"{where}.areal_density", None,
                             "missing: give areal_density, or film (or density) with thickness")
        areal = rho * thickness * plies
        if not R.AREAL_DENSITY.contains(areal):
            raise InputError(f"{where}.areal_density", f"{areal:.4g} kg/m^2",
                             f"(density x thickness x plies) {R.AREAL_DENSITY.text()}")
    modulus = _ranged(table, "youngs_modulus", "pressure", where, R.YOUNGS_MODULUS)
    if modulus is None and film is not None:
        modulus = film.youngs_modulus
    nu = table.get("poisson_ratio", film.poisson_ratio if film else POISSON_RATIO)
    if isinstance(nu, bool) or not R.POISSON_RATIO.contains(nu):
        raise InputError(f"{where}.poisson_ratio", nu, R.POISSON_RATIO.text())
    yield_stress = _ranged(table, "yield_stress", "pressure", where, R.STRENGTH)
    strength = _ranged(table, "tensile_strength", "pressure", where, R.STRENGTH)
    head = Head(
        radius=radius, tension=tension, areal_density=areal, thickness=thickness, plies=plies,
        youngs_modulus=modulus, poisson_ratio=float(nu), edge=edge,
        film=film.name if film else None,
        yield_stress=yield_stress if yield_stress is not None else (film.yield_stress if film else None),
        tensile_strength=strength if strength is not None else (film.tensile_strength if film else None),
    )
    slack = head.slack_tension
    if tension < slack:
        raise InputError(f"{where}.tension", table["tension"],
                         f"must be at least this head's slack limit, {slack:.4g} N/m (below it bending "
                         f"stiffness, not tension, sets the pitch), and at most {R.TENSION.hi:g} N/m")
    return head


def _parse_body(table: dict) -> Body:
    _check_keys(table, _BODY_KEYS, "body")
    kind = table.get("kind", "none")
    if kind not in BODY_KINDS:
        raise InputError("body.kind", kind, f"must be one of: {', '.join(BODY_KINDS)}")
    volume = _ranged(table, "volume", "volume", "body", R.VOLUME)
    depth = _ranged(table, "depth", "length", "body", R.DEPTH)
    if kind == "kettle" and volume is None:
        raise InputError("body.volume", None, "missing: a kettle needs its volume, e.g. \"0.17 m^3\"")
    if kind == "shell" and depth is None:
        raise InputError("body.depth", None, "missing: a shell needs its depth, e.g. \"14 in\"")
    if kind != "kettle" and volume is not None:
        raise InputError("body.volume", table["volume"], f"only a kettle has a volume (body.kind is {kind!r})")
    if kind != "shell" and depth is not None:
        raise InputError("body.depth", table["depth"], f"only a shell has a depth (body.kind is {kind!r})")
    return Body(kind=kind, volume=volume, depth=depth)


def _parse_air(table: dict) -> Air:
    _check_keys(table, _AIR_KEYS, "air")
    direct = {"density", "sound_speed"} & table.keys()
    if direct and ({"temperature", "pressure"} & table.keys()):
        raise InputError("air", table, "give temperature (and pressure), or density and sound_speed, not both")
    if direct:
        if direct != {"density", "sound_speed"}:
            raise InputError("air", table, "give both density and sound_speed")
        return Air(density=_ranged(table, "density", "density", "air", R.AIR_DENSITY),
                   sound_speed=_ranged(table, "sound_speed", "speed", "air", R.SOUND_SPEED))
    temperature = to_si(table.get("temperature", 293.15), "temperature", key="air.temperature")
    R.TEMPERATURE.check(temperature, key="air.temperature", given=table.get("temperature"))
    pressure = _ranged(table, "pressure", "pressure", "air", R.PRESSURE)
    return Air.from_conditions(temperature=temperature, pressure=pressure or 101325.0)


def _parse_lugs(table: dict) -> Lugs:
    _check_keys(table, _LUG_KEYS, "lugs")
    if "pitches" not in table and "tensions" not in table:
        raise InputError("lugs", sorted(table), "give pitches (tap pitch near each lug) and/or tensions")
    hz = None
    if "pitches" in table:
        pitches = table["pitches"]
        if not isinstance(pitches, list) or len(pitches) < 3:
            raise InputError("lugs.pitches", pitches, "must be a list of at least 3 tap pitches, one per lug")
        hz = tuple(parse_pitch(p, key=f"lugs.pitches[{i}]") for i, p in enumerate(pitches))
    tensions = None
    if "tensions" in table:
        values = table["tensions"]
        if not isinstance(values, list) or len(values) < 3:
            raise InputError("lugs.tensions", values, "must be a list of at least 3 tensions, one per lug")
        tensions = tuple(to_si(v, "tension", key=f"lugs.tensions[{i}]") for i, v in enumerate(values))
        for i, (v, t) in enumerate(zip(values, tensions)):
            R.TENSION.check(t, key=f"lugs.tensions[{i}]", given=v)
        if hz is not None and len(hz) != len(tensions):
            raise InputError("lugs.tensions", values, f"must have one tension per lug ({len(hz)} pitches given)")
    per_turn = table.get("cents_per_turn")
    if per_turn is not None and (isinstance(per_turn, bool) or not R.CENTS_PER_TURN.contains(per_turn)):
        raise InputError("lugs.cents_per_turn", per_turn, R.CENTS_PER_TURN.text())
    return Lugs(pitches=hz, cents_per_turn=None if per_turn is None else float(per_turn), tensions=tensions)


def parse_drum(table: dict) -> Drum:
    """Build a validated :class:`Drum` from a drum-file table (as read from TOML).

    Raises
    ------
    InputError
        Naming the key, the value and what is allowed, for the first problem found.
    """
    _check_keys(table, _TOP_KEYS, "")
    if "head" not in table:
        raise InputError("head", None, "missing: a drum file needs a [head] table")
    head = _parse_head(table["head"], "head")
    body = _parse_body(table.get("body", {}))
    resonant = None
    if "resonant_head" in table:
        if body.kind != "shell":
            raise InputError("resonant_head", "...", f"only a shell has a resonant head (body.kind is {body.kind!r})")
        resonant = _parse_head(table["resonant_head"], "resonant_head")
    elif body.kind == "shell":
        raise InputError("resonant_head", None, "missing: a shell needs a [resonant_head] table")
    air = _parse_air(table.get("air", {}))
    lugs = _parse_lugs(table["lugs"]) if "lugs" in table else None
    for key in ("name", "description"):
        if key in table and not isinstance(table[key], str):
            raise InputError(key, table[key], "must be text")
    losses = parse_losses(table["losses"]) if "losses" in table else Losses()
    return Drum(head=head, body=body, air=air, resonant_head=resonant, lugs=lugs, losses=losses,
                name=table.get("name", "drum"), description=table.get("description", ""))


# ------------------------------------------------------------------ files and examples
def builtin_names() -> list[str]:
    """Names of the built-in example drums (invented demo data)."""
    folder = resources.files("membrane").joinpath("data/examples")
    return sorted(p.name.removesuffix(".toml") for p in folder.iterdir() if p.name.endswith(".toml"))


def builtin_text(name: str) -> str:
    """The drum-file text of a built-in example."""
    if name not in builtin_names():
        raise InputError("example", name, f"unknown example; built-in examples: {', '.join(builtin_names())}")
    return resources.files("membrane").joinpath(f"data/examples/{name}.toml").read_text(encoding="utf-8")


MAX_FILE_BYTES = 1_000_000  # a drum file is a few hundred bytes; common practice, no source


def read_drum_table(source: str | Path) -> dict:
    """The raw table of a drum file, or of a built-in example given by name.

    A path that exists is read as a file; otherwise a built-in example's name
    (``kettledrum``, ``snare``) selects that example.
    """
    path = Path(source)
    if path.is_file():
        try:
            if path.stat().st_size > MAX_FILE_BYTES:
                raise InputError("drum file", str(source), f"is larger than {MAX_FILE_BYTES // 1000} kB; "
                                 "a drum file is a few hundred bytes of text")
            text = path.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError) as exc:
            raise InputError("drum file", str(source), f"cannot be read as UTF-8 text ({exc.__class__.__name__})") from None
    elif str(source) in builtin_names():
        text = builtin_text(str(source))
    else:
        raise InputError("drum file", str(source),
                         f"no such file, and not a built-in example ({', '.join(builtin_names())})")
    check_nesting(text, key="drum file", source=str(source))
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError("drum file", str(source), f"is not valid TOML: {exc}") from None
    except RecursionError:  # the scan above should have refused it; never a traceback
        raise InputError("drum file", str(source), "nests too deeply to read") from None


def load_drum(source: str | Path, **overrides) -> Drum:
    """Load a drum file (or built-in example) and apply overrides.

    Parameters
    ----------
    source : str or Path
        A drum file, or the name of a built-in example.
    **overrides
        Values as :func:`override_table` takes them (text with units or SI numbers).
    """
    return parse_drum(override_table(read_drum_table(source), **overrides))


def override_table(table: dict | None, *, diameter=None, radius=None, tension=None,
                   areal_density=None, film=None, thickness=None, body=None, volume=None,
                   depth=None, keys: dict | None = None) -> dict:
    """A copy of a drum-file table with command-line values laid over it.

    A new diameter replaces the file's radius and vice versa; a new film or thickness
    replaces the file's areal density; a new body kind drops the old kind's size.
    With ``body="shell"`` and no resonant head, the struck head is used for both.
    ``keys`` maps (table, key), e.g. ``("resonant_head", "tension")``, to a value laid
    over that key after the rest (see :func:`_lay_keys` for what each one replaces).
    """
    # Copy only the levels changed here (a deep copy would recurse through whatever the
    # file holds); parse_drum refuses anything that is not a table where one belongs.
    table = dict(table) if table else {}
    for part, value in table.items():
        if isinstance(value, dict):
            table[part] = dict(value)
    for part in ("head", "body", "resonant_head"):
        if part in table and not isinstance(table[part], dict):
            raise InputError(part, table[part], "must be a table")
    head = table.setdefault("head", {})
    # a shell's two heads share one diameter, so a new size applies to both
    sized = [head] + ([table["resonant_head"]] if isinstance(table.get("resonant_head"), dict) else [])
    for part in sized:
        if diameter is not None:
            part.pop("radius", None)
            part["diameter"] = diameter
        if radius is not None:
            part.pop("diameter", None)
            part["radius"] = radius
    if tension is not None:
        head["tension"] = tension
    if film is not None or thickness is not None:
        head.pop("areal_density", None)
        if film is not None:
            head["film"] = film
            head.pop("density", None)
        if thickness is not None:
            head["thickness"] = thickness
    if areal_density is not None:
        head["areal_density"] = areal_density
    bod = table.setdefault("body", {})
    if body is not None and body != bod.get("kind", "none"):
        bod.clear()
        bod["kind"] = body
        if body != "shell":
            table.pop("resonant_head", None)
        elif "resonant_head" not in table:
            table["resonant_head"] = dict(head)
    if volume is not None:
        bod["volume"] = volume
    if depth is not None:
        bod["depth"] = depth
    if keys:
        _lay_keys(table, keys)
    return table


# What a key laid over a file replaces there, so the file and the flags never disagree:
# a film, thickness or density replaces an areal density (and a film a custom density);
# air given by temperature and pressure replaces air given by density and sound speed.
_HEAD_REPLACES = {"film": ("areal_density", "density"), "thickness": ("areal_density",),
                  "density": ("areal_density",)}
_AIR_REPLACES = {"temperature": ("density", "sound_speed"), "pressure": ("density", "sound_speed"),
                 "density": ("temperature", "pressure"), "sound_speed": ("temperature", "pressure")}


def _lay_keys(table: dict, keys: dict) -> None:
    """Lay (table, key) -> value pairs over a drum-file table, in place."""
    for (where, key), value in keys.items():
        if where == "resonant_head" and "resonant_head" not in table:
            # a resonant head described by flags alone starts as a copy of the struck head
            table["resonant_head"] = dict(table.get("head", {}))
        part = table.setdefault(where, {})
        if not isinstance(part, dict):
            raise InputError(where, part, "must be a table")
        for old in (_AIR_REPLACES if where == "air" else _HEAD_REPLACES).get(key, ()):
            part.pop(old, None)
        part[key] = value
