"""The drum file's [losses] table: defaults, values, and one-line errors."""

import pytest
from typer.testing import CliRunner

from membrane.cli import app
from membrane.drum import parse_drum
from membrane.errors import InputError
from membrane.losses import Losses

HEAD = {"diameter": "26 in", "tension": "4000 N/m", "areal_density": 0.26}


def test_absent_table_gives_the_documented_defaults():
    # the defaults of docs/losses.md
    drum = parse_drum({"head": HEAD})
    assert drum.losses == Losses()
    assert (drum.losses.tension_loss_factor, drum.losses.film_loss_factor) == (2e-3, 0.015)
    assert drum.losses.boundary_layers and drum.losses.edge_mobility == 0.0


def test_values_and_units_are_read():
    drum = parse_drum({"head": HEAD, "losses": {"tension_loss_factor": 0.004, "boundary_layers": False,
                                                "edge_mobility": "2e-5 m/(N*s)"}})
    assert drum.losses.tension_loss_factor == 0.004 and not drum.losses.boundary_layers
    assert drum.losses.edge_mobility == pytest.approx(2e-5)
    assert drum.losses.film_loss_factor == 0.015


@pytest.mark.parametrize("table, key", [
    ({"tension_loss_factor": -1e-3}, "losses.tension_loss_factor"),
    ({"film_loss_factor": "a lot"}, "losses.film_loss_factor"),
    ({"boundary_layers": "yes"}, "losses.boundary_layers"),
    ({"edge_mobility": "3 m/s"}, "losses.edge_mobility"),
    ({"edge_mobility": 1.0}, "losses.edge_mobility"),
    ({"rim_friction": 0.1}, "losses.rim_friction"),
])
def test_bad_values_name_the_key(table, key):
    with pytest.raises(InputError) as err:
        parse_drum({"head": HEAD, "losses": table})
    assert err.value.key == key


def test_cli_bad_losses_is_one_line_and_exit_2(tmp_path):
    path = tmp_path / "drum.toml"
    path.write_text('[head]\ndiameter = "14 in"\ntension = "2000 N/m"\nareal_density = 0.1\n'
                    '[losses]\ntension_loss_factor = 2\n', encoding="utf-8")
    result = CliRunner().invoke(app, ["modes", str(path), "--m-max", "1", "--n-max", "1"])
    assert result.exit_code == 2
    assert "losses.tension_loss_factor" in result.output and "Traceback" not in result.output
    bad = CliRunner().invoke(app, ["modes", str(path), "--losses", "some"])
    assert bad.exit_code == 2
