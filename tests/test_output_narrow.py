"""Output in a narrow window and through a pipe: COLUMNS is honoured, nothing is cut, a number never
parts from its unit; the plan picture names its ranked layouts.

Invented example sites only; these are input/output handling tests (no physics truth here).
"""

from __future__ import annotations

import json
import re
from xml.sax.saxutils import escape

import pytest

from aerial.outputs.terminal import eng, glue

from .conftest import run

EXAMPLES = "site_examples/"
#: A line (or a table cell) that starts with a unit, as the report writes units.
UNIT_FIRST = re.compile(r"^(?:[GMkmµunpf]?(?:Hz|F|H|Ω|W|V/m|V|m)|dB|%|ft|in|mi)(?![\w/])")


def parted(out: str) -> list:
    """Pairs of lines where a number ends one line (or table cell) and its unit starts the next."""
    bad = []
    lines = out.splitlines()
    for a, b in zip(lines, lines[1:]):
        cells_a, cells_b = a.split("│"), b.split("│")
        if len(cells_a) != len(cells_b):
            cells_a, cells_b = [a], [b]
        for x, y in zip(cells_a, cells_b):
            if re.search(r"\d$", x.rstrip()) and UNIT_FIRST.match(y.strip()):
                bad.append((a, b))
    return bad


def test_the_checker_finds_a_parted_unit():
    assert parted("at least 20\ndB below") and parted("│ 12.3 │ x │\n│ dB   │   │")
    assert not parted("at least\n20 dB below") and not parted("│ 12.3 dB │\n│ (low)   │")


def test_glue_keeps_numbers_with_units_and_prints_plain_spaces():
    from aerial.outputs.terminal import ReportConsole

    console = ReportConsole(width=20, record=True, file=open("/dev/null", "w"))
    console.print(glue("aaaaaaaaaaaaaa at 12.3 dB (5.5–7.7 m)"))
    text = console.export_text()
    assert "12.3 dB" in text and "\u00a0" not in text


@pytest.mark.parametrize("argv", [
    ["report", EXAMPLES + "backyard_inverted_l.toml"],
    ["report", EXAMPLES + "balcony_water_pipe.toml", "--units", "us"],
    ["layout", EXAMPLES + "suburban_lot_service_line.toml"],
    ["check", EXAMPLES + "rural_long_wire.toml"],
    ["coil", "--diameter", "2 in", "--wire", "26 AWG", "--inductance", "240 uH"],
])
def test_piped_at_columns_60_nothing_is_cut_and_no_unit_wraps_away(capsys, monkeypatch, argv):
    monkeypatch.setenv("COLUMNS", "60")
    code, out, _ = run(capsys, *argv, *(["--quiet"] if argv[0] in ("report", "layout") else []))
    assert code == 0
    assert "…" not in out
    assert max(len(line) for line in out.splitlines()) <= 60  # the piped output honours COLUMNS
    assert not parted(out), parted(out)[:3]


def test_a_wide_table_at_60_columns_keeps_its_words_whole(capsys, monkeypatch):
    # rich's own squeeze folded "resistance" into "resistanc|e" although the table could fit
    monkeypatch.setenv("COLUMNS", "60")
    code, out, _ = run(capsys, "report", EXAMPLES + "backyard_inverted_l.toml", "--quiet")
    assert code == 0
    earth = out[out.index("Earth system"):out.index("R low–high")]
    assert "resistance" in earth and "resistanc " not in earth
    # a panel title too long for the border is printed whole above it
    code, out, _ = run(capsys, "layout", EXAMPLES + "suburban_lot_service_line.toml", "--quiet")
    assert "Code checklist (typical requirements, not a compliance check)" in " ".join(out.split())


def test_width_option_beats_columns_and_no_columns_widens_tables(capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "60")
    code, out, _ = run(capsys, "report", "--width", "80", "--quiet")
    assert code == 0 and 60 < max(len(line) for line in out.splitlines()) <= 80
    monkeypatch.delenv("COLUMNS")
    code, out, _ = run(capsys, "report", "--quiet")
    assert code == 0 and max(len(line) for line in out.splitlines()) > 100  # tables at their full width
    assert "…" not in out


