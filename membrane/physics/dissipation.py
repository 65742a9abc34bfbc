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
def _basis_values(basis, r):
    """phi_n(r) and d phi_n / dr, each (N, len r), for an ideal or stiff basis, 0 < r <= a.

    Two Bessel evaluations per point for each part: J_m, J_{m+1} (J_m' = (m/x) J_m - J_{m+1})
    and the scaled I_m, I_{m+1} (I_m' = I_{m+1} + (m/x) I_m), the I part normalised by its
    edge value as in vacuum.py.
    """
    m, a = basis.m, basis.radius
    r = np.atleast_1d(np.asarray(r, dtype=float))
    x = np.outer(basis.k1, r)
    jm, jm1 = special.jv(m, x), special.jv(m + 1, x)
    phi = jm
    dphi = basis.k1[:, None] * ((m / x) * jm - jm1)
    if basis.k2 is not None:
        k2 = basis.k2[:, None]
        y = k2 * r[None, :]
        scale = basis.c[:, None] * np.exp(k2 * (r[None, :] - a)) / special.ive(m, k2 * a)
        im, im1 = special.ive(m, y), special.ive(m + 1, y)
        phi = phi + scale * im
        dphi = dphi + scale * k2 * (im1 + (m / y) * im)
    return phi, dphi


def _rim_slope(space, r):
    """d chi / dr of the Ritz space's rim function, (len r,)."""
    a, m = space.radius, space.m
    x = np.asarray(r, dtype=float) / a
    out = ((m + 2) * x ** (m + 1) - space.a1 * m * x ** max(m - 1, 0) * (m > 0)) / a
    if space.ks is not None:
        y = space.ks * x * a
        ihat = special.ive(m, y) / special.ive(m, space.ks * a) * np.exp(space.ks * a * (x - 1.0))
        out = out - space.b1 * space.ks * ihat * ratio_i(m, y)
    return out


def tension_gram(space) -> np.ndarray:
    r""":math:`\int|\nabla\phi|^2 dA` over the Ritz space (basis and rim function), (size, size).

    Dimensionless (the integral is scale-free in two dimensions); by Gauss-Legendre
    quadrature on the nodes that assemble the space.
    """
    from .ritz import radial_nodes as _radial_nodes

    r, w = _radial_nodes(space)
    b = space.basis
    phi, dphi = _basis_values(b, r)
    if space.rim:
        phi = np.vstack([phi, space.rim_shape(r)[None, :]])
        dphi = np.vstack([dphi, _rim_slope(space, r)[None, :]])
    m = space.m
    wr = w * r
    gram = (dphi * wr) @ dphi.T + m * m * (phi * (w / r)) @ phi.T
    return b.angular_weight * gram


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
    """Tension Gram matrix and edge force of the unit space of ``shape``.

    The Gram matrix of a stiff head depends on the dimensionless shape only, so, like the
    radiation tables, it is kept on disk between processes (table_cache.py: exact keys, the
    stored matrix is bit for bit the computed one).
    """
    from . import table_cache
    from .operator import unit_space

    space = unit_space(shape)
    if shape.s is None:
        gram = space.K
    else:
        name = table_cache.key("tension-gram", shape)
        stored = table_cache.load(name, {"gram": (space.size, space.size)})
        if stored is not None:
            gram = stored["gram"]
        else:
            gram = tension_gram(space)
            table_cache.store(name, gram=gram)
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
               "face": order.faces * _block_diag(face), "duct": None}
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

    def _layers(self, omega):
        zv = viscous_layer_impedance(omega, density=self.rho, viscosity=self.mu)
        yt = thermal_layer_admittance(omega, density=self.rho, sound_speed=self.c,
                                      viscosity=self.mu)
        return zv, yt

    def matrix(self, i: int, omega, *, outer: float, body: float) -> np.ndarray:
        """W(omega) of order i for each omega, (len omega, size, size), N/m."""
        o = self.orders[i]
        omega = np.asarray(omega, dtype=complex)
        W = o["film"][None] + (1j / omega)[:, None, None] * o["edge"][None]
        if self.losses.boundary_layers:
            zv, yt = self._layers(omega)
            if outer:
                W = W + outer * (1j * omega * zv)[:, None, None] * o["face"][None]
            if body and o["duct"] is not None:
                W = W + body * o["duct"].forms(omega / self.c, 1j * omega**3 * self.rho**2 * yt,
                                               1j * omega * zv)
        return W


def _block_diag_c(blocks):
    n = sum(b.shape[0] for b in blocks)
    out = np.zeros((n, n), complex)
    i = 0
    for b in blocks:
        out[i:i + b.shape[0], i:i + b.shape[0]] = b
        i += b.shape[0]
    return out
