"""Every physical input has a practical range, checked by the drum file and by the dataclasses.

The bounds themselves are common practice, no source (membrane/ranges.py says so). What
these tests check is what must hold whatever the bounds: a tiny positive value that passes
a bare `> 0` test and used to crash a solver (ZeroDivisionError, a gigantic array, an
OverflowError) is refused with one InputError that names the key, the value and the range.
"""

import math

import pytest

from membrane import parse_drum
from membrane import ranges as R
from membrane.drum import J11, Air, Body, Head
from membrane.errors import InputError

BASE = {"head": {"diameter": "26 in", "film": "polyester", "thickness": "0.19 mm", "tension": "4000 N/m"}}
KETTLE = {**BASE, "body": {"kind": "kettle", "volume": "0.17 m^3"}}


def with_head(**values):
    return {"head": {**BASE["head"], **values}}


# values that passed main's `> 0` checks and then failed inside the solver
@pytest.mark.parametrize("table, key", [
    (with_head(diameter=5e-324), "head.diameter"),              # ZeroDivisionError in the solver
    (with_head(diameter="5e-324 m"), "head.diameter"),
    (with_head(diameter=4.0), "head.diameter"),                 # above 3 m
    ({"head": {"radius": 1e-300, "areal_density": 0.26, "tension": 4000}}, "head.radius"),
    ({"head": {"diameter": 0.66, "areal_density": 1e-308, "tension": 4000}}, "head.areal_density"),  # OverflowError
    ({"head": {"diameter": 0.66, "areal_density": 11, "tension": 4000}}, "head.areal_density"),
    ({**BASE, "body": {"kind": "kettle", "volume": 5e-324}}, "body.volume"),  # "Maximum allowed size exceeded"
    ({**BASE, "body": {"kind": "kettle", "volume": "3 m^3"}}, "body.volume"),
    ({**BASE, "body": {"kind": "shell", "depth": 5e-324}, "resonant_head": BASE["head"]}, "body.depth"),
    (with_head(thickness="1e-300 m"), "head.thickness"),
    ({"head": {"diameter": "26 in", "density": 1e-300, "thickness": "0.19 mm", "tension": 4000}}, "head.density"),
    (with_head(youngs_modulus=1e-300), "head.youngs_modulus"),
    (with_head(yield_stress=1e-300), "head.yield_stress"),
    (with_head(tensile_strength=1e300), "head.tensile_strength"),
    (with_head(tension=1e-300), "head.tension"),
    (with_head(poisson_ratio=-0.1), "head.poisson_ratio"),
    (with_head(poisson_ratio=float("nan")), "head.poisson_ratio"),
    ({**BASE, "air": {"density": 1e-300, "sound_speed": 343}}, "air.density"),
    ({**BASE, "air": {"density": 100, "sound_speed": 343}}, "air.density"),
    ({**BASE, "air": {"density": 1.2, "sound_speed": 1}}, "air.sound_speed"),
    ({**BASE, "air": {"density": 1.2, "sound_speed": 2000}}, "air.sound_speed"),
    ({**BASE, "air": {"temperature": "-100 degC"}}, "air.temperature"),
    ({**BASE, "air": {"temperature": "90 degC"}}, "air.temperature"),
    ({**BASE, "air": {"pressure": "2 kPa"}}, "air.pressure"),
    ({**BASE, "air": {"pressure": "2 bar"}}, "air.pressure"),
])
def test_out_of_range_values_are_refused_naming_key_value_and_range(table, key):
    with pytest.raises(InputError) as info:
        parse_drum(table)
    assert info.value.key == key
    assert "must be from" in info.value.allowed or "density x thickness" in info.value.allowed
    assert "\n" not in str(info.value)


def test_derived_areal_density_is_checked_too():
    # 1 um of a 100 kg/m^3 film: 1e-4 kg/m^2, below the 1 g/m^2 floor
    with pytest.raises(InputError) as info:
        parse_drum({"head": {"diameter": "26 in", "density": 100, "thickness": "1 um", "tension": 4000}})
    assert info.value.key == "head.areal_density" and "density x thickness" in info.value.allowed


