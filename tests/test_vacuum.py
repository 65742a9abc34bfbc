"""In-vacuum modes: the ideal membrane and the stiff membrane / plate limits."""

import mpmath
import numpy as np
import pytest
from scipy import integrate, special

from membrane.bessel import jn_zeros
from membrane.physics.vacuum import ideal_basis, stiff_basis, stiff_roots

# Leissa, Vibration of Plates (NASA SP-160, 1969), Table 2.1 (roots computed with mpmath): clamped circular
# plate, lambda^2 = omega a^2 sqrt(sigma/D), keyed (m diameters, s interior circles).
LEISSA_CLAMPED = {(0, 0): 10.2158, (1, 0): 21.2604, (2, 0): 34.8770, (0, 1): 39.7711,
                  (3, 0): 51.0300, (1, 1): 60.8287, (4, 0): 69.6658, (2, 1): 84.5826}


@pytest.mark.parametrize("mode, lam2", sorted(LEISSA_CLAMPED.items()))
def test_clamped_plate_limit_matches_leissa(mode, lam2):
    # Leissa NASA SP-160 Table 2.1: tension -> 0 gives the clamped plate
    m, s = mode
    x = stiff_roots("clamped", m, s + 1, 0.0, 0.3)[s]
    assert x**2 == pytest.approx(lam2, rel=1e-4)


def test_clamped_plate_through_a_real_head_with_vanishing_tension():
    # Leissa NASA SP-160: f = lambda^2 / (2 pi a^2) sqrt(D / sigma) for the clamped plate
    a, sigma, d = 0.3, 0.26, 3e-3
    b = stiff_basis(m=1, count=2, radius=a, tension=1e-9, areal_density=sigma, bending_stiffness=d,
                    poisson_ratio=0.38, edge="clamped")
    expected = np.array([21.2604, 60.8287]) / (2 * np.pi * a * a) * np.sqrt(d / sigma)
    np.testing.assert_allclose(b.frequency, expected, rtol=1e-4)


@pytest.mark.parametrize("nu", [0.3, 0.38])
def test_hinged_plate_limit_solves_the_simply_supported_equation(nu):
    # Leissa NASA SP-160, simply supported plate: J_{m+1}/J_m + I_{m+1}/I_m = 2 lambda/(1 - nu),
    # solved independently with mpmath.findroot from our roots as starting points
    for m in range(4):
        ours = stiff_roots("hinged", m, 3, 0.0, nu)
        for x in ours:
            f = lambda t: (mpmath.besselj(m + 1, t) / mpmath.besselj(m, t)
                           + mpmath.besseli(m + 1, t) / mpmath.besseli(m, t) - 2 * t / (1 - nu))
            ref = float(mpmath.findroot(f, x))
            assert x == pytest.approx(ref, rel=1e-10)


def test_hinged_plate_values_for_nu_0_3():
    # Leissa, NASA SP-160 (1969), simply-supported equation, roots COMPUTED for nu = 0.3: (0,0) 4.9351,
    # (1,0) 13.8982, (2,0) 25.6133, (0,1) 29.7200
    lam2 = [stiff_roots("hinged", 0, 1, 0.0, 0.3)[0] ** 2, stiff_roots("hinged", 1, 1, 0.0, 0.3)[0] ** 2,
            stiff_roots("hinged", 2, 1, 0.0, 0.3)[0] ** 2, stiff_roots("hinged", 0, 2, 0.0, 0.3)[1] ** 2]
    np.testing.assert_allclose(lam2, [4.9351, 13.8982, 25.6133, 29.7200], atol=1e-4)


@pytest.mark.parametrize("edge", ["clamped", "hinged"])
def test_vanishing_stiffness_gives_the_ideal_membrane(edge):
    # Abramowitz & Stegun Table 9.5: D -> 0 leaves J_m(x) = 0
    for m in (0, 2, 5):
        x = stiff_roots(edge, m, 5, 1e12, 0.38)
        np.testing.assert_allclose(x, jn_zeros(m, 5), rtol=2e-5)


def test_stiff_membrane_roots_against_mpmath_determinant():
    # The clamped determinant k2 J_m(k1 a) I_m'(k2 a) - k1 I_m(k2 a) J_m'(k1 a) = 0 (separating the
    # stiff-membrane equation; at T = 0 it is Leissa 1969's clamped-plate frequency equation),
    # solved with mpmath at 30 digits from the ideal root, for a taut stiff head
    s, m = 50.0, 2  # T a^2 / D
    ours = stiff_roots("clamped", m, 3, s, 0.38)
    mpmath.mp.dps = 30
    for x0 in ours:
        def det(x):
            y = mpmath.sqrt(x * x + s)
            return y * mpmath.besselj(m, x) * mpmath.besseli(m, y, derivative=1) \
                - x * mpmath.besseli(m, y) * mpmath.besselj(m, x, derivative=1)
        assert x0 == pytest.approx(float(mpmath.findroot(det, x0)), rel=1e-12)


def test_stiff_shapes_meet_the_clamped_edge_and_are_mass_orthogonal():
    # Independent check with scipy.integrate: w(a) = w'(a) = 0 and int phi_i phi_j r dr = 0
    b = stiff_basis(m=1, count=4, radius=0.33, tension=800.0, areal_density=0.26,
                    bending_stiffness=3e-3, poisson_ratio=0.38, edge="clamped")
    a = b.radius
    edge = b.shape([a - 1e-7, a])[:, 1]
    assert np.max(np.abs(edge)) < 1e-12
    slope = (b.shape([a])[:, 0] - b.shape([a - 1e-7])[:, 0]) / 1e-7
    assert np.max(np.abs(slope)) < 1e-3 * np.max(b.k1)
    for i in range(4):
        for j in range(4):
            val, _ = integrate.quad(lambda r: b.shape([r])[i, 0] * b.shape([r])[j, 0] * r, 0, a,
                                    limit=400, epsabs=1e-13)
            if i == j:
                assert val == pytest.approx(b.norm[i], rel=1e-8)
            else:
                assert abs(val) < 1e-9 * b.norm[i]


def test_transform_of_stiff_shape_against_quadrature():
    # scipy.integrate.quad of phi_n(r) J_m(kappa r) r over the head
    b = stiff_basis(m=3, count=3, radius=0.2, tension=2000.0, areal_density=0.3,
                    bending_stiffness=5e-3, poisson_ratio=0.38, edge="hinged")
    for kappa in (4.0, 25.0, 80.0):
        ours = b.transform([kappa])[:, 0].real
        for i in range(3):
            ref, _ = integrate.quad(lambda r: b.shape([r])[i, 0] * special.jv(3, kappa * r) * r, 0, 0.2,
                                    limit=400, epsabs=1e-14)
            assert ours[i] == pytest.approx(ref, rel=1e-8, abs=1e-13)


def test_ideal_frequency_formula():
    # f = j_mn sqrt(T/sigma) / (2 pi a): A&S Table 9.5 value j_11 = 3.8317059702
    b = ideal_basis(m=1, count=1, radius=0.3302, tension=4000.0, areal_density=0.2641)
    assert b.frequency[0] == pytest.approx(3.8317059702 / (2 * np.pi * 0.3302) * np.sqrt(4000 / 0.2641),
                                           rel=1e-10)
