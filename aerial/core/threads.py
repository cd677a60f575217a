"""How many threads the linear-algebra library (BLAS / LAPACK) may use.

Most of aerial's matrices are small: an electrostatic system of a few
hundred unknowns, a full-wave matrix of a few hundred. For them a second
BLAS thread costs more than it saves, and on a busy machine it is ruinous:
an idle helper thread that has to be woken for every call made a 240 x 240
solve take 0.5 s instead of 0.4 ms on a shared two-core machine. So:

* a thread count the user has set (``OPENBLAS_NUM_THREADS``,
  ``OMP_NUM_THREADS``, ``MKL_NUM_THREADS``, ...) is obeyed everywhere and
  never changed;
* otherwise, when aerial is imported before numpy (the command line, a
  script that starts with ``import aerial``), the count is set to one in the
  environment before numpy loads, which also covers child processes;
* :func:`blas_threads` runs a small problem in one thread even when numpy
  was loaded first with more (a notebook), through threadpoolctl;
* a full-wave matrix of :data:`THREADED_MIN_UNKNOWNS` unknowns or more gets
  as many threads as there are idle cores (one-minute load average), since
  its LU factorisation is long enough for threads to pay.
"""

from __future__ import annotations

import contextlib
import os
import sys

#: Environment variables through which a user chooses the BLAS thread count.
THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS", "BLIS_NUM_THREADS",
                    "VECLIB_MAXIMUM_THREADS")

#: Unknowns from which a full-wave matrix may use more than one BLAS thread. [1]
THREADED_MIN_UNKNOWNS = 1000

#: Set (to "1") by aerial when it chose the single-thread default, so child processes know
#: the thread variables are aerial's default and not the user's choice.
DEFAULT_MARK = "AERIAL_BLAS_DEFAULT"

_controllers: dict = {}


def user_chose_threads(environ=None) -> bool:
    """True when the thread count comes from the user, not from aerial's default."""
    env = os.environ if environ is None else environ
    return env.get(DEFAULT_MARK) != "1" and any(env.get(v) for v in THREAD_VARIABLES)


def default_to_one_thread() -> bool:
    """Set one BLAS thread in the environment if numpy is not loaded yet and the user chose nothing.

    Returns True when the default is (now or already) in force.
    """
    if os.environ.get(DEFAULT_MARK) == "1":
        return True
    if user_chose_threads() or "numpy" in sys.modules:
        return False
    for name in THREAD_VARIABLES[:3]:
        os.environ[name] = "1"
    os.environ[DEFAULT_MARK] = "1"
    return True


def idle_threads() -> int:
    """Cores not busy with other work (one-minute load average, this process counted as idle). [1]"""
    try:
        cores = len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        cores = os.cpu_count() or 1
    try:
        load = os.getloadavg()[0]
    except (AttributeError, OSError):
        return 1
    return max(1, min(cores, int(cores + 1.0 - load)))


def _controller():
    """A threadpoolctl controller over the BLAS libraries loaded so far (cached until scipy.linalg loads)."""
    key = "scipy.linalg" in sys.modules
    ctl = _controllers.get(key)
    if ctl is None:
        from threadpoolctl import ThreadpoolController

        ctl = _controllers[key] = ThreadpoolController()
    return ctl


@contextlib.contextmanager
def blas_threads(n_unknowns: int, threaded: bool = False):
    """Run the enclosed linear algebra on a system of ``n_unknowns`` with the right BLAS thread count.

    Parameters
    ----------
    n_unknowns : int
        Size of the matrix. [1]
    threaded : bool
        The caller's problem may use threads when it is large (full-wave
        matrices); others always run in one thread.
    """
    if user_chose_threads():
        yield
        return
    want = idle_threads() if threaded and n_unknowns >= THREADED_MIN_UNKNOWNS else 1
    if want == 1 and os.environ.get(DEFAULT_MARK) == "1":
        yield  # numpy was loaded with one thread: nothing to change
        return
    with _controller().limit(limits=want, user_api="blas"):
        yield


__all__ = ["THREADED_MIN_UNKNOWNS", "THREAD_VARIABLES", "blas_threads", "default_to_one_thread", "idle_threads",
           "user_chose_threads"]
