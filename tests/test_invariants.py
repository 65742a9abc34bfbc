"""Scaling laws and orderings that must hold for any drum (hypothesis)."""

import dataclasses

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from membrane import Drum, Head, solve

radius = st.floats(0.05, 1.0)
tension = st.floats(50.0, 20000.0)
sigma = st.floats(0.02, 2.0)
factor = st.floats(0.2, 5.0)


def freqs(drum, physics="ideal"):
    return np.array([mo.frequency for mo in sorted(solve(drum, physics, m_max=4, n_max=3),
                                                     key=lambda mo: (mo.m, mo.n))])


def head(a, t, s, **kw):
    return Head(radius=a, tension=t, areal_density=s, **kw)


@settings(max_examples=40, deadline=None)
@given(radius, tension, sigma, factor)
def test_frequency_goes_as_square_root_of_tension(a, t, s, k):
    # f = j_mn sqrt(T/sigma)/(2 pi a) (Kinsler et al., Fundamentals of Acoustics, 4th ed., ch. 4)
    np.testing.assert_allclose(freqs(Drum(head(a, t * k, s))), freqs(Drum(head(a, t, s))) * np.sqrt(k),
                               rtol=1e-12)


@settings(max_examples=40, deadline=None)
@given(radius, tension, sigma, factor)
def test_frequency_goes_as_inverse_radius(a, t, s, k):
    np.testing.assert_allclose(freqs(Drum(head(a * k, t, s))), freqs(Drum(head(a, t, s))) / k, rtol=1e-12)


@settings(max_examples=40, deadline=None)
@given(radius, tension, sigma, factor)
def test_frequency_goes_as_inverse_square_root_of_areal_density(a, t, s, k):
    np.testing.assert_allclose(freqs(Drum(head(a, t, s * k))), freqs(Drum(head(a, t, s))) / np.sqrt(k),
                               rtol=1e-12)


@settings(max_examples=30, deadline=None)
@given(radius, tension, sigma, factor)
def test_ideal_ratios_do_not_depend_on_tension(a, t, s, k):
    r1 = solve(Drum(head(a, t, s)), "ideal").ratios((1, 1))
    r2 = solve(Drum(head(a, t * k, s)), "ideal").ratios((1, 1))
    np.testing.assert_allclose(r1, r2, rtol=1e-12)


@settings(max_examples=30, deadline=None)
@given(radius, tension, st.floats(5e-5, 5e-4), st.sampled_from(["clamped", "hinged"]))
def test_stiffness_never_lowers_a_frequency(a, t, h, edge):
    # Adding D nabla^4 to the membrane operator adds positive energy, so no eigenvalue can fall
    # (Rayleigh's principle / Courant-Fischer min-max)
    base = head(a, t, 1390.0 * h, thickness=h, youngs_modulus=4.5e9, poisson_ratio=0.38, edge=edge)
    stiff = freqs(Drum(base), "stiff")
    ideal = freqs(Drum(dataclasses.replace(base, youngs_modulus=None)), "ideal")
    assert np.all(stiff >= ideal * (1 - 1e-12))
