"""SI prefixes are case-sensitive: every unit aerial documents, in every case spelling, reads as the SI
meaning of what was written or is refused; none changes value silently.

The independent statement of the SI meaning is the SI Brochure, 9th edition (BIPM 2019), table 7 (the
prefixes) and section 3 (prefix symbols are case-sensitive: m = milli, M = mega).
"""

from __future__ import annotations

import itertools

import pytest
from hypothesis import given
from hypothesis import strategies as st

from aerial.core import units

# SI Brochure, 9th edition, table 7 (the prefixes a site's quantities could carry); "u" is the usual
# typewriter stand-in for the micro sign (common practice)
SI_PREFIX = {"y": 1e-24, "z": 1e-21, "a": 1e-18, "f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6,
             "μ": 1e-6, "m": 1e-3, "c": 1e-2, "d": 1e-1, "h": 1e2, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12,
             "P": 1e15, "E": 1e18, "Z": 1e21, "Y": 1e24}

TABLES = {
    "length": (units.DISTANCE_UNITS, "m"),
    "frequency": (units.FREQUENCY_UNITS, "Hz"),
    "capacitance": (units.CAPACITANCE_UNITS, "F"),
    "inductance": (units.INDUCTANCE_UNITS, "H"),
    "power": (units.POWER_UNITS, "W"),
    "resistance": (units.RESISTANCE_UNITS, "ohm"),
    "field strength": (units.FIELD_STRENGTH_UNITS, "V/m"),
    "conductivity": (units.CONDUCTIVITY_UNITS, "S/m"),
}
BASE_SYMBOLS = {"length": ["m"], "frequency": ["Hz"], "capacitance": ["F"], "inductance": ["H"], "power": ["W"],
                "resistance": ["ohm", "Ω"], "field strength": ["V/m"], "conductivity": ["S/m"]}

DOCUMENTED = [(kind, u) for kind, (table, _) in TABLES.items() for u in table]


def case_variants(word: str) -> list[str]:
    letters = [sorted({ch.lower(), ch.upper()}) for ch in word]
    out = {"".join(p) for p in itertools.islice(itertools.product(*letters), 256)}
    return sorted(out)


def si_readings(kind: str, written: str) -> set[float]:
    """Every SI value the spelling can have: a documented unit of the same letters, or prefix + base symbol."""
    table, _ = TABLES[kind]
    if written in table:  # an exact SI spelling means exactly that unit
        return {table[written]}
    readings = {table[u] for u in table if u.casefold() == written.casefold()}
    for base in BASE_SYMBOLS[kind]:
        if written.casefold() == base.casefold():
            readings.add(1.0)
        if len(written) > len(base) and written[1:].casefold() == base.casefold() and written[0] in SI_PREFIX:
            readings.add(SI_PREFIX[written[0]])
    return readings


@given(st.sampled_from(DOCUMENTED), st.data())
def test_every_case_spelling_reads_its_si_meaning_or_is_refused(pair, data):
    kind, unit = pair
    table, base = TABLES[kind]
    written = data.draw(st.sampled_from(case_variants(unit)))
    try:
        value = units.parse_quantity(f"2 {written}", table, kind, base)
    except units.UnitError as err:
        assert "unknown unit" in err.expected or "ambiguous unit" in err.expected
        return
    readings = si_readings(kind, written)
    assert len(readings) == 1, (written, readings)  # accepted only when it cannot be read two ways
    assert value == pytest.approx(2 * readings.pop(), rel=1e-12)


@pytest.mark.parametrize("kind, text, si", [
    ("power", "5 mW", 5e-3), ("power", "5 MW", 5e6), ("power", "5 kw", 5e3), ("power", "5 KW", 5e3),
    ("frequency", "810 khz", 810e3), ("frequency", "1.2 MHz", 1.2e6), ("inductance", "240 UH", 240e-6),
    ("inductance", "240 µH", 240e-6), ("capacitance", "365 pF", 365e-12), ("capacitance", "10 NF", 10e-9), ("resistance", "2 kΩ", 2e3),
    ("resistance", "30 OHM", 30.0), ("resistance", "1 Mohm", 1e6), ("length", "9 mm", 9e-3),
])
def test_exact_and_unambiguous_spellings(kind, text, si):
    table, base = TABLES[kind]
    assert units.parse_quantity(text, table, kind, base) == pytest.approx(si, rel=1e-12)


@pytest.mark.parametrize("kind, text, readings", [
    ("power", "5 mw", ("0.005 W", "5e+06 W")),
    ("length", "9 Mm", ("0.009 m", "9e+06 m")),
    ("resistance", "1 mohm", ("0.001 ohm", "1e+06 ohm")),
    ("frequency", "1 MHZ", ("0.001 Hz", "1e+06 Hz")),
    ("inductance", "1 MH", ("0.001 H", "1e+06 H")),
    ("capacitance", "100 PF", ("1e-10 F", "1e+17 F")), ("capacitance", "100 pf", ("1e-10 F", "1e+17 F")),
])
def test_ambiguous_spellings_are_refused_with_both_readings(kind, text, readings):
    table, base = TABLES[kind]
    with pytest.raises(units.UnitError) as info:
        units.parse_quantity(text, table, kind, base)
    assert "ambiguous unit" in info.value.expected
    for reading in readings:
        assert reading in info.value.expected


@pytest.mark.parametrize("text, metres", [
    # NIST SP 811 (2008), appendix B.8: 1 in = 0.0254 m, 1 ft = 0.3048 m, 1 mi = 1609.344 m exactly
    ("5/8 in", 0.015875), ("1 1/2 in", 0.0381), ("1-1/2 in", 0.0381), ("6 ft 3 in", 1.905),
    ("6'3\"", 1.905), ("6' 3 1/2\"", 1.9177), ("6'", 1.8288), ("3\"", 0.0762), ("6 feet 3 inches", 1.905),
])
def test_fractions_and_feet_with_inches(text, metres):
    assert units.parse_length(text) == pytest.approx(metres, abs=1e-12)


def test_miles_only_where_distances_are_read():
    # NIST SP 811 (2008), appendix B.8: the international mile is 1609.344 m exactly
    assert units.parse_length("25 mi", units.DISTANCE_UNITS) == pytest.approx(40_233.6, abs=1e-9)
    with pytest.raises(units.UnitError, match='unknown unit "mi"'):
        units.parse_length("25 mi")
    with pytest.raises(units.UnitError, match="zero denominator"):
        units.parse_length("1/0 in")


def test_huge_integers_are_refused_not_overflowed():
    with pytest.raises(units.UnitError, match="too large"):
        units.parse_length(10**400)
