"""Bessel zeros and overlap integrals against handbook tables and mpmath."""

import mpmath
import numpy as np
import pytest
from scipy import integrate, special

from membrane.bessel import jn_zeros, jnp_zeros, lommel

# Abramowitz & Stegun, Handbook of Mathematical Functions (1964), Table 9.5, as listed in
# SOURCES.md (11 significant digits; A&S prints 5 decimals, 10 for m = 0).
AS_TABLE_9_5 = {
    0: [2.4048255577, 5.5200781103, 8.6537279129, 11.791534439, 14.930917708],
    1: [3.8317059702, 7.0155866698, 10.173468135, 13.323691936, 16.470630051],
    2: [5.1356223018, 8.4172441404, 11.619841172, 14.795951782, 17.959819495],
    3: [6.3801618959, 9.7610231300, 13.015200722, 16.223466160, 19.409415226],
    4: [7.5883424345, 11.064709489, 14.372536672, 17.615966050, 20.826932957],
    5: [8.7714838160, 12.338604197, 15.700174080, 18.980133875, 22.217799897],
    6: [9.9361095242, 13.589290171, 17.003819668, 20.320789214, 23.586084436],
    7: [11.086370019, 14.821268727, 18.287582832, 21.641541020, 24.934927888],
    8: [12.225092264, 16.037774191, 19.554536431, 22.945173132, 26.266814641],
}


@pytest.mark.parametrize("m", sorted(AS_TABLE_9_5))
def test_zeros_match_abramowitz_stegun_table_9_5(m):
    # Abramowitz & Stegun Table 9.5: agreement to the 11 digits listed
    np.testing.assert_allclose(jn_zeros(m, 5), AS_TABLE_9_5[m], rtol=0, atol=6e-9)


def test_zeros_match_mpmath_up_to_order_and_index_30():
    # mpmath.besseljzero, 30 digits, as an independent reference
    mpmath.mp.dps = 30
    worst = 0.0
    for m in range(0, 31, 3):
        ours = jn_zeros(m, 30)
        for n in range(1, 31, 29 // 4):
            ref = float(mpmath.besseljzero(m, n))
            worst = max(worst, abs(ours[n - 1] / ref - 1))
    assert worst < 1e-12, worst


def test_all_thirty_by_thirty_zeros_are_roots_and_ordered():
    # Every zero for m, n <= 30 is a root of J_m (scipy.special.jv) and they interlace
    for m in range(31):
        z = jn_zeros(m, 30)
        assert np.all(np.diff(z) > 2.5)  # zeros of J_m are spaced by about pi
        assert np.max(np.abs(special.jv(m, z))) < 1e-13


def test_derivative_zeros_and_the_x_equals_zero_convention():
    # SOURCES.md (A&S Table 9.5 / DLMF 10.21): zeros of J_m'; x = 0 is not counted here
    np.testing.assert_allclose(jnp_zeros(1, 3), [1.8411837813, 5.3314427735, 8.5363163663], atol=6e-10)
    np.testing.assert_allclose(jnp_zeros(2, 3), [3.0542369282, 6.7061331942, 9.9694678231], atol=6e-10)
    np.testing.assert_allclose(jnp_zeros(0, 2), [3.8317059702, 7.0155866698], atol=6e-10)


@pytest.mark.parametrize("m", [0, 1, 3])
def test_lommel_closed_form_against_quadrature(m):
    # scipy.integrate.quad of J_m(alpha r) J_m(beta r) r over [0, a]
    a = 0.33
    for alpha, beta in [(7.0, 7.0), (7.0, 19.0), (12.0, 3.5)]:
        ref, _ = integrate.quad(lambda r: special.jv(m, alpha * r) * special.jv(m, beta * r) * r, 0, a,
                                epsabs=1e-14)
        assert float(np.real(lommel(m, alpha, beta, a))) == pytest.approx(ref, rel=1e-9, abs=1e-14)


def test_lommel_accepts_complex_wavenumbers():
    # The radiation model continues the overlaps to complex wavenumber: compare to
    # mpmath.quad of the same integrand with complex beta
    a, m, alpha, beta = 0.3, 2, 17.0, 9.0 - 2.0j
    ref = mpmath.quad(lambda r: mpmath.besselj(m, alpha * r) * mpmath.besselj(m, beta * r) * r, [0, a])
    assert complex(lommel(m, alpha, beta, a)) == pytest.approx(complex(ref), rel=1e-10)


def test_shipped_table_equals_a_fresh_computation():
    # The shipped zeros (data/bessel_zeros.npz) against scipy's zeros polished afresh
    from membrane.bessel import TABLE_ORDERS, TABLE_ZEROS, _table, compute_jn_zeros, compute_jnp_zeros

    table = _table()
    assert table["j"].shape == (TABLE_ORDERS, TABLE_ZEROS)
    for m in range(0, TABLE_ORDERS, 7):
        np.testing.assert_allclose(table["j"][m], compute_jn_zeros(m, TABLE_ZEROS), rtol=1e-15)
        np.testing.assert_allclose(table["jp"][m], compute_jnp_zeros(m, TABLE_ZEROS), rtol=1e-15)
    # beyond the table the zeros are computed, and still agree with mpmath.besseljzero
    mpmath.mp.dps = 25
    assert jn_zeros(60, 3)[2] == pytest.approx(float(mpmath.besseljzero(60, 3)), rel=1e-13)
    assert jnp_zeros(3, 60)[59] == pytest.approx(float(mpmath.besseljzero(3, 60, derivative=1)), rel=1e-13)
