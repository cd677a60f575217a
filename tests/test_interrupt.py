"""Ctrl-C: one line, exit 130, no traceback, no partial output file.

A real process gets SIGINT in the middle of a full-wave sweep: the child
runs the command line with the report's public ``progress`` callback wrapped
so that it leaves a marker file after the first swept frequency, and the test
interrupts as soon as the marker appears (the invented backyard example swept
in 100 Hz steps has thousands of frequencies left by then). In-process tests
interrupt the closed-form chain and the picture writing.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

import aerial.estimate.assemble
import aerial.outputs.pictures
from aerial.cli import EXIT_INTERRUPTED, main

from .conftest import ROOT

BACKYARD = ROOT / "site_examples" / "backyard_inverted_l.toml"

#: Longest wait for the sweep to start [s] (start-up and the band set-up on a busy machine).
SWEEP_START_TIMEOUT_S = 90.0

#: The child: the command line, with the sweep's progress callback leaving a marker file.
CHILD = """
import signal
import sys
from pathlib import Path

# the default Ctrl-C disposition a terminal gives, even when this test runs where SIGINT is ignored
signal.signal(signal.SIGINT, signal.default_int_handler)

import aerial.api
from aerial.cli import main

marker = Path(sys.argv[1])
real_run_report = aerial.api.run_report


def run_report(*args, progress=None, **kwargs):
    def marked(done, total):
        if not marker.exists():
            marker.write_text(f"{done}/{total}", encoding="utf-8")
        if progress is not None:
            progress(done, total)

    return real_run_report(*args, progress=marked, **kwargs)


aerial.api.run_report = run_report
sys.exit(main(sys.argv[2:]))
"""


def partial_files(folder: Path) -> list[str]:
    if not folder.exists():
        return []
    bad = []
    for p in folder.iterdir():
        if p.name.endswith(".part") or p.name.startswith("."):
            bad.append(p.name)
        elif p.suffix == ".svg" and not p.read_text(encoding="utf-8").rstrip().endswith("</svg>"):
            bad.append(p.name)
    return bad


@pytest.mark.skipif(os.name != "posix", reason="SIGINT delivery to a child needs POSIX")
def test_sigint_during_a_full_wave_sweep(tmp_path):
    pics = tmp_path / "pics"
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    env.pop("AERIAL_DEBUG", None)
    marker = tmp_path / "sweep-started"
    proc = subprocess.Popen(
        [sys.executable, "-c", CHILD, str(marker), "report", str(BACKYARD), "--full-wave", "--step", "100 Hz",
         "--pictures", str(pics), "--json", "--quiet"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env, cwd=tmp_path,
    )
    deadline = time.monotonic() + SWEEP_START_TIMEOUT_S
    while not marker.exists() and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.01)
    if not marker.exists():
        proc.kill()
        _, err = proc.communicate(timeout=30)
        pytest.fail(f"the sweep did not start (exit {proc.returncode}): {err.decode()[-500:]}")
    assert proc.poll() is None, "the sweep ended before the interrupt; choose a longer one"
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=120)
    err = err.decode()
    assert proc.returncode == EXIT_INTERRUPTED, err
    # progress lines may come first (stderr is not a terminal); the interrupt is the last line
    assert err.endswith("aerial: interrupted\n") and all(line.startswith("aerial: ") for line in err.splitlines())
    assert out == b""
    assert partial_files(pics) == []
    assert not pics.exists() or list(pics.iterdir()) == []


def test_interrupt_in_the_closed_form_chain(capsys, monkeypatch, tmp_path):
    def interrupted(*a, **k):
        raise KeyboardInterrupt

    monkeypatch.setattr(aerial.estimate.assemble, "analyse", interrupted)
    pics = tmp_path / "pics"
    code = main(["report", str(BACKYARD), "--pictures", str(pics)])
    out, err = capsys.readouterr()
    assert code == EXIT_INTERRUPTED
    # progress lines may come first (stderr is not a terminal); the interrupt is the last line
    assert err.endswith("aerial: interrupted\n") and all(line.startswith("aerial: ") for line in err.splitlines()) and out == ""
    assert not pics.exists()


def test_interrupt_between_pictures_leaves_only_whole_files(capsys, monkeypatch, tmp_path):
    import aerial.outputs.charts

    real_svg = aerial.outputs.charts.svg_of
    calls = {"n": 0}

    def svg_then_interrupt(*args):
        calls["n"] += 1
        if calls["n"] == 2:
            raise KeyboardInterrupt
        return real_svg(*args)

    monkeypatch.setattr(aerial.outputs.charts, "svg_of", svg_then_interrupt)
    pics = tmp_path / "pics"
    code = main(["report", str(BACKYARD), "--json", "--pictures", str(pics)])
    out, err = capsys.readouterr()
    assert code == EXIT_INTERRUPTED
    # progress lines may come first (stderr is not a terminal); the interrupt is the last line
    assert err.endswith("aerial: interrupted\n") and all(line.startswith("aerial: ") for line in err.splitlines()) and out == ""
    assert partial_files(pics) == []


# Ctrl-C at start-up, made to arrive at a chosen moment: a hook in the import system sends SIGINT to
# the process when a given module starts to load (so the test does not depend on timing).
START_UP_DRIVER = """
import os, signal, sys
TARGET, MODE = sys.argv[1], sys.argv[2]
class Hook:
    def find_spec(self, name, path=None, target=None):
        if name == TARGET:
            sys.meta_path.remove(self)
            if MODE == "convert":  # as numpy does: the interrupt comes back as an import error of its own
                try:
                    os.kill(os.getpid(), signal.SIGINT)
                except KeyboardInterrupt:
                    raise ImportError("initialization failed")
            os.kill(os.getpid(), signal.SIGINT)
        return None
