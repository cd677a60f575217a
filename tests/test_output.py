"""Output a person can read: through a pipe or a narrow terminal no number is cut; US units; progress lines.

Invented example sites only; these are input/output handling tests.
"""

from __future__ import annotations

import json

import pytest

from aerial import cli
from aerial.outputs.terminal import Lengths, eng

from .conftest import SLOPING_WIRE, run

EXAMPLES = "site_examples/"


def report_json(capsys, *argv):
    code, out, _ = run(capsys, "report", *argv, "--json")
    assert code == 0
    return json.loads(out)


def band_point_figures(result, lengths=Lengths("si")):
    """The figures the report's main table shows, as the report formats them."""
    a, freqs = result["aerial"], result["frequencies_hz"]
    out = []
    for f in result["ranges"]["frequencies_hz"]:
        i = freqs.index(f)
        out += [eng(f, "Hz", 4), eng(a["capacitance_f"][i], "F"), lengths(a["effective_height_m"][i]),
                eng(a["available_power_w"][i], "W")]
    return out


@pytest.mark.parametrize("argv", [["report"], ["report", EXAMPLES + "rural_long_wire.toml"]])
def test_a_piped_report_at_columns_60_keeps_every_digit(capsys, monkeypatch, argv):
    # the README's first command piped to a file, and the rural example: stdout is not a terminal here
    monkeypatch.setenv("COLUMNS", "60")
    code, out, _ = run(capsys, *argv)
    assert code == 0
    assert "…" not in out
    for text in band_point_figures(report_json(capsys, *argv[1:])):
        assert text in out, text
    assert "frequency" in out and "C presented" in out and "P available" in out


def test_a_narrow_width_lists_rows_instead_of_cutting(capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "60")
    code, out, _ = run(capsys, "report", EXAMPLES + "rural_long_wire.toml", "--width", "60")
    assert code == 0 and "…" not in out
    assert max(len(line) for line in out.splitlines()) <= 60
    assert "C presented: " in out  # the wide table listed row by row
    for text in band_point_figures(report_json(capsys, EXAMPLES + "rural_long_wire.toml")):
        assert text in out, text


@pytest.mark.parametrize("command", [["check", EXAMPLES + "balcony_water_pipe.toml"],
                                     ["layout", EXAMPLES + "suburban_lot_service_line.toml"],
                                     ["coil", "--diameter", "50 mm", "--wire", "26 AWG", "--turns", "60"]])
def test_every_command_fits_a_narrow_width_without_cutting(capsys, command):
    code, out, _ = run(capsys, *command, "--width", "60")
    assert code == 0 and "…" not in out
    assert max(len(line) for line in out.splitlines()) <= 60


@pytest.mark.parametrize("width, words", [("10", "40 to 1000"), ("wide", "whole number")])
def test_width_must_be_a_sensible_number(capsys, width, words):
    code, out, err = run(capsys, "report", "--width", width)
    assert code == 2 and out == "" and words in err and len(err.strip().splitlines()) == 1


def test_us_units_convert_every_length_in_the_report(capsys):
    code, out, _ = run(capsys, "report", EXAMPLES + "rural_long_wire.toml", "--units", "us")
    assert code == 0
    result = report_json(capsys, EXAMPLES + "rural_long_wire.toml")
    us = Lengths("us")
    for text in band_point_figures(result, us):
        assert text in out, text
    assert us(result["geometry"]["total_length_m"]) in out  # 67.6 m -> 222 ft
    assert "59 mi" in out  # 95 km to the farm station (1 mi = 1609.344 m exactly, NIST SP 811)
    assert "points (x, y, height) ft" in out
    lengths_in_metres = Lengths.PATTERN.findall(out)
    assert not lengths_in_metres, lengths_in_metres


def test_us_units_write_a_warning_s_length_as_the_header_does(capsys, write_site):
    site = str(write_site(SLOPING_WIRE))
    result = report_json(capsys, site)
    total = result["geometry"]["total_length_m"]
    assert "total wire length 29.9 m is above 1/8 wavelength" in " ".join(result["warnings"])  # the JSON: SI
    code, out, _ = run(capsys, "report", site, "--units", "us", "--width", "400")
    assert code == 0
    shown = Lengths("us")(total)
    assert shown == "98.2 ft"  # 29.93 m / 0.3048 m
    assert f"aerial + lead-in {shown}" in out
    assert f"total wire length {shown} is above 1/8 wavelength" in out  # not the rounded 29.9 m's 98.1 ft
    assert "98.1 ft" not in out
    code, out, _ = run(capsys, "report", site, "--width", "400")
    assert code == 0 and "total wire length 29.9 m is above 1/8 wavelength" in out  # metres as before


