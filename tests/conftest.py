"""Shared test setup: the on-disk table cache goes to a temporary folder, never the home cache."""

import pytest


@pytest.fixture(scope="session", autouse=True)
def _private_table_cache(tmp_path_factory):
    """Point MEMBRANE_CACHE_DIR at a session temp folder (also seen by CLI subprocesses)."""
    with pytest.MonkeyPatch.context() as mp:
        mp.setenv("MEMBRANE_CACHE_DIR", str(tmp_path_factory.mktemp("membrane-cache")))
        mp.delenv("MEMBRANE_CACHE", raising=False)
        yield