def test_piped_without_columns_long_verdicts_wrap_at_the_fit_limit(capsys, monkeypatch, write_site):
    # a station out of the tuning range gets a long verdict; piped with no width asked for, its
    # table is shared out over FIT_LIMIT characters instead of one line hundreds of characters long
    from aerial.outputs.terminal import FIT_LIMIT

    monkeypatch.delenv("COLUMNS", raising=False)
    site = write_site("""
        [site]
        name = "Corner lot, garage to maple"
        bands = ["mf"]
        soil = "intermediate"
        [wire]
        gauge = "16 AWG"
        [supports.garage]
        at = [0, 0]
        height = "12 ft 6 in"
        kind = "eave"
        [supports.maple]
        at = ["85 ft", "10 ft"]
        height = "32 ft"
        kind = "tree"
        [[spans]]
        from = "garage"
        to = "maple"
        [lead_in]
        from = "garage"
        [receiver]
        at = ["2 ft", "-1 ft"]
        height = "3 ft"
        coil = "230 uH"
        capacitor = ["12 pF", "365 pF"]
        [[earth.rods]]
        count = 1
        length = "8 ft"
        at = ["3 ft", "-2 ft"]
        [[stations]]
        name = "Valley News"
        frequency = "1010 kHz"
        power = "5 kW"
        distance = "30 mi"
    """)
    code, out, _ = run(capsys, "report", site, "--quiet")
    assert code == 0 and "out of the tuning range" in out
    assert max(len(line) for line in out.splitlines()) <= FIT_LIMIT
    assert "…" not in out and not parted(out)


def test_listed_rows_label_every_design(capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "60")
    code, out, _ = run(capsys, "report", EXAMPLES + "backyard_inverted_l.toml", "--quiet")
    assert code == 0
    design = out[out.index("Tuning for your stations"):]
    assert "• as wired" in design and "• other" in design
    assert not re.search(r"^• *$", design, flags=re.M)


def test_a_flat_tank_shows_its_true_bandwidth_and_marks_only_a_floor(capsys):
    # rural example: loaded Q below 1 at 520 kHz with both -3 dB edges found (the search runs from a
    # third to three times the frequency), and at 1.71 MHz an edge beyond it
    code, out, _ = run(capsys, "report", EXAMPLES + "rural_long_wire.toml", "--json")
    rows = json.loads(out)["tuning"]["rows"]
    first, last = rows[0], rows[-1]
    assert first["loaded_q"] < 1 and not first["bandwidth_is_lower_bound"]
    assert last["bandwidth_is_lower_bound"]
    code, out, _ = run(capsys, "report", EXAMPLES + "rural_long_wire.toml", "--width", "300", "--quiet")
    table = out[out.index("Tuning:"):out.index("Band coverage")]
    row520 = next(line for line in table.splitlines() if line.startswith("│") and "520 kHz" in line)
    assert "< 1 (no useful resonance)" in row520
    assert f" {eng(first['bandwidth_hz'], 'Hz')} " in row520 and "≥" not in row520
    assert f"≥ {eng(last['bandwidth_hz'], 'Hz')}" in table


def test_check_names_band_edges_to_the_half_kilohertz(capsys):
    # LF broadcast band edges 148.5 and 283.5 kHz (ITU Radio Regulations, Region 1 allocation; from memory)
    code, out, _ = run(capsys, "check", EXAMPLES + "balcony_water_pipe.toml", "--width", "200")
    assert code == 0
    assert "148.5 kHz–283.5 kHz" in out and "earth: water pipe" in out


def test_coil_from_turns_says_how_much_wire(capsys):
    code, out, _ = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--turns", "69", "--json")
    by_turns = json.loads(out)
    code, out, _ = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--inductance",
                       f"{by_turns['inductance_h'] * 1e6:.6f} uH", "--json")
    by_inductance = json.loads(out)
    # consistency check: the same 69 turns need the same wire whichever way the coil is asked for
    assert by_inductance["whole_turns"] == 69
    assert by_turns["wire_length_m"] == pytest.approx(by_inductance["wire_length_m"], rel=1e-9)
    code, out, _ = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--turns", "69")
    assert code == 0 and "wire needed" in out


def test_plan_pictures_name_each_ranked_layout(capsys, tmp_path, monkeypatch):
    site = EXAMPLES + "suburban_lot_service_line.toml"
    svg = tmp_path / "plan.svg"
    code, out, _ = run(capsys, "layout", site, "--picture", svg, "--quiet", "--json")
    assert code == 0
    layouts = json.loads(out)["layouts"][:3]
    text = svg.read_text(encoding="utf-8")
    assert text.count('class="rank-number"') == len(layouts) == 3
    for lay in layouts:
        assert f"{lay['rank']}  {escape(lay['description'])}" in text
    labels = []
    from matplotlib.figure import Figure

    original = Figure.legend

    def spy(self, *args, **kwargs):
        labels.extend(h.get_label() for h in kwargs.get("handles", []))
        return original(self, *args, **kwargs)

    monkeypatch.setattr(Figure, "legend", spy)
    png = tmp_path / "plan.png"
    code, _, _ = run(capsys, "layout", site, "--picture", png, "--quiet")
    assert code == 0 and png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert [label.split("  ")[0] for label in labels[:3]] == ["1", "2", "3"]
    assert labels[0].startswith(f"1  {layouts[0]['description']}") and "power line" in labels


