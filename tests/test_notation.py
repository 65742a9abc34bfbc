"""The one home of cents, the decay constant, the edge names and how modes are written."""

import math

import numpy as np
import pytest

from membrane import notation


def test_cents_octave_and_semitone():
    # definition of the cent: 1200 per octave, 100 per equal-tempered semitone (ANSI/ASA S1.1)
    assert notation.cents(880.0, 440.0) == pytest.approx(1200.0)
    assert notation.cents(440.0 * 2 ** (1 / 12), 440.0) == pytest.approx(100.0)
    assert isinstance(notation.cents(880.0, 440.0), float)


def test_cents_broadcasts_arrays():
    # numpy's own log2 as the independent reference
    f = np.array([[100.0], [200.0]])
    g = np.array([50.0, 400.0])
    assert np.allclose(notation.cents(f, g), 1200.0 * np.log2(f / g))


def test_ln1000_is_sixty_decibels():
    # 20 log10(e^-x) = -60 dB at x = ln 1000 (definition of T60, ISO 3382-1)
    assert 20 * math.log10(math.exp(-notation.LN1000)) == pytest.approx(-60.0)


def test_labels():
    # the package's own spelling (docs/notation.md): (m,n), air rows air (m,q,p)
    assert notation.mode_label(1, 1) == "(1,1)"
    assert notation.mode_label(0, 1, branch="in-phase", head="resonant") == "(0,1) in-phase, resonant head"
    assert notation.air_label(0, 0, 1) == "air (0,0,1)"
    assert notation.air_label(1, 0, 1, hybrid=True) == "air (1,0,1), hybrid"
    assert notation.mode_list([(1, 1), (2, 1)]) == "(1,1), (2,1)"


def test_one_definition_each():
    # the copies that used to live elsewhere now point here
    from membrane import drum, units
    from membrane.analysis import esprit
    from membrane.physics import coupled, vacuum

    assert units.cents is notation.cents
    assert vacuum.EDGES is notation.EDGES and drum.EDGES is notation.EDGES
    assert esprit.LN1000 == coupled.LN1000 == notation.LN1000
    assert drum.Head(radius=0.3, tension=3000.0, areal_density=0.25).poisson_ratio == notation.POISSON_RATIO
