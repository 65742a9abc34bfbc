"""The coupled solve where the continuation used to give up: slack heads, nearly equal heads,
high orders, lossless roots; and the body's air resonances as roots of their own."""

import math
from dataclasses import replace

import numpy as np
import pytest

from membrane.drum import Body, Drum, Head, load_drum
from membrane.physics.coupled import full_modes, solve_drum
from membrane.tuning import slack_tension

# the 26-inch kettle head of test_coupled.py (0.19 mm polyester at 1390 kg/m^3, from memory;
# E = 4.5 GPa, a film producer's typical value)
HEAD = Head(radius=0.325, tension=3700.0, areal_density=0.262, thickness=0.19e-3,
            youngs_modulus=4.5e9, poisson_ratio=0.38)
TOM = Head(radius=0.1524, tension=3000.0, areal_density=0.25)


def test_slack_head_solves_with_a_decay_for_every_mode():
    # 1.5 x the slack limit (tuning.slack_tension): bending holds the head as much as tension
    head = replace(HEAD, tension=1.5 * slack_tension(HEAD))
    modes = full_modes(Drum(head=head, body=Body("kettle", volume=0.17)), m_max=3, n_max=3)
    assert len(modes) == 4 * 3
    for md in modes:
        assert md.decay is not None and md.decay > 0
    for m in range(4):  # n rises with frequency within an order
        f = [md.frequency for md in sorted((x for x in modes if x.m == m), key=lambda x: x.n)]
        assert np.all(np.diff(f) > 0)


def shell_pairs(resonant_tension, depth=0.3, m_max=2, n_max=2):
    res = replace(TOM, tension=resonant_tension)
    drum = Drum(head=TOM, body=Body(kind="shell", depth=depth), resonant_head=res)
    return {(md.m, md.n, md.branch): md for md in full_modes(drum, m_max=m_max, n_max=n_max)}


@pytest.mark.parametrize("rel", [1e-12, 1e-8, 1e-4, 3000.1 / 3000 - 1])
def test_nearly_equal_heads_approach_the_equal_pairs(rel):
    # the symmetric solve of two identical heads (test_coupled.py checks it against the
    # symmetry) is the limit: each (m, n, branch) moves by about the asymmetry, no more
    equal = shell_pairs(TOM.tension)
    near = shell_pairs(TOM.tension * (1 + rel))
    assert set(near) == set(equal)
    for key, md in equal.items():
        assert near[key].frequency == pytest.approx(md.frequency, rel=2 * rel + 1e-9)


def test_high_orders_have_radiation_tables():
    # m up to 20 (the full-physics limit): the tables of the high orders converge (their
    # damping is many decades below their added mass) and every mode has a decay time
    drum = load_drum("kettledrum")
    modes = full_modes(drum, m_max=20, n_max=1)
    assert sorted(md.m for md in modes) == list(range(21))
    f = [md.frequency for md in sorted(modes, key=lambda x: x.m)]
    assert np.all(np.diff(f) > 0)  # (m,1) rises with m (Rossing's chart, common practice)
    assert all(md.decay is not None and md.decay > 0 for md in modes)


def test_lossless_roots_have_an_infinite_decay_time_not_none():
    # vanishing air: Im omega is round-off; T60 must read as "no loss", never blank
    from membrane.drum import Air

    air = Air(density=1e-9, sound_speed=343.24)
    modes = full_modes(Drum(head=HEAD, air=air), m_max=2, n_max=2)
    for md in modes:
        assert md.decay is not None and (math.isinf(md.decay) or md.decay > 1e6)


def test_the_bowl_air_resonance_is_a_root_of_its_own():
    # the first cross-wise air mode of a rigid cylinder, J1'(j'11 r/a): f = c j'11 / (2 pi a)
    # (A&S Table 9.5: j'11 = 1.8412) sits between the head's (1,1) and (1,2) on the
    # kettledrum; the solve finds a root near it that is mostly air
    drum = load_drum("kettledrum")
    od = [o for o in solve_drum(drum, m_max=1, n_max=2) if o.order.m == 1][0]
    f_air = drum.air.sound_speed * 1.8412 / (2 * np.pi * drum.head.radius)
    air = [(w.real / (2 * np.pi), hf, lab) for w, hf, lab in zip(od.omega, od.head_fraction,
                                                                od.labels)
           if lab is not None and lab[0] == "air"]
    assert air, "no air root"
    f, hf, lab = min(air, key=lambda a: abs(a[0] - f_air))
    assert lab[1:] == (0, 0)  # (q, p) = (0, 0): no nodal circle, no node along the depth
    assert abs(f / f_air - 1) < 0.1 and hf < 0.5


