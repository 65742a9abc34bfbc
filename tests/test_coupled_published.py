"""The coupled (full) model against published formulas of acoustics, each evaluated here independently.

Every check below runs the full solver (membrane.physics.coupled.full_modes) and compares it with
a classical result computed in the test by its own route (scipy quadrature in space or angle,
not the solver's wavenumber-domain integrals):

* radiation damping: the power a baffled plane source radiates, from the Rayleigh integral's far
  field (L. E. Kinsler, A. R. Frey, A. B. Coppens, J. V. Sanders, Fundamentals of Acoustics,
  4th ed., 2000, Sec. 7.4; P. M. Morse and K. U. Ingard, Theoretical Acoustics, 1968, Sec. 7.4);
* the low-frequency limit of that damping, the baffled simple source (Kinsler et al. Sec. 7.4);
* air loading of the frequency: the added mass from the Rayleigh integral in space, with the
  ring kernel 4 K(m)/(r + r') (the elliptic-integral form; A&S 17.3), checked first on the
  baffled piston's 8 rho a^3 / 3 (Kinsler et al. Sec. 7.5);
* a two-headed drum: the lumped-kettle equation of D. R. Raichel, The Science and Applications of
  Acoustics, 2nd ed., 2006, Eq. 6.28 (with pi a^4 in B where the scan prints pi a^2, so that B
  is dimensionless), which by symmetry
  holds for the in-phase pair of two identical heads with half the volume each.

Accuracy: the formulas are exact for their limits (light air, low frequency, lumped cavity); the
tolerances are the size of what the limit neglects, estimated beside each check. Parameters are
invented round numbers of drum size (a 26-inch and a 12-inch head; 0.262 kg/m^2 is 0.19 mm
polyester at 1390 kg/m^3, from memory); the checks do not depend on them being any real drum's.
"""

import numpy as np
import pytest
from scipy import integrate, optimize, special

from membrane.drum import Air, Body, Drum, Head
from membrane.physics.coupled import LN1000, full_modes

GAMMA_P0 = 1.4 * 101325.0  # adiabatic bulk modulus of air, Pa (gamma = 1.4, P0 = 101.325 kPa)
RHO, C = 1.2041, 343.24  # air at 20 degC (ideal gas, R = 287.058 J/(kg K), gamma = 1.4)
A26, SIGMA = 0.325, 0.262  # 26-inch head radius (m) and areal density (kg/m^2)


def ideal_shape(m, n, a):
    """The in-vacuum radial shape J_m(j_mn r / a) of the ideal membrane."""
    alpha = special.jn_zeros(m, n)[-1] / a
    return lambda r: special.jv(m, alpha * r)


def modal_mass(phi, m, a, sigma):
    """sigma * integral of (phi(r) cos m theta)^2 over the head (kg, for unit amplitude)."""
    angular = 2 * np.pi if m == 0 else np.pi
    return sigma * angular * integrate.quad(lambda r: phi(r) ** 2 * r, 0, a, limit=200)[0]


def light(factor):
    """Air at `factor` times its density, sound speed kept: loading becomes a perturbation."""
    return Air(density=RHO * factor, sound_speed=C)


# ----------------------------------------------------------------------------- radiation damping
def far_field_resistance(phi, m, a, k, rho, c):
    """Radiation resistance of one baffled face moving as phi(r) cos m theta (kg/s).

    Rayleigh integral, far field (Kinsler et al. Sec. 7.4): the pressure at angle theta from the
    axis is rho w^2 e^{ikR}/(2 pi R) times the integral of the displacement times
    e^{-i k r sin(theta) cos(psi - theta')}; over the azimuth that is 2 pi i^-m cos(m psi)
    F(k sin theta), F(kappa) = int_0^a phi(r) J_m(kappa r) r dr. The power |p|^2/(2 rho c)
    over the hemisphere is (1/2) w^2 R for unit amplitude, which gives
    R = rho w^2 / c * pi_m * int_0^{pi/2} F(k sin theta)^2 sin theta dtheta, pi_m = 2 pi or pi.
    """
    w = k * c
    angular = 2 * np.pi if m == 0 else np.pi

    def F(kappa):
        return integrate.quad(lambda r: phi(r) * special.jv(m, kappa * r) * r, 0, a, limit=200)[0]

    hemisphere = integrate.quad(lambda th: F(k * np.sin(th)) ** 2 * np.sin(th), 0, np.pi / 2,
                                limit=200)[0]
    return rho * w * w / c * angular * hemisphere


