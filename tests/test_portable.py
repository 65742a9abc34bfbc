"""The repository runs on any machine: no file holds an absolute path of one machine."""

import re
import shutil
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
# Folders that only exist on one machine: a home, a work area, a venv, a temp folder.
# Built from folder names so that this file itself holds no such path.
_TOPS = ("home", "Users", "root", "work", "opt")
_SLASH = "/"
MACHINE_PATH = ("(" + "|".join(_SLASH + top + _SLASH for top in _TOPS)
                + "|" + _SLASH + "tmp" + _SLASH + "[A-Za-z]"
                + "|[A-Za-z]:" + r"\\" + "Users" + r"\\"
                + "|" + _SLASH + r"\.venv" + _SLASH
                + "|" + _SLASH + "venv" + _SLASH + "bin" + _SLASH + ")")


def test_no_file_in_the_repository_holds_a_machine_path():
    if shutil.which("git") is None or not (ROOT / ".git").exists():
        pytest.skip("not a git checkout")
    found = subprocess.run(["git", "grep", "-nIE", MACHINE_PATH, "--", "."],
                           cwd=ROOT, capture_output=True, text=True)
    assert found.returncode in (0, 1), found.stderr
    assert found.stdout == "", "absolute paths of one machine:\n" + found.stdout


def test_the_pattern_catches_what_it_should():
    # the check above must be able to fail
    bad = ["/" + "/".join(parts) for parts in
           (("work", "venv", "bin", "membrane"), ("home", "someone", "x.py"), ("root", ".cache"))]
    bad.append("C:" + "\\".join(["", "Users", "x"]))
    good = ["membrane/physics/coupled.py", "~/.cache/membrane", "https://example.org/a/b"]
    assert all(re.search(MACHINE_PATH, s) for s in bad)
    assert not any(re.search(MACHINE_PATH, s) for s in good)


def test_no_file_cites_a_document_the_repository_does_not_hold():
    # what a docstring or a test comment cites must be in a clone: docs/ or a published source
    if shutil.which("git") is None or not (ROOT / ".git").exists():
        pytest.skip("not a git checkout")
    names = [stem + "." + "md" for stem in ("SOURCES", "DESIGN")]
    cited = [name for name in names if not (ROOT / name).exists()]
    found = subprocess.run(["git", "grep", "-nIF"] + sum((["-e", n] for n in cited), []) + ["--", "."],
                           cwd=ROOT, capture_output=True, text=True) if cited else None
    if found is not None:
        assert found.returncode in (0, 1), found.stderr
        assert found.stdout == "", "cites a file a clone does not hold:\n" + found.stdout
