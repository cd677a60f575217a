"""Best-effort line numbers for keys in a TOML text (tomllib does not keep positions)."""

from __future__ import annotations

import re


def find_line(text: str, key: str) -> int | None:
    """Line (1-based) where the dotted ``key`` (e.g. ``spans[2].sag``) is written, if it can be found.

    Handles ``[table]``, ``[[array]]`` headers with an index, and ``name = value`` lines.
    Returns None when the key cannot be located (e.g. inline tables spread over one line).
    """
    if not key:
        return None
    lines = text.splitlines()
    parts = re.findall(r"([^.\[\]]+)(?:\[(\d+)\])?", key)
    start = 0
    found = None
    prefix: list[str] = []
    for number, (name, index) in enumerate(parts):
        prefix.append(name)
        dotted = r"\s*\.\s*".join(re.escape(p) for p in prefix)
        if index:
            seen = -1
            for i in range(start, len(lines)):
                if re.match(r"\s*\[\[\s*" + dotted + r"\s*\]\]", lines[i]):
                    seen += 1
                    if seen == int(index):
                        start, found = i, i + 1
                        break
            else:  # not an array of tables: an array value, "bands = [...]", in the table found so far
                return _assignment_line(lines, start, name, found)
        elif number == len(parts) - 1:
            assign = re.compile(r"\s*[\"']?" + re.escape(name) + r"[\"']?\s*=")
            for i in range(start, len(lines)):
                if assign.match(lines[i]):
                    return i + 1
                if i > start and lines[i].lstrip().startswith("[") and found is not None:
                    break
            header = re.compile(r"\s*\[\[?\s*" + dotted + r"\s*\]")  # [table] or [[array of tables]]
            for i in range(start, len(lines)):
                if header.match(lines[i]):
                    return i + 1
            return found
        else:
            header = re.compile(r"\s*\[\s*" + dotted + r"\s*[\].]")
            for i in range(start, len(lines)):
                if header.match(lines[i]):
                    start, found = i, i + 1
                    break
    return found


def _assignment_line(lines: list, start: int, name: str, found: int | None) -> int | None:
    """Line (1-based) of ``name = ...`` from ``start`` up to the next table header, else ``found``."""
    assign = re.compile(r"\s*[\"']?" + re.escape(name) + r"[\"']?\s*=")
    for i in range(start, len(lines)):
        if assign.match(lines[i]):
            return i + 1
        if i > start and lines[i].lstrip().startswith("["):
            break
    return found
