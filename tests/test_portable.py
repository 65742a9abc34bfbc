"""The repository runs on any machine: no file holds an absolute path of one machine."""

import re
import shutil
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
# Folders that only exist on one machine: a home, a work area, a venv, a temp folder.
MACHINE_PATH = r"(/home/|/Users/|/root/|/work/|/tmp/[A-Za-z]|/opt/|[A-Za-z]:\\Users\\|/\.venv/|/venv/bin/)"


def test_no_file_in_the_repository_holds_a_machine_path():
    if shutil.which("git") is None or not (ROOT / ".git").exists():
        pytest.skip("not a git checkout")
    found = subprocess.run(["git", "grep", "-nIE", MACHINE_PATH, "--", ".", ":!tests/test_portable.py"],
                           cwd=ROOT, capture_output=True, text=True)
    assert found.returncode in (0, 1), found.stderr
    assert found.stdout == "", "absolute paths of one machine:\n" + found.stdout


def test_the_pattern_catches_what_it_should():
    # the check above must be able to fail
    bad = ["/work/venv/bin/membrane", "/home/someone/x.py", "C:\\Users\\x", "/root/.cache"]
    good = ["membrane/physics/coupled.py", "~/.cache/membrane", "https://example.org/a/b"]
    assert all(re.search(MACHINE_PATH, s) for s in bad)
    assert not any(re.search(MACHINE_PATH, s) for s in good)