def test_a_long_kettle_ladder_of_air_resonances_is_scanned():
    # a 7-inch head over the longest kettle allowed (an air column of 8 head diameters,
    # 1.42 m): the plane-wave resonances of the column lie c / 2L = 121 Hz apart (a pipe
    # closed at both ends, from memory); below the head's (0,1) the head is stiffer than the
    # air and nearly closes the pipe, so the first air rows sit a little below p c / 2L
    from membrane.drum import parse_drum

    drum = parse_drum({"name": "generated drum (invented)",
                       "head": {"diameter": "7 in", "film": "polyester", "thickness": "0.19 mm",
                                "plies": 1, "tension": "2000 N/m"},
                       "body": {"kind": "kettle", "volume": "0.0353 m^3"}})
    assert drum.air_depth / (2 * drum.head.radius) == pytest.approx(8.0, rel=1e-3)
    od = solve_drum(drum, m_max=0, n_max=3, only=0, losses=drum.losses)[0]
    heads = [r for r, lab in enumerate(od.labels) if lab is not None and lab[0] == "head"]
    assert [od.labels[r][2] for r in heads] == [1, 2, 3]
    f01 = od.omega[heads[0]].real / (2 * np.pi)
    air = sorted(od.omega[r].real / (2 * np.pi) for r, lab in enumerate(od.labels)
                 if lab is not None and lab[0] == "air" and od.omega[r].real / (2 * np.pi) < f01)
    pipe = [p * drum.air.sound_speed / (2 * drum.air_depth) for p in (1, 2)]
    assert len(air) == 2 and all(0.85 < f / fp < 1.0 for f, fp in zip(air, pipe)), (air, pipe)
    assert np.all(od.omega.imag > 0)  # every root decays


def test_a_pipe_is_not_a_kettle():
    # the same head over 0.18 m^3: a 7.25 m air column, 40.8 diameters, is refused in words
    from membrane.drum import parse_drum
    from membrane.errors import InputError

    with pytest.raises(InputError, match=r"40.8 head diameters.*at most 8 diameters"):
        parse_drum({"name": "generated drum (invented)",
                    "head": {"diameter": "7 in", "film": "polyester", "thickness": "0.19 mm",
                             "plies": 1, "tension": "2000 N/m"},
                    "body": {"kind": "kettle", "volume": "0.18 m^3"}})


def test_no_lossless_root_sits_on_a_rigid_walled_resonance():
    # with the walls' boundary-layer losses every root of the loaded bowl decays; the exact
    # rigid-walled resonances c sqrt(gamma^2 + (p pi / L)^2) (gamma: zeros of J_m', A&S
    # Table 9.5) are poles of the operator, not modes, and must not come back as rows
    from membrane.physics.cavity import duct_wavenumbers

    drum = load_drum("kettledrum")
    od = solve_drum(drum, m_max=9, n_max=10, only=9, losses=drum.losses)[0]
    assert np.all(od.omega.imag > 1e-9 * np.abs(od.omega))
    a, L = drum.head.radius, od.order.depth
    gamma = duct_wavenumbers(m=9, count=12, radius=a)
    rigid = drum.air.sound_speed * np.hypot(gamma[:, None], np.arange(40)[None, :] * np.pi / L)
    gap = np.min(np.abs(od.omega.real[:, None] - rigid.ravel()[None, :]), axis=1)
    assert np.all(gap > 1e-8 * od.omega.real)
    # and the head modes keep their spacing: (9,9) and (9,10) are next to each other, as the
    # in-vacuum j_9,n (A&S Table 9.5) are
    f = {lab[2]: w.real for w, lab in zip(od.omega, od.labels) if lab and lab[0] == "head"}
    assert f[10] - f[9] < 1.5 * (f[9] - f[8])