def test_consistency_one_centre_frequency_for_earth_what_if_and_loss_budget(capsys):
    # balcony example (two bands): the earth table, the what-if table and the loss budget are all at the
    # MF centre, and the what-if "as described" row repeats the main table's figures there
    site = EXAMPLES + "balcony_water_pipe.toml"
    code, out, _ = run(capsys, "report", site, "--json")
    result = json.loads(out)
    fc = result["earth"]["centre_frequency_hz"]
    row = result["what_if"][0]
    assert row["frequency_hz"] == fc
    i = result["frequencies_hz"].index(fc)
    a = result["aerial"]
    assert row["available_power_w"] == pytest.approx(a["available_power_w"][i], rel=1e-9)
    assert row["capacitance_f"] == pytest.approx(a["capacitance_f"][i], rel=1e-9)
    code, out, _ = run(capsys, "report", site, "--width", "300", "--quiet")
    at = eng(fc, "Hz", 4)
    assert f"impedance at {at}" in out and f"What would help (at {at})" in out and f"loss budget at {at}:" in out
    electrode = result["aerial"]["loss_budget"]["electrode_ohm"][i]
    assert f"earth electrode {eng(electrode, 'Ω')}" in out


def test_small_shares_and_powers_are_said_in_plain_figures(capsys):
    site = EXAMPLES + "balcony_water_pipe.toml"
    code, out, _ = run(capsys, "report", site, "--width", "300", "--quiet")
    assert code == 0
    table = out[out.index("Tuning:"):out.index("Band coverage")]
    assert " 0 % " not in table  # the coil tap passes a small share, never "nothing"
    assert "e-0" not in out and "e-1" not in out  # powers with a prefix, not in exponent form
    assert re.search(r"audio \d+(?:\.\d)? [fpnµm]?W, \d+ dB above the noise", out)
    assert "148.5 kHz" in out and "283.5 kHz" in out  # the LF band's edges, not 148 and 284 kHz


def test_band_points_name_their_band(capsys):
    # the portable example listens on MF and the HF broadcast bands: each HF point says which band
    code, out, _ = run(capsys, "report", EXAMPLES + "portable_vertical_counterpoise.toml", "--width", "300", "--quiet")
    assert code == 0
    table = out[out.index("The aerial at the band edges"):out.index("loss budget")]
    assert "MF low" in table and "HF 120 m low" in table and "HF 11 m high" in table


def test_a_misspelt_unit_gets_a_suggestion(capsys, write_site):
    from .conftest import MINIMAL, one_line

    site = write_site(MINIMAL.replace('length = "2.4 m"', 'length = "8 fet"'))
    code, out, err = run(capsys, "check", site)
    line = one_line(err)
    assert code == 2 and out == ""
    assert 'earth.rods[0].length = "8 fet"' in line and 'did you mean "feet"?' in line


def test_a_wrong_picture_type_is_refused_before_the_search(capsys, monkeypatch, tmp_path):
    from aerial import cli

    from .conftest import one_line

    monkeypatch.setattr(cli, "PROGRESS_LINES_AFTER_S", 0.0)
    code, out, err = run(capsys, "layout", EXAMPLES + "suburban_lot_service_line.toml", "--picture", tmp_path / "p.jpg")
    assert code == 2 and out == ""
    assert "'.jpg' is not a valid picture type" in one_line(err)  # no progress lines: nothing was searched


def test_page_tables_keep_numbers_with_units(capsys, tmp_path):
    page = tmp_path / "p.html"
    code, _, _ = run(capsys, "report", EXAMPLES + "balcony_water_pipe.toml", "--quiet", "--page", page)
    assert code == 0
    html = page.read_text(encoding="utf-8")
    assert ".q { white-space: nowrap; }" in html
    cells = re.findall(r"<td[^>]*>(.*?)</td>", html)
    assert any('<span class="q">' in c for c in cells)
    loose = [c for c in cells if re.search(r"\d [fpnµmkM]?(?:F|Ω|W|V|Hz|m)(?![\w/])",
                                           re.sub(r'<span class="q">.*?</span>', "", c))]
    assert not loose, loose[:3]


def test_plan_picture_in_feet_with_us_units(capsys, tmp_path):
    svg = tmp_path / "plan.svg"
    code, _, _ = run(capsys, "layout", EXAMPLES + "suburban_lot_service_line.toml", "--units", "us", "--quiet",
                     "--picture", svg)
    assert code == 0
    text = svg.read_text(encoding="utf-8")
    # the oak is 12.0 m high: 39.4 ft; the 18.0 m fall zone: 59.1 ft (1 ft = 0.3048 m exactly, NIST SP 811)
    assert "oak 39.4 ft" in text and "keep 59.1 ft clear" in text
    assert not re.search(r"\d m\b", text)
