"""Units and wire gauges against published definitions."""

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from aerial.core import units


def test_foot_is_exactly_0_3048_m():
    # NIST SP 811 (2008), appendix B.8: 1 ft = 0.3048 m exactly
    assert units.parse_length("1 ft") == 0.3048
    assert units.parse_length("30 ft") == pytest.approx(9.144, abs=0)


def test_inch_is_exactly_25_4_mm():
    # NIST SP 811 (2008), appendix B.8: 1 in = 0.0254 m exactly
    assert units.parse_length("12 in") == 0.3048
    assert units.parse_length("1 inch") == 0.0254


def test_plain_number_is_metres_and_units_are_explicit():
    assert units.parse_length(9.5) == 9.5
    assert units.parse_length("9.5 m") == 9.5
    assert units.parse_length("950 cm") == 9.5
    with pytest.raises(units.UnitError, match="needs its unit"):
        units.parse_length("9.5")  # a number written as text: never guessed
    with pytest.raises(units.UnitError, match='unknown unit "furlong"'):
        units.parse_length("3 furlong")


@pytest.mark.parametrize("gauge, mm", [
    # ASTM B258, table of nominal diameters (to 3 decimals)
    (10, 2.588), (12, 2.053), (14, 1.628), (16, 1.291), (18, 1.024), (20, 0.812), (22, 0.644), (24, 0.511),
])
def test_awg_diameters_astm_b258(gauge, mm):
    assert units.awg_diameter(gauge) * 1e3 == pytest.approx(mm, abs=0.0006)


def test_awg_defining_points():
    # ASTM B258: 36 AWG = 0.005 in, 0000 AWG = 0.46 in, by definition of the series
    assert units.awg_diameter(36) == pytest.approx(0.005 * 0.0254, rel=1e-12)
    assert units.awg_diameter(-3) == pytest.approx(0.46 * 0.0254, rel=1e-12)


@pytest.mark.parametrize("gauge, inches", [
    # British Standard Wire Gauge (1883) table, from memory: 14 SWG = 0.080 in, 16 = 0.064 in, 22 = 0.028 in
    (14, 0.080), (16, 0.064), (22, 0.028), (0, 0.324),
])
def test_swg_table(gauge, inches):
    assert units.swg_diameter(gauge) == pytest.approx(inches * 0.0254, rel=1e-12)


@given(st.floats(min_value=1e-3, max_value=1e4, allow_nan=False))
def test_feet_round_trip(metres):
    # property: a length written in feet reads back as the same metres
    text = f"{metres / 0.3048!r} ft"
    assert units.parse_length(text) == pytest.approx(metres, rel=1e-12)


def test_not_finite_is_refused():
    for bad in (math.nan, math.inf, "inf m", "nan m", True):
        with pytest.raises(units.UnitError):
            units.parse_length(bad)


@pytest.mark.parametrize("written, wanted", [
    ("12 fet 6 in", 'unknown unit "fet" in "fet 6 in" (did you mean "feet"?)'),
    ("30 fet", 'unknown unit "fet" (did you mean "feet"?)'),
])
def test_a_misspelt_length_unit_is_named_with_a_suggestion_even_before_an_inch_part(written, wanted):
    """Feet and inches written with a typo in the feet: the message names the misspelt word and suggests the unit."""
    with pytest.raises(units.UnitError) as err:
        units.parse_quantity(written, units.LENGTH_UNITS, "a length", "m")
    assert wanted in str(err.value)


# reference: the standard library's decimal module (default context: 28 significant digits, half to even),
# whose product units.decimal_product gives without loading it
_DIGITS = st.text("0123456789", min_size=1, max_size=40)


@st.composite
def _number_texts(draw):
    """Numbers as _QUANTITY reads them: sign, digits, a point, an exponent ("-12.", ".5", "3e-7", "1.25E+3")."""
    sign = draw(st.sampled_from(["", "-", "+"]))
    whole = draw(st.one_of(st.just(""), _DIGITS))
    point = draw(st.sampled_from([".", ""])) if whole else "."
    fraction = draw(st.one_of(st.just(""), _DIGITS)) if point else ""
    if not whole and not fraction:
        fraction = "5"
    exponent = draw(st.one_of(st.just(""), st.builds(lambda e, n: f"{e}{n}", st.sampled_from(["e", "E", "e-", "e+"]),
                                                           st.integers(0, 400))))
    return sign + whole + point + fraction + exponent


FACTORS = sorted({f for table in (units.LENGTH_UNITS, units.DISTANCE_UNITS, units.FREQUENCY_UNITS, units.CAPACITANCE_UNITS,
                                  units.INDUCTANCE_UNITS, units.POWER_UNITS, units.RESISTANCE_UNITS,
                                  units.FIELD_STRENGTH_UNITS, units.CONDUCTIVITY_UNITS, units.AREA_UNITS)
                  for f in table.values()})


@given(_number_texts(), st.one_of(st.sampled_from(FACTORS), st.floats(allow_nan=False, allow_infinity=False)))
def test_consistency_decimal_product_is_the_decimal_modules(number, factor):
    from decimal import Decimal

    ours = units.decimal_product(number, factor)
    theirs = float(Decimal(number) * Decimal(repr(factor)))
    assert math.copysign(1.0, ours) == math.copysign(1.0, theirs) and (ours == theirs or (
        math.isnan(ours) and math.isnan(theirs))), (number, factor, ours, theirs)


@pytest.mark.parametrize("number, factor", [
    ("1234567890123456789012345", 0.3048),  # 29 and more digits: rounded half to even at the 28th
    ("1000000000000000000000000000005", 1.0), ("1000000000000000000000000000015", 1.0),
    ("9999999999999999999999999999.5", 1.0), ("-0", 0.0254), ("0e999", 1e-12), ("1e-400", 1e-12),
    ("1" * 120, 0.0254),  # longer than LONGEST_NUMBER: the decimal module's own product
])
def test_consistency_decimal_product_edges(number, factor):
    from decimal import Decimal

    ours, theirs = units.decimal_product(number, factor), float(Decimal(number) * Decimal(repr(factor)))
    assert (ours, math.copysign(1.0, ours)) == (theirs, math.copysign(1.0, theirs))


@given(st.one_of(_number_texts().filter(lambda t: "e" not in t.lower() and not t.startswith(("-", "+"))),
                 st.floats(allow_nan=False, allow_infinity=False).map(repr)))
def test_consistency_exact_fraction_is_the_decimal_modules(text):
    # reference: Fraction(Decimal(text)), the standard library's exact reading of a decimal text
    from decimal import Decimal
    from fractions import Fraction

    assert units.exact_fraction(text) == Fraction(Decimal(text))


def test_a_fraction_or_feet_and_inches_reads_without_decimal_arithmetic():
    # consistency check: "5/8 in" and "6 ft 3.5 in" leave the thread's context variables as they were (decimal
    # arithmetic would put its context there, which slows every numpy call after it)
    import contextvars

    def read():
        return units.parse_length("5/8 in"), units.parse_length("6 ft 3.5 in"), units.parse_length("12 in")

    context = contextvars.Context()  # a fresh one, with no variable set
    assert context.run(read) == (0.015875, 1.9177, 0.3048)
    assert len(context) == 0
