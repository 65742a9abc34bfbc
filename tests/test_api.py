"""The flat public API: every name resolves, import stays light, results print briefly."""

import subprocess
import sys

import pytest

import membrane


@pytest.mark.parametrize("name", membrane.__all__)
def test_every_public_name_resolves(name):
    assert getattr(membrane, name) is not None


def test_import_loads_no_scipy():
    # PEP 562 lazy names: a bare import must not pull in the numerical stack
    code = "import sys, membrane; print(any(m.split('.')[0] in ('scipy', 'matplotlib', 'pyvista') for m in sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_callable_modules():
    # membrane.identify and membrane.strike are the functions whether or not the submodule was imported
    import membrane.identify
    import membrane.strike

    assert membrane.identify.identify.__name__ == "identify" and callable(membrane.identify)
    assert callable(membrane.strike)


def test_short_reprs():
    # a notebook prints a result in a line or two, not its arrays (common practice, no source)
    drum = membrane.load_drum("kettledrum")
    modes = membrane.solve(drum, physics="stiff", m_max=2, n_max=2)
    tuning = membrane.tension_for(drum, targets=[((1, 1), membrane.parse_pitch("D3"))], physics="stiff")
    partials = membrane.strike(modes, strike=membrane.Strike(radius_fraction=0.25))
    for obj in (modes, modes.find(1, 1), tuning, partials[0]):
        text = repr(obj)
        assert len(text) < 300, text
    assert "(1,1)" in repr(modes.find(1, 1)) and "stiff physics" in repr(modes)
    assert "N/m" in repr(tuning)


def test_one_spelling_and_the_old_names_still_resolve():
    # renamed names: one spelling in the API (-ise, SoundingMode, radius_fraction); the old
    # ones still work and say what they are now (common practice, no source)
    import membrane.audio
    import membrane.strike

    assert "synthesise" in membrane.__all__ and "synthesize" not in membrane.__all__
    assert "harmonic_fit" not in membrane.__all__  # its tuple differed from ModeSet.harmonic_fit's
    for module, old, new in ((membrane, "synthesize", "synthesise"), (membrane.audio, "synthesize", "synthesise"),
                             (membrane.strike, "Partial", "SoundingMode"),
                             (membrane, "harmonic_fit", "harmonic_series")):
        with pytest.warns(DeprecationWarning, match=new):
            assert getattr(module, old) is getattr(module, new)
    with pytest.warns(DeprecationWarning, match="radius_fraction"):
        strike = membrane.Strike(at=0.4)
    assert strike == membrane.Strike(radius_fraction=0.4) == membrane.Strike(0.4)
    with pytest.warns(DeprecationWarning, match="radius_fraction"):
        assert strike.at == 0.4
    with pytest.raises(AttributeError):
        membrane.strike.no_such_name
    # attributes are SI without a unit in the name (docs/physics.md, "Notation"); old names warn
    from membrane.lugs import MeasuredSplit
    from membrane.physics.uneven import Split

    split = Split(m=1, n=1, low_frequency=99.0, high_frequency=101.0, uniform_frequency=100.0,
                  orientation_deg=0.0)
    with pytest.warns(DeprecationWarning, match="low_frequency"):
        assert split.low_hz == 99.0
    with pytest.warns(DeprecationWarning, match="beat_frequency"):
        assert split.beat_hz == split.beat_frequency == 2.0
    with pytest.warns(DeprecationWarning, match="low_frequency"):
        measured = MeasuredSplit(1, 1, low_hz=99.0, high_hz=101.0)
    assert measured == MeasuredSplit(1, 1, 99.0, 101.0) and measured.beat_frequency == 2.0
    from membrane.tuning import Target

    target = Target(m=1, n=1, target_frequency=130.8, current_frequency=128.0, predicted_frequency=130.8)
    with pytest.warns(DeprecationWarning, match="predicted_frequency"):
        assert target.predicted_hz == 130.8
    with pytest.warns(DeprecationWarning, match="target_frequency"):
        assert target.target_hz == 130.8
    # the two kinds of partial are different classes with different names
    assert membrane.SoundingMode is not membrane.analysis.Partial
    # a fit over named modes and over raw frequencies: HarmonicFit from the ModeSet
    modes = membrane.solve(membrane.load_drum("kettledrum"), physics="ideal", m_max=5, n_max=1)
    assert isinstance(modes.harmonic_fit(), membrane.HarmonicFit)
