"""Head films: density, elastic constants and strength, from a data file with sources.

The data live in ``membrane/data/films.toml``; each entry names its sources, and
values recalled without a source at hand are marked there as such.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from .errors import InputError


@dataclass(frozen=True)
class Film:
    """A head film's material data, all SI.

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
    yield_stress : float
        Stress at which the film stops behaving elastically in practice, Pa.
    tensile_strength : float
        Stress at break, Pa.
    description : str
        Words for people.
    sources : tuple of str
        Where each number came from.
    """

    name: str
    density: float
    youngs_modulus: float
    poisson_ratio: float
    yield_stress: float
    tensile_strength: float
    description: str = ""
    sources: tuple[str, ...] = ()


@lru_cache(maxsize=1)
def films() -> dict[str, Film]:
    """All films in the data file, keyed by name and by alias (lower case)."""
    text = resources.files("membrane").joinpath("data/films.toml").read_text(encoding="utf-8")
    table = {}
    for name, entry in tomllib.loads(text).items():
        film = Film(
            name=name,
            density=float(entry["density"]),
            youngs_modulus=float(entry["youngs_modulus"]),
            poisson_ratio=float(entry["poisson_ratio"]),
            yield_stress=float(entry["yield_stress"]),
            tensile_strength=float(entry["tensile_strength"]),
            description=entry.get("description", ""),
            sources=tuple(entry.get("sources", ())),
        )
        for key in [name, *entry.get("aliases", [])]:
            table[key.lower()] = film
    return table


def film(name: str, *, key: str = "film") -> Film:
    """Look a film up by name or alias (case-insensitive)."""
    table = films()
    try:
        return table[str(name).strip().lower()]
    except KeyError:
        known = sorted({f.name for f in table.values()})
        raise InputError(key, name, f"unknown film; known films: {', '.join(known)} "
                         "(or give areal_density, or density with thickness, for a custom film)") from None
