"""Keep freed memory for reuse: the C allocator's settings for the command line.

The solvers build and drop arrays of about a megabyte many thousand times per command (the
coupled operator at 48 contour nodes is 48 x 40 x 40 complex, 1.2 MB, for a two-headed
shell). glibc's malloc serves blocks of that size with a fresh ``mmap`` and returns them to
the system on ``free`` (its threshold adapts, but only up to blocks already freed, and the
top of the heap is trimmed back as well), so each such array costs its pages faulted in and
zeroed again: measured on ``membrane modes snare``, 0.22 s of system time of 1.4 s CPU in all,
0.08 s with the blocks kept, and less user time besides (the pages stay in cache).

:func:`keep_freed_memory` raises both thresholds, which is what the environment variables
``MALLOC_MMAP_THRESHOLD_`` and ``MALLOC_TRIM_THRESHOLD_`` do when set before a process
starts. Only the command line calls it (a process of its own, which ends after one
command); a program using the library keeps its allocator as it set it. Where the C
library has no ``mallopt`` (not glibc) nothing changes.
"""

from __future__ import annotations

# mallopt parameters (glibc malloc.h)
_M_TRIM_THRESHOLD = -1
_M_MMAP_THRESHOLD = -3
# glibc's largest mmap threshold on a 64-bit system (DEFAULT_MMAP_THRESHOLD_MAX, 32 MiB):
# blocks above it (a cold radiation-table build's largest arrays) are still mapped
MMAP_THRESHOLD = 32 * 1024 * 1024
TRIM_THRESHOLD = 256 * 1024 * 1024


def keep_freed_memory() -> bool:
    """Serve blocks up to 32 MiB from the heap and keep up to 256 MiB of it when freed.

    Returns whether the allocator took both settings (False: not glibc, or refused).
    """
    try:
        import ctypes

        libc = ctypes.CDLL(None)
        mallopt = libc.mallopt
    except (OSError, AttributeError, TypeError):  # no C library by that name (Windows: None is refused)
        return False
    mallopt.argtypes = [ctypes.c_int, ctypes.c_int]
    mallopt.restype = ctypes.c_int
    return bool(mallopt(_M_MMAP_THRESHOLD, MMAP_THRESHOLD)) and bool(mallopt(_M_TRIM_THRESHOLD, TRIM_THRESHOLD))