def test_hybrid_head_rows_are_marked_in_the_table():
    # a root with 20-80 % of its energy in the head is a hybrid, head row or air row
    drum = load_drum("kettledrum")
    for md in full_modes(drum, m_max=1, n_max=2, losses=drum.losses, air=True):
        assert md.hybrid == (0.2 <= md.head_fraction <= 0.8)
        assert ("hybrid" in md.label) == md.hybrid, md.label


def test_a_contour_node_on_an_eigenvalue_asks_for_another_curve():
    # exact: T(z) = z - lam is singular at z = lam; put lam on a node of the curve (the nodes
    # sit half a step off the real axis, circle_points): the solve must ask for another curve
    # (TooMany, which the scan and the refinement answer by splitting), not fail in the LU
    from membrane.physics.contour import TooMany, circle_points, eigen_in_circle

    z, _, _ = circle_points(10.0, 1.0, 16)
    lam = z[0]
    with pytest.raises(TooMany):
        eigen_in_circle(lambda s: (s - lam)[:, None, None], 10.0, 1.0, points=16)


@pytest.mark.parametrize("m", [1, 3, 6])
def test_high_circles_are_labelled_in_the_in_vacuum_order(m):
    # `modes kettledrum --m-max 20 --n-max 10`: the roots labelled (m,1)..(m,10) are, in order,
    # the in-vacuum modes n = 1..10 of the head (each holds at least 90 % of its head motion
    # in that mode), and sit a few % below the ideal membrane's j_mn c / (2 pi a) (air loading
    # lowers, the film's stiffness raises them slightly; j_mn from scipy.special.jn_zeros)
    from scipy.special import jn_zeros

    from membrane.physics.assembly import mode_energy

    drum = load_drum("kettledrum")
    od = solve_drum(drum, m_max=m, n_max=10, only=m, losses=drum.losses)[0]
    e = mode_energy(od.order, od.vectors)[:, 0, :]
    heads = sorted((lab[2], r) for r, lab in enumerate(od.labels) if lab is not None and lab[0] == "head")
    assert [n for n, _ in heads] == list(range(1, 11))
    c = math.sqrt(drum.head.tension / drum.head.areal_density)
    ideal = jn_zeros(m, 10) * c / (2 * math.pi * drum.head.radius)
    for (n, r), f_ideal in zip(heads, ideal):
        assert int(np.argmax(e[r])) == n - 1 and e[r, n - 1] >= 0.9, (n, e[r].round(2))
        assert 0.6 < od.omega[r].real / (2 * math.pi) / f_ideal < 1.0, n


@pytest.mark.parametrize("radius, sigma, body", [(0.0762, 0.05, "shell"), (0.0762, 0.05, None),
                                                 (0.4064, 0.6, "kettle"), (0.4064, 0.05, "shell")])
def test_no_root_below_the_scan_floor(monkeypatch, radius, sigma, body):
    # the scan skips the curves wholly below assembly.root_floor; scanned from 1/8 of the
    # lowest in-vacuum mode instead (the floor switched off), light and heavy 6- and
    # 32-inch heads with no body, a 1.5-diameter kettle or a 0.6 m shell have no root below
    # it, and the roots with the floor are the roots without it (the same curves above it)
    import membrane.physics.assembly as assembly

    head = Head(radius=radius, tension=300.0, areal_density=sigma)
    if body == "kettle":
        drum = Drum(head=head, body=Body("kettle", volume=3.0 * radius * math.pi * radius**2))
    elif body == "shell":
        drum = Drum(head=head, body=Body("shell", depth=0.6), resonant_head=replace(head, tension=200.0))
    else:
        drum = Drum(head=head)
    with_floor = solve_drum(drum, m_max=1, n_max=2)
    monkeypatch.setattr(assembly, "root_floor", lambda order, **_: 0.0)
    without = solve_drum(drum, m_max=1, n_max=2)
    for a, b in zip(with_floor, without):
        assert np.array_equal(a.omega, b.omega)
        assert a.labels == b.labels
    monkeypatch.undo()
    for od in without:
        assert od.omega.real.min() > assembly.root_floor(od.order, density=drum.air.density,
                                                         sound_speed=drum.air.sound_speed)


