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
    partials = membrane.strike(modes, strike=membrane.Strike(at=0.25))
    for obj in (modes, modes.find(1, 1), tuning, partials[0]):
        text = repr(obj)
        assert len(text) < 300, text
    assert "(1,1)" in repr(modes.find(1, 1)) and "stiff physics" in repr(modes)
    assert "N/m" in repr(tuning)
