"""Roots carried to a nearby drum (predictor and Newton) are the roots a whole solve finds there.

The check is against an independent computation: the whole-window contour scan of the new
drum (spectrum.scan_order, Beyn's method from nothing), which shares no step with the carry
(a first-order predictor from the old drum's roots and Newton's method on det T).
"""

import math
from dataclasses import replace

import numpy as np
import pytest

from membrane.branches import labelled_root
from membrane.drum import load_drum
from membrane.physics.assembly import carry_order, solve_drum
from membrane.tune_model import TuneModel
from membrane.tuning import tension_for
from membrane.units import parse_pitch


def _labelled(od):
    return {lab: od.omega[r] for r, lab in enumerate(od.labels) if lab is not None}


@pytest.mark.parametrize("m, step", [(0, 0.1), (1, -0.1), (2, 0.1)])
def test_carried_roots_are_the_whole_solves(m, step):
    drum = load_drum("kettledrum")
    od = solve_drum(drum, m_max=m, n_max=3, only=m, losses=drum.losses)[0]

    def at(st):
        return drum.with_tension(drum.head.tension * math.exp(st["tension"]))

    got = carry_order(od, at, {"tension": step}, n_max=3, losses=drum.losses)
    assert got is not None  # a tenth of e-fold in tension is carried on this kettle
    whole = solve_drum(at({"tension": step}), m_max=m, n_max=3, only=m, losses=drum.losses)[0]
    a, b = _labelled(got), _labelled(whole)
    assert set(a) == set(b)  # the same head modes and air rows, by the same names
    for lab in a:
        assert abs(a[lab] - b[lab]) <= 1e-9 * abs(b[lab]), lab  # the whole solve's tolerance 1e-10
    assert np.allclose(got.head_fraction[[labelled_root(got, n) for n in (1, 2, 3)]],
                       whole.head_fraction[[labelled_root(whole, n) for n in (1, 2, 3)]], atol=1e-6)


def test_a_volume_step_is_carried_too():
    drum = load_drum("kettledrum")
    od = solve_drum(drum, m_max=1, n_max=3, only=1, losses=drum.losses)[0]
    v0 = drum.body.volume

    def at(st):
        return replace(drum, body=replace(drum.body, volume=v0 * math.exp(st["volume"])))

    got = carry_order(od, at, {"volume": 0.05}, n_max=3, losses=drum.losses)
    assert got is not None
    whole = solve_drum(at({"volume": 0.05}), m_max=1, n_max=3, only=1, losses=drum.losses)[0]
    for n in (1, 2, 3):
        a, b = got.omega[labelled_root(got, n)], whole.omega[labelled_root(whole, n)]
        assert abs(a - b) <= 1e-9 * abs(b)


def test_a_step_too_long_to_trust_is_refused_not_guessed():
    # beyond the predictor's range the carry declines (the caller then solves whole)
    drum = load_drum("kettledrum")
    od = solve_drum(drum, m_max=1, n_max=3, only=1, losses=drum.losses)[0]
    assert carry_order(od, lambda st: drum.with_tension(drum.head.tension * math.exp(st["tension"])),
                       {"tension": 0.8}, n_max=3, losses=drum.losses) is None


def test_tune_confirms_its_carried_answer_by_a_whole_solve():
    drum = load_drum("kettledrum")
    hz = parse_pitch("C3")  # equal temperament, A4 = 440 Hz (ISO 16)
    result = tension_for(drum, targets=[((1, 1), hz)], table=False)
    # the answer comes from a whole solve at the suggested tension, within 0.001 cent
    whole = TuneModel(drum, [(1, 1)], "full", 3)
    whole.carrying = False
    f = whole.frequencies(result.tension)[0]
    assert abs(1200 * math.log2(f / hz)) <= 1e-3
    assert result.targets[0].predicted_frequency == pytest.approx(f, rel=1e-12)


def test_a_fit_with_a_free_volume_carries_from_the_present_drum():
    # the drum at its present tension is solved before a fit begins (free parameter unset):
    # the fit's first point, at the drum's present volume, is carried from it, and is the
    # whole solve's there (the independent scan, as above)
    drum = load_drum("kettledrum")
    model = TuneModel(drum, [(1, 1), (2, 1)], "full", 3)
    model.frequencies(drum.head.tension)
    t1 = 0.9 * drum.head.tension
    got = model.frequencies(t1, "volume", drum.body.volume)
    assert model.carried == 1
    whole = TuneModel(drum, [(1, 1), (2, 1)], "full", 3)
    whole.carrying = False
    assert np.allclose(got, whole.frequencies(t1, "volume", drum.body.volume), rtol=1e-9, atol=0)
