"""The contour solve's probe block (and its fallback to the whole inverse) against scipy's
generalised eigenvalues of a linear pencil, and the command line's allocator setting."""

import platform

import numpy as np
import pytest
from scipy import linalg

from membrane.physics import contour


def _pencil(n, inside, seed):
    """A - z B (n x n) with ``inside`` eigenvalues in the unit circle round 10, the rest far."""
    rng = np.random.default_rng(seed)
    lam = np.concatenate([10 + 0.6 * rng.uniform(-1, 1, inside) + 0.3j * rng.uniform(-1, 1, inside),
                          30 + 5 * rng.uniform(0, 1, n - inside)])
    X = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
    B = rng.standard_normal((n, n)) + n * np.eye(n)
    A = B @ X @ np.diag(lam) @ np.linalg.inv(X)
    return A, B


@pytest.mark.parametrize("inside", [5, 30])  # 5: the probe block's path; 30: past it, the whole inverse
def test_eigenvalues_inside_a_circle_match_scipy(inside):
    n = 40
    assert n >= 2 * contour.PROBE
    A, B = _pencil(n, inside, seed=inside)
    # independent: scipy's QZ on the same pencil
    ref = linalg.eigvals(A, B)
    ref = np.sort_complex(ref[np.abs(ref - 10) < 0.95])
    assert len(ref) == inside
    got, vecs = contour.eigen_in_circle(lambda z: A[None] - z[:, None, None] * B[None], 10.0, 1.0,
                                        points=96 if inside > 8 else 48, blocks=2, margin=0.95)
    assert len(got) == inside
    assert np.max(np.abs(np.sort_complex(got) - ref)) < 1e-8
    # each vector is a null vector of A - z B (to the contour's accuracy)
    for z, v in zip(got, vecs):
        assert np.linalg.norm((A - z * B) @ v) < 1e-6 * np.linalg.norm(A - z * B, 2)


@pytest.mark.skipif(platform.system() != "Linux" or platform.libc_ver()[0] != "glibc",
                    reason="mallopt is glibc's")
def test_the_allocator_takes_the_thresholds():
    from membrane.heap import keep_freed_memory

    assert keep_freed_memory() is True
