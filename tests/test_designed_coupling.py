"""A site that gives no coil and no capacitor: the designed parts (coil and coupling) cover the band.

The aerial's own capacitance can tune every coil below the top of the band when it goes straight to
the tank; the coupling is then designed with the coil. Run through the command line on an invented
site (input handling: a crystal-set builder asking what parts cover the band); the physics checks
compare the figures with textbook circuit laws computed with scipy.constants.
"""

import json

import numpy as np
from scipy import constants

from aerial.cli import main

#: A 30 m wire 10 m up with no tuning parts; three invented stations across the band.
NO_PARTS = """
[site]
name = "Backyard wire, no parts yet"
bands = ["mf"]

[[runs]]
points = [[0, 0, 1], [0, 0, 10], [30, 0, 10]]

[receiver]
at = [0, 0]
height = "1 m"

[[earth.rods]]
length = "2.4 m"

[[stations]]
name = "Low end talk"
frequency = "560 kHz"
power = "5 kW"
distance = "40 km"

[[stations]]
name = "Middle music"
frequency = "1000 kHz"
power = "10 kW"
distance = "60 km"

[[stations]]
name = "Top end news"
frequency = "1580 kHz"
power = "5 kW"
distance = "30 km"
"""

#: The common variable capacitor assumed when none is given (docs/models-receiver.md). [F]
ASSUMED_CAPACITOR_F = (15e-12, 365e-12)


def _report(capsys, path, *extra):
    code = main(["report", str(path), *extra])
    out, _ = capsys.readouterr()
    assert code == 0
    return out


def test_designed_parts_reach_every_listed_station_in_the_band(capsys, write_site):
    """With direct coupling no coil covers 520-1710 kHz under this wire (the aerial's capacitance tunes
    it below the top); the designed coil and coupling reach every listed station, and the report says so."""
    path = write_site(NO_PARTS)
    d = json.loads(_report(capsys, path, "--json"))
    tuning = d["tuning"]
    assert tuning["coverage"]["covered"] is True, tuning["coverage"]
    assert tuning["coupling_designed"] is True
    assert tuning["arrangement"] in ("series capacitor", "coil tap")
    for s in d["stations"]:
        assert s["tunable"] is True, s["name"]
        assert ASSUMED_CAPACITOR_F[0] <= s["capacitor_setting_f"] <= ASSUMED_CAPACITOR_F[1], s["name"]
        assert "out of the tuning range" not in s["verdict_text"]
    text = " ".join(_report(capsys, path, "--width", "400").replace("│", " ").split())
    assert "Band coverage: covers the band" in text
    assert "the coupling is designed with the coil" in text
    assert "out of the tuning range" not in text
    # a designed series capacitor needs its bleed caution too; a tap keeps the aerial's DC path through the coil
    bleed = any("Series coupling capacitor" in c for c in d["cautions"])
    assert bleed == (tuning["arrangement"] == "series capacitor")


def test_the_designed_coupling_serves_the_detector_best_here(capsys, write_site):
    """Input handling on the invented wire: of the couplings that cover the band, the designed one is the one
    that gives the detector the most at the worst frequency of the tuning table. Here that is a tap (the detector's
    tap designed with it); the note says which coupling came next."""
    d = json.loads(_report(capsys, write_site(NO_PARTS), "--json"))
    tuning = d["tuning"]
    assert tuning["arrangement"] == "coil tap"
    assert 0.05 <= tuning["designed_tap_ratio"] <= 0.5
    note = next(n for n in tuning["notes"] if "the coupling is designed with the coil" in n)
    assert "the next best" in note and "reaches the detector" in note


