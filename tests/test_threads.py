"""BLAS threads: one for small problems, the user's choice obeyed, threads only for large full-wave matrices."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

from aerial.core import threads

from .conftest import ROOT

PROBE = """
import json, sys
order = sys.argv[1]
if order == "numpy-first":
    import numpy
import aerial
from aerial.core import threads
import numpy, scipy.linalg
from threadpoolctl import threadpool_info

def counts():
    return sorted({i["num_threads"] for i in threadpool_info() if i["user_api"] == "blas"})

out = {"outside": counts()}
with threads.blas_threads(200):
    out["small"] = counts()
with threads.blas_threads(5000, threaded=True):
    out["large"] = counts()
out["idle"] = threads.idle_threads()
print(json.dumps(out))
"""


def probe(order: str, **env_vars) -> dict:
    env = {k: v for k, v in os.environ.items() if k not in threads.THREAD_VARIABLES and k != threads.DEFAULT_MARK}
    env.update(env_vars)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    proc = subprocess.run([sys.executable, "-c", PROBE, order], capture_output=True, text=True, env=env, timeout=120)
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout)


def test_user_choice_is_told_apart_from_the_default():
    assert not threads.user_chose_threads({})
    assert threads.user_chose_threads({"OPENBLAS_NUM_THREADS": "4"})
    assert threads.user_chose_threads({"OMP_NUM_THREADS": "2"})
    assert not threads.user_chose_threads({"OPENBLAS_NUM_THREADS": "1", threads.DEFAULT_MARK: "1"})


def test_idle_threads_is_between_one_and_the_core_count():
    assert 1 <= threads.idle_threads() <= (os.cpu_count() or 1)


@pytest.mark.skipif(os.name != "posix", reason="threadpoolctl reports the BLAS of this platform differently")
def test_importing_aerial_first_sets_one_thread_before_numpy_loads():
    out = probe("aerial-first")
    assert out["outside"] == [1] and out["small"] == [1]
    assert out["large"] == [out["idle"]]


@pytest.mark.skipif(os.name != "posix", reason="threadpoolctl reports the BLAS of this platform differently")
def test_numpy_loaded_first_still_solves_small_problems_in_one_thread():
    out = probe("numpy-first")
    assert out["small"] == [1]
    assert out["large"] == [out["idle"]]


@pytest.mark.skipif(os.name != "posix", reason="threadpoolctl reports the BLAS of this platform differently")
def test_a_thread_count_set_by_the_user_is_never_changed():
    out = probe("aerial-first", OPENBLAS_NUM_THREADS="2")
    assert out["outside"] == out["small"] == out["large"] == [2]
