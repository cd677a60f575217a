"""Shared fixtures: example sites and a helper that writes a site file for a test."""

from __future__ import annotations

import textwrap
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = sorted((ROOT / "site_examples").glob("*.toml"))

# A minimal valid site (invented for these tests): a 10 m vertical with one rod.
MINIMAL = """
[site]
name = "test vertical"

[[runs]]
points = [[0, 0, 0.5], [0, 0, 10]]

[receiver]
at = [0, 0]
height = "0 m"

[[earth.rods]]
length = "2.4 m"
"""


# An invented sloping wire from the receiver to a tree: 29.0 m along, 0.5 m to 7.91 m high, so
# 29.93 m of wire. Its metric warning says "29.9 m"; in feet that rounded figure would be 98.1 ft, the exact
# one 98.2 ft (1 ft = 0.3048 m exactly, NIST SP 811), as the header writes it.
SLOPING_WIRE = """
[site]
name = "sloping wire to a tree"
bands = ["mf"]

[[runs]]
name = "sloper"
points = [[0, 0, 0.5], [29.0, 0, 7.91]]

[receiver]
at = [0, 0]
height = "0.5 m"

[[earth.rods]]
length = "2.4 m"
"""


@pytest.fixture(autouse=True)
def _no_columns_from_outside(monkeypatch):
    """A piped report honours COLUMNS: a value exported in the shell that runs the tests must not change them."""
    monkeypatch.delenv("COLUMNS", raising=False)


@pytest.fixture
def write_site(tmp_path):
    """Write TOML text (dedented) to a file and return its path."""

    def _write(text: str, name: str = "site.toml") -> Path:
        p = tmp_path / name
        p.write_text(textwrap.dedent(text), encoding="utf-8")
        return p

    return _write


def run(capsys, *argv):
    """Run the command line in-process; return (exit code, stdout, stderr). Arguments may be paths."""
    from aerial.cli import main

    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def one_line(err: str) -> str:
    """Assert that stderr is exactly one line and no traceback; return that line without its newline."""
    assert err.endswith("\n") and err.count("\n") == 1, repr(err)
    assert "Traceback" not in err
    return err.rstrip("\n")
