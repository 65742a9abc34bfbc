"""Losses besides radiation, each checked alone against its source (membrane/physics/dissipation.py)."""

import math

import numpy as np
import pytest

from membrane.drum import Air, Body, Drum, Head
from membrane.losses import Losses
from membrane.physics import dissipation as dz
from membrane.physics.cavity import duct_terms
from membrane.physics.duct_walls import DuctWalls
from membrane.physics.coupled import full_modes
from membrane.solver import solve

AIR = Air.from_conditions(temperature=293.15)
NO_LOSS = Losses(tension_loss_factor=0.0, film_loss_factor=0.0, boundary_layers=False, edge_mobility=0.0)


def test_sutherland_viscosity_of_air_at_20_degc():
    # from memory: air at 20 degC has mu = 1.81e-5 Pa s (Kaye & Laby tables)
    assert dz.air_viscosity(293.15) == pytest.approx(1.81e-5, rel=0.005)
    assert dz.air_temperature(AIR.sound_speed) == pytest.approx(293.15, rel=1e-12)


def test_layer_admittances_against_the_published_numbers():
    # Bruneau, Herzog, Kergomard & Polack (1989), as reproduced in J. Kemp's thesis (Edinburgh
    # 2002, eq. 2.54; SECONDARY): for air at standard conditions the specific wall admittances
    # are eps_v = (1+i) 2.03e-5 sqrt(f) (viscous, grazing flow) and eps_t = (1+i) 0.95e-5 sqrt(f)
    mu = dz.air_viscosity(293.15)
    rho, c = AIR.density, AIR.sound_speed
    for f in (100.0, 1000.0):
        omega = 2 * math.pi * f
        zv = dz.viscous_layer_impedance(omega, density=rho, viscosity=mu)
        yt = dz.thermal_layer_admittance(omega, density=rho, sound_speed=c, viscosity=mu)
        # a grazing plane wave has u_t = p / (rho c): specific admittance z_v / (rho c)
        assert zv.real / (rho * c) == pytest.approx(2.03e-5 * math.sqrt(f), rel=0.03)
        assert (yt * rho * c).real == pytest.approx(0.95e-5 * math.sqrt(f), rel=0.03)
        assert zv.imag == pytest.approx(zv.real) and yt.imag == pytest.approx(yt.real)


def _piston_on_tube(radius, length, mass, stiffness, *, lossy_line=False):
    """Complex root of a rigid piston (mass, spring) closing a rigid tube: the plane mode only.

    With lossy_line, the tube is the textbook lossy transmission line instead of the lossless
    duct plus the boundary-layer term of dissipation.py."""
    rho, c = AIR.density, AIR.sound_speed
    mu = dz.air_viscosity(293.15)
    nu = mu / rho
    area = math.pi * radius**2
    gamma, norms = np.zeros(1), np.array([0.5 * radius**2])
    v = 0.5 * radius**2  # <1, psi_0> over the radius

    def z(omega):
        k = omega / c
        if lossy_line:
            # Kirchhoff's wide-tube line (Keefe, JASA 75, 58 (1984), first order; Pierce,
            # Acoustics, 1981, sec. 10-5): series impedance i w rho (1 + eps_v), shunt admittance
            # i w / (rho c^2) (1 + eps_t), eps_v = (1 - i) delta_v / a,
            # eps_t = (gamma - 1)(1 - i) delta_t / a
            dv = np.sqrt(2 * nu / omega)
            dt = dv / np.sqrt(dz.PRANDTL_AIR)
            ev = (1 - 1j) * dv / radius
            et = (1.4 - 1) * (1 - 1j) * dt / radius
            kc = k * np.sqrt((1 + ev) * (1 + et))
            zc = rho * c * np.sqrt((1 + ev) / (1 + et))
            air = omega * area * zc / np.tan(kc * length)
        else:
            fcot, _ = duct_terms(np.array([k]), gamma, length)
            air = rho * omega**2 * 2 * math.pi * fcot[0, 0] * v * v / norms[0]
            pi, ups = dz.duct_wall_forms(np.array([k]), gamma=gamma, norms=norms, radius=radius,
                                         depth=length, m=0, faces=False)
            zv = dz.viscous_layer_impedance(omega, density=rho, viscosity=mu)
            yt = dz.thermal_layer_admittance(omega, density=rho, sound_speed=c, viscosity=mu)
            w = v / norms[0]
            air = air + w * w * (1j * omega**3 * rho**2 * yt * pi[0, 0, 0] + 1j * omega * zv * ups[0, 0, 0])
        return stiffness - omega**2 * mass + air

    w0, w1 = math.sqrt(stiffness / mass) * (1 + 0j), math.sqrt(stiffness / mass) * 1.01
    f0, f1 = z(w0), z(w1)
    for _ in range(60):
        w0, w1, f0 = w1, w1 - f1 * (w1 - w0) / (f1 - f0), f1
        f1 = z(w1)
        if abs(w1 - w0) < 1e-13 * abs(w1):
            break
    return w1