def test_designed_rows_resonate_by_the_textbook_formula(capsys, write_site):
    """With a 10 pF series capacitor written in the site and the coil left to the design, every row of the
    tuning satisfies f = 1/(2π√(LC)) (Thomson's formula; pi from
    scipy.constants), and the aerial's share of C at the bottom of the band is the aerial's series
    R + jX_a with the designed coupling capacitor in series (X = X_a - 1/(ωC_c)), turned into its shunt
    equivalent C_p = -X/(ω(R² + X²)) (the series-to-parallel conversion, common practice); 1 % for the
    coil's self-capacitance and the detector, which the network solve includes."""
    cc = 10e-12  # the coupling capacitor written below [F]
    site = NO_PARTS.replace('[receiver]\n', '[receiver]\ncoupling = "series capacitor"\ncoupling_capacitor = "10 pF"\n')
    d = json.loads(_report(capsys, write_site(site), "--json"))
    rows = d["tuning"]["rows"]
    for r in rows:
        f = 1.0 / (2.0 * constants.pi * np.sqrt(r["inductance_h"] * r["total_capacitance_f"]))
        assert abs(f / r["frequency_hz"] - 1.0) < 1e-6, r["frequency_hz"]
    assert d["tuning"]["arrangement"] == "series capacitor"
    f0 = rows[0]["frequency_hz"]
    i = int(np.argmin(np.abs(np.asarray(d["frequencies_hz"]) - f0)))
    assert abs(d["frequencies_hz"][i] / f0 - 1.0) < 1e-9
    w = 2.0 * constants.pi * f0
    r_a, x = d["aerial"]["series_resistance_ohm"][i], d["aerial"]["reactance_ohm"][i] - 1.0 / (w * cc)
    c_shunt = -x / (r_a**2 + x**2) / w  # series R + jX seen as a shunt capacitance: B = -X/(R² + X²)
    assert abs(rows[0]["aerial_shunt_capacitance_f"] / c_shunt - 1.0) < 0.01


def test_a_coupling_the_site_names_is_kept(capsys, write_site):
    """Input handling: coupling = "direct" written in the site is the builder's choice; the coil is designed
    for it and the report says what it covers instead of changing the coupling."""
    site = NO_PARTS.replace('[receiver]\n', '[receiver]\ncoupling = "direct"\n')
    d = json.loads(_report(capsys, write_site(site), "--json"))
    assert d["tuning"]["arrangement"] == "direct"
    assert "coupling_designed" not in d["tuning"]
    assert d["tuning"]["coverage"]["covered"] is False
    assert any("together with a coil" in a or "series capacitor" in a for a in d["tuning"]["advice"])


#: A 120 ft long wire 25-30 ft up over average ground with an 8 ft rod, no coil and no capacitor: a
#: crystal-set builder's first wire; two invented stations.
LONG_WIRE = """
[site]
name = "Long wire crystal set"
bands = ["mf"]
soil = "medium-dry"

[supports.gable]
at = [0, 0]
height = "25 ft"
kind = "gable"

[supports.tree]
at = ["120 ft", 0]
height = "30 ft"
kind = "tree"

[[spans]]
from = "gable"
to = "tree"

[lead_in]
from = "gable"

[receiver]
at = ["-2 ft", "2 ft"]
height = "3 ft"
detector = "germanium"
earphone = "high-impedance"

[[earth.rods]]
length = "8 ft"

[[stations]]
name = "Valley talk"
frequency = "610 kHz"
power = "10 kW"
distance = "35 mi"

[[stations]]
name = "Town music"
frequency = "1230 kHz"
power = "1 kW"
distance = "12 mi"
"""


def _weakest_to_detector(d) -> float:
    return min(r["power_transfer_ratio"] for r in d["tuning"]["rows"])


def test_long_wire_designed_coupling_gives_the_detector_the_most_of_the_covering_ones(capsys, write_site):
    """Input handling through the command line on a builder's long wire: the designed coupling covers the band,
    and its weakest "to detector" across the tuning table is at least what each other coupling that covers the
    band gives with its coil designed the same way (and the detector's tap designed with each): here a tap at 0.20
    of the turns and a 10 pF series capacitor (the largest E6 value that covers, whose weakest share is far
    smaller). The report says why it chose the coupling."""
    designed = json.loads(_report(capsys, write_site(LONG_WIRE), "--json"))
    assert designed["tuning"]["coupling_designed"] is True
    assert designed["tuning"]["coverage"]["covered"] is True
    for coupling in ('coupling = "coil tap"\ntap = 0.2', 'coupling = "series capacitor"\ncoupling_capacitor = "10 pF"'):
        other = json.loads(_report(capsys, write_site(LONG_WIRE.replace('[receiver]\n', f"[receiver]\n{coupling}\n")),
                                   "--json"))
        assert other["tuning"]["coverage"]["covered"] is True, coupling
        assert _weakest_to_detector(designed) >= _weakest_to_detector(other), coupling
    text = " ".join(_report(capsys, write_site(LONG_WIRE), "--width", "300").split())
    assert "the coupling is designed with the coil" in text and "the next best" in text


#: A 250 m wire 20 m up with no tuning parts (invented): a series capacitor with a coil range that
#: passes a coarse look across the band leaves a gap of a few kHz near its top.
LONG_WIRE_NO_PARTS = """
[site]
name = "Long wire, no parts yet"
bands = ["mf"]

[[runs]]
points = [[0, 0, 0.5], [0, 0, 20], [250, 0, 20]]

[receiver]
at = [0, 0]
height = "0 m"

[[earth.rods]]
length = "2.4 m"
"""