@pytest.mark.parametrize("kind, faces", [("none", 2), ("kettle", 1)])
def test_radiation_damping_matches_the_rayleigh_far_field(kind, faces):
    # A 26-inch head at 3000 N/m, ka from 0.75 to 2.6 over these modes. The model's amplitude
    # decay rate Im w must be the radiated power over twice the vibrational energy,
    # Im w = faces * R / (2 M): two radiating faces with no body (docs/physics.md, "Air on an
    # open face": each in a
    # baffle), one over a kettle, whose rigid closed bowl radiates nothing. Air at 1/1000 of its
    # density makes this first-order result exact up to terms of relative size Ma/M, the air's
    # added mass over the head's (under 0.4 % here, from the frequency lowering 1 - f/f0 < 0.2 %):
    # tolerance 0.5 %.
    head = Head(radius=A26, tension=3000.0, areal_density=SIGMA)
    body = Body(kind="kettle", volume=0.15) if kind == "kettle" else Body()
    air = light(1e-3)
    modes = full_modes(Drum(head=head, body=body, air=air), m_max=2, n_max=2)
    assert {(md.m, md.n) for md in modes} == {(m, n) for m in range(3) for n in (1, 2)}
    for md in modes:
        phi = ideal_shape(md.m, md.n, A26)
        k = md.omega.real / C
        R = far_field_resistance(phi, md.m, A26, k, air.density, C)
        expected = faces * R / (2 * modal_mass(phi, md.m, A26, SIGMA))
        assert md.omega.imag == pytest.approx(expected, rel=5e-3), (md.m, md.n)
        assert md.decay == pytest.approx(LN1000 / expected, rel=5e-3)  # T60 = 3 ln 10 / Im w


def test_low_frequency_decay_is_a_baffled_simple_source():
    # Kinsler et al. Sec. 7.4: a small source of volume-velocity amplitude U in a baffle radiates
    # P = rho c k^2 U^2 / (4 pi) per face. For the (0,1) mode U = w * 2 pi a^2 J1(j01)/j01 and the
    # energy is w^2 M / 2, so Im w = faces * rho c k^2 (2 pi a^2 J1(j01)/j01)^2 / (4 pi M).
    # A slack 26-inch head (30 N/m) puts (0,1) at ka = 0.075: the neglected directivity terms are
    # O((ka)^2) (for a piston R1 = x^2/8 (1 - x^2/24 + ...), x = 2ka: 0.1 %), the air's added
    # mass 0.1 % at 1/1000 density: tolerance 1 % (the misfit is 0.3 %).
    a, T = A26, 30.0
    air = light(1e-3)
    (md,) = [md for md in full_modes(Drum(head=Head(radius=a, tension=T, areal_density=SIGMA),
                                          air=air), m_max=0, n_max=1)]
    j01 = special.jn_zeros(0, 1)[0]
    k = md.omega.real / C
    assert k * a < 0.08
    volume = 2 * np.pi * a * a * special.j1(j01) / j01
    M = modal_mass(ideal_shape(0, 1, a), 0, a, SIGMA)
    expected = 2 * air.density * C * k * k * volume ** 2 / (4 * np.pi * M)
    assert md.omega.imag == pytest.approx(expected, rel=0.01)


# ----------------------------------------------------------------------------- air loading
def rayleigh_added_mass(phi, a, rho):
    """Added mass of one baffled face moving axisymmetrically as phi(r), at low frequency (kg).

    Rayleigh integral with the incompressible kernel: p(x) = rho w^2 / (2 pi) int phi(x')/|x - x'|
    dA', and Ma = int p phi dA / w^2. The azimuthal integral of 1/|x - x'| over a ring is
    4 K(mu) / (r + r'), mu = 4 r r' / (r + r')^2 (complete elliptic integral of the first kind,
    parameter mu, scipy.special.ellipk; A&S 17.3), a logarithmic singularity at r = r' that the
    adaptive quadrature takes by splitting there.
    """
    def ring(r, s):
        mu = min(4 * r * s / (r + s) ** 2, 1 - 1e-16)
        return 4 * special.ellipk(mu) / (r + s)

    def inner(r):  # split at the singular point r' = r
        g = lambda s: phi(s) * s * ring(r, s)  # noqa: E731
        return sum(integrate.quad(g, lo, hi, limit=200)[0] for lo, hi in ((0, r), (r, a)) if hi > lo)

    # rho/(2 pi) * (2 pi over the outer azimuth) * the ring integral
    return rho * integrate.quad(lambda r: phi(r) * r * inner(r), 0, a, limit=200)[0]


