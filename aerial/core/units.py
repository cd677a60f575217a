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

#: The international foot, exact by definition (NIST SP 811). [m]
FOOT_M = 0.3048
#: The inch, exact by definition (NIST SP 811). [m]
INCH_M = 0.0254
#: The international mile, exact by definition (NIST SP 811, B.8). [m]
MILE_M = 1609.344


def closest_word(word, choices):
    """The one of ``choices`` closest to ``word`` when it is close enough to be a slip, else None.

    >>> closest_word("reprot", ["report", "layout", "check"])
    'report'
    >>> closest_word("xyz", ["report"]) is None
    True
    """
    import difflib

    near = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return near[0] if near else None


# metres per unit (NIST SP 811: the foot, inch, yard and international mile are exact)
LENGTH_UNITS: dict[str, float] = {
    "m": 1.0,
    "metre": 1.0,
    "metres": 1.0,
    "meter": 1.0,
    "meters": 1.0,
    "cm": 0.01,
    "mm": 0.001,
    "km": 1000.0,
    "ft": FOOT_M,
    "foot": FOOT_M,
    "feet": FOOT_M,
    "in": INCH_M,
    "inch": INCH_M,
    "inches": INCH_M,
    "yd": 0.9144,
    "yard": 0.9144,
    "yards": 0.9144,
}

#: Distances to stations also accept the international mile (NIST SP 811, B.8: 1 mi = 1609.344 m exactly).
DISTANCE_UNITS: dict[str, float] = {**LENGTH_UNITS, "mi": MILE_M, "mile": MILE_M, "miles": MILE_M}

# SI prefixes are case-sensitive (SI Brochure, 9th edition, 3): the spellings below are exact;
# other case spellings are accepted only when no other SI reading exists (see parse_quantity).
FREQUENCY_UNITS: dict[str, float] = {"Hz": 1.0, "kHz": 1e3, "MHz": 1e6}
CAPACITANCE_UNITS: dict[str, float] = {"F": 1.0, "uF": 1e-6, "µF": 1e-6, "μF": 1e-6, "nF": 1e-9, "pF": 1e-12}
INDUCTANCE_UNITS: dict[str, float] = {"H": 1.0, "mH": 1e-3, "uH": 1e-6, "µH": 1e-6, "μH": 1e-6, "nH": 1e-9}
POWER_UNITS: dict[str, float] = {"mW": 1e-3, "W": 1.0, "kW": 1e3, "MW": 1e6}
RESISTANCE_UNITS: dict[str, float] = {
    "ohm": 1.0, "ohms": 1.0, "Ω": 1.0,
    "kohm": 1e3, "kohms": 1e3, "kilohm": 1e3, "kilohms": 1e3, "kΩ": 1e3,
    "Mohm": 1e6, "Mohms": 1e6, "megohm": 1e6, "megohms": 1e6, "MΩ": 1e6,
}
FIELD_STRENGTH_UNITS: dict[str, float] = {"V/m": 1.0, "mV/m": 1e-3, "uV/m": 1e-6, "µV/m": 1e-6, "μV/m": 1e-6}
CONDUCTIVITY_UNITS: dict[str, float] = {"S/m": 1.0, "mS/m": 1e-3}
RESISTIVITY_UNITS: dict[str, float] = {
    "ohm m": 1.0, "ohm-m": 1.0, "ohm·m": 1.0, "ohm*m": 1.0, "Ω·m": 1.0, "Ωm": 1.0, "Ω m": 1.0,
}
AREA_UNITS: dict[str, float] = {"mm2": 1e-6, "mm²": 1e-6, "mm^2": 1e-6, "m2": 1.0, "m²": 1.0, "m^2": 1.0}

#: The SI prefixes (SI Brochure, 9th edition, table 7), whose case matters: "m" is milli, "M" mega.
#: "u" stands for micro where "µ" cannot be typed. So "PF" could be a petafarad and is refused as
#: ambiguous, absurd as that reading is: a unit is never guessed.
SI_PREFIXES: dict[str, float] = {"y": 1e-24, "z": 1e-21, "a": 1e-18, "f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6,
                                 "µ": 1e-6, "μ": 1e-6, "m": 1e-3, "c": 1e-2, "d": 1e-1, "h": 1e2, "k": 1e3,
                                 "M": 1e6, "G": 1e9, "T": 1e12, "P": 1e15, "E": 1e18, "Z": 1e21, "Y": 1e24}