@pytest.mark.parametrize("radius, length, f_piston", [(0.05, 0.5, 200.0), (0.02, 0.3, 900.0)])
def test_tube_wall_losses_match_kirchhoffs_lossy_line(radius, length, f_piston):
    # the decay a tube's boundary layers give a piston on it: the duct-field term of
    # dissipation.py against the textbook lossy line (Kirchhoff 1868; Keefe 1984)
    mass = 0.01
    stiffness = mass * (2 * math.pi * f_piston) ** 2
    ours = _piston_on_tube(radius, length, mass, stiffness)
    book = _piston_on_tube(radius, length, mass, stiffness, lossy_line=True)
    assert ours.imag > 0
    assert ours.imag == pytest.approx(book.imag, rel=0.01)
    assert ours.real == pytest.approx(book.real, rel=1e-5)


def test_side_wall_integrals_of_a_plane_wave():
    # the closed forms of duct_wall_forms against direct integrals of p = cos(k u) over a
    # tube's side wall: int p^2 dS and int (dp/du)^2 dS (elementary calculus)
    a, L = 0.05, 0.5
    k = 1.3 * math.pi / L  # any k: the forms are integrals of e_1 = cos(k u)/(k sin kL)
    pi, ups = dz.duct_wall_forms(np.array([k + 0j]), gamma=np.zeros(1), norms=np.array([a * a / 2]),
                                 radius=a, depth=L, m=0, faces=False)
    scale = (k * math.sin(k * L)) ** 2  # undo the 1/(k sin kL) of e_1
    p2 = (2 * math.pi * a) * (L / 2 + math.sin(2 * k * L) / (4 * k))  # int cos^2(k u) over the wall
    g2 = (2 * math.pi * a) * k * k * (L / 2 - math.sin(2 * k * L) / (4 * k))  # int (d/du cos)^2
    assert (pi[0, 0, 0] * scale).real == pytest.approx(p2, rel=1e-10)
    assert (ups[0, 0, 0] * scale).real == pytest.approx(g2, rel=1e-10)


def test_complex_tension_gives_q_of_one_over_eta():
    # complex-modulus result (Ross, Ungar & Kerwin 1959): a pure-tension membrane with tension
    # T (1 + i eta) has omega^2 = (1 + i eta) omega_0^2, Q = 1/eta in every mode
    eta = 4e-3
    head = Head(radius=0.33, tension=4000.0, areal_density=0.26)
    thin_air = Air(density=1e-9, sound_speed=343.24)  # radiation negligible
    drum = Drum(head=head, air=thin_air, losses=Losses(tension_loss_factor=eta, film_loss_factor=0.0,
                                                        boundary_layers=False))
    for mode in solve(drum, "full", m_max=3, n_max=2, losses="all"):
        w2 = mode.omega**2
        assert w2.imag / w2.real == pytest.approx(eta, rel=1e-4), mode.label


