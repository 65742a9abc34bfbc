"""Head films and skins: density, elastic constants, strength, from a data file with sources.

The data live in ``membrane/data/films.toml``; every number there has an entry of the
same name in the film's ``source`` table (a publication, or "from memory" / "common
practice"). Natural skins change with humidity (their ``humidity_note`` says so) and
have no known yield or breaking stress (their ``strength_note`` says so), in which
case the tuning cautions make no stress check.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from .errors import InputError

# Keys whose values are numbers and so need a source (tests/test_materials.py checks).
NUMBER_KEYS = ("density", "youngs_modulus", "poisson_ratio", "yield_stress", "tensile_strength",
               "thickness_range", "usual_thicknesses", "usual_plies")


@dataclass(frozen=True)
class Film:
    """A head material's data, all SI.

    Attributes
    ----------
    name : str
        Key in the data file.
    density : float
        Volume density in kg/m^3.
    youngs_modulus : float
        E in Pa.
    poisson_ratio : float
        nu, dimensionless.
    yield_stress : float or None
        Stress at which the film stops behaving elastically in practice, Pa; None
        where none is known (``strength_note`` says so).
    tensile_strength : float or None
        Stress at break, Pa; None where none is known.
    description : str
        Words for people.
    sources : tuple of str
        Where each number came from (``"key: source"``).
    thickness_range : tuple of float or None
        Thinnest and thickest ply in heads of this material, m.
    usual_thicknesses : tuple of float
        Ply thicknesses heads are commonly made in, m.
    usual_plies : tuple of int
        Ply counts heads are commonly made with.
    strength_note : str
        Plain words on what strength data exist (empty when yield and break are known).
    humidity_note : str
        For natural skins: how humidity changes them (empty for plastic films).
    """

    name: str
    density: float
    youngs_modulus: float
    poisson_ratio: float
    yield_stress: float | None
    tensile_strength: float | None
    description: str = ""
    sources: tuple[str, ...] = ()
    thickness_range: tuple[float, float] | None = None
    usual_thicknesses: tuple[float, ...] = ()
    usual_plies: tuple[int, ...] = (1,)
    strength_note: str = ""
    humidity_note: str = ""

    @property
    def caution_stress(self) -> float | None:
        """The stress the tuning caution is measured against, Pa (yield, else break)."""
        return self.yield_stress if self.yield_stress is not None else self.tensile_strength


def _optional(entry: dict, key: str) -> float | None:
    return float(entry[key]) if key in entry else None


@lru_cache(maxsize=1)
def raw_table() -> dict:
    """The data file as read (values and their ``source`` tables)."""
    text = resources.files("membrane").joinpath("data/films.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


@lru_cache(maxsize=1)
def films() -> dict[str, Film]:
    """All films in the data file, keyed by name and by alias (lower case)."""
    table = {}
    for name, entry in raw_table().items():
        source = entry.get("source", {})
        span = entry.get("thickness_range")
        film = Film(
            name=name,
            density=float(entry["density"]),
            youngs_modulus=float(entry["youngs_modulus"]),
            poisson_ratio=float(entry["poisson_ratio"]),
            yield_stress=_optional(entry, "yield_stress"),
            tensile_strength=_optional(entry, "tensile_strength"),
            description=entry.get("description", ""),
            sources=tuple(f"{key}: {source[key]}" for key in NUMBER_KEYS if key in source),
            thickness_range=None if span is None else (float(span[0]), float(span[1])),
            usual_thicknesses=tuple(float(h) for h in entry.get("usual_thicknesses", ())),
            usual_plies=tuple(int(p) for p in entry.get("usual_plies", (1,))),
            strength_note=entry.get("strength_note", ""),
            humidity_note=entry.get("humidity_note", ""),
        )
        for key in [name, *entry.get("aliases", [])]:
            table[key.lower()] = film
    return table


def film_names() -> list[str]:
    """The films' own names (no aliases), in the data file's order."""
    return list(raw_table())


def film(name: str, *, key: str = "film") -> Film:
    """Look a film up by name or alias (case-insensitive)."""
    table = films()
    try:
        return table[str(name).strip().lower()]
    except KeyError:
        raise InputError(key, name, f"unknown film; known films: {', '.join(film_names())} "
                         "(or give areal_density, or density with thickness, for a custom film)") from None