#: Unit symbols a prefix attaches to (compared case-insensitively).
_SI_SYMBOLS = {"m": "metre", "hz": "hertz", "f": "farad", "h": "henry", "w": "watt", "ohm": "ohm", "ω": "ohm",
               "v/m": "volt per metre", "s/m": "siemens per metre", "m2": "square metre", "m²": "square metre",
               "m^2": "square metre"}

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_QUANTITY = re.compile(r"^\s*(" + _NUMBER + r")\s*([^\s\d].*?)?\s*$")  # every quantity written as text
# The patterns below are large to compile (about 1 ms at start-up together) and most site files need none of
# them, so they stay texts that ``re`` compiles (and keeps) the first time a value may be of their form.
# a fraction "5/8", a mixed number "1 1/2" or "1-1/2", or a decimal number
_AMOUNT = r"(?:(\d+)(?:\s+|-)(\d+)\s*/\s*(\d+)|(\d+)\s*/\s*(\d+)|(\d+\.?\d*|\.\d+))"
_FRACTION_QUANTITY = r"^\s*" + _AMOUNT + r"\s*([^\s\d/].*?)\s*$"
_FEET_INCHES = r"^\s*" + _AMOUNT + r"\s*(?:ft|foot|feet|')\s*" + _AMOUNT + r"\s*(?:in|inch|inches|\")\s*$"  # any case
_FEET_MARK = r"^\s*" + _AMOUNT + r"\s*(')\s*$"
_INCH_MARK = r"^\s*" + _AMOUNT + r"\s*(\")\s*$"


class UnitError(ValueError):
    """A quantity that cannot be read; ``expected`` says what would be accepted."""

    def __init__(self, expected: str):
        self.expected = expected
        super().__init__(expected)


def _amount(groups) -> Fraction:
    """The exact value of one ``_AMOUNT`` match: (whole, num, den, num, den, decimal)."""
    from fractions import Fraction  # here: only a fraction or feet and inches needs exact fractions

    whole, n1, d1, n2, d2, dec = groups
    if dec is not None:
        return exact_fraction(dec)
    num, den = (n1, d1) if n1 is not None else (n2, d2)
    if int(den) == 0:
        raise UnitError(f"a fraction with a zero denominator ({num}/{den})")
    return Fraction(int(whole or 0)) + Fraction(int(num), int(den))


def find_unit(written: str, units: dict[str, float], number: str = "1") -> str:
    """The accepted spelling in ``units`` that ``written`` means, or raise :class:`UnitError`.

    SI prefixes are case-sensitive ("mW" is a milliwatt, "MW" a megawatt). An exact spelling
    is taken as written. Another case spelling ("khz", "UF", "OHM") is accepted when it has
    one reading only; one that could be two units ("mw", "MHZ", "Mm", "mohm") is refused,
    naming both readings.

    >>> find_unit("khz", FREQUENCY_UNITS)
    'kHz'
    >>> find_unit("mw", POWER_UNITS)
    Traceback (most recent call last):
    ...
    aerial.core.units.UnitError: ambiguous unit "mw": SI prefixes are case-sensitive: "mW" reads 1 mW = 0.001 W, "MW" reads 1 MW = 1e+06 W; write the one you mean
    """
    if written in units:
        return written
    key = written.casefold()
    matches = [u for u in units if u.casefold() == key]
    if not matches:
        near = closest_word(written, units)
        head = written.split()[0] if written.split() else written
        if near is None and head != written and head.casefold() not in {u.casefold() for u in units}:
            near = closest_word(head, units)  # a misspelt first unit of two ("12 fet 6 in")
            if near is not None:
                raise UnitError(f"unknown unit \"{head}\" in \"{written}\" (did you mean \"{near}\"?)")
        raise UnitError(f"unknown unit \"{written}\"" + (f" (did you mean \"{near}\"?)" if near else ""))
    readings: dict[str, float] = {u: units[u] for u in matches}
    # the same letters with the prefix in the other case: an SI unit of its own ("Mm" is a megametre)
    first, rest = written[0], written[1:]
    if rest.casefold() in _SI_SYMBOLS:
        for u in matches:
            p_written = SI_PREFIXES.get(first)
            p_table = SI_PREFIXES.get(u[0])
            if p_written is not None and p_table is not None and u[1:].casefold() == rest.casefold():
                base = units[u] / p_table
                readings.setdefault(first + u[1:], p_written * base)
            # a written prefix letter whose other case is also a prefix ("m" written for "M")
            for other in (first.upper(), first.lower()):
                if other != u[0] and other in SI_PREFIXES and u[0] in SI_PREFIXES and other.casefold() == first.casefold():
                    readings.setdefault(other + u[1:], SI_PREFIXES[other] * units[u] / SI_PREFIXES[u[0]])
    values = sorted(set(readings.values()))
    if len(values) == 1:
        return matches[0]
    shown = ", ".join(f'"{u}" reads {number} {u} = {_fmt(v * float(number))} {_base_symbol(u)}'
                      for u, v in sorted(readings.items(), key=lambda kv: kv[1]))
    raise UnitError(f"ambiguous unit \"{written}\": SI prefixes are case-sensitive: {shown}; write the one you mean")


