"""The command line, run in-process: exit codes, one-line messages, the JSON contract.

Sites here are the invented examples in site_examples/ and small invented test inputs.
"""

import hashlib
import json

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from aerial.cli import main
from aerial.estimate.reception import VERDICTS

from .conftest import EXAMPLES, MINIMAL, ROOT, one_line, run

REQUIRED_AERIAL_KEYS = (
    "capacitance_f", "effective_height_m", "radiation_resistance_ohm", "impedance_ohm",
    "conductor_loss_ohm", "ground_loss_ohm", "efficiency", "model",
)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_check_exits_0_on_examples(capsys, path):
    code, out, err = run(capsys, "check", str(path))
    assert code == 0, err
    assert "valid" in out


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_report_json_holds_the_contract(capsys, path):
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    code, out, err = run(capsys, "report", str(path), "--json")
    assert code == 0, err
    data = json.loads(out)
    for key in ("site", "geometry", "frequencies_hz", "aerial", "cautions", "warnings", "tuning", "stations"):
        assert key in data
    for key in ("wires", "feed_m", "total_length_m"):
        assert key in data["geometry"]
    for wire in data["geometry"]["wires"]:
        assert wire["role"] in ("aerial", "lead-in", "earth lead", "counterpoise")
        assert all(len(p) == 3 for p in wire["points_m"])
        assert wire["radius_m"] > 0
    n = len(data["frequencies_hz"])
    for key in REQUIRED_AERIAL_KEYS:
        assert key in data["aerial"], key
        if key != "model":
            assert len(data["aerial"][key]) == n
    assert all(len(z) == 2 for z in data["aerial"]["impedance_ohm"])
    assert data["cautions"], "every report carries the safety cautions"
    assert not any("could not be computed" in w for w in data["warnings"]), "no figure may be missing"
    for key in REQUIRED_AERIAL_KEYS[:-1]:
        assert None not in (data["aerial"][key] if key != "impedance_ohm" else sum(data["aerial"][key], []))
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before
    check_units_and_ranges(data)
    check_figures_plausible(data)


# Units of every numeric key: the suffix names the unit (docs/json-output.md). A few plain counts and
# dimensionless names are listed; anything else numeric must carry a unit suffix.
UNIT_BOUNDS = {  # suffix: (low, high) for the magnitude of a plausible value in that unit
    "_hz": (0.0, 30e6), "_m": (0.0, 1e7), "_f": (0.0, 1e-6), "_h": (1e-8, 1.0), "_ohm": (0.0, 1e9),
    "_w": (0.0, 1e7), "_v": (0.0, 1e3), "_v_per_m": (0.0, 10.0), "_s_m": (0.0, 10.0), "_db": (0.0, 400.0),
    "_q": (0.0, 1e4), "_ratio": (0.0, 10.0), "_deg": (0.0, 360.0), "_s": (0.0, 86_400.0),
}
PLAIN_NUMBERS = {"efficiency", "relative_permittivity", "relative_permittivity_range", "turns", "whole_turns", "solver_iterations", "count",
                 "points", "iterations", "score", "rank", "loaded_q_weak_signal"}


def _numbers(obj, key=""):
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _numbers(v, k)
    elif isinstance(obj, list):
        for v in obj:
            yield from _numbers(v, key)
    elif isinstance(obj, (int, float)) and not isinstance(obj, bool):
        yield key, float(obj)


# quality factors whose key carries a qualifier after "_q" (docs/json-output.md); checked as "_q"
Q_NAMES = {"loaded_q_weak_signal"}


def check_units_and_ranges(data):
    for key, v in _numbers(data):
        unit = "_q" if key in Q_NAMES else next(
            (u for u in sorted(UNIT_BOUNDS, key=len, reverse=True) if key.endswith(u)), None)
        assert unit is not None or key in PLAIN_NUMBERS, f"numeric key without a unit: {key}"
        if unit is not None:
            lo, hi = UNIT_BOUNDS[unit]
            assert lo <= abs(v) <= hi, f"{key} = {v!r} is outside {lo}–{hi}"