def test_the_spatial_rayleigh_quadrature_gives_the_piston_mass():
    # Kinsler et al. Sec. 7.5: a baffled rigid piston's low-frequency radiation mass is
    # 8 rho a^3 / 3; this validates the quadrature used for the membrane below (it gives 2e-10)
    a = 0.2
    assert rayleigh_added_mass(lambda r: 1.0, a, RHO) == pytest.approx(8 * RHO * a ** 3 / 3, rel=1e-8)


@pytest.mark.parametrize("n", [1, 2])
def test_air_loaded_frequency_matches_the_spatial_rayleigh_integral(n):
    # Light air on both faces (no body) lowers (0,n) by w/w0 = 1/sqrt(1 + 2 Ma/M) to first order,
    # Ma from the Rayleigh integral in space (above), M the head's modal mass. A slack head
    # (30 N/m) keeps ka below 0.18, so the incompressible kernel's error is O((ka)^2) of the
    # shift; the second-order terms are (Ma/M)^2 ~ 1e-6 of the frequency: the shift 1 - w/w0
    # (about 1.1e-3 for (0,1)) must agree to 2 % (the misfits are 0.09 % and 0.4 %).
    a, T = A26, 30.0
    air = light(1e-3)
    phi = ideal_shape(0, n, a)
    Ma = rayleigh_added_mass(phi, a, air.density)
    M = modal_mass(phi, 0, a, SIGMA)
    expected_shift = 1 - 1 / np.sqrt(1 + 2 * Ma / M)
    md = next(md for md in full_modes(Drum(head=Head(radius=a, tension=T, areal_density=SIGMA),
                                           air=air), m_max=0, n_max=2) if md.n == n)
    w0 = special.jn_zeros(0, n)[-1] / a * np.sqrt(T / SIGMA)
    assert md.omega.real / C * a < 0.18
    assert 1 - md.omega.real / w0 == pytest.approx(expected_shift, rel=0.02)


# ----------------------------------------------------------------------------- two heads
@pytest.mark.parametrize("depth", [0.3, 0.1])
def test_two_identical_heads_pair_up_as_the_lumped_kettle_predicts(depth):
    # A 12-inch shell with two identical heads, its air a pure spring (rho -> 0, c -> inf at
    # fixed rho c^2 = gamma P0, as in Raichel's lumped model). In-phase (both heads bulge out
    # together) each head pushes against the air of volume V as if alone on V/2: the (0,n) roots
    # of Raichel Eq. 6.28 J0(ka) = -B' J2(ka)/(ka)^2 with B' = 2 gamma P0 pi a^4 / (T V), solved
    # here by scipy's brentq. Opposed, the volume does not change: the in-vacuum J0 zeros
    # (A&S Table 9.5). The (1,n) pairs change no volume either way: the J1 zeros. Two-headed
    # drums show such parallel/antiparallel mode pairs (T. D. Rossing, "Vibrational modes of
    # drumheads in various types of drums", J. Acoust. Soc. Am. 85, S33, 1989, abstract READ).
    # Exact in this limit: tolerance 1e-7 relative (the solver's own convergence is ~1e-9 here).
    a, T, sigma = 0.1524, 2000.0, 0.25
    rho = 1e-9
    head = Head(radius=a, tension=T, areal_density=sigma)
    drum = Drum(head=head, body=Body(kind="shell", depth=depth), resonant_head=head,
                air=Air(density=rho, sound_speed=np.sqrt(GAMMA_P0 / rho)))
    B2 = 2 * GAMMA_P0 * np.pi * a ** 4 / (T * np.pi * a * a * depth)
    f = lambda x: special.j0(x) + B2 * special.jv(2, x) / x ** 2  # noqa: E731
    j0, j2 = special.jn_zeros(0, 1), special.jn_zeros(2, 3)
    lo = np.concatenate([j0, j2[:2]]) + 1e-9
    in_phase = [optimize.brentq(f, lo[i], j2[i] - 1e-12, xtol=1e-14) for i in range(3)]
    modes = full_modes(drum, m_max=1, n_max=3)
    assert len(modes) == 12
    for md in modes:
        ka = md.omega.real * a * np.sqrt(sigma / T)
        if md.m == 0 and md.branch == "in-phase":
            expected = in_phase[md.n - 1]
        else:
            expected = special.jn_zeros(md.m, 3)[md.n - 1]
        assert ka == pytest.approx(expected, rel=1e-7), (md.m, md.n, md.branch)
    # the in-phase (0,1) is well above the opposed one: a real split, not a rounding
    f01 = {md.branch: md.frequency for md in modes if (md.m, md.n) == (0, 1)}
    assert f01["in-phase"] > 1.4 * f01["opposed"]
