"""Tuning: tensions for target pitches, several targets, lugs, and the safety checks."""

import math
from dataclasses import replace

import mpmath
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from membrane import Drum, Head, load_drum, solve
from membrane.errors import InputError
from membrane.tuning import (CAUTIONS, SAFE_STRESS_FRACTION, TENSION_CEILING, equalise_lugs,
                             safety_warnings, slack_tension, tension_for, turns_text)
from membrane.units import cents, parse_pitch

# j_{m,n} to 11 significant digits, computed (mpmath.besseljzero); A&S Table 9.5
# prints them to 5 decimals (10 for m = 0): tests/test_bessel.py checks both
J01, J11, J21, J02 = 2.4048255577, 3.8317059702, 5.1356223018, 5.5200781103
# Leissa, NASA SP-160 (1969), Table 2.1 (root computed with mpmath): clamped plate,
# lambda^2 for (1,1) = (1 diameter, 0 circles)
PLATE_11 = 21.2604


def polyester_head(*, radius, tension, thickness, plies=1):
    # PET film data as in membrane/data/films.toml (a film producer's typical values, ISO 527)
    return Head(radius=radius, tension=tension, areal_density=1390.0 * thickness * plies, thickness=thickness,
                plies=plies, youngs_modulus=4.5e9, poisson_ratio=0.38, film="polyester",
                yield_stress=100e6, tensile_strength=200e6)


drums = st.builds(
    lambda radius, tension, thickness: Drum(head=polyester_head(radius=radius, tension=tension,
                                                                thickness=thickness)),
    radius=st.floats(0.08, 0.5), tension=st.floats(300.0, 6000.0), thickness=st.floats(5e-5, 5e-4))
modes = st.tuples(st.integers(0, 4), st.integers(1, 2))
shifts = st.floats(-500.0, 500.0)  # cents from the mode's current pitch


def _check_round_trip(drum, mode, shift, physics, *, table=True):
    n_max = 3  # the default mode table's basis (the full model's Ritz space grows with n_max)
    now = solve(drum, physics, m_max=mode[0], n_max=n_max).find(*mode).frequency
    target = now * 2 ** (shift / 1200)
    try:
        result = tension_for(drum, targets=[(mode, target)], physics=physics, n_max=n_max, table=table)
    except InputError as exc:
        _check_refusal(drum, mode, target, physics, n_max, str(exc))
        return
    # an independent solve at the suggested tension
    again = solve(drum.with_tension(result.tension), physics, m_max=mode[0], n_max=n_max).find(*mode)
    assert abs(cents(again.frequency, target)) < 0.1
    assert abs(result.targets[0].residual_cents) < 0.1


def _check_refusal(drum, mode, target, physics, n_max, message):
    """A refusal is right only if no tension between the two documented limits reaches the target.

    The documented limits (membrane.tuning module docstring): below, the slack limit
    D (j11/a)^2; above, the film's tensile strength times its thickness (or the drum-file
    ceiling). A mode's frequency rises with tension, so an independent solve at the limit
    named in the message must be on the far side of the target.
    """
    head = drum.head

    def at(tension):
        return solve(drum.with_tension(tension), physics, m_max=mode[0], n_max=n_max).find(*mode).frequency

    if "below the slack limit" in message:
        assert at(slack_tension(head)) > target, message
    elif "unreachable" in message:
        strength = head.tensile_strength * head.plies * head.thickness
        ceiling = min(strength, TENSION_CEILING)
        assert ("film's tensile strength" in message) == (strength < TENSION_CEILING), message
        assert at(ceiling) < target, message
        assert at(ceiling) > 0
    else:
        pytest.fail(f"not a documented refusal: {message}")


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(drum=drums, mode=modes, shift=shifts)
def test_round_trip_ideal(drum, mode, shift):
    _check_round_trip(drum, mode, shift, "ideal")


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(drum=drums, mode=modes, shift=shifts)
# both refusals, always tried: below the slack limit (a thick head on a small rim, lowered) and
# beyond the film's strength (a thin head raised past 200 MPa x 50 um = 10 kN/m)
@example(drum=Drum(head=polyester_head(radius=0.08, tension=300.0, thickness=4.315e-4)), mode=(2, 2),
         shift=-269.0)