def check_figures_plausible(data):
    """Each aerial figure against an outside relation, at the frequencies where the closed forms claim validity
    (total wire length at most 1/8 wavelength; beyond it the report flags the figures)."""
    c0 = 299_792_458.0  # scipy.constants.c
    f = np.array(data["frequencies_hz"])
    assert np.all((f >= 10e3) & (f <= 30e6))  # the bands aerial covers: 10 kHz – 30 MHz
    a = {k: np.array(v) for k, v in data["aerial"].items() if k != "model"}
    geo = data["geometry"]
    ok = geo["total_length_m"] <= c0 / f / 8
    assert ok.any()
    h_max = geo["max_height_m"]
    he, rr, rs = a["effective_height_m"][ok], a["radiation_resistance_ohm"][ok], a["series_resistance_ohm"][ok]
    lam = c0 / f[ok]
    # h_e of a wire no higher than h_max lies in (0, h_max] (IEEE Std 145 definition; Balanis ch. 4)
    assert np.all((he > 0) & (he <= h_max * 1.001))
    # Rr = 160π²(h_e/λ)² for an electrically short aerial over perfect ground (Balanis ch. 4), within 2 %
    np.testing.assert_allclose(rr, 160 * np.pi**2 * (he / lam) ** 2, rtol=0.02)
    # capacitance of a backyard wire: tens to hundreds of picofarads (common practice); 5 pF – 5 nF
    assert np.all((a["capacitance_f"][ok] > 5e-12) & (a["capacitance_f"][ok] < 5e-9))
    # the loss budget: R = Rr + wire + earth, η = Rr/R, R = Re Z, V = E·h_e, P = V²/4R (circuit definitions)
    np.testing.assert_allclose(rs, rr + a["conductor_loss_ohm"][ok] + a["ground_loss_ohm"][ok], rtol=1e-9)
    np.testing.assert_allclose(a["efficiency"][ok], rr / rs, rtol=1e-9)
    np.testing.assert_allclose(a["impedance_ohm"][ok][:, 0], rs, rtol=1e-9)
    e = data["site"]["field_strength_v_per_m"]
    np.testing.assert_allclose(a["open_circuit_voltage_v"][ok], e * he, rtol=1e-9)
    np.testing.assert_allclose(a["available_power_w"][ok], (e * he) ** 2 / (4 * rs), rtol=1e-9)
    assert np.all(a["reactance_ohm"][ok] < 0)  # a wire shorter than λ/8 is capacitive
    earth = data["earth"]
    assert 0 < earth["resistance_low_ohm"] <= earth["resistance_ohm"] <= earth["resistance_high_ohm"]
    for st in data["stations"]:
        # ITU-R P.368: E0 = 300 √P_kW / d_km mV/m over perfect earth; a real ground only attenuates (|F| ≤ 1)
        e0 = 0.3 * np.sqrt(st["power_w"] / 1e3) / (st["distance_m"] / 1e3)
        ground = st.get("ground_wave_field_v_per_m", st["field_v_per_m"])
        assert 0 < ground <= e0 * (1 + 1e-9)
        assert ground == pytest.approx(e0 * st["ground_attenuation_ratio"], rel=1e-6)
        assert st["field_v_per_m"] >= ground * (1 - 1e-9)  # a sky wave can only add
        assert st["signal_to_noise_db"] == pytest.approx(
            20 * np.log10(st["field_v_per_m"] / st["noise_field_v_per_m"]), abs=0.01)
        assert st["verdict"] in VERDICTS and st["night"]["verdict"] in VERDICTS
        # V = E·h_e and P = V²/(4R) with the aerial's series resistance at the station's frequency (linear
        # interpolation on the grid, hence 2 %)
        assert st["open_circuit_voltage_v"] == pytest.approx(st["field_v_per_m"] * st["effective_height_m"], rel=1e-6)
        r_at = np.interp(st["frequency_hz"], f, a["series_resistance_ohm"])
        assert st["available_power_w"] == pytest.approx(st["open_circuit_voltage_v"] ** 2 / (4 * r_at), rel=0.02)


