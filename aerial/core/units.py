"""Units and wire gauges.

Lengths in a site file are metres when written as plain numbers, or strings
with an explicit unit ("30 ft", "12 in", "9.5 m"). A unit is never guessed.

References
----------
NIST Special Publication 811 (2008), Guide for the Use of the International
System of Units, appendix B: 1 ft = 0.3048 m, 1 in = 0.0254 m exactly.
ASTM B258, Standard Specification for Standard Nominal Diameters and
Cross-Sectional Areas of AWG Sizes of Solid Round Wires:
d = 0.127 mm x 92**((36 - n) / 39).
British Imperial Standard Wire Gauge (Board of Trade order, 1883): a legal table
of diameters, reproduced below in inches (from memory of the published table).
"""

from __future__ import annotations

import math
import re
from decimal import Decimal

# metres per unit (NIST SP 811: the foot and inch are exact)
LENGTH_UNITS: dict[str, float] = {
    "m": 1.0,
    "metre": 1.0,
    "metres": 1.0,
    "meter": 1.0,
    "meters": 1.0,
    "cm": 0.01,
    "mm": 0.001,
    "km": 1000.0,
    "ft": 0.3048,
    "foot": 0.3048,
    "feet": 0.3048,
    "in": 0.0254,
    "inch": 0.0254,
    "inches": 0.0254,
    "yd": 0.9144,
    "yard": 0.9144,
    "yards": 0.9144,
}

FREQUENCY_UNITS: dict[str, float] = {"hz": 1.0, "khz": 1e3, "mhz": 1e6}
CAPACITANCE_UNITS: dict[str, float] = {"f": 1.0, "uf": 1e-6, "µf": 1e-6, "nf": 1e-9, "pf": 1e-12}
INDUCTANCE_UNITS: dict[str, float] = {"h": 1.0, "mh": 1e-3, "uh": 1e-6, "µh": 1e-6, "nh": 1e-9}
POWER_UNITS: dict[str, float] = {"w": 1.0, "kw": 1e3, "mw": 1e6}
RESISTANCE_UNITS: dict[str, float] = {"ohm": 1.0, "ohms": 1.0, "kohm": 1e3, "mohm": 1e6, "ω": 1.0, "kω": 1e3}

_QUANTITY = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([^\s\d].*?)?\s*$")


class UnitError(ValueError):
    """A quantity that cannot be read; ``expected`` says what would be accepted."""

    def __init__(self, expected: str):
        self.expected = expected
        super().__init__(expected)


def parse_quantity(value, units: dict[str, float], kind: str, default_unit: str) -> float:
    """Read a number (in ``default_unit``) or a string "<number> <unit>" into SI.

    Parameters
    ----------
    value : int, float or str
        As written in the site file.
    units : dict
        Accepted unit words (lower case) and their factor to SI.
    kind : str
        Name of the quantity for messages, e.g. "a length".
    default_unit : str
        The unit a plain number is taken in, e.g. "m".

    Returns
    -------
    float
        The value in SI units.

    Raises
    ------
    UnitError
        When the value is not a finite number or the unit is unknown.

    Examples
    --------
    >>> parse_quantity("30 ft", LENGTH_UNITS, "a length", "m")
    9.144
    >>> parse_quantity(2.5, LENGTH_UNITS, "a length", "m")
    2.5
    """
    accepted = ", ".join(sorted({k for k in units if len(k) <= 3}))
    expected = f"expected {kind}: a number in {default_unit} or a string like \"12 {default_unit}\" (units: {accepted})"
    if isinstance(value, bool):
        raise UnitError(expected)
    if isinstance(value, (int, float)):
        number = float(value)
        if not math.isfinite(number):
            raise UnitError(expected + "; got a value that is not finite")
        return number
    if not isinstance(value, str):
        raise UnitError(expected)
    match = _QUANTITY.match(value)
    if not match:
        raise UnitError(expected)
    number = float(match.group(1))
    unit = (match.group(2) or "").strip().lower()
    if not unit:
        raise UnitError(expected + "; a number given as text needs its unit written out")
    if unit not in units:
        raise UnitError(f"unknown unit \"{match.group(2).strip()}\"; {expected}")
    if not math.isfinite(number):
        raise UnitError(expected + "; got a value that is not finite")
    # decimal arithmetic so that "12 in" is exactly 0.3048 m, as NIST SP 811 defines it
    return float(Decimal(match.group(1)) * Decimal(repr(units[unit])))