def test_a_very_light_head_over_a_deep_kettle_solves():
    # drum 257 of benchmarks/sweep_drums.py (seed 1): an 18-inch 0.054 kg/m^2 head at
    # 7725 N/m over a 1.27-diameter kettle; its m = 2 modes are shared among a crowd of the
    # bowl's air resonances (mode 3 never reached the coverage test's 0.6), and the scan ran
    # on to ten kHz and beyond until memory ran out; now it stops past twice the highest
    # in-vacuum mode wanted
    from membrane.physics.assembly import solve_drum as solve_orders

    head = Head(radius=0.46297230698721115 / 2, tension=7725.484762183254,
                areal_density=0.05424752743593672)
    drum = Drum(head=head, body=Body("kettle", volume=0.098848239968679))
    od = solve_orders(drum, m_max=2, n_max=3, only=2, losses=drum.losses)[0]
    heads = sorted(lab[2] for lab in od.labels if lab is not None and lab[0] == "head")
    assert heads == [1, 2, 3]
    assert np.all(od.omega.imag > 0)  # every root decays (radiation at least)
    top = max(h.omega[2] for h in od.order.heads)
    assert od.window <= 3.0 * top  # the scan's window stops near twice the (2,3) in vacuum


def test_an_air_row_is_named_by_the_duct_mode_its_field_is_made_of():
    # the builtin 26-inch kettle: its m = 1 air row near 309 Hz holds most of its body-air
    # energy in the duct's first cross mode (q = 0 of m = 1, cut on at c j'_11 / 2 pi a with
    # j'_11 = 1.8412, Abramowitz & Stegun Table 9.5: 304.6 Hz at 343.9 m/s and a = 0.33 m),
    # and is named after it; every air row's name is the duct mode of largest share
    from membrane.physics.assembly import duct_content

    drum = load_drum("kettledrum")
    for od in solve_drum(drum, m_max=2, n_max=3, losses=drum.losses):
        share = duct_content(od.root_set, od.index, od.omega, od.vectors)
        assert np.allclose(share.sum(axis=1), 1.0)
        for r, lab in enumerate(od.labels):
            if lab is not None and lab[0] == "air":
                assert lab[1] == int(np.argmax(share[r])), (od.order.m, lab, share[r][:4])
        if od.order.m == 1:
            r = next(r for r, lab in enumerate(od.labels) if lab == ("air", 0, 0))
            assert share[r, 0] > 0.85
            cut_on = drum.air.sound_speed * 1.8412 / (2 * np.pi * drum.head.radius)
            assert abs(od.omega[r].real / (2 * np.pi) / cut_on - 1) < 0.05


def _zeros_inside(det_sign, centre, radius, points=2048):
    """Zeros minus poles of a determinant inside a circle: its winding number (the argument
    principle), from the phase of slogdet's sign at closely spaced points."""
    z = centre + radius * np.exp(2j * np.pi * np.arange(points + 1) / points)
    s = det_sign(z)
    return int(round(float(np.sum(np.angle(s[1:] / s[:-1]))) / (2 * np.pi)))


# m = 0, q = 0 (the plane wave): the duct term's poles. A kettle's cot(kL)/k has one at every
# rigid-walled resonance p c / 2L; a shell's pair of heads is the same pole, of rank one (the
# standing wave seen from both heads); identical heads split it into in-phase
# cot(kL/2)/k (p even) and opposed -tan(kL/2)/k (p odd) (standing-wave algebra, no source).
# The walls' boundary-layer loss, first order in the rigid-walled field, squares that field's
# pole: a double pole of det Z in the same direction
@pytest.mark.parametrize("walls", [False, True])
@pytest.mark.parametrize("body, resonant, sign, p, poles", [
    ("kettle", None, None, 1, 1), ("kettle", None, None, 2, 1),
    ("shell", 2400.0, None, 1, 1), ("shell", 2400.0, None, 2, 1),
    ("shell", 3000.0, +1, 1, 0), ("shell", 3000.0, +1, 2, 1),
    ("shell", 3000.0, -1, 1, 1), ("shell", 3000.0, -1, 2, 0)])
