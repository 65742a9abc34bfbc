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