#: Longest length read anywhere (about the Earth's circumference); anything longer is a wrong number or unit. [m]
MAX_LENGTH_M = 4.0e7


def parse_length(value) -> float:
    """A length in metres from a number [m] or a string with a unit. [m]

    Raises :class:`UnitError` beyond +/- ``MAX_LENGTH_M`` as well.

    >>> parse_length("12 in")
    0.3048
    """
    metres = parse_quantity(value, LENGTH_UNITS, "a length", "m")
    if abs(metres) > MAX_LENGTH_M:
        raise UnitError(f"expected a length within {MAX_LENGTH_M / 1e3:,.0f} km; check the number and its unit")
    return metres


def awg_diameter(gauge: int | float) -> float:
    """Diameter of a solid round wire of American Wire Gauge ``gauge``. [m]

    ``gauge`` is an integer from 0000 (written -3) to 40; 0 is "1/0".

    References
    ----------
    ASTM B258: d = 0.127 mm x 92**((36 - n) / 39).

    >>> round(awg_diameter(14) * 1e3, 3)
    1.628
    """
    return 0.127e-3 * 92.0 ** ((36.0 - gauge) / 39.0)


# British Standard Wire Gauge (1883), diameters in inches (from memory of the legal table).
SWG_INCHES: dict[int, float] = {
    -6: 0.500, -5: 0.464, -4: 0.432, -3: 0.400, -2: 0.372, -1: 0.348, 0: 0.324,
    1: 0.300, 2: 0.276, 3: 0.252, 4: 0.232, 5: 0.212, 6: 0.192, 7: 0.176, 8: 0.160,
    9: 0.144, 10: 0.128, 11: 0.116, 12: 0.104, 13: 0.092, 14: 0.080, 15: 0.072,
    16: 0.064, 17: 0.056, 18: 0.048, 19: 0.040, 20: 0.036, 21: 0.032, 22: 0.028,
    23: 0.024, 24: 0.022, 25: 0.020, 26: 0.018, 27: 0.0164, 28: 0.0148, 29: 0.0136,
    30: 0.0124, 31: 0.0116, 32: 0.0108, 33: 0.0100, 34: 0.0092, 35: 0.0084,
    36: 0.0076, 37: 0.0068, 38: 0.0060, 39: 0.0052, 40: 0.0048, 41: 0.0044,
    42: 0.0040, 43: 0.0036, 44: 0.0032, 45: 0.0028, 46: 0.0024, 47: 0.0020,
    48: 0.0016, 49: 0.0012, 50: 0.0010,
}


def swg_diameter(gauge: int) -> float:
    """Diameter of a wire of British Standard Wire Gauge ``gauge`` (7/0 = -6 ... 50). [m]

    >>> round(swg_diameter(14) * 1e3, 4)
    2.032
    """
    return SWG_INCHES[int(gauge)] * 0.0254


def parse_gauge(text) -> int:
    """Read an AWG/SWG gauge number: 14, "14", "1/0", "4/0". Returns the integer (1/0 -> 0, 4/0 -> -3).

    >>> parse_gauge("2/0")
    -1
    """
    if isinstance(text, bool):
        raise UnitError("expected a gauge number such as 14 or \"2/0\"")
    if isinstance(text, int):
        return text
    if isinstance(text, float) and text.is_integer():
        return int(text)
    if isinstance(text, str):
        t = text.strip()
        m = re.fullmatch(r"(\d)/0", t)
        if m:
            return 1 - int(m.group(1))
        if re.fullmatch(r"\d{1,2}", t):
            return int(t)
    raise UnitError("expected a gauge number such as 14 or \"2/0\"")