def test_the_augmented_operator_has_the_drums_roots_at_a_rigid_walled_resonance(
        body, resonant, sign, p, poles, walls):
    # Z(omega) has a pole at p c / 2L; the contour solve's augmented operator T (each
    # propagating duct mode's field an unknown of its own, physics/spectrum.py) is entire
    # there, and must have exactly the roots Z has: the zeros of det T in a small circle round
    # the resonance (the argument principle) are those of det Z, its winding number plus its
    # poles inside. Radiation (and with ``walls`` the film's and the walls' loss), so nothing
    # but the duct terms has a pole. With the heads' face pressures as unknowns, an unequal
    # shell's T was singular at every such resonance (the field from either head is then one
    # standing wave), as was an identical pair's wherever its branch has no pole: a root the
    # drum does not have; and with the walls' loss T kept its double pole
    from membrane.physics.assembly import order_root_set
    from membrane.physics.spectrum import OrderProblem

    if body == "kettle":
        drum = Drum(head=TOM, body=Body("kettle", volume=0.02))
    else:
        drum = Drum(head=TOM, body=Body("shell", depth=0.3),
                    resonant_head=replace(TOM, tension=resonant))
    losses = load_drum("kettledrum").losses if walls else None
    assert losses is None or losses.boundary_layers
    rs = order_root_set(drum, m=0, n_max=2, cross_sign=sign, losses=losses)
    c, L = drum.air.sound_speed, rs.orders[0].depth
    w0 = p * math.pi * c / L
    radius = 1e-4 * w0
    rs.ensure_range(0, 1.01 * w0 / c)
    problem = OrderProblem(rs, 0)
    q0 = problem.propagating(w0 / c)
    assert q0 >= 1
    of_z = _zeros_inside(lambda z: np.linalg.slogdet(rs.order_operator(0, z))[0], w0, radius)
    of_t = _zeros_inside(lambda z: np.linalg.slogdet(problem.evaluate(z, q0, w0))[0], w0, radius)
    assert of_t == of_z + poles * (2 if walls else 1)
    if not walls:
        assert of_t == 0  # the drum has no root this close to the air's resonance


def test_the_augmented_operators_schur_complement_is_the_drums_operator():
    # eliminating the duct unknowns (and, with the walls' loss, the second set that carries
    # the loss's form on the fields) gives back Z(omega) = K + S - omega^2 (M + A) + W as
    # operator.py builds it on the rigid-walled field, to round-off: for a kettle, both
    # halves of identical shell heads and unequal heads, m = 0 and 2, below and above
    # cut-on of the second duct mode, off the real axis (the Schur complement identity,
    # linear algebra)
    from membrane.physics.assembly import order_root_set
    from membrane.physics.spectrum import OrderProblem

    losses = load_drum("kettledrum").losses
    shell = Body("shell", depth=0.3)
    cases = [(Drum(head=TOM, body=Body("kettle", volume=0.02)), None),
             (Drum(head=TOM, body=shell, resonant_head=TOM), +1),
             (Drum(head=TOM, body=shell, resonant_head=TOM), -1),
             (Drum(head=TOM, body=shell, resonant_head=replace(TOM, tension=2400.0)), None)]
    for m in (0, 2):
        for drum, sign in cases:
            rs = order_root_set(drum, m=m, n_max=2, cross_sign=sign, losses=losses)
            problem = OrderProblem(rs, 0)
            for f in (300.0, 1900.0, 3500.0):
                w = 2 * np.pi * f * (1 + 0.05j)
                rs.ensure_range(0, 1.3 * abs(w) / drum.air.sound_speed)
                q0 = problem.propagating(abs(w) / drum.air.sound_speed)
                T = problem.evaluate(np.array([w]), q0, abs(w),
                                     shift=problem.shifts(w, 0.3 * abs(w), q0))[0]
                n = rs.size
                schur = T[:n, :n] - T[:n, n:] @ np.linalg.solve(T[n:, n:], T[n:, :n])
                Z = rs.order_operator(0, np.array([w]))[0]
                assert np.abs(schur - Z).max() <= 1e-12 * np.abs(Z).max(), (m, sign, f)