def _fmt(value: float) -> str:
    return f"{value:g}"


def _base_symbol(unit: str) -> str:
    rest = unit[1:] if unit[:1] in SI_PREFIXES and unit[1:].casefold() in _SI_SYMBOLS else unit
    return {"ohm": "ohm", "Ω": "ohm"}.get(rest, rest)


def parse_quantity(value, units: dict[str, float], kind: str, default_unit: str) -> float:
    """Read a number (in ``default_unit``) or a string "<number> <unit>" into SI.

    Parameters
    ----------
    value : int, float or str
        As written in the site file.
    units : dict
        Accepted unit spellings (case-exact, see :func:`find_unit`) and their factor to SI.
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
        When the value is not a finite number, or the unit is unknown or ambiguous.

    Notes
    -----
    A number may be a decimal, a fraction or a mixed number ("5/8 in", "1 1/2 in",
    "1-1/2 in"); lengths also read feet and inches together ("6 ft 3 in", "6'3\"").

    Examples
    --------
    >>> parse_quantity("30 ft", LENGTH_UNITS, "a length", "m")
    9.144
    >>> parse_quantity(2.5, LENGTH_UNITS, "a length", "m")
    2.5
    >>> parse_quantity("5 mW", POWER_UNITS, "a power", "W")
    0.005
    """
    def expected() -> str:  # what is accepted, worked out only for a value that is refused
        accepted = ", ".join(sorted({k for k in units if len(k) <= 3}, key=lambda k: (k.casefold(), k)))
        return f"expected {kind}: a number in {default_unit} or a string like \"12 {default_unit}\" (units: {accepted})"

    if isinstance(value, bool):
        raise UnitError(expected())
    if isinstance(value, (int, float)):
        try:
            number = float(value)
        except OverflowError:
            raise UnitError(expected() + "; got a number too large to be " + kind) from None
        if not math.isfinite(number):
            raise UnitError(expected() + "; got a value that is not finite")
        return number
    if not isinstance(value, str):
        raise UnitError(expected())
    if "ft" in units and "in" in units:
        compound = _feet_and_inches(value)
        if compound is not None:
            return compound
    # a fraction has a digit, a "/" and a digit ("5/8"); "mV/m" alone is no reason to compile its pattern
    fraction = re.match(_FRACTION_QUANTITY, value) if "/" in value and re.search(r"\d\s*/\s*\d", value) else None
    if fraction and fraction.group(6) is not None:
        fraction = None  # a plain decimal: read below, in full (exponent included)
    match = None if fraction else _QUANTITY.match(value)
    if not match and not fraction:
        raise UnitError(expected())
    written = ((match or fraction).group(2) if match else fraction.group(7)) or ""
    written = written.strip()
    if not written:
        raise UnitError(expected() + "; a number given as text needs its unit written out")
    if written.startswith(",") and re.match(r",\d", written):  # "2,5 m": the pattern compiled only for a comma
        raise UnitError(_comma_words(value) + "; " + expected())
    try:
        unit = find_unit(written, units, match.group(1) if match else "1")
    except UnitError as err:
        if err.expected.startswith("ambiguous"):  # the two readings say it all
            raise
        raise UnitError(f"{err.expected}; {expected()}") from None
    if match:
        number = float(match.group(1))
        if not math.isfinite(number):
            raise UnitError(expected() + "; got a value that is not finite")
        # decimal arithmetic so that "12 in" is exactly 0.3048 m, as NIST SP 811 defines it
        return decimal_product(match.group(1), units[unit])
    try:
        amount = _amount(fraction.groups()[:6])
    except UnitError as err:
        raise UnitError(f"{err.expected}; {expected()}") from None
    return float(amount * exact_fraction(repr(units[unit])))


