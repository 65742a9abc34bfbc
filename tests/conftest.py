"""Shared test setup: the on-disk table cache goes to a temporary folder, never the home cache."""

import pytest


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
