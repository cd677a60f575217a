"""The shared HTML page (``aerial report --page``, ``aerial layout --page``): content, safety to share, file handling.

Sites here are the invented examples in site_examples/ and small invented test inputs.
The figures the page must show are read from the same run's JSON (consistency checks).
"""

from __future__ import annotations

import getpass
import json
import os
import re
import xml.etree.ElementTree as ET

import pytest

from aerial.outputs.terminal import eng

from .conftest import EXAMPLES, MINIMAL, SLOPING_WIRE, run

SUBURBAN = next(p for p in EXAMPLES if p.name == "suburban_lot_service_line.toml")

#: A site whose strings try to break out of the page (invented for this test).
HOSTILE = MINIMAL.replace('name = "test vertical"', 'name = "<b>Bold</b> & \\"quoted\\" </title><img src=x>"') + """
[[stations]]
name = "<script>alert(1)</script>"
frequency = "1 MHz"
power = "10 kW"
distance = "20 km"

[[stations]]
name = "$x^2$ _under \\u00e9t\\u00e9"
frequency = "700 kHz"
power = "5 kW"
distance = "30 km"
"""

#: Sections every report page carries (ids), in page order.
REPORT_SECTIONS = ("summary", "headline", "drawings", "aerial", "earth", "what-if", "frequency-pictures", "tuning",
                   "station-design", "stations", "safety", "warnings", "cautions")
#: Pictures every report page of a site with stations carries (figure ids).
REPORT_PICTURES = ("plan-view", "side-elevation", "impedance", "capacitance", "tuning-range", "station-tuning",
                   "station-power")


@pytest.fixture(scope="module")
def built_in(tmp_path_factory):
    """The built-in example's report: (result dict, page text), from one run of the API."""
    from aerial.api import run_report

    path = tmp_path_factory.mktemp("page") / "report.html"
    result = run_report(None, page=str(path))
    return result, path.read_text(encoding="utf-8")


def _svgs(page: str) -> list[str]:
    return re.findall(r"<svg\b.*?</svg>", page, flags=re.S)


def test_report_page_has_every_section_and_picture(built_in):
    result, page = built_in
    for ident in REPORT_SECTIONS + REPORT_PICTURES:
        assert f'id="{ident}"' in page, ident
    assert page.count('<figure id="') == len(REPORT_PICTURES)
    for caution in result["cautions"]:  # the safety cautions in full
        assert caution.replace("&", "&amp;").replace("'", "&#x27;").replace('"', "&quot;") in page
    assert result["tuning"]["coverage"]["verdict"] in page


def test_report_page_shows_the_headline_figures_of_the_json(built_in):
    """Consistency check: the page's figures are the JSON's, formatted as the terminal formats them."""
    result, page = built_in
    earth = result["earth"]
    # the DC value, and the RF resistance's range at the centre frequency (the page shows the RF range, not the DC one)
    low, high = earth["resistance_range_at_centre_ohm"]
    for value, unit in ((earth["resistance_ohm"], "Ω"), (low, "Ω"), (high, "Ω")):
        assert eng(value, unit) in page
    assert f"{eng(low, 'Ω')} – {eng(high, 'Ω')}" in page
    ranges = result["ranges"]
    j = ranges["labels"].index(next(lb for lb in ranges["labels"] if lb.endswith("centre")))
    for key, unit in (("capacitance_f", "F"), ("effective_height_m", "m"), ("available_power_w", "W")):
        lo, hi = ranges[key][j]
        assert f"{eng(lo, unit)} – {eng(hi, unit)}" in page, key
    for s in result["stations"]:
        assert eng(s["detector_power_w"], "W") in page


def test_report_page_is_self_contained(built_in):
    _, page = built_in
    assert page.startswith("<!DOCTYPE html>")
    assert "Content-Security-Policy" in page and "default-src 'none'" in page
    low = page.lower()
    for forbidden in ("<script", "<link", "<iframe", "@import", " src=", "<img"):
        assert forbidden not in low, forbidden
    for ref in re.findall(r'(?:href|url)\s*[=(]\s*"?([^")\s>]+)', page):
        assert ref.startswith("#"), ref  # only references inside the page
    # namespaces and metadata identifiers are not fetched; nothing else names a web address
    for url in re.findall(r"https?://[^\s\"'<>]+", page):
        assert url.startswith(("http://www.w3.org/", "http://purl.org/dc/", "http://creativecommons.org/ns",
                               "http://www.w3.org/1999/02/22-rdf-syntax-ns")), url


