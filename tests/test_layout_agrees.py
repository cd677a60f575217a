"""`aerial layout` and `aerial report` say the same of the same wire: its wavelength flag and its lengths.

The sites here are invented test inputs. The checks are consistency checks
between the two commands (both are the project's own figures), plus the
1/8-wave limit f = c / (8 l) with the speed of light from scipy.constants.
"""

from __future__ import annotations

import json
import re

import pytest
from scipy.constants import c as SPEED_OF_LIGHT  # CODATA, exact by definition of the metre

from .conftest import ROOT, run

SITE = """
[site]
name = "wavelength test"
region = "US"
bands = ["mf"]

[wire]
gauge = "14 AWG"

[supports.house]
at = [0, 0]
height = "6 m"
kind = "eave"

[supports.pole]
at = [{span}, 0]
height = "6 m"
kind = "mast"

[[spans]]
from = "house"
to = "pole"

[lead_in]
from = "house"

[receiver]
at = [0, 0]
height = "1 m"

[[earth.rods]]
length = "2.4 m"
at = [0.5, 0]

[[stations]]
name = "Valley 640"
frequency = "640 kHz"
power = "50 kW"
distance = "60 km"

[plan]
building = "house"

[plan.entry]
at = [0, 0]
height = "1 m"
"""


def _words(text: str) -> str:
    """The output with its wrapping undone."""
    return " ".join(text.replace("│", " ").split())


def test_a_wire_long_for_the_top_of_the_band_is_flagged_by_both_commands_from_the_same_frequency(capsys, write_site):
    # 24 m span + 5 m lead-in = 29 m: past 1/8 wave from c / (8 × 29 m) = 1.29 MHz, inside the MF band
    # (to 1.71 MHz) but above the only station (640 kHz) the layouts are ranked at
    p = write_site(SITE.format(span=24))
    limit_mhz = SPEED_OF_LIGHT / (8 * 29.0) / 1e6  # scipy.constants.c
    assert f"{limit_mhz:.3g}" == "1.29"
    code, out, err = run(capsys, "report", p)
    assert code == 0, err
    assert "29 m is above 1/8 wavelength from 1.29 MHz up" in _words(out)
    code, out, err = run(capsys, "layout", p)
    assert code == 0, err
    text = _words(out)
    # the layout that is the present wire, and the present wire's own line (consistency checks)
    assert re.search(r'1\. h_e [^;]+; [^;]+ top; long for the wavelength from 1\.29 MHz up: figures rough there', text)
    assert re.search(r"your present wire, as 'aerial report' figures it at [^:]+: h_e [^;]+; long for the "
                     r"wavelength from 1\.29 MHz up", text)
    assert "long for the wavelength in the site's bands" in text
    code, out, err = run(capsys, "layout", p, "--json")
    lay = json.loads(out)["layouts"][0]
    assert lay["outside_model_range"] and lay["rough_from_hz"] == pytest.approx(SPEED_OF_LIGHT / (8 * 29.0), rel=1e-6)


def test_a_short_wire_is_flagged_by_neither_command(capsys, write_site):
    p = write_site(SITE.format(span=10))  # 15 m: 1/8 wave only from 2.5 MHz, above the MF band
    code, out, err = run(capsys, "report", p)
    assert code == 0 and "1/8 wavelength" not in _words(out)
    code, out, err = run(capsys, "layout", p)
    assert code == 0 and "long for the wavelength" not in _words(out)


def test_si_sentences_write_the_wire_and_frequency_as_the_header_and_tables(capsys, write_site):
    # 304 m span + 5 m lead-in = 309 m (invented input). The header says "309 m"; the warning must say the
    # same, not "309.0 m", and its 1/8-wave frequency c / (8 × 309 m) = 121.3 kHz as the tables write a
    # frequency, "121 kHz", not "0.121 MHz" (speed of light from scipy.constants).
    p = write_site(SITE.format(span=304))
    assert f"{SPEED_OF_LIGHT / (8 * 309.0) / 1e3:.3g}" == "121"
    code, out, err = run(capsys, "report", p, "--width", "200")
    assert code == 0, err
    text = _words(out)
    assert "aerial + lead-in 309 m" in text
    assert "total wire length 309 m is above 1/8 wavelength from 121 kHz up" in text
    assert "309.0 m" not in text and "0.121 MHz" not in text
    code, out, err = run(capsys, "report", p, "--json", "--quiet")
    assert code == 0, err
    assert any(w.startswith("total wire length 309 m is above") for w in json.loads(out)["warnings"])
    code, out, err = run(capsys, "report", p, "--units", "us", "--width", "200")
    assert code == 0, err
    # 309 m / 0.3048 m = 1013.8 ft (NIST SP 811: 1 ft = 0.3048 m exactly), in the header and the warning alike
    assert "aerial + lead-in 1014 ft" in _words(out) and "total wire length 1014 ft is above" in _words(out)


def test_us_units_write_a_length_alike_in_the_table_and_the_sentences(capsys):
    """The present wire's effective height, 6.7226 m = 22.06 ft, reads 22.1 ft in every line (not 22 ft)."""
    code, out, err = run(capsys, "layout", ROOT / "site_examples" / "backyard_inverted_l.toml", "--units", "us")
    assert code == 0, err
    text = _words(out)
    assert "your present wire, as 'aerial report' figures it at 940 kHz: h_e 22.1 ft," in text
    rows = [line for line in out.splitlines() if line.startswith("│ 3 ")]
    assert rows and "117 ft" in rows[0] and "22.1 ft" in rows[0]
    assert re.search(r"3\. h_e 22\.1 ft \(junction 20 ft high\); 99\.8 ft top; 39\.4 ft outside", text)
    code, out, err = run(capsys, "check", ROOT / "site_examples" / "backyard_inverted_l.toml", "--units", "us")
    assert "aerial + lead-in 117 ft" in _words(out)  # 35.56 m of wire, as the layout's #3 (consistency check)


