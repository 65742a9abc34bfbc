"""The film and skin catalogue: every number has a source or a marker; values are sane."""

import tomllib
from importlib import resources

import pytest

from membrane import materials
from membrane.drum import parse_drum

MARKERS = ("from memory", "common practice")


def _data():
    # read the shipped file itself, not the parsed catalogue, so nothing the loader drops escapes
    text = resources.files("membrane").joinpath("data/films.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


def _numbers(entry):
    """Keys of an entry whose values are numbers or lists of numbers."""
    def numeric(v):
        if isinstance(v, bool):
            return False
        if isinstance(v, list):
            return bool(v) and all(numeric(x) for x in v)
        return isinstance(v, (int, float))
    return [k for k, v in entry.items() if numeric(v)]


def _unsourced(name, entry):
    """Problems with an entry's sources: numbers with neither a source nor a marker, stale sources."""
    source = entry.get("source", {})
    problems = []
    for key in _numbers(entry):
        text = str(source.get(key, "")).strip()
        # a marker, or words that name a publication (a year, a doi or a named table)
        named = any(ch.isdigit() for ch in text) or "table" in text.lower()
        if not text:
            problems.append(f"{name}.{key} has neither a source nor a 'from memory' / 'common practice' marker")
        elif not (any(m in text.lower() for m in MARKERS) or named):
            problems.append(f"{name}.{key}: {text!r} names no source")
    problems += [f"{name}.source.{key} describes a value the entry does not have"
                 for key in source if key not in entry]
    return problems


@pytest.mark.parametrize("name", list(_data()))
def test_every_value_has_a_source_or_a_marker(name):
    entry = _data()[name]
    assert _numbers(entry), f"{name} holds no numbers"
    assert _unsourced(name, entry) == []


def test_the_source_check_catches_a_bare_number():
    bad = {"density": 1000.0, "youngs_modulus": 1e9, "thickness_range": [1e-4, 2e-4],
           "source": {"youngs_modulus": "looks right", "poisson_ratio": "from memory"}}
    problems = _unsourced("bad", bad)
    assert len(problems) == 4  # density and thickness_range bare, a vague source, a stale one


@pytest.mark.parametrize("name", list(_data()))
def test_strength_is_given_or_said_to_be_unknown(name):
    entry = _data()[name]
    if "yield_stress" not in entry or "tensile_strength" not in entry:
        assert entry.get("strength_note", "").strip(), f"{name}: no yield/break data and no statement saying so"


def test_catalogue_covers_skins_and_aramid():
    names = materials.film_names()
    for wanted in ("polyester", "calfskin", "goatskin", "aramid"):
        assert wanted in names
    for skin in ("calfskin", "goatskin"):
        f = materials.film(skin)
        assert "humidity" in f.humidity_note
        assert f.yield_stress is None and f.strength_note
        lo, hi = f.thickness_range
        assert 0 < lo < hi < 2e-3
    pet = materials.film("polyester")
    assert 1 in pet.usual_plies and 2 in pet.usual_plies
    # 7.5 mil = 190.5 um exactly (1 mil = 0.001 in, 1 in = 25.4 mm exactly)
    assert any(abs(h - 7.5 * 25.4e-6) < 1e-12 for h in pet.usual_thicknesses)


def test_skin_values_are_physically_plausible():
    # Parchment modulus 400-1200 MPa over 85-30 % RH (Heritage Science 8, 2020, abstract);
    # a medium goatskin weighed at 0.568 kg/m^2 (a maker's weighing, see films.toml):
    # with the catalogue's density that is a thickness inside the catalogue's range.
    goat = materials.film("goatskin")
    assert 0.4e9 <= goat.youngs_modulus <= 1.2e9
    lo, hi = goat.thickness_range
    assert lo < 0.568 / goat.density < hi


def test_a_skin_head_loads_with_no_stress_data():
    drum = parse_drum({"head": {"diameter": "16 in", "film": "goat", "thickness": "0.45 mm",
                                "tension": "1500 N/m"}})
    assert drum.head.film == "goatskin" and drum.head.yield_stress is None
    assert drum.head.areal_density == pytest.approx(1200.0 * 0.45e-3)


def test_examples_lists_the_films_with_their_sources():
    from typer.testing import CliRunner

    from membrane.cli import app

    out = CliRunner().invoke(app, ["examples", "--films"])
    assert out.exit_code == 0
    for name in materials.film_names():
        assert f"{name}:" in out.stdout
    assert "7.5 mil" in out.stdout and "humidity" in out.stdout and "source, density" in out.stdout