def test_complex_modulus_damps_by_the_bending_energy_fraction():
    # modal strain energy method (Ungar & Kerwin, JASA 34, 954 (1962)): with E (1 + i eta) only,
    # a mode's loss factor is eta times the bending share of its strain energy, which is
    # (D / omega^2) d(omega^2)/dD at fixed tension (here from the in-vacuum stiff roots)
    eta = 0.02
    base = dict(radius=0.1, tension=300.0, areal_density=1.39, thickness=1e-3, youngs_modulus=4.5e9)
    thin_air = Air(density=1e-9, sound_speed=343.24)
    drum = Drum(head=Head(**base), air=thin_air,
                losses=Losses(tension_loss_factor=0.0, film_loss_factor=eta, boundary_layers=False))
    full = {(mo.m, mo.n): mo for mo in solve(drum, "full", m_max=2, n_max=2)}
    h = 1e-4
    up = {(mo.m, mo.n): mo.frequency for mo in solve(
        Drum(head=Head(**{**base, "youngs_modulus": 4.5e9 * (1 + h)})), "stiff", m_max=2, n_max=2)}
    dn = {(mo.m, mo.n): mo.frequency for mo in solve(
        Drum(head=Head(**{**base, "youngs_modulus": 4.5e9 * (1 - h)})), "stiff", m_max=2, n_max=2)}
    for key, mo in full.items():
        share = (up[key] ** 2 - dn[key] ** 2) / (2 * h) / (mo.omega.real / (2 * math.pi)) ** 2
        assert 0.05 < share < 0.95  # a head where both parts matter
        w2 = mo.omega**2
        assert w2.imag / w2.real == pytest.approx(eta * share, rel=2e-3), key


def test_resistive_rim_damps_every_ideal_mode_alike():
    # derived from the mobility power formula P = Re(Y) |F|^2 / 2 (Cremer, Heckl & Petersson,
    # Structure-Borne Sound, 2005) with the edge force F = T w'(a) of an ideal membrane mode:
    # Im omega = Y T / a, the same for every mode
    a, tension, y = 0.2, 2000.0, 2e-6
    drum = Drum(head=Head(radius=a, tension=tension, areal_density=0.2), air=Air(density=1e-9, sound_speed=343.24),
                losses=Losses(tension_loss_factor=0.0, film_loss_factor=0.0, boundary_layers=False,
                              edge_mobility=y))
    for mode in solve(drum, "full", m_max=3, n_max=2):
        assert mode.omega.imag == pytest.approx(y * tension / a, rel=2e-3), mode.label


def test_radiation_only_is_the_lossless_operator_bit_for_bit():
    # --losses radiation must leave the earlier solver untouched
    drum = Drum(head=Head(radius=0.33, tension=4000.0, areal_density=0.26, thickness=1.9e-4,
                          youngs_modulus=4.5e9), body=Body("kettle", volume=0.17))
    old = full_modes(drum, m_max=2, n_max=1)
    new = solve(drum, "full", m_max=2, n_max=1, losses="radiation")
    by = {(mo.m, mo.n): mo.omega for mo in new}
    assert all(by[(mo.m, mo.n)] == mo.omega for mo in old)
    lossy = {(mo.m, mo.n): mo.omega for mo in solve(drum, "full", m_max=2, n_max=1)}
    assert all(lossy[k].imag > by[k].imag for k in by)
    assert all(abs(lossy[k].real / by[k].real - 1) < 2e-3 for k in by)  # losses barely move pitch


def test_no_losses_adds_nothing():
    drum = Drum(head=Head(radius=0.33, tension=4000.0, areal_density=0.26), body=Body("kettle", volume=0.17),
                losses=NO_LOSS)
    a = {(mo.m, mo.n): mo.omega for mo in solve(drum, "full", m_max=1, n_max=1, losses="all")}
    b = {(mo.m, mo.n): mo.omega for mo in solve(drum, "full", m_max=1, n_max=1, losses="radiation")}
    for key in a:
        assert a[key] == pytest.approx(b[key], rel=1e-9)


def test_default_losses_bring_a_big_kettledrum_to_measured_decay():
    # issue 19's three real timpani recordings (independent band-envelope fits), T60 in s:
    # (1,1) 3.1-4.2, (2,1) 3.7-11, (3,1) 3.8-11.5, (4,1) 3.4-6.1. A 32-inch drum with its (1,1)
    # near 70 Hz, as in the lowest recording; radiation alone gives 13 s to hours.
    from membrane import load_drum

    drum = load_drum("kettledrum", diameter="32 in", volume="0.3 m^3", tension="1400 N/m")
    measured = {(1, 1): (3.1, 4.2), (2, 1): (3.7, 11.0), (3, 1): (3.8, 11.5), (4, 1): (3.4, 6.1)}
    radiation = {(mo.m, mo.n): mo.decay for mo in solve(drum, "full", m_max=4, n_max=1, losses="radiation")}
    full = {(mo.m, mo.n): mo.decay for mo in solve(drum, "full", m_max=4, n_max=1)}
    for key, (lo, hi) in measured.items():
        assert lo / 3 < full[key] < hi * 3, (key, full[key])
    assert radiation[(4, 1)] > 100 * measured[(4, 1)][1]  # the case for modelling other losses at all


