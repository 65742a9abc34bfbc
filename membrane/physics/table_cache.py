"""A folder of computed radiation-table coefficients, so a new process skips rebuilding them.

Only numbers are stored (numpy ``.npz``, no pickles), one file per table, named by a hash of
everything the numbers depend on: the fields of the key objects given by the caller, exactly
(floats by their round-trip ``repr``: no physics input is rounded, so a cached table is
bit-for-bit the one a fresh build gives), :data:`FORMAT`, a fingerprint of the source files
that compute the tables and the numpy and scipy versions. Any change to those selects a new
file; old files age out.

Folder: ``$MEMBRANE_CACHE_DIR``, else ``$XDG_CACHE_HOME/membrane``, else
``~/.cache/membrane``. ``MEMBRANE_CACHE=off`` (or 0, no, false) turns it off. The cache is a
speed-up only: a folder that cannot be created or written, or a file that cannot be read or
does not match, is ignored silently and the table is computed as if there were no cache.
At most :data:`MAX_FILES` files are kept; the least recently used go first.
"""

from __future__ import annotations

import dataclasses
import hashlib
import os
import tempfile
import time
import zipfile
from pathlib import Path

import numpy as np

FORMAT = 1  # bump when the stored arrays or their meaning change
MAX_FILES = 200  # about 200 x 0.1-1 MB at most
MAX_FILE_BYTES = 64_000_000  # one table is 0.1-1 MB; anything far larger is not ours
_SUFFIX = ".npz"
_OFF = {"off", "0", "no", "false"}
_fingerprint: str | None = None


def cache_dir() -> Path | None:
    """The cache folder, or None when the cache is turned off (nothing is created here)."""
    if os.environ.get("MEMBRANE_CACHE", "").strip().lower() in _OFF:
        return None
    env = os.environ.get("MEMBRANE_CACHE_DIR")
    if env:
        return Path(env).expanduser()
    xdg = os.environ.get("XDG_CACHE_HOME")
    base = Path(xdg).expanduser() if xdg and os.path.isabs(xdg) else Path.home() / ".cache"
    return base / "membrane"


# The modules whose code computes the tables, fingerprinted by their source files. They are
# found, not imported: coupled.py uses this module, so importing it here would be a loop.
SOURCES = ("membrane.bessel", "membrane.physics.vacuum", "membrane.physics.radiation",
           "membrane.physics.ritz", "membrane.physics.operator", "membrane.physics.coupled")


def _source_fingerprint() -> str:
    """Hash of the modules whose code computes the tables, and of numpy's and scipy's versions.

    Editing any of them (or upgrading numpy/scipy, whose special functions feed the numbers)
    selects new cache files, so a stale table is never served after a code change.
    """
    global _fingerprint
    if _fingerprint is None:
        import importlib.util

        import scipy

        h = hashlib.sha256(f"{np.__version__} {scipy.__version__}".encode())
        for name in SOURCES:
            try:
                spec = importlib.util.find_spec(name)
                h.update(Path(spec.origin).read_bytes())
            except (OSError, TypeError, AttributeError, ImportError):
                # no source at hand (frozen install): versions and FORMAT only
                h.update(name.encode())
        _fingerprint = h.hexdigest()
    return _fingerprint


def _describe(obj) -> str:
    """Exact text of a key part: dataclass fields by name, floats by round-trip repr."""
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        inner = ",".join(f"{f.name}={_describe(getattr(obj, f.name))}"
                         for f in dataclasses.fields(obj))
        return f"{type(obj).__name__}({inner})"
    if isinstance(obj, (bool, int, str)) or obj is None:
        return repr(obj)
    if isinstance(obj, float):
        return repr(float(obj))  # round-trips exactly: no quantising
    raise TypeError(f"cache key part of unsupported type {type(obj).__name__}")


def key(kind: str, *parts) -> str:
    """Hash naming one stored table: ``kind``, the exact key parts, FORMAT and the code."""
    text = "|".join([kind, f"format={FORMAT}", _source_fingerprint(), *map(_describe, parts)])
    return hashlib.sha256(text.encode()).hexdigest()[:40]


