"""A bounded sample of generated realistic drums (benchmarks/sweep_drums.py runs 300): full
physics solves every one, with a decay time for every mode and the whole table."""

import importlib.util
from pathlib import Path

import pytest

_spec = importlib.util.spec_from_file_location(
    "sweep_drums", Path(__file__).resolve().parents[1] / "benchmarks" / "sweep_drums.py")
sweep = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(sweep)

# invented drums (seed 7): 6-32 in polyester or custom heads, slack x1.5 to 80 % of yield,
# no body / kettle / shell with equal, nearly equal or unequal heads, -10..40 degC
DRUMS = sweep.drums(8, seed=7)


@pytest.mark.parametrize("index", range(len(DRUMS)))
def test_generated_drum_solves_with_every_decay_shown(index):
    drum, table = DRUMS[index]
    assert sweep.check(drum, m_max=3, n_max=2) == [], table