def test_designed_parts_are_chosen_by_the_check_the_coverage_makes(capsys, write_site):
    """Consistency check: the designed coil and coupling are chosen on the coverage verdict's own frequency
    grid, so a narrow gap the coverage would find (near 1.63 MHz under a 250 m × 20 m wire, which a
    25-point look across the band missed) rules a choice out: the report covers the band in one piece."""
    from aerial.estimate import reception as rc

    d = json.loads(_report(capsys, write_site(LONG_WIRE_NO_PARTS), "--json"))
    coverage = d["tuning"]["coverage"]
    assert coverage["covered"] is True, coverage
    assert coverage["reachable_ranges_hz"] == [[520e3, 1710e3]]
    assert d["tuning"]["coupling_designed"] is True
    aerial = rc._Aerial([520e3, 1710e3], [30.0, 30.0], [-100.0, -30.0])  # the grid alone matters here
    inside = rc._cover_grid(aerial, 520e3, 1710e3)[1:-1]
    assert np.isin(inside, rc._check_grid(*rc._check_span(aerial, 520e3, 1710e3))).all()
    text = " ".join(_report(capsys, write_site(LONG_WIRE_NO_PARTS), "--width", "400").replace("│", " ").split())
    assert "Band coverage: covers the band" in text


def test_consistency_check_coverings_searched_together_are_each_search_alone():
    """The covering coils of many couplings searched together (reception._covering_coils_many) are, to the last
    bit, those each coupling's own search finds, and so are the coils that only reach the band's top (consistency
    check on an invented short aerial)."""
    from aerial.estimate import reception as rc

    f = np.geomspace(400e3, 2e6, 40)
    x = -1 / (2 * np.pi * f * 180e-12)
    aerial = rc._Aerial(f, np.full(f.size, 30.0), x)
    parts = rc.TuningParts(capacitor_min_f=15e-12, capacitor_max_f=365e-12, earphone_ohm=2000.0)
    band = (530e3, 1700e3)
    trials = [t for t, _ in rc._coupling_candidates(parts)]
    trials += [parts._replace(arrangement="separate primary", primary_inductance_h=30e-6, coupling_coefficient=k)
               for k in (0.05, 0.1, 0.2, 0.4)]
    rc._COVERING_SEEN.clear()
    rc._REACHING_SEEN.clear()
    rc._covering_coils_many(band, aerial, trials)
    together = [rc._covering_coils(band, aerial, t) for t in trials]
    reach = [rc._reaching_coils(band, aerial, t) for t, c in zip(trials, together) if c is None]
    rc._COVERING_SEEN.clear()
    rc._REACHING_SEEN.clear()
    alone = [rc._covering_coils(band, aerial, t) for t in trials]
    assert together == alone and any(c is not None for c in alone)
    assert reach == [rc._reaching_coils(band, aerial, t) for t, c in zip(trials, alone) if c is None]


def test_consistency_check_couplings_weighed_together_are_each_weighed_alone():
    """The weakest shares to the detector of many couplings, each with its designed coil, weighed in one stacked
    solve (reception._weakest_shares) are, to the last bit, those each coupling's own solve gives (consistency
    check on invented aerials, every coupling tried with a coil still to be designed and every detector tap)."""
    from aerial.estimate import reception as rc

    f = np.geomspace(400e3, 2e6, 40)
    parts = rc.TuningParts(capacitor_min_f=15e-12, capacitor_max_f=365e-12, earphone_ohm=2000.0)
    band = (530e3, 1700e3)
    taps = (1.0,) + tuple(m for m in rc.DESIGN_DETECTOR_TAPS if m != 1.0)
    for c_aerial, r_aerial in ((180e-12, 30.0), (400e-12, 12.0), (90e-12, 60.0)):
        aerial = rc._Aerial(f, np.full(f.size, r_aerial), -1 / (2 * np.pi * f * c_aerial))
        designs = [(t, rc._share_coil(band, aerial, t, need_room=False)) for t, _ in rc._coupling_candidates(parts)]
        together = rc._weakest_shares(band, aerial, designs, taps)
        assert together == [rc._weakest_shares(band, aerial, [d], taps)[0] for d in designs]
        assert together[0] == rc._weakest_to_detector(band, aerial, designs[0][0], taps, need_room=False)
