"""The result's plain JSON values and the JSON text the command line prints.

Consistency checks: the fast paths against the standard library's ``json.dumps`` and ``numpy.unique``
(general-purpose reference implementations) and against the element-by-element walk they replace.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from aerial.api import run_report
from aerial.cli import main
from aerial.core.arrays import sorted_unique
from aerial.estimate.plain import finalise, json_text

from .conftest import ROOT

ODD_VALUES = [
    {"a_m": [1.0, float("nan")]}, {"a": {"b": float("-inf")}}, {1: 2}, {"x": (1, 2.5, "é\n\u2028\"")},
    [1e300, -0.0, 5e-324, 1.0], {"k": [True, None, 3, False]}, 12, "s", [], {}, [[]], [{}], {"a": {}},
    float("inf"), 2.5, None, True, {"a": [1, [2, {"b": []}]]}, (1,), {"f": np.float64(1.5), "l": [np.float64(2.0)]},
    {"i": np.int64(3)}, [set()],
]


@pytest.mark.parametrize("value", ODD_VALUES, ids=range(len(ODD_VALUES)))
def test_consistency_json_text_is_the_standard_librarys_text_or_error(value):
    # reference: json.dumps(indent=2, allow_nan=False) of the Python standard library
    try:
        expected = json.dumps(value, indent=2, allow_nan=False)
    except (TypeError, ValueError) as err:
        with pytest.raises(type(err), match=str(err)[:20]):
            json_text(value)
        return
    assert json_text(value) == expected


@pytest.mark.parametrize("name", ["backyard_inverted_l", "portable_vertical_counterpoise"])
def test_consistency_report_json_is_the_standard_librarys_text(capsys, name):
    # consistency check: the command line's JSON, character for character, is json.dumps(indent=2) of the result
    site = str(ROOT / "site_examples" / f"{name}.toml")
    assert main(["report", site, "--json", "--quiet"]) == 0
    printed = capsys.readouterr().out
    assert printed == json.dumps(run_report(site), indent=2, allow_nan=False) + "\n"


def _walked(value):
    """The element-by-element conversion :func:`finalise` stands for (non-finite numbers as None)."""
    if isinstance(value, dict):
        return {k: _walked(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_walked(v) for v in value]
    if isinstance(value, np.ndarray):
        return _walked(value.tolist())
    if isinstance(value, (np.bool_, bool)):
        return bool(value)
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return float(value) if np.isfinite(value) else None
    if isinstance(value, complex):
        return [_walked(value.real), _walked(value.imag)]
    return value


def test_consistency_finalise_gives_what_the_element_walk_gives():
    # consistency check: arrays converted in one tolist against the element-by-element walk, every type
    finite = {"a": np.array([1.0, 2.5]), "b": [np.float32(2.5), np.int64(3), np.bool_(True), 1 + 2j, (1, 2)],
              "c": {"e": np.array([True, False]), "f": np.array([1 + 1j]), "g": np.array([1, 2], dtype=np.int32)},
              "h": np.float64(3.0), "s": "text", "n": None, "grid": np.arange(6.0).reshape(3, 2)}
    out = finalise(finite)
    assert json.dumps(out) == json.dumps(_walked(finite))
    assert "warnings" not in out
    broken = dict(finite, a=np.array([1.0, np.nan]), c={"d": float("inf")})
    out = finalise(broken)
    assert out["a"] == [1.0, None] and out["c"] == {"d": None}
    assert out["warnings"] == ["Some figures could not be computed and are shown as null: a, c.d"]


def test_consistency_sorted_unique_is_numpy_unique():
    # reference: numpy.unique (general-purpose library), on values with repeats, one value and none
    rng = np.random.default_rng(7)
    for values in (np.round(rng.uniform(0, 10, 500), 1), rng.uniform(size=(4, 5)), np.array([3.0]), np.zeros(0),
                   np.array([2, 1, 2, 1])):
        got, want = sorted_unique(values), np.unique(values)
        assert got.dtype == want.dtype and np.array_equal(got, want)
