"""The tuning table says in words where its figures would mislead a builder.

Run through the command line on the invented examples in site_examples/. All checks here are
consistency checks of the project's own figures (no outside reference values).
"""

import json
import re

import numpy as np
import pytest

from aerial.cli import main

from .conftest import EXAMPLES, run

SUBURBAN = next(p for p in EXAMPLES if p.name == "suburban_lot_service_line.toml")
RURAL = next(p for p in EXAMPLES if p.name == "rural_long_wire.toml")


def _json(capsys, path):
    code = main(["report", str(path), "--json"])
    out, _ = capsys.readouterr()
    assert code == 0
    return json.loads(out)


def _text(capsys, path, monkeypatch):
    monkeypatch.delenv("COLUMNS", raising=False)
    code = main(["report", str(path), "--width", "400"])  # every table at its full width
    out, _ = capsys.readouterr()
    assert code == 0
    return out


def test_tunable_false_exactly_when_setting_negative_or_out_of_range(capsys):
    # consistency check: the flag agrees with the row's own capacitor setting and range
    tuning = _json(capsys, SUBURBAN)["tuning"]
    rows = tuning["rows"]
    assert any(not r["resonates_with_positive_capacitor"] for r in rows)
    for r in rows:
        positive = r["capacitor_setting_f"] > 0
        assert r["resonates_with_positive_capacitor"] == positive
        assert r["tunable"] == (positive and r["within_capacitor_range"])
        assert ("reason" in r) == (not r["tunable"])
        if not positive:
            assert r["reason"].startswith("cannot tune here")
            assert r["useful_resonance"] is False


def test_aerial_share_within_0_and_100_percent_when_a_positive_setting_exists(capsys):
    # consistency check (direct coupling): the aerial's capacitance is part of the total, so
    # its share lies in 0..1 wherever a positive capacitor makes up the rest
    rows = _json(capsys, SUBURBAN)["tuning"]["rows"]
    shares = [r["aerial_share_ratio"] for r in rows if r["resonates_with_positive_capacitor"]]
    assert shares and all(0.0 <= s <= 1.0 for s in shares)


def test_terminal_says_cannot_tune_instead_of_negative_settings(capsys, monkeypatch):
    out = _text(capsys, SUBURBAN, monkeypatch)
    table = " ".join(out[out.index("Tuning:"):out.index("Band coverage")].split())
    assert "— (cannot tune)" in table
    assert "use a smaller coil, a series capacitor or a tap" in table
    # the reason is quoted at the top of the stretch, where the excess is plain (at its first
    # frequency the two capacitances are nearly equal: that is where tuning ends); consistency
    # check against the JSON rows
    rows = _json(capsys, SUBURBAN)["tuning"]["rows"]
    stuck = [r for r in rows if not r["resonates_with_positive_capacitor"]]
    first, last = stuck[0], stuck[-1]
    m = re.search(r"From ([\d.]+) (kHz|MHz) up: cannot tune here; at ([\d.]+) (kHz|MHz) the aerial alone gives "
                  r"([\d.]+) pF, more than the ([\d.]+) pF needed", table)
    assert m, table
    scale = {"kHz": 1e3, "MHz": 1e6}
    assert float(m.group(1)) * scale[m.group(2)] == pytest.approx(first["frequency_hz"], rel=5e-3)
    assert float(m.group(3)) * scale[m.group(4)] == pytest.approx(last["frequency_hz"], rel=5e-3)
    assert float(m.group(5)) > float(m.group(6))
    assert " -" not in table.replace(" — ", " ")  # no negative figure in the table
    for token in table.split():
        if token.startswith("(") and token[1:].isdigit():
            assert int(token[1:]) <= 100  # no share above 100 %


def test_page_says_cannot_tune_too(tmp_path, capsys):
    page = tmp_path / "sub.html"
    assert main(["report", str(SUBURBAN), "--page", str(page)]) == 0
    capsys.readouterr()
    html = page.read_text(encoding="utf-8")
    assert "— (cannot tune)" in html and "up: cannot tune here; at " in html and "the aerial alone gives" in html


