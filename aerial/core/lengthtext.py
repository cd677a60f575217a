"""Free text that keeps the exact lengths written into it.

A warning or a note says "total wire length 29.9 m ...": the figure was rounded when the sentence was
written. Shown in feet, that rounded figure would become 98.1 ft while the table beside it, written from
the exact 29.93 m, says 98.2 ft. A :class:`LengthText` is a ``str`` (its value is the metric sentence, so
JSON and every reader of the result see plain text) that also carries each length it contains as an exact
value in metres; :func:`text_in` writes the sentence again in feet, inches and miles from those values.
In both unit systems a length is written in the one length format of the tables
(:func:`aerial.core.units.length_text`: "309 m" in a sentence as in the table, never "309.0 m").

Lengths are put into a sentence with :func:`metres` (one length), :func:`metres_range` (a range such as
"2.1-3.4 m"), :func:`words` (a template with named fields) and ``+`` / :func:`join_text`, all of which keep
the values. Any other string operation gives a plain ``str``, which :func:`text_in` still converts by reading
its metric lengths back from the digits (the rounded figures: the fallback, not the rule).

Examples
--------
>>> w = "total wire length " + metres(29.93) + " is long"
>>> w, text_in(w, "us")
('total wire length 29.9 m is long', 'total wire length 98.2 ft is long')
>>> text_in("total wire length 29.9 m is long", "us")  # a plain string: from the rounded digits
'total wire length 98.1 ft is long'
"""

from __future__ import annotations

import functools
import math
import re
import string

from aerial.core.records import NamedTuple
from aerial.core.units import distance_text, length_text

#: The metric units a length may be said to be written in ("km": a distance, in miles under "us").
METRIC_UNITS = ("m", "mm", "cm", "km")

#: The unit systems text can be written in: metres, or feet, inches and miles.
SYSTEMS = ("si", "us")


class Length(NamedTuple):
    """One length in a sentence: its exact value, written in the one length format of the tables.

    Attributes
    ----------
    metres : float
        The exact length (the upper end of a range). [m]
    unit : str
        "km" for a distance over the ground (written in miles under "us"), else "m" (mm, cm: the same).
    low_m : float or None
        The lower end of a range, or None for a single length. [m]
    dash : str
        What the metric sentence writes between the ends of a range.
    stated : (str, str) or None
        A figure a standard states in both systems, written as it states them (metric, US customary)
        instead of converted: a code's "600 mm (2 ft)" is 2 ft under "us", never 1.97 ft.
    """

    metres: float
    unit: str = "m"
    low_m: float | None = None
    dash: str = "-"
    stated: tuple[str, str] | None = None

    def one(self, value: float, system: str) -> str:
        """One end in ``system``: :func:`length_text`, or under "us" miles for a distance written in km."""
        return distance_text(value, system) if self.unit == "km" else length_text(float(value), 3, system)

    def text(self, system: str, dash: str) -> str:
        """The length (or range, the unit once where both ends share it) in ``system``."""
        high = self.one(self.metres, system)
        if self.low_m is None:
            return high
        low = self.one(self.low_m, system)
        low_number, low_unit = low.rsplit(" ", 1)
        return f"{low_number if low_unit == high.rsplit(' ', 1)[1] else low}{dash}{high}"

    def si(self) -> str:
        """The metric text, as the tables write a length (:func:`length_text`: 309 m, 1.63 mm, 12.4 km)."""
        return self.stated[0] if self.stated else self.text("si", self.dash)

    def us(self) -> str:
        """The text in feet (inches below a foot) or, for a length written in km, miles."""
        return self.stated[1] if self.stated else self.text("us", "–")


