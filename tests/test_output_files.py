"""What the commands write: never replace what is not a regular file, no leftovers, one-line I/O errors.

Reference: the POSIX file types as os.stat reports them (a FIFO, a character device, a
folder, a symbolic link), and the kernel's own full device /dev/full (writes fail with
ENOSPC), so the checks do not depend on the project's idea of what a file is.
"""

import os
import stat
import subprocess
import sys
from pathlib import Path

import pytest
from typer.testing import CliRunner

from membrane.cli import app
from membrane.cli.common import TEMP_PREFIX, write_atomic
from membrane.errors import InputError

from conftest import one_line_error  # noqa: E402  (the shared bad-input check)

runner = CliRunner()


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no FIFOs on this system")
def test_force_never_replaces_a_fifo(tmp_path):
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    one_line_error(runner.invoke(app, ["examples", "snare", "--out", str(fifo), "--force"]),
                   "not a regular file")
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)  # still a FIFO


def test_force_never_replaces_a_device_node(monkeypatch):
    # Run as root, the old code replaced /dev/null with a regular file. The writer and the
    # final rename are booby-trapped, so even code that got this wrong harms nothing here.
    def never(*args, **kwargs):
        pytest.fail("a device node was about to be replaced")

    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)
    monkeypatch.setattr(os, "replace", never)
    with pytest.raises(InputError, match="not a regular file"):
        write_atomic("/dev/null", never, force=True)
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_a_folder_or_a_link_to_one_is_called_a_folder(tmp_path):
    folder = tmp_path / "pictures"
    folder.mkdir()
    link = tmp_path / "link"
    link.symlink_to(folder)
    for target in (folder, link):
        for force in ([], ["--force"]):
            one_line_error(runner.invoke(app, ["examples", "snare", "--out", str(target), *force]),
                           "is a folder")


def test_a_link_to_a_file_is_followed_and_kept(tmp_path):
    real = tmp_path / "real.toml"
    real.write_text("old")
    link = tmp_path / "link.toml"
    link.symlink_to(real)
    one_line_error(runner.invoke(app, ["examples", "snare", "--out", str(link)]), "exists already")
    result = runner.invoke(app, ["examples", "snare", "--out", str(link), "--force"])
    assert result.exit_code == 0, result.output
    assert link.is_symlink() and "snare" in real.read_text()


def test_a_dangling_link_is_refused(tmp_path):
    link = tmp_path / "gone.toml"
    link.symlink_to(tmp_path / "nothing-here")
    one_line_error(runner.invoke(app, ["examples", "snare", "--out", str(link), "--force"]),
                   "link to nothing")
    assert link.is_symlink()


def test_a_killed_write_leaves_nothing_behind_after_the_next_write(tmp_path):
    # a run killed mid-write (its process gone) left a temporary file of ours
    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"],
                          capture_output=True, text=True, check=True)
    pid = int(dead.stdout)
    left = tmp_path / f"{TEMP_PREFIX}{pid}-abc123.gif"
    left.write_bytes(b"half a picture")
    someone_elses = tmp_path / ".other-tool-tmp.gif"
    someone_elses.write_bytes(b"not ours")
    write_atomic(tmp_path / "new.toml", lambda p: p.write_text("x"), force=False)
    assert not left.exists() and someone_elses.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == [".other-tool-tmp.gif", "new.toml"]


def test_a_failing_writer_leaves_no_temporary_file(tmp_path):
    def writer(path):
        path.write_text("partial")
        raise OSError(28, "No space left on device")

    with pytest.raises(InputError, match="No space left"):
        write_atomic(tmp_path / "out.png", writer, force=False)
    assert list(tmp_path.iterdir()) == []


@pytest.mark.skipif(not Path("/dev/full").exists(), reason="no /dev/full on this system")
def test_stdout_on_a_full_device_is_one_line_and_exit_2():
    with open("/dev/full", "w") as full:
        done = subprocess.run([sys.executable, "-m", "membrane", "modes", "kettledrum", "--physics", "ideal"],
                              stdout=full, stderr=subprocess.PIPE, text=True, timeout=120)
    assert done.returncode == 2, done.stderr
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and "No space left on device" in lines[0], done.stderr


def test_numpy_warnings_never_print_before_the_result_or_the_error():
    # A numpy RuntimeWarning raised inside a command (here by a solve wrapped to take the
    # log of zero first, as a search probing a bad trial point would) must not reach the
    # user: stderr is empty on success and holds one line on error. A real process, since
    # pytest would capture warnings of an in-process run before they reach stderr.
    script = (
        "import sys, numpy as np, membrane.solver as s\n"
        "solve = s.solve\n"
        "def noisy(*a, **k):\n"
        "    np.log(np.zeros(2)); np.float64(1e308) * 10\n"
        "    return solve(*a, **k)\n"
        "s.solve = noisy\n"
        "from membrane.cli import main\n"
        "sys.argv = ['membrane'] + sys.argv[1:]\n"
        "main()\n")
    ok = subprocess.run([sys.executable, "-c", script, "modes", "kettledrum", "--physics", "ideal"],
                        capture_output=True, text=True, timeout=120)
    assert ok.returncode == 0 and ok.stderr == "", ok.stderr
    bad = subprocess.run([sys.executable, "-c", script, "modes", "kettledrum", "--physics", "ideal",
                          "--reference", "9,3"], capture_output=True, text=True, timeout=120)
    assert bad.returncode == 2 and len(bad.stderr.strip().splitlines()) == 1, bad.stderr