def test_loaded_q_below_one_and_lower_bound_bandwidth_in_words(capsys, monkeypatch):
    rows = _json(capsys, RURAL)["tuning"]["rows"]
    low_q = [r for r in rows if r["loaded_q"] < 1.0]
    assert low_q and all(r["useful_resonance"] is False and "no useful resonance" in r["loaded_q_note"]
                         for r in low_q)
    assert all(r["bandwidth_is_lower_bound"] == ("bandwidth_note" in r) for r in rows)
    out = _text(capsys, RURAL, monkeypatch)
    table = " ".join(out[out.index("Tuning:"):out.index("Band coverage")].split())
    assert "< 1 (no useful resonance)" in table
    assert "≥ " in table
    assert "(reflects inductance)" in table


BALCONY = next(p for p in EXAMPLES if p.name == "balcony_water_pipe.toml")


def test_station_out_of_tuning_range_shows_power_only_if_tuned(capsys, monkeypatch):
    stations = _json(capsys, BALCONY)["stations"]
    out_of_range = [s for s in stations if s["verdict"] == "out of the tuning range"]
    assert out_of_range
    for s in stations:
        # consistency check: the labelled figure is the old one, kept for compatibility
        assert s["detector_power_if_tuned_w"] == s["detector_power_w"]
        assert ("detector_power_note" in s) == (not s["tunable"])
    out = _text(capsys, BALCONY, monkeypatch)
    assert "if tuned)" in out
    assert "— (" in out


def test_remedy_verdict_follows_its_numbers(capsys, monkeypatch):
    remedies = _json(capsys, RURAL)["tuning"]["station_design"]["remedies"]
    assert remedies
    for r in remedies:
        # consistency check: a remedy that costs the wanted station power is never plainly "better"
        loss = -r["wanted_power_change_db"]
        if loss > 3.0:
            assert r["verdict_text"] != "meets the margin" and not r["verdict_text"].startswith("better")
            assert f"loses {loss:.1f} dB" in r["verdict_text"]
        if r["separation_db"] <= r["separation_before_db"]:
            assert r["verdict_text"].startswith("does not help")
    out = " ".join(_text(capsys, RURAL, monkeypatch).split())
    assert "at the detector (was " in out and "the wanted station loses" in out


def test_spill_over_reads_the_right_way_round(capsys, monkeypatch):
    monkeypatch.delenv("COLUMNS", raising=False)  # piped: every table at its full width
    assert main(["report"]) == 0
    out = " ".join(capsys.readouterr()[0].split())
    assert "heard under" not in out
    assert "also comes through when tuned to:" in out


def test_consistency_power_words_and_table_cells_share_one_prefix_rule():
    # consistency check: the verdicts' power words (reception.watts_words) and the report's cells
    # (outputs.terminal.eng) write a power below 1 W alike, both by aerial.core.units.si_text
    from aerial.estimate.reception import watts_words
    from aerial.outputs.terminal import eng

    for p in np.geomspace(1e-17, 0.99, 997):
        assert watts_words(p, 3) == eng(p, "W", 3)
    # prefix steps: 1 nW = 1e-9 W (SI, the BIPM SI Brochure); a value rounding up to a step takes its prefix
    assert (watts_words(999.7e-12, 3), watts_words(1e-9), watts_words(2.4e-21)) == ("1 nW", "1 nW", "less than 0.01 fW")


#: An invented backyard wire with no coil or capacitor given, its 235 pF swamping the assumed 15–365 pF
#: capacitor: no coil covers the band, so the design note names the coil it chose.
SWAMPED = """
[site]
name = "long wire, no parts given"
bands = ["mf"]

[supports.eave]
at = [0, 0]
height = "3.8 m"
kind = "eave"

[supports.oak]
at = [30, 0]
height = "10.7 m"
kind = "tree"

[[spans]]
from = "eave"
to = "oak"

[lead_in]
from = "eave"

[receiver]
at = [0.3, -0.6]
height = "0.9 m"

[[earth.rods]]
length = "2.4 m"
"""


def test_the_designed_coil_reads_alike_in_the_tuning_heading_and_its_note(capsys, monkeypatch, write_site):
    """consistency check: the coil the design chose is one figure (three significant), not 19.5 µH in the
    heading and 19 µH in the note (the site names its coupling, so the coil is designed for it)"""
    out = _text(capsys, write_site(SWAMPED.replace('[receiver]\n', '[receiver]\ncoupling = "direct"\n')), monkeypatch)
    heading = re.search(r"Tuning: direct coupling, MF broadcast, coil (\S+ µH)", out)
    note = re.search(r"no single coil covers the band with this capacitor and coupling; chose (\S+ µH)", out)
    assert heading and note, out
    assert heading.group(1) == note.group(1)
    assert re.fullmatch(r"\d+\.\d µH", heading.group(1))  # a coil of tens of µH keeps its decimal


