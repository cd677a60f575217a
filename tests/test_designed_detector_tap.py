"""The detector's tap designed with the coil when the site gives none.

The outside check: a load on a tap of a tuned circuit takes the most power where its resistance,
stepped up by the square of the turns ratio, equals the tank's dynamic resistance (the maximum power
transfer theorem, textbook; the ideal autotransformer's impedance ratio t², common practice); the
receiving network's solve is checked against it. The rest is input handling on an invented crystal-set
site (a 120 ft wire, no coil or capacitor given, germanium detector, high-impedance earphone): the band
design taps the detector down, the tank then resonates at every tuned row, both tuning tables name
the same parts, and a tap the site gives is kept.
"""

import json

import numpy as np
import pytest

from aerial.cli import main
from aerial.models import network as net_mod
from aerial.site.reader import load_site


def test_load_on_a_tap_takes_the_most_power_where_it_matches_the_tank():
    """Maximum power transfer theorem (textbook): a resistive load R_L on a tap t of a tightly wound coil
    (an ideal autotransformer, impedance ratio t²: common practice) takes the most power where R_L/t² equals
    the tank's dynamic resistance R_d, and then takes the source's available power I²R_d/4. Here the tank
    is a 240 µH coil of Q 150 at 1 MHz (R_p = QωL) fed from a 200 kΩ source resistance (R_d = R_p ∥ 200 kΩ),
    tuned to resonance at every tap; the load is 5 kΩ. Tolerances: 1 % on the best tap (the grid's step is
    0.5 %, and the coil's loss shared among the winding's sections makes the autotransformer not quite
    ideal), 0.2 % on the power (R_p = QωL holds to about 1/Q² here). Unlike the ideal current source of
    tests/models/test_network.py, the source's own resistance is part of the tank's dynamic resistance here, as
    the aerial's loading is in the band design."""
    f, L, q, r_s, r_load = 1e6, 240e-6, 150.0, 200e3, 5e3
    w = 2.0 * np.pi * f
    r_p = q * w * L  # the coil's parallel loss resistance at resonance, R_p = QωL (Q ≫ 1)
    r_d = 1.0 / (1.0 / r_p + 1.0 / r_s)
    taps = np.geomspace(0.05, 1.0, 600)
    power = []
    for t in taps:
        parts = net_mod.NetworkParts("direct", L, w * L / q, detector_tap=float(t))
        c = net_mod.tuning_capacitance_for(np.array([f]), np.array([r_s + 0j]), parts, 1.0 / r_load)
        v = net_mod.solve_network(np.array([f]), np.array([r_s + 0j]), parts, c, 1.0 / r_load).detector_voltage
        power.append(float(np.abs(v[0]) ** 2 / r_load))  # per volt of source EMF, squared [W]
    best = taps[int(np.argmax(power))]
    assert best == pytest.approx(np.sqrt(r_load / r_d), rel=0.01)
    available = (1.0 / r_s) ** 2 * r_d / 4.0  # a Norton source I = EMF/R_s across R_d, matched
    assert max(power) == pytest.approx(available, rel=0.002)


#: The invented crystal-set site: a 120 ft wire, no coil or capacitor, germanium detector, high-impedance
#: earphone; two invented stations in the band.
CRYSTAL = """
[site]
name = "Hillside crystal set"
noise = "rural"
soil = "good"

[wire]
gauge = "18 AWG"

[supports.house]
at = [0, 0]
height = "25 ft"

[supports.oak]
at = ["120 ft", "0 ft"]
height = "35 ft"

[[spans]]
from = "house"
to = "oak"

[lead_in]
from = "house"

[receiver]
at = [1, 0]
height = "3 ft"
detector = "germanium"
earphone = "high-impedance"

[[earth.rods]]
count = 1
length = "8 ft"
at = [1.5, 0]

[[stations]]
name = "Valley News 1010"
frequency = "1010 kHz"
power = "5 kW"
distance = "40 km"

[[stations]]
name = "Lakeside 700"
frequency = "700 kHz"
power = "25 kW"
distance = "70 mi"
"""


def _report(capsys, path, *extra):
    code = main(["report", str(path), *extra])
    out, err = capsys.readouterr()
    assert code == 0, err
    return out


def _with_receiver(lines: str) -> str:
    return CRYSTAL.replace("[receiver]\n", f"[receiver]\n{lines}\n")


@pytest.fixture(scope="module")
def designed(tmp_path_factory):
    """The crystal site's file."""
    path = tmp_path_factory.mktemp("crystal") / "crystal.toml"
    path.write_text(CRYSTAL)
    return path


