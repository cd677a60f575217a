"""Power-line clearance: fall-zone geometry, crossings, and the refusal of a site's own unsafe wires.

The rule under test: every wire, support and the lead-in at least 1.5 x the
tallest point of the aerial or its supports, horizontally, from a power line
(US Consumer Product Safety Commission safety alerts on antennas near power
lines -- from memory), never less than the line's own height (aerial's own
floor), and no wire crossing a power line in plan. The sites are invented
test inputs; distances in the expected messages are worked by hand from the
rule (consistency checks, not published values).
"""

import math

import numpy as np
import pytest
import shapely
from shapely.geometry import LineString, Point
from shapely.testing import assert_geometries_equal

from aerial.cli import EXIT_REFUSED, EXIT_USER, main
from aerial.planner.clearance import (
    FALL_ZONE_FACTOR,
    QUAD_SEGS,
    check_site_clearance,
    enforce_site_clearance,
    fall_zone,
    fall_zone_distance,
    refuse_many,
)
from aerial.core.errors import SafetyRefusal, SiteError
from aerial.site.plan import line_kind, parse_plan, site_plan
from aerial.site.reader import load_site_text

# An invented site: a 12 m oak and a 5 m eave, a span between them, the
# lead-in from the eave to the receiver. A power line runs east-west at
# y = LINE_Y, 7.5 m high. The tallest point is the oak: 1.5 x 12 = 18 m needed.
SITE = """
[site]
name = "clearance test"

[supports.eave]
at = [0, {eave_y}]
height = "5 m"
kind = "eave"

[supports.oak]
at = [{oak_x}, {oak_y}]
height = "12 m"
kind = "tree"

[[spans]]
from = "eave"
to = "oak"

[lead_in]
from = "eave"
{lead_via}

[receiver]
at = [{rx_x}, {rx_y}]
height = "1 m"

[[earth.rods]]
length = "2.4 m"

[plan]
lot = [[-30, -50], [40, -50], [40, 60], [-30, 60]]

[[plan.overhead_lines]]
name = "street line"
path = [[-100, 0], [100, 0]]
height = "7.5 m"
{kind}
"""


def make(eave_y=30.0, oak_x=20.0, oak_y=30.0, rx=(0.0, 31.0), lead_via="", kind='kind = "power"'):
    text = SITE.format(eave_y=eave_y, oak_x=oak_x, oak_y=oak_y, rx_x=rx[0], rx_y=rx[1], lead_via=lead_via, kind=kind)
    return load_site_text(text, "clearance.toml")


# --------------------------------------------------------------------------- the distance rule


def test_fall_zone_factor_is_one_and_a_half():
    # US CPSC safety alerts (from memory): 1.5 x the height of the antenna or its support
    assert FALL_ZONE_FACTOR == 1.5
    assert float(fall_zone_distance(12.0, 7.5)) == pytest.approx(18.0)


def test_fall_zone_never_less_than_the_line_height():
    # aerial's own floor: a 3 m aerial near a 9 m line keeps at least 9 m away
    assert float(fall_zone_distance(3.0, 9.0)) == pytest.approx(9.0)
    assert np.allclose(fall_zone_distance(np.array([2.0, 10.0]), 8.0), [8.0, 15.0])


@pytest.mark.parametrize("quad_segs", [1, 4, 16])
def test_fall_zone_polygon_contains_every_point_within_the_distance(quad_segs):
    # consistency: the polygon is drawn around the true zone, so points just inside d are inside it
    line = LineString([(0, 0), (10, 5)])
    d = 6.0
    zone = fall_zone(line, d, quad_segs=quad_segs)
    ang = np.linspace(0, 2 * np.pi, 721)
    for end in ((0, 0), (10, 5)):
        pts = shapely.points(end[0] + 0.999999 * d * np.cos(ang), end[1] + 0.999999 * d * np.sin(ang))
        assert shapely.covers(zone, pts).all()
    # and it is no bigger than the circumscribed buffer it claims to be
    assert_geometries_equal(zone, shapely.buffer(line, d / math.cos(math.pi / (4 * quad_segs)), quad_segs=quad_segs))


def test_buffers_pass_quad_segs_explicitly():
    # the default of the module is stated, not shapely's own default
    assert QUAD_SEGS == 16


# --------------------------------------------------------------------------- a site's own wires


def test_wire_well_outside_the_zone_passes():
    site = make()  # everything at y >= 30: 30 m from the line, 18 m needed
    report = enforce_site_clearance(site)
    assert not report.refused
    assert report.tallest_m == pytest.approx(12.0)


