"""The same input gives byte-identical --json output: closed form, full wave, layout, check.

In-process repeats catch state carried between runs (caches, module globals);
separate processes with different PYTHONHASHSEED values catch output that
depends on set or dict ordering of strings. Sites are the invented examples.
"""

from __future__ import annotations

import hashlib
import os
import subprocess
import sys

import pytest

from aerial.cli import main
from aerial.core.beside import ONE_PROCESS_VARIABLE

from .conftest import ROOT

BACKYARD = str(ROOT / "site_examples" / "backyard_inverted_l.toml")
LOT = str(ROOT / "site_examples" / "suburban_lot_service_line.toml")


def json_bytes(capsys, *argv) -> bytes:
    code = main(list(argv))
    out, err = capsys.readouterr()
    assert code == 0, err
    return out.encode("utf-8")


@pytest.mark.parametrize("argv", [
    ("check", BACKYARD, "--json"),
    ("report", BACKYARD, "--json"),
    ("report", BACKYARD, "--json", "--full-wave", "--step", "100 kHz"),
    ("report", BACKYARD, "--json", "--full-wave", "--lossy-ground", "--step", "200 kHz"),
    ("layout", LOT, "--json"),
], ids=["check", "closed-form", "full-wave", "full-wave-lossy", "layout"])
def test_repeat_in_process_is_byte_identical(capsys, monkeypatch, argv):
    # one process for both runs: the pieces a second process would work out (and forget) keep their caches too
    monkeypatch.setenv(ONE_PROCESS_VARIABLE, "1")
    first = json_bytes(capsys, *argv)
    second = json_bytes(capsys, *argv)
    assert hashlib.sha256(first).hexdigest() == hashlib.sha256(second).hexdigest()


def _run_with_hash_seed(argv, seed: str):
    env = dict(os.environ, PYTHONHASHSEED=seed, OPENBLAS_NUM_THREADS="1",
               PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    return subprocess.Popen([sys.executable, "-m", "aerial.cli", *argv], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, env=env, cwd=ROOT)


@pytest.mark.parametrize("argv", [
    ("report", "site_examples/backyard_inverted_l.toml", "--json"),
    ("layout", "site_examples/suburban_lot_service_line.toml", "--json"),
], ids=["closed-form", "layout"])
def test_separate_processes_with_different_hash_seeds_agree(argv):
    procs = [_run_with_hash_seed(argv, seed) for seed in ("1", "2")]
    outs = []
    for p in procs:
        out, err = p.communicate(timeout=300)
        assert p.returncode == 0, err.decode()
        outs.append(out)
    assert outs[0] == outs[1]