def test_everyday_drums_are_inside_every_range():
    # the built-in demos and the air of a room (ideal gas, R = 287.058 J/(kg K), gamma = 1.4:
    # 343.24 m/s, 1.2041 kg/m^3 at 20 degC)
    drum = parse_drum({**KETTLE, "air": {"temperature": "20 degC", "pressure": "101.325 kPa"}})
    assert drum.air.sound_speed == pytest.approx(343.24, abs=0.01)
    # Earth's extremes: -89.2 degC (Vostok, 1983) and 56.7 degC (Death Valley, 1913),
    # from memory; ~34 kPa on the highest summit, ~108 kPa record sea-level high, from memory
    for t in ("-89.2 degC", "56.7 degC"):
        for p in ("34 kPa", "108 kPa"):
            air = parse_drum({**BASE, "air": {"temperature": t, "pressure": p}}).air
            assert R.AIR_DENSITY.contains(air.density) and R.SOUND_SPEED.contains(air.sound_speed)


def test_tension_below_the_slack_limit_is_refused_in_the_file():
    # a thick head on a small rim: D = E h^3 / (12 (1 - nu^2)), slack T = D (j11 / a)^2
    head = {"diameter": "8 in", "film": "polyester", "thickness": "1 mm", "plies": 2}
    d = 2 * 4.5e9 * 1e-3 ** 3 / (12 * (1 - 0.38 ** 2))
    slack = d * (3.831705970207512 / 0.1016) ** 2  # j11 from Abramowitz & Stegun Table 9.5
    assert J11 == pytest.approx(3.831705970207512, rel=1e-15)
    assert parse_drum({"head": {**head, "tension": 1.01 * slack}}).head.slack_tension == pytest.approx(slack)
    with pytest.raises(InputError) as info:
        parse_drum({"head": {**head, "tension": 0.9 * slack}})
    assert info.value.key == "head.tension" and "slack limit" in info.value.allowed


@pytest.mark.parametrize("make, key", [
    (lambda: Head(radius=0.0, tension=4000.0, areal_density=0.26), "Head.radius"),
    (lambda: Head(radius=-0.3, tension=4000.0, areal_density=0.26), "Head.radius"),
    (lambda: Head(radius=0.3, tension=0.0, areal_density=0.26), "Head.tension"),
    (lambda: Head(radius=0.3, tension=math.nan, areal_density=0.26), "Head.tension"),
    (lambda: Head(radius=0.3, tension=4000.0, areal_density=math.inf), "Head.areal_density"),
    (lambda: Head(radius=0.3, tension=4000.0, areal_density="0.26"), "Head.areal_density"),
    (lambda: Head(radius=0.3, tension=4000.0, areal_density=0.26, poisson_ratio=0.5), "Head.poisson_ratio"),
    (lambda: Head(radius=0.3, tension=4000.0, areal_density=0.26, thickness=0.0), "Head.thickness"),
    (lambda: Head(radius=0.3, tension=4000.0, areal_density=0.26, plies=0), "Head.plies"),
    (lambda: Head(radius=0.3, tension=4000.0, areal_density=0.26, edge="glued"), "Head.edge"),
    (lambda: Body(kind="kettle", volume=-1.0), "Body.volume"),
    (lambda: Body(kind="shell", depth=math.inf), "Body.depth"),
    (lambda: Body(kind="barrel"), "Body.kind"),
    (lambda: Air(density=0.0), "Air.density"),
    (lambda: Air(sound_speed=math.nan), "Air.sound_speed"),
    (lambda: Air.from_conditions(temperature=-1.0), "temperature"),
])
def test_the_dataclasses_hold_their_own_invariants(make, key):
    # the library is protected as well as the drum file: no NaN, infinite, zero or negative
    # size reaches a solver (modelling limits outside the practical ranges stay allowed:
    # tests/test_cavity.py takes the air to rho -> 0, c -> infinity)
    with pytest.raises(InputError) as info:
        make()
    assert info.value.key == key


def test_ranges_refuse_non_finite_and_accept_their_ends():
    for rng in (R.DIAMETER, R.VOLUME, R.AIR_DENSITY, R.PITCH):
        assert rng.contains(rng.lo) and rng.contains(rng.hi)
        assert not any(rng.contains(x) for x in (math.nan, math.inf, -math.inf, rng.lo * (1 - 1e-12)))
    assert R.POISSON_RATIO.contains(0.0) and not R.POISSON_RATIO.contains(0.5)
