"""Output files written safely: whole or not at all, never over what must not be replaced.

A file that exists is replaced only with ``--force``; a folder, FIFO, device, socket or
dangling link never. The content goes to a temporary file in the target's folder
(``TEMP_PREFIX`` + pid), then ``os.replace`` moves it over the target in one step;
temporaries of a killed run are removed on the next write to that folder.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path
from typing import Callable

from ..errors import InputError



TEMP_PREFIX = ".membrane-tmp-"  # our temporary files: TEMP_PREFIX + pid + "-" + random + suffix


def check_target(path: str | Path, *, force: bool, key: str = "--out") -> Path:
    """The file to write for ``path``, after refusing what must not be replaced.

    A folder (or a link to one) is refused as a folder; an existing file needs ``force``;
    anything existing that is not a regular file (a FIFO, a device node, a socket, a link
    to nothing) is refused even with ``force``, because replacing it would destroy it.
    A link to a regular file is followed: the file it names is replaced, the link kept.
    """
    path = Path(path)
    if path.is_dir():
        raise InputError(key, str(path), "is a folder; give a file name")
    if os.path.lexists(path):
        if not path.exists():
            raise InputError(key, str(path), "is a link to nothing; remove it or give another file name")
        if not path.is_file():
            raise InputError(key, str(path), "is not a regular file (a device, pipe or socket); it is never replaced")
        if not force:
            raise InputError(key, str(path), "exists already; add --force to overwrite it")
        path = Path(os.path.realpath(path))
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(key, str(path), f"folder {str(folder)!r} does not exist")
    if not os.access(folder, os.W_OK):
        raise InputError(key, str(path), f"folder {str(folder)!r} is not writable")
    return path


def _remove_stale_temporaries(folder: Path) -> None:
    """Delete our temporary files in ``folder`` left by a process that no longer runs."""
    try:
        names = [n for n in os.listdir(folder) if n.startswith(TEMP_PREFIX)]
    except OSError:
        return
    for name in names:
        pid = name[len(TEMP_PREFIX):].split("-", 1)[0]
        if not pid.isdigit() or _alive(int(pid)):
            continue
        try:
            (folder / name).unlink()
        except OSError:
            pass


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError, OSError):
        return True  # someone else's process, or not ours to judge: leave its files alone
    return True


def write_atomic(path: str | Path, writer: Callable[[Path], None], *, force: bool,
                 key: str = "--out") -> Path:
    """Write a file whole or not at all.

    ``writer(tmp_path)`` writes the content to a temporary file in the target's folder
    (with the target's suffix, so format-sniffing writers behave); it is then moved
    over the target in one step. What :func:`check_target` refuses is refused here.
    A temporary file left by a killed run (its process gone) is removed on the next
    write to that folder.
    """
    shown = Path(path)
    path = check_target(path, force=force, key=key)
    folder = path.parent if str(path.parent) else Path(".")
    _remove_stale_temporaries(folder)
    try:
        fd, tmp = tempfile.mkstemp(prefix=f"{TEMP_PREFIX}{os.getpid()}-", suffix=path.suffix, dir=folder)
    except OSError as exc:
        raise InputError(key, str(shown), f"cannot be written ({exc.strerror or exc})")
    os.close(fd)
    tmp = Path(tmp)
    try:
        writer(tmp)
        umask = os.umask(0)  # mkstemp makes 0600 files; give the usual permissions instead
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except OSError as exc:
        tmp.unlink(missing_ok=True)
        raise InputError(key, str(shown), f"cannot be written ({exc.strerror or exc})")
    except BaseException:
        tmp.unlink(missing_ok=True)
        raise
    return shown
