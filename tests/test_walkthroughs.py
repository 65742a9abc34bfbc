"""The three walk-throughs in examples/ run, and their numbers agree with outside references."""

import importlib.util
import math
from pathlib import Path

import pytest
from scipy.special import jn_zeros

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


@pytest.fixture(scope="module")
def load():
    cache = {}

    def _load(name):
        if name not in cache:
            spec = importlib.util.spec_from_file_location(f"walkthrough_{name}", EXAMPLES / f"{name}.py")
            module = importlib.util.module_from_spec(spec)
            spec.loader.exec_module(module)
            cache[name] = module
        return cache[name]
    return _load


@pytest.mark.parametrize("name", ["drum_maker", "acoustician", "teacher"])
def test_walkthrough_is_cells(name):
    text = (EXAMPLES / f"{name}.py").read_text(encoding="utf-8")
    assert text.count("# %%") >= 4 and 'if __name__ == "__main__":' in text


def test_teacher(load):
    ex = load("teacher")
    # f01 = j01 / (2 pi a) sqrt(T/sigma), j01 from scipy (Abramowitz & Stegun Table 9.5)
    j01 = jn_zeros(0, 1)[0]
    assert ex.F01_SOLVED == pytest.approx(j01 / (2 * math.pi * 0.30) * math.sqrt(2000.0 / 0.25), rel=1e-9)
    assert ex.F01_4T / ex.F01_SOLVED == pytest.approx(2.0, rel=1e-9)  # f ~ sqrt(T)
    assert ex.F01_2A / ex.F01_SOLVED == pytest.approx(0.5, rel=1e-9)  # f ~ 1/a
    # ratios j_mn / j_01, Abramowitz & Stegun Table 9.5
    for label, (m, n) in {"(1,1)": (1, 1), "(2,1)": (2, 1), "(0,2)": (0, 2)}.items():
        assert ex.RATIOS[label] == pytest.approx(jn_zeros(m, n)[-1] / j01, rel=1e-9)
    # bending stiffness only raises the modes, a little (clamped plate-membrane; common practice, no source)
    assert all(0 < c < 30 for c in ex.STIFF_CENTS.values())
    # Rossing 1982 with bowl, 1.50 1.98 2.44 (as reproduced; docs/references.md)
    assert ex.KETTLE_RATIOS[1:] == pytest.approx([1.50, 1.98, 2.44], abs=0.04)


def test_acoustician(load):
    ex = load("acoustician")
    # ideal membrane ratios to (1,1): j_m1 / j_11 (Abramowitz & Stegun Table 9.5)
    j11 = jn_zeros(1, 1)[0]
    assert ex.RATIOS["ideal"][1:4] == pytest.approx([jn_zeros(m, 1)[0] / j11 for m in (2, 3, 4)], rel=1e-6)
    # Rossing, "Acoustics of timpani" (1982): head in air without bowl 1.48 1.92 2.36; with bowl
    # 1.50 1.98 2.44 (both as reproduced, docs/references.md)
    assert ex.RATIOS["air, no bowl"][1:4] == pytest.approx([1.48, 1.92, 2.36], abs=0.03)
    assert ex.RATIOS["air and kettle"][1:4] == pytest.approx([1.50, 1.98, 2.44], abs=0.04)
    # Fletcher & Rossing ch. 18: the (0,1) of a kettledrum dies fastest
    assert ex.DECAY[(0, 1)] == min(ex.DECAY.values())
    # the synthetic tap was made at 3600 N/m: analysis and identification give it back
    assert ex.IDENT.tension == pytest.approx(ex.TRUE_TENSION, rel=2e-3)
    assert len(ex.IDENT.matches) >= 6


def test_drum_maker(load):
    ex = load("drum_maker")
    # C3 = 440 * 2^(-21/12) Hz (ISO 16 pitch)
    assert ex.TUNING.targets[0].predicted_frequency == pytest.approx(440 * 2 ** (-21 / 12), rel=1e-5)
    # thin-film stress sigma = T / h, against the film's yield (membrane/data/films.toml)
    assert ex.TUNING.stress == pytest.approx(ex.TUNING.tension / ex.HEAD.thickness)
    assert ex.TUNING.stress < 0.5 * ex.HEAD.yield_stress
    # the lug rule: tap pitch ~ sqrt(local tension), so the changes in cents bring every tap to one pitch
    for tap, change in zip(ex.drum.lugs.pitches, ex.LUG_CHANGES):
        assert tap * 2 ** (change.change_cents / 1200) == pytest.approx(ex.TAP_TARGET_HZ, rel=1e-9)
    assert 0.0 < ex.ADVICE.radius_fraction < 1.0


def test_readme_library_lines_run():
    # the README shows the library in five lines; they must run as printed
    import contextlib
    import io
    import re

    text = (EXAMPLES.parent / "README.md").read_text(encoding="utf-8")
    code = re.search(r"### As a library\n+```python\n(.*?)```", text, re.S).group(1)
    assert code.count("\n") == 5
    namespace = {}
    with contextlib.redirect_stdout(io.StringIO()):
        exec(code, namespace)
    # C3 = 440 * 2^(-21/12) Hz (ISO 16 pitch) on the (1,1), within the search's tolerance
    assert namespace["tuning"].targets[0].predicted_frequency == pytest.approx(440 * 2 ** (-21 / 12), rel=1e-5)