def test_report_without_site_uses_builtin_example(capsys):
    code, out, err = run(capsys, "report", "--json")
    assert code == 0, err
    assert json.loads(out)["site"]["file"] == "<built-in example>"


def test_rich_report_prints_cautions_and_tables(capsys):
    code, out, err = run(capsys, "report")
    assert code == 0, err
    assert "Safety" in out and "gas piping" in out
    assert "effective height" in out


def test_json_is_deterministic(capsys):
    _, first, _ = run(capsys, "report", "--json")
    _, second, _ = run(capsys, "report", "--json")
    assert first == second


def test_bad_file_exits_2_with_one_line(capsys, write_site):
    bad = write_site(MINIMAL.replace("[0, 0, 0.5]", "[0, 0, -1]"))
    code, out, err = run(capsys, "report", str(bad))
    assert code == 2
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "runs[0].points[0][2]" in lines[0] and "Traceback" not in err


def test_missing_file_exits_2(capsys, tmp_path):
    code, _, err = run(capsys, "check", str(tmp_path / "absent.toml"))
    assert code == 2 and "no such file" in err


def test_malformed_toml_exits_2(capsys, write_site):
    code, _, err = run(capsys, "check", str(write_site("[site\n")))
    assert code == 2 and "not valid TOML" in err


def test_unknown_option_exits_2(capsys):
    code, _, err = run(capsys, "report", "--frobnicate")
    assert code == 2 and "unrecognized arguments" in err and len(err.strip().splitlines()) == 1


def test_bad_step_exits_2(capsys):
    code, _, err = run(capsys, "report", "--step", "3 parsecs")
    assert code == 2 and "--step" in err


def test_every_command_has_help(capsys):
    for cmd in ("check", "report", "layout", "coil"):
        with pytest.raises(SystemExit) as info:
            main([cmd, "--help"])
        assert info.value.code == 0
        out, _ = capsys.readouterr()
        assert "usage: aerial " + cmd in out


def test_coil_helper_gives_turns_and_length(capsys):
    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--inductance", "240 uH", "--json")
    assert code == 0, err
    data = json.loads(out)
    # Wheeler's formula (Proc. IRE 16, 1928), L[µH] = d²n²/(18d + 40l), d and l in inches, solved here for n
    # with the current sheet at the wire centres (d = 50 mm + 0.405 mm, 26 AWG per ASTM B258) and close
    # winding (l = n × 0.405 mm): 69.98 turns. Wheeler states about 1 % for l > 0.4 d (here l/d = 0.56), so 1.5 %.
    d_in, p_in, l_uh = (50e-3 + 0.405e-3) / 25.4e-3, 0.405e-3 / 25.4e-3, 240.0
    n = (40 * p_in * l_uh + ((40 * p_in * l_uh) ** 2 + 72 * d_in**3 * l_uh) ** 0.5) / (2 * d_in**2)
    assert n == pytest.approx(69.98, abs=0.01)
    assert data["turns"] == pytest.approx(n, rel=0.015)
    assert data["wire_diameter_m"] == pytest.approx(0.405e-3, rel=0.002)
    assert data["winding_length_m"] == pytest.approx(data["whole_turns"] * data["wire_diameter_m"], rel=1e-6)
    assert data["unloaded_q"] > 0


@pytest.mark.parametrize("argv, words", [
    (["--wire", "99 AWG", "--turns", "3"], "not a gauge"),
    (["--wire", "26", "--turns", "3"], "such as \"26 AWG\""),
    (["--wire", "26 AWG", "--turns", "0"], "--turns"),
    (["--wire", "26 AWG", "--inductance", "-5 uH"], "from 10 nH to 1 H"),
])
def test_coil_helper_rejects_bad_input(capsys, argv, words):
    code, _, err = run(capsys, "coil", "--diameter", "50 mm", *argv)
    assert code == 2 and words in err and len(err.strip().splitlines()) == 1