def exact_fraction(text: str) -> Fraction:
    """``Fraction(Decimal(text))`` for a decimal number's text: its exact value, read without decimal arithmetic.

    ``Fraction`` reads the text exactly itself; only a text longer than :data:`LONGEST_NUMBER`
    characters, past what ``int`` reads at once, goes through the decimal module (see :func:`decimal_product`
    for why a report keeps clear of it; ``tests/test_units.py`` checks both against the decimal module).

    >>> exact_fraction("1.5"), exact_fraction("1e-06")
    (Fraction(3, 2), Fraction(1, 1000000))
    """
    from fractions import Fraction

    if len(text) > LONGEST_NUMBER:
        from decimal import Decimal

        return Fraction(Decimal(text))
    return Fraction(text)


#: Significant digits a product of two decimal numbers keeps: those of the standard library's default decimal
#: context, whose arithmetic :func:`decimal_product` does.
PRODUCT_DIGITS = 28
#: Longest number text :func:`decimal_product` reads itself; a longer one is left to the decimal module.
LONGEST_NUMBER = 100


def _decimal_digits(text: str) -> tuple[bool, int, int]:
    """A decimal number's text ("-12.5e3", ".5", "1e-06") as (negative, digits, exponent of ten), exactly.

    >>> _decimal_digits("-12.5e3"), _decimal_digits(".05"), _decimal_digits("1e-06")
    ((True, 125, 2), (False, 5, -2), (False, 1, -6))
    """
    mantissa, _, exponent = text.lower().partition("e")
    negative = mantissa.startswith("-")
    whole, _, fraction = mantissa.lstrip("+-").partition(".")
    return negative, int(whole + fraction or "0"), int(exponent or "0") - len(fraction)


def decimal_product(number: str, factor: float) -> float:
    """``float(Decimal(number) * Decimal(repr(factor)))``, worked out in whole numbers.

    The product of the two decimal texts exactly, rounded as the decimal module's default context rounds
    it (:data:`PRODUCT_DIGITS` significant digits, half to even), then to the nearest float: the same
    float, bit for bit, without loading the decimal module for every quantity a site file writes as text
    (``tests/test_units.py`` checks it against the decimal module). A number of more than
    :data:`LONGEST_NUMBER` characters is left to the decimal module itself. Decimal arithmetic also puts its
    context among the thread's context variables, where numpy looks its error settings up at every ufunc
    call: each of the report's numpy calls then took a little longer (about 9 million instructions of the
    backyard report, on top of the module's loading).

    >>> decimal_product("12", 0.0254), decimal_product("20", 0.3048), decimal_product("-0", 0.01)
    (0.3048, 6.096, -0.0)
    """
    if len(number) > LONGEST_NUMBER:
        from decimal import Decimal

        return float(Decimal(number) * Decimal(repr(factor)))
    negative, digits, exponent = _decimal_digits(number)
    negative_factor, factor_digits, factor_exponent = _decimal_digits(repr(factor))
    digits, exponent = digits * factor_digits, exponent + factor_exponent
    extra = len(str(digits)) - PRODUCT_DIGITS
    if extra > 0:
        digits, rest = divmod(digits, 10 ** extra)
        half = 5 * 10 ** (extra - 1)
        if rest > half or (rest == half and digits % 2):
            digits += 1
        exponent += extra
    return float(f"{'-' if negative != negative_factor else ''}{digits}e{exponent}")


