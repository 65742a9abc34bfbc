"""Loss parameters from measured decay: fit the ones the data can see, say what damps each partial.

Every loss term of the coupled operator is linear in its parameter (dissipation.py), and the
losses are small, so to first order a mode's decay rate (Im omega, 1/s) is

    r_k = r_k(0) + sum_p x_p s_kp,

r_k(0) the rate with the fitted parameters at zero (radiation, the air's boundary layers, the
film's bending loss), s_kp the rate one unit of parameter p adds. Each mechanism's rate is
the first-order perturbation of the radiation-only root by that mechanism's loss term (one
solve in all; :func:`perturbed_rates`); a shell drum takes one full solve per mechanism.
The parameters (tension loss factor; optionally the rim's edge mobility) are found by
non-negative least squares on the relative misfit of the measured rates, with uncertainties
from the residual scatter. A parameter the data cannot separate from another (too few
partials, or columns nearly alike) is not fitted and keeps its value.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from .losses import Losses

from .notation import LN1000  # noqa: E402
FITTABLE = ("tension_loss_factor", "edge_mobility")
# one unit of each parameter for the sensitivity solves (the terms are linear in them)
UNIT = {"tension_loss_factor": 1e-3, "edge_mobility": 1e-5}
MIN_T60 = 0.5  # s: shorter decays are measured too roughly to fit on (recording analysis)
MECHANISMS = ("radiation", "air boundary layers", "film bending", "tension loss", "rim")


@dataclass(frozen=True)
class LossFit:
    """Fitted loss parameters and what they predict.

    Attributes
    ----------
    losses : Losses
        The drum's losses with the fitted parameters.
    fitted : dict
        Parameter name -> (value, standard uncertainty or None).
    used : tuple
        (m, n, branch) of the partials fitted on.
    rows : tuple of dict
        Per matched partial: m, n, branch, measured and predicted T60 (s), the rate of each
        mechanism (1/s) and the one that dominates.
    rms_log_ratio : float
        Root-mean-square of ln(predicted / measured T60) over the partials fitted on.
    """

    losses: Losses
    fitted: dict
    used: tuple
    rows: tuple
    rms_log_ratio: float


def _rates(drum, losses, *, m_max, n_max, physics_losses="all"):
    from .solver import solve

    modes = solve(replace(drum, losses=losses), "full", m_max=m_max, n_max=n_max, losses=physics_losses)
    return {(mo.m, mo.n, mo.branch, mo.head): mo.omega.imag for mo in modes}


def _mechanism_losses(drum, names):
    """The loss parameters of each mechanism alone (None: that mechanism is absent)."""
    base = drum.losses
    zero = replace(base, tension_loss_factor=0.0, edge_mobility=0.0, film_loss_factor=0.0,
                   boundary_layers=False)
    out = {"air boundary layers": replace(zero, boundary_layers=base.boundary_layers),
           "film bending": replace(zero, film_loss_factor=base.film_loss_factor)}
    for name, label in zip(FITTABLE, ("tension loss", "rim")):
        value = UNIT[name] if name in names else getattr(base, name)
        out[label] = None if value == 0 else replace(zero, **{name: value})
    return out


def _root_set(drum, orders, n_max: int, *, losses):
    """The operators of ``orders`` with radiation tables reaching 1.6 x each order's n_max-th
    in-vacuum mode (the solved roots' range), and the given losses."""
    from .physics.operator import DEFAULT, RootSet

    air = (drum.air.density, drum.air.sound_speed)
    k_max = [1.6 * max(h.omega[n_max] for h in o.heads) / air[1] for o in orders]
    return RootSet(orders, air=air, settings=DEFAULT, k_max=k_max, losses=losses)


def _rate_shift(term, i: int, w: complex, x, dz) -> float:
    """The decay rate (1/s) a loss term (dissipation.RootLosses) adds to root w of order i,
    to first order (physics/sensitivity.shift)."""
    from .physics.sensitivity import shift

    return float(np.imag(shift(x, term.matrix(i, np.array([w]), outer=1.0, body=1.0)[0], dz)))


def perturbed_rates(drum, *, m_max: int, n_max: int, names=FITTABLE) -> dict | None:
    """:func:`mechanism_rates` from one solve with radiation damping only, each other
    mechanism's rate by first-order perturbation of its root (None for a shell drum, whose
    branch labels come from the full solve's pairing).

    Each loss term W_p(omega) of the operator is small and linear in its parameter
    (dissipation.py), so a simple root omega of Z(omega) x = 0 moves by
    ``-x^T W_p(omega) x / x^T Z'(omega) x`` (Z complex symmetric, x its own left vector:
    Güttel & Tisseur, "The nonlinear eigenvalue problem", Acta Numerica 26, 2017, section
    2; physics/sensitivity.py uses the same step for the tension). The neglected terms are
    of second order in the losses, as in the linear model of the rates this module fits.
    """
    if drum.body.kind == "shell":
        return None
    from .physics import dissipation
    from .physics.assembly import solve_drum
    from .physics.operator import DEFAULT
    from .physics.sensitivity import frequency_derivatives

    solved = solve_drum(drum, m_max=m_max, n_max=n_max, settings=DEFAULT, losses=None)
    rs = _root_set(drum, [od.order for od in solved], n_max, losses=None)
    air = (drum.air.density, drum.air.sound_speed)
    mechanisms = _mechanism_losses(drum, names)
    terms = {label: None if lo is None else dissipation.RootLosses(rs, lo)
             for label, lo in mechanisms.items()}
    out = {"radiation": {}, **{label: {} for label in mechanisms}}
    for i, od in enumerate(solved):
        n_air = 0
        for r, lab in enumerate(od.labels):
            if lab is None:
                continue
            if lab[0] == "air":  # as solver.full_modes keys them: n = -1, -2, ... up the order
                n_air += 1
                key = (od.order.m, -n_air, None, None)
            else:
                key = (od.order.m, lab[2], None, None)
            w = complex(od.omega[r])
            x = np.asarray(od.vectors[r], dtype=complex)
            rs.ensure_range(i, 1.05 * abs(w) / air[1])
            dz = frequency_derivatives(rs, i, [w], [x])[0]
            out["radiation"][key] = w.imag
            for label, term in terms.items():
                out[label][key] = 0.0 if term is None else _rate_shift(term, i, w, x, dz)
    return out


def rates_from_modes(modes, *, m_max: int, n_max: int, names=FITTABLE) -> dict | None:
    """:func:`mechanism_rates` from a table already solved with every loss of its drum
    (``modes.losses == "all"``, full physics), with no further coupled solve: each root's
    vector is the null vector of Z(omega) there (the smallest singular vector: Z is complex
    symmetric, so it is its own left vector), each mechanism's rate its first-order shift
    ``-x^T W_p x / x^T Z' x`` (as in :func:`perturbed_rates`), and radiation's the root's
    rate less the first-order shift of all the drum's own losses. None for a shell drum or
    a table of another kind, which then take :func:`mechanism_rates`.
    """
    drum = modes.drum
    if drum.body.kind == "shell" or modes.physics != "full" or modes.losses != "all":
        return None
    from .physics import dissipation
    from .physics.assembly import drum_orders
    from .physics.operator import DEFAULT
    from .physics.sensitivity import frequency_derivatives

    orders = drum_orders(drum, m_max=m_max, n_max=n_max, settings=DEFAULT)
    rs = _root_set(drum, orders, n_max, losses=drum.losses)
    air = (drum.air.density, drum.air.sound_speed)
    own = dissipation.RootLosses(rs, drum.losses)
    mechanisms = _mechanism_losses(drum, names)
    terms = {label: None if lo is None else dissipation.RootLosses(rs, lo)
             for label, lo in mechanisms.items()}
    index = {o.m: i for i, o in enumerate(orders)}
    out = {"radiation": {}, **{label: {} for label in mechanisms}}
    for mo in modes.modes:
        if mo.m > m_max or mo.n > n_max or mo.m not in index or mo.omega is None:
            continue
        i = index[mo.m]
        w = complex(mo.omega)
        rs.ensure_range(i, 1.05 * abs(w) / air[1])
        x = np.conj(np.linalg.svd(rs.order_operator(i, np.array([w]))[0])[2][-1])
        dz = frequency_derivatives(rs, i, [w], [x])[0]
        key = (mo.m, mo.n, mo.branch, mo.head)
        out["radiation"][key] = w.imag - _rate_shift(own, i, w, x, dz)
        for label, term in terms.items():
            out[label][key] = 0.0 if term is None else _rate_shift(term, i, w, x, dz)
    return out


def mechanism_rates(drum, *, m_max: int, n_max: int, names=FITTABLE,
                    perturbation: bool = True) -> dict:
    """Decay rate (1/s) of each mode split by mechanism, with the named parameters at one unit.

    Returns ``{"radiation": {key: r}, "air boundary layers": ..., "film bending": ...,
    "tension loss": ..., "rim": ...}`` with the parameters' entries per unit (UNIT) and the
    others at the drum's values; keys are (m, n, branch, head). With ``perturbation`` (not
    for a shell drum) one solve and first-order perturbation (:func:`perturbed_rates`);
    else one full solve per mechanism, each rate the difference from radiation alone.
    """
    if perturbation:
        rates = perturbed_rates(drum, m_max=m_max, n_max=n_max, names=names)
        if rates is not None:
            return rates
    kw = dict(m_max=m_max, n_max=n_max)
    solves = {"radiation": _rates(drum, drum.losses, physics_losses="radiation", **kw)}
    for label, lo in _mechanism_losses(drum, names).items():
        solves[label] = None if lo is None else _rates(drum, lo, **kw)
    # A root near the edge of a solve's window (an air mode of the body, most often) can be
    # found with one set of losses and not another: only modes every solve holds are split
    # by mechanism; a partial matched to another mode gets no loss numbers.
    keys = set(solves["radiation"]).intersection(*(set(v) for v in solves.values() if v is not None))
    rad = {k: v for k, v in solves["radiation"].items() if k in keys}
    out = {"radiation": rad}
    for label, r in solves.items():
        if label != "radiation":
            out[label] = {k: 0.0 for k in rad} if r is None else {k: r[k] - rad[k] for k in rad}
    return out


def fit_losses(drum, matches, *, m_max: int, n_max: int, names=FITTABLE, fit_on=None,
               rates=None) -> LossFit:
    """Fit loss parameters to the measured decay of matched partials.

    Parameters
    ----------
    drum : Drum
        The drum at the fitted tension (its ``losses`` give the values not fitted).
    matches : sequence
        Objects with ``m``, ``n``, ``branch``, ``head`` and ``partial.decay_rate`` (1/s) and
        ``partial.flags`` (identify.Match).
    m_max, n_max : int
        Orders to solve (covering the matches).
    names : sequence of str
        Parameters to try, from FITTABLE.
    fit_on : set of (m, n) or None
        Fit on these modes only (the others are predicted); default every usable partial.
    rates : dict or None
        :func:`mechanism_rates` of this drum with these names, if already computed (a fit
        on several subsets of one recording's partials needs them once).

    Returns
    -------
    LossFit
    """
    if rates is None:
        rates = mechanism_rates(drum, m_max=m_max, n_max=n_max, names=names)
    labels = dict(zip(FITTABLE, ("tension loss", "rim")))
    names = tuple(names)
    usable = []
    for mt in matches:
        key = (mt.m, mt.n, mt.branch, mt.head)
        r = mt.partial.decay_rate
        if key not in rates["radiation"] or not r > 0 or "fast" in mt.partial.flags:
            continue
        if LN1000 / r < MIN_T60 or (fit_on is not None and (mt.m, mt.n) not in fit_on):
            continue
        usable.append((key, r))
    values = {n: getattr(drum.losses, n) for n in FITTABLE}

    def contribution(mech, key, cols):
        """Rate of a mechanism at the drum's values, for a parameter not being fitted."""
        for c, lab in labels.items():
            if lab == mech:
                if c in cols:
                    return 0.0
                return rates[mech][key] * (values[c] / UNIT[c] if c in names else 1.0)
        return rates[mech][key]

    fitted = {}
    cols = list(names)
    while cols:
        if len(usable) < len(cols) + 1:  # too few partials: the last named parameter goes first
            cols = cols[:-1]
            continue
        y = np.array([(r - sum(contribution(m, k, cols) for m in MECHANISMS)) / r for k, r in usable])
        A = np.array([[rates[labels[c]][k] / r for c in cols] for k, r in usable])
        x, cov = _nnls_with_cov(A, y)
        sigma = [math.sqrt(cov[i, i]) if cov is not None else math.inf for i in range(len(cols))]
        if len(cols) > 1 and cov is not None and any(v == 0.0 for v in x):
            # the data want none of a mechanism (the bound is active): it is fitted as zero,
            # and the others are fitted again without it
            for i, c in enumerate(list(cols)):
                if x[i] == 0.0:
                    values[c] = 0.0
                    fitted[c] = (0.0, sigma[i] * UNIT[c])
                    cols.remove(c)
            continue
        rel = [sigma[i] / x[i] if x[i] > 0 else math.inf for i in range(len(cols))]
        if len(cols) > 1 and max(rel) > 1.0:  # a parameter the data cannot pin: fit without it
            cols.pop(int(np.argmax(rel)))
            continue
        for i, c in enumerate(cols):
            values[c] = float(x[i]) * UNIT[c]
            fitted[c] = (values[c], None if cov is None else math.sqrt(cov[i, i]) * UNIT[c])
        break
    losses = replace(drum.losses, **values)
    rows, logs = [], []
    used_keys = {k for k, _ in usable}
    for mt in matches:
        key = (mt.m, mt.n, mt.branch, mt.head)
        if key not in rates["radiation"]:
            continue
        parts = {m: rates[m][key] for m in MECHANISMS}
        for c, lab in labels.items():
            parts[lab] = parts[lab] / UNIT[c] * values[c] if c in names else parts[lab]
        total = sum(parts.values())
        measured = mt.partial.decay_rate
        pred_t60 = LN1000 / total if total > 0 else None
        rows.append({"m": mt.m, "n": mt.n, "branch": mt.branch, "head": mt.head,
                     "measured_t60_s": LN1000 / measured if measured > 0 else None,
                     "predicted_t60_s": pred_t60, "fitted_on": key in used_keys,
                     "rates_per_s": parts, "dominant": max(parts, key=parts.get)})
        if key in used_keys and pred_t60:
            logs.append(math.log(pred_t60 * measured / LN1000))
    return LossFit(losses=losses, fitted=fitted, used=tuple(k[:3] for k, _ in usable),
                   rows=tuple(rows), rms_log_ratio=float(np.sqrt(np.mean(np.square(logs)))) if logs else math.nan)


def _nnls_with_cov(A, y):
    """Non-negative least squares, and the covariance of the solution from the residual scatter."""
    from scipy.optimize import nnls

    x, _ = nnls(A, y)
    n, p = A.shape
    if n <= p:
        return x, None
    res = y - A @ x
    s2 = float(res @ res) / (n - p)
    try:
        cov = s2 * np.linalg.inv(A.T @ A)
    except np.linalg.LinAlgError:
        return x, None
    return x, cov