def test_wire_inside_the_zone_is_refused_with_distances():
    site = make(eave_y=10.0, oak_y=30.0, rx=(0.0, 11.0))  # the eave end of the span is 10 m from the line
    with pytest.raises(SafetyRefusal) as err:
        enforce_site_clearance(site)
    msg = str(err.value)
    assert 'power line "street line": 18 m needed (1.5 × 12 m); inside: the wire "span eave to oak" (10 m)' in msg
    assert 'support "oak"' in msg
    assert "move them at least 8 m further away" in msg
    assert "never less than the line's height" in msg
    # one short line with the rule, then a line per breach; no rule repeated
    lines = msg.splitlines()
    assert len(lines[0]) < 250 and all(len(line) < 250 for line in lines) and msg.count("1.5 ×") <= len(lines)


def test_span_crossing_the_line_in_plan_is_refused():
    site = make(eave_y=30.0, oak_x=5.0, oak_y=-30.0, rx=(0.0, 31.0))
    with pytest.raises(SafetyRefusal, match=r'inside: the wire "span eave to oak" \(crosses it\)'):
        enforce_site_clearance(site)


def test_lead_in_crossing_the_line_is_refused():
    # the aerial is 30 m north of the line, but the lead-in is routed across it to a receiver south of the line
    site = make(rx=(0.0, -40.0), lead_via="via = [[0, -40, 3]]")
    with pytest.raises(SafetyRefusal) as err:
        enforce_site_clearance(site)
    msg = str(err.value)
    assert 'the lead-in "lead-in" (crosses it)' in msg
    assert 'the wire "span eave to oak"' not in msg


def test_support_whose_fall_zone_reaches_the_line_is_refused():
    # the oak stands 16 m from the line; a 12 m oak needs 18 m
    site = make(eave_y=30.0, oak_x=20.0, oak_y=16.0)
    with pytest.raises(SafetyRefusal) as err:
        enforce_site_clearance(site)
    assert 'power line "street line": 18 m needed (1.5 × 12 m); inside: ' in str(err.value)
    assert 'the support "oak" (16 m)' in str(err.value)
    assert "at least 2 m further" in str(err.value)


def test_unknown_line_kind_is_a_power_line():
    site = make(eave_y=10.0, rx=(0.0, 11.0), kind='kind = "overhead"')
    with pytest.raises(SafetyRefusal, match="power line"):
        enforce_site_clearance(site)
    site = make(eave_y=10.0, rx=(0.0, 11.0), kind="")
    with pytest.raises(SafetyRefusal):
        enforce_site_clearance(site)
    assert line_kind("Telephone")[0] == "telephone/cable"
    assert line_kind(None) == ("power", "kind not given: treated as a power line")


def test_telephone_line_crossing_is_a_warning_not_a_refusal():
    site = make(eave_y=30.0, oak_x=5.0, oak_y=-30.0, kind='kind = "telephone/cable"')
    report = enforce_site_clearance(site)
    assert not report.refused
    assert any('crosses the telephone/cable line "street line"' in w for w in report.warnings)


def test_wire_outside_the_lot_is_a_warning():
    site = make(oak_x=60.0)
    report = check_site_clearance(site)
    assert not report.refused
    assert any('wire "span eave to oak" runs outside the lot' in w for w in report.warnings)


def test_the_plan_read_when_the_site_loads_is_the_one_the_check_uses(monkeypatch):
    # the [plan] table is validated once, by the loader; the clearance check reads the kept plan
    site = make(oak_x=60.0)
    assert site.parsed_plan is not None and site.parsed_plan.lines[0].name == "street line"

    def read_again(_site):
        raise AssertionError("[plan] read a second time")

    monkeypatch.setattr("aerial.site.plan.parse_plan", read_again)
    assert site_plan(site) is site.parsed_plan
    assert any("runs outside the lot" in w for w in check_site_clearance(site).warnings)


def test_site_without_plan_passes():
    text = SITE.format(eave_y=1.0, oak_x=20.0, oak_y=1.0, rx_x=0, rx_y=2, lead_via="", kind="")
    text = text.split("[plan]")[0]
    assert not enforce_site_clearance(load_site_text(text, "noplan.toml")).refused


def test_invalid_polygon_is_rejected_with_the_shapely_reason():
    bad = SITE.format(eave_y=30.0, oak_x=20.0, oak_y=30.0, rx_x=0, rx_y=31, lead_via="", kind="")
    bad = bad.replace("lot = [[-30, -50], [40, -50], [40, 60], [-30, 60]]", "lot = [[0, 0], [10, 10], [10, 0], [0, 10]]")
    with pytest.raises(SiteError, match=r"plan.lot = .*not a valid outline \(Self-intersection"):
        load_site_text(bad, "bad.toml")  # [plan] is read with the rest of the site


