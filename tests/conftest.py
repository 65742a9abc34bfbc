"""Shared test setup: hypothesis profiles; the on-disk table cache goes to a temporary folder."""

import os

import pytest
from hypothesis import settings

# ------------------------------------------------------------------ hypothesis profiles
# "ci": the same examples on every run (derandomize: the seed is a hash of the test), no example
# database, so a clean clone goes red or green the same way every time. .ci/run sets CI=true.
# "explore" (local default): fresh random examples each run, so new inputs get tried; a failure
# prints its reproduction blob (@reproduce_failure) as well as the falsifying example.
# Either can be chosen with --hypothesis-profile; --hypothesis-seed=N replays one random run.
settings.register_profile("ci", derandomize=True, database=None, print_blob=True)
settings.register_profile("explore", derandomize=False, print_blob=True)
settings.load_profile("ci" if os.environ.get("CI") else "explore")


@pytest.fixture(scope="session", autouse=True)
def _private_table_cache(tmp_path_factory):
    """Point MEMBRANE_CACHE_DIR at a session temp folder (also seen by CLI subprocesses)."""
    with pytest.MonkeyPatch.context() as mp:
        mp.setenv("MEMBRANE_CACHE_DIR", str(tmp_path_factory.mktemp("membrane-cache")))
        mp.delenv("MEMBRANE_CACHE", raising=False)
        yield


def installed_command() -> list[str]:
    """The installed ``membrane`` console script, as a user on this machine would run it.

    Looked up next to the running interpreter first (the venv the tests run in), then on PATH;
    never a path of one particular machine.
    """
    import os
    import shutil
    import sys

    here = os.path.dirname(sys.executable)
    exe = shutil.which("membrane", path=here + os.pathsep + os.environ.get("PATH", ""))
    if exe is None:
        pytest.fail("the membrane console script is not installed (pip install . first)")
    return [exe]


# ------------------------------------------------------------------ shared fixtures and helpers
@pytest.fixture(scope="session")
def kettledrum():
    """The built-in 26-inch kettledrum (invented demo data), read once per session."""
    from membrane import load_drum

    return load_drum("kettledrum")


@pytest.fixture
def cli():
    """Run the command line in-process: ``cli("modes", "kettledrum", "--physics", "ideal")``."""
    from typer.testing import CliRunner

    from membrane.cli import app

    runner = CliRunner()
    return lambda *args: runner.invoke(app, [str(a) for a in args])


def one_line_error(result, words: str) -> None:
    """The bad-input contract (README): exit 2, one line on stderr containing ``words``, no traceback."""
    assert result.exit_code == 2, result.output
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    assert len(lines) == 1 and words in lines[0], result.stderr
    assert "Traceback" not in result.output