def test_report_page_pictures_keep_their_words_as_text(built_in):
    _, page = built_in
    svgs = _svgs(page)
    assert len(svgs) == len(REPORT_PICTURES)
    for svg in svgs:
        ET.fromstring(svg)  # each inline picture is well-formed XML
        assert "<text" in svg
        assert "DejaVuSans-" not in svg  # no glyphs drawn as paths
        assert "<title>" in svg and 'role="img"' in svg
    ids = re.findall(r'\bid="([^"]+)"', page)
    assert len(ids) == len(set(ids)), "ids repeat across the page's pictures"


def test_every_chart_axis_names_its_quantity_and_unit(built_in):
    from aerial.outputs import charts, site_drawings

    result, _ = built_in
    scene = site_drawings.report_scene(result)
    figures = [charts.impedance_figure(result), charts.capacitance_figure(result), charts.tuning_figure(result),
               charts.station_figure(result), charts.station_design_figure(result), site_drawings.plan_figure(scene),
               site_drawings.elevation_figure(scene)]
    for fig in figures:
        for ax in fig.axes:
            for label, ticks in ((ax.get_xlabel(), ax.get_xticklabels()), (ax.get_ylabel(), ax.get_yticklabels())):
                categorical = any(t.get_text() and not re.fullmatch(r"[−\-\d.,e+$^{}\\mathdefault ]+", t.get_text())
                                  for t in ticks)
                name = getattr(fig, "aerial_svg", ("chart",))[0]
                assert label, f"{name}: an axis without a label"
                assert categorical or re.search(r"\[[^\]]+\]", label), f"{name}: '{label}' has no unit"


def test_charts_do_not_rest_on_red_against_green():
    """The palette is Okabe–Ito (common practice for colour-blind-safe charts); verdicts differ by shape too."""
    from aerial.outputs.charts import VERDICT_STYLE

    shapes = [m for m, _ in VERDICT_STYLE.values()]
    assert len(set(shapes)) == len(shapes)
    colours = {c.lower() for _, c in VERDICT_STYLE.values()}
    assert "#009e73" not in colours or "#d55e00" not in colours  # never green against vermillion


def test_page_escapes_site_strings_and_hides_the_users_folders(capsys, write_site, tmp_path):
    site = write_site(HOSTILE)
    out_page = tmp_path / "shared.html"
    out_page.write_text("an older page", encoding="utf-8")
    code, _, err = run(capsys, "report", str(site.resolve()), "--page", out_page, "--force")
    assert code == 0, err
    page = out_page.read_text(encoding="utf-8")  # --force replaced the older file
    assert "<script" not in page.lower()
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "<b>Bold</b>" not in page and "&lt;b&gt;Bold&lt;/b&gt;" in page
    assert "<img" not in page.lower()
    assert "été" in page
    assert str(tmp_path) not in page and str(tmp_path.resolve()) not in page
    assert os.path.expanduser("~") + os.sep not in page
    user = getpass.getuser()
    if len(user) >= 4 and user not in ("root", "user"):
        assert not re.search(rf"\b{re.escape(user)}\b", page)
    assert "site.toml" in page  # the file is named, without its folder


def test_report_page_and_pictures_through_the_command_line(capsys, tmp_path):
    target, pics = tmp_path / "report.html", tmp_path / "pics"
    code, out, err = run(capsys, "report", "--json", "--page", target, "--pictures", pics)
    assert code == 0, err
    data = json.loads(out)
    assert data["page"] == str(target)
    assert "page written to" in err
    before = target.read_bytes()
    code, _, err = run(capsys, "report", "--page", target)  # never over an existing file without --force
    assert code == 2 and "already exists" in err and "--force" in err
    assert target.read_bytes() == before
    # the loose SVG pictures are the page's charts: words kept as text
    names = sorted(p.name for p in pics.iterdir())
    assert names == sorted(["aerial-impedance.svg", "aerial-capacitance.svg", "tuning-range.svg", "station-power.svg",
                            "station-tuning.svg"])
    for p in pics.iterdir():
        text = p.read_text(encoding="utf-8")
        ET.fromstring(text.split("?>", 1)[1] if text.startswith("<?xml") else text)
        assert "<text" in text and "DejaVuSans-" not in text


@pytest.mark.parametrize("name, words", [("report.txt", "ending in .html"), ("missing/report.html", "does not exist")])
def test_bad_page_names_are_refused_before_any_work(capsys, tmp_path, name, words):
    code, out, err = run(capsys, "report", "--page", tmp_path / name)
    assert code == 2 and words in err
    assert out == "" and err.count("\n") == 1


def test_page_never_replaces_the_site_file(capsys, write_site):
    site = write_site(MINIMAL, name="site.html")
    before = site.read_bytes()
    code, _, err = run(capsys, "report", site, "--page", site, "--force")
    assert code == 2 and "input file" in err
    assert site.read_bytes() == before


