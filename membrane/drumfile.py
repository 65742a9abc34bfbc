"""The drum file (TOML): its schema, the built-in examples, and command-line values laid over it.

Values with units are accepted only here, at the edge: every one is converted to SI and checked
against its practical range (:mod:`membrane.ranges`), and an error names the file's key. What
every drum must satisfy to be one (sizes finite and positive, a kettle has a volume, a shell a
depth and a resonant head of the same diameter) the dataclasses of :mod:`membrane.drum` check
themselves; their errors are named here by the file's key (``body.volume``, not ``Body.volume``).
The format is described in docs/drum-file.md.
"""

from __future__ import annotations

import tomllib
from importlib import resources
from pathlib import Path

from . import materials
from . import ranges as R
from .drum import Air, Body, Drum, Head, Lugs, check_plies
from .errors import InputError
from .losses import Losses, parse_losses
from .nesting import check_nesting
from .units import parse_pitch, to_si

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


def _built(cls, where: str, **fields):
    """``cls(**fields)``, with an invariant's error named by the file's key (``Body.x`` -> ``body.x``)."""
    try:
        return cls(**fields)
    except InputError as exc:
        prefix = cls.__name__ + "."
        if not exc.key.startswith(prefix):
            raise
        rest = exc.key[len(prefix):]
        raise InputError(f"{where}.{rest}" if where else rest, exc.value, exc.allowed) from None


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
    plies = check_plies(table.get("plies", 1), key=f"{where}.plies")  # before it multiplies anything

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
    # the film's modulus, Poisson ratio and strength fill in what the file leaves out (Head does it)
    head = _built(Head, where, radius=radius, tension=tension, areal_density=areal, thickness=thickness,
                  plies=plies, youngs_modulus=_ranged(table, "youngs_modulus", "pressure", where, R.YOUNGS_MODULUS),
                  poisson_ratio=table.get("poisson_ratio"), edge=table.get("edge", "clamped"),
                  film=film.name if film else None,
                  yield_stress=_ranged(table, "yield_stress", "pressure", where, R.STRENGTH),
                  tensile_strength=_ranged(table, "tensile_strength", "pressure", where, R.STRENGTH))
    slack = head.slack_tension
    if tension < slack:
        raise InputError(f"{where}.tension", table["tension"],
                         f"must be at least this head's slack limit, {slack:.4g} N/m (below it bending "
                         f"stiffness, not tension, sets the pitch), and at most {R.TENSION.hi:g} N/m")
    return head


def _parse_body(table: dict) -> Body:
    _check_keys(table, _BODY_KEYS, "body")
    return _built(Body, "body", kind=table.get("kind", "none"),
                  volume=_ranged(table, "volume", "volume", "body", R.VOLUME),
                  depth=_ranged(table, "depth", "length", "body", R.DEPTH))


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
    if "resonant_head" in table:  # Drum says whether this body may have one
        resonant = _parse_head(table["resonant_head"], "resonant_head")
    air = _parse_air(table.get("air", {}))
    lugs = _parse_lugs(table["lugs"]) if "lugs" in table else None
    for key in ("name", "description"):
        if key in table and not isinstance(table[key], str):
            raise InputError(key, table[key], "must be text")
    losses = parse_losses(table["losses"]) if "losses" in table else Losses()
    return _built(Drum, "", head=head, body=body, air=air, resonant_head=resonant, lugs=lugs, losses=losses,
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
