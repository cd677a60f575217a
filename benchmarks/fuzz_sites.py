"""Fuzzing harness: hostile and sloppy site files through every command.

Mutates the invented example sites in ``site_examples/`` (deleted keys,
swapped types, duplicated tables, empty and control-character strings,
negative / zero / huge / NaN / infinite numbers, unknown and mixed units,
stacked points, self-crossing wires, thousands of wires, a 10 MB file, a
folder, an unreadable file, a named pipe, binary junk, a byte-order mark,
truncation, ...) and runs ``aerial check``, ``aerial report --json`` and
``aerial layout --json`` on each, in-process through :func:`aerial.cli.main`
with stdout and stderr captured. Every run is classified:

``ok``
    exit 0, stdout is valid JSON (no NaN literal) and no figure is null.
``user-error`` / ``refused``
    exit 2 / 3 with nothing on stdout and exactly one stderr line that names
    the file; when the file is readable TOML, the line also names the key and
    the value (``file:line: key = value: what is expected``).
anything else: a FAILURE
    exit 1 (internal error), an exception escaping ``main``, a second stderr
    line (a traceback, a printed warning), a null or NaN figure, exit 130,
    or a case running past its time limit (a hang). The case is saved as a
    reproducer (the site file and a ``case.json`` with the command lines).

Cases are built from ``(seed, index)`` alone, so one failure reproduces with
``--seed S --only INDEX``. Workers are separate processes so a hang is cut
off at the time limit and counted, and a runaway allocation meets an
address-space limit instead of the machine's memory.

Run::

    python benchmarks/fuzz_sites.py --count 10000 --seed 1
    python benchmarks/fuzz_sites.py --seed 1 --only 4711 --save fuzz-failures

The test suite (``tests/test_fuzz.py``) runs a few hundred cases of the same
engine.
"""

from __future__ import annotations

import argparse
import contextlib
import copy
import errno
import io
import json
import math
import multiprocessing
import os
import random
import re
import shutil
import signal
import stat
import sys
import tempfile
import time
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES_DIR = ROOT / "site_examples"

#: Commands run on every case (argv after the site path is inserted). ``--quiet``: a slow case on a busy
#: machine would otherwise print progress lines on stderr, which the one-line rule below would count.
COMMANDS = (("check", "{site}", "--json"), ("report", "{site}", "--json", "--quiet"),
            ("layout", "{site}", "--json", "--quiet"))

#: Wall-clock limit for all commands of one case [s].
DEFAULT_CASE_TIMEOUT_S = 90.0

#: Address-space limit for a worker [bytes]; a runaway allocation becomes a MemoryError.
DEFAULT_MEMORY_LIMIT_BYTES = 3 * 2**30

FAILURE_CLASSES = ("internal-error", "escaped-exception", "bad-exit", "bad-stderr", "bad-json", "null-figure",
                   "hang", "worker-crash", "check-passes-report-refuses")

# JSON keys that are figures (carry a unit suffix): a null there is a figure that was not computed.
_FIGURE_KEY = re.compile(r"(_(m|hz|ohm|f|h|v|w|db|dbw|dbuv|s_m|v_per_m|a|c|percent|s)$)|^(efficiency|q|score)$")
# ``file(:line): key = value: expected`` (the value may itself contain ': ')
_KEYED = re.compile(r"^\S.*? = .+?: .+")
_NOT_COMPUTED = "could not be computed"
# Nulls the JSON contract documents as meaningful (not a figure that failed):
# docs/site-planner.md: clearance_margin_m is null when the site has no power line.
_ALLOWED_NULL = (re.compile(r"^layouts\[\d+\]\.clearance_margin_m$"),)


# --------------------------------------------------------------------------- TOML writing


def _toml_string(text: str) -> str:
    out = ['"']
    for ch in text:
        o = ord(ch)
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif o < 0x20 or o == 0x7F:
            out.append(f"\\u{o:04X}")
        elif 0xD800 <= o <= 0xDFFF:  # a lone surrogate cannot be written as UTF-8
            out.append("\\uFFFD")
        else:
            out.append(ch)
    out.append('"')
    return "".join(out)


def _toml_key(key) -> str:
    key = str(key)
    return key if re.fullmatch(r"[A-Za-z0-9_-]+", key) else _toml_string(key)


class Digits(str):
    """An integer literal written out digit by digit (Python refuses str() of an int past 4300 digits)."""


def _toml_value(value) -> str:
    if isinstance(value, Digits):
        return str.__str__(value)
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return _toml_string(value)
    if isinstance(value, dict):
        return "{" + ", ".join(f"{_toml_key(k)} = {_toml_value(v)}" for k, v in value.items()) + "}"
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    return _toml_string(str(value))


def _is_aot(value) -> bool:
    return isinstance(value, list) and len(value) > 0 and all(isinstance(v, dict) for v in value)


def toml_dumps(data: dict) -> str:
    """Write a parsed TOML document back as text (keeps NaN and inf as TOML literals)."""
    lines: list[str] = []

    def table(d: dict, prefix: list[str]):
        for k, v in d.items():
            if not isinstance(v, dict) and not _is_aot(v):
                lines.append(f"{_toml_key(k)} = {_toml_value(v)}")
        for k, v in d.items():
            name = ".".join(_toml_key(p) for p in prefix + [k])
            if isinstance(v, dict):
                lines.append("")
                lines.append(f"[{name}]")
                table(v, prefix + [k])
            elif _is_aot(v):
                for item in v:
                    lines.append("")
                    lines.append(f"[[{name}]]")
                    table(item, prefix + [k])

    table(data, [])
    return "\n".join(lines) + "\n"


