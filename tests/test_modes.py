"""The mode table: ratios, the harmonic-series fit, notes, sorting."""

import numpy as np
import pytest

from membrane import Drum, Head, harmonic_series, solve

HEAD = Head(radius=0.33, tension=4000.0, areal_density=0.264)

# ideal membrane ratios f/f(0,1) (COMPUTED from A&S Table 9.5 zeros)
IDEAL_RATIOS = {(1, 1): 1.5933, (2, 1): 2.1355, (0, 2): 2.2954, (3, 1): 2.6531, (1, 2): 2.9173,
                (4, 1): 3.1555, (2, 2): 3.5001, (0, 3): 3.5985, (5, 1): 3.6475}


def test_ideal_ratios_to_the_fundamental():
    result = solve(Drum(HEAD), "ideal", m_max=5, n_max=3)
    ratios = dict(zip([(mo.m, mo.n) for mo in result], result.ratios((0, 1))))
    for mode, value in IDEAL_RATIOS.items():
        assert ratios[mode] == pytest.approx(value, abs=6e-5)


def test_ratios_to_the_principal_mode():
    # j_m1/j_11 (A&S Table 9.5): relative to (1,1): (2,1) 1.3403, (3,1) 1.6651, (4,1) 1.9804, (5,1) 2.2892
    result = solve(Drum(HEAD), "ideal", m_max=5, n_max=1)
    ratios = dict(zip([(mo.m, mo.n) for mo in result], result.ratios((1, 1))))
    for mode, value in {(2, 1): 1.3403, (3, 1): 1.6651, (4, 1): 1.9804, (5, 1): 2.2892}.items():
        assert ratios[mode] == pytest.approx(value, abs=6e-5)


def test_degenerate_pairs_reported_once_with_multiplicity_two():
    result = solve(Drum(HEAD), "ideal", m_max=3, n_max=2)
    assert len(result) == 8
    assert all(mo.multiplicity == (1 if mo.m == 0 else 2) for mo in result)


def test_near_degenerate_pair_sorts_by_frequency():
    # (4,2) and (7,1) are 0.2 % apart (A&S Table 9.5: j_42 = 11.0647, j_71 = 11.0864)
    result = solve(Drum(HEAD), "ideal", m_max=8, n_max=3)
    order = [(mo.m, mo.n) for mo in result]
    assert order.index((4, 2)) + 1 == order.index((7, 1))
    f = [mo.frequency for mo in result]
    assert f == sorted(f)


def test_harmonic_fit_recovers_a_known_series():
    # Exact harmonics 2..6 of 75 Hz, one 10 cents sharp: f0 = 75 Hz within a cent
    f = 75.0 * np.array([2, 3, 4, 5, 6.0])
    f[2] *= 2 ** (10 / 1200)
    f0, h, rms = harmonic_series(f)
    assert list(h) == [2, 3, 4, 5, 6]
    assert 1200 * np.log2(f0 / 75.0) == pytest.approx(2.0, abs=0.01)  # least squares in cents: 10/5
    assert rms == pytest.approx(np.sqrt((4 * 2**2 + 8**2) / 5), abs=0.01)


def test_table_rows_carry_notes_and_harmonic_deviation():
    rows = solve(Drum(HEAD), "ideal", m_max=2, n_max=1).table(reference=(1, 1))
    for row in rows:
        assert set(row) >= {"m", "n", "frequency_hz", "decay_s", "ratio", "harmonic",
                            "cents_from_harmonic", "note", "cents_from_note"}
        assert abs(row["cents_from_note"]) <= 50.0
        assert row["decay_s"] is None


def test_mode_shape_nodal_circles_of_ideal_modes():
    # A&S Table 9.5: interior nodal circle of (0,2) at r/a = j01/j02 = 0.4357, of (1,2) at 0.5462
    result = solve(Drum(HEAD), "ideal", m_max=1, n_max=2)
    r = np.linspace(0, HEAD.radius, 20001)
    for (m, n), expected in {(0, 2): 0.4357, (1, 2): 0.5462}.items():
        w = result.find(m, n).radial_shape(r)
        inner = np.where(np.diff(np.sign(w[1:-1])) != 0)[0]
        assert len(inner) == 1
        assert r[inner[0] + 1] / HEAD.radius == pytest.approx(expected, abs=1e-4)