def test_refuse_many_matches_the_single_check():
    line_site = make()
    plan = parse_plan(line_site)
    paths = np.array([LineString([(0, 17), (5, 40)]), LineString([(0, 19), (5, 40)]), Point(3, 30)], dtype=object)
    refused, margin = refuse_many(paths, np.array([12.0, 12.0, 12.0]), plan.lines)
    assert refused.tolist() == [True, False, False]
    assert margin == pytest.approx([17 - 18, 19 - 18, 30 - 18])


# --------------------------------------------------------------------------- the command line


def test_check_refuses_an_unsafe_site_with_exit_3(tmp_path, capsys):
    text = SITE.format(eave_y=10.0, oak_x=20.0, oak_y=30.0, rx_x=0, rx_y=11, lead_via="", kind='kind = "power"')
    p = tmp_path / "unsafe.toml"
    p.write_text(text, encoding="utf-8")
    assert main(["check", str(p)]) == EXIT_REFUSED
    err = capsys.readouterr().err
    assert err.startswith(f"aerial: refused: {p}: this layout puts part of the aerial inside a power line's fall zone")
    assert "Traceback" not in err
    lines = err.strip().splitlines()  # one short line plus a line per reason, not a paragraph repeating the rule
    assert len(lines) == 2 and len(err) < 700, err
    assert lines[1].startswith('  power line "street line": 18 m needed')


def test_check_reports_an_invalid_plan_with_exit_2(tmp_path, capsys):
    text = SITE.format(eave_y=30.0, oak_x=20.0, oak_y=30.0, rx_x=0, rx_y=31, lead_via="", kind="")
    text = text.replace('height = "7.5 m"\n', "")
    p = tmp_path / "noheight.toml"
    p.write_text(text, encoding="utf-8")
    assert main(["check", str(p)]) == EXIT_USER
    assert "plan.overhead_lines[0].height" in capsys.readouterr().err


def test_report_refuses_an_unsafe_site_with_exit_3(tmp_path, capsys):
    text = SITE.format(eave_y=30.0, oak_x=20.0, oak_y=16.0, rx_x=0, rx_y=31, lead_via="", kind='kind = "power"')
    p = tmp_path / "unsafe.toml"
    p.write_text(text, encoding="utf-8")
    assert main(["report", str(p), "--json"]) == EXIT_REFUSED
    captured = capsys.readouterr()
    assert captured.out == ""
    assert 'the support "oak" (16 m)' in captured.err and 'power line "street line"' in captured.err


def test_example_site_passes_its_own_clearance():
    from aerial.site.reader import load_site

    from .conftest import ROOT

    report = enforce_site_clearance(load_site(ROOT / "site_examples" / "suburban_lot_service_line.toml"))
    assert not report.refused and report.warnings == []


def test_a_refusal_under_us_units_gives_the_distances_in_feet(tmp_path, capsys):
    """--units us: the refusal names its distances in feet, from the exact metres (the oak written as 35 ft
    reads 35 ft, not 35.1 ft from a rounded 10.7 m). 1 ft = 0.3048 m exactly (NIST SP 811)."""
    text = SITE.format(eave_y=10.0, oak_x=20.0, oak_y=30.0, rx_x=0, rx_y=11, lead_via="", kind='kind = "power"')
    p = tmp_path / "unsafe_ft.toml"
    p.write_text(text.replace('height = "12 m"', 'height = "35 ft"'), encoding="utf-8")
    assert main(["check", str(p), "--units", "us"]) == EXIT_REFUSED
    err = capsys.readouterr().err
    assert "(1.5 × its tallest point, 35 ft at support \"oak\"" in err, err
    # 1.5 x 35 ft = 52.5 ft needed (worked by hand)
    assert 'power line "street line": 52.5 ft needed (1.5 × 35 ft)' in err and " m " not in err.replace(p.name, "")
    assert main(["check", str(p)]) == EXIT_REFUSED  # metres as before without the option
    assert "16 m needed (1.5 × 10.7 m)" in capsys.readouterr().err


def test_layout_does_not_analyse_a_present_wire_that_breaks_the_rule(tmp_path, capsys):
    """aerial report refuses the site's own wire inside a fall zone; aerial layout does not print figures for it
    either (no "as 'aerial report' figures it" line, present_wire null), and its warnings say why."""
    import json

    text = SITE.format(eave_y=10.0, oak_x=20.0, oak_y=30.0, rx_x=0, rx_y=11, lead_via="", kind='kind = "power"')
    p = tmp_path / "unsafe_present.toml"
    p.write_text(text, encoding="utf-8")
    assert main(["report", str(p)]) == EXIT_REFUSED
    capsys.readouterr()
    assert main(["layout", str(p), "--width", "200"]) == 0
    out = capsys.readouterr().out
    assert "your present wire" not in out
    assert "Your present wire breaks the power-line rule" in " ".join(out.replace("│", " ").split())
    assert main(["layout", str(p), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["present_wire"] is None