# --------------------------------------------------------------------------- mutation engine


@dataclass
class Case:
    """One fuzz case: how to lay out the input and which commands to run."""

    index: int
    seed: int
    base: str
    mutations: list = field(default_factory=list)
    data: bytes | None = None  # the site file's bytes (None: a special path)
    special: str = ""  # "", "folder", "missing", "unreadable", "fifo", "odd-name", "huge", "os-fault"
    fault: tuple = ()  # for "os-fault": (where, errno) - "mkstemp", "write" or "stdout"
    file_name: str = "site.toml"
    extra_args: dict = field(default_factory=dict)  # command -> extra argv

    @property
    def description(self) -> str:
        what = "; ".join(self.mutations) if self.mutations else "unchanged"
        return f"{self.base}: {what}" + (f" [{self.special}]" if self.special else "")


def load_bases() -> list[tuple[str, str]]:
    """The example sites (name, text) the mutations start from."""
    return [(p.name, p.read_text(encoding="utf-8")) for p in sorted(EXAMPLES_DIR.glob("*.toml"))]


_UNITS_TEXT = ("m", "ft", "in", "mm", "cm", "km", "yd", "kHz", "MHz", "Hz", "pF", "nF", "uH", "mH", "kW", "W",
               "ohm", "kohm", "mV/m", "S/m", "ohm m", "AWG", "SWG", "mm2")
_ODD_STRINGS = (
    "", " ", "\t", "\x00", "nul\x00byte", "\x1b[31mred\x1b[0m", "line\nbreak", "cr\rreturn", "\u202eevil", "\u200b",
    "e\u0301\u0301\u0301", "\U0001F4E1 aerial", "名前", "\ufeffbom", "\u2028sep", "'", '"', "\\", "[[", "{}",
    "nan", "inf", "-inf", "NaN m", "inf ft", "1e400 m", "-0 m", "0x10 m", "1_000 m", "１２ m", "12m", "12 M",
    "1,5 m", "3 ft 4 in", "3 m + 2 ft", "12 m/s", "12 furlong", "ft", "12", "12 meters ", "  7.5   m  ",
    "12 MHZ", "880 khz", "880 kHz kHz", "1e-30 m", "1e30 m", "9" * 400 + " m", "-12 m", "+12 m", ".5 m", "5. m",
    "12 AWG", "0 AWG", "41 AWG", "-4 AWG", "4/0 AWG", "7/0 SWG", "51 SWG", "14awg", "14 awg", "AWG 14",
    "gas", "natural gas", "x" * 5000,
)
_ODD_NUMBERS = (0, -0.0, -1, -1e-12, 1e-300, 5e-324, 1e300, 1.7976931348623157e308, float("nan"), float("inf"),
                float("-inf"), 2**63 - 1, -(2**63), 1e9, 1e-9, 0.001, 1e6, 3, 12.5, -12.5, 10_000, 1)


def _random_scalar(rng: random.Random):
    pick = rng.random()
    if pick < 0.35:
        return rng.choice(_ODD_NUMBERS)
    if pick < 0.7:
        return rng.choice(_ODD_STRINGS)
    if pick < 0.8:
        return rng.choice([True, False])
    if pick < 0.9:
        return f"{rng.choice(['12', '-3', '0', '1e9', '0.0001', 'nan', 'inf', '2.5'])} {rng.choice(_UNITS_TEXT)}"
    return rng.uniform(-1e3, 1e3)


def _random_value(rng: random.Random, depth: int = 0):
    pick = rng.random()
    if depth > 2 or pick < 0.6:
        return _random_scalar(rng)
    if pick < 0.75:
        return [_random_value(rng, depth + 1) for _ in range(rng.randint(0, 4))]
    if pick < 0.85:
        return [[rng.choice(_ODD_NUMBERS) for _ in range(rng.choice([2, 3, 4]))] for _ in range(rng.randint(0, 3))]
    return {rng.choice(["at", "height", "x", "from", "to", "name", "weird key", ""]): _random_value(rng, depth + 1)
            for _ in range(rng.randint(0, 3))}


def _paths(node, prefix=()):
    """Every (container, key, path) in a parsed document, depth first."""
    out = []
    if isinstance(node, dict):
        for k in list(node):
            out.append((node, k, prefix + (k,)))
            out += _paths(node[k], prefix + (k,))
    elif isinstance(node, list):
        for i in range(len(node)):
            out.append((node, i, prefix + (i,)))
            out += _paths(node[i], prefix + (i,))
    return out


def _path_text(path) -> str:
    s = ""
    for p in path:
        s += f"[{p}]" if isinstance(p, int) else (f".{p}" if s else str(p))
    return s


def _quantity_variant(rng, value):
    """The same quantity with an odd number or unit."""
    if isinstance(value, str):
        m = re.match(r"^\s*([-+]?[\d.eE+-]+)\s*(.*)$", value)
        unit = m.group(2) if m else rng.choice(_UNITS_TEXT)
        number = rng.choice(["0", "-0", "-5", "1e-300", "1e300", "1e400", "nan", "inf", "-inf", "1e-9", "99999999",
                             "0.0000001", ""])
        if rng.random() < 0.3:
            unit = rng.choice(["furlong", "parsec", "m m", "mm mm", "µm", "ft.", "feet feet", "Ω", "kΩ", "%",
                               rng.choice(_UNITS_TEXT)])
        return f"{number} {unit}".strip()
    return rng.choice(_ODD_NUMBERS)


