"""One BLAS thread for the library's many small matrix products.

The solvers multiply and factor many small matrices (tens of rows), where a threaded BLAS
only adds start-up and contention: measured on a busy 2-core machine, a radiation-table
build took 0.75 s on one thread and 6.8 s on two, and a recording analysis 251 ms against
795 ms. The command line sets OPENBLAS_NUM_THREADS=1 (and the OpenMP and MKL equivalents)
before numpy loads; a program calling the library directly gets the same through
:func:`one_blas_thread`, which limits the BLAS pools for the duration of a call with
threadpoolctl and restores them afterwards (the caller's own numpy work outside the call
keeps its threads).
"""

from __future__ import annotations

import functools
import os
import threading

_VARS = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")
_inside = threading.local()


def _already_single() -> bool:
    """Whether the environment asked for one thread before BLAS loaded (the CLI does)."""
    return all(os.environ.get(v, "").strip() == "1" for v in _VARS)


def one_blas_thread(func):
    """Decorator: run ``func`` with the BLAS thread pools limited to one thread.

    Nested calls limit once (the outermost); with the environment already asking for one
    thread (as the command line does) nothing is changed and threadpoolctl is not loaded.
    """

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        if getattr(_inside, "depth", 0) or _already_single():
            return func(*args, **kwargs)
        from threadpoolctl import threadpool_limits

        _inside.depth = 1
        try:
            with threadpool_limits(limits=1, user_api="blas"):
                return func(*args, **kwargs)
        finally:
            _inside.depth = 0

    return wrapper
