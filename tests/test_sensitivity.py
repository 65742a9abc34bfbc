"""A root's derivative in the drum's parameters by perturbation equals the whole solve's."""

import math
from dataclasses import replace

import numpy as np
import pytest

from membrane.branches import labelled_root
from membrane.drum import load_drum
from membrane.physics.assembly import order_root_set, solve_drum
from membrane.physics.sensitivity import log_slopes

H = 1e-4  # step in each log for the central differences of whole solves


def _frequency(drum, m, n):
    od = solve_drum(drum, m_max=m, n_max=3, only=m, losses=drum.losses)[0]
    return od.omega[labelled_root(od, n)].real


@pytest.mark.parametrize("m", [0, 1])
def test_perturbation_slopes_match_central_differences(m):
    # d omega / dp = -(x^T dZ/dp x) / (x^T dZ/domega x) (the derivative of a simple
    # eigenvalue of a nonlinear eigenproblem, Guttel & Tisseur, Acta Numerica 2017, sec. 2)
    # against central differences of the whole coupled solve, on the builtin kettledrum
    drum = load_drum("kettledrum")
    od = solve_drum(drum, m_max=m, n_max=3, only=m, losses=drum.losses)[0]
    r = labelled_root(od, 1)
    rs = order_root_set(drum, m=m, n_max=3, losses=drum.losses)
    got = log_slopes(rs, 0, complex(od.omega[r]), od.vectors[r], ["tension", "areal_density", "volume"])
    variants = [lambda k: drum.with_tension(drum.head.tension * k),
                lambda k: replace(drum, head=replace(drum.head, areal_density=drum.head.areal_density * k)),
                lambda k: replace(drum, body=replace(drum.body, volume=drum.body.volume * k))]
    for slope, at in zip(got, variants):
        fd = (math.log(_frequency(at(math.exp(H)), m, 1))
              - math.log(_frequency(at(math.exp(-H)), m, 1))) / (2 * H)
        assert slope == pytest.approx(fd, abs=2e-4)
    # an ideal membrane has 1/2 and -1/2 (f ~ sqrt(T / sigma)); air loading takes from both
    assert 0 < got[0] < 0.5 and -0.5 < got[1] < 0
    assert np.isfinite(got).all()


def test_both_heads_tension_slope_matches_central_differences():
    # "tensions": both heads of a shell scaled together (the sweep's continuity path), on the
    # builtin tom (unequal heads); the same perturbation formula against whole solves
    from membrane.physics.continuation import root_slopes

    drum = load_drum("tom")
    assert drum.resonant_head is not None

    def scaled(k):
        return replace(drum.with_tension(drum.head.tension * k),
                       resonant_head=replace(drum.resonant_head, tension=drum.resonant_head.tension * k))

    def lowest(d):
        od = solve_drum(d, m_max=1, n_max=2, only=1, losses=d.losses)[0]
        return od, int(np.argmin(od.omega.real))

    od, r = lowest(drum)
    got = root_slopes(od.root_set, od.index, od.omega[[r]], od.vectors[[r]], ["tensions"])[0, 0]
    fd = [lowest(scaled(math.exp(s * H))) for s in (1, -1)]
    slope = (math.log(fd[0][0].omega[fd[0][1]].real) - math.log(fd[1][0].omega[fd[1][1]].real)) / (2 * H)
    assert got.real / od.omega[r].real == pytest.approx(slope, abs=2e-4)