class LengthText(str):
    """A sentence (a ``str`` in metric units) that keeps its lengths as exact values.

    ``parts`` holds the sentence in order: plain strings and :class:`Length` items. ``+`` with a string
    or another LengthText keeps the values; other ``str`` methods return a plain ``str``.

    Examples
    --------
    >>> t = metres(0.6) + " above " + metres(12.04)
    >>> t, type(t).__name__, t.text_in("us")
    ('0.6 m above 12 m', 'LengthText', '1.97 ft above 39.5 ft')
    """

    parts: tuple

    def __new__(cls, text: str = "", parts: tuple | None = None):
        if parts is None:
            parts = (str(text),) if text else ()
        else:
            text = "".join(p if isinstance(p, str) else p.si() for p in parts)
        self = super().__new__(cls, text)
        self.parts = tuple(parts)
        return self

    @classmethod
    def of(cls, *pieces) -> "LengthText":
        """Pieces (strings, Length items, LengthTexts) one after the other."""
        parts: list = []
        for piece in pieces:
            if isinstance(piece, LengthText):
                parts.extend(piece.parts)
            elif isinstance(piece, (str, Length)):
                parts.append(str(piece) if isinstance(piece, str) else piece)
            else:
                raise TypeError(f"a LengthText is made of strings and lengths, not {type(piece).__name__}")
        return cls(parts=tuple(parts))

    def __add__(self, other):
        if not isinstance(other, str):
            return NotImplemented
        return LengthText.of(self, other)

    def __radd__(self, other):
        if not isinstance(other, str):
            return NotImplemented
        return LengthText.of(other, self)

    def __reduce__(self):  # pickled and copied with its lengths
        return (LengthText, (str(self), self.parts))

    def text_in(self, system: str) -> str:
        """The sentence in ``system``: "si" as it stands, "us" with every length in feet, inches or miles."""
        if system not in SYSTEMS:
            raise ValueError(f"'{system}' is not a valid unit system, must be one of 'si', 'us'")
        if system == "si":
            return str(self)
        return "".join(convert_digits(p) if isinstance(p, str) else p.us() for p in self.parts)


def metres(value: float, unit: str = "m") -> LengthText:
    """A length in a sentence, written as the tables write it (:func:`length_text`), keeping the exact value.

    Parameters
    ----------
    value : float
        The length. [m]
    unit : str
        "km" for a distance over the ground (miles under "us"); "m", "cm" or "mm" otherwise (feet or inches).
        The metric text picks mm, m or km by the size, as the tables do.

    Examples
    --------
    >>> metres(309.0), metres(29.93), metres(0.0016), metres(95e3, "km")
    ('309 m', '29.9 m', '1.6 mm', '95 km')
    >>> metres(95e3, "km").text_in("us"), metres(0.0016).text_in("us")
    ('59 mi', '0.063 in')
    """
    if unit not in METRIC_UNITS:
        raise ValueError(f"'{unit}' is not a metric length unit, must be one of {', '.join(METRIC_UNITS)}")
    return LengthText(parts=(Length(float(value), unit),))


def metres_range(low: float, high: float, unit: str = "m", dash: str = "-") -> LengthText:
    """A range of lengths, each end written as the tables write a length, keeping both exact values.

    >>> r = metres_range(3.05, 4.572)
    >>> r, r.text_in("us")
    ('3.05-4.57 m', '10–15 ft')
    >>> r = metres_range(50e3, 12e6, "km", "–")
    >>> r, r.text_in("us")
    ('50–12000 km', '31.1–7460 mi')
    """
    if unit not in METRIC_UNITS:
        raise ValueError(f"'{unit}' is not a metric length unit, must be one of {', '.join(METRIC_UNITS)}")
    return LengthText(parts=(Length(float(high), unit, float(low), dash),))


def stated_length(value: float, si_text: str, us_text: str) -> LengthText:
    """A length a standard states in both systems, written as it states it in each (not converted).

    Parameters
    ----------
    value : float
        The length, for comparisons. [m]
    si_text, us_text : str
        The standard's own metric and US customary figures, e.g. "600 mm" and "2 ft".

    Examples
    --------
    >>> t = stated_length(0.6, "600 mm", "2 ft")
    >>> t, t.text_in("us")
    ('600 mm', '2 ft')
    """
    return LengthText(parts=(Length(float(value), stated=(si_text, us_text)),))


