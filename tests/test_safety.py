"""membrane.safety: one home for the stress check, the slack limit and the caution texts."""

import pytest

from membrane import safety, tuning
from membrane.drum import Head
from membrane.render import handout

# a 0.188 mm (7.5 mil) polyester film: E = 4.9 GPa, yield 100 MPa (membrane/data/films.toml)
HEAD = Head(radius=0.33, tension=3000.0, areal_density=0.26, thickness=188e-6, youngs_modulus=4.9e9,
            yield_stress=100e6, tensile_strength=200e6)


def test_stress_is_tension_over_thickness():
    # sigma = T / h for a thin film (Timoshenko & Woinowsky-Krieger, Theory of Plates and Shells, sec. 1)
    assert safety.stress(HEAD, 3000.0) == pytest.approx(3000.0 / 188e-6)


def test_ceiling_is_the_breaking_tension():
    # T_break = sigma_u h; below the drum file's top of 100 kN/m
    assert safety.tension_ceiling(HEAD) == pytest.approx(200e6 * 188e-6)


def test_caution_above_half_yield():
    # 0.6 of yield: above the safety factor of 2 (common practice, no source)
    t = 0.6 * 100e6 * 188e-6
    assert any("safe limit" in w for w in safety.safety_warnings(HEAD, t))
    assert not any("MPa" in w for w in safety.safety_warnings(HEAD, 0.4 * 100e6 * 188e-6))


def test_one_wording_everywhere():
    # tune, lugs, listen and the handout print the same cautions; the strike preview's hearing
    # caution is the same sentence
    assert tuning.CAUTIONS is safety.CAUTIONS
    assert handout.cautions() == safety.CAUTIONS
    assert safety.HEARING in safety.PREVIEW_HEARING
    assert any("tear" in c for c in safety.CAUTIONS) and any("hearing" in c for c in safety.CAUTIONS)