def _comma_words(value: str) -> str:
    """What to write instead of a number with a comma in it ("1,010 kHz", "2,5 m").

    >>> _comma_words("1,010 kHz")
    'a comma inside a number could mean thousands or decimals: write "1010 kHz" for thousands or "1.010 kHz" for decimals'
    >>> _comma_words("2,5 m")
    'write a point for decimals: "2.5 m"'
    """
    text = value.strip()
    number = re.match(r"[\d,]+", text).group(0)
    decimal = text.replace(",", ".", 1) if number.count(",") == 1 else None
    if re.fullmatch(r"\d{1,3}(?:,\d{3})+", number):
        plain = text.replace(",", "")
        if not decimal:
            return f'write the number without thousands separators: "{plain}"'
        return (f'a comma inside a number could mean thousands or decimals: write "{plain}" for thousands or '
                f'"{decimal}" for decimals')
    if decimal:
        return f'write a point for decimals: "{decimal}"'
    return "write the number without commas"


def _feet_and_inches(value: str) -> float | None:
    """ "6 ft 3 in", "6'3\"", "6'" or "3\"" in metres, exactly; None when the text is not of that form. [m]

    A text with neither mark (' or ") and not both an "f" and an "n" (a foot word and an inch word, in any
    case) is none of these forms, and is turned down before any pattern is compiled.
    """
    lower = value.lower()
    if "'" not in value and '"' not in value and ("f" not in lower or "n" not in lower):
        return None
    m = re.match(_FEET_INCHES, value, re.IGNORECASE)
    if m:
        feet, inches = _amount(m.groups()[:6]), _amount(m.groups()[6:12])
    elif m := re.match(_FEET_MARK, value):
        feet, inches = _amount(m.groups()[:6]), 0
    elif m := re.match(_INCH_MARK, value):
        feet, inches = 0, _amount(m.groups()[:6])
    else:
        return None
    from fractions import Fraction

    return float(feet * Fraction(3048, 10000) + inches * Fraction(254, 10000))


#: The length units of the US customary system (NIST SP 811): a length written in one of them is the user's
#: sign that figures about it should come back in feet.
US_LENGTH_UNITS = frozenset({"ft", "foot", "feet", "in", "inch", "inches", "yd", "yard", "yards", "'", '"'})


def written_in_feet(value) -> bool:
    """Whether a length is written in US customary units (feet, inches, yards; "6 ft 3 in", "6'3\"").

    >>> written_in_feet("19 ft 6 in"), written_in_feet("20 FT"), written_in_feet("6 m"), written_in_feet(6)
    (True, True, False, False)
    """
    if not isinstance(value, str):
        return False
    if _feet_and_inches(value) is not None:
        return True
    unit = re.search(r"([^\d\s./-]+)\s*$", value)
    return bool(unit) and unit.group(1).casefold() in US_LENGTH_UNITS


#: Longest length read anywhere (about the Earth's circumference); anything longer is a wrong number or unit. [m]
MAX_LENGTH_M = 4.0e7


def parse_length(value, units: dict[str, float] = LENGTH_UNITS) -> float:
    """A length in metres from a number [m] or a string with a unit. [m]

    ``units`` may be :data:`DISTANCE_UNITS` where miles make sense (a station's distance).
    Raises :class:`UnitError` beyond +/- ``MAX_LENGTH_M`` as well.

    >>> parse_length("12 in")
    0.3048
    >>> parse_length("6 ft 3 in")
    1.905
    >>> parse_length("5/8 in")
    0.015875
    """
    metres = parse_quantity(value, units, "a length", "m")
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
        m = re.fullmatch(r"(\d)/0", t) if "/" in t else None
        if m:
            return 1 - int(m.group(1))
        if re.fullmatch(r"\d{1,2}", t):
            return int(t)
    raise UnitError("expected a gauge number such as 14 or \"2/0\"")