def join_text(separator: str, items) -> LengthText:
    """``separator.join(items)`` keeping the lengths of every item.

    >>> join_text(", ", [metres(1.0), "and " + metres(2.0)]).text_in("us")
    '3.28 ft, and 6.56 ft'
    """
    pieces: list = []
    for i, item in enumerate(items):
        if i:
            pieces.append(separator)
        pieces.append(item)
    return LengthText.of(*pieces)


_FORMATTER = string.Formatter()


def words(template: str, /, **fields) -> LengthText:
    """``template.format(**fields)`` where a field holding a :class:`LengthText` keeps its lengths.

    Other fields are formatted with their format spec as ``str.format`` would.

    >>> w = words("{part} is {d} in plan, {n:.0f} wires", part="the mast", d=metres(3.04), n=2.0)
    >>> w, w.text_in("us")
    ('the mast is 3.04 m in plan, 2 wires', 'the mast is 9.97 ft in plan, 2 wires')
    """
    pieces: list = []
    for literal, name, spec, conversion in _FORMATTER.parse(template):
        if literal:
            pieces.append(literal)
        if name is None:
            continue
        value, _ = _FORMATTER.get_field(name, (), fields)
        if isinstance(value, LengthText) and not spec and not conversion:
            pieces.append(value)
        else:
            pieces.append(_FORMATTER.format_field(_FORMATTER.convert_field(value, conversion), spec or ""))
    return LengthText.of(*pieces)


#: A number (thousands may be grouped by a space, "12 000") followed by a metric length unit in
#: free text (not m·pF, mV/m, mm2 ...); a range "50–12 000 km" is taken whole.
NUMBER = r"\d{1,3}(?:[ \u00a0\u2009\u202f]\d{3})+(?:\.\d+)?|\d+(?:\.\d+)?"
METRIC_LENGTH_TEXT = (rf"(?<![\w.])(?<!\d[ \u00a0\u2009\u202f])(?:({NUMBER})\s?[–-]\s?)?({NUMBER})\s?(km|cm|mm|m)"
                      r"(?![\w·/²^])")


@functools.cache
def metric_length() -> re.Pattern:
    """:data:`METRIC_LENGTH_TEXT` compiled, on first use (text in metres only never needs it)."""
    return re.compile(METRIC_LENGTH_TEXT)


def convert_digits(words_: str) -> str:
    """Every metric length written in plain text, read back from its digits and written in feet or miles.

    >>> convert_digits("raise the wire 3 m; add 10 m; 2 mm2 wire at 1 m·pF and 5 mV/m")
    'raise the wire 9.84 ft; add 32.8 ft; 2 mm2 wire at 1 m·pF and 5 mV/m'
    >>> convert_digits("paths of 50–12 000 km; a 2-4 m pole")
    'paths of 31.1–7460 mi; a 6.56–13.1 ft pole'
    """
    scale = {"km": 1e3, "m": 1.0, "cm": 1e-2, "mm": 1e-3}

    def number(group):
        return float(re.sub(r"\s", "", group))

    def convert(match):
        low, value, unit = match.groups()
        size = number(value) * scale[unit]
        if not math.isfinite(size):
            return match.group(0)
        if low is None:
            return Length(size, unit=unit).us()
        return Length(size, unit=unit, low_m=number(low) * scale[unit]).us()

    return metric_length().sub(convert, words_)


def text_in(words_, system: str) -> str:
    """Free text in a unit system: under "si" as written, under "us" with its lengths in feet, inches, miles.

    A :class:`LengthText` is written from its exact lengths; any other text has its metric lengths read
    back from the digits (:func:`convert_digits`).

    >>> text_in(metres(29.93), "us"), text_in("29.9 m", "us"), text_in(metres(29.93), "si")
    ('98.2 ft', '98.1 ft', '29.9 m')
    """
    if system not in SYSTEMS:
        raise ValueError(f"'{system}' is not a valid unit system, must be one of 'si', 'us'")
    if isinstance(words_, LengthText):
        return words_.text_in(system)
    text = str(words_)
    return text if system == "si" else convert_digits(text)
