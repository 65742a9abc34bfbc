"""membrane.assignment against scipy.optimize.linear_sum_assignment (the reference)."""

import numpy as np
import pytest
from scipy.optimize import linear_sum_assignment as scipy_lsa

from membrane.assignment import linear_sum_assignment


@pytest.mark.parametrize("shape", [(1, 1), (3, 3), (5, 9), (9, 5), (12, 12), (20, 7), (7, 20), (40, 40)])
@pytest.mark.parametrize("maximize", [False, True])
def test_same_assignment_as_scipy(shape, maximize):
    rng = np.random.default_rng(sum(shape) + maximize)
    for trial in range(20):
        if trial % 2:
            cost = rng.integers(0, 4, shape).astype(float)  # many ties: the tie rule matters
        else:
            cost = rng.normal(size=shape) * 10 ** rng.uniform(-3, 3)
        ours, theirs = linear_sum_assignment(cost, maximize), scipy_lsa(cost, maximize)
        np.testing.assert_array_equal(ours[0], theirs[0])
        np.testing.assert_array_equal(ours[1], theirs[1])


def test_forbidden_pairs_and_bad_input_as_scipy():
    cost = np.array([[np.inf, 1.0, 2.0], [3.0, np.inf, 1.0], [1.0, 1.0, np.inf]])
    for a, b in zip(linear_sum_assignment(cost), scipy_lsa(cost)):
        np.testing.assert_array_equal(a, b)
    for bad in (np.array([[np.inf, np.inf], [1.0, 2.0]]), np.array([[np.nan, 1.0], [1.0, 2.0]])):
        with pytest.raises(ValueError):
            scipy_lsa(bad)
        with pytest.raises(ValueError):
            linear_sum_assignment(bad)
    rows, cols = linear_sum_assignment(np.zeros((0, 3)))
    assert rows.size == 0 and cols.size == 0
