"""Read the tables of a site file: typed getters that name the file, key and line of every bad value.

:class:`TableReader` is shared by every reader of the site file (the site
itself, ``[plan]``, ``[building]``); so are the words for an unknown key or a
choice that is none of the allowed ones, and the support kinds.
"""

from __future__ import annotations

import math

from aerial.core import units
from aerial.core.errors import SiteError

#: Largest coordinate, height or length inside a site (a lot, its supports and its wires). [m]
MAX_SITE_LENGTH_M = 10_000.0

#: Default height uncertainty by support kind (one-sided, +/-) [m]. Users rarely know a tree's height.
HEIGHT_TOLERANCE_M = {
    "tree": 2.0,
    "eave": 0.3,
    "gable": 0.5,
    "chimney": 0.5,
    "mast": 0.2,
    "pole": 0.3,
    "balcony rail": 0.2,
    "window": 0.2,
    "roof": 0.5,
    "fence": 0.1,
    "other": 0.5,
}
SUPPORT_KINDS = tuple(HEIGHT_TOLERANCE_M)


def shown_key(name: str) -> str:
    """A key as TOML writes it: bare when it can be, else in quotes (so a blank key is visible)."""
    name = str(name)
    if name and all(ch.isalnum() or ch in "_-" for ch in name) and name.isascii():
        return name
    return '"' + name.replace("\\", "\\\\").replace('"', '\\"') + '"'