def test_kettle_forms_are_the_two_ended_forms_with_a_rigid_far_end():
    # internal consistency: the one-head (kettle) shortcut equals the w_1 block of the general form
    from membrane.physics.cavity import duct_norms, duct_wavenumbers

    a, L, m = 0.33, 0.5, 2
    gamma = duct_wavenumbers(m=m, count=12, radius=a)
    norms = duct_norms(m=m, gamma=gamma, radius=a)
    k = np.array([2.0 + 0.01j, 9.0 - 0.02j])
    one = dz.duct_wall_forms(k, gamma=gamma, norms=norms, radius=a, depth=L, m=m, heads=1)
    two = dz.duct_wall_forms(k, gamma=gamma, norms=norms, radius=a, depth=L, m=m, heads=2)
    for x, y in zip(one, two):
        assert np.allclose(x, y[:, :12, :12], rtol=1e-12, atol=0)


def test_open_faces_damp_as_a_stokes_layer_under_the_moving_head():
    # Stokes' second problem (Landau & Lifshitz, Fluid Mechanics, 2nd ed., sec. 24): a wall
    # sliding in its plane at velocity u under air dissipates Re(z_v)|u|^2/2 per unit area,
    # z_v = (1+i) rho sqrt(omega nu / 2). In the subsonic limit of dissipation.py the air slides
    # over each open face as fast as the face moves, so a mode of a head alone (two open faces)
    # decays at Im omega = 2 Re(z_v) / (2 (sigma + m_a)), m_a the air's added mass per area,
    # read from the shift of the mode against the same head in vacuum: (omega_vac/omega)^2 - 1.
    # A heavy head, so that the air's loading is a small correction and that estimate of it holds.
    head = Head(radius=0.2, tension=2000.0, areal_density=1.0)
    air = AIR
    layers = Losses(tension_loss_factor=0.0, film_loss_factor=0.0, boundary_layers=True, edge_mobility=0.0)
    drum = Drum(head=head, air=air, losses=layers)
    mu = dz.air_viscosity(air_temperature := dz.air_temperature(air.sound_speed))
    assert air_temperature == pytest.approx(293.15, rel=1e-9)
    rad = {(mo.m, mo.n): mo.omega for mo in solve(drum, "full", m_max=6, n_max=2, losses="radiation")}
    lossy = {(mo.m, mo.n): mo.omega for mo in solve(drum, "full", m_max=6, n_max=2, losses="all")}
    vac = {(mo.m, mo.n): mo.omega.real for mo in solve(drum, "ideal", m_max=6, n_max=2)}
    for key in [(2, 1), (4, 1), (6, 1), (4, 2)]:  # membrane wavenumber well above the acoustic one
        omega = lossy[key].real
        zv = dz.viscous_layer_impedance(omega, density=air.density, viscosity=mu)
        added = (vac[key] / rad[key].real) ** 2 - 1.0
        expected = 2 * zv.real / (2 * head.areal_density * (1 + added))
        assert lossy[key].imag - rad[key].imag == pytest.approx(expected, rel=0.005), key