def test_pictures_are_written_and_never_overwritten(capsys, tmp_path):
    pics = tmp_path / "pics"
    code, _, err = run(capsys, "report", "--pictures", str(pics))
    assert code == 0, err
    names = sorted(p.name for p in pics.iterdir())
    assert "aerial-impedance.svg" in names and "aerial-capacitance.svg" in names
    import xml.etree.ElementTree as ET

    ET.parse(pics / "aerial-impedance.svg")  # valid SVG (XML)
    before = (pics / "aerial-impedance.svg").read_bytes()
    code, _, err = run(capsys, "report", "--pictures", str(pics))
    assert code == 2 and "already exists" in err and "--force" in err
    assert (pics / "aerial-impedance.svg").read_bytes() == before
    code, _, err = run(capsys, "report", "--pictures", str(pics), "--force")
    assert code == 0, err
    assert not [p for p in pics.iterdir() if p.name.endswith(".part")]


def test_bench_measurement_replaces_the_estimate(capsys, write_site):
    from .conftest import ROOT

    text = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text()
    text = text.replace('earphone = "high-impedance"\n', 'earphone = "high-impedance"\n\n[receiver.measured]\n'
                        'coil = "240 uH"\ncapacitor = "150 pF"\nfrequency = "600 kHz"\n')
    code, out, err = run(capsys, "report", str(write_site(text)), "--json")
    assert code == 0, err
    assert json.loads(out)["tuning"]["source"] == "measured"


def test_a_closed_pipe_is_not_an_error():
    # `aerial report | head -1`: the reader goes away; aerial exits 0 with nothing on stderr
    import subprocess
    import sys

    # --quiet: a slow machine would otherwise add progress lines to stderr (stderr is not a terminal here)
    proc = subprocess.Popen([sys.executable, "-m", "aerial.cli", "report", "--quiet"], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE)
    proc.stdout.readline()
    proc.stdout.close()
    err = proc.stderr.read()
    assert proc.wait(timeout=120) == 0
    assert err == b""


@pytest.mark.parametrize("soil, source", [("dry", "ITU-R P.368 curve 'dry ground'"),
                                          ("medium-dry", "ITU-R P.527 category")])
def test_json_names_the_itu_source_of_the_soil(capsys, write_site, soil, source):
    # ITU-R P.368 curves "land" / "dry ground" are not ITU-R P.527 categories (from memory): the JSON says which
    text = MINIMAL.replace('name = "test vertical"', f'name = "test vertical"\nsoil = "{soil}"')
    code, out, err = run(capsys, "report", str(write_site(text)), "--json")
    assert code == 0, err
    assert json.loads(out)["site"]["soil"]["source"].startswith(source + ": ")


CROWDED = MINIMAL.replace('height = "0 m"', '''height = "0 m"
coil = "230 uH"
capacitor = ["15 pF", "365 pF"]
detector_tap = 0.5
interference_margin = "25 dB"''') + '''
[[stations]]
name = "Demo Local"
frequency = "1000 kHz"
power = "50 kW"
distance = "6 km"

[[stations]]
name = "Demo Neighbour"
frequency = "1020 kHz"
power = "10 kW"
distance = "25 km"

[[stations]]
name = "Demo Low"
frequency = "198 kHz"
power = "500 kW"
distance = "120 km"
'''


