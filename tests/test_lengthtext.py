"""Free text that keeps its lengths (aerial.core.lengthtext): the tables' length format, feet from exact values.

The foot (0.3048 m), inch (0.0254 m) and mile (1609.344 m) are exact by definition (NIST SP 811, appendix B).
Lengths here are invented; the conversions are checked against those definitions.
"""

from __future__ import annotations

import copy
import json
import pickle

import pytest

from aerial.core.lengthtext import LengthText, join_text, metres, metres_range, text_in, words
from aerial.core.units import length_text
from aerial.estimate.plain import finalise, json_text

FOOT_M = 0.3048  # NIST SP 811, B.8: 1 ft = 0.3048 m exactly


@pytest.mark.parametrize("value, unit, written", [
    (309.0, "m", "309 m"),  # never "309.0 m": the tables' three significant figures, trailing zeros dropped
    (29.93, "m", "29.9 m"),
    (2.4384, "m", "2.44 m"),
    (0.015875, "mm", "15.9 mm"),
    (0.0016276, "mm", "1.63 mm"),
    (0.6, "mm", "0.6 m"),  # the unit is picked by the size, as in the tables
    (45260.0, "km", "45.3 km"),
    (1234.0, "m", "1.23 km"),
])
def test_the_metric_text_is_the_tables_length_format(value, unit, written):
    # consistency check: the sentence writes a length exactly as core.units.length_text does
    assert metres(value, unit) == written == length_text(value)
    assert str(metres(value, unit)) == written


def test_a_sentence_is_written_the_same_whichever_way_it_is_built():
    total, low, high = 29.93, 1.234, 3.456
    expected = "total wire length 29.9 m (1.23-3.46 m) is long"
    built = "total wire length " + metres(total) + " (" + metres_range(low, high) + ") is long"
    templ = words("total wire length {t} ({r}) is long", t=metres(total), r=metres_range(low, high))
    assert built == expected and templ == expected
    assert isinstance(built, LengthText) and isinstance(templ, LengthText)
    joined = join_text(", ", [metres(1.0), metres(2.5)])
    assert joined == "1 m, 2.5 m" and isinstance(joined, LengthText)


def test_a_distance_range_in_km_and_miles_has_one_precision():
    # ITU-R P.1147 path range 50-12 000 km; 1 mi = 1.609344 km exactly: 31.07 mi and 7456.5 mi
    paths = metres_range(50e3, 12_000e3, "km", "–")
    assert paths == "50–12000 km"
    assert text_in(paths, "us") == "31.1–7460 mi"


def test_us_text_is_written_from_the_exact_length_not_the_rounded_digits():
    # 29.93 m = 98.196 ft (exact foot); the rounded "29.9 m" would give 98.097 -> 98.1 ft
    sentence = "total wire length " + metres(29.93) + " is long"
    assert text_in(sentence, "us") == "total wire length 98.2 ft is long"
    assert text_in(str(sentence), "us") == "total wire length 98.1 ft is long"  # a plain string: the digits
    assert text_in(sentence, "si") == "total wire length 29.9 m is long"


def test_us_units_for_inches_miles_and_ranges():
    assert text_in(metres(0.0016276), "us") == "0.0641 in"  # 1.6276 mm / 25.4 mm
    assert text_in(metres(95e3, "km"), "us") == "59 mi"  # 95 km / 1.609344 km = 59.03 mi
    assert text_in(metres_range(3.048, 4.572), "us") == "10–15 ft"  # 10 ft and 15 ft exactly
    assert text_in(metres_range(0.254, 0.6096), "us") == "10 in–2 ft"  # the ends in different units


def test_lengths_survive_finalise_pickle_and_copy_and_json_stays_plain():
    text = "raise the wire " + metres(3.048)
    result = finalise({"rows": [{"change": text}], "warnings": [text + " now"]})
    for kept in (result["rows"][0]["change"], pickle.loads(pickle.dumps(text)), copy.deepcopy(text)):
        assert isinstance(kept, LengthText) and text_in(kept, "us") == "raise the wire 10 ft"
    assert text_in(result["warnings"][0], "us") == "raise the wire 10 ft now"
    assert json_text(result) == json.dumps({"rows": [{"change": "raise the wire 3.05 m"}],
                                            "warnings": ["raise the wire 3.05 m now"]}, indent=2)


def test_words_formats_other_fields_as_str_format_does():
    assert words("{n:,.0f} turns, {x!r} and {y}", n=12345.6, x="a", y=2) == "12,346 turns, 'a' and 2"


def test_bad_unit_and_system_are_refused_with_the_choices():
    with pytest.raises(ValueError, match="'ft' is not a metric length unit, must be one of m, mm, cm, km"):
        metres(1.0, "ft")
    with pytest.raises(ValueError, match="'imperial' is not a valid unit system, must be one of 'si', 'us'"):
        text_in(metres(1.0), "imperial")