@pytest.mark.parametrize("heads", [1, 2])
def test_wall_and_face_forms_against_direct_quadrature(heads):
    # the closed forms of duct_wall_forms (side wall and both end faces, several duct modes,
    # complex k) against scipy quadrature of int p^2 dS and int (grad_t p)^2 dS of the field
    # they describe (bilinear, no conjugate: the forms enter a complex-symmetric operator)
    from scipy import integrate, special

    from membrane.physics.cavity import duct_norms, duct_wavenumbers

    a, L, m = 0.3, 0.45, 2
    gamma = duct_wavenumbers(m=m, count=3, radius=a)
    norms = duct_norms(m=m, gamma=gamma, radius=a)
    k = 11.0 - 0.03j  # between the first and second cut-on of m = 2
    rng = np.random.default_rng(7)
    w = rng.normal(size=heads * 3)  # amplitudes w_1 (and w_2 for a second head at u = 0)
    pi, ups = dz.duct_wall_forms(np.array([k]), gamma=gamma, norms=norms, radius=a, depth=L, m=m,
                                 heads=heads)
    b = 1j * np.sqrt(gamma**2 - k * k + 0j)  # axial wavenumber, as in dissipation.py

    def axial(u, d=0):
        """Sum over q of psi-amplitude times e_1q(u) (and e_2q), or its u-derivative (d=1)."""
        s = np.sin(b * L)
        e1 = (np.cos(b * u) if d == 0 else -b * np.sin(b * u)) / (b * s)
        out = e1 * w[:3]
        if heads == 2:
            e2 = (np.cos(b * (L - u)) if d == 0 else b * np.sin(b * (L - u))) / (b * s)
            out = out + e2 * w[3:]
        return out

    def quad_c(f, lo, hi):
        re = integrate.quad(lambda x: f(x).real, lo, hi, limit=200, epsabs=0, epsrel=1e-11)[0]
        im = integrate.quad(lambda x: f(x).imag, lo, hi, limit=200, epsabs=0, epsrel=1e-11)[0]
        return re + 1j * im

    ang = np.pi  # int cos^2(m theta) = int sin^2(m theta) over a turn, m > 0
    jw = special.jv(m, gamma * a)
    side_p2 = a * ang * quad_c(lambda u: np.sum(jw * axial(u)) ** 2, 0, L)
    side_g2 = a * ang * quad_c(lambda u: np.sum(jw * axial(u, 1)) ** 2 + (m / a) ** 2 * np.sum(jw * axial(u)) ** 2,
                               0, L)

    def face(u):
        amp = axial(u)
        p2 = quad_c(lambda r: np.sum(special.jv(m, gamma * r) * amp) ** 2 * r, 0, a)
        g2 = quad_c(lambda r: (np.sum(gamma * special.jvp(m, gamma * r) * amp) ** 2
                               + (m / r) ** 2 * np.sum(special.jv(m, gamma * r) * amp) ** 2) * r, 1e-12, a)
        return ang * p2, ang * g2

    (p_top, g_top), (p_bot, g_bot) = face(L), face(0.0)
    assert w @ pi[0] @ w == pytest.approx(side_p2 + p_top + p_bot, rel=1e-8)
    assert w @ ups[0] @ w == pytest.approx(side_g2 + g_top + g_bot, rel=1e-8)
    pi_s, ups_s = dz.duct_wall_forms(np.array([k]), gamma=gamma, norms=norms, radius=a, depth=L, m=m,
                                     heads=heads, faces=False)
    assert w @ pi_s[0] @ w == pytest.approx(side_p2, rel=1e-8)
    assert w @ ups_s[0] @ w == pytest.approx(side_g2, rel=1e-8)
    # the projected forms the solver uses (duct_walls.DuctWalls), for the same amplitudes
    walls = DuctWalls(w[:, None], gamma, norms, a, L, m, heads)
    assert walls.forms([k], [1.0], [0.0])[0, 0, 0] == pytest.approx(side_p2 + p_top + p_bot, rel=1e-8)
    assert walls.forms([k], [0.0], [1.0])[0, 0, 0] == pytest.approx(side_g2 + g_top + g_bot, rel=1e-8)


