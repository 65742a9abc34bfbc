"""`membrane modes` as a user runs it: formats, file and flags, and every kind of bad input."""

import json
import subprocess
import sys

import pytest
from typer.testing import CliRunner

from membrane.cli import app

runner = CliRunner()
FLAGS = ["--diameter", "26 in", "--tension", "4 kN/m", "--film", "polyester", "--thickness", "0.19 mm"]


def run(*args):
    return runner.invoke(app, list(args))


def test_json_has_the_contract_keys():
    result = run("modes", *FLAGS, "--physics", "ideal", "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["physics"] == "ideal" and data["reference"] == {"m": 0, "n": 1}
    freqs = [row["frequency_hz"] for row in data["modes"]]
    assert freqs == sorted(freqs)
    for row in data["modes"]:
        assert isinstance(row["m"], int) and isinstance(row["n"], int)
        assert row["decay_s"] is None and "ratio" in row
    # SOURCES.md ideal ratio (1,1)/(0,1) = 1.5933
    r11 = next(r["ratio"] for r in data["modes"] if (r["m"], r["n"]) == (1, 1))
    assert r11 == pytest.approx(1.5933, abs=6e-5)


def test_drum_file_and_flags_override_it(tmp_path):
    path = tmp_path / "drum.toml"
    path.write_text('[head]\ndiameter = "26 in"\nfilm = "polyester"\nthickness = "0.19 mm"\ntension = "4 kN/m"\n')
    a = json.loads(run("modes", str(path), "--physics", "ideal", "--format", "json").stdout)
    b = json.loads(run("modes", *FLAGS, "--physics", "ideal", "--format", "json").stdout)
    assert a["modes"] == b["modes"]
    c = json.loads(run("modes", str(path), "--tension", "16 kN/m", "--physics", "ideal", "--format", "json").stdout)
    # f goes as sqrt(T): four times the tension, twice the frequency
    assert c["modes"][0]["frequency_hz"] == pytest.approx(2 * a["modes"][0]["frequency_hz"], rel=1e-12)


@pytest.mark.parametrize("fmt", ["table", "csv", "markdown"])
def test_other_formats(fmt):
    result = run("modes", "kettledrum", "--physics", "stiff", "--format", fmt)
    assert result.exit_code == 0, result.output
    assert "(1,1)" in result.stdout or "1,1," in result.stdout


def test_stiff_is_above_ideal_for_the_builtin_drum():
    ideal = json.loads(run("modes", "kettledrum", "--physics", "ideal", "--format", "json").stdout)
    stiff = json.loads(run("modes", "kettledrum", "--physics", "stiff", "--format", "json").stdout)
    for a, b in zip(ideal["modes"], stiff["modes"]):
        assert b["frequency_hz"] > a["frequency_hz"]


@pytest.mark.parametrize("args, words", [
    (["--diameter", "-26 in"], "head.diameter"),
    (["--diameter", "0 in"], "head.diameter"),
    (["--diameter", "nan in"], "finite"),
    (["--film", "unobtainium"], "unknown film"),
    (["--diameter", "26 furlongz"], "unknown unit"),
    (["--tension", "4 kN"], "wrong kind"),
    (["--m-max", "500"], "m_max"),
    (["--n-max", "0"], "n_max"),
    (["--reference", "9,9"], "mode"),
    (["--reference", "one"], "--reference"),
    (["--fit", "9,9"], "mode"),
    (["--physics", "quantum"], "quantum"),
    (["--format", "xml"], "xml"),
    (["--bogus"], "bogus"),
])
def test_bad_flags_give_one_line_and_exit_2(args, words):
    base = dict(zip(FLAGS[::2], FLAGS[1::2]))
    for flag, value in zip(args[::2], args[1::2] if len(args) > 1 else [None]):
        base.pop(flag, None)
    rest = [x for kv in base.items() for x in kv]
    result = run("modes", *rest, *args, "--physics", "ideal") if "--physics" not in args else \
        run("modes", *rest, *args)
    assert result.exit_code == 2, result.output
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    assert len(lines) == 1 and words in lines[0], result.stderr
    assert "Traceback" not in result.output


@pytest.mark.parametrize("text, words", [
    ("[head\ndiameter = 3", "not valid TOML"),
    ('[head]\ndiameter = "26 in"\ntension = 4000\nareal_density = 0.26\ncolour = "red"\n', "head.colour"),
    ('[head]\ndiameter = "26 in"\ntension = 4000\n', "areal_density"),
])
def test_bad_drum_files(tmp_path, text, words):
    path = tmp_path / "bad.toml"
    path.write_text(text)
    result = run("modes", str(path))
    assert result.exit_code == 2
    assert len(result.stderr.strip().splitlines()) == 1 and words in result.stderr


def test_missing_file_and_no_input():
    result = run("modes", "no-such-drum.toml")
    assert result.exit_code == 2 and "no such file" in result.stderr
    result = run("modes")
    assert result.exit_code == 2 and "DRUM_FILE" in result.stderr


def test_real_subprocess_of_the_installed_script():
    # The console script as a user runs it: bad input, one line, exit 2, no traceback
    exe = [sys.executable, "-m", "membrane"]
    bad = subprocess.run([*exe, "modes", "--diameter", "-1 m", "--tension", "4 kN/m",
                          "--areal-density", "0.26 kg/m^2", "--physics", "ideal"],
                         capture_output=True, text=True, timeout=60)
    assert bad.returncode == 2
    assert bad.stderr.count("\n") == 1 and "head.diameter" in bad.stderr and "Traceback" not in bad.stderr
    good = subprocess.run([*exe, "modes", "kettledrum", "--physics", "ideal", "--format", "json"],
                          capture_output=True, text=True, timeout=60)
    assert good.returncode == 0 and json.loads(good.stdout)["modes"]


def test_full_physics_refuses_tables_too_big_to_wait_for():
    result = run("modes", "kettledrum", "--m-max", "50", "--n-max", "50")
    assert result.exit_code == 2 and "full physics at most" in result.stderr


def test_radiation_only_decay_beyond_100_s_is_shown_as_such():
    # the (5,1) and (6,1) modes of the built-in kettledrum radiate very little (T60 > 100 s)
    table = run("modes", "kettledrum", "--m-max", "6", "--n-max", "1", "--losses", "radiation").stdout
    assert "> 100" in table
    data = json.loads(run("modes", "kettledrum", "--m-max", "6", "--n-max", "1", "--losses", "radiation",
                          "--format", "json").stdout)
    assert max(row["decay_s"] for row in data["modes"]) > 100  # JSON keeps the number
    assert data["losses"] == "radiation" and any("radiation only" in n for n in data["notes"])


def test_default_losses_are_said_and_bring_the_m1_family_to_seconds():
    # issue 19's three real timpani recordings (band-envelope fits): T60 of (1,1)..(4,1) between
    # about 3 and 11.5 s; within a factor 3 of that range with the default losses
    result = run("modes", "kettledrum", "--m-max", "4", "--n-max", "1", "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["losses"] == "all" and any("--losses all" in n for n in data["notes"])
    t60 = {(row["m"], row["n"]): row["decay_s"] for row in data["modes"]}
    for m in range(1, 5):
        assert 3.0 / 3 < t60[(m, 1)] < 11.5 * 3, (m, t60[(m, 1)])
    table = run("modes", "kettledrum", "--m-max", "2", "--n-max", "1").stdout
    assert "T60 with all losses" in table
