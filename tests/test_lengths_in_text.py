"""No sentence of a result writes a length as bare digits: it keeps the exact value (aerial.core.lengthtext).

A warning or note that writes ``f"{x:.1f} m"`` shows, under --units us, feet read back from the rounded
digits, which can differ from the tables' figure for the same length. This scans the package's source for
such f-strings outside error messages (which echo the site file in its own terms and go to stderr).
"""

from __future__ import annotations

import ast
import pathlib
import re

import pytest

PACKAGE = pathlib.Path(__file__).resolve().parents[1] / "aerial"
#: A metric length unit right after a formatted value (not mm², m·pF, mV/m ...).
UNIT_AFTER = re.compile(r"^ ?(m|mm|cm|km)(?![\w²·/^])")
#: Calls whose message is an error: raised, or handed to the site reader's one-line failure.
ERROR_CALLS = re.compile(r"(Error|Refusal|Limit|^fail)$")
#: The output layer writes lengths with its own unit system (terminal.Lengths); it is not scanned.
SCANNED = sorted(p for p in PACKAGE.rglob("*.py") if "outputs" not in p.parts)


def _is_error(parents) -> bool:
    for node in parents:
        if isinstance(node, ast.Raise):
            return True
        if isinstance(node, ast.Call):
            func = node.func
            name = func.attr if isinstance(func, ast.Attribute) else getattr(func, "id", "")
            if ERROR_CALLS.search(name):
                return True
    return False


def _lengths_as_digits(path: pathlib.Path, root: pathlib.Path = PACKAGE.parent) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found = []

    def visit(node, parents):
        if isinstance(node, ast.JoinedStr) and not _is_error(parents):
            for here, after in zip(node.values, node.values[1:]):
                if (isinstance(here, ast.FormattedValue) and isinstance(after, ast.Constant)
                        and isinstance(after.value, str) and UNIT_AFTER.match(after.value)):
                    found.append(f"{path.relative_to(root)}:{node.lineno}")
        for child in ast.iter_child_nodes(node):
            visit(child, parents + [node])

    visit(tree, [])
    return found


@pytest.mark.parametrize("path", SCANNED, ids=lambda p: str(p.relative_to(PACKAGE)))
def test_sentences_write_lengths_with_their_exact_value(path):
    found = _lengths_as_digits(path)
    assert not found, (f"{found}: write the length with aerial.core.lengthtext.metres(value, spec) "
                       "(or words/join_text), so --units us can give the tables' figure")


def test_the_scan_finds_a_length_written_as_digits(tmp_path):
    sample = tmp_path / "sample.py"
    sample.write_text('x = 2.0\nw = f"total wire length {x:.1f} m is long"\n'
                      'def f():\n    raise ValueError(f"asked for {x:.4g} m")\n'
                      'a = f"{x:g} mm² and {x:g} mV/m"\n', encoding="utf-8")
    assert _lengths_as_digits(sample, tmp_path) == ["sample.py:2"]  # not the error, not mm² or mV/m