def test_us_units_leave_the_json_in_si(capsys):
    assert report_json(capsys, "--units", "us") == report_json(capsys)


def test_us_units_in_check_layout_and_coil(capsys):
    code, out, _ = run(capsys, "check", EXAMPLES + "backyard_inverted_l.toml", "--units", "us")
    assert code == 0 and " ft" in out and not Lengths.PATTERN.findall(out)
    code, out, _ = run(capsys, "layout", EXAMPLES + "suburban_lot_service_line.toml", "--units", "us")
    assert code == 0 and " ft" in out and not Lengths.PATTERN.findall(out)
    code, out, _ = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--turns", "60", "--units", "us")
    assert code == 0 and "form diameter" in out and "1.969 in" in out  # 50 mm = 1.9685 in


def test_us_units_convert_grouped_numbers_and_ranges_whole(capsys):
    # The built-in example's sky-wave warning says "paths of 50–12000 km": a grouped number and a
    # range must convert whole (it once printed "50–12 0 mi"). 1 mi = 1609.344 m exactly (NIST SP 811).
    code, out, _ = run(capsys, "report", "--units", "us", "--width", "400", "--quiet")
    assert code == 0
    assert "paths of 31.1–7460 mi" in out
    assert " 0 mi" not in out and not Lengths.PATTERN.findall(out)


def test_a_station_that_spills_onto_another_says_so_in_plain_words(capsys, tmp_path):
    # In the built-in example the strong local station is audible round much of the dial: its line must
    # say where it comes through ("heard under: X" read as if it were under X).
    code, out, _ = run(capsys, "report", "--width", "400", "--quiet", "--page", str(tmp_path / "p.html"))
    assert code == 0
    assert "Riverside Talk 880: " in out and "also comes through when tuned to: Hillcrest Classics" in out
    assert "heard under" not in out
    page = (tmp_path / "p.html").read_text(encoding="utf-8")
    assert "also comes through when tuned to" in page and "heard under" not in page


def test_tuning_table_says_in_words_what_a_number_would_misstate(capsys):
    # The shipped suburban example's aerial alone is more capacitance than the 240 uH tank needs above
    # ~750 kHz; the rural example's separate primary reflects inductance and its tank is very flat: a
    # negative capacitor setting, a share of more than 100 % or a bare Q below 1 must not be printed as figures.
    import re

    for argv in ([EXAMPLES + "suburban_lot_service_line.toml"], [EXAMPLES + "rural_long_wire.toml"], []):
        code, out, _ = run(capsys, "report", *argv, "--width", "300", "--quiet")
        assert code == 0
        table = out[out.index("Tuning:"):out.index("Band coverage")]
        assert not re.search(r"-\d[\d.]* [pnf]F(?! \((?:reflects inductance|inductive)\))", table), table
        assert not re.search(r"\((?:1\d\d|[2-9]\d\d) %\)", table), table
        assert not re.search(r"│\s+0\.\d+ │", table), table  # no bare loaded Q below 1
        if argv and "suburban" in argv[0]:
            assert "— (cannot tune)" in table and "up: cannot tune here; at " in table and "the aerial alone gives" in table


def test_a_checked_water_pipe_is_not_warned_about_twice(capsys, tmp_path):
    # The balcony example says continuous_metal = true: its report must not still warn that the pipe
    # "counts only if it is metal all the way" (the safety caution keeps the reminder). With continuity
    # unknown the site's own line asks the user to check, once.
    example = EXAMPLES + "balcony_water_pipe.toml"
    code, out, _ = run(capsys, "report", example, "--width", "400", "--quiet")
    assert code == 0
    assert "metal all the way" not in out and "Water-pipe earth" in out
    unknown = tmp_path / "unknown.toml"
    text = open(example, encoding="utf-8").read()
    unknown.write_text(text.replace("continuous_metal = true\n", ""), encoding="utf-8")
    code, out, _ = run(capsys, "report", str(unknown), "--width", "400", "--quiet")
    assert code == 0
    assert out.count("continuity is not stated") == 1 and "metal all the way" not in out


def test_a_rod_given_in_feet_and_inches_reads_back_in_them(capsys, tmp_path):
    # An "8 ft" x "5/8 in" rod (exact: 2.4384 m x 15.875 mm, NIST SP 811) once read "8.01 ft x 0.63 in"
    # under --units us because its description was rounded in metres first.
    site = tmp_path / "rod.toml"
    text = open(EXAMPLES + "backyard_inverted_l.toml", encoding="utf-8").read()
    site.write_text(text.replace('diameter = "16 mm"', 'diameter = "5/8 in"'), encoding="utf-8")
    code, out, _ = run(capsys, "report", str(site), "--units", "us", "--width", "300", "--quiet")
    assert code == 0
    assert "1 rod 8 ft × 0.625 in" in out