@example(drum=Drum(head=polyester_head(radius=0.5, tension=6000.0, thickness=5e-5)), mode=(1, 1),
         shift=500.0)
def test_round_trip_stiff(drum, mode, shift):
    _check_round_trip(drum, mode, shift, "stiff")


@settings(max_examples=3, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(drum=drums, mode=st.tuples(st.integers(0, 2), st.just(1)), shift=st.floats(-300.0, 300.0))
def test_round_trip_full(drum, mode, shift):
    # few examples: each new tension costs the full model new radiation tables
    _check_round_trip(drum, mode, shift, "full", table=False)


def test_ideal_tension_is_the_closed_form():
    # f_mn = j_mn/(2 pi a) sqrt(T/sigma)  =>  T = sigma (2 pi a f / j_mn)^2, with the zeros above
    drum = Drum(head=polyester_head(radius=0.33, tension=4000.0, thickness=1.9e-4))
    for mode, j in (((0, 1), J01), ((1, 1), J11), ((2, 1), J21), ((0, 2), J02)):
        target = parse_pitch("F2+15c")
        result = tension_for(drum, targets=[(mode, target)], physics="ideal")
        exact = drum.head.areal_density * (2 * math.pi * 0.33 * target / j) ** 2
        assert result.tension == pytest.approx(exact, rel=1e-6)
        # in vacuum the naive sqrt(T) scaling is exact too
        assert result.naive_tension == pytest.approx(exact, rel=1e-9)


def test_stiff_needs_less_tension_than_sqrt_scaling_when_lowering():
    # A thick head on a small rim: bending holds part of the restoring force and does not
    # scale with T, so lowering the pitch by tension needs more of a tension cut than sqrt(T) says
    drum = Drum(head=polyester_head(radius=0.1, tension=400.0, thickness=5e-4))
    now = solve(drum, "stiff").find(1, 1).frequency
    result = tension_for(drum, targets=[((1, 1), 0.8 * now)], physics="stiff")
    assert result.tension < 0.97 * result.naive_tension
    naive_hz = solve(drum.with_tension(result.naive_tension), "stiff").find(1, 1).frequency
    assert cents(naive_hz, 0.8 * now) > 5


def test_target_below_the_slack_limit_is_refused():
    drum = Drum(head=polyester_head(radius=0.1, tension=400.0, thickness=5e-4))
    head = drum.head
    # bending stiffness equals tension stiffness for (1,1) at the slack limit
    assert slack_tension(head) == pytest.approx(head.bending_stiffness * (J11 / head.radius) ** 2, rel=1e-9)
    # no tension can take (1,1) below the clamped plate's frequency (Leissa lambda^2 = 21.26)
    plate = PLATE_11 / (2 * math.pi * head.radius ** 2) * math.sqrt(head.bending_stiffness / head.areal_density)
    with pytest.raises(InputError, match="slack limit"):
        tension_for(drum, targets=[((1, 1), 0.9 * plate)], physics="stiff")
    # At the slack limit T a^2 / D = j11^2. Separating D nabla^4 w - T nabla^2 w = sigma w^2 w
    # into w = J1(k1 r) + C I1(k2 r), D k1^4 + T k1^2 = sigma w^2 and (k2 a)^2 = (k1 a)^2 + T a^2/D,
    # the clamped edge gives k2 J1(k1 a) I1'(k2 a) - k1 I1(k2 a) J1'(k1 a) = 0 (its T = 0 limit
    # is Leissa's clamped plate, Table 2.1). Solved here with mpmath: k1 a = 4.47848,
    # lambda^2 = w a^2 sqrt(sigma/D) = sqrt(x^4 + j11^2 x^2) = 26.3960, 1.2416 times the plate's
    # 21.2604. Not sqrt(2): that estimate (T k^2 = D k^4 at k = j11/a) keeps the membrane's shape
    # J1(j11 r/a), which has no zero slope at a clamped rim, and compares with the ideal membrane.
    mpmath.mp.dps = 30
    s = mpmath.besseljzero(1, 1) ** 2

    def det(x):
        y = mpmath.sqrt(x * x + s)
        return y * mpmath.besselj(1, x) * mpmath.besseli(1, y, derivative=1) \
            - x * mpmath.besseli(1, y) * mpmath.besselj(1, x, derivative=1)

    x = mpmath.findroot(det, 4.5)
    lam2 = float(mpmath.sqrt(x ** 4 + s * x ** 2))
    expected = lam2 / (2 * math.pi * head.radius ** 2) * math.sqrt(head.bending_stiffness / head.areal_density)
    at_slack = solve(drum.with_tension(slack_tension(head)), "stiff").find(1, 1).frequency
    assert at_slack == pytest.approx(expected, rel=1e-9)
    assert at_slack / plate == pytest.approx(1.2416, abs=1e-4)


def test_unreachable_and_unsafe_tensions():
    drum = Drum(head=polyester_head(radius=0.33, tension=4000.0, thickness=1.9e-4))
    now = solve(drum, "ideal").find(1, 1).frequency
    with pytest.raises(InputError, match="tensile strength"):
        tension_for(drum, targets=[((1, 1), 4 * now)], physics="ideal")  # 16x tension: 337 MPa > 200 MPa
    result = tension_for(drum, targets=[((1, 1), 1.6 * now)], physics="ideal")  # 10240 N/m, 54 MPa
    assert result.stress == pytest.approx(result.tension / 1.9e-4)
    assert result.stress > SAFE_STRESS_FRACTION * 100e6
    assert any("yield" in w for w in result.warnings)
    assert not tension_for(drum, targets=[((1, 1), now)], physics="ideal").warnings
    assert any("below the slack limit" in w for w in safety_warnings(drum.head, 0.5 * slack_tension(drum.head)))
    bare = Drum(head=Head(radius=0.33, tension=4000.0, areal_density=0.26))
    assert any("no stress check" in w for w in safety_warnings(bare.head, 4000.0))


def test_mode_not_present():
    drum = Drum(head=polyester_head(radius=0.33, tension=4000.0, thickness=1.9e-4))
    with pytest.raises(InputError, match="mode"):
        tension_for(drum, targets=[((51, 1), 100.0)], physics="ideal")


def test_consistent_targets_are_met_together():
    drum = Drum(head=polyester_head(radius=0.2, tension=800.0, thickness=2.5e-4))
    there = solve(drum.with_tension(1500.0), "stiff")
    targets = [((m, 1), there.find(m, 1).frequency) for m in (1, 2, 3)]
    result = tension_for(drum, targets=targets, physics="stiff")
    assert result.together and result.tension == pytest.approx(1500.0, rel=1e-6)
    assert max(abs(t.residual_cents) for t in result.targets) < 0.01


def test_inconsistent_targets_share_the_misfit():
    # Ideal head: (2,1)/(1,1) = j21/j11 (zeros above), 507.0 cents; asking for a fifth (700 cents)
    # cannot be met; least squares in cents splits the 193-cent gap evenly
    drum = Drum(head=polyester_head(radius=0.33, tension=4000.0, thickness=1.9e-4))
    f2 = parse_pitch("F2")
    result = tension_for(drum, targets=[((1, 1), f2), ((2, 1), parse_pitch("C3"))], physics="ideal")
    gap = 700.0 - 1200 * math.log2(J21 / J11)
    assert not result.together
    assert result.targets[0].residual_cents == pytest.approx(gap / 2, abs=1e-4)
    assert result.targets[1].residual_cents == pytest.approx(-gap / 2, abs=1e-4)


def test_free_areal_density_recovers_a_stiff_head():
    # With bending stiffness the ratios depend on T a^2 / D and the scale on sigma: two targets fix both
    drum = Drum(head=polyester_head(radius=0.1, tension=300.0, thickness=5e-4))
    truth = drum.with_tension(120.0)
    truth = replace(truth, head=replace(truth.head, areal_density=1.3 * drum.head.areal_density))
    there = solve(truth, "stiff")
    targets = [((1, 1), there.find(1, 1).frequency), ((3, 1), there.find(3, 1).frequency)]
    result = tension_for(drum, targets=targets, physics="stiff", free="areal_density")
    assert result.together
    assert result.tension == pytest.approx(120.0, rel=1e-4)
    assert result.value == pytest.approx(truth.head.areal_density, rel=1e-4)
    with pytest.raises(InputError, match="ratios"):
        tension_for(drum, targets=targets, physics="ideal", free="areal_density")
    with pytest.raises(InputError, match="kettle"):
        tension_for(drum, targets=targets, physics="full", free="volume")


def test_full_kettledrum_beats_sqrt_scaling():
    # Air loading (an added mass that does not scale with T) and the bowl make f(T) non-proportional
    # to sqrt(T); (f*/f)^2 scaling then misses the target, root-finding on the model does not.
    drum = load_drum("kettledrum")
    target = parse_pitch("F2")
    result = tension_for(drum, targets=[((1, 1), target)], physics="full", table=False)
    hit = solve(drum.with_tension(result.tension), "full", m_max=1).find(1, 1).frequency
    naive = solve(drum.with_tension(result.naive_tension), "full", m_max=1).find(1, 1).frequency
    assert abs(cents(hit, target)) < 0.1
    assert abs(cents(naive, target)) > 5
    assert abs(result.tension / result.naive_tension - 1) > 0.005


def test_free_volume_with_full_physics():
    drum = load_drum("kettledrum")
    truth = replace(drum.with_tension(3600.0), body=replace(drum.body, volume=0.14))
    there = solve(truth, "full", m_max=1, n_max=1)
    targets = [((0, 1), there.find(0, 1).frequency), ((1, 1), there.find(1, 1).frequency)]
    # the bowl moves (0,1) (its air spring) much more than (1,1): two targets fix T and V
    result = tension_for(drum, targets=targets, physics="full", free="volume", n_max=1, table=False)
    assert result.together and max(abs(t.residual_cents) for t in result.targets) < 0.1
    assert result.value == pytest.approx(0.14, rel=0.01) and result.tension == pytest.approx(3600.0, rel=0.01)


# ------------------------------------------------------------------ lugs (rule of thumb)
# Tap pitch proportional to sqrt(local tension)  # common practice, no source
def test_lugs_even_out_to_the_rms_pitch():
    semitone = 2 ** (1 / 12)
    pitches = [146.83, 146.83 * semitone, 146.83, 146.83 / semitone]
    target, lugs = equalise_lugs(pitches, cents_per_turn=45.0)
    rms = math.sqrt(sum(p * p for p in pitches) / 4)
    assert target == pytest.approx(rms)
    assert sum(lug.relative_tension for lug in lugs) / 4 == pytest.approx(1.0)
    assert lugs[1].relative_tension / lugs[0].relative_tension == pytest.approx(semitone ** 2)
    assert lugs[1].change_cents == pytest.approx(lugs[0].change_cents - 100.0)
    for lug in lugs:
        assert lug.turns == round(lug.change_cents / 45.0 * 8) / 8  # eighths of a turn
        assert lug.tension_change_percent == pytest.approx(100 * ((target / lug.tap_hz) ** 2 - 1))


def test_lugs_follow_a_tension_change():
    target, lugs = equalise_lugs([150.0] * 5, tension_ratio=1.21)
    assert target == pytest.approx(165.0)
    assert all(lug.tension_change_percent == pytest.approx(21.0) and lug.turns is None for lug in lugs)


@pytest.mark.parametrize("pitches, words", [([150.0, 151.0], "at least 3"), ([150.0, -151.0, 150.0], "positive")])
def test_bad_lugs(pitches, words):
    with pytest.raises(InputError, match=words):
        equalise_lugs(pitches)


def test_turns_text_and_cautions():
    assert [turns_text(x) for x in (0.0, 0.125, -0.25, 1.375, -2.0)] == ["0", "+1/8", "-1/4", "+1 3/8", "-2"]
    assert isinstance(CAUTIONS, tuple) and all(isinstance(c, str) and c for c in CAUTIONS)
    assert any("tear" in c for c in CAUTIONS) and any("hearing" in c for c in CAUTIONS)
