"""Work done beside the main process (the report's ranges and what-ifs on the second core): same result, same errors.

The check is against the in-line computation itself: the forked copy must give
the very same JSON text, and a failure in the copy must surface as the in-line
call's own error.
"""

import os
import time
from pathlib import Path

import pytest

import aerial.estimate.assemble
import aerial.estimate.receiver
from aerial.core.beside import ONE_PROCESS_VARIABLE, Beside, in_copy, second_core_free, shared
from aerial.core.errors import AerialError, ModelInputError
from aerial.estimate.assemble import analyse
from aerial.estimate.plain import json_text
from aerial.site.reader import load_site

EXAMPLES = Path(__file__).resolve().parents[1] / "site_examples"

def _possible() -> bool:
    """Whether this machine could fork beside, the variable aside."""
    saved = os.environ.pop(ONE_PROCESS_VARIABLE, None)
    try:
        return second_core_free()
    finally:
        if saved is not None:
            os.environ[ONE_PROCESS_VARIABLE] = saved


needs_fork = pytest.mark.skipif(not second_core_free(), reason="no second core, no fork, or other threads running")


@needs_fork
def test_the_copy_does_the_work_and_hands_back_its_value():
    parent = os.getpid()
    with Beside(lambda: (os.getpid(), [1.5, "two"])) as side:
        assert side.forked
        pid, value = side.result()
    assert pid != parent and value == [1.5, "two"]


@needs_fork
def test_an_error_in_the_copy_is_raised_by_the_in_line_call():
    def fails():
        raise ModelInputError("the wire runs into the house")

    with Beside(fails) as side, pytest.raises(ModelInputError, match="runs into the house"):
        side.result()


@needs_fork
def test_a_copy_that_dies_is_replaced_by_the_in_line_call():
    parent = os.getpid()

    def dies_in_the_copy():
        if os.getpid() != parent:
            os._exit(7)
        return "in line"

    with Beside(dies_in_the_copy) as side:
        assert side.result() == "in line"


@needs_fork
def test_leaving_early_stops_the_copy():
    with Beside(lambda: time.sleep(60)) as side:
        pid = side._pid
    with pytest.raises(ChildProcessError):
        os.waitpid(pid, os.WNOHANG)  # already reaped: no zombie left behind
    with pytest.raises(ProcessLookupError):
        os.kill(pid, 0)


@needs_fork
def test_a_copy_that_delivered_is_collected_and_leaves_no_zombie():
    """The result is taken as soon as the copy has written it; the copy, still giving its memory back, is
    collected then or later (at the next copy, or at exit), never left as a zombie."""
    from aerial.core import beside

    with Beside(os.getpid) as side:
        pid = side.result()
    deadline = time.monotonic() + 30
    while pid in beside._ENDING and time.monotonic() < deadline:
        time.sleep(0.01)
        beside._collect_ended()
    assert pid not in beside._ENDING
    with pytest.raises(ChildProcessError):
        os.waitpid(pid, os.WNOHANG)  # collected: no zombie left behind


def test_the_environment_variable_keeps_one_process(monkeypatch):
    for off in ("0", "no", " False ", "OFF"):  # the words people write for "not set" leave the choice to aerial
        monkeypatch.setenv(ONE_PROCESS_VARIABLE, off)
        assert second_core_free() == _possible()
    monkeypatch.setenv(ONE_PROCESS_VARIABLE, "1")
    assert not second_core_free()
    with Beside(os.getpid) as side:
        assert not side.forked and side.result() == os.getpid()


def test_without_fork_the_work_waits_for_the_result():
    calls = []
    with Beside(lambda: calls.append(1) or len(calls), fork=False) as side:
        assert calls == []
        assert side.result() == 1


@needs_fork
@pytest.mark.parametrize("name", ["backyard_inverted_l.toml", "high_floor_flat.toml", "suburban_lot_service_line.toml"])
def test_the_report_is_the_same_text_with_the_copy_and_in_line(name, monkeypatch):
    forks = []
    real_start = Beside._start

    def counted(self):
        real_start(self)
        forks.append(self._pid is not None)

    monkeypatch.setattr(Beside, "_start", counted)
    site = load_site(EXAMPLES / name)
    alone = json_text(analyse(site))
    assert forks == []
    assert json_text(analyse(site, beside=True)) == alone
    assert forks == [True]