def test_layout_page_ranks_groups_refusals_and_lists_the_code(capsys, tmp_path):
    target = tmp_path / "plan.html"
    code, out, err = run(capsys, "layout", SUBURBAN, "--json", "--page", target)
    assert code == 0, err
    data = json.loads(out)
    page = target.read_text(encoding="utf-8")
    for ident in ("summary", "drawings", "plan-view", "side-elevation", "layouts", "refusals", "code-checklist",
                  "safety", "cautions"):
        assert f'id="{ident}"' in page, ident
    from aerial.outputs.page import esc

    for lay in data["layouts"]:
        assert esc(lay["description"]) in page
    assert "refused for safety" in page and f">{data['candidates_refused_safety']}<" in page
    for cause, n in data["excluded"].items():
        if n:
            assert esc(cause) in page and f">{n}<" in page
    for line in data["code_checklist"]:
        assert esc(line) in page
    assert "<script" not in page.lower()


def test_layout_page_says_the_present_wire_as_the_terminal_does(capsys, tmp_path):
    """A present wire long for the wavelength: the page carries the terminal's sentence, flag and all.

    The suburban example's present wire is flagged long for the wavelength (consistency check between
    the two outputs of one run).
    """
    import html

    target = tmp_path / "plan.html"
    code, out, err = run(capsys, "layout", SUBURBAN, "--page", target, "--quiet", "--width", "1000")
    assert code == 0, err
    line = next(x for x in out.splitlines() if x.startswith("your present wire"))
    assert "long for the wavelength from" in line
    page = html.unescape(target.read_text(encoding="utf-8"))
    assert f"<li>{line.strip()}</li>" in page


def _drawing_words(page: str) -> list[str]:
    """The words of the page's plan view and side elevation (their SVG text)."""
    start = page.index('id="drawings"')
    return re.findall(r"<text[^>]*>([^<]*)</text>", page[start:page.index("</section>", start)])


@pytest.mark.parametrize("command", ["report", "layout", "report --json"])
def test_page_drawings_write_lengths_in_feet_under_us_units(capsys, tmp_path, command):
    """Under --units us every length on the drawings is in feet: labels and axes (input handling).

    1 ft = 0.3048 m exactly (NIST SP 811): the oak support, 12 m high in the site file, reads 39.4 ft.
    """
    target = tmp_path / "page.html"
    code, out, err = run(capsys, *command.split(), SUBURBAN, "--page", target, "--units", "us", "--quiet")
    assert code == 0, err
    words = _drawing_words(target.read_text(encoding="utf-8"))
    assert "oak 39.4 ft" in words
    assert "east [ft]" in words and "height above ground [ft]" in words
    metric = [w for w in words if re.search(r"\d\s*(m|mm|km)\b|\[m\]", w)]
    assert not metric, metric


def test_new_result_keys_appear_without_new_code(built_in):
    """Parts of the result this page does not know by name are still shown, as tables and lists."""
    from aerial.outputs.page_report import report_page

    result, _ = built_in
    extended = dict(result, interference=[{"station": "Example One", "level_db": -12.5, "frequency_hz": 999e3}],
                    tuning=dict(result["tuning"], network_notes=["a note from a new part"]))
    page = report_page(extended)
    assert 'id="more-interference"' in page
    assert "Example One" in page and "-12.5 dB" in page and "999 kHz" in page
    assert "a note from a new part" in page


#: Every candidate support inside the fall zone of a power line (invented for this test).
ALL_REFUSED = MINIMAL.replace('points = [[0, 0, 0.5], [0, 0, 10]]', 'points = [[0, 0, 0.5], [0, 0, 3]]') + """
[plan]
lot = [[-5, -5], [40, -5], [40, 10], [-5, 10]]

[plan.entry]
at = [0, 0]
height = "2 m"

[[plan.supports]]
name = "pole a"
at = [10, 5]
height = "9 m"

[[plan.supports]]
name = "pole b"
at = [30, 5]
height = "9 m"

[[plan.overhead_lines]]
name = "line <x>"
path = [[-20, 8], [60, 8]]
height = "8 m"
kind = "power"
"""


def test_layout_page_when_every_candidate_is_refused(capsys, write_site, tmp_path):
    target = tmp_path / "plan.html"
    code, out, err = run(capsys, "layout", write_site(ALL_REFUSED), "--json", "--page", target)
    assert code == 0, err
    data = json.loads(out)
    assert data["layouts"] == [] and data["candidates_refused_safety"] == data["candidates_considered"]
    page = target.read_text(encoding="utf-8")
    assert "No safe layout was found" in page
    assert 'id="plan-view"' in page and 'id="side-elevation"' not in page
    assert "line &lt;x&gt;" in page and "<x>" not in page
    assert f">{data['candidates_refused_safety']}<" in page


