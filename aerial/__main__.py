"""The ``aerial`` command and ``python -m aerial``.

Ctrl-C is handled from the first line that runs here, before the command
line and the numerical libraries load: at any moment it ends the program
with ``aerial: interrupted`` and exit code 130, and nothing half-made is left
(files are written through a temporary name, see :mod:`aerial.outputs.files`).

The process is short-lived, so it spends nothing on what only a long-lived one
needs: the cyclic garbage collector is off from the start (loading the
libraries makes objects that live to the end, and a run makes almost no
cycles: the peak memory of a 6 s full-wave report grows by 0.5 MB), and once
the output is flushed and the exit handlers have run the process ends without
tearing the interpreter down module by module (:func:`_leave`).
"""

import gc
import os
import signal
import sys

EXIT_INTERRUPTED = 130


def _stop_now(signum, frame):  # pragma: no cover - runs in a separate process
    """Ctrl-C while starting up or shutting down: nothing is open yet (or any more), so stop at once."""
    try:
        os.write(2, b"aerial: interrupted\n")
    except OSError:
        pass
    os._exit(EXIT_INTERRUPTED)


def _leave(code: int) -> None:  # pragma: no cover - runs in a separate process
    """End the process with ``code`` as Python's own exit would, less the interpreter's tear-down.

    The exit handlers run first (a picture folder's clean-up, say), then the standard streams are
    flushed and the process ends at once. Where something else still has a claim on the exit -- a
    thread that is not a daemon, a profiler or coverage tracer, a Python without the exit-handler
    call -- it leaves through ``sys.exit`` instead. The tear-down skipped is the bulk of a report's
    exit: freeing every module's objects one by one (numpy's among them) takes tens of milliseconds.
    """
    import atexit
    import threading

    run_handlers = getattr(atexit, "_run_exitfuncs", None)
    busy = any(t.is_alive() and not t.daemon for t in threading.enumerate() if t is not threading.main_thread())
    if run_handlers is None or busy or sys.gettrace() is not None or sys.getprofile() is not None:
        sys.exit(code)
    run_handlers()
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError, AttributeError):
            pass
    os._exit(code)


def run():  # pragma: no cover - exercised through real processes in tests/test_interrupt.py
    """Entry point of the console script."""
    signal.signal(signal.SIGINT, _stop_now)
    gc.disable()  # a short-lived process: see the module's note
    from aerial import cli  # the heavy part of start-up

    signal.signal(signal.SIGINT, cli.raise_interrupt)
    try:
        code = cli.main()
    except KeyboardInterrupt:
        code = cli.interrupted()
    signal.signal(signal.SIGINT, _stop_now)
    code = cli.flush_output(code)
    _leave(code)


if __name__ == "__main__":  # pragma: no cover
    run()
