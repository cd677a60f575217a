"""Consistency checks: the band coverage, the tuning table's settings and marks, the station verdicts and
the station design all come from the one network solve, so they agree on which frequencies the capacitor
reaches."""

import re
import pytest

from aerial.site.reader import load_site_text

from .conftest import EXAMPLES, run
from .test_station_design import BUILDER_SITE

# invented demo stations every 100 kHz across the MF band (weak, so they do not swamp one another), added to
# every site so that some fall outside each capacitor's reach
SPREAD = "".join(f'\n[[stations]]\nname = "Demo Spread {k}"\nfrequency = "{f} kHz"\npower = "5 kW"\ndistance = "60 km"\n'
                 for k, f in enumerate(range(540, 1701, 100)))


def _inside(f, pieces):
    return any(lo * (1 - 1e-9) <= f <= hi * (1 + 1e-9) for lo, hi in pieces)


def _check(result):
    tuning = result["tuning"]
    cov = tuning["coverage"]
    if "covered" not in cov:  # no capacitor range: nothing is out of range
        return 0
    pieces = cov.get("reachable_ranges_hz", [])
    band = tuning["band"]
    checked = 0
    for s in result["stations"]:
        f = s["frequency_hz"]
        if not band["from_hz"] <= f <= band["to_hz"]:
            continue
        for verdict in (s["verdict"], s["night"]["verdict"]):
            assert (verdict == "out of the tuning range") == (not _inside(f, pieces)), (s["name"], f, verdict, pieces)
        checked += 1
    for row in tuning["rows"]:
        assert row["within_capacitor_range"] == _inside(row["frequency_hz"], pieces), (row["frequency_hz"], pieces)
    design = tuning.get("station_design")
    if design is not None:
        for name in design["current"].get("out_of_reach", []):
            f = next(s["frequency_hz"] for s in result["stations"] if s["name"] == name)
            assert not _inside(f, pieces), (name, f, pieces)
    return checked


@pytest.mark.parametrize("path", EXAMPLES + ["builder"], ids=lambda p: getattr(p, "stem", p))
def test_consistency_check_out_of_range_verdicts_lie_outside_the_stated_coverage(path):
    """Every station judged 'out of the tuning range' (by day and by night) lies outside the coverage the
    report states, every other station inside it; likewise the tuning table's 'out of range' rows and the
    station design's 'out of reach' stations."""
    from aerial import analyse

    text = BUILDER_SITE if path == "builder" else path.read_text()
    result = analyse(load_site_text(text + SPREAD, "consistency.toml"))
    checked = _check(result)
    assert checked >= (10 if "covered" in result["tuning"]["coverage"] else 0)


def test_builder_site_coverage_agrees_with_the_verdicts_through_the_command_line(write_site, capsys):
    """The hand-wound coil tapped at half its turns: the report's coverage line ends below the 1215 kHz
    station that the station table calls out of the tuning range (consistency check)."""
    p = write_site(BUILDER_SITE)
    code, out, err = run(capsys, "report", p, "--width", "400")  # wide enough that no cell wraps
    assert code == 0, err
    flat = " ".join(out.split())
    m = re.search(r"Band coverage: does not cover the band: reaches (\d+) kHz to (\d+) kHz", flat)
    assert m, flat
    assert int(m.group(2)) < 1215 and "Demo Coast" in flat
    assert re.search(r"Demo Coast .*? out of the tuning range \(needs", flat)