#: The invented sloping wire of ``conftest.SLOPING_WIRE`` (29.93 m of wire: its metric warning says
#: "29.9 m", 98.1 ft if read back from those digits, 98.2 ft from the exact length as the tables write it;
#: 1 ft = 0.3048 m exactly, NIST SP 811), with one station 40 km away, on a coarse sweep.
WITH_STATION = (SLOPING_WIRE.replace('bands = ["mf"]', 'bands = ["mf"]\nfrequency_step = "100 kHz"')
                + '\n[[stations]]\nname = "Demo Talk"\nfrequency = "1 MHz"\npower = "10 kW"\ndistance = "40 km"\n')


def _page_text(page: str) -> str:
    """The words a reader sees on the page outside its drawings: tags, style and SVG removed, entities read."""
    import html

    page = re.sub(r"<svg\b.*?</svg>|<style>.*?</style>", " ", page, flags=re.S)
    return html.unescape(re.sub(r"<[^>]+>", " ", page)).replace("\u00a0", " ")


def test_report_page_writes_every_length_as_the_terminal_does_under_us_units(capsys, write_site, tmp_path):
    """Under --units us the page's tables and text give the terminal's own figures, in feet and miles.

    Consistency check between the outputs of one site: the wire, its height, the effective height at
    the band's centre and the station's distance read the same on the page as in the terminal report
    (40 km = 24.9 mi, 1 mi = 1609.344 m exactly, NIST SP 811), a warning's length is the tables' figure
    (written from the exact length, not from its rounded metric digits), and nothing is left in metres.
    """
    from aerial.outputs.terminal import Lengths, centre_index

    site = write_site(WITH_STATION)
    code, out, err = run(capsys, "report", site, "--json")
    assert code == 0, err
    data = json.loads(out)
    target = tmp_path / "report.html"
    code, out, err = run(capsys, "report", site, "--units", "us", "--page", target, "--width", "1000")
    assert code == 0, err
    out = out.replace("\u00a0", " ")
    page = _page_text(target.read_text(encoding="utf-8"))
    # the terminal's summary line, figure for figure, in the page's sentence
    total, highest, mean = re.search(r"aerial \+ lead-in (\S+ \S+) · highest (\S+ \S+) · mean height (\S+ \S+)",
                                     out).groups()
    assert f"{total} of wire with its lead-in, highest point {highest}, mean height {mean}" in page
    L = Lengths("us")
    i = centre_index(data)
    figures = [L(data["geometry"]["total_length_m"]), L(data["aerial"]["effective_height_m"][i]),
               L.distance(data["stations"][0]["distance_m"])]
    assert figures[0] == "98.2 ft" and figures[-1] == "24.9 mi"
    for figure in figures:
        assert figure in out and figure in page, figure
    warning = "total wire length 98.2 ft is above 1/8 wavelength"
    assert warning in out and warning in page and "98.1 ft" not in page
    metric = Lengths.PATTERN.findall(page)
    assert not metric, metric


def test_layout_page_writes_every_length_as_the_terminal_does_under_us_units(capsys, tmp_path):
    """The layout page under --units us: each layout's wire and effective height, its reason line and the
    nearest miss read as in the terminal's listing (consistency check), and nothing is left in metres."""
    target = tmp_path / "plan.html"
    code, out, err = run(capsys, "layout", SUBURBAN, "--units", "us", "--page", target, "--quiet", "--width", "1000")
    assert code == 0, err
    out = out.replace("\u00a0", " ")
    page = _page_text(target.read_text(encoding="utf-8"))
    rows = re.findall(r"│ (\d) │ .*? │ +(\S+ ft) │ +(\S+ ft) │", out)
    assert len(rows) >= 2
    for rank, wire, height in rows:
        assert re.search(rf"#{rank} .*? {re.escape(wire)} .*? {re.escape(height)} ", page), (rank, wire, height)
    reasons = re.findall(r"^ +\d\. +(h_e .*?) *$", out, flags=re.M)
    assert reasons and all(reason in page for reason in reasons)
    miss = re.search(r"nearest miss: (.*)", out).group(1).strip()
    assert "ft short of the" in miss and miss in page
    from aerial.outputs.terminal import Lengths

    metric = Lengths.PATTERN.findall(page)
    assert not metric, metric