def length_text(metres: float, digits: int = 3, system: str = "si") -> str:
    """A length as people read it: ``digits`` significant figures; under "si" mm below 0.1 m and km from
    1000 m, under "us" feet (inches below a foot).

    The one rule for a length in a command's output: the tables and the
    sentences of a result both use it, in metres or in feet alike.

    Examples
    --------
    >>> length_text(6.7226), length_text(12.0), length_text(31.267), length_text(0.05), length_text(1234.0)
    ('6.72 m', '12 m', '31.3 m', '50 mm', '1.23 km')
    >>> length_text(6.7226, system="us"), length_text(6.096, 4, "us"), length_text(0.0016, system="us")
    ('22.1 ft', '20 ft', '0.063 in')
    """
    v = float(metres)
    if not math.isfinite(v):
        return "—"
    if system == "us":
        unit, scale = ("in", INCH_M) if v != 0 and abs(v) < FOOT_M else ("ft", FOOT_M)
    else:
        unit, scale = ("mm", 1e-3) if v != 0 and abs(v) < 0.1 else ("km", 1e3) if abs(v) >= 1000 else ("m", 1.0)
    return f"{significant_text(v / scale, digits)} {unit}"


def distance_text(metres: float, system: str = "si") -> str:
    """A distance such as a station's as people read it: under "si" as :func:`length_text` writes it (km from
    1000 m), under "us" in miles to three significant figures; "—" when not finite.

    The one rule for a distance in a command's output: the stations' tables and a sentence's km alike.

    Examples
    --------
    >>> distance_text(95e3), distance_text(95e3, "us"), distance_text(2e6), distance_text(float("inf"), "us")
    ('95 km', '59 mi', '2000 km', '—')
    >>> distance_text(12e6, "us")  # 7456.5 mi to three significant figures (1 mi = 1609.344 m, NIST SP 811)
    '7460 mi'
    """
    v = float(metres)
    if system != "us":
        return length_text(v)
    return f"{significant_text(float(f'{v / MILE_M:.3g}'))} mi" if math.isfinite(v) else "—"


def significant_text(x: float, digits: int = 3) -> str:
    """``x`` to ``digits`` significant figures, never in exponent form, trailing zeros dropped.

    >>> significant_text(22.06), significant_text(1234.6), significant_text(0.800), significant_text(0.0)
    ('22.1', '1235', '0.8', '0')
    """
    if x == 0:
        return "0"
    decimals = max(0, digits - 1 - int(math.floor(math.log10(abs(x)))))
    text = f"{x:.{decimals}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text


#: The prefixes a value is written with, from the largest, with the value each stands for.
WRITTEN_PREFIXES = ((1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p"),
               (1e-15, "f"))


def si_text(value: float, unit: str, digits: int = 3, largest: float = 1e9, whole: bool = False) -> str:
    """A value with an SI prefix and ``digits`` significant figures: si_text(1.8e-10, "F") -> '180 pF'.

    The one rule for a prefixed value in a command's output (the report's tables and the sentences
    of a result). A value that would round up to the next step is written with that step's prefix
    (0.9997 nW -> '1 nW'); below femto it stays in femto.

    Parameters
    ----------
    value : float
        The value in the base unit (finite).
    unit : str
        The unit's symbol.
    digits : int
        Significant figures.
    largest : float
        The largest prefix used (1.0: no k, M or G). [1]
    whole : bool
        Write every figure before the decimal point when there are more than ``digits`` of them
        (only possible under the ``largest`` prefix): '1500 W' rather than '1.5e+03 W'.

    Examples
    --------
    >>> si_text(1.8e-10, "F"), si_text(2.734e-9, "W", 3), si_text(999.7e-12, "W", 3), si_text(0.0, "V")
    ('180 pF', '2.73 nW', '1 nW', '0 V')
    >>> si_text(1500.0, "W", 2, largest=1.0, whole=True), si_text(1500.0, "W", 2)
    ('1500 W', '1.5 kW')
    """
    v = float(value)
    if v == 0:
        return f"0 {unit}"
    for scale, prefix in WRITTEN_PREFIXES:
        if scale <= largest and abs(v) >= scale * 0.9995:
            break
    else:
        scale, prefix = 1e-15, "f"
    x = v / scale
    text = f"{x:.0f}" if whole and abs(x) >= 10 ** digits - 0.5 else f"{float(f'{x:.{digits}g}'):g}"
    return f"{text} {prefix}{unit}"
