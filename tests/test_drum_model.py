"""The drum dataclasses hold their own invariants; the drum file lives in membrane.drumfile."""

import pytest

from membrane import drum, drumfile
from membrane.drum import Body, Drum, Head
from membrane.errors import InputError

# polyester film data, membrane/data/films.toml (producer's data sheet values cited there)
POLY = dict(radius=0.33, tension=3000.0, areal_density=0.26, film="polyester", thickness=188e-6)


def test_head_in_code_takes_the_film_data():
    from membrane.materials import film

    head = Head(**POLY)
    pet = film("polyester")
    assert (head.yield_stress, head.tensile_strength, head.youngs_modulus, head.poisson_ratio) == \
        (pet.yield_stress, pet.tensile_strength, pet.youngs_modulus, pet.poisson_ratio)
    # given values win over the film's
    assert Head(**POLY, yield_stress=80e6).yield_stress == 80e6


def test_tension_for_checks_the_stress_of_a_head_built_in_code():
    from membrane.tuning import tension_for

    d = Drum(head=Head(**POLY))
    result = tension_for(d, targets=[((1, 1), 120.0)], physics="ideal")
    assert not any("no stress check" in w for w in result.warnings)
    # sigma = T / h (thin film); against the film's 100 MPa yield
    assert result.stress == pytest.approx(result.tension / 188e-6)


@pytest.mark.parametrize("make, key", [
    (lambda: Body(kind="kettle"), "Body.volume"),
    (lambda: Body(kind="shell"), "Body.depth"),
    (lambda: Body(kind="none", volume=0.1), "Body.volume"),
    (lambda: Drum(head=Head(**POLY), body=Body(kind="shell", depth=0.3)), "Drum.resonant_head"),
    (lambda: Drum(head=Head(**POLY), resonant_head=Head(**POLY)), "Drum.resonant_head"),
    (lambda: Drum(head=Head(**POLY), body=Body(kind="shell", depth=0.3),
                  resonant_head=Head(**{**POLY, "radius": 0.2})), "Drum.resonant_head.diameter"),
    (lambda: Head(**{**POLY, "film": "vellum"}), "Head.film"),
])
def test_invariants(make, key):
    with pytest.raises(InputError) as info:
        make()
    assert info.value.key == key


def test_file_errors_use_the_file_keys():
    head = {"diameter": "26 in", "tension": "3000 N/m", "areal_density": 0.26}
    with pytest.raises(InputError) as info:
        drumfile.parse_drum({"head": head, "body": {"kind": "kettle"}})
    assert info.value.key == "body.volume"
    with pytest.raises(InputError) as info:
        drumfile.parse_drum({"head": head, "body": {"kind": "shell", "depth": "14 in"},
                             "resonant_head": {**head, "diameter": "24 in"}})
    assert info.value.key == "resonant_head.diameter"


def test_air_depth():
    # V / (pi a^2): a 0.17 m^3 kettle under a 0.33 m head (a cylinder of the bowl's volume)
    d = Drum(head=Head(**POLY), body=Body(kind="kettle", volume=0.17))
    assert d.air_depth == pytest.approx(0.17 / (3.141592653589793 * 0.33 ** 2))
    assert Drum(head=Head(**POLY)).air_depth is None


def test_old_import_paths():
    assert drum.load_drum is drumfile.load_drum and drum.parse_drum is drumfile.parse_drum
    from membrane.drum import builtin_names, override_table  # noqa: F401
    assert "kettledrum" in builtin_names()
