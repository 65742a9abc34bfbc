"""`membrane tune` as a user runs it: both target forms, lugs, formats, and every refusal."""

import json
import math
import subprocess

import pytest
from typer.testing import CliRunner

from membrane import load_drum, solve
from membrane.cli import app
from membrane.tuning import CAUTIONS, SAFE_STRESS_FRACTION
from membrane.units import cents

from conftest import installed_command

runner = CliRunner()
# j_{m,n} to 11 significant digits, computed (mpmath.besseljzero); A&S Table 9.5
# prints them to 5 decimals (10 for m = 0): tests/test_bessel.py checks both
J11, J21 = 3.8317059702, 5.1356223018
FAST = ["--physics", "stiff", "--m-max", "2", "--n-max", "1"]


def run(*args):
    return runner.invoke(app, ["tune", *args])


def as_json(*args):
    result = run(*args, "--format", "json")
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def test_help_documents_both_target_forms():
    result = run("--help")
    assert result.exit_code == 0
    text = " ".join(result.stdout.split())
    assert "--mode 1,1 --target F2" in text and "--target 1,1=F2 --target 2,1=C3" in text
    assert "F2+15c" in text and "rule of thumb" in text.lower()


def test_single_target_json_has_the_contract_keys():
    data = as_json("kettledrum", "--mode", "1,1", "--target", "F2+15c", *FAST)
    for key in ("tension_n_per_m", "current_tension_n_per_m", "change_percent", "predicted_hz", "warnings"):
        assert key in data
    assert isinstance(data["warnings"], list) and data["cautions"] == list(CAUTIONS)
    f2 = 440 * 2 ** ((41 - 69) / 12) * 2 ** (15 / 1200)  # MIDI 41 = F2, ISO 16 A4 = 440 Hz
    assert data["target_hz"] == pytest.approx(f2, rel=1e-12)
    assert abs(cents(data["predicted_hz"], f2)) < 0.1 and abs(data["error_cents"]) < 0.1
    assert data["current_tension_n_per_m"] == 4000.0
    assert data["change_percent"] == pytest.approx(100 * (data["tension_n_per_m"] / 4000.0 - 1))
    assert data["stress_pa"] == pytest.approx(data["tension_n_per_m"] / 0.19e-3)
    # an independent solve of the drum at the suggested tension lands on the target
    again = solve(load_drum("kettledrum").with_tension(data["tension_n_per_m"]), "stiff", m_max=1, n_max=1)
    assert abs(cents(again.find(1, 1).frequency, f2)) < 0.1
    ratios = {(row["m"], row["n"]): row["ratio"] for row in data["modes"]}
    assert ratios[(1, 1)] == pytest.approx(1.0)
    assert len(data["lugs"]["lugs"]) == 8  # the built-in drum's [lugs] table


@pytest.mark.parametrize("pitch, hz", [("F#2", 92.4986), ("Gb2", 92.4986), ("Bb2", 116.5409),
                                       ("116.5409 Hz", 116.5409), ("A2 -8 cents", 110 * 2 ** (-8 / 1200))])
def test_pitch_forms(pitch, hz):
    # equal temperament, A4 = 440 Hz (ISO 16)
    data = as_json("kettledrum", "--target", f"1,1={pitch}", *FAST)
    assert data["target_hz"] == pytest.approx(hz, rel=1e-6)


def test_several_targets_least_squares_and_the_statement():
    # ideal head: (2,1)/(1,1) = j21/j11 is fixed, 507.0 cents; a fifth (700 cents) splits the gap
    data = as_json("kettledrum", "--target", "1,1=F2", "--target", "2,1=C3", "--physics", "ideal",
                   "--m-max", "2", "--n-max", "1")
    gap = 700 - 1200 * math.log2(J21 / J11)
    residuals = [t["residual_cents"] for t in data["targets"]]
    assert residuals == pytest.approx([gap / 2, -gap / 2], abs=1e-3)
    assert data["together"] is False and "No single tension" in data["statement"]
    table = run("kettledrum", "--target", "1,1=F2", "--target", "2,1=C3", "--physics", "ideal", "--m-max", "2",
                "--n-max", "1")
    assert table.exit_code == 0 and "No single tension" in table.stdout


def test_lug_pitches_and_turns():
    data = as_json("kettledrum", "--lug-pitches", "D3,D3+6c", "--lug-pitches", "D3-6c", "--cents-per-turn", "48",
                   *FAST)
    lugs = data["lugs"]["lugs"]
    taps = [146.8324 * 2 ** (c / 1200) for c in (0, 6, -6)]  # D3 (ISO 16 equal temperament)
    rms = math.sqrt(sum(t * t for t in taps) / 3)  # tap pitch ~ sqrt(tension)  # common practice, no source
    assert [lug["change_cents"] for lug in lugs] == pytest.approx([cents(rms, t) for t in taps], abs=1e-3)
    assert [lug["turns"] for lug in lugs] == [0.0, -0.125, 0.125]
    assert "rule of thumb" in data["lugs"]["rule"]
    assert data["tension_n_per_m"] == data["current_tension_n_per_m"]  # no target: just even it out


