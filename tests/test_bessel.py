"""Bessel zeros and overlap integrals against handbook tables and mpmath."""

import mpmath
import numpy as np
import pytest
from scipy import integrate, special

from membrane.bessel import jn_zeros, jnp_zeros, lommel

# j_{m,n} to 11 significant digits, COMPUTED (mpmath.besseljzero). Abramowitz & Stegun, Handbook of
# Mathematical Functions (1964), Table 9.5, prints these zeros to 5 decimals, 10 for m = 0 (READ:
# its list of tables, p. 356, "5D (10D for n = 0)"). The printed page was not at hand, so the
# "printed digits" below are these values correctly rounded to A&S's decimals (A&S states its
# tables correct to the last place; MathWorld's "Bessel Function Zeros" 4-decimal table, READ,
# agrees). The printed digits are checked as A&S; every further digit against mpmath.
ZEROS_11 = {
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
# m = 0 to A&S's 10 decimals (the last two carry one more digit than the 11 significant above)
AS_J0_10D = [2.4048255577, 5.5200781103, 8.6537279129, 11.7915344390, 14.9309177085]


def _printed(m):
    """The zeros of J_m as A&S Table 9.5 prints them: 10 decimals for m = 0, else 5."""
    return (AS_J0_10D, 10) if m == 0 else ([round(z, 5) for z in ZEROS_11[m]], 5)


@pytest.mark.parametrize("m", sorted(ZEROS_11))
def test_zeros_match_abramowitz_stegun_table_9_5(m):
    # Abramowitz & Stegun Table 9.5: our zeros, rounded as A&S rounds, are the printed digits
    printed, decimals = _printed(m)
    assert [round(float(z), decimals) for z in jn_zeros(m, 5)] == pytest.approx(printed, abs=1e-12)
    # mpmath.besseljzero (30 digits): all 11 significant digits of the table and of ours
    mpmath.mp.dps = 30
    ref = [float(mpmath.besseljzero(m, n)) for n in range(1, 6)]
    np.testing.assert_allclose(ZEROS_11[m], ref, rtol=6e-11)
    np.testing.assert_allclose(jn_zeros(m, 5), ref, rtol=2e-15)


def test_zeros_match_mpmath_up_to_order_and_index_30():
    # mpmath at 18 digits as the independent reference, for all 31 x 30 zeros: the Newton step
    # J_m(x)/J_m'(x) = -J_m(x)/J_{m+1}(x) at each of ours is below 1e-15 relative (each is a root
    # to double precision), and the 30th equals mpmath.besseljzero(m, 30), so with 30 distinct
    # increasing roots none is skipped: they are the first 30
    mpmath.mp.dps = 18
    worst = 0.0
    for m in range(31):
        ours = jn_zeros(m, 30)
        assert np.all(np.diff(ours) > 0)
        for x in map(mpmath.mpf, ours):
            worst = max(worst, abs(float(mpmath.besselj(m, x) / mpmath.besselj(m + 1, x) / x)))
        assert ours[29] == pytest.approx(float(mpmath.besseljzero(m, 30)), rel=1e-14)
    assert worst < 2e-15, worst


def test_all_thirty_by_thirty_zeros_are_roots_and_interlace():
    # Every zero for m, n <= 30 is a root of J_m (scipy.special.jv); zeros of consecutive orders
    # interlace, j_{m,n} < j_{m+1,n} < j_{m,n+1} (A&S 9.5.2), and the zeros of one order are
    # spaced by more than pi for m >= 1 (A&S 9.5.2: j_{m,n+1} - j_{m,n} decreases to pi)
    z = np.array([jn_zeros(m, 31) for m in range(32)])
    for m in range(31):
        assert np.max(np.abs(special.jv(m, z[m, :30]))) < 1e-13
        assert np.all(z[m, :30] < z[m + 1, :30]) and np.all(z[m + 1, :30] < z[m, 1:31])
        if m >= 1:
            assert np.all(np.diff(z[m, :30]) > np.pi)


def test_derivative_zeros_and_the_x_equals_zero_convention():
    # Zeros of J_m' as A&S Table 9.5 prints them (5 decimals; 10 for m = 0, whose x = 0 zero A&S
    # and DLMF 10.21 count and scipy's jnp_zeros does not), then to 11 digits against mpmath
    printed = {1: [1.84118, 5.33144, 8.53632], 2: [3.05424, 6.70613, 9.96947],
               0: [3.8317059702, 7.0155866698]}
    mpmath.mp.dps = 30
    for m, values in printed.items():
        ours = jnp_zeros(m, len(values))
        decimals = 10 if m == 0 else 5
        assert [round(float(x), decimals) for x in ours] == pytest.approx(values, abs=1e-12)
        ref = [float(mpmath.besseljzero(m, n + (m == 0), derivative=1)) for n in range(1, len(values) + 1)]
        np.testing.assert_allclose(ours, ref, rtol=1e-14)


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
