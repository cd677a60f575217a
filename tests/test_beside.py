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
from aerial.core.beside import ONE_PROCESS_VARIABLE, Beside, second_core_free
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

    monkeypatch.setattr(aerial.estimate.assemble, "what_if", no_moves)
    monkeypatch.setattr(aerial.estimate.receiver, "receiver_results", no_tuning)
    site = load_site(EXAMPLES / "backyard_inverted_l.toml")
    for side_by_side in (False, True):
        with pytest.raises(ModelInputError, match="what-if refused"):
            analyse(site, beside=side_by_side)


@needs_fork
def test_the_tuning_error_still_comes_when_the_copy_succeeds(monkeypatch):
    def no_tuning(*a, **k):
        raise AerialError("tuning refused")

    monkeypatch.setattr(aerial.estimate.receiver, "receiver_results", no_tuning)
    site = load_site(EXAMPLES / "backyard_inverted_l.toml")
    with pytest.raises(AerialError, match="tuning refused"):
        analyse(site, beside=True)