def test_consistency_stations_card_gives_day_and_night_verdicts_when_they_differ():
    # consistency check: the headline's stations card counts the stations table's verdicts; a station
    # not heard by day but heard by night (sky wave) is said with both, not as "not heard" alone
    # (invented verdicts)
    from aerial.outputs.page_report import headline

    result = {"frequencies_hz": [9.4e5], "aerial": {}, "stations": [
        {"verdict": "not heard", "night": {"verdict": "marginal"}},
        {"verdict": "clearly heard", "night": {"verdict": "clearly heard"}}]}
    cards = dict((label, text) for label, text, _ in headline(result))
    assert cards["stations (2 listed)"] == "by day 1 not heard, 1 clearly heard; by night 1 marginal, 1 clearly heard"
    result["stations"][0]["night"]["verdict"] = "not heard"
    cards = dict((label, text) for label, text, _ in headline(result))
    assert cards["stations (2 listed)"] == "1 not heard, 1 clearly heard"


def test_what_if_headings_name_quantities_and_cells_carry_units(built_in):
    """Consistency check of the page against its own cells: the what-if table wrote "capacitance [F]" over cells in
    picofarads; each cell says its unit and prefix, so a heading names the quantity alone."""
    _, page = built_in
    part = page[page.index('<section id="what-if"'):]
    part = part[:part.index("</section>")]
    headings = re.findall(r"<th[^>]*>(.*?)</th>", part)
    assert "capacitance" in headings and not any("[" in h for h in headings), headings
    assert re.search(r"<td><span class=\"q\">[\d.]+ pF</span></td>", part)


def test_plan_view_draws_the_building_the_figures_take_in(capsys, tmp_path):
    """Input-handling check on the balcony example less its [plan]: the plan view still draws the [building]
    footprint the report models (it drew only the [plan]'s buildings, so a flat's block was missing)."""
    text = (EXAMPLES[0].parent / "balcony_water_pipe.toml").read_text(encoding="utf-8")
    site = tmp_path / "site.toml"
    site.write_text(text[:text.index("[plan]")], encoding="utf-8")
    page = tmp_path / "report.html"
    code, _, err = run(capsys, "report", site, "--page", page)
    assert code == 0, err
    html = page.read_text(encoding="utf-8")
    plan = html[html.index('id="plan-view"'):]
    plan = plan[:plan.index("</figure>")]
    assert "building (reinforced concrete)" in plan


def _matplotlib_svg(fig) -> str:
    """``fig`` saved by matplotlib's own ``savefig`` (its SVG canvas, its layout pass), named as the charts name it."""
    import io

    import matplotlib

    from aerial.outputs import charts

    name, label = fig.aerial_svg
    buf = io.StringIO()
    with matplotlib.rc_context({**charts._RC, "svg.hashsalt": f"aerial-{name}"}):
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "aerial", "Title": label})
    return charts.named_svg(buf.getvalue(), name, label)


def test_charts_are_the_svg_matplotlib_itself_saves(built_in):
    """The one-pass drawing with text measured once per process (aerial.outputs.svg_canvas) changes no byte:
    each chart, drawn with the measurement store emptied and again with it full, is the very text
    matplotlib's own savefig writes (layout pass and all). Our own check; matplotlib is the reference."""
    from aerial.outputs import charts, site_drawings, svg_canvas

    result, _ = built_in
    scene = site_drawings.report_scene(result)
    makers = [(charts.station_design_figure, result), (charts.impedance_figure, result),
              (charts.station_figure, result), (site_drawings.plan_figure, scene)]
    for make, arg in makers:
        svg_canvas._STORES.clear()
        first = charts.chart_svg(make(arg))
        again = charts.chart_svg(make(arg))
        assert first == again == _matplotlib_svg(make(arg)), make.__name__


def test_pictures_and_page_of_one_run_draw_each_chart_once(monkeypatch, tmp_path):
    import aerial.outputs.charts
    from aerial.api import run_report

    real_svg, drawn = aerial.outputs.charts.svg_of, []

    def counted(fig, name, label):
        drawn.append(name)
        return real_svg(fig, name, label)

    monkeypatch.setattr(aerial.outputs.charts, "svg_of", counted)
    result = run_report(None, page=str(tmp_path / "p.html"), pictures=str(tmp_path / "pics"))
    assert sorted(drawn) == sorted(set(drawn)) and len(drawn) == 7  # five shared charts, plan and elevation
    page = (tmp_path / "p.html").read_text(encoding="utf-8")
    for path in result["pictures"]:
        picture = open(path, encoding="utf-8").read()
        assert re.search(r"<svg\b.*?</svg>", picture, flags=re.S).group(0) in page, path