@needs_fork
def test_the_ranges_error_comes_first_as_in_line(monkeypatch):
    """In line, the ranges and what-ifs are worked out before the tuning: their error is the one the user sees."""
    def no_moves(*a, **k):
        raise ModelInputError("what-if refused")

    def no_tuning(*a, **k):
        raise AerialError("tuning refused")

    monkeypatch.setattr(aerial.estimate.assemble, "_building_moves", no_moves)  # the what-if table's last piece
    monkeypatch.setattr(aerial.estimate.receiver.ReceiverWork, "tuning", no_tuning)
    site = load_site(EXAMPLES / "backyard_inverted_l.toml")
    for side_by_side in (False, True):
        with pytest.raises(ModelInputError, match="what-if refused"):
            analyse(site, beside=side_by_side)


@needs_fork
def test_the_tuning_error_still_comes_when_the_copy_succeeds(monkeypatch):
    def no_tuning(*a, **k):
        raise AerialError("tuning refused")

    monkeypatch.setattr(aerial.estimate.receiver.ReceiverWork, "tuning", no_tuning)
    site = load_site(EXAMPLES / "backyard_inverted_l.toml")
    with pytest.raises(AerialError, match="tuning refused"):
        analyse(site, beside=True)


def _wait_for(path: Path, seconds: float = 30.0) -> None:
    deadline = time.monotonic() + seconds
    while not path.exists():
        assert time.monotonic() < deadline, f"{path.name} never appeared"
        time.sleep(0.005)


@needs_fork
def test_shared_tasks_come_back_in_order_and_the_faster_process_does_more(tmp_path):
    """The copy is held in the first task until this process has done every other: the two meet where the copy
    stands, and the values come back in the list's order whoever worked them out."""
    parent, started, go = os.getpid(), tmp_path / "started", tmp_path / "go"

    def first():
        if in_copy():
            started.write_text("", encoding="utf-8")  # the copy holds the first task
            _wait_for(go)
        return "first", os.getpid()

    def task(i):
        def run():
            if i == 4:
                _wait_for(started)
            if i == 1:
                go.write_text("", encoding="utf-8")  # this process has reached the front
            return i, os.getpid()
        return run

    out = shared([first, task(1), task(2), task(3), task(4)])
    assert [v for v, _ in out] == ["first", 1, 2, 3, 4]
    assert out[0][1] != parent and all(pid == parent for _, pid in out[1:])


@needs_fork
def test_a_slow_process_here_leaves_the_work_to_the_copy(tmp_path):
    """This process is held in its first task (the last one) until the copy has done all the others."""
    parent, started, done = os.getpid(), tmp_path / "started", tmp_path / "done"

    def task(i):
        def run():
            if not in_copy():
                started.write_text("", encoding="utf-8")
                _wait_for(done)
            elif i == 0:
                _wait_for(started)  # this process holds its task
            elif i == 3:
                done.write_text("", encoding="utf-8")
            return i, os.getpid()
        return run

    out = shared([task(i) for i in range(5)])
    assert [v for v, _ in out] == [0, 1, 2, 3, 4]
    assert [pid == parent for _, pid in out] == [False, False, False, False, True]


@needs_fork
def test_shared_errors_come_in_the_lists_order(tmp_path):
    """The copy's task fails (first in the list) and so does one of this process's: the first task's error is
    raised, by the task itself run again in line, as a plain loop over the tasks would raise it."""
    parent, calls = os.getpid(), []

    def early():
        calls.append(os.getpid())
        raise ModelInputError("the first task's error")

    def late():
        raise AerialError("a later task's error")

    with pytest.raises(ModelInputError, match="the first task's error"):
        shared([early, lambda: 1, lambda: 2, late])
    assert calls == [parent]  # worked out again here; the copy's own call was in the copy


@needs_fork
def test_shared_work_of_a_copy_that_dies_is_done_in_line():
    parent = os.getpid()

    def dies_in_the_copy(i):
        def run():
            if in_copy():
                os._exit(3)
            return i, os.getpid()
        return run

    out = shared([dies_in_the_copy(i) for i in range(4)])
    assert out == [(i, parent) for i in range(4)]


def test_shared_without_fork_runs_in_order():
    calls = []
    assert shared([lambda: calls.append(0) or "a", lambda: calls.append(1) or "b"], fork=False) == ["a", "b"]
    assert calls == [0, 1]
    with pytest.raises(ModelInputError):
        shared([lambda: calls.append(2), lambda: (_ for _ in ()).throw(ModelInputError("x")),
                lambda: calls.append(3)], fork=False)
    assert calls == [0, 1, 2]