def _many_runs(rng, count: int) -> list:
    runs = []
    for i in range(count):
        x = (i % 100) * 0.7
        y = (i // 100) * 0.7
        runs.append({"points": [[x, y, 3.0 + (i % 5)], [x + 5.0, y + 0.3, 4.0]]})
    return runs


def _self_crossing(rng) -> dict:
    kind = rng.choice(["zigzag", "bowtie", "backtrack", "coincident", "spiral", "through-ground", "tiny"])
    if kind == "zigzag":
        pts = [[0, 0, 6], [10, 10, 6], [10, 0, 6], [0, 10, 6], [0, 0, 6.5]]
    elif kind == "bowtie":
        pts = [[0, 0, 5], [10, 0, 5], [0, 5, 5], [10, 5, 5], [0, 0, 5.2]]
    elif kind == "backtrack":
        pts = [[0, 0, 5], [20, 0, 5], [0.005, 0, 5], [20, 0.004, 5]]
    elif kind == "coincident":
        pts = [[0, 0, 5], [10, 0, 5], [10, 0, 5], [20, 0, 5]]
    elif kind == "spiral":
        pts = [[3 * math.cos(t), 3 * math.sin(t), 4 + 0.01 * t] for t in [k * 0.5 for k in range(rng.randint(3, 400))]]
    elif kind == "through-ground":
        pts = [[0, 0, 5], [10, 0, -1], [20, 0, 5]]
    else:
        pts = [[0, 0, 5], [0, 0, 5.00001]]
    return {"points": pts, "name": f"crossing {kind}"}


def mutate_document(rng: random.Random, doc: dict, notes: list) -> dict:
    """Apply one structural mutation to a parsed site (in place; also returned)."""
    paths = _paths(doc)
    op = rng.choice(["delete", "delete", "swap-type", "swap-type", "number", "number", "quantity", "quantity",
                     "string", "stack-points", "duplicate-table", "many-wires", "self-crossing", "unknown-key",
                     "rename-key", "exchange", "drop-table", "deep", "long-list", "empty-container",
                     "huge-integer", "prefix-case", "prefix-case", "many-stations"])
    if not paths:
        doc["site"] = {"name": rng.choice(_ODD_STRINGS)}
        notes.append("empty document: add [site]")
        return doc
    container, key, path = rng.choice(paths)
    where = _path_text(path)
    if op == "delete":
        del container[key]
        notes.append(f"delete {where}")
    elif op == "swap-type":
        container[key] = _random_value(rng)
        notes.append(f"swap type {where} -> {container[key]!r:.60}")
    elif op == "number":
        nums = [(c, k, p) for c, k, p in paths if isinstance(c[k], (int, float)) and not isinstance(c[k], bool)]
        c, k, p = rng.choice(nums) if nums else (container, key, path)
        c[k] = rng.choice(_ODD_NUMBERS)
        notes.append(f"number {_path_text(p)} -> {c[k]!r}")
    elif op == "quantity":
        qs = [(c, k, p) for c, k, p in paths if isinstance(c[k], str) and re.match(r"^\s*[-+\d.]", c[k])]
        c, k, p = rng.choice(qs) if qs else (container, key, path)
        c[k] = _quantity_variant(rng, c[k])
        notes.append(f"quantity {_path_text(p)} -> {c[k]!r:.60}")
    elif op == "string":
        ss = [(c, k, p) for c, k, p in paths if isinstance(c[k], str)]
        c, k, p = rng.choice(ss) if ss else (container, key, path)
        c[k] = rng.choice(_ODD_STRINGS)
        notes.append(f"string {_path_text(p)} -> {c[k]!r:.60}")
    elif op == "stack-points":
        pts = [(c, k, p) for c, k, p in paths if isinstance(c[k], list) and len(c[k]) in (2, 3)
               and all(isinstance(v, (int, float, str)) for v in c[k])]
        if len(pts) >= 2:
            (c1, k1, p1), (c2, k2, p2) = rng.sample(pts, 2)
            c1[k1] = copy.deepcopy(c2[k2])
            notes.append(f"stack {_path_text(p1)} onto {_path_text(p2)}")
        else:
            supports = doc.get("supports")
            if isinstance(supports, dict) and len(supports) >= 2:
                a, b = rng.sample(list(supports), 2)
                if isinstance(supports[a], dict) and isinstance(supports[b], dict):
                    supports[a] = copy.deepcopy(supports[b])
                notes.append(f"stack supports.{a} onto supports.{b}")
    elif op == "duplicate-table":
        aots = [(c, k, p) for c, k, p in paths if _is_aot(c[k])]
        if aots:
            c, k, p = rng.choice(aots)
            n = rng.choice([1, 2, 10, 60])
            c[k] = c[k] + [copy.deepcopy(rng.choice(c[k])) for _ in range(n)]
            notes.append(f"duplicate an entry of {_path_text(p)} x{n}")
        else:
            doc.setdefault("stations", []).append({"name": "dup", "frequency": "1 MHz", "power": "1 kW", "distance": "1 km"})
            notes.append("add a station")
    elif op == "many-wires":
        n = rng.choice([50, 99, 101, 150, 400, 1000, 3000, 6000])
        runs = doc.get("runs") if isinstance(doc.get("runs"), list) else []
        doc["runs"] = runs + _many_runs(rng, n)
        notes.append(f"add {n} runs")
    elif op == "self-crossing":
        runs = doc.get("runs") if isinstance(doc.get("runs"), list) else []
        doc["runs"] = runs + [_self_crossing(rng)]
        notes.append(f"self-crossing run {doc['runs'][-1]['name']}")
    elif op == "unknown-key":
        target = container[key] if isinstance(container[key], dict) else doc
        name = rng.choice(["hieght", "lenght", "sag ", "x", "Height", "", " ", "\u00e9", "from\x00", "at.x"])
        target[name] = _random_value(rng)
        notes.append(f"unknown key {name!r} beside {where}")
    elif op == "rename-key":
        if isinstance(container, dict):
            value = container.pop(key)
            new = rng.choice([key.upper(), key + "s", key[:-1] or "k", key.replace("_", "-"), key + " "])
            container[new] = value
            notes.append(f"rename {where} -> {new!r}")
        else:
            container.reverse()
            notes.append(f"reverse list at {_path_text(path[:-1])}")
    elif op == "exchange":
        (c1, k1, p1), (c2, k2, p2) = rng.choice(paths), rng.choice(paths)
        try:
            c1[k1], c2[k2] = copy.deepcopy(c2[k2]), copy.deepcopy(c1[k1])
            notes.append(f"exchange {_path_text(p1)} and {_path_text(p2)}")
        except (KeyError, IndexError):
            notes.append("exchange skipped")
    elif op == "drop-table":
        top = rng.choice(list(doc))
        del doc[top]
        notes.append(f"drop [{top}]")
    elif op == "deep":
        v: object = rng.choice([1, "1 m"])
        for _ in range(rng.choice([5, 30, 60])):  # deeper nesting is made as text (mutate_text "deep-array")
            v = [v]
        container[key] = v
        notes.append(f"deeply nested list at {where}")
    elif op == "long-list":
        container[key] = [rng.choice(_ODD_NUMBERS[:8]) for _ in range(rng.choice([4, 100, 20000]))]
        notes.append(f"long list at {where}")
    elif op == "huge-integer":
        nums = [(c, k, p) for c, k, p in paths if isinstance(c[k], (int, float)) and not isinstance(c[k], bool)]
        c, k, p = rng.choice(nums) if nums else (container, key, path)
        n = rng.choice([309, 400, 4300, 4301, 5000])
        c[k] = Digits(rng.choice(["", "-"]) + "9" * n)
        notes.append(f"integer of {n} digits at {_path_text(p)}")
    elif op == "prefix-case":
        qs = [(c, k, p) for c, k, p in paths if isinstance(c[k], str) and re.match(r"^\s*[-+\d.].*[^\W\d_]", c[k])]
        c, k, p = rng.choice(qs) if qs else (container, key, path)
        c[k] = _prefix_case(rng, c[k] if isinstance(c[k], str) else "5 mW")
        notes.append(f"unit case {_path_text(p)} -> {c[k]!r:.60}")
    elif op == "many-stations":
        n = rng.choice([20, 150, 151, 1000, 5000])
        stations = doc.get("stations") if isinstance(doc.get("stations"), list) else []
        doc["stations"] = stations + [{"name": f"fuzz station {i}", "frequency": f"{rng.randrange(53, 171) * 10} kHz",
                                       "power": f"{rng.choice([0.1, 1, 5, 50])} kW",
                                       "distance": f"{rng.uniform(1, 900):.1f} km"} for i in range(n)]
        notes.append(f"add {n} stations")
    else:  # empty-container
        container[key] = rng.choice([[], {}, [[]], [{}], [[], []]])
        notes.append(f"empty container at {where}")
    return doc


def _prefix_case(rng, text: str) -> str:
    """The same quantity with the letters of its unit in another case ("5 mW" -> "5 MW", "5 mw", "5 MW")."""
    m = re.match(r"^(\s*[-+\d.eE/ ]*?\s*)(\D.*)$", text)
    if not m:
        return text
    unit = m.group(2)
    how = rng.choice(["upper", "lower", "swap", "random"])
    if how == "upper":
        unit = unit.upper()
    elif how == "lower":
        unit = unit.lower()
    elif how == "swap":
        unit = unit.swapcase()
    else:
        unit = "".join(ch.upper() if rng.random() < 0.5 else ch.lower() for ch in unit)
    return m.group(1) + unit


def mutate_text(rng: random.Random, data: bytes, notes: list) -> bytes:
    """Apply one byte-level mutation."""
    op = rng.choice(["bom", "bom", "truncate", "junk", "nul", "invalid-utf8", "utf16", "duplicate-header", "crlf",
                     "cr", "drop-line", "dup-line", "flip", "insert-char", "tabs", "shuffle", "deep-array"])
    text = data
    if op == "deep-array":
        depth = rng.choice([100, 400, 990, 3000])
        text = b"deep = " + b"[" * depth + b"1" + b"]" * depth + b"\n" + data
    elif op == "bom":
        text = b"\xef\xbb\xbf" + data
    elif op == "truncate":
        text = data[: rng.randint(0, max(len(data) - 1, 0))]
    elif op == "junk":
        junk = bytes(rng.getrandbits(8) for _ in range(rng.choice([1, 16, 512])))
        pos = rng.randint(0, len(data))
        text = data[:pos] + junk + data[pos:]
    elif op == "nul":
        pos = rng.randint(0, len(data))
        text = data[:pos] + b"\x00" + data[pos:]
    elif op == "invalid-utf8":
        pos = rng.randint(0, len(data))
        text = data[:pos] + rng.choice([b"\xff", b"\xc3", b"\xed\xa0\x80", b"\xf8\x88\x80\x80\x80"]) + data[pos:]
    elif op == "utf16":
        text = data.decode("utf-8", "replace").encode("utf-16")
    elif op == "duplicate-header":
        lines = data.split(b"\n")
        headers = [i for i, line in enumerate(lines) if line.startswith(b"[") and not line.startswith(b"[[")]
        if headers:
            i = rng.choice(headers)
            lines.append(lines[i])
            lines.append(b'name = "again"')
        text = b"\n".join(lines)
    elif op == "crlf":
        text = data.replace(b"\n", b"\r\n")
    elif op == "cr":
        text = data.replace(b"\n", b"\r")
    elif op in ("drop-line", "dup-line", "shuffle"):
        lines = data.split(b"\n")
        if lines:
            i = rng.randrange(len(lines))
            if op == "drop-line":
                del lines[i]
            elif op == "dup-line":
                lines.insert(i, lines[i])
            else:
                j = rng.randrange(len(lines))
                lines[i], lines[j] = lines[j], lines[i]
        text = b"\n".join(lines)
    elif op == "flip":
        if data:
            b = bytearray(data)
            for _ in range(rng.choice([1, 3, 20])):
                b[rng.randrange(len(b))] = rng.getrandbits(8)
            text = bytes(b)
    elif op == "insert-char":
        pos = rng.randint(0, len(data))
        text = data[:pos] + rng.choice(["=", "[", "]", '"', "'", "#", "\\", "{", ",", "\u00a0", "\u2028"]).encode() + data[pos:]
    else:  # tabs
        text = data.replace(b" = ", b"\t=\t")
    notes.append(f"text {op}")
    return text


def make_case(seed: int, index: int, bases=None) -> Case:
    """Build case ``index`` of run ``seed`` (the same pair always gives the same case)."""
    rng = random.Random(f"aerial-fuzz:{seed}:{index}")
    bases = bases or load_bases()
    name, text = rng.choice(bases)
    case = Case(index=index, seed=seed, base=name)
    roll = rng.random()
    if roll >= 0.97:  # an operating-system fault while writing (monkeypatched: a full disk cannot be arranged)
        case.special = "os-fault"
        case.data = text.encode()
        case.fault = (rng.choice(["mkstemp", "write", "stdout"]),
                      rng.choice([errno.ENOSPC, errno.EROFS, errno.EACCES, errno.ENAMETOOLONG, errno.EDQUOT, errno.EIO]))
        case.extra_args = {"report": ["--pictures", "{folder}/pics"], "layout": ["--picture", "{folder}/plan.svg"]}
        case.mutations.append(f"os fault {case.fault[0]} errno {case.fault[1]}")
        return case
    if roll < 0.02:
        case.special = rng.choice(["folder", "missing", "unreadable", "fifo", "huge", "empty", "odd-name", "odd-name"])
        case.data = text.encode()
        if case.special == "huge":
            case.data = text.encode() + b"\n# " + b"x" * (10 * 2**20) + b"\n"
        elif case.special == "empty":
            case.data = b""
        elif case.special == "odd-name":
            case.file_name = rng.choice(["site file.toml", "sité\u0301.toml", "new\nline.toml", "tab\tname.toml",
                                         "-dash.toml", "\x1b[31mred.toml", "no-extension"])
        case.mutations.append(f"special {case.special}")
        return case
    doc = tomllib.loads(text)
    n_struct = 0 if roll < 0.15 else rng.choice([1, 1, 1, 2, 3])
    for _ in range(n_struct):
        mutate_document(rng, doc, case.mutations)
    data = toml_dumps(doc).encode("utf-8") if n_struct else text.encode("utf-8")
    if roll < 0.3:
        data = mutate_text(rng, data, case.mutations)
    case.data = data
    if rng.random() < 0.08:
        case.extra_args["report"] = ["--step", rng.choice(["1 kHz", "0 Hz", "-5 kHz", "nan kHz", "inf Hz", "1e9 Hz",
                                                           "50 Hz", "5 kHz", "10", "1 MHz", "abc", ""])]
        case.mutations.append(f"report {' '.join(case.extra_args['report'])!r}")
    if rng.random() < 0.05:
        case.extra_args["layout"] = ["--best", rng.choice(["0", "-1", "1", "3", "100000", "x", "1e3"])]
        case.mutations.append(f"layout {' '.join(case.extra_args['layout'])!r}")
    return case


# --------------------------------------------------------------------------- running one case


@contextlib.contextmanager
def _unreadable(path: Path):
    """Make ``path`` raise PermissionError on read (chmod 000 does not stop root)."""
    if os.geteuid() != 0:
        os.chmod(path, 0)
        try:
            yield
        finally:
            os.chmod(path, stat.S_IRUSR | stat.S_IWUSR)
        return
    import builtins

    original = Path.read_bytes
    original_open = Path.open
    original_builtin_open = builtins.open
    target = str(path)

    def read_bytes(self):
        if str(self) == target:
            raise PermissionError(13, "Permission denied", target)
        return original(self)

    def open_(self, *a, **k):
        if str(self) == target:
            raise PermissionError(13, "Permission denied", target)
        return original_open(self, *a, **k)

    def builtin_open(file, *a, **k):  # the site reader opens the file by name
        if isinstance(file, (str, os.PathLike)) and os.fspath(file) == target:
            raise PermissionError(13, "Permission denied", target)
        return original_builtin_open(file, *a, **k)

    Path.read_bytes = read_bytes
    Path.open = open_
    builtins.open = builtin_open
    try:
        yield
    finally:
        Path.read_bytes = original
        Path.open = original_open
        builtins.open = original_builtin_open


def materialise(case: Case, folder: Path) -> Path:
    """Lay the case's input out in ``folder``; return the site path to pass to the commands."""
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / case.file_name
    if case.special == "folder":
        path.mkdir()
    elif case.special == "missing":
        pass
    elif case.special == "fifo":
        os.mkfifo(path)
    else:
        path.write_bytes(case.data or b"")
    return path


@contextlib.contextmanager
def _os_fault(fault):
    """Make the chosen write fail as the operating system would (a full disk, a read-only folder ...)."""
    where, no = fault
    import tempfile

    def fail(*a, **k):
        raise OSError(no, os.strerror(no))

    if where == "mkstemp":
        original = tempfile.mkstemp
        tempfile.mkstemp = fail
        try:
            yield
        finally:
            tempfile.mkstemp = original
    elif where == "write":
        original_fsync = os.fsync
        os.fsync = fail
        try:
            yield
        finally:
            os.fsync = original_fsync
    else:
        yield


def failing_stdout(no: int):
    """A stdout whose every write fails with ``no`` (a full disk, /dev/full)."""
    class FailingStdout(io.StringIO):
        def write(self, text):
            raise OSError(no, os.strerror(no))

    return FailingStdout


def run_cli(argv, stdout=None) -> tuple[int | None, str, str, str]:
    """Run ``aerial.cli.main`` in-process; return (exit code, stdout, stderr, escaped exception)."""
    from aerial.cli import main

    out, err = (stdout or io.StringIO)(), io.StringIO()
    escaped = ""
    code = None
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(list(argv))
        except SystemExit as exc:  # --help or --version; anything else escaping is a bug
            code = exc.code if isinstance(exc.code, int) else 2
            escaped = f"SystemExit({exc.code!r})"
        except BaseException as exc:  # noqa: BLE001 - the harness must see everything
            escaped = f"{type(exc).__name__}: {exc}"
    return code, out.getvalue(), err.getvalue(), escaped


def _nulls(value, path="") -> list[str]:
    found = []
    if isinstance(value, dict):
        for k, v in value.items():
            p = f"{path}.{k}" if path else k
            if v is None and _FIGURE_KEY.search(k):
                if not any(rx.match(p) for rx in _ALLOWED_NULL):
                    found.append(p)
            else:
                found += _nulls(v, p)
    elif isinstance(value, list):
        for i, v in enumerate(value):
            if v is None:
                found.append(f"{path}[{i}]")
            else:
                found += _nulls(v, f"{path}[{i}]")
    return found


def _reject_constant(name):
    raise ValueError(f"JSON holds {name}")


def classify(command: str, code, out: str, err: str, escaped: str, shown_path: str, toml_ok: bool,
             also_named=()) -> tuple[str, str]:
    """Sort one run into an outcome class; the second item says why (for failures).

    ``also_named``: output paths a message may name instead of the site file (an OS fault while writing).
    """
    if escaped:
        return "escaped-exception", escaped
    if code == 1:
        return "internal-error", err.strip()[:400]
    if code == 0:
        if err.strip():
            return "bad-stderr", f"exit 0 but stderr: {err.strip()[:300]}"
        try:
            data = json.loads(out, parse_constant=_reject_constant)
        except ValueError as exc:
            return "bad-json", f"{exc}: {out[:200]!r}"
        nulls = _nulls(data)
        warns = data.get("warnings", []) if isinstance(data, dict) else []
        if nulls or any(_NOT_COMPUTED in str(w) for w in warns):
            return "null-figure", ", ".join(nulls[:12]) or "a 'could not be computed' warning"
        return "ok", ""
    if code in (2, 3):
        lines = err.split("\n")
        if lines and lines[-1] == "":
            lines = lines[:-1]
        if out.strip():
            return "bad-stderr", f"exit {code} with output on stdout: {out[:200]!r}"
        if code == 3:  # a refusal: one short line, then at most a few indented lines of reasons
            reasons = lines[1:]
            if len(reasons) > 5 or not all(r.startswith("  ") for r in reasons):
                return "bad-stderr", f"refusal with {len(reasons)} lines of reasons: {err[:400]!r}"
            lines = lines[:1]
        if len(lines) != 1:
            return "bad-stderr", f"{len(lines)} stderr lines: {err[:400]!r}"
        line = lines[0]
        prefix = "aerial: refused: " if code == 3 else "aerial: "
        if not line.startswith(prefix):
            return "bad-stderr", f"does not start with {prefix!r}: {line[:300]!r}"
        body = line[len(prefix):]
        if _option_error(body):
            return ("user-error" if code == 2 else "refused"), ""
        if also_named and (any(_one_line(p) in body for p in also_named) or body.startswith("cannot write the output")):
            return "user-error", ""
        if _one_line(shown_path) not in body:
            return "bad-stderr", f"does not name the file: {line[:300]!r}"
        if toml_ok and command in ("check", "report") and code == 2:
            rest = body.split(_one_line(shown_path), 1)[1]
            rest = re.sub(r"^:\d+", "", rest)
            if not _KEYED.match(rest.lstrip(": ").strip()) and not _file_level(rest):
                return "bad-stderr", f"names no key and value: {line[:300]!r}"
        return ("user-error" if code == 2 else "refused"), ""
    if code == 130:
        return "bad-exit", "exit 130 without an interrupt"
    return "bad-exit", f"exit {code!r}: {err.strip()[:300]}"


_FILE_LEVEL = ("is a folder", "no such file", "cannot be read", "not UTF-8", "not valid TOML", "MB; a site file",
               "not a regular file", "--step", "--best", "--pictures", "already exists")


def _one_line(text: str) -> str:
    """The path as the command line prints it (control characters escaped)."""
    return "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in str(text))


def _option_error(body: str) -> bool:
    """A message about a command-line option (names the option, not the file)."""
    return body.startswith("--") or bool(re.match(r"^(\w+: )?(argument|unrecognized)", body))


def _file_level(rest: str) -> bool:
    """A message about the file as a whole or an option, where no key applies."""
    return any(word in rest for word in _FILE_LEVEL)


def _toml_readable(case: Case) -> bool:
    if case.special in ("folder", "missing", "unreadable", "fifo", "huge"):
        return False
    try:
        tomllib.loads((case.data or b"").decode("utf-8"))
    except (UnicodeDecodeError, ValueError, RecursionError):  # ValueError: TOML errors and 4300+ digit integers
        return False
    return True


def run_case(case: Case, folder: Path, commands=COMMANDS) -> list[dict]:
    """Materialise and run every command of ``case``; one result dict per command."""
    path = materialise(case, folder)
    shown = str(path)
    toml_ok = _toml_readable(case)
    results = []
    for template in commands:
        argv = [a.format(site=shown) for a in template] + [a.format(folder=folder) for a in
                                                            case.extra_args.get(template[0], [])]
        t0 = time.perf_counter()
        fault = _os_fault(case.fault) if case.special == "os-fault" else contextlib.nullcontext()
        with (_unreadable(path) if case.special == "unreadable" else fault):
            if case.special == "fifo":
                code, out, err, escaped = _run_with_alarm(argv, 10.0)
            else:
                full = case.special == "os-fault" and case.fault[0] == "stdout"
                code, out, err, escaped = run_cli(argv, stdout=failing_stdout(case.fault[1]) if full else None)
        seconds = time.perf_counter() - t0
        cls, why = classify(template[0], code, out, err, escaped, shown, toml_ok,
                            also_named=(str(folder),) if case.special == "os-fault" else ())
        results.append({"command": template[0], "argv": argv, "exit": code, "class": cls, "why": why,
                        "stderr": err[:2000], "seconds": round(seconds, 3)})
    return _agreeing(results, case)


def _agreeing(results: list[dict], case: Case) -> list[dict]:
    """A site ``check`` accepts must not be refused as bad input by ``report`` (its own options are fixed here):
    such a report is re-classed ``check-passes-report-refuses``, since the check told the user the file was fine."""
    by = {r["command"]: r for r in results}
    check, report = by.get("check"), by.get("report")
    if (check and report and check["class"] == "ok" and report["exit"] == 2 and case.special != "os-fault"
            and not case.extra_args.get("report")):
        report["class"], report["why"] = "check-passes-report-refuses", report["stderr"].strip()[:400]
    return results


class _Alarm(BaseException):
    pass


def _run_with_alarm(argv, seconds: float):
    """Run with a SIGALRM deadline (a blocking open() of a pipe is interruptible)."""
    def on_alarm(signum, frame):
        raise _Alarm()

    old = signal.signal(signal.SIGALRM, on_alarm)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        code, out, err, escaped = run_cli(argv)
    except _Alarm:
        code, out, err, escaped = None, "", "", "hang: blocked reading the site file"
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)
    if escaped.startswith("_Alarm"):
        escaped = "hang: blocked reading the site file"
    return code, out, err, escaped