def test_the_band_design_taps_the_detector_down_and_the_tank_resonates(capsys, designed):
    """Input handling: no tap given, so the band design chooses one below the top, says so, and every tuned row
    of the tuning table has a loaded Q above 1 (with the detector across the whole coil this wire's tank had none
    across most of the band)."""
    d = json.loads(_report(capsys, designed, "--json"))
    tuning = d["tuning"]
    assert tuning["detector_tap_designed"] is True
    assert tuning["detector_tap_ratio"] < 1.0
    tuned = [r for r in tuning["rows"] if r["tunable"]]
    assert tuned and all(r["loaded_q"] > 1.0 for r in tuned), [r["loaded_q"] for r in tuned if r["loaded_q"] <= 1]
    assert any("the detector's tap with them" in n for n in tuning["notes"])
    for s in d["stations"]:
        assert "audible_across_dial" not in s or not s["audible_across_dial"], s["name"]


def test_both_tuning_tables_name_the_same_designed_parts(capsys, designed):
    """Consistency: the station-tuning table's first row is the band design (its coupling, aerial tap and
    detector tap and its coil), labelled as designed, and the words compare against it as designed for the band,
    never as the site's own wiring."""
    d = json.loads(_report(capsys, designed, "--json"))
    tuning = d["tuning"]
    current = tuning["station_design"]["current"]
    assert current["detector_tap_ratio"] == tuning["detector_tap_ratio"]
    assert current["arrangement"] == tuning["arrangement"]
    if tuning["arrangement"] == "coil tap":
        assert current["aerial_tap_ratio"] == tuning["designed_tap_ratio"]
    assert current["coil_inductance_h"] == tuning["coil"]["inductance_h"]
    assert tuning["station_design"]["detector_tap_designed"] is True
    text = " ".join(_report(capsys, designed, "--width", "400").replace("│", " ").split())
    assert f"detector at {tuning['detector_tap_ratio']:.2f} of the turns (designed)" in text
    assert f"as designed aerial tap at {tuning['designed_tap_ratio']:.2f} of the turns " \
           f"{tuning['detector_tap_ratio']:.2f}" in text
    assert "as wired" not in text


def _weakest_to_detector(d) -> float:
    return min(r["power_transfer_ratio"] for r in d["tuning"]["rows"])


def test_the_designed_tap_serves_the_detector_best_of_the_taps(capsys, designed, tmp_path):
    """Input handling: with the designed coupling written in the site, each tap the design tries gives the
    detector at worst no more of the aerial's power across the band than the designed tap does."""
    d = json.loads(_report(capsys, designed, "--json"))
    tuning = d["tuning"]
    assert tuning["arrangement"] == "coil tap"  # the coupling designed for this wire (its note says why)
    coupling = f'coupling = "coil tap"\ntap = {tuning["designed_tap_ratio"]}'
    for m in (1.0, 0.5, 0.1):
        path = tmp_path / f"tap{m}.toml"
        path.write_text(_with_receiver(f"{coupling}\ndetector_tap = {m}"))
        other = json.loads(_report(capsys, path, "--json"))
        assert other["tuning"]["detector_tap_ratio"] == m
        assert _weakest_to_detector(other) <= _weakest_to_detector(d) * (1 + 1e-9), m


def test_a_detector_tap_the_site_gives_is_kept(capsys, tmp_path):
    """Input handling: detector_tap = 1 written in the site is the builder's choice: it is kept (and the tank then
    has no useful resonance across most of the band, as the table says), the coupling still designed."""
    path = tmp_path / "whole.toml"
    path.write_text(_with_receiver("detector_tap = 1.0"))
    d = json.loads(_report(capsys, path, "--json"))
    tuning = d["tuning"]
    assert tuning["detector_tap_ratio"] == 1.0
    assert "detector_tap_designed" not in tuning
    assert tuning["station_design"]["current"]["detector_tap_ratio"] == 1.0
    assert tuning["station_design"]["detector_tap_designed"] is False
    assert tuning["coupling_designed"] is True
    assert any(r["loaded_q"] < 1.0 for r in tuning["rows"])


def test_the_reader_tells_a_given_detector_tap_from_the_default(tmp_path):
    """Input handling: the site reader says whether detector_tap was written (the default, the top, is 1)."""
    path = tmp_path / "site.toml"
    path.write_text(CRYSTAL)
    rx = load_site(str(path)).receiver
    assert (rx.detector_tap_fraction, rx.detector_tap_given) == (1.0, False)
    path.write_text(_with_receiver("detector_tap = 1.0"))
    rx = load_site(str(path)).receiver
    assert (rx.detector_tap_fraction, rx.detector_tap_given) == (1.0, True)