def test_report_designs_the_tuning_for_the_listed_stations(write_site, capsys):
    p = write_site(CROWDED)
    assert main(["report", str(p), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    design = data["tuning"]["station_design"]
    assert design["margin_db"] == 25.0 and design["margin_source"] == "site"
    assert design["wanted"] == ["Demo Local", "Demo Neighbour"]  # 198 kHz is outside the MF tank's band
    assert design["current"]["detector_tap_ratio"] == 0.5
    low = next(s for s in data["stations"] if s["name"] == "Demo Low")
    assert low["verdict"] == "out of the tuning range" and "needs" in low["verdict_text"]
    row = data["tuning"]["rows"][0]
    assert row["weak_signal_loaded_q"] > row["loaded_q"] > 0  # a weak station loads the tank less
    assert main(["report", str(p)]) == 0
    out = capsys.readouterr().out
    assert "Tuning for your stations" in out and "cannot reach 198 kHz (needs" in out.replace("\n", " ")


def test_bad_interference_margin_is_one_line_naming_the_key(write_site, capsys):
    p = write_site(CROWDED.replace('"25 dB"', '"loud"'))
    assert main(["check", str(p)]) == 2
    err = capsys.readouterr().err
    assert "receiver.interference_margin" in err and "decibels" in err and len(err.strip().splitlines()) == 1


def test_a_measured_bandwidth_is_checked_against_the_solve(write_site, capsys):
    head, stations = CROWDED.split("\n[[stations]]", 1)
    measured = '\n[receiver.measured]\ncoil = "230 uH"\ncapacitor = "150 pF"\nfrequency = "700 kHz"\nbandwidth = "45 kHz"\n'
    p = write_site(head + measured + "\n[[stations]]" + stations)
    code = main(["report", str(p), "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    tuning = json.loads(out)["tuning"]
    check = tuning["calibration"]["bench_check"]
    assert check["measured_bandwidth_hz"] == 45e3
    assert check["solved_bandwidth_hz"] == pytest.approx(45e3, rel=0.2)
    assert main(["report", str(p)]) == 0
    assert "bench check at 700 kHz" in capsys.readouterr().out.replace("\n", " ")


def test_coil_helper_and_report_give_the_coils_self_capacitance(write_site, capsys):
    code, out, err = run(capsys, "coil", "--diameter", "100 mm", "--wire", "20 AWG", "--turns", "123")
    assert code == 0, err
    # 123 close-wound turns of 20 AWG (0.812 mm) make l ≈ 100 mm on a 100.8 mm winding: l/D ≈ 0.99, where
    # Medhurst's table (Wireless Engineer 1947, from memory) gives H = 0.46 pF/cm: about 4.6 pF
    assert "self-capacitance (Medhurst)" in out and "4.6" in out
    p = write_site(CROWDED.replace('coil = "230 uH"', 'coil = { diameter = "60 mm", turns = 70, gauge = "24 AWG", length = "45 mm" }'))
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 0, err
    coil = json.loads(out)["tuning"]["coil"]
    assert 2.5e-12 < coil["self_capacitance_f"] < 3.2e-12 and coil["self_resonance_hz"] > 4e6
    code, out, err = run(capsys, "report", str(p))
    assert "self-capacitance" in out and "Medhurst" in out


def test_a_winding_outside_medhursts_table_is_flagged_in_one_wording_by_coil_and_report(write_site, capsys):
    # Medhurst's table (Wireless Engineer 1947, from memory) runs over l/D = 0.1-50; 1000 close-wound turns of
    # 0.5 mm wire on a 5 mm former are 500 mm long on a 5.5 mm winding: l/D = 90.9, past its end
    sentence = "of its diameter lies outside Medhurst's self-capacitance table (0.1-50): the table's end value is used"
    code, out, err = run(capsys, "coil", "--diameter", "5 mm", "--wire", "0.5 mm", "--turns", "1000", "--json")
    assert code == 0, err
    assert "winding length 90.91 " + sentence in json.loads(out)["warnings"]
    p = write_site(CROWDED.replace('coil = "230 uH"',
                                   'coil = { diameter = "5 mm", turns = 1000, gauge = "24 AWG", length = "520 mm" }'))
    code, out, err = run(capsys, "report", str(p), "--width", "400")
    assert code == 0, err
    assert "winding length 94.36" in out and sentence in out


def test_consistency_check_stations_are_heard_with_the_coil_the_tuning_designs(capsys, tmp_path):
    # A two-band site (LF and MF) that gives no coil: the tuning designs one for its primary band; the station
    # verdicts and the design for the stations must use that same coil, not one designed over the whole sweep.
    # The band design taps the detector down with the coil: the site with the coil written gives that tap too.
    text = (ROOT / "site_examples" / "rural_long_wire.toml").read_text(encoding="utf-8")
    bare = tmp_path / "no_coil.toml"
    bare.write_text("\n".join(l for l in text.splitlines() if not l.startswith("coil = ")), encoding="utf-8")
    code, out, err = run(capsys, "report", str(bare), "--json")
    assert code == 0, err
    designed = json.loads(out)
    inductance = designed["tuning"]["coil"]["inductance_h"]
    assert designed["tuning"]["station_design"]["current"]["coil_inductance_h"] == inductance
    given = tmp_path / "given_coil.toml"
    tap = designed["tuning"]["detector_tap_ratio"]
    assert designed["tuning"]["station_design"]["current"]["detector_tap_ratio"] == tap
    given.write_text(text.replace('coil = "250 uH"', f'coil = "{inductance * 1e6!r} uH"\ndetector_tap = {tap!r}'),
                     encoding="utf-8")
    code, out, err = run(capsys, "report", str(given), "--json")
    assert code == 0, err
    written = json.loads(out)
    for a, b in zip(designed["stations"], written["stations"]):
        assert a["detector_power_w"] == pytest.approx(b["detector_power_w"], rel=1e-9), a["name"]


@pytest.mark.parametrize("argv, meant", [
    (["check", "{site}", "--unit", "us"], "--units"),
    (["layout", "{site}", "--pictur", "{tmp}/plan.png"], "--picture"),
    (["report", "{site}", "--page={tmp}/p.html", "--ful-wave"], "--full-wave"),
    (["coil", "--diam", "50 mm", "--wire", "26 AWG", "--turns", "40"], "--diameter"),
    (["--verison"], "--version"),
])
def test_a_shortened_or_misspelt_option_is_refused_with_the_option_meant(capsys, tmp_path, argv, meant):
    """Options are taken only as spelt in full (input handling): a slip gets one line naming the option meant."""
    site = ROOT / "site_examples" / "backyard_inverted_l.toml"
    argv = [a.format(site=site, tmp=tmp_path) for a in argv]
    code, out, err = run(capsys, *argv)
    assert code == 2 and out == ""
    line = one_line(err)
    assert "unrecognized arguments" in line and f'did you mean "{meant}"?' in line, line
    assert list(tmp_path.iterdir()) == []  # nothing was drawn or written


def test_every_parser_takes_options_only_in_full():
    from aerial.cli import build_parser

    parser = build_parser()
    assert not parser.allow_abbrev
    assert all(not sub.allow_abbrev for sub in parser.commands.parsers().values())


def test_coil_helper_says_when_the_q_frequency_is_at_or_near_the_coils_self_resonance(capsys):
    """A 10 mH single-layer coil on a 10 mm former resonates by itself below 1 MHz: the helper says its Q at
    1 MHz does not apply; a 1.57 mH coil (self-resonance 2.41 MHz) acts as L / (1 - (f/f_s)^2) = 1.21 L there
    (the lumped coil with its self-capacitance across it, common practice); a 240 µH coil is left alone."""
    code, out, err = run(capsys, "coil", "--diameter", "10 mm", "--wire", "40 AWG", "--inductance", "10 mH",
                         "--width", "200")
    assert code == 0, err
    assert "1 MHz is above the coil's self-resonance (658 kHz)" in out and "do not apply" in out
    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--turns", "300", "--json")
    assert code == 0, err
    data = json.loads(out)
    factor = 1.0 / (1.0 - (data["frequency_hz"] / data["self_resonance_hz"]) ** 2)
    assert any(f"act as {factor:.2f} times its inductance" in w for w in data["warnings"]), data["warnings"]
    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--inductance", "240 uH", "--json")
    assert not any("self-resonance" in w for w in json.loads(out)["warnings"])


@pytest.mark.parametrize("argv, words", [
    (["--diameter", "50", "--wire", "26 AWG", "--turns", "60"], '--diameter 50: a unit is never guessed; write it, e.g. "50 mm"'),
    (["--diameter", "50 mm", "--wire", "26 AWG", "--inductance", "240"], 'e.g. "240 uH"'),
    (["--diameter", "50 mm", "--wire", "26 AWG", "--turns", "60", "--frequency", "800"], 'e.g. "800 kHz"'),
    (["--diameter", "50 mm", "--wire", "26 AWG", "--turns", "60", "--pitch", "0.5"], 'e.g. "0.5 mm"'),
])
def test_coil_helper_asks_for_the_unit_of_a_bare_number(capsys, argv, words):
    """On the command line every option is text: a bare number is told to carry its unit, not that "a number given
    as text" needs one (input handling)."""
    code, out, err = run(capsys, "coil", *argv)
    assert code == 2 and out == ""
    assert words in err and "a number in m" not in err and "a number in H" not in err and err.count("\n") == 1


# The quick reading of a plain command line (aerial.cli.quick_arguments) against argparse, the reference for
# what a command line means: whatever it reads, argparse reads the same, in the same order, without a word left.
_OPTIONS = ["--json", "--width", "--units", "--quiet", "--full-wave", "--lossy-ground", "--quick-ground", "--step",
            "--pictures", "--page", "--force", "--allow-large", "--best", "--picture", "--diameter", "--wire",
            "--turns", "--inductance"]
_WORDS = ["check", "report", "layout", "coil", *_OPTIONS, "--version", "-h", "--help", "--", "-", "--json=1",
          "--width=90", "--unit", "-5", "80", "30", "3", "abc", "si", "us", "US", "x.toml", "", " ", "1 kHz", "a b"]


def _argparse_reading(argv):
    from aerial.cli import build_parser

    try:
        args, extras = build_parser().parse_known_args(argv)
    except (SystemExit, Exception) as err:  # a mistake (AerialError), help or the version
        return type(err).__name__
    return list(vars(args).items()), extras


_VALUES = ["80", "30", "3", "abc", "si", "us", "x.toml", "", "1 kHz", "-5", "--json"]
#: a word, or an option and a value (most plain command lines have some of these)
_PIECES = st.one_of(st.sampled_from(_WORDS).map(lambda w: [w]),
                    st.tuples(st.sampled_from(_OPTIONS), st.sampled_from(_VALUES)).map(list))


@given(st.sampled_from(["check", "report", "layout", "coil", "repor", "--version", ""]),
       st.lists(_PIECES, max_size=6))
@settings(max_examples=400, deadline=None)
def test_consistency_the_quick_reading_of_a_command_line_is_argparses(command, pieces):
    from aerial.cli import quick_arguments

    argv = [command, *(word for piece in pieces for word in piece)]
    quick = quick_arguments(argv)
    if quick is not None:
        assert _argparse_reading(argv) == (list(vars(quick).items()), []), argv


@pytest.mark.parametrize("argv", [
    ["report", "site.toml", "--json"], ["report", "--json", "site.toml"], ["report"], ["report", "--json"],
    ["report", "s.toml", "--width", "80", "--units", "us", "--quiet", "--full-wave", "--lossy-ground",
     "--quick-ground", "--step", "1 kHz", "--pictures", "pics", "--page", "p.html", "--force", "--allow-large"],
    ["check", "s.toml", "--json", "--units", "us"], ["layout", "s.toml", "--best", "3", "--picture", "p.svg"],
    ["report", ""],
])
def test_consistency_plain_command_lines_are_read_quickly_as_argparse_reads_them(argv):
    from aerial.cli import quick_arguments

    quick = quick_arguments(argv)
    assert quick is not None and _argparse_reading(argv) == (list(vars(quick).items()), [])


@pytest.mark.parametrize("argv", [
    [], ["--version"], ["--help"], ["report", "-h"], ["report", "--json=1"], ["report", "a", "b"],
    ["report", "--width", "30"], ["report", "--units", "metric"], ["report", "--json", "--json"],
    ["report", "--", "s.toml"], ["report", "--page"], ["report", "--page", "--json"], ["check"],
    ["layout", "s.toml", "--best", "many"], ["coil", "--diameter", "5 cm", "--wire", "26 AWG", "--turns", "9"],
    ["report", "--jsn"], ["report", "-5"],
])
def test_every_other_command_line_is_left_to_argparse(argv):
    from aerial.cli import quick_arguments

    assert quick_arguments(argv) is None