def save_reproducer(case: Case, results: list[dict], save_dir: Path) -> Path:
    """Keep a failing case: the input and a case.json with the commands and outcomes."""
    d = save_dir / f"seed{case.seed}-case{case.index:05d}"
    d.mkdir(parents=True, exist_ok=True)
    if case.data is not None and case.special not in ("huge",):
        (d / "site.toml").write_bytes(case.data)
    info = {
        "seed": case.seed, "index": case.index, "description": case.description, "special": case.special,
        "file_name": case.file_name,
        "reproduce": f"python benchmarks/fuzz_sites.py --seed {case.seed} --only {case.index} --save {save_dir}",
        "results": results,
    }
    (d / "case.json").write_text(json.dumps(info, indent=2, ensure_ascii=True), encoding="utf-8")
    return d


# --------------------------------------------------------------------------- workers


def _worker(conn, seed: int, memory_limit: int):
    os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
    try:
        import resource

        resource.setrlimit(resource.RLIMIT_AS, (memory_limit, memory_limit))
    except (ImportError, ValueError, OSError):
        pass
    import warnings

    warnings.simplefilter("always")  # every printed warning is seen by the case that caused it
    sys.path.insert(0, str(ROOT))
    bases = load_bases()
    scratch = Path(tempfile.mkdtemp(prefix="aerial-fuzz-"))
    try:
        while True:
            index = conn.recv()
            if index is None:
                break
            folder = scratch / f"c{index}"
            try:
                case = make_case(seed, index, bases)
                results = run_case(case, folder)
            except BaseException as exc:  # noqa: BLE001 - a harness problem is reported, not hidden
                results = [{"command": "harness", "argv": [], "exit": None, "class": "escaped-exception",
                            "why": f"harness: {type(exc).__name__}: {exc}", "stderr": "", "seconds": 0.0}]
            shutil.rmtree(folder, ignore_errors=True)
            conn.send((index, results))
    finally:
        shutil.rmtree(scratch, ignore_errors=True)


