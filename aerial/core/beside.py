"""Independent work done beside the main process, on the second core, with exactly the in-line result.

Once the report has the aerial's response, its remaining work falls into
independent pieces: the ranges, each row of the what-if table, the tuning, the
stations' verdicts, the tuning for the stations. On a machine with two cores
the command line shares them out between itself and a forked copy of itself
(:func:`shared`), each process claiming the next piece from its own end of the
list, and takes the copy's results back through a pipe. The copy runs the very
same code on the very same inputs, so the result is the one the in-line calls
give, bit for bit; where the copy cannot deliver (no fork on this system, one
core, a failure of any kind in the copy), the work is simply done in line, so
errors are raised exactly as they would be.

Only the command line asks for this (``analyse(..., beside=True)``): a
notebook or a program calling the API keeps one process. Setting the
environment variable :data:`ONE_PROCESS_VARIABLE` to anything but "", "0",
"no", "false" or "off" keeps one process on the command line too.

>>> with Beside(lambda: sum(range(10)), fork=False) as side:
...     side.forked, side.result()
(False, 45)
>>> shared([lambda: "ranges", lambda: "what-ifs", lambda: "tuning"], fork=False)
['ranges', 'what-ifs', 'tuning']
"""

from __future__ import annotations

import atexit
import os
import pickle
import signal
import sys
import threading

#: Environment variable: set (to "1", say) to keep every computation in one process.
ONE_PROCESS_VARIABLE = "AERIAL_ONE_PROCESS"
#: Values of :data:`ONE_PROCESS_VARIABLE` that leave the second process on (any case, spaces ignored).
SWITCHED_OFF = ("", "0", "no", "false", "off")

_in_copy = False  # set in a forked copy, which must not report progress: the terminal is the caller's


def in_copy() -> bool:
    """Whether this process is a forked copy working beside the caller (it must not write to the terminal)."""
    return _in_copy


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
        _collect_ended()
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
            global _in_copy
            _in_copy = True
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
                os.close(write)  # the caller has it all now, not once this process's memory is given back
                code = 0
            finally:
                os._exit(code)  # never back into the caller's code, no exit handlers, no buffers flushed
        os.close(write)
        self._pid, self._read, self.forked = pid, read, True

    def result(self):
        """``fn()``'s return value (from the copy, or in line)."""
        got, value = self.delivered()
        return value if got else self._fn()

    def delivered(self) -> tuple[bool, object]:
        """``(True, value)`` with the copy's value, or ``(False, None)`` when there is no copy or it delivered none."""
        if self._pid is None:
            return False, None
        data, ok = self._collect()
        if ok and data:
            try:
                status, value = pickle.loads(data)  # our own copy's bytes
            except Exception:  # noqa: BLE001 - anything unreadable: not delivered
                return False, None
            if status == "done":
                return True, value
        return False, None

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
        return b"".join(chunks), self._reap(stop=False) in (0, None)

    def _reap(self, stop: bool) -> int | None:
        """Close the pipe and end with the copy; its exit code, None when unknown.

        With ``stop`` the copy is stopped first and waited for. Without, the copy has delivered (its pipe is
        closed) and is only giving its memory back: it is collected if it has ended, else left for
        :func:`_collect_ended`, so the caller does not wait for that.
        """
        pid, self._pid = self._pid, None
        if pid is None:
            return None
        _close(self._read)
        if stop:
            try:
                os.kill(pid, signal.SIGKILL)
            except OSError:
                pass
        status = _wait(pid, block=stop)
        if status is None and not stop:
            _ENDING.append(pid)
        return status

    def close(self) -> None:
        """Stop a copy still working and wait for it."""
        self._reap(stop=True)

    def __enter__(self):
        return self

    def __exit__(self, *exc) -> None:
        self.close()


#: Copies that delivered but had not ended when their result was taken (collected by :func:`_collect_ended`).
_ENDING: list = []


def _wait(pid: int, block: bool) -> int | None:
    """The exit code of the copy ``pid`` once it has ended (collecting it); None if unknown or, unless
    ``block``, not ended yet."""
    while True:
        try:
            done, status = os.waitpid(pid, 0 if block else os.WNOHANG)
        except InterruptedError:  # pragma: no cover - retried by Python itself since 3.5
            continue
        except ChildProcessError:
            return None
        return os.waitstatus_to_exitcode(status) if done else None