def load(name: str, shapes: dict[str, tuple] | None = None) -> dict[str, np.ndarray] | None:
    """The arrays stored under ``name``, or None if absent, unreadable or not as expected.

    Parameters
    ----------
    name : str
        A :func:`key`.
    shapes : dict, optional
        Array name -> expected shape (None entries match any length on that axis): every
        array the file should hold besides its key. A file missing an array, holding any
        other member, larger than :data:`MAX_FILE_BYTES`, or with another shape, a
        non-float dtype or non-finite values, is treated as absent (and will be
        overwritten by the next :func:`store`). Names and sizes are checked from the
        archive's directory before anything is read, so a file padded with a huge extra
        member costs nothing.
    """
    folder = cache_dir()
    if folder is None:
        return None
    path = folder / (name + _SUFFIX)
    if not _members_as_expected(path, shapes or {}):
        return None
    try:
        with np.load(path, allow_pickle=False) as data:
            arrays = {k: np.array(data[k]) for k in data.files}
    except Exception:  # noqa: BLE001 -- any unreadable file is a cache miss, never an error
        return None
    if str(arrays.pop("key", "")) != name:
        return None
    for k, shape in (shapes or {}).items():
        a = arrays.get(k)
        if (a is None or a.dtype != np.float64 or a.ndim != len(shape)
                or any(e is not None and e != n for e, n in zip(shape, a.shape))
                or not np.all(np.isfinite(a))):
            return None
    try:
        os.utime(path)  # mark as recently used, for the pruning
    except OSError:
        pass
    return arrays


def _members_as_expected(path: Path, shapes: dict[str, tuple]) -> bool:
    """Whether the .npz at ``path`` holds exactly ``key`` and the named arrays, small and stored.

    Read from the zip directory only (no member is loaded): the file and its members must
    fit in :data:`MAX_FILE_BYTES`, be stored uncompressed as ``np.savez`` writes them (so a
    member cannot expand when read), and be named ``key.npy`` plus one ``<name>.npy`` per
    expected array, nothing else.
    """
    try:
        if path.stat().st_size > MAX_FILE_BYTES:
            return False
        with zipfile.ZipFile(path) as archive:
            members = archive.infolist()
    except (OSError, zipfile.BadZipFile, ValueError, EOFError):
        return False
    names = sorted(m.filename for m in members)
    if names != sorted(["key.npy"] + [f"{k}.npy" for k in shapes]):
        return False
    return (all(m.compress_type == zipfile.ZIP_STORED and m.file_size == m.compress_size
                for m in members)
            and sum(m.file_size for m in members) <= MAX_FILE_BYTES)


def store(name: str, **arrays: np.ndarray) -> bool:
    """Write the arrays under ``name`` whole (temp file + os.replace); False if not possible."""
    folder = cache_dir()
    if folder is None:
        return False
    tmp = None
    try:
        folder.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=".tmp-", suffix=_SUFFIX, dir=folder)
        with os.fdopen(fd, "wb") as f:
            np.savez(f, key=np.array(name), **arrays)
        os.replace(tmp, folder / (name + _SUFFIX))
        tmp = None
        _prune(folder)
        return True
    except Exception:  # noqa: BLE001 -- a failed write only means no disk cache
        return False
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
            except OSError:
                pass


def _prune(folder: Path, keep: int | None = None) -> None:
    """Delete the least recently used files beyond ``keep`` (and temp files left by a crash)."""
    def mtime(p):
        try:
            return p.stat().st_mtime
        except OSError:
            return 0.0

    keep = MAX_FILES if keep is None else keep
    files = sorted(folder.glob("*" + _SUFFIX), key=mtime)
    stale = [p for p in files if p.name.startswith(".tmp-")]
    files = [p for p in files if not p.name.startswith(".tmp-")]
    # a temp file older than an hour is left over from a killed process
    now = time.time()
    doomed = files[:max(0, len(files) - keep)] + [p for p in stale if now - mtime(p) > 3600]
    for p in doomed:
        try:
            p.unlink()
        except OSError:
            pass