@pytest.mark.parametrize("example", ["high_floor_flat", "balcony_water_pipe"])
def test_an_entry_away_from_the_receiver_measures_the_wire_as_the_report(capsys, example):
    """The plan's entry is a door frame, the receiver further in: the lead-in runs on to the receiver in both
    commands, so the present wire as a layout has the report's length and figures (consistency checks)."""
    site = ROOT / "site_examples" / f"{example}.toml"
    code, out, err = run(capsys, "report", site, "--json", "--quiet")
    assert code == 0, err
    report = json.loads(out)
    code, out, err = run(capsys, "layout", site, "--json", "--quiet", "--best", "10")
    assert code == 0, err
    result = json.loads(out)
    rail = {w["name"] for w in report["geometry"]["wires"] if w["role"] == "aerial"}
    present = result["present_wire"]
    same = [lay for lay in result["layouts"] if lay["family"] == "span"
            and lay["score"] == pytest.approx(present["score"], abs=1e-9)]
    assert same, (rail, [lay["description"] for lay in result["layouts"]])
    assert same[0]["wire_length_m"] == pytest.approx(report["geometry"]["total_length_m"], rel=1e-12)
    for key in ("effective_height_m", "capacitance_f", "available_power_w"):
        assert same[0][key] == pytest.approx(present[key], rel=1e-9), key
    code, out, err = run(capsys, "layout", site, "--quiet", "--best", "10", "--width", "200")
    wire = next(line for line in out.splitlines() if same[0]["description"][:30] in line).split("│")[3].strip()
    code, out, err = run(capsys, "check", site, "--width", "200")
    assert f"aerial + lead-in {wire}" in out  # the layout's wire column reads as the check's summary


SLAB_SITE = """
[site]
name = "flat with two poles on the balcony"
bands = ["mf"]
soil = "intermediate"

[wire]
diameter = "1.0 mm"

[[runs]]
points = [[0.5, 1.5, 12.5], [8.0, 1.5, 12.5]]

[lead_in]
from = [0.5, 1.5, 12.5]

[receiver]
at = [0.5, 1.0]
height = "10 m"
coil = "220 uH"
capacitor = ["12 pF", "400 pF"]

[earth.water_pipe]
continuous_metal = true
at = [0.5, 1.0]

[[stations]]
name = "Town Speech"
frequency = "700 kHz"
power = "10 kW"
distance = "20 km"

[plan]
building = "apartment"

[plan.entry]
at = [0.5, 1.0]
height = "10 m"

[plan.balcony]
floor_height = "9 m"
structure = "reinforced concrete"

[[plan.supports]]
name = "pole west"
at = [0.5, 1.5]
height = "12.5 m"
kind = "pole"

[[plan.supports]]
name = "pole east"
at = [8.0, 1.5]
height = "12.5 m"
kind = "pole"
"""


def test_the_full_wave_check_of_a_balcony_layout_solves_the_wire_the_listing_describes(capsys, write_site):
    """Heights reckoned from a conductive balcony slab (no building outline to screen with): the full-wave check
    solves the winner with the same heights as its listed closed-form figures, not from the street (consistency
    check: a 7.5 m wire 3.5 m above the slab is electrically short, so the two models agree closely)."""
    p = write_site(SLAB_SITE)
    code, out, err = run(capsys, "layout", p, "--full-wave", "--json", "--quiet")
    assert code == 0, err
    result = json.loads(out)
    assert "heights from the balcony slab" in result["layouts"][0]["figures_model"]
    fw = result["full_wave"]
    assert fw["available"]
    for full, closed in zip(fw["effective_height_m"], fw["closed_form_effective_height_m"]):
        assert full == pytest.approx(closed, rel=0.05)  # the street-height wire gave 11.8 m against 3.15 m
    code, out, err = run(capsys, "layout", p, "--full-wave", "--width", "200", "--quiet")
    assert code == 0, err
    assert re.search(r"effective height 3\.1\d m \(closed form 3\.1\d m\)", _words(out))


def test_the_present_wire_is_reckoned_from_the_balcony_slab_as_the_layouts_are(capsys, write_site):
    """The site's own wire is layout #1 (the same span and lead-in): with the layouts' heights reckoned from the
    balcony slab, the present wire's figures are that layout's, and the line says how they were reckoned
    (consistency checks; from the street the present wire read 11.7 m against the layout's 3.15 m)."""
    p = write_site(SLAB_SITE)
    code, out, err = run(capsys, "layout", p, "--json", "--quiet")
    assert code == 0, err
    result = json.loads(out)
    present, first = result["present_wire"], result["layouts"][0]
    assert present["heights_from_slab_m"] == pytest.approx(9.0)
    for key in ("effective_height_m", "capacitance_f", "available_power_w", "score"):
        assert present[key] == pytest.approx(first[key], rel=1e-9), key
    code, out, err = run(capsys, "layout", p, "--width", "200", "--quiet")
    assert code == 0, err
    assert "your present wire, with its heights from the balcony slab, as the layouts at 940 kHz: h_e 3.15 m" in out
