"""``membrane --version`` against the installed distribution's own metadata (from pyproject.toml)."""

import importlib.metadata
import subprocess
import sys


def test_version_matches_the_installed_distribution():
    done = subprocess.run([sys.executable, "-m", "membrane", "--version"], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    # the version pip recorded when installing the package (importlib.metadata, not our code)
    assert done.stdout.strip() == f"membrane {importlib.metadata.version('membrane')}"
    assert done.stderr == ""
