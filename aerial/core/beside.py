"""Independent work done beside the main process, on the second core, with exactly the in-line result.

The report's ranges and what-if table need the aerial's response but not the
tuning or the stations, and the tuning and the stations need neither. On a
machine with two cores the command line works out one while a forked copy of
itself works out the other, and takes the copy's result back through a pipe.
The copy runs the very same code on the very same inputs, so the result is
the one the in-line call gives, bit for bit; where the copy cannot deliver
(no fork on this system, one core, a failure of any kind in the copy), the
work is simply done in line, so errors are raised exactly as they would be.

Only the command line asks for this (``analyse(..., beside=True)``): a
notebook or a program calling the API keeps one process. Setting the
environment variable :data:`ONE_PROCESS_VARIABLE` to anything but "", "0",
"no", "false" or "off" keeps one process on the command line too.

>>> with Beside(lambda: sum(range(10)), fork=False) as side:
...     side.forked, side.result()
(False, 45)
>>> in_order(lambda: "ranges", lambda: "tuning", fork=False)
('ranges', 'tuning')
"""

from __future__ import annotations

import os
import pickle
import signal
import sys
import threading

#: Environment variable: set (to "1", say) to keep every computation in one process.
ONE_PROCESS_VARIABLE = "AERIAL_ONE_PROCESS"
#: Values of :data:`ONE_PROCESS_VARIABLE` that leave the second process on (any case, spaces ignored).
SWITCHED_OFF = ("", "0", "no", "false", "off")


def second_core_free() -> bool:
    """Whether work may go to a forked copy of this process: Linux, two usable cores or more, no other thread.

    Other threads rule it out because a forked copy inherits their locks but
    not the threads; macOS and Windows are left out (fork is unsafe beside
    some system libraries there, or missing).
    """
    if os.environ.get(ONE_PROCESS_VARIABLE, "").strip().lower() not in SWITCHED_OFF:
        return False
    if not sys.platform.startswith("linux") or not hasattr(os, "fork"):
        return False
    try:
        cores = len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        cores = os.cpu_count() or 1
    return cores >= 2 and threading.active_count() == 1


class Beside:
    """``fn()`` worked out in a forked copy of this process while the caller goes on.

    :meth:`result` gives ``fn()``'s return value: the copy's, when it
    delivered one, else ``fn()`` called in line (which raises whatever
    ``fn`` raises). ``fork=False``, or a system where
    :func:`second_core_free` is false, calls ``fn`` in line only when
    :meth:`result` is asked for. Use it as a context manager so that a
    copy still running is stopped when the caller leaves early.

    The return value must pickle; ``fn`` must not write to the terminal or
    to files (the copy's output would be lost or doubled).
    """

    def __init__(self, fn, *, fork: bool = True):
        self._fn = fn
        self._pid: int | None = None
        self._read = -1
        self.forked = False  # whether a copy is (or was) working out fn
        if fork and second_core_free():
            self._start()

    def _start(self) -> None:
        try:
            read, write = os.pipe()
        except OSError:
            return
        try:
            pid = os.fork()
        except OSError:
            os.close(read)
            os.close(write)
            return
        if pid == 0:  # pragma: no cover - the copy: measured through the parent's result
            code = 1
            try:
                signal.signal(signal.SIGINT, signal.SIG_DFL)  # Ctrl-C: the parent reports it, the copy just stops
                os.close(read)
                try:
                    payload = pickle.dumps(("done", self._fn()), protocol=pickle.HIGHEST_PROTOCOL)
                except BaseException:  # the parent does it in line and raises it there
                    payload = b""
                view = memoryview(payload)
                while view:
                    view = view[os.write(write, view):]
                code = 0
            finally:
                os._exit(code)  # never back into the caller's code, no exit handlers, no buffers flushed
        os.close(write)
        self._pid, self._read, self.forked = pid, read, True

    def result(self):
        """``fn()``'s return value (from the copy, or in line)."""
        if self._pid is None:
            return self._fn()
        data, ok = self._collect()
        if ok and data:
            try:
                status, value = pickle.loads(data)  # our own copy's bytes
            except Exception:  # noqa: BLE001 - anything unreadable: do it in line
                status, value = None, None
            if status == "done":
                return value
        return self._fn()

    def _collect(self) -> tuple[bytes, bool]:
        """Everything the copy wrote, and whether it ended cleanly."""
        chunks = []
        try:
            while True:
                chunk = os.read(self._read, 1 << 16)
                if not chunk:
                    break
                chunks.append(chunk)
        except BaseException:
            self.close()
            raise
        return b"".join(chunks), self._reap(stop=False) == 0

    def _reap(self, stop: bool) -> int | None:
        """Close the pipe and wait for the copy (stopping it first if ``stop``); its exit code, None if unknown."""
        pid, self._pid = self._pid, None
        if pid is None:
            return None
        try:
            os.close(self._read)
        except OSError:
            pass
        if stop:
            try:
                os.kill(pid, signal.SIGKILL)
            except OSError:
                pass
        while True:
            try:
                _, status = os.waitpid(pid, 0)
            except InterruptedError:  # pragma: no cover - retried by Python itself since 3.5
                continue
            except ChildProcessError:
                return None
            return os.waitstatus_to_exitcode(status)

    def close(self) -> None:
        """Stop a copy still working and wait for it."""
        self._reap(stop=True)

    def __enter__(self):
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def in_order(first, second, *, fork: bool = True) -> tuple:
    """``(first(), second())``: ``first`` in a forked copy (:class:`Beside`) while this process works out ``second``.

    Errors come as they would in line, ``first``'s before ``second``'s: when
    ``second`` fails, ``first``'s result is taken first (raising its own
    error if it has one). With ``fork`` false, or no second core, the two
    simply run one after the other.
    """
    with Beside(first, fork=fork) as side:
        if not side.forked:
            done = side.result()
            return done, second()
        try:
            then = second()
        except Exception:
            side.result()  # in line, first's error would have come before second's
            raise
        return side.result(), then