def _collect_ended() -> None:
    """Collect the copies that have ended since they delivered, so none is left behind as a zombie."""
    for pid in list(_ENDING):
        try:
            done, _ = os.waitpid(pid, os.WNOHANG)
        except ChildProcessError:
            done = pid
        if done:
            _ENDING.remove(pid)


atexit.register(_collect_ended)


def shared(tasks, *, fork: bool = True) -> list:
    """``[task() for task in tasks]``, the tasks shared out between this process and a forked copy of it.

    The copy takes tasks from the front of the list and this process from the
    back, each claiming a task just before it starts it, until the two meet:
    whichever process runs faster does more of the work, so neither waits long
    for the other on a machine whose second core is busier than the first, or
    the other way round. A task is claimed by reading its one token from a pipe
    of its own, which only one of the two processes can do.

    Every task must be independent of the others (work out the same value
    whichever process runs it and in whatever order), its value must pickle,
    and it must not write to the terminal or to files (:func:`in_copy` tells a
    task it runs in the copy). Errors come as they would in line: the first
    task, in the list's order, that fails raises its error, after every task
    before it has run; a task the copy did not deliver (it failed there, or
    the copy died) is worked out again in line. With ``fork`` false, or no
    second core (:func:`second_core_free`), the tasks simply run in order.
    """
    tasks = list(tasks)
    if len(tasks) < 2 or not fork or not second_core_free():
        return [task() for task in tasks]
    try:
        tokens = _token_pipes(len(tasks))
    except OSError:
        return [task() for task in tasks]
    try:
        with Beside(lambda: _from_the_front(tasks, tokens)) as side:
            if not side.forked:
                return [task() for task in tasks]
            mine, failed = _from_the_back(tasks, tokens)
            theirs = side.delivered()[1] or {}
    finally:
        for pair in tokens:
            _close(*pair)
    out = []
    for i, task in enumerate(tasks):
        if i in mine:
            out.append(mine[i])
        elif i in failed:
            raise failed[i]
        elif i in theirs:
            out.append(theirs[i])
        else:  # not delivered by the copy (or claimed by nobody, after an error here): in line, as it would run
            out.append(task())
    return out


def _token_pipes(n: int) -> list:
    """``n`` (read, write) pipes, each holding one token byte, reads not blocking: a claim per task."""
    pipes = []
    try:
        for _ in range(n):
            read, write = os.pipe()
            pipes.append((read, write))
            os.set_blocking(read, False)
            os.write(write, b"t")
    except OSError:
        for pair in pipes:
            _close(*pair)
        raise
    return pipes


def _close(*fds: int) -> None:
    """Close each file descriptor, one already closed or never opened being no error."""
    for fd in fds:
        try:
            os.close(fd)
        except OSError:
            pass


def _claim(tokens, i: int) -> bool:
    """Take task ``i``'s token: True when this process got it (the other process has not)."""
    try:
        return os.read(tokens[i][0], 1) == b"t"
    except BlockingIOError:
        return False


def _from_the_front(tasks, tokens) -> dict:
    """In the copy: the tasks from the first on, as long as it can claim them; {index: value}.

    The copy stops at the first task it cannot claim (this process has it, and every task after it) and at
    the first that fails (this process works it out again in line, and raises its error there).
    """
    done = {}
    for i, task in enumerate(tasks):
        if not _claim(tokens, i):
            break
        try:
            done[i] = task()
        except Exception:  # noqa: BLE001 - raised again by the in-line call
            break
    return done


def _from_the_back(tasks, tokens) -> tuple[dict, dict]:
    """In this process: the tasks from the last back, as long as it can claim them; ({index: value}, {index: error}).

    It stops at the first task it cannot claim (the copy has it, and every task before it) and at the first that
    fails: the tasks before that one are the copy's, or are worked out in line before its error is raised.
    """
    done, failed = {}, {}
    for i in range(len(tasks) - 1, -1, -1):
        if not _claim(tokens, i):
            break
        try:
            done[i] = tasks[i]()
        except Exception as err:  # raised once every task before it has run
            failed[i] = err
            break
    return done, failed