def test_lengths_in_us_units():
    us = Lengths("us")
    assert us(0.3048) == "1 ft" and us(3.048) == "10 ft" and us(0.0254) == "1 in"  # exact definitions, NIST SP 811
    assert us.distance(1609.344) == "1 mi"
    assert us.text("a 2.5 mm2 wire at 1 m·pF, 5 mV/m and 100 Ω·m soil") == \
        "a 2.5 mm2 wire at 1 m·pF, 5 mV/m and 100 Ω·m soil"  # none of these is a length


def test_progress_lines_on_a_stderr_that_is_not_a_terminal(capsys, monkeypatch):
    monkeypatch.setattr(cli, "PROGRESS_LINES_AFTER_S", 0.0)
    code, _, err = run(capsys, "report", "--json")
    assert code == 0
    lines = err.strip().splitlines()
    assert any("closed-form sweep of" in line for line in lines)
    assert any("tuning and stations" in line for line in lines)
    assert all(line.startswith("aerial: ") for line in lines)


def test_full_wave_progress_counts_in_tenths(capsys, monkeypatch):
    monkeypatch.setattr(cli, "PROGRESS_LINES_AFTER_S", 0.0)
    code, _, err = run(capsys, "report", "--full-wave", "--step", "100 kHz")
    assert code == 0
    assert "full-wave sweep of 13 frequencies: 100 %" in err
    assert "ranges from the tolerances" in err


def test_quiet_prints_no_progress(capsys, monkeypatch):
    monkeypatch.setattr(cli, "PROGRESS_LINES_AFTER_S", 0.0)
    code, _, err = run(capsys, "report", "--quiet")
    assert code == 0 and err == ""
    code, _, err = run(capsys, "layout", EXAMPLES + "suburban_lot_service_line.toml", "--quiet")
    assert code == 0 and err == ""


def test_a_run_quicker_than_the_threshold_prints_no_progress(capsys, monkeypatch):
    monkeypatch.setattr(cli, "PROGRESS_LINES_AFTER_S", 1e6)
    code, _, err = run(capsys, "report")
    assert code == 0 and err == ""


def test_effective_length_is_a_length_for_wires_and_words_for_a_rod():
    # input handling of the earth table's cell (invented parts): a rod's effective length is said in words
    from aerial.outputs.terminal import effective_length_words

    def metres(v):
        return f"{v:.1f} m"

    # a buried wire or pipe is said against its own length: a bare "23.0 m" beside a 10 m wire misleads
    assert effective_length_words({"kind": "buried_wires", "effective_length_m": 23.0, "length_m": 10.0}, metres) == \
        "all of it; a longer one helps up to about 23.0 m"
    assert effective_length_words({"kind": "water_pipe", "effective_length_m": 22.6, "length_m": 61.0}, metres) == \
        "about 22.6 m of it; more adds little"
    assert effective_length_words({"kind": "water_pipe", "effective_length_m": 22.6}, metres) == "22.6 m"
    assert effective_length_words({"kind": "rods", "effective_length_m": 16.5, "length_m": 2.44}, metres) == \
        "a longer rod helps up to about 16.5 m"
    assert effective_length_words({"kind": "rods", "effective_length_m": 2.0, "length_m": 2.44}, metres) == \
        "a longer rod would not help here"
    assert effective_length_words({"kind": "building_earth", "effective_length_m": None}, metres) == "—"


def test_summary_names_counterpoise_wires_as_counterpoise_not_earth_lead(capsys):
    # two 8 m counterpoise wires and no earth lead: the summary must not call them "earth lead 16 m"
    code, out, _ = run(capsys, "report", EXAMPLES + "portable_vertical_counterpoise.toml", "--quiet")
    assert code == 0
    head = " ".join(out.splitlines()[:3])
    assert "counterpoise 2 ×" in head and "earth lead" not in head


