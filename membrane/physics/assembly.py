r"""A drum as coupled eigenproblems, solved and labelled: orders, roots, labels (full physics).

For each angular order m the drum is one eigenproblem of the operator Z(omega) (operator.py) on
its head's Ritz space (two heads' for a shell with unequal heads; a shell of two identical
heads is two problems, in-phase and opposed, by symmetry). Every root of each problem in a
frequency window comes from the contour solve of spectrum.py; each root gets a head fraction
and a label (docs/mode-identity.md): the in-vacuum mode (m,n) it holds most of, or the body's
air resonance it is. solver.py turns them into Mode rows.

About 430 lines on purpose: the labels, the coverage test that ends an order's scan and the
carried solve of an order at a new tension all rest on the same energy forms of an order
(:func:`mode_energy`, :func:`mode_amplitudes`) and on one another (the carried solve labels
and checks coverage as a whole solve does); apart, each would import the others.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..notation import LN1000
from .cavity import duct_wavenumbers
from .operator import DEFAULT, HeadOrder, Order, RootSet, Settings


def identical_heads(h1, h2) -> bool:
    """Whether two heads are the same in every property the coupled solve uses."""
    return h1.vibrates_like(h2)  # one home: membrane.drum.Head.vibrates_like


def drum_orders(drum, *, m_max: int, n_max: int, settings: Settings) -> list:
    """The eigenproblems of a drum: one Order per m, two per m for identical shell heads
    (in-phase and opposed, solved on one head's space by symmetry)."""
    head, res = drum.head, drum.resonant_head
    count = n_max + settings.extra_modes
    kind = drum.body.kind
    # Drum holds its own invariants (a kettle has a volume, a shell a depth and a resonant head
    # of the same diameter), so nothing is re-validated here
    depth, faces = (drum.air_depth, 1) if kind in ("kettle", "shell") else (None, 2)
    orders = []
    for m in range(m_max + 1):
        h1 = HeadOrder(head, m=m, count=count, rim=settings.rim)
        if kind != "shell":
            orders.append(Order(m, [h1], faces, depth))
        elif identical_heads(head, res):
            orders += [Order(m, [h1], faces, depth, cross_sign=+1),
                       Order(m, [h1], faces, depth, cross_sign=-1)]
        else:
            h2 = HeadOrder(res, m=m, count=count, rim=settings.rim, radius=head.radius)
            orders.append(Order(m, [h1, h2], faces, depth))
    return orders


@dataclass
class OrderRoots:
    """The roots of one order, weighed and labelled.

    Attributes
    ----------
    order : Order
    omega : numpy.ndarray
        Complex angular frequencies, rad/s, ascending in real part.
    vectors : numpy.ndarray
        Ritz vectors (R, size), unit M-norm.
    head_fraction : numpy.ndarray
        Share of each root's energy in the head(s) (energy_share.head_fractions).
    labels : list
        Per root: ("head", head index, n) for the root that is most the in-vacuum mode n of
        that head, ("air", q, p) for a root that is mostly the body's air (duct mode q
        radially, p half-waves along the depth), or None for a root left out (a head mode
        above n_max).
    root_set : RootSet or None
        The operators the roots are roots of (this order at ``index``), to carry them on
        (continuation.py) or take their derivatives (sensitivity.py) without building them
        again.
    index : int
        The order's index in ``root_set``.
    window : float
        Angular frequency up to which every root of the order was searched for, rad/s (the
        top of the whole solve's scan; NaN if unknown).
    """

    order: Order
    omega: np.ndarray
    vectors: np.ndarray
    head_fraction: np.ndarray
    labels: list
    root_set: object = None
    index: int = 0
    window: float = math.nan


def mode_energy(order, vectors) -> np.ndarray:
    """Energy share of each root in each in-vacuum mode of each head: (R, heads, modes)."""
    parts = []
    for h, head in enumerate(order.heads):
        lo = sum(x.size for x in order.heads[:h])
        coef = np.array([head.unit.to_basis(v[lo: lo + head.size]) for v in vectors])
        mass = head.head.areal_density * head.radius**2 * head.unit.basis.modal_mass
        parts.append(np.abs(coef) ** 2 * mass[None, :])
    # the heads of a shell may hold different numbers of modes (a head whose rim function gave
    # way to one more mode, operator.RIM_RESIDUAL_FLOOR): the missing ones hold no energy
    width = max(p.shape[1] for p in parts)
    e = np.stack([np.pad(p, ((0, 0), (0, width - p.shape[1]))) for p in parts], axis=1)
    total = e.sum(axis=(1, 2))
    return e / np.where(total > 0, total, 1.0)[:, None, None]


def mode_amplitudes(order, vectors, n_max: int):
    """Mass-weighted amplitudes of in-vacuum modes 1..n_max on the two heads, each (R, n_max)."""
    out = []
    for h, head in enumerate(order.heads):
        lo = sum(x.size for x in order.heads[:h])
        coef = np.array([head.unit.to_basis(v[lo: lo + head.size])[:n_max] for v in vectors])
        mass = head.head.areal_density * head.radius**2 * head.unit.basis.modal_mass[:n_max]
        out.append(coef * np.sqrt(mass)[None, :])
    return out[0], out[1]


def covered_by(order, omega, vectors, frac, top: float, n_max: int) -> bool:
    """Whether the roots found below angular frequency ``top`` hold each head's first n_max
    in-vacuum modes (their energy shares, weighted by head fraction, add up to 0.6 or more
    over the roots) with room above the highest (a factor 1.25)."""
    e = mode_energy(order, vectors)[:, :, :n_max] * frac[:, None, None]
    best = np.argmax(e, axis=0)  # the root holding most of each mode
    if np.all(e.sum(axis=0) >= 0.6) and top >= 1.25 * np.max(omega[best].real):
        return True
    # a very light head over a deep body shares each mode among many of the body's air
    # resonances, whose crowd thickens with frequency (a 0.054 kg/m^2 head on an 18-inch
    # kettle: hundreds of roots of m = 2 below 10 kHz, the head's mode 3 still short of 0.6);
    # past twice both the highest in-vacuum mode wanted and the root holding most of it,
    # with a root for each head mode and each mode at least half-way held, the roots found
    # are taken as the order's (the air adds mass: a head mode is raised that far only by a
    # body's air spring, on a slack head, whose few roots fail this and pass the test below)
    vacuum = max(h.omega[n_max - 1] for h in order.heads)
    need = n_max * len(order.heads)
    if (len(omega) >= need and np.all(e.sum(axis=0) >= 0.3)
            and top >= 2.0 * max(vacuum, np.max(omega[best].real))):
        return True
    # a body that reshapes the modes (a very stiff air spring) spreads each in-vacuum mode
    # over many roots: then enough head-like roots, with room above, is the test
    head_like = np.sort(omega[frac >= 0.5].real)
    return bool(np.sum(frac) >= need + 0.5 and len(head_like) >= need
                and top >= 1.25 * head_like[need - 1])


def label_roots(order, omega, vectors, frac, *, n_max: int, sound_speed: float,
                rs=None, index: int = 0) -> list:
    """Labels for one order's roots (see :class:`OrderRoots`).

    Head mode (h, n) goes to the root holding most of its energy, weighted by the root's head
    fraction, by an optimal assignment over all the order's roots: through an avoided
    crossing with an air resonance the label passes from one root to the other where the two
    are equally that mode (docs/mode-identity.md). The other roots below the order's highest
    head mode that are mostly air (head fraction < 0.5) are air rows, named by the duct mode
    q their interior field is most made of (:func:`duct_content`, when the operators ``rs``
    of the order at ``index`` are given) and the rigid-walled resonance (q, p) of the body
    nearest in frequency.
    """
    from ..assignment import linear_sum_assignment  # scipy's algorithm without scipy.optimize's import

    R = len(omega)
    labels = [None] * R
    if not R:
        return labels
    e = mode_energy(order, vectors)[:, :, :n_max] * frac[:, None, None]
    heads = len(order.heads)
    top = -np.inf
    if heads == 1:
        rows, cols = linear_sum_assignment(-e[:, 0, :])
        # the chosen roots take n in order of frequency (a body that reshapes the modes
        # spreads each in-vacuum mode over several roots; the order is what stays)
        for n, (_, r) in enumerate(sorted((omega[r].real, r) for r in rows)):
            labels[r] = ("head", 0, n + 1)
            top = max(top, omega[r].real)
    else:
        # two heads of one shell: (m,n) is a pair of roots, the two holding most of the
        # heads' mode n together (so nearly equal heads, whose roots share both heads,
        # approach the identical pair continuously); each root is named after the head
        # that holds more of it
        pair = e.sum(axis=1)
        # one in-phase and one opposed member per pair, as the symmetric solve of identical
        # heads has: s = 2 Re(a b*) / (|a|^2 + |b|^2) over the mode's two coefficients
        # (mass-weighted) is +1 in phase, -1 opposed, 0 where one head holds the root
        a, b = mode_amplitudes(order, vectors, n_max)
        s = 2.0 * np.real(a * np.conj(b)) / np.maximum(np.abs(a) ** 2 + np.abs(b) ** 2, 1e-300)
        score = np.empty((R, 2 * n_max))
        score[:, 0::2] = pair * 0.5 * (1.0 + s)
        score[:, 1::2] = pair * 0.5 * (1.0 - s)
        rows, cols = linear_sum_assignment(-score)
        members = {}
        for r, c in zip(rows, cols):
            members.setdefault(int(c // 2), []).append(r)
            top = max(top, omega[r].real)
        for n, rs_ in members.items():
            share = [e[r, 0, n] / max(pair[r, n], 1e-300) for r in rs_]
            for k, r in enumerate(sorted(rs_, key=lambda r: -share[rs_.index(r)])):
                labels[r] = ("head", min(k, 1), n + 1)
    if order.depth is not None:
        air = [r for r in range(R) if labels[r] is None and frac[r] < 0.5 and omega[r].real <= top]
        if air:
            gamma = order_duct_gammas(order, count=len(air) + 4)
            cands = [(q, p, sound_speed * np.hypot(g, p * np.pi / order.depth))
                     for q, g in enumerate(gamma) for p in range(len(air) + 4)]
            # only those up to twice the highest air row (a crowd of air rows would
            # otherwise make the cost matrix cubic in their number)
            reach = 2.0 * max(omega[r].real for r in air)
            near = [c for c in cands if c[2] <= reach]
            cands = near if len(near) >= len(air) else cands
            # Squared log distance, not absolute: with both candidates below (or above) both
            # roots, the absolute costs of the two pairings are equal and round-off picks one;
            # the square is strictly convex, so the lower root takes the lower duct mode.
            cost = np.array([[np.log(omega[r].real / max(c[2], 1e-30)) ** 2 for c in cands]
                             for r in air])
            if rs is not None:
                # what the root's field is made of first: a duct mode holding a share s of
                # its body-air energy costs 1 - s (a whole duct mode outweighs any distance
                # between neighbouring resonances), the distance then picks p
                share = duct_content(rs, index, omega[air], vectors[air])
                qs = np.array([c[0] for c in cands])
                held = np.where(qs[None, :] < share.shape[1], share[:, np.minimum(qs, share.shape[1] - 1)], 0.0)
                cost = cost + (1.0 - held)
            ra, ca = linear_sum_assignment(cost)
            for i, j in zip(ra, ca):
                labels[air[i]] = ("air", cands[j][0], cands[j][1])
    return labels


def root_floor(order, *, density: float, sound_speed: float) -> float:
    r"""An angular frequency below which order ``order`` has no root, rad/s (generous).

    A head's lowest mode is lowered by the air it carries: the low-frequency added mass per
    area of a rigid baffled piston is :math:`8\rho a / 3\pi \approx 0.85\rho a` per face
    (its radiation mass 8 ρ a^3 / 3, from memory); a floor of each head's lowest in-vacuum
    mode times :math:`\sqrt{\sigma / (\sigma + 4\rho a)}`, over 1.2, allows more than twice
    that on both faces. The body's own air resonances: the lowest rigid-walled one of the
    order (the first half-wave c π / L for m = 0, the first duct mode's cut-on c γ for
    m ≥ 1) falls towards a quarter-wave resonance (half of it) where a compliant head closes
    the duct; the floor is 0.3 of it. Generous on purpose, a rule of thumb checked against
    whole scans from 1/8 of the lowest mode (tests/test_coupled_robust.py): the roots of
    light and heavy heads of 6 and 32 inches, with no body, a long kettle or a deep shell,
    lie at 1.3 to 2.6 times the floor.
    """
    out = np.inf
    for h in order.heads:
        sigma, a = h.head.areal_density, h.radius
        out = min(out, h.omega[0] * np.sqrt(sigma / (sigma + 4.0 * density * a)) / 1.2)
    if order.depth is not None:
        if order.m == 0:
            rigid = sound_speed * np.pi / order.depth
        else:
            rigid = sound_speed * float(order_duct_gammas(order, count=1)[0])
        out = min(out, 0.3 * rigid)
    return float(out)


def duct_content(rs, i: int, omega, vectors) -> np.ndarray:
    r"""Share of each root's body-air energy in each duct mode q of the body: (R, Q), rows
    summing to 1 (zeros without a body).

    The body's air enters Z as a sum over duct modes, :math:`S = \sum_q f_q(\omega)\,
    V_q V_q^T` (one head; :math:`f^{ab}_q` between the heads of a shell), so its share of a
    root's stored energy (the reactance theorem, energy_share.head_fractions) splits by
    mode: :math:`x^T S_q'\,x = \sum_{ab} (V_{aq}^T x_a)(V_{bq}^T x_b)\,f^{ab\prime}_q`.
    The duct mode a root is most made of is its interior field's largest part.
    """
    omega = np.asarray(omega, dtype=complex)
    order, d = rs.orders[i], rs.data[i]
    R = len(omega)
    if order.depth is None or not R:
        return np.zeros((R, 0))
    h = 1e-6 * np.abs(omega)
    pts = np.concatenate([omega + h, omega - h])
    fcot, fcsc = rs._duct_terms(d, order.depth, pts)
    V, off = d["V"], d["offsets"]
    x = np.asarray(vectors, dtype=complex)
    proj = [x[:, off[a]:off[a + 1]] @ V[a] for a in range(len(V))]  # (R, Q) per head
    c = np.zeros(proj[0].shape, complex)
    for a in range(len(V)):
        for b in range(len(V)):
            f = rs._duct_weights(order, fcot, fcsc, a, b)
            c += proj[a] * proj[b] * (f[:R] - f[R:]) / (2.0 * h)[:, None]
    mag = np.abs(c)
    return mag / np.maximum(mag.sum(axis=1, keepdims=True), 1e-300)


def order_duct_gammas(order, *, count: int) -> np.ndarray:
    """Transverse wavenumbers of the body's duct modes of this order, 1/m."""
    return duct_wavenumbers(m=order.m, count=count, radius=order.heads[0].radius)


def order_root_set(drum, *, m: int, n_max: int, settings: Settings = DEFAULT, losses=None,
                   cross_sign=None) -> "RootSet":
    """The operators of order m alone, as :func:`solve_drum` builds them (the same radiation
    tables and duct data), for local solves along a branch (branches.follow_root).

    ``cross_sign`` picks the in-phase (+1) or opposed (-1) problem of identical shell heads.
    """
    orders = [o for o in drum_orders(drum, m_max=m, n_max=n_max, settings=settings)
              if o.m == m and (cross_sign is None or o.cross_sign in (None, cross_sign))]
    order = orders[0]
    air = (drum.air.density, drum.air.sound_speed)
    k_max = [1.6 * max(h.omega[n_max] for h in order.heads) / air[1]]
    return RootSet([order], air=air, settings=settings, k_max=k_max, losses=losses)


def solve_drum(drum, *, m_max: int, n_max: int, settings: Settings = DEFAULT,
               losses=None, only=None) -> list:
    """Every root of every order of a drum, weighed and labelled: a list of OrderRoots.

    Roots come from the contour solve of spectrum.py in a window that grows until each
    order's n_max head modes (per head) are inside; nothing is continued from a guess.
    ``only`` (an m) solves that order alone.
    """
    from . import spectrum

    orders = drum_orders(drum, m_max=m_max, n_max=n_max, settings=settings)
    if only is not None:
        orders = [o for o in orders if o.m == only]
    air = (drum.air.density, drum.air.sound_speed)
    k_max = [1.6 * max(h.omega[n_max] for h in o.heads) / air[1] for o in orders]
    rs = RootSet(orders, air=air, settings=settings, k_max=k_max,
                 losses=losses)
    out = []
    for i, order in enumerate(orders):
        lowest = min(h.omega[0] for h in order.heads)
        top = max(h.omega[n_max - 1] for h in order.heads)
        reached = [math.nan]

        def covered(w, v, f, hi, margin=1.0, o=order):
            reached[0] = hi  # every root below is found; the scan stops at the first that covers
            return covered_by(o, w, v, f, hi / margin, n_max)

        omega, vecs, frac = spectrum.scan_order(
            rs, i, covered=covered, lowest=lowest, tol=settings.tol, rounds=settings.max_iter,
            ceiling=60.0 * top, floor=root_floor(order, density=air[0], sound_speed=air[1]))
        labels = label_roots(order, omega, vecs, frac, n_max=n_max, sound_speed=air[1],
                             rs=rs, index=i)
        out.append(OrderRoots(order, omega, vecs, frac, labels, rs, i, reached[0]))
    return out


def carry_order(prev, drum_at, steps: dict, *, n_max: int, settings: Settings = DEFAULT,
                losses=None, halvings: int = 0):
    """Order ``prev.order.m`` of a nearby drum from the solved roots ``prev`` by continuation.

    Parameters
    ----------
    prev : OrderRoots
        A solved order of one head (with its root set and window).
    drum_at : callable
        Changes of the parameters' logs (a dict like ``steps``) -> the drum there (``prev``'s
        drum at all zeros).
    steps : dict
        Parameter name (sensitivity.PARAMETERS) -> change of its log from ``prev``'s drum.
    n_max, settings, losses
        As for :func:`solve_drum` (the same as ``prev`` was solved with).
    halvings : int
        Where the step cannot be carried in one, it is taken in two halves, each of which may
        be halved again, this many times.

    Returns
    -------
    OrderRoots or None
        The carried roots, weighed and labelled as a whole solve would (continuation.py);
        None where a root cannot be carried clearly, or the head modes leave the window the
        whole solve searched (then solve the order whole). The window is ``prev``'s: roots
        above it, and roots that enter it, are not looked for.
    """
    from . import continuation

    if prev.root_set is None or len(prev.order.heads) != 1 or not math.isfinite(prev.window):
        return None
    rs_prev = prev.root_set
    if prev.index != 0 or len(rs_prev.orders) != 1:
        rs_prev = RootSet([prev.order], air=(rs_prev.rho, rs_prev.c), settings=rs_prev.settings,
                          k_max=[rs_prev.k_max[prev.index]], losses=losses)
    rs = order_root_set(drum_at(steps), m=prev.order.m, n_max=n_max, settings=settings, losses=losses)
    got = continuation.carry(prev, rs_prev, rs, steps, tol=settings.tol)
    if got is None:
        if halvings <= 0:
            return None
        half = {p: 0.5 * d for p, d in steps.items()}
        mid = carry_order(prev, drum_at, half, n_max=n_max, settings=settings, losses=losses,
                          halvings=halvings - 1)
        if mid is None:
            return None
        return carry_order(mid, lambda st: drum_at({p: half[p] + st[p] for p in st}), half,
                           n_max=n_max, settings=settings, losses=losses, halvings=halvings - 1)
    omega, vecs, frac = got
    order = rs.orders[0]
    labels = label_roots(order, omega, vecs, frac, n_max=n_max, sound_speed=rs.c, rs=rs)
    heads = [omega[r].real for r, lab in enumerate(labels) if lab is not None and lab[0] == "head"]
    # every head mode found again, with the whole solve's room above the highest (covered_by)
    if len(heads) != n_max or 1.25 * max(heads) > prev.window:
        return None
    return OrderRoots(order, omega, vecs, frac, labels, rs, 0, prev.window)


def decay_time(omega: complex) -> float:
    """T60 in s from a complex angular frequency: 3 ln 10 / Im omega.

    A decay rate within round-off of zero (|Im omega| below spectrum.ROUND_OFF of |omega|,
    either sign) is no loss at all: T60 is infinite (tables show it as beyond their limit).
    """
    from .spectrum import ROUND_OFF

    if omega.imag <= ROUND_OFF * abs(omega):
        return math.inf
    return LN1000 / omega.imag


def model_notes(drum, losses=None) -> list[str]:
    """What the full model includes and leaves out, for output (``losses`` as for
    :func:`full_modes`)."""
    from ..losses import decay_note

    notes = ["air loading from baffled radiation on each open face (an infinite rigid baffle "
             "at the rim: approximate for a drum without one)", decay_note(losses)]
    kind = drum.body.kind
    if kind == "kettle":
        notes.append("kettle modelled as a rigid cylinder of the bowl's volume under the head: "
                     "the bowl's shape enters only through its volume")
    elif kind == "shell":
        notes.append("shell modelled as a rigid cylinder of the given depth with a head at each "
                     "end, coupled through the enclosed air (in-phase / opposed pairs)")
    else:
        notes.append("no body: air on both faces of the head")
    if drum.head.bending_stiffness > 0:
        notes.append("bending stiffness of the film included (exact stiff in-vacuum modes)")
    return notes
