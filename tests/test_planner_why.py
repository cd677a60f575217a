"""The planner says why: refusals by cause with the nearest miss, a blocking part named, the score's meaning,
the power lines labelled on the drawing; and a listed layout carries the report's figures for that wire.

Sites are invented test inputs; the agreement with ``aerial report`` is a consistency check of aerial's own
models (the same wire must give the same figures), not a published value.
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET

import pytest

from aerial.planner.search import plan_layouts
from aerial.site.reader import load_site, load_site_text

from .conftest import ROOT, run

EXAMPLE = ROOT / "site_examples" / "suburban_lot_service_line.toml"


@pytest.fixture(scope="module")
def example_result():
    return plan_layouts(load_site(EXAMPLE), best=5)


def test_refusals_are_grouped_by_cause(example_result):
    r = example_result
    ref = r["refusals"]
    assert ref["total"] == r["candidates_refused"] == ref["safety"] + ref["geometry"]
    assert ref["safety"] == r["candidates_refused_safety"] > 0
    by_cause = {c["cause"]: c["count"] for c in ref["causes"]}
    # one power line: every safety refusal is inside its fall zone (none crosses it in this lot)
    assert by_cause['inside the fall zone of power line "street service line"'] == ref["safety"]
    geometry = sum(c["count"] for c in ref["causes"] if c["kind"] == "geometry")
    assert geometry == ref["geometry"] == sum(r["excluded"].values())
    counts = [c["count"] for c in ref["causes"]]
    assert counts == sorted(counts, reverse=True) and 0 not in counts


def test_the_nearest_miss_and_the_blocking_support_are_named(example_result):
    ref = example_result["refusals"]
    miss = ref["nearest_miss"]
    assert miss["line"] == "street service line" and miss["short_by_m"] > 0
    assert '"front cherry"' in miss["layout"]  # the cherry stands 7 m from the line; 12 m is needed
    blocking = ref["blocking"][0]
    assert blocking["part"] == 'support "front cherry"' and blocking["count"] == ref["safety"]
    assert blocking["distance_m"] == pytest.approx(7.0)  # (15, 4) to the line y = -3


ENTRY_BY_THE_DROP = """
[site]
name = "entry beside the service drop"
bands = ["mf"]

[[runs]]
points = [[0, 0, 2], [0, 0, 6]]

[receiver]
at = [0, 0]
height = "1 m"

[[earth.rods]]
length = "2.4 m"

[plan]
building = "house"

[plan.entry]
at = [0, 0]
height = "2 m"

[[plan.overhead_lines]]
name = "service drop"
path = [[-20, -6], [40, -6]]
height = "6 m"
kind = "power"

[[plan.supports]]
name = "mast A"
at = [0, 30]
height = "6 m"
kind = "mast"

[[plan.supports]]
name = "mast B"
at = [20, 30]
height = "6 m"
kind = "mast"