sys.meta_path.insert(0, Hook())
if MODE == "at-exit":
    import atexit
    atexit.register(lambda: os.kill(os.getpid(), signal.SIGINT))
sys.argv = ["aerial"] + sys.argv[3:]
from aerial.__main__ import run
run()
"""


@pytest.mark.skipif(os.name != "posix", reason="SIGINT delivery needs POSIX")
@pytest.mark.parametrize("target, mode", [
    ("aerial.cli", "plain"),  # while the command line itself loads
    ("numpy", "plain"),  # during the lazy import of the numerical libraries
    ("numpy", "convert"),  # a library that turns the interrupt into an ImportError
    ("none", "at-exit"),  # while the interpreter shuts down after the output
])
def test_ctrl_c_at_any_moment_of_start_up(tmp_path, target, mode):
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    env.pop("AERIAL_DEBUG", None)
    pics = tmp_path / "pics"
    proc = subprocess.run([sys.executable, "-c", START_UP_DRIVER, target, mode, "check", str(BACKYARD)],
                          capture_output=True, env=env, cwd=tmp_path, timeout=120)
    err = proc.stderr.decode()
    assert proc.returncode == EXIT_INTERRUPTED, err
    assert err.endswith("aerial: interrupted\n") and "Traceback" not in err and "Exception ignored" not in err
    assert list(tmp_path.iterdir()) == [] and not pics.exists()


def test_interrupt_while_writing_pictures_leaves_no_empty_folder(capsys, monkeypatch, tmp_path):
    import aerial.outputs.pictures as pictures

    def interrupted(*a, **k):
        raise KeyboardInterrupt

    monkeypatch.setattr(pictures, "write_atomic", interrupted)
    pics = tmp_path / "pics"
    code = main(["report", str(BACKYARD), "--pictures", str(pics), "--quiet"])  # no progress lines on a slow machine
    _, err = capsys.readouterr()
    assert code == EXIT_INTERRUPTED and err == "aerial: interrupted\n"
    assert not pics.exists()


#: The child for the report's second process: the ranges, the copy's first piece of work, leave a marker with the
#: copy's process id and then wait, so that Ctrl-C arrives while the copy is at work.
BESIDE_CHILD = """
import os
import signal
import sys
import time
from pathlib import Path

signal.signal(signal.SIGINT, signal.default_int_handler)

import aerial.estimate.assemble as assemble
from aerial.cli import main

marker = Path(sys.argv[1])
real_ranges = assemble.ranges_at_band_points


def ranges_at_band_points(*args, **kwargs):
    marker.write_text(str(os.getpid()), encoding="utf-8")
    time.sleep(120)
    return real_ranges(*args, **kwargs)


assemble.ranges_at_band_points = ranges_at_band_points
sys.exit(main(sys.argv[2:]))
"""


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the second process is used on Linux only")
@pytest.mark.parametrize("to", ["group", "parent"])
def test_ctrl_c_while_the_second_process_works_stops_both(tmp_path, to):
    """From a terminal the whole process group gets SIGINT; sent to the first process alone, it stops the copy."""
    from aerial.core.beside import second_core_free

    if not second_core_free():
        pytest.skip("one core, or the second process is switched off")
    marker = tmp_path / "copy.pid"
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    env.pop("AERIAL_DEBUG", None)
    proc = subprocess.Popen([sys.executable, "-c", BESIDE_CHILD, str(marker), "report", str(BACKYARD), "--json"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env, cwd=tmp_path,
                            start_new_session=True)
    try:
        deadline = time.monotonic() + SWEEP_START_TIMEOUT_S
        while not marker.exists() or not marker.read_text(encoding="utf-8"):
            assert proc.poll() is None, proc.communicate()
            assert time.monotonic() < deadline, "the second process never started its work"
            time.sleep(0.05)
        copy = int(marker.read_text(encoding="utf-8"))
        assert copy != proc.pid
        if to == "group":
            os.killpg(proc.pid, signal.SIGINT)  # as the terminal does
        else:
            os.kill(proc.pid, signal.SIGINT)
        out, err = proc.communicate(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == EXIT_INTERRUPTED, err.decode()
    assert err.decode().endswith("aerial: interrupted\n") and b"Traceback" not in err and out == b""
    time.sleep(0.2)  # an orphan would be taken over by init, which reaps it once it has ended
    with pytest.raises(ProcessLookupError):
        os.kill(copy, 0)  # the copy is gone, not left sleeping
