"""``membrane examples``: the built-in drums listed, printed, copied out; the film catalogue."""

import tomllib

import pytest
from conftest import one_line_error

from membrane.drum import builtin_names


def test_lists_every_builtin(cli):
    result = cli("examples")
    assert result.exit_code == 0, result.output
    for name in builtin_names():
        assert name in result.stdout
    assert "invented" in result.stdout  # demo data say so (house rule)


@pytest.mark.parametrize("name", builtin_names())
def test_prints_a_valid_drum_file(cli, name):
    result = cli("examples", name)
    assert result.exit_code == 0, result.output
    table = tomllib.loads(result.stdout)  # TOML 1.0, Python's own reader
    assert "head" in table and "INVENTED" in result.stdout.upper()


def test_unknown_example_is_one_line(cli):
    one_line_error(cli("examples", "no-such-drum"), "built-in examples")


def test_copy_out_needs_force_to_overwrite(cli, tmp_path):
    out = tmp_path / "drum.toml"
    out.write_text("keep me", encoding="utf-8")
    one_line_error(cli("examples", "kettledrum", "--out", out), "--force")
    assert out.read_text(encoding="utf-8") == "keep me"
    assert cli("examples", "kettledrum", "--out", out, "--force").exit_code == 0
    assert "[head]" in out.read_text(encoding="utf-8")


def test_films_catalogue_names_sources(cli):
    result = cli("examples", "--films")
    assert result.exit_code == 0, result.output
    assert "polyester" in result.stdout and "from memory" in result.stdout