def test_overstress_gives_a_caution():
    # (1,1) from 228 Hz up to G4 needs about (392/228)^2 x 4000 N/m, 62 % of the film's 100 MPa yield
    stressed = as_json("kettledrum", "--mode", "1,1", "--target", "G4", *FAST)
    assert stressed["stress_fraction_of_yield"] > SAFE_STRESS_FRACTION
    assert any("safe limit" in w for w in stressed["warnings"])
    calm = as_json("kettledrum", "--mode", "1,1", "--target", "A3", *FAST)
    assert calm["warnings"] == []
    table = run("kettledrum", "--mode", "1,1", "--target", "G4", *FAST)
    assert "caution:" in table.stdout and "tear" in table.stdout


@pytest.mark.parametrize("fmt", ["table", "markdown", "csv"])
def test_other_formats(fmt):
    result = run("kettledrum", "--mode", "1,1", "--target", "C3", *FAST, "--format", fmt)
    assert result.exit_code == 0, result.output
    assert "tension" in result.stdout


@pytest.mark.parametrize("args, words", [
    (["--mode", "1,1", "--target", "0.5 Hz"], "slack limit"),
    (["--mode", "60,1", "--target", "F2"], "mode"),
    (["--mode", "1,0", "--target", "F2"], "--mode"),
    (["--target", "F2"], "--mode M,N"),
    (["--target", "1,1=H2"], "--target"),
    (["--mode", "1,1", "--target", "C9"], "unreachable"),
    (["--lug-pitches", "D3,-147,D3"], "positive"),
    (["--lug-pitches", "D3,D3+4c"], "at least 3"),
    (["--mode", "1,1", "--target", "F2", "--free", "volume"], "at least two"),
    (["--target", "1,1=F2", "--target", "2,1=C3", "--free", "mass"], "mass"),
    (["--target", "1,1=F2", "--target", "2,1=C3", "--free", "volume", "--physics", "stiff"], "physics full"),
    (["--target", "1,1=F2", "--target", "1,1=G2"], "one target"),
    (["--cents-per-turn", "-3"], "--cents-per-turn"),  # the option as typed
])
def test_refusals_are_one_line_and_exit_2(args, words):
    extra = [] if "--physics" in args else ["--physics", "stiff"]
    result = run("kettledrum", *args, *extra, "--m-max", "1", "--n-max", "1")
    assert result.exit_code == 2, result.output
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    assert len(lines) == 1 and words in lines[0], result.stderr
    assert "Traceback" not in result.output


def test_no_target_and_no_lugs(tmp_path):
    path = tmp_path / "drum.toml"
    path.write_text('[head]\ndiameter = "14 in"\nfilm = "polyester"\nthickness = "10 mil"\ntension = "3 kN/m"\n')
    result = run(str(path), "--physics", "stiff")
    assert result.exit_code == 2 and "--target" in result.stderr


def test_real_subprocess_of_the_installed_script():
    good = subprocess.run([*installed_command(), "tune", "kettledrum", "--mode", "1,1", "--target", "Bb2", "--physics", "stiff",
                           "--m-max", "1", "--n-max", "1", "--format", "json"],
                          capture_output=True, text=True, timeout=120)
    assert good.returncode == 0, good.stderr
    data = json.loads(good.stdout)
    assert abs(cents(data["predicted_hz"], 440 * 2 ** ((46 - 69) / 12))) < 0.1  # MIDI 46 = Bb2
    bad = subprocess.run([*installed_command(), "tune", "kettledrum", "--lug-pitches", "D3,D3"], capture_output=True, text=True,
                         timeout=120)
    assert bad.returncode == 2 and bad.stderr.count("\n") == 1 and "Traceback" not in bad.stderr


def test_full_physics_is_the_default():
    data = as_json("kettledrum", "--mode", "1,1", "--target", "A2", "--m-max", "1", "--n-max", "3")
    assert data["physics"] == "full" and abs(data["error_cents"]) < 0.1
    # air loading and the bowl: the answer differs from sqrt(T) scaling
    assert abs(data["tension_n_per_m"] / data["naive_tension_n_per_m"] - 1) > 0.005
    assert all(row["decay_s"] is not None for row in data["modes"])


def test_the_summary_table_has_no_empty_header_row():
    out = run("kettledrum", "--mode", "1,1", "--target", "C3", "--physics", "ideal")
    assert out.exit_code == 0, out.output
    first_table = out.stdout.split("\n\n")[0]
    assert "current tension" in first_table
    # a header row of empty cells would be a line of only box-drawing characters and spaces
    # between the top rule and the first row
    lines = [line for line in first_table.splitlines() if line.strip()]
    body = lines[lines.index(next(line for line in lines if "current tension" in line)) - 1]
    assert set(body.strip()) <= set("┌┬┐─"), body


def test_air_rows_of_the_tuned_table_carry_their_own_label():
    # the tuned table names a body air resonance as such ("air (m,q,p)"), never as a
    # head mode with a negative n; at C3 the kettle's first cross-wise air mode is in the table
    payload = as_json("kettledrum", "--mode", "1,1", "--target", "C3")
    assert any(row.get("kind") == "air" for row in payload["modes"])
    result = run("kettledrum", "--mode", "1,1", "--target", "C3")
    assert result.exit_code == 0, result.output
    assert "air (1,0,0)" in result.stdout and ",-" not in result.stdout