class TableReader:
    """Carries the file name and text so every error can name the file and line."""

    def __init__(self, path: str, text: str):
        self.path = path
        self.text = text

    def fail(self, key, value, expected):
        from aerial.site.tomlpos import find_line  # only for a refusal: a site that loads never needs it

        raise SiteError(self.path, key, value, expected, line=find_line(self.text, key))

    # typed getters -----------------------------------------------------------
    def table(self, data, key, name, required=False):
        value = data.get(name)
        full = f"{key}.{name}" if key else name
        if value is None:
            if required:
                self.fail(full, "", f"missing table [{full}]")
            return {}
        if not isinstance(value, dict):
            self.fail(full, value, f"expected a table [{full}]")
        return value

    def array_of_tables(self, data, key, name):
        value = data.get(name, [])
        full = f"{key}.{name}" if key else name
        if isinstance(value, dict):
            return [value]
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            self.fail(full, value, f"expected one or more [[{full}]] tables")
        return value

    def string(self, data, key, name, default=None, choices=None, synonyms=None):
        """A text value; with ``choices`` one of them (case, "-", "_" and spaces aside), or a word
        that ``synonyms`` maps to one of them."""
        full = f"{key}.{name}" if key else name
        value = data.get(name, default)
        if value is None:
            return None
        if not isinstance(value, str) or not value.strip():
            self.fail(full, value, "expected a non-empty text value in quotes")
        value = value.strip()
        if choices is not None:
            norm = value.lower().replace("_", " ").replace("-", " ")
            for choice in choices:
                if norm == choice.replace("-", " "):
                    return choice
            for word, choice in (synonyms or {}).items():
                if norm == word.replace("-", " "):
                    return choice
            self.fail(full, value, choice_words(norm, choices, synonyms))
        return value

    def length(self, data, key, name, default=None, minimum=None, positive=False, required=False,
               maximum=MAX_SITE_LENGTH_M, units_table=units.LENGTH_UNITS):
        full = f"{key}.{name}" if key else name
        value = data.get(name)
        if value is None:
            if required:
                self.fail(full, "", "missing: expected a length such as 12 or \"40 ft\"")
            return default
        metres = self.metres(value, full, maximum, units_table)
        if positive and metres <= 0:
            self.fail(full, value, "expected a length greater than zero")
        if minimum is not None and metres < minimum:
            self.fail(full, value, f"expected a length of at least {minimum:g} m")
        return metres

    def metres(self, value, full, maximum=MAX_SITE_LENGTH_M, units_table=units.LENGTH_UNITS):
        """A length in metres, refused when not finite or beyond ``maximum`` either way."""
        try:
            metres = units.parse_length(value, units_table)
        except units.UnitError as err:
            self.fail(full, value, err.expected)
        if abs(metres) > maximum:
            self.fail(full, value, f"expected a length within {maximum / 1e3:g} km; check the number and its unit")
        return metres

    def quantity(self, data, key, name, table, kind, default_unit, default=None, positive=True):
        full = f"{key}.{name}" if key else name
        value = data.get(name)
        if value is None:
            return default
        try:
            number = units.parse_quantity(value, table, kind, default_unit)
        except units.UnitError as err:
            self.fail(full, value, err.expected)
        if positive and number <= 0:
            self.fail(full, value, f"expected {kind} greater than zero")
        return number

    def within(self, data, key, name, value, low, high, words):
        """Refuse ``value`` (already in SI units) outside [low, high]; ``words`` names the range for the user."""
        if value is not None and not low <= value <= high:
            full = f"{key}.{name}" if key else name
            self.fail(full, data.get(name, value), f"expected {words}")
        return value

    def number(self, data, key, name, default=None, low=None, high=None, integer=False, what="a number"):
        full = f"{key}.{name}" if key else name
        value = data.get(name, default)
        if value is None:
            return None
        ok = isinstance(value, (int, float)) and not isinstance(value, bool)
        if ok and isinstance(value, int) and abs(value) > 2**63:
            ok = False  # no count or factor in a site is this large (and a float cannot hold one past 1e308)
        if ok and integer and not (isinstance(value, int) or float(value).is_integer()):
            ok = False
        if ok and not math.isfinite(float(value)):
            ok = False
        if ok and low is not None and value < low:
            ok = False
        if ok and high is not None and value > high:
            ok = False
        if not ok:
            rng = ""
            if low is not None and high is not None:
                rng = f" from {low:g} to {high:g}"
            elif low is not None:
                rng = f" of at least {low:g}"
            self.fail(full, value, f"expected {what}{rng}")
        return int(value) if integer else float(value)

    def boolean(self, data, key, name, default=None):
        full = f"{key}.{name}" if key else name
        value = data.get(name, default)
        if value is None:
            return None
        if not isinstance(value, bool):
            self.fail(full, value, "expected true or false")
        return value

    def plan_point(self, value, key):
        if not isinstance(value, list) or len(value) != 2:
            self.fail(key, value, "expected a plan position [x, y] (metres east and north, or strings with units)")
        return [self.metres(item, f"{key}[{i}]") for i, item in enumerate(value)]

    def point3(self, value, key):
        if not isinstance(value, list) or len(value) != 3:
            self.fail(key, value, "expected a point [x, y, height] (metres, or strings with units)")
        out = [self.metres(item, f"{key}[{i}]") for i, item in enumerate(value)]
        if out[2] < 0:
            self.fail(f"{key}[2]", value[2], "a point below ground: heights are measured up from the ground (0 or more)")
        return out

    def check_keys(self, data, key, allowed):
        """Refuse a key not in ``allowed``, suggesting the nearest allowed spelling (a misspelt
        key would otherwise be ignored and its default used without a word). ``notes`` (free
        text for the user's own record) is allowed in every table."""
        allowed = set(allowed) | {"notes"}
        for name in data:
            if name not in allowed:
                full = f"{key}.{shown_key(name)}" if key else shown_key(name)
                words = unknown_key_words(name, allowed)
                if isinstance(data[name], dict) or (isinstance(data[name], list) and data[name]
                                                    and all(isinstance(v, dict) for v in data[name])):
                    words = words.replace("unknown key", "unknown table", 1)
                self.fail(full, data[name], words)
        if "notes" in data:
            notes = data["notes"]
            ok = isinstance(notes, str) or (isinstance(notes, list) and all(isinstance(n, str) for n in notes))
            if not ok:
                self.fail(f"{key}.notes" if key else "notes", notes, "expected free text in quotes (or a list of texts)")


def choice_words(value, choices, synonyms=None) -> str:
    """ "did you mean ...? expected one of ..." for a value that is none of ``choices`` (nor of the
    other words in ``synonyms``, which the hint may also name).

    >>> choice_words("hous", ("house", "apartment"))
    'did you mean "house"? expected one of "house", "apartment"'
    >>> choice_words("urbn", ("city", "rural"), {"urban": "city"})
    'did you mean "urban"? expected one of "city", "rural"'
    """
    near = units.closest_word(str(value).strip().lower(), [*choices, *(synonyms or {})])
    hint = f'did you mean "{near}"? ' if near else ""
    return hint + "expected one of " + ", ".join(f'"{c}"' for c in choices)


def unknown_key_words(name, allowed) -> str:
    """ "unknown key; did you mean ...? expected one of ..." for a key not in ``allowed``."""
    near = units.closest_word(str(name).strip().lower().replace("-", "_").replace(" ", "_"), sorted(allowed))
    hint = f'did you mean "{near}"? ' if near else ""
    return f"unknown key; {hint}expected one of " + ", ".join(sorted(allowed))
