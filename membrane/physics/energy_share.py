r"""How much of a root's energy is in the head(s), and the vectors' normalisation.

A root of the coupled operator is shared between the head(s) and the air; the share in the
head (its *head fraction*) tells a head mode from a resonance of the body's own air
(assembly.label_roots, the tables' ``head_fraction``). Used by the whole-window scan and the
local solves of spectrum.py alike.
"""

from __future__ import annotations

import numpy as np


def body_weights(k, gamma, depth: float) -> np.ndarray:
    r"""How much of each duct mode's energy counts as the body's own air, 0..1, (R, Q).

    A duct mode that propagates at wavenumber k fills the body: weight 1. A cut-off one
    decays away from the head like :math:`\cosh\mu(L - z)`, :math:`\mu^2 = \gamma^2 - k^2`;
    its weight is twice the share of that field's energy in the far half of the depth,
    :math:`(y + \sinh y)/(2y + \sinh 2y)` with y = μL: 1 at cut-on (where the body's
    cross-wise resonances sit, filling the whole depth), about :math:`2e^{-y}` for a field
    held near the head (which is the head's added mass, not the body's air).
    """
    k = np.real(np.atleast_1d(k))[:, None]
    mu2 = gamma[None, :] ** 2 - k * k
    y = np.sqrt(np.maximum(mu2, 0.0)) * depth
    e1, e2 = np.exp(-y), np.exp(-2.0 * y)
    num = y * e2 + 0.5 * (e1 - e1 * e2)  # (y + sinh y) e^{-2y}
    den = 2.0 * y * e2 + 0.5 * (1.0 - e2 * e2)  # (2y + sinh 2y) e^{-2y}
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.where(y > 1e-8, 2.0 * num / den, 1.0)
    return np.where(mu2 <= 0, 1.0, np.clip(w, 0.0, 1.0))


def head_fractions(rs, i: int, omega, vecs) -> np.ndarray:
    r"""Share of each root's vibrational energy in the head(s), 0..1.

    For a lossless system the energy stored at a resonance is :math:`-\tfrac{\omega}{4}
    x^H Z'(\omega) x` (the reactance theorem); the body's air holds the part that comes from
    its S', each duct mode weighted by :func:`body_weights` (the air that only moves with a
    head, outside it and in the cut-off field next to it, is the head's added mass and
    counts with the head). The fraction is :math:`1 - x^T S_w' x / x^T Z' x` (bilinear
    forms: Z is complex symmetric), its real part clipped to [0, 1].
    """
    omega = np.asarray(omega, dtype=complex)
    out = np.ones(len(omega))
    order = rs.orders[i]
    if order.depth is None or not len(omega):
        return out
    gamma = rs.data[i]["gamma"]
    wts = body_weights(omega / rs.c, gamma, order.depth)
    h = 1e-6 * np.abs(omega)
    pts = np.concatenate([omega + h, omega - h])
    R = len(omega)
    z = rs.order_operator(i, pts)
    sp = rs.order_operator(i, pts, outer=0.0, head=False, duct_weights=np.vstack([wts, wts]))
    dz = np.einsum("rn,rnk,rk->r", vecs, z[:R] - z[R:], vecs)
    ds = np.einsum("rn,rnk,rk->r", vecs, sp[:R] - sp[R:], vecs)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = 1.0 - np.real(ds / dz)
    return np.clip(np.where(np.isfinite(frac), frac, 0.0), 0.0, 1.0)


def mass_normalised(rs, i, v):
    """Vectors scaled to unit M-norm, largest entry real and positive."""
    if not len(v):
        return v
    M = rs.data[i]["M"]
    nrm = np.sqrt(np.abs(np.einsum("rn,nk,rk->r", np.conj(v), M, v)))
    big = v[np.arange(len(v)), np.argmax(np.abs(v), axis=1)]
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.where(nrm > 0, np.abs(big) / big / nrm, 1.0)
    return v * s[:, None]