@pytest.mark.parametrize("m", [0, 1, 4])
@pytest.mark.parametrize("heads, separate", [(1, False), (2, False), (2, True)])
def test_projected_wall_forms_equal_the_full_forms(m, heads, separate):
    # internal consistency: DuctWalls (divided differences, two matrix products) gives
    # A^T (t Pi + v Ups) A of duct_wall_forms (checked against quadrature above) to round-off,
    # at complex k below, between and just above and below cut-ons (at one exactly both are
    # infinite: the field's 1/beta)
    from membrane.physics.cavity import duct_norms, duct_wavenumbers

    a, L, Q, n = 0.33, 0.5, 28, 20
    gamma = duct_wavenumbers(m=m, count=Q, radius=a)
    norms = duct_norms(m=m, gamma=gamma, radius=a)
    rng = np.random.default_rng(m + 10 * heads)
    amp = rng.normal(size=(heads * Q, n))
    if separate:  # two different heads, each on its own Ritz coordinates (a shell's pair)
        amp[:Q, 12:] = 0.0
        amp[Q:, :12] = 0.0
    k = np.array([0.3 + 0j, 1.0 + 0.01j, 5.3 - 0.2j, 12.7 + 1e-3j, 30.0 + 0.5j,
                  gamma[3] * (1 + 1e-4) + 1e-4j, gamma[5] * (1 - 1e-6) + 0j])
    t = rng.normal(size=len(k)) + 1j * rng.normal(size=len(k))
    v = rng.normal(size=len(k)) + 1j * rng.normal(size=len(k))
    pi, ups = dz.duct_wall_forms(k, gamma=gamma, norms=norms, radius=a, depth=L, m=m, heads=heads)
    full = amp.T[None] @ (t[:, None, None] * pi + v[:, None, None] * ups) @ amp[None]
    fast = DuctWalls(amp, gamma, norms, a, L, m, heads).forms(k, t, v)
    scale = np.max(np.abs(full), axis=(1, 2), keepdims=True)
    assert np.max(np.abs(fast - full) / scale) < 1e-11


def _shapes_and_slopes(space, r):
    """phi and d phi / dr of every function of a Ritz space at r (from their definitions)."""
    from scipy import special

    b, m, a = space.basis, space.m, space.radius
    x = np.outer(b.k1, r)
    phi = special.jv(m, x)
    dphi = b.k1[:, None] * special.jvp(m, x)

    def ihat(k, d=0):  # I_m(k r) / I_m(k a) (d = 1: its r-derivative), scaled against overflow
        k = np.atleast_1d(k)[:, None]
        value = special.ive(m, k * r) / special.ive(m, k * a) * np.exp(k * (r - a))
        return value if d == 0 else k * (special.ive(m + 1, k * r) / special.ive(m, k * r) + m / (k * r)) * value

    phi, dphi = phi + b.c[:, None] * ihat(b.k2), dphi + b.c[:, None] * ihat(b.k2, 1)
    xr = r / a
    chi = xr ** (m + 2) - space.a1 * xr**m - space.b1 * ihat(space.ks)[0]
    dchi = ((m + 2) * xr ** (m + 1) - space.a1 * m * xr ** max(m - 1, 0) * (m > 0)) / a \
        - space.b1 * ihat(space.ks, 1)[0]
    return np.vstack([phi, chi]), np.vstack([dphi, dchi])


@pytest.mark.parametrize("drum, m", [("kettledrum", 3), ("bass_drum", 6), ("tom", 0)])
def test_tension_gram_against_adaptive_quadrature(drum, m):
    # the closed form of dissipation.tension_gram against scipy's adaptive quadrature of
    # int (phi_i' phi_j' + m^2 phi_i phi_j / r^2) r dr, the functions from their definitions
    # (J_m and I_m of the in-vacuum modes, the rim polynomial); a few entries, the highest
    # mode (whose rim layer is the thinnest) among them
    from scipy import integrate

    from membrane import load_drum
    from membrane.physics import operator

    head = load_drum(drum).head
    shape = operator.shape_of(head, m=m, count=19, rim=True)
    space = operator.unit_space(shape)
    gram = dz.tension_gram(space)
    layer = float(np.max(space.basis.k2))
    points = sorted(1 - d / layer for d in (100, 30, 10, 3, 1) if 1 - d / layer > 0)

    def entry(i, j):
        def f(r):
            phi, dphi = _shapes_and_slopes(space, np.array([r]))
            return (dphi[i, 0] * dphi[j, 0] + m * m / (r * r) * phi[i, 0] * phi[j, 0]) * r
        return space.basis.angular_weight * integrate.quad(f, 1e-9, 1.0, points=points, limit=400,
                                                           epsabs=0, epsrel=1e-11)[0]

    n = space.size
    for i, j in [(0, 0), (1, 0), (n - 2, n - 2), (n - 1, n - 1), (n - 1, 0), (n - 2, 3)]:
        assert gram[i, j] == pytest.approx(entry(i, j), rel=1e-10, abs=1e-12 * abs(gram[0, 0])), (i, j)
