"""Baffled radiation: the wavenumber quadrature against classical closed forms."""

import numpy as np
import pytest
from scipy import integrate, special

from membrane.physics.coupled import RitzSpace
from membrane.physics.radiation import (Piston, Quadrature, RadiationTable, radiation_integral,
                                        radiation_matrix)
from membrane.physics.vacuum import ideal_basis, stiff_basis

RHO, C = 1.2041, 343.24  # dry air at 20 degC (ideal gas, R = 287.058 J/(kg K), gamma = 1.4)


def piston_impedance_ratio(x, *, radius=0.3, quadrature=Quadrature()):
    """Z / (rho c pi a^2) at x = 2 k a from the SAME quadrature as the membrane's matrices."""
    k = x / (2 * radius)
    A = radiation_matrix(Piston(radius), k=k, density=RHO, quadrature=quadrature)[0, 0]
    z = 1j * (k * C) * A  # radiation impedance i omega A
    return z / (RHO * C * np.pi * radius**2)


def test_piston_matches_kinsler_frey_over_the_whole_range():
    # Kinsler & Frey, Fundamentals of Acoustics; Beranek, Acoustics:
    # Z/(rho c pi a^2) = R1(2ka) + i X1(2ka), R1 = 1 - 2 J1(x)/x, X1 = 2 H1(x)/x (Struve H1)
    x = np.linspace(0.1, 20.0, 80)
    z = np.array([piston_impedance_ratio(v) for v in x])
    r1 = 1 - 2 * special.j1(x) / x
    x1 = 2 * special.struve(1, x) / x
    assert np.max(np.abs(z.real - r1)) < 1e-6
    assert np.max(np.abs(z.imag - x1)) < 1e-6


@pytest.mark.parametrize("ka, r1, x1", [(0.5, 0.119899, 0.396915), (1.0, 0.423275, 0.646764),
                                        (2.0, 1.033022, 0.534863)])
def test_piston_tabulated_values(ka, r1, x1):
    # Vigran, Building Acoustics (2008), Eq. 3.57 (Kinsler & Frey; Beranek): R1, X1 COMPUTED to 6 decimals
    z = piston_impedance_ratio(2 * ka)
    assert z.real == pytest.approx(r1, abs=1e-6)
    assert z.imag == pytest.approx(x1, abs=1e-6)


def test_piston_low_frequency_radiation_mass():
    # Kinsler & Frey; Beranek: radiation mass of a baffled piston 8 rho a^3 / 3 as ka -> 0
    a = 0.3
    A = radiation_matrix(Piston(a), k=1e-5 / a, density=RHO)[0, 0]
    assert A.real == pytest.approx(8 * RHO * a**3 / 3, rel=1e-8)


def _space(m=0, count=8, stiff=False):
    if stiff:
        b = stiff_basis(m=m, count=count, radius=0.325, tension=3000.0, areal_density=0.262,
                        bending_stiffness=0.3, poisson_ratio=0.38, edge="clamped")
    else:
        b = ideal_basis(m=m, count=count, radius=0.325, tension=3000.0, areal_density=0.262)
    return RitzSpace(b)


@pytest.mark.parametrize("m, stiff", [(0, False), (3, False), (1, True)])
def test_transforms_match_direct_quadrature(m, stiff):
    # Hankel transforms (Lommel / Sonine closed forms) against scipy.integrate.quad in r
    s = _space(m, 4, stiff)
    a = s.radius

    def shapes(x):
        return np.concatenate([s.basis.shape(np.array([x]))[:, 0], [s.rim_shape(x)]])

    for kappa in (0.7, 9.0, 31.0):
        got = s.transform(np.array([kappa]))[:, 0]
        ref = integrate.quad_vec(lambda x: shapes(x) * special.jv(m, kappa * x) * x, 0, a,
                                 epsabs=1e-14, epsrel=1e-12)[0]
        assert np.allclose(got, ref, rtol=0, atol=1e-10 * a * a)


def test_membrane_low_frequency_damping_is_a_baffled_monopole():
    # Rayleigh / Kinsler & Frey: at low frequency a baffled source of volume velocity U radiates
    # Re Z = rho c k^2 / (2 pi) |U|^2, so -Im A_nn -> rho 2 pi k Phi_n(0)^2 for m = 0,
    # with Phi_n(0) = a^2 J1(j_n) / j_n for the ideal mode J0(j_n r / a).
    s = _space(0, 4)
    a, k = s.radius, 1e-4
    A = radiation_matrix(s, k=k, density=RHO)
    j = special.jn_zeros(0, 4)
    phi0 = a * a * special.j1(j) / j
    assert np.allclose(-np.diag(A).imag[:4], RHO * 2 * np.pi * k * phi0**2, rtol=1e-6)


def test_matrix_is_symmetric_and_damping_positive_semidefinite():
    s = _space(2, 8)
    A = radiation_matrix(s, k=12.0, density=RHO)
    assert np.allclose(A, A.T, rtol=0, atol=1e-12 * np.abs(A).max())
    # -Im A is the radiated-power form: positive semidefinite (energy conservation)
    assert np.linalg.eigvalsh(-A.imag).min() > -1e-12 * np.abs(A).max()


def test_quadrature_converged_at_defaults():
    # refining every node count by 1.5x changes the matrix by < 1e-8 relative (measured about
    # 4e-9 at k a = 16; frequencies need far less): the defaults of Quadrature were chosen
    # from this
    for m, stiff in ((0, False), (4, False), (1, True)):
        s = _space(m, 22, stiff)
        for k in (0.5, 8.0, 20.0 + 0.4j):
            A = radiation_integral(s, k)
            B = radiation_integral(s, k, quadrature=Quadrature().refined(1.5))
            assert np.max(np.abs(A - B)) < 1e-8 * np.max(np.abs(B))


def test_table_continues_analytically_to_complex_k():
    # the Chebyshev table, fitted on real k only, against direct quadrature at complex k
    s = RitzSpace(ideal_basis(m=1, count=10, radius=1.0, tension=1.0, areal_density=1.0))
    table = RadiationTable(s, k_max=10.0)
    k = np.array([0.3 + 0.01j, 3.0 + 0.2j, 7.5 + 0.05j, 9.8 + 0.4j])
    got = table(k)
    for kk, g in zip(k, got):
        ref = np.pi * radiation_integral(s, kk)
        assert np.max(np.abs(g - ref)) < 1e-8 * np.max(np.abs(ref))
