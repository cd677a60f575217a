"""The shared page in a real browser: headless Chromium opens it, reads it and prints it.

Checks: no console error or warning, nothing fetched, every section and picture
present and visible, the page's text holds the headline figures of the same
run's JSON (consistency checks), site strings show as text, and printing gives
one sheet per page part on A4 and on US Letter.

Chromium comes from the system's packages (Debian: chromium, chromium-driver;
``bash .ci/run`` installs them when missing). Where none can be installed the
test skips and says so.
"""

from __future__ import annotations

import json

import pytest

from aerial.outputs.terminal import eng

from .browser import Browser, find_browser, pdf_page_count
from .test_page import HOSTILE, REPORT_PICTURES, REPORT_SECTIONS, SUBURBAN

BROWSER = find_browser()
pytestmark = pytest.mark.skipif(
    BROWSER is None, reason="no Chromium-family browser on this machine (install the Debian packages chromium and "
                            "chromium-driver; bash .ci/run does this when it may use apt-get)")

#: JavaScript: for each id, whether the element exists and is rendered with a non-empty box.
VISIBLE = """
(ids) => Object.fromEntries(ids.map(id => {
  const el = document.getElementById(id);
  if (!el) return [id, "missing"];
  const r = el.getBoundingClientRect(), s = getComputedStyle(el);
  const shown = r.width > 0 && r.height > 0 && s.visibility !== "hidden" && s.display !== "none" && s.opacity !== "0";
  return [id, shown ? "visible" : "hidden"];
}))
"""

#: JavaScript: each figure's picture size on the screen [CSS px] and its words.
PICTURES = """
Array.from(document.querySelectorAll("figure.picture")).map(f => {
  const svg = f.querySelector("svg"), r = svg.getBoundingClientRect();
  return {id: f.id, width: r.width, height: r.height, texts: svg.querySelectorAll("text").length,
          words: svg.textContent};
})
"""


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    """Pages written by the command line and the JSON of the same runs."""
    from aerial.api import run_layout, run_report

    folder = tmp_path_factory.mktemp("browser")
    report = run_report(None, page=str(folder / "report.html"))
    layout = run_layout(str(SUBURBAN), page=str(folder / "plan.html"))
    hostile_site = folder / "hostile.toml"
    import textwrap

    hostile_site.write_text(textwrap.dedent(HOSTILE), encoding="utf-8")
    run_report(str(hostile_site), page=str(folder / "hostile.html"))
    return folder, report, layout


@pytest.fixture(scope="module")
def browser():
    with Browser(BROWSER) as b:
        yield b


def test_report_page_in_the_browser(browser, pages):
    folder, result, _ = pages
    browser.open(folder / "report.html")
    assert browser.problems() == []
    seen = browser.evaluate(f"({VISIBLE})({json.dumps(list(REPORT_SECTIONS + REPORT_PICTURES))})")
    assert set(seen.values()) == {"visible"}, seen
    pictures = browser.evaluate(PICTURES)
    assert [p["id"] for p in pictures] == list(REPORT_PICTURES)
    for p in pictures:
        assert p["width"] > 300 and p["height"] > 100, p["id"]
        assert p["texts"] > 3, p["id"]  # words are text in the picture
    assert "frequency [kHz]" in " ".join(p["words"] for p in pictures)
    assert browser.evaluate("performance.getEntriesByType('resource').length") == 0  # nothing fetched
    assert browser.evaluate("document.scripts.length") == 0
    text = browser.evaluate("document.body.innerText")
    earth = result["earth"]
    assert eng(earth["resistance_ohm"], "Ω") in text
    low, high = earth["resistance_range_at_centre_ohm"]  # the page shows the RF range of the earth's resistance
    assert f"{eng(low, 'Ω')} – {eng(high, 'Ω')}" in text
    assert result["tuning"]["coverage"]["verdict"] in text
    for s in result["stations"]:
        assert s["name"] in text and eng(s["detector_power_w"], "W") in text
    for caution in result["cautions"]:
        assert caution in text


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_report_page_prints_one_sheet_per_part(browser, pages, paper):
    folder, _, _ = pages
    browser.open(folder / "report.html")
    sheets = browser.evaluate("document.querySelectorAll('.sheet').length")
    assert sheets == 7  # summary, aerial, across the band, tuning, tuning for the stations, stations, safety
    assert pdf_page_count(browser.pdf(paper)) == sheets


def test_layout_page_in_the_browser(browser, pages):
    folder, _, layout = pages
    browser.open(folder / "plan.html")
    assert browser.problems() == []
    ids = ["summary", "drawings", "plan-view", "side-elevation", "layouts", "refusals", "code-checklist", "safety"]
    seen = browser.evaluate(f"({VISIBLE})({json.dumps(ids)})")
    assert set(seen.values()) == {"visible"}, seen
    text = browser.evaluate("document.body.innerText")
    assert layout["layouts"][0]["description"] in text
    assert "refused for safety" in text
    sheets = browser.evaluate("document.querySelectorAll('.sheet').length")
    for paper in ("A4", "Letter"):
        assert pdf_page_count(browser.pdf(paper)) == sheets


def test_site_strings_show_as_text_in_the_browser(browser, pages):
    folder, _, _ = pages
    browser.open(folder / "hostile.html")
    assert browser.problems() == []
    assert browser.evaluate("document.scripts.length") == 0
    assert browser.evaluate("document.images.length") == 0
    text = browser.evaluate("document.body.innerText")
    assert "<script>alert(1)</script>" in text
    assert '<b>Bold</b> & "quoted" </title><img src=x>' in text
    assert browser.evaluate("document.title").startswith('<b>Bold</b> & "quoted"')