[[plan.supports]]
name = "low post"
at = [20, 10]
height = "3 m"
kind = "pole"
"""


def test_an_entry_beside_the_service_drop_is_named_as_what_blocks(capsys, tmp_path):
    # the entry is 6 m from the line: every layout with a 6 m support needs 9 m, so the lead-in end is inside
    p = tmp_path / "drop.toml"
    p.write_text(ENTRY_BY_THE_DROP, encoding="utf-8")
    code, out, _ = run(capsys, "layout", p, "--json")
    assert code == 0
    ref = json.loads(out)["refusals"]
    entry = [b for b in ref["blocking"] if b["part"] == "the entry point"]
    assert entry and entry[0]["line"] == "service drop" and entry[0]["distance_m"] == pytest.approx(6.0)
    code, out, _ = run(capsys, "layout", p, "--width", "100")
    assert code == 0
    assert "blocking: the entry point (0.0, 0.0) m, where every lead-in ends, is 6 m from power line" in " ".join(
        out.split())
    # in feet, the position and the distance alike (6 m = 19.7 ft; NIST SP 811: 1 ft = 0.3048 m exactly)
    code, out, _ = run(capsys, "layout", p, "--width", "100", "--units", "us")
    assert code == 0
    assert "blocking: the entry point (0.0, 0.0) ft, where every lead-in ends, is 19.7 ft from power line" in " ".join(
        out.split())


def test_layout_report_says_why_and_what_the_score_means(capsys):
    code, out, _ = run(capsys, "layout", EXAMPLE, "--width", "300")  # wide enough that no header wraps
    assert code == 0
    flat = " ".join(out.split())
    assert "refused (71 for safety, 37 for geometry)" in flat
    assert 'safety: inside the fall zone of power line "street service line"' in flat
    assert "nearest miss: " in flat and 'blocking: support "front cherry"' in flat
    assert "signal [dBW]" in flat and "vs #1" in flat
    assert "signal: the mean over the listed stations of the power the aerial can deliver" in flat
    assert "figures: the figures and scores of the listed layouts are the closed forms of 'aerial report'" in flat


def test_power_lines_are_labelled_on_the_drawing(capsys, tmp_path):
    out_svg = tmp_path / "plan.svg"
    code, _, _ = run(capsys, "layout", EXAMPLE, "--picture", out_svg, "--quiet")
    assert code == 0
    labels = [e.text for e in ET.parse(out_svg).getroot().iter() if e.get("class") == "line-label"]
    # 18 m = max(1.5 x 12 m oak, 7.5 m line height): the top-ranked layout's tallest support is the oak
    assert "street service line (power line, 7.5 m high): keep 18 m clear" in labels
    assert "street telephone/cable (telephone/cable, 5.5 m high)" in labels


ONE_SPAN = """
[site]
name = "one span"
bands = ["mf"]

[wire]
gauge = "14 AWG"

[supports.house]
at = [0, 0]
height = "6 m"
kind = "eave"

[supports.tree]
at = [30, 0]
height = "9 m"
kind = "tree"

{wires}

[receiver]
at = [0, -1]
height = "1.5 m"

[[earth.rods]]
length = "2.4 m"
at = [0, -1]

[[stations]]
name = "test station"
frequency = "1000 kHz"
power = "10 kW"
distance = "30 km"

[plan]
building = "house"

[plan.entry]
at = [0, -1]
height = "1.5 m"
"""


def test_a_layout_and_the_report_of_the_same_wire_agree(capsys, tmp_path):
    # one file: its own wire is the inverted-L the planner also finds among the two supports
    site = tmp_path / "one_span.toml"
    site.write_text(ONE_SPAN.format(wires='[[spans]]\nfrom = "tree"\nto = "house"\n\n[lead_in]\nfrom = "house"'),
                    encoding="utf-8")
    code, out, _ = run(capsys, "layout", site, "--json", "--best", "10")
    assert code == 0
    result = json.loads(out)
    lay = next(x for x in result["layouts"] if x["family"] == "span")  # inverted-L: tree to house, lead-in at house
    assert lay["supports"] == ["tree", "house"]
    code, out, _ = run(capsys, "report", site, "--json")
    assert code == 0
    rep = json.loads(out)
    assert lay["figures_at_hz"] == rep["earth"]["centre_frequency_hz"]  # the report's what-if and earth frequency
    i = rep["frequencies_hz"].index(lay["figures_at_hz"])
    # consistency check: the same wire, the same model, the same earth -> the same figures
    assert lay["effective_height_m"] == pytest.approx(rep["aerial"]["effective_height_m"][i], rel=1e-9)
    assert lay["capacitance_f"] == pytest.approx(rep["aerial"]["capacitance_f"][i], rel=1e-9)
    assert lay["earth_resistance_ohm"] == pytest.approx(rep["aerial"]["ground_loss_ohm"][i], rel=1e-9)
    assert lay["score"] == pytest.approx(result["present_wire"]["score"], abs=1e-9)
    assert "closed forms of 'aerial report'" in lay["figures_model"]
    # the screening figures stay visible beside them
    assert set(lay["screening"]) == {"effective_height_m", "capacitance_f", "score"}
