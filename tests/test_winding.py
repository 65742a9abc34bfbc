"""The turns of det T round a curve (contour.winding) count the roots placed inside it."""

import numpy as np
import pytest

from membrane.physics.contour import TooMany, circle_points, deflated_winding, winding


def _diagonal(roots, size=3, seed=0):
    """T(z) = Q diag(prod over the roots given to each entry of (z - r)) Q^-1: det T has
    exactly those roots, each once (its zeros are known without any contour)."""
    rng = np.random.default_rng(seed)
    Q = rng.normal(size=(size, size)) + 1j * rng.normal(size=(size, size))
    Qi = np.linalg.inv(Q)
    parts = [roots[k::size] for k in range(size)]

    def evaluate(z):
        z = np.asarray(z, complex)
        d = np.stack([np.prod(z[:, None] - np.asarray(p, complex)[None, :], axis=1)
                      if len(p) else np.ones(len(z), complex) for p in parts], axis=1)
        return np.einsum("ij,pj,jk->pik", Q, d, Qi)

    return evaluate


def _count(evaluate, centre, radius, points, aspect=1.0):
    z, _, _ = circle_points(centre, radius, points, aspect)
    return winding(evaluate, evaluate(z), centre, radius, aspect)


def _crowd(seed, count, half_width, half_height, clear, aspect):
    """Roots placed at random round the curve (centre 10, radius 1) and at least ``clear``
    of it, with the mask of those inside: an independent, geometric count."""
    rng = np.random.default_rng(seed)
    roots = 10.0 + rng.uniform(-half_width, half_width, count) \
        + 1j * rng.uniform(-half_height, half_height, count)
    d = np.abs(((roots.real - 10.0) ** 2 + (roots.imag / aspect) ** 2) ** 0.5 - 1.0)
    roots = roots[d > clear]
    return roots, (roots.real - 10.0) ** 2 + (roots.imag / aspect) ** 2 < 1.0


@pytest.mark.parametrize("aspect", [1.0, 0.5])
def test_the_turns_of_det_count_a_crowd_of_roots_inside(aspect):
    # clear of the curve by 2 % so the phase can be resolved by halving arcs
    roots, mask = _crowd(3, 30, 1.3, 0.8, 0.02, aspect)
    inside = int(np.sum(mask))
    assert inside >= 5
    evaluate = _diagonal(list(roots))
    assert _count(evaluate, 10.0, 1.0, 24, aspect) == inside
    # with the roots inside given (some missed, a spurious one added), the arcs where
    # det T / prod (z - r) turns slowly are taken from it and the rest by the eigenvalues:
    # the roots just outside, 2 % from the curve, leave some of each
    z, _, _ = circle_points(10.0, 1.0, 24, aspect)
    T = evaluate(z)
    for given in (roots[mask] * (1 + 1e-9), np.append(roots[mask][2:], 10.1 + 0.05j)):
        assert winding(evaluate, T, 10.0, 1.0, aspect, roots=given) == inside


def test_a_root_close_to_the_curve_is_counted_by_halving_arcs_not_missed():
    # 1e-3 of the radius inside the curve, between two of 16 nodes: the phase turns by
    # nearly pi across that arc (a principal value alone could go either way)
    theta = 2 * np.pi / 16  # a node's angle lies at odd multiples of pi / 16
    r = 0.999 * np.exp(1j * theta)
    assert _count(_diagonal([10.0 + r, 10.2]), 10.0, 1.0, 16) == 2
    r_out = 1.001 * np.exp(1j * theta)
    assert _count(_diagonal([10.0 + r_out, 10.2]), 10.0, 1.0, 16) == 1


def test_a_root_on_the_curve_is_refused_not_guessed():
    # 1e-9 of the radius from the curve, off every node the halvings place (the arcs are
    # 1/1024 of the curve after six): its turn of nearly pi falls between two of them
    theta = 2 * np.pi / 16 + 2e-3
    with pytest.raises(TooMany):
        _count(_diagonal([10.0 + (1 + 1e-9) * np.exp(1j * theta)]), 10.0, 1.0, 16)


def _deflated(evaluate, roots_given, centre, radius, points, aspect=1.0):
    z, _, _ = circle_points(centre, radius, points, aspect)
    return deflated_winding(evaluate(z), centre, radius, aspect, roots_given)


@pytest.mark.parametrize("aspect", [1.0, 0.5])
def test_det_divided_by_the_moments_roots_counts_the_crowd_whatever_roots_it_is_given(aspect):
    # the count is the placed roots inside the ellipse (an independent, geometric count).
    # Given every root, only those inside (what the moments hold), or two missed and a
    # spurious one added, the deflated count is that number: the roots only smooth q
    # clear of the curve by 30 % of the radius, so q = det T / prod (z - r) is resolved by
    # 64 nodes whichever roots are divided out
    roots, inside_mask = _crowd(5, 40, 1.6, 1.0, 0.3, aspect)
    inside = int(np.sum(inside_mask))
    assert inside >= 5
    evaluate = _diagonal(list(roots))
    # every root given, inside and out: q is a constant, and 24 nodes do
    assert _deflated(evaluate, roots, 10.0, 1.0, 24, aspect) == inside
    # the roots inside only, with round-off-sized errors
    assert _deflated(evaluate, roots[inside_mask] * (1 + 1e-9), 10.0, 1.0, 64, aspect) == inside
    # two roots missed and a spurious one (no root of det T) added
    spurious = np.concatenate([roots[inside_mask][2:], [10.1 + 0.05j]])
    assert _deflated(evaluate, spurious, 10.0, 1.0, 64, aspect) == inside


def test_det_divided_by_the_roots_counts_one_missed_root_far_from_the_curve():
    # one root at the centre, not given: q = det T turns once, slowly, round the curve
    evaluate = _diagonal([10.0, 10.5 + 0.1j])
    assert _deflated(evaluate, [10.5 + 0.1j], 10.0, 1.0, 24) == 2
    assert _deflated(evaluate, [], 10.0, 1.0, 24) == 2
    # a spurious root (not of det T) given inside: q has a pole there, and the count is
    # still the true one
    assert _deflated(evaluate, [10.0, 10.5 + 0.1j, 9.6], 10.0, 1.0, 24) == 2


def test_det_divided_by_the_roots_refuses_a_missed_root_next_to_the_curve():
    # a root 1e-3 of the radius inside the curve between two of 16 nodes, not given: q turns
    # by nearly pi across that arc, so the deflated count is refused, not guessed
    theta = 2 * np.pi / 16
    r = 10.0 + 0.999 * np.exp(1j * theta)
    evaluate = _diagonal([r, 10.2])
    assert _deflated(evaluate, [10.2], 10.0, 1.0, 16) is None
    # given, it lies between the arc and its chord (0.999 > cos(pi / 16)), where a chord's
    # step is not the arc's turn: still refused, and the count by the eigenvalues' turns
    # (halving that arc) has it
    assert _deflated(evaluate, [r, 10.2], 10.0, 1.0, 16) is None
    z, _, _ = circle_points(10.0, 1.0, 16)
    assert winding(evaluate, evaluate(z), 10.0, 1.0, roots=[r, 10.2]) == 2
    # as close to the curve, but by a node (no chord passes it): given, it is divided out
    # and counted; a count by the eigenvalues alone needs that arc halved
    r_node = 10.0 + 0.999 * np.exp(1j * np.pi / 16)
    evaluate = _diagonal([r_node, 10.2])
    assert _deflated(evaluate, [r_node, 10.2], 10.0, 1.0, 16) == 2
    assert _deflated(evaluate, [10.2], 10.0, 1.0, 16) is None