@pytest.mark.parametrize("command", ["check", "report"])
@pytest.mark.parametrize("units, expected", [
    # high_floor_flat's lead-in: 1.6125 m from the rail to the door frame (1.6 m across, 0.2 m down) and
    # 0.8 m in to the receiver, 2.4125 m; 1 ft = 0.3048 m exactly (NIST SP 811); three significant figures
    ("us", {"lead-in": ("7.91 ft", "40.7 ft", "41.3 ft"), "front rail": ("19.7 ft", "41.3 ft", "41.3 ft")}),
    ("si", {"lead-in": ("2.41 m", "12.4 m", "12.6 m"), "front rail": ("6 m", "12.6 m", "12.6 m")}),
])
def test_the_wires_table_writes_lengths_as_the_text_does(capsys, command, units, expected):
    """Length, lowest and highest point of each wire in the one length format (input/output handling).

    The metre figures come from the site file itself (the rail at 12.6 m, 6 m long; the door at 12.4 m).
    """
    site = EXAMPLES + "high_floor_flat.toml"
    argv = [command, site, "--units", units, "--width", "200"] + (["--quiet"] if command == "report" else [])
    code, out, err = run(capsys, *argv)
    assert code == 0, err
    rows = {}
    for line in out.splitlines():
        cells = [c.strip() for c in line.split("│")[1:-1]]
        if len(cells) == 7 and cells[0] in expected:
            rows.setdefault(cells[0], tuple(cells[2:3] + cells[4:6]))
    assert rows == expected
    code, out, err = run(capsys, "check", site, "--json")
    lead = next(w for w in json.loads(out)["geometry"]["wires"] if w["name"] == "lead-in")
    assert Lengths(units)(lead["length_m"]) == expected["lead-in"][0]  # the same as every sentence writes it


@pytest.mark.parametrize(("units", "expected"), [("si", "building: steel frame, 21 m high"),
                                                  ("us", "building: steel frame, 68.9 ft high")])
def test_building_line_writes_its_height_as_the_tables_write_a_length(capsys, units, expected):
    # 21 m / 0.3048 m per ft (exact, NIST SP 811) = 68.9 ft; the header's lengths use the same format
    code, out, _ = run(capsys, "report", EXAMPLES + "high_floor_flat.toml", "--units", units, "--width", "100")
    assert code == 0
    assert expected in out
    assert "21.0 m high" not in out


def test_consistency_ranges_in_sentences_take_the_tables_en_dash(capsys):
    # consistency check: the tables write a range "6.5–6.7 m"; a sentence giving one (the building's
    # effective-height spread, the no-building caution, the assumed capacitor) writes it the same way
    import re

    code, out, _ = run(capsys, "report", EXAMPLES + "backyard_inverted_l.toml", "--width", "400", "--quiet")
    assert code == 0
    spread = re.search(r"effective height is about [\d.]+ m \(([\d.]+)(.)([\d.]+) m as the structure", out)
    assert spread and spread.group(2) == "–", out
    code, out, _ = run(capsys, "report", EXAMPLES + "backyard_inverted_l.toml", "--json", "--quiet")
    assert code == 0 and not re.search(r"\d-\d", " ".join(json.loads(out)["warnings"]))


def test_consistency_radials_note_names_the_what_if_tables_frequency(capsys):
    # consistency check: the rural example's what-if table is at the LF centre, 203.5 kHz; the note
    # under it (how long radials help) names the same frequency, not a rounded "204 kHz"
    import re

    code, out, _ = run(capsys, "report", EXAMPLES + "rural_long_wire.toml", "--width", "400", "--quiet")
    assert code == 0
    heading = re.search(r"What would help \(at ([\d.]+ k?Hz)", out).group(1)
    note = re.search(r"add nothing at ([\d.]+ k?Hz) in this soil", out).group(1)
    assert heading == note == "203.5 kHz"


def test_consistency_earth_resistance_range_at_the_working_frequency_same_on_terminal_and_page(capsys, tmp_path):
    # consistency check: the earth's resistance range at the centre frequency is one figure pair in the
    # terminal's earth table, the page's earth table and the page's headline (it was "13 Ω – 110 Ω" in
    # the terminal beside "12.5 Ω – 114 Ω" on the page)
    import re

    page = tmp_path / "p.html"
    code, out, _ = run(capsys, "report", EXAMPLES + "backyard_inverted_l.toml", "--width", "400", "--quiet",
                       "--page", str(page))
    assert code == 0
    ranges = re.findall(r"\(R ([^)]*)\)", out)
    assert ranges and len(set(ranges)) == 1
    html = page.read_text(encoding="utf-8")
    text = " ".join(re.sub(r"<[^>]*>", " ", html).split())
    words = " ".join(ranges[0].split())
    assert text.count(words) >= 3, words  # the page's earth table (part and whole system) and its headline


def test_consistency_layout_names_the_frequency_as_the_reports_tables_do(capsys):
    # consistency check: the rural example's figures are at the LF centre, 203.5 kHz, in the report's
    # what-if heading; the layout's table heading and its present-wire line say the same, not "204 kHz"
    code, out, _ = run(capsys, "layout", EXAMPLES + "rural_long_wire.toml", "--width", "400", "--quiet")
    assert code == 0
    assert "eff. height at 203.5 kHz" in out and "figures it at 203.5 kHz" in out and "204 kHz" not in out
