r"""Losses besides radiation, as terms of the coupled operator (``--losses all``).

Time dependence :math:`e^{i\omega t}`. Each mechanism adds a complex-symmetric term
:math:`W(\omega)` to the operator of coupled.py,

.. math::

    Z(\omega) = K + S(\omega) - \omega^2 (M + A(\omega)) + W(\omega),

so decay still comes out of the complex roots. A term takes from the head the mean power
:math:`P = \tfrac{\omega}{2}\,\mathrm{Im}(q^H W q)` at real :math:`\omega`; each W below is
built so that this is the power its mechanism dissipates (first order in the loss).

* Film. Complex tension :math:`T(1 + i\eta_T)` and complex modulus :math:`E(1 + i\eta_E)`:
  :math:`W = i\,[\eta_T K_T + \eta_E K_D]`, K_T the tension part of the stiffness
  (:math:`T\int|\nabla\phi|^2`), K_D the bending part. A pure-tension membrane then has
  :math:`\omega^2 \propto (1 + i\eta_T)`, Q = 1/eta_T in every mode (the complex-modulus
  result: Ross, Ungar & Kerwin 1959; Nashif, Jones & Henderson, Vibration Damping, 1985).
  Both factors are frequency independent (hysteretic damping).
* Air boundary layers (Kirchhoff 1868; Pierce, Acoustics, 1981, ch. 10; Morse & Ingard,
  Theoretical Acoustics, 1968, sec. 6.4). On a rigid, isothermal surface the inviscid field's
  tangential velocity u_t and pressure p dissipate, per unit area,
  :math:`\tfrac12\mathrm{Re}(z_v)|u_t|^2 + \tfrac12\mathrm{Re}(y_t)|p|^2` with the Stokes-layer
  impedance :math:`z_v = (1+i)\rho\sqrt{\omega\nu/2}` and the thermal-layer admittance
  :math:`y_t = (1+i)(\gamma-1)\omega\delta_t/(2\rho c^2)`, :math:`\delta_t = \sqrt{2\nu/(\omega
  Pr)}`. In a duct this gives Kirchhoff's attenuation
  :math:`\alpha = \sqrt{\omega\nu/2}\,(1 + (\gamma-1)/\sqrt{Pr})/(a c)` (checked in
  tests/test_dissipation.py). Inside a kettle or shell the field is the duct-mode sum of
  cavity.py, integrated in closed form over the side wall, the bottom (or far head) and the
  head's inner face (duct_walls.py). On an open face the head's near field is taken in its subsonic limit
  (membrane wavenumber well above k, true for the (m,1) family): the air then slides over
  the face as fast as the face moves, :math:`|u_t| \approx \omega|w|`, so the term is
  :math:`W = i\omega z_v \int\phi\phi\,dA`; the thermal part there is smaller by about
  :math:`(k/\kappa)^2` and is left out. The film is taken as isothermal (its heat capacity
  per area is a thousand times the thermal layer's).
* Edge. The head pulls on the rim with the vertical line force
  :math:`F = T\,w'(a) - D\,(\nabla^2 w)'(a)`; a rim of real line mobility Y_e takes the power
  :math:`\tfrac12 Y_e|F|^2` per unit length (the mobility power formula: Cremer, Heckl &
  Petersson, Structure-Borne Sound, 2005), so :math:`W = (i/\omega)\,Y_e\,a\,\pi_m\,f f^T`.
  For an ideal membrane this damps every mode at the same rate, Im omega = Y_e T / a.

Air properties: dynamic viscosity by Sutherland's law (constants from F. M. White, Viscous
Fluid Flow, 2nd ed., 1991, Table 1-2), Prandtl number 0.71 (from memory), the temperature
from the sound speed of the drum's air (c^2 = gamma R T).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from scipy import special

from ..bessel import lommel
from ..drum import GAMMA_AIR, R_DRY_AIR
from .duct_walls import DuctWalls, duct_wall_forms  # noqa: F401 (duct_wall_forms: the definition)
from .vacuum import ratio_i

# Sutherland's law for air (White, Viscous Fluid Flow, 1991, Table 1-2).
SUTHERLAND_MU0 = 1.716e-5  # Pa s at T0
SUTHERLAND_T0 = 273.15  # K
SUTHERLAND_S = 110.4  # K
PRANDTL_AIR = 0.71  # from memory (0.709-0.713 tabulated near 20 degC)


# ----------------------------------------------------------------------------- the air
def air_viscosity(temperature: float) -> float:
    """Dynamic viscosity of air in Pa s at an absolute temperature in K (Sutherland)."""
    t = float(temperature)
    return SUTHERLAND_MU0 * (t / SUTHERLAND_T0) ** 1.5 * (SUTHERLAND_T0 + SUTHERLAND_S) / (t + SUTHERLAND_S)


def air_temperature(sound_speed: float) -> float:
    """Absolute temperature in K of dry air with the given sound speed in m/s."""
    return float(sound_speed) ** 2 / (GAMMA_AIR * R_DRY_AIR)


def viscous_layer_impedance(omega, *, density: float, viscosity: float):
    r"""Stokes-layer impedance :math:`z_v = (1+i)\sqrt{\omega\rho\mu/2}`, N s/m^3.

    The wall shear stress per unit tangential slip velocity of an oscillating flow over a
    rigid wall (e^{i omega t}); its real part dissipates, its imaginary part is the mass
    :math:`\rho\delta_v/2` per unit area carried in the layer.

    Parameters
    ----------
    omega : complex or array_like
        Angular frequency in rad/s.
    density : float
        kg/m^3.
    viscosity : float
        Dynamic viscosity in Pa s.
    """
    return (1.0 + 1.0j) * np.sqrt(np.asarray(omega, dtype=complex) * density * viscosity / 2.0)


def thermal_layer_admittance(omega, *, density: float, sound_speed: float, viscosity: float,
                             prandtl: float = PRANDTL_AIR, gamma: float = GAMMA_AIR):
    r"""Thermal-layer admittance of an isothermal wall, m/(Pa s).

    :math:`y_t = (1+i)(\gamma-1)\,\omega\delta_t/(2\rho c^2)`, :math:`\delta_t =
    \sqrt{2\mu/(\rho\omega Pr)}`: the normal velocity into the wall per unit pressure that
    the heat exchange with the wall amounts to (e^{i omega t}; real part absorbs).

    Parameters
    ----------
    omega : complex or array_like
        rad/s.
    density, sound_speed, viscosity : float
        kg/m^3, m/s, Pa s.
    prandtl, gamma : float
        Prandtl number and ratio of specific heats, dimensionless.
    """
    omega = np.asarray(omega, dtype=complex)
    delta_t = np.sqrt(2.0 * viscosity / (density * omega * prandtl))
    return (1.0 + 1.0j) * (gamma - 1.0) * omega * delta_t / (2.0 * density * sound_speed**2)


# ----------------------------------------------------------------------------- the head
def tension_gram(space) -> np.ndarray:
    r""":math:`\int|\nabla\phi|^2 dA` over the Ritz space (basis and rim function), (size, size).

    Dimensionless (the integral is scale-free in two dimensions). In closed form: every
    function of the space vanishes at the rim, so by Green's identity the Gram matrix is
    :math:`-\pi_m\langle\phi_i, L\phi_j\rangle`, L the Bessel operator of order m
    (:math:`L u = u'' + u'/r - m^2 u/r^2`), and each function is a sum of atoms that L maps
    onto atoms: :math:`L J_m(kr) = -k^2 J_m(kr)`, :math:`L \hat I_m(kr) = k^2 \hat I_m(kr)`
    (:math:`\hat I` normalised to 1 at the rim, as in vacuum.py), :math:`L x^{m+2} = 4(m+1)
    x^m / a^2`, :math:`L x^m = 0` (x = r/a). The atoms' overlaps are Lommel's integrals (and
    their modified-Bessel forms) and :math:`\int r^{m+1} J_m = r^{m+1} J_{m+1}/k`,
    :math:`\int r^{m+3} J_m = r^{m+3} J_{m+1}/k - 2 r^{m+2} J_{m+2}/k^2` (the same with I).
    Checked against scipy's adaptive quadrature in tests/test_dissipation.py (to 1e-13).
    """
    b = space.basis
    m, a = b.m, b.radius
    N = b.size
    k1 = b.k1
    stiff = b.k2 is not None
    rim = space.rim
    with_is = rim and space.ks is not None
    # atoms: J(k1 r) per mode, I^(k2 r) per mode (stiff), x^(m+2), x^m, I^(ks r) (rim)
    kind = ["J"] * N + (["I"] * N if stiff else []) + (["P2", "P0"] if rim else []) \
        + (["I"] if with_is else [])
    kv = np.concatenate([k1, b.k2 if stiff else [], [0.0, 0.0] if rim else [],
                         [float(space.ks)] if with_is else []])
    kind = np.array(kind)
    n_atoms = len(kind)
    C = np.zeros((space.size, n_atoms))  # each function of the space in atoms
    C[np.arange(N), np.arange(N)] = 1.0
    if stiff:
        C[np.arange(N), N + np.arange(N)] = b.c
    J, I, P2, P0 = (kind == "J"), (kind == "I"), (kind == "P2"), (kind == "P0")
    if rim:
        C[N, P2], C[N, P0] = 1.0, -space.a1
        if with_is:
            C[N, n_atoms - 1] = -space.b1
    M = np.zeros((n_atoms, n_atoms))  # overlaps <atom, atom> = int u v r dr
    kj = kv[J]
    xj = kj * a
    jm, djm = special.jv(m, xj), special.jvp(m, xj)
    M[np.ix_(J, J)] = lommel(m, kj[:, None], kj[None, :], a)
    if I.any():
        ki = kv[I]
        y = ki * a
        i0, i1 = special.ive(m, y), special.ive(m + 1, y)
        rho = i1 / i0  # I_{m+1} / I_m
        ratio = rho + m / y  # I_m' / I_m
        ji = a * (jm[:, None] * (ki * ratio)[None, :] - (kj * djm)[:, None]) \
            / (kj[:, None] ** 2 + ki[None, :] ** 2)
        M[np.ix_(J, I)], M[np.ix_(I, J)] = ji, ji.T
        # I^ I^: a (k_p R_p - k_q R_q) / (k_p^2 - k_q^2); the m/a of R cancels exactly
        num = (ki * rho)[:, None] - (ki * rho)[None, :]
        den = ki[:, None] ** 2 - ki[None, :] ** 2
        same = np.abs(den) <= 1e-12 * ki[:, None] ** 2
        diag = 0.5 * a * a * (1.0 + m * m / (y * y) - ratio * ratio)
        M[np.ix_(I, I)] = np.where(same, diag[:, None], a * num / np.where(same, 1.0, den))
        if rim:
            q2 = special.ive(m + 2, y) / i0
            ip0, ip2 = a * rho / ki, a * rho / ki - 2.0 * q2 / ki**2
            M[np.ix_(I, P0)], M[np.ix_(P0, I)] = ip0[:, None], ip0[None, :]
            M[np.ix_(I, P2)], M[np.ix_(P2, I)] = ip2[:, None], ip2[None, :]
    if rim:
        jm1, jm2 = special.jv(m + 1, xj), special.jv(m + 2, xj)
        jp0, jp2 = a * jm1 / kj, a * jm1 / kj - 2.0 * jm2 / kj**2
        M[np.ix_(J, P0)], M[np.ix_(P0, J)] = jp0[:, None], jp0[None, :]
        M[np.ix_(J, P2)], M[np.ix_(P2, J)] = jp2[:, None], jp2[None, :]
        M[np.ix_(P2, P2)] = a * a / (2 * m + 6)
        M[np.ix_(P2, P0)] = M[np.ix_(P0, P2)] = a * a / (2 * m + 4)
        M[np.ix_(P0, P0)] = a * a / (2 * m + 2)
    # <atom, L atom>
    S = M * np.where(J, -kv**2, np.where(I, kv**2, 0.0))[None, :]
    if rim:
        S[:, P2] = (4.0 * (m + 1) / a**2) * M[:, P0]
    gram = -b.angular_weight * (C @ S @ C.T)
    return 0.5 * (gram + gram.T)  # symmetric to round-off: the mean of the two halves


def edge_force(space) -> np.ndarray:
    r"""Vertical line force on the rim per unit Ritz coordinate, :math:`T w'(a) - D (\nabla^2 w)'(a)`.

    For the space's own tension and bending stiffness (the unit space: radius 1, tension 1
    or s = T a^2/D with D = 1), shape (size,).
    """
    b, a, m = space.basis, space.radius, space.m
    tension = space.tension
    k1 = b.k1
    dj = special.jvp(m, k1 * a)
    slope = k1 * dj
    lap = np.zeros_like(k1)
    stiff = b.k2 is not None
    if stiff:
        ri = ratio_i(m, b.k2 * a)
        slope = slope + b.c * b.k2 * ri
        lap = -k1**3 * dj + b.c * b.k2**3 * ri
    out = tension * slope - (lap if stiff else 0.0)
    if space.rim:
        chi_slope = ((m + 2) - space.a1 * m) / a
        chi_lap = 4.0 * m * (m + 1) / a**3
        if space.ks is not None:
            ri = ratio_i(m, space.ks * a)
            chi_slope -= space.b1 * space.ks * ri
            chi_lap -= space.b1 * space.ks**3 * ri
        out = np.append(out, tension * chi_slope - (chi_lap if space.ks is not None else 0.0))
    return out


@lru_cache(maxsize=512)
def _unit_head_terms(shape):
    """Tension Gram matrix and edge force of the unit space of ``shape``."""
    from .operator import unit_space

    space = unit_space(shape)
    gram = space.K if shape.s is None else tension_gram(space)
    return gram, edge_force(space)


def head_terms(head_order, losses) -> tuple[np.ndarray, np.ndarray]:
    """Film and edge terms of one head: (W_film, E) with W_edge(omega) = (i / omega) E.

    Parameters
    ----------
    head_order : membrane.physics.coupled.HeadOrder
        The head's Ritz space at its physical size and tension.
    losses : membrane.losses.Losses

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Complex (size, size) in N/m, and real (size, size) in N/m * rad/s.
    """
    shape, h = head_order.shape, head_order.head
    gram, f_unit = _unit_head_terms(shape)
    tension, a = h.tension, head_order.radius
    if shape.s is None:  # no bending stiffness: the unit stiffness is the tension part
        k_t, k_d, t_unit = head_order.K, np.zeros_like(head_order.K), 1.0
    else:
        t_unit = shape.s
        k_t = tension * gram
        k_d = head_order.K - k_t
    w_film = 1j * (losses.tension_loss_factor * k_t + losses.film_loss_factor * k_d)
    f = (tension / (a * t_unit)) * f_unit
    weight = 2 * np.pi if head_order.m == 0 else np.pi
    edge = losses.edge_mobility * a * weight * np.outer(f, f)
    return w_film, edge


class RootLosses:
    """The loss terms of every order of a :class:`membrane.physics.coupled.RootSet`.

    Parameters
    ----------
    rs : RootSet
        Its orders, air and duct data.
    losses : membrane.losses.Losses
    """

    def __init__(self, rs, losses):
        self.losses = losses
        self.rho, self.c = rs.rho, rs.c
        if losses.boundary_layers:
            self.mu = air_viscosity(air_temperature(rs.c))
        self.orders = [self._order(rs, o, d) for o, d in zip(rs.orders, rs.data)]

    def _order(self, rs, order, d):
        from .operator import block_diag as _block_diag

        film, edge, face = [], [], []
        for h in order.heads:
            wf, e = head_terms(h, self.losses)
            film.append(wf)
            edge.append(e)
            face.append(h.M / h.head.areal_density)
        n = sum(h.size for h in order.heads)
        out = {"film": _block_diag_c(film), "edge": _block_diag(edge),
               "face": order.faces * _block_diag(face), "duct": None, "m": order.m,
               "radius": order.heads[0].radius}
        if self.losses.boundary_layers and order.depth is not None:
            Q = len(d["gamma"])
            off = d["offsets"]
            V = d["V"]
            heads = 1 if len(V) == 1 and order.cross_sign is None else 2  # a kettle: w_2 = 0
            amp = np.zeros((heads * Q, n))  # x -> (w_1, w_2)
            amp[:Q, off[0]:off[1]] = (V[0] / d["norms"][None, :]).T
            if len(V) == 2:
                amp[Q:, off[1]:off[2]] = (V[1] / d["norms"][None, :]).T
            elif order.cross_sign is not None:
                amp[Q:, :] = order.cross_sign * amp[:Q, :]
            out["duct"] = DuctWalls(amp, d["gamma"], d["norms"], order.heads[0].radius,
                                    order.depth, order.m, heads)
        return out

    def wall_coefficients(self, omega):
        """t and v of DuctWalls.forms at each omega: the thermal and viscous layers' terms."""
        omega = np.asarray(omega, dtype=complex)
        zv, yt = self._layers(omega)
        return 1j * omega**3 * self.rho**2 * yt, 1j * omega * zv

    def walls(self, i: int, skip: int = 0):
        """Order i's DuctWalls (None without a body or wall losses); with ``skip``, the one
        whose map leaves out the lowest ``skip`` duct modes (their fields are the contour
        solve's own unknowns there, and its form on them is field_wall_blocks')."""
        o = self.orders[i]
        if o["duct"] is None or not skip:
            return o["duct"]
        cache = o.setdefault("skipped", {})
        if skip not in cache:
            d = o["duct"]
            Q = len(d.gamma)
            amp = d.amp.copy()
            for h in range(d.heads):
                amp[h * Q:h * Q + skip] = 0.0
            cache[skip] = DuctWalls(amp, d.gamma, d.face_norms / (2 * np.pi if o["m"] == 0 else np.pi),
                                    o["radius"], d.depth, o["m"], d.heads)
        return cache[skip]

    def _layers(self, omega):
        zv = viscous_layer_impedance(omega, density=self.rho, viscosity=self.mu)
        yt = thermal_layer_admittance(omega, density=self.rho, sound_speed=self.c,
                                      viscosity=self.mu)
        return zv, yt

    def matrix(self, i: int, omega, *, outer: float, body: float, skip: int = 0) -> np.ndarray:
        """W(omega) of order i for each omega, (len omega, size, size), N/m.

        ``skip``: the walls' form leaves out the fields of the lowest ``skip`` duct modes
        (see :meth:`walls`)."""
        o = self.orders[i]
        omega = np.asarray(omega, dtype=complex)
        W = o["film"][None] + (1j / omega)[:, None, None] * o["edge"][None]
        if self.losses.boundary_layers:
            zv, yt = self._layers(omega)
            if outer:
                W = W + outer * (1j * omega * zv)[:, None, None] * o["face"][None]
            if body and o["duct"] is not None:
                W = W + body * self.walls(i, skip).forms(
                    omega / self.c, 1j * omega**3 * self.rho**2 * yt, 1j * omega * zv)
        return W


def _block_diag_c(blocks):
    n = sum(b.shape[0] for b in blocks)
    out = np.zeros((n, n), complex)
    i = 0
    for b in blocks:
        out[i:i + b.shape[0], i:i + b.shape[0]] = b
        i += b.shape[0]
    return out
