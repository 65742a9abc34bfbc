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


TUNE = """
import numpy, threadpoolctl
import membrane
from membrane.physics import spectrum

seen = []
real = spectrum.scan_order

def spy(*args, **kw):  # every full-physics solve the tension search runs scans its orders
    seen.append(max(p["num_threads"] for p in threadpoolctl.threadpool_info() if p["user_api"] == "blas"))
    return real(*args, **kw)

spectrum.scan_order = spy
drum = membrane.load_drum("kettledrum")
membrane.tension_for(drum, targets=[((1, 1), 150.0)], m_max=1, n_max=1, table=False)
print(len(seen), min(seen), max(seen))
"""


def test_tension_search_runs_on_one_blas_thread():
    # tension_for solves through the assembly directly, not only through solve(): the whole
    # search is limited (threadpoolctl's own report as the reference)
    env = {k: v for k, v in os.environ.items()
           if k not in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")}
    env["OPENBLAS_NUM_THREADS"] = "2"
    done = subprocess.run([sys.executable, "-c", TUNE], env=env, capture_output=True, text=True, check=True)
    count, low, high = map(int, done.stdout.split())
    assert count > 0 and low == high == 1