def test_parts_the_site_never_gave_are_called_assumed_not_yours(capsys, monkeypatch, write_site):
    """No coil or capacitor in the site file: the tuning for the stations speaks of the designed coil and the
    assumed capacitor, never of "your coil and capacitor" (input handling)."""
    site = SWAMPED + '\n[[stations]]\nname = "Town speech"\nfrequency = "1.45 MHz"\npower = "1 kW"\ndistance = "24 km"\n'
    p = write_site(site)
    out = _text(capsys, p, monkeypatch)
    text = " ".join(out.replace("│", " ").split())
    assert "No coil or capacitor given" in text
    assert "your coil and capacitor" not in text and "your parts" not in text and " yours " not in text
    assert "with the designed coil and the assumed capacitor:" in text or "keep the assumed parts" in text
    assert json.loads(_json_text(capsys, p))["tuning"]["station_design"]["capacitor_assumed"] is True
    with_parts = site.replace('[receiver]\n', '[receiver]\ncoil = "240 uH"\ncapacitor = ["15 pF", "365 pF"]\n')
    out = _text(capsys, write_site(with_parts, "own.toml"), monkeypatch)
    assert "No coil or capacitor given" not in out and "yours" in out  # the user's own parts stay "yours"


def _json_text(capsys, path):
    code = main(["report", str(path), "--json"])
    out, _ = capsys.readouterr()
    assert code == 0
    return out


def test_consistency_untunable_stretches_each_named():
    # consistency check: a long wire that cannot be tuned at the bottom of the band, tunes again
    # between its resonances and cannot at the top; the sentence names both stretches and never
    # says "from the bottom up" over rows the table shows tuned (rows invented, 10 kHz apart)
    from aerial.outputs.terminal import untunable_words

    freqs = np.arange(520e3, 1711e3, 10e3)
    stuck = (freqs <= 780e3) | (freqs >= 1600e3)
    rows = [{"frequency_hz": float(f), "resonates_with_positive_capacitor": not s,
             "reason": "cannot tune here: the aerial alone gives 65.1 pF, more than the 26.1 pF needed"}
            for f, s in zip(freqs, stuck)]
    said = untunable_words(rows)
    assert said.startswith("From 520 kHz to 780 kHz and from 1.6 MHz up: cannot tune here; at 1.71 MHz ")
    # one stretch ending below the top of the band is closed, not "up"
    low_only = [dict(r, resonates_with_positive_capacitor=r["frequency_hz"] > 780e3) for r in rows]
    assert untunable_words(low_only).startswith("From 520 kHz to 780 kHz: cannot tune here; at 780 kHz ")
    # one stretch to the top of the band reads as before
    top_only = [dict(r, resonates_with_positive_capacitor=r["frequency_hz"] < 1600e3) for r in rows]
    assert untunable_words(top_only).startswith("From 1.6 MHz up: cannot tune here; at 1.71 MHz ")


def test_a_station_the_aerial_alone_tunes_past_says_so_plainly(capsys, tmp_path):
    """Input-handling check on an invented 25 m wire with a 500 µH coil: at 1500 kHz the tank needs
    1/((2π·1.5 MHz)²·500 µH) = 22.5 pF in all (Thomson's resonance formula), less than the aerial presents, so
    no capacitor setting reaches it; the words say that plainly (they said "needs less than no capacitance")."""
    site = tmp_path / "site.toml"
    site.write_text("""
[site]
name = "short wire, big coil"
bands = ["mf"]

[supports.a]
at = [0, 0]
height = "10 m"

[supports.b]
at = [25, 0]
height = "10 m"

[[spans]]
from = "a"
to = "b"

[lead_in]
from = "a"

[receiver]
at = [0.5, 0]
height = "1 m"
coil = "500 uH"
capacitor = ["15 pF", "365 pF"]

[[earth.rods]]
length = "2.4 m"

[[stations]]
name = "High End 1500"
frequency = "1500 kHz"
power = "10 kW"
distance = "20 km"
""", encoding="utf-8")
    code, out, err = run(capsys, "report", site)
    assert code == 0, err
    text = " ".join(out.split())
    assert "needs less capacitance than the aerial alone gives: even with no capacitor the coil tunes below" in text
    assert "less than no capacitance" not in text