@dataclass
class Summary:
    seed: int
    count: int = 0
    seconds: float = 0.0
    outcomes: dict = field(default_factory=dict)  # class -> number of runs
    failures: list = field(default_factory=list)  # (index, description, results)
    slowest: list = field(default_factory=list)  # (seconds, index, command)

    @property
    def failed_cases(self) -> int:
        return len(self.failures)

    def as_dict(self) -> dict:
        return {"seed": self.seed, "cases": self.count, "seconds": round(self.seconds, 1), "outcomes": self.outcomes,
                "failed_cases": self.failed_cases,
                "failures": [{"index": i, "description": d, "results": [r for r in res if r["class"] in FAILURE_CLASSES]}
                             for i, d, res in self.failures],
                "slowest": self.slowest[:10]}


def run_fuzz(count: int, seed: int, *, workers: int = 2, timeout: float = DEFAULT_CASE_TIMEOUT_S, start: int = 0,
             only=None, save_dir: Path | None = None, memory_limit: int = DEFAULT_MEMORY_LIMIT_BYTES,
             progress: bool = False) -> Summary:
    """Run cases ``start .. start+count-1`` (or the indices in ``only``) in worker processes."""
    indices = list(only) if only is not None else list(range(start, start + count))
    ctx = multiprocessing.get_context("fork")
    summary = Summary(seed=seed)
    t_start = time.perf_counter()
    pending = list(reversed(indices))
    slots: list[dict] = []

    def spawn():
        parent, child = ctx.Pipe()
        proc = ctx.Process(target=_worker, args=(child, seed, memory_limit), daemon=True)
        proc.start()
        child.close()
        return {"proc": proc, "conn": parent, "index": None, "since": 0.0}

    def feed(slot):
        if pending:
            slot["index"] = pending.pop()
            slot["since"] = time.perf_counter()
            slot["conn"].send(slot["index"])
        else:
            slot["index"] = None

    def record(index, results):
        summary.count += 1
        for r in results:
            summary.outcomes[r["class"]] = summary.outcomes.get(r["class"], 0) + 1
            summary.slowest.append((r["seconds"], index, r["command"]))
        if any(r["class"] in FAILURE_CLASSES for r in results):
            try:
                case = make_case(seed, index)
            except Exception as exc:  # noqa: BLE001 - a harness fault must not end the run
                summary.failures.append((index, f"(case could not be rebuilt: {type(exc).__name__})", results))
                return
            summary.failures.append((index, case.description, results))
            if save_dir is not None:
                save_reproducer(case, results, save_dir)
        if progress and summary.count % 100 == 0:
            print(f"  {summary.count}/{len(indices)} cases, {summary.failed_cases} failing, "
                  f"{time.perf_counter() - t_start:.0f} s", file=sys.stderr, flush=True)

    for _ in range(max(1, min(workers, len(indices)))):
        slot = spawn()
        slots.append(slot)
        feed(slot)
    from multiprocessing.connection import wait

    while any(s["index"] is not None for s in slots):
        busy = [s for s in slots if s["index"] is not None]
        ready = wait([s["conn"] for s in busy], timeout=1.0)
        now = time.perf_counter()
        for s in busy:
            if s["conn"] in ready:
                try:
                    index, results = s["conn"].recv()
                except (EOFError, OSError):
                    index = s["index"]
                    code = s["proc"].exitcode
                    results = [{"command": "worker", "argv": [], "exit": code, "class": "worker-crash",
                                "why": f"worker process died (exit {code})", "stderr": "", "seconds": now - s["since"]}]
                    s["proc"].join(1)
                    s.update(spawn())
                record(index, results)
                feed(s)
            elif now - s["since"] > timeout:
                index = s["index"]
                s["proc"].kill()
                s["proc"].join(5)
                record(index, [{"command": "case", "argv": [], "exit": None, "class": "hang",
                                "why": f"still running after {timeout:g} s", "stderr": "", "seconds": now - s["since"]}])
                s.update(spawn())
                feed(s)
    for s in slots:
        try:
            s["conn"].send(None)
        except OSError:
            pass
        s["proc"].join(5)
        if s["proc"].is_alive():
            s["proc"].kill()
    summary.seconds = time.perf_counter() - t_start
    summary.slowest.sort(reverse=True)
    summary.slowest = summary.slowest[:10]
    return summary


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description="Fuzz aerial's commands with mutated site files.")
    ap.add_argument("--count", type=int, default=1000, help="number of cases (default 1000)")
    ap.add_argument("--seed", type=int, default=1, help="run seed (default 1)")
    ap.add_argument("--start", type=int, default=0, help="first case index (default 0)")
    ap.add_argument("--only", type=int, nargs="+", metavar="INDEX", help="run just these case indices")
    ap.add_argument("--workers", type=int, default=max(1, (os.cpu_count() or 2)), help="worker processes")
    ap.add_argument("--timeout", type=float, default=DEFAULT_CASE_TIMEOUT_S, help="seconds per case before it counts as a hang")
    ap.add_argument("--save", metavar="DIR", help="save failing cases as reproducers into DIR")
    ap.add_argument("--json", metavar="FILE", help="write the summary as JSON to FILE")
    ap.add_argument("--show", action="store_true", help="print each case's description and outcomes (with --only)")
    args = ap.parse_args(argv)
    if args.show and args.only:
        for index in args.only:
            case = make_case(args.seed, index)
            print(f"case {index}: {case.description}")
    summary = run_fuzz(args.count, args.seed, workers=args.workers, timeout=args.timeout, start=args.start,
                       only=args.only, save_dir=Path(args.save) if args.save else None, progress=True)
    print(f"{summary.count} cases, seed {summary.seed}, {summary.seconds:.0f} s, {args.workers} workers")
    for cls, n in sorted(summary.outcomes.items(), key=lambda kv: -kv[1]):
        mark = "  FAILURE" if cls in FAILURE_CLASSES else ""
        print(f"  {cls:20s} {n:7d}{mark}")
    for index, description, results in summary.failures[:50]:
        for r in results:
            if r["class"] in FAILURE_CLASSES:
                print(f"case {index} [{r['command']}] {r['class']}: {r['why'][:200]}  <- {description[:160]}")
    if args.json:
        Path(args.json).write_text(json.dumps(summary.as_dict(), indent=2), encoding="utf-8")
    return 1 if summary.failures else 0


if __name__ == "__main__":
    sys.exit(main())
