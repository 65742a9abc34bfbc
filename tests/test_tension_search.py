"""The one tension search: roots of increasing functions with upward jumps, never unsettled."""

import math

import pytest

from membrane.tension_search import Beyond, Found, Jump, search

CLOSE = 1e-3 / 1200 * math.log(2)  # 0.001 cent


def counted(f):
    calls = []

    def g(x):
        calls.append(x)
        return f(x)
    return g, calls


@pytest.mark.parametrize("slope", [0.02, 0.5, 1.0])
def test_smooth_root_is_found_in_few_solves(slope):
    # exact: the root of slope * (x - 9) is x = 9; sqrt(T) scaling (slope 1/2) is the guess
    g, calls = counted(lambda x: slope * (x - 9.0))
    out = search(g, x0=8.0, g0=g(8.0), lo=0.0, hi=12.0, close=CLOSE)
    assert isinstance(out, Found)
    assert abs(out.x - 9.0) * slope < CLOSE
    assert len(calls) < 20


def test_a_target_inside_a_jump_is_reported_with_its_bracket():
    # exact: g jumps from -0.01 to +0.02 at x = 9.5, so no x gives g = 0
    f = lambda x: 0.5 * (x - 9.5) - 0.01 if x < 9.5 else 0.5 * (x - 9.5) + 0.02  # noqa: E731
    out = search(f, x0=8.0, g0=f(8.0), lo=0.0, hi=12.0, close=CLOSE)
    assert isinstance(out, Jump)
    assert out.x_lo < 9.5 <= out.x_hi and out.x_hi - out.x_lo < 1e-3
    assert out.g_lo < 0 < out.g_hi


def test_a_root_next_to_a_jump_is_still_found():
    # exact: g = 0.5 (x - 9) below a jump at x = 9.3
    f = lambda x: 0.5 * (x - 9.0) if x < 9.3 else 0.5 * (x - 9.0) + 0.3  # noqa: E731
    out = search(f, x0=11.0, g0=f(11.0), lo=0.0, hi=12.0, close=CLOSE)
    assert isinstance(out, Found) and abs(out.x - 9.0) < 1e-5


@pytest.mark.parametrize("x0, side", [(5.0, "low"), (2.0, "high")])
def test_targets_beyond_the_range(x0, side):
    # exact: g = 0.5 (x - 20) < 0 on [0, 12] (target too high); g + 30 > 0 (target too low)
    f = (lambda x: 0.5 * (x - 20.0)) if side == "high" else (lambda x: 0.5 * x + 30.0)
    out = search(f, x0=x0, g0=f(x0), lo=0.0, hi=12.0, close=CLOSE)
    assert isinstance(out, Beyond) and out.side == side
    assert out.x == (0.0 if side == "low" else 12.0)


def test_flat_then_steep_never_fails():
    # a slack head: g nearly flat at low tension, then rising; exact root at x = 10
    f = lambda x: 1e-4 * (x - 10.0) if x < 10.0 else 0.5 * (x - 10.0)  # noqa: E731
    out = search(f, x0=3.0, g0=f(3.0), lo=0.0, hi=12.0, close=CLOSE)
    assert isinstance(out, (Found, Jump))
    if isinstance(out, Found):
        assert abs(f(out.x)) < CLOSE


def test_several_targets_are_fitted_in_the_least_squares_sense():
    # exact: residuals x - 1 and x - 3 (in cents) are smallest together at their mean, x = 2
    from membrane.tension_search import fit

    out = fit(lambda p: [p[0] - 1.0, p[0] - 3.0], x0=[5.0], lower=[0.0], upper=[12.0])
    assert abs(out.x[0] - 2.0) < 1e-9 and out.solves > 0
    # and a bound holds: on [2.5, 12] the optimum is the bound itself
    out = fit(lambda p: [p[0] - 1.0, p[0] - 3.0], x0=[5.0], lower=[2.5], upper=[12.0])
    assert abs(out.x[0] - 2.5) < 1e-9


def test_with_a_derivative_the_search_takes_newton_steps():
    # g = ln(f / f*) of an ideal membrane, f ~ sqrt(T) (Rayleigh, from memory): slope 1/2;
    # with the slope at hand the first step lands on the root (one solve), without it the
    # secant needs a few more
    f = lambda x: 0.5 * (x - 8.0) + 0.02 * math.sin(x)  # noqa: E731  (a little curvature)
    df = lambda x: 0.5 + 0.02 * math.cos(x)  # noqa: E731
    g, calls = counted(f)
    out = search(g, x0=7.0, g0=f(7.0), lo=0.0, hi=12.0, close=CLOSE, slope=df)
    assert isinstance(out, Found) and abs(f(out.x)) < CLOSE and out.solves <= 3
    g2, calls2 = counted(f)
    plain = search(g2, x0=7.0, g0=f(7.0), lo=0.0, hi=12.0, close=CLOSE)
    assert isinstance(plain, Found) and out.solves <= plain.solves


def test_a_derivative_does_not_hide_a_jump():
    # the derivative of each smooth piece knows nothing of the jump between them: the target
    # inside the jump is still reported as one
    f = lambda x: 0.5 * (x - 8.0) + (0.3 if x > 8.1 else -0.3)  # noqa: E731
    g, _ = counted(f)
    out = search(g, x0=7.0, g0=f(7.0), lo=0.0, hi=12.0, close=CLOSE, slope=lambda x: 0.5)
    assert isinstance(out, Jump) and out.x_lo <= 8.1 <= out.x_hi


def test_gauss_newton_agrees_with_scipys_least_squares():
    # two residuals nonlinear in two logs, with a misfit left at the optimum and a bound on
    # the second parameter that is active: scipy.optimize.least_squares is the reference
    import numpy as np
    from scipy.optimize import least_squares

    from membrane.tension_search import fit

    def res(p):
        return np.array([100 * (np.exp(0.5 * p[0]) - 3.0) + 5 * p[1], 80 * (p[0] - 2.0) - 40 * p[1] ** 2,
                         3.0 * p[1] - 1.0])

    def jac(p):
        return np.array([[50 * np.exp(0.5 * p[0]), 5.0], [80.0, -80 * p[1]], [0.0, 3.0]])

    for upper in ([5.0, 5.0], [5.0, 0.1]):
        ref = least_squares(res, [1.0, 0.0], bounds=([0.0, -1.0], upper), xtol=1e-14, ftol=1e-14,
                            gtol=1e-14)
        out = fit(res, x0=[1.0, 0.0], lower=[0.0, -1.0], upper=upper, jacobian=jac)
        assert np.allclose(out.x, ref.x, atol=1e-7), (out.x, ref.x)
        assert out.solves < 15
