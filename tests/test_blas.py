"""Library calls run BLAS on one thread, as reported by threadpoolctl (the reference here)."""

import os
import subprocess
import sys

CODE = """
import numpy
import threadpoolctl
from membrane.blas import one_blas_thread

def blas_threads():
    return max(p["num_threads"] for p in threadpoolctl.threadpool_info() if p["user_api"] == "blas")

@one_blas_thread
def inner():
    return blas_threads()

@one_blas_thread
def outer():
    return inner(), blas_threads()

before = blas_threads()
print(before, *outer(), blas_threads())
"""


def test_one_blas_thread_inside_a_call_and_the_callers_threads_after():
    env = {k: v for k, v in os.environ.items()
           if k not in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")}
    env["OPENBLAS_NUM_THREADS"] = "2"  # a caller who wants two threads for its own work
    done = subprocess.run([sys.executable, "-c", CODE], env=env, capture_output=True, text=True, check=True)
    before, nested, inside, after = map(int, done.stdout.split())
    assert before == 2 and after == 2
    assert nested == 1 and inside == 1


SOLVE = """
import numpy, threadpoolctl
import membrane.solver as solver
from membrane.drum import load_drum

seen = []
real = solver.ideal_basis

def spy(**kw):  # called inside solve() for every order
    seen.append(max(p["num_threads"] for p in threadpoolctl.threadpool_info() if p["user_api"] == "blas"))
    return real(**kw)

solver.ideal_basis = spy
solver.solve(load_drum("kettledrum"), "ideal", m_max=2, n_max=2)
print(min(seen), max(seen))
"""


def test_solve_runs_on_one_blas_thread():
    env = {k: v for k, v in os.environ.items()
           if k not in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")}
    env["OPENBLAS_NUM_THREADS"] = "2"
    done = subprocess.run([sys.executable, "-c", SOLVE], env=env, capture_output=True, text=True, check=True)
    assert done.stdout.split() == ["1", "1"]
