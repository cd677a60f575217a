"""Every figure shown with a range lies inside it; the tolerance runs keep the nominal shape and model.

The sites here are invented (input-handling property tests); the checks are
consistency checks of aerial's own figures, not physics truths.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import aerial
from aerial.cli import main
from aerial.estimate import assemble
from aerial.geometry.resolve import resolve
from aerial.models.shapes import classify
from aerial.site.reader import load_site_text

from .conftest import ROOT

EXAMPLES = "site_examples/"

#: Figures with a range in ``result["ranges"]`` and how to read the value they range over.
RANGED = {
    "capacitance_f": lambda a, i: a["capacitance_f"][i],
    "effective_height_m": lambda a, i: a["effective_height_m"][i],
    "loss_resistance_ohm": lambda a, i: a["conductor_loss_ohm"][i] + a["ground_loss_ohm"][i],
    "series_resistance_ohm": lambda a, i: a["series_resistance_ohm"][i],
    "open_circuit_voltage_v": lambda a, i: a["open_circuit_voltage_v"][i],
    "available_power_w": lambda a, i: a["available_power_w"][i],
    "ground_loss_ohm": lambda a, i: a["ground_loss_ohm"][i],
}


def assert_earth_ranges_hold_values(earth):
    """The earth table's RF ranges (the whole system and each part) hold their values at the centre frequency."""
    i = list(earth["frequencies_hz"]).index(earth["centre_frequency_hz"]) if "frequencies_hz" in earth else None
    whole = earth["impedance_ohm"][i][0] if i is not None else None
    pairs = [(earth["resistance_range_at_centre_ohm"], whole)]
    pairs += [(p["resistance_range_at_centre_ohm"], p["impedance_at_centre_ohm"][0]) for p in earth["parts"]]
    for (low, high), value in pairs:
        if value is not None:
            assert 0 < low <= value * (1 + 1e-9) and value <= high * (1 + 1e-9), (low, value, high)


def assert_ranges_hold_values(result):
    if "earth" in result:
        earth = dict(result["earth"], frequencies_hz=result["frequencies_hz"])
        assert_earth_ranges_hold_values(earth)
    if result.get("stations"):
        from .test_reception import assert_audible_ranges_hold

        assert_audible_ranges_hold(result)
    ranges, a, freqs = result["ranges"], result["aerial"], list(result["frequencies_hz"])
    for j, f in enumerate(ranges["frequencies_hz"]):
        i = freqs.index(f)  # ranges sit on the sweep's own frequencies
        for key, value_of in RANGED.items():
            low, high = ranges[key][j]
            value = value_of(a, i)
            assert low <= value * (1 + 1e-9) and value <= high * (1 + 1e-9), (key, f, low, value, high)


def site_text(kind, h1, h2, tol1, tol2, span, sag, rx_height, lead_from_far):
    """An invented two-support site in the file format (inverted-L, T, or a sloping wire)."""
    lead = '"far"' if lead_from_far else '"near"'
    if kind == "T":
        lead = f"[{span / 2}, 0, {(h1 + h2) / 2 - sag}]"
    text = f"""
[site]
name = "generated"
bands = ["mf"]
frequency_step = "100 kHz"
[supports.near]
at = [0, 0]
height = {h1}
height_tolerance = {tol1}
kind = "eave"
[supports.far]
at = [{span}, 0]
height = {h2}
height_tolerance = {tol2}
kind = "tree"
[receiver]
at = [-1, -3]
height = {rx_height}
"""
    if kind == "sloping wire":
        text += f"[[runs]]\nname = \"sloper\"\npoints = [[-1, -3, {max(rx_height, 0.05)}], [{span}, 0, {h2}]]\n"
    else:
        text += f"[[spans]]\nfrom = \"near\"\nto = \"far\"\nsag = {sag}\n[lead_in]\nfrom = {lead}\n"
    text += '[[earth.rods]]\ncount = 1\nlength = "2.4 m"\nat = [-1.5, 0.5]\n'
    return text


sites = st.builds(
    site_text,
    kind=st.sampled_from(["inverted-L", "T", "sloping wire"]),
    h1=st.floats(3.0, 12.0), h2=st.floats(3.0, 20.0),
    tol1=st.floats(0.05, 1.0), tol2=st.floats(0.1, 3.0),
    span=st.floats(8.0, 60.0), sag=st.floats(0.1, 0.8),
    rx_height=st.sampled_from([0.0, 0.8, 1.2]), lead_from_far=st.booleans(),
)


@settings(max_examples=20, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(sites)
def test_every_range_holds_its_value_on_generated_sites(text):
    # the ranges' own path through the report (the tuning and station stages left out to keep this quick)
    site = load_site_text(text, "generated.toml")
    freqs = assemble.frequency_grid(site)
    earth = assemble.earth_system(site)
    earth_rf = assemble.earth_at_frequency(site, freqs)  # the electrodes at RF, as the report uses them
    earth_r = earth_rf["impedance_ohm"].real
    pts = assemble.band_points(site)
    centre_i = int(np.argmin(np.abs(freqs - assemble.what_if_frequency(site, pts))))
    geometry = resolve(site, electrode_ohm=float(earth_r[centre_i]))
    resp = assemble.aerial_response(site, geometry, freqs, earth_r)
    ranges = assemble.ranges_at_band_points(site, freqs, resp, earth, pts, method="closed-form",
                              ground="perfect", allow_large=False, progress=None)
    assert ranges["method"] == "closed form"
    earth_json = assemble._earth_json(earth, earth_rf, centre_i, assemble.earth_bounds(site, [freqs[centre_i]]))
    assert_ranges_hold_values({"ranges": ranges, "aerial": resp, "frequencies_hz": list(freqs),
                               "earth": {k: np.asarray(v).tolist() if k == "impedance_ohm" else v
                                         for k, v in earth_json.items()}})
    # the moved wires are modelled as the nominal shape
    nominal = classify(geometry.segments)
    for sign in (-1.0, 1.0):
        moved = resolve(site, wires=assemble._perturbed_wires(site, sign)).segments
        assert len(moved) == len(nominal.segment_section)


def test_tolerance_runs_keep_the_lead_in_on_its_support():
    # the shipped rural example: the lead-in leaves the barn gable, which moves by its tolerance; the lead-in's top
    # must move with it, or the wires come apart and the shape turns "irregular" (an old fault)
    site = aerial.load_site(EXAMPLES + "rural_long_wire.toml")
    nominal = classify(resolve(site).segments).kind
    for sign in (-1.0, 1.0):
        moved = classify(resolve(site, wires=assemble._perturbed_wires(site, sign)).segments)
        assert moved.kind == nominal == "inverted-L"


def test_rural_example_ranges_hold_their_values_through_the_cli(capsys):
    assert main(["report", EXAMPLES + "rural_long_wire.toml", "--json"]) == 0
    result = json.loads(capsys.readouterr().out)
    assert_ranges_hold_values(result)


def test_full_wave_ranges_come_from_the_solver(capsys):
    # consistency check: under --full-wave the ranges are full-wave runs of the moved wires and hold the value
    assert main(["report", "--full-wave", "--json", "--step", "200 kHz"]) == 0
    result = json.loads(capsys.readouterr().out)
    assert result["ranges"]["method"] == "full wave"
    assert_ranges_hold_values(result)
    assert "full wave" in result["ranges"]["notes"][0]


def test_full_wave_ranges_over_budget_say_they_are_closed_form(monkeypatch):
    from aerial.estimate import fullwave_sweep

    site = aerial.load_site(None)
    real = fullwave_sweep.estimate_full_wave

    def costly(segments, frequency):  # the sweep fits the budget; two more runs would not
        est = real(segments, frequency)
        est["seconds"] = 0.45 * fullwave_sweep.TIME_BUDGET_S if len(np.atleast_1d(frequency)) > 3 else \
            0.3 * fullwave_sweep.TIME_BUDGET_S
        return est

    monkeypatch.setattr(fullwave_sweep, "estimate_full_wave", costly)
    result = aerial.analyse(site, method="full-wave", step_hz=200e3, what_ifs=False)
    assert result["ranges"]["method"].startswith("closed form, relative spread")
    assert_ranges_hold_values(result)


def _loss_at(result, f):
    a, i = result["aerial"], list(result["frequencies_hz"]).index(f)
    return a["conductor_loss_ohm"][i] + a["ground_loss_ohm"][i]


def test_consistency_check_loss_range_brackets_the_report_at_the_soil_bounds(capsys, tmp_path):
    # consistency check (aerial's own figures, no outside source): the loss resistance's range at each band point
    # holds what the same report gives with the soil set to the corners of its category's conductivity and
    # permittivity bounds (the built-in example, "intermediate" soil: 0.001-0.01 S/m, eps_r 15-30)
    from importlib import resources

    text = resources.files("aerial").joinpath("data", "backyard_inverted_l.toml").read_text(encoding="utf-8")
    assert 'soil = "intermediate"' in text
    assert main(["report", "--json"]) == 0
    nominal = json.loads(capsys.readouterr().out)
    low_s, high_s = nominal["site"]["soil"]["conductivity_range_s_m"]
    low_e, high_e = nominal["site"]["soil"]["relative_permittivity_range"]
    at_bounds = []
    for sigma, eps in ((low_s, low_e), (high_s, high_e), (low_s, high_e), (high_s, low_e)):
        path = tmp_path / f"soil_{sigma:g}_{eps:g}.toml"
        path.write_text(text.replace('soil = "intermediate"', f'soil = {{ category = "intermediate", conductivity = '
                                     f'{sigma}, relative_permittivity = {eps} }}'), encoding="utf-8")
        assert main(["report", str(path), "--json"]) == 0
        at_bounds.append(json.loads(capsys.readouterr().out))
    ranges = nominal["ranges"]
    for j, f in enumerate(ranges["frequencies_hz"]):
        low, high = ranges["loss_resistance_ohm"][j]
        for other in at_bounds:
            value = _loss_at(other, f)
            # 1 %: the conductor loss of the moved wires differs slightly from that of the nominal wires
            assert low * 0.99 <= value <= high * 1.01, (f, low, value, high)
    # the old DC-formula range put the top near 400 ohm at 1.71 MHz; the line model stays near its corners
    top = ranges["loss_resistance_ohm"][ranges["frequencies_hz"].index(1.71e6)][1]
    assert top < 1.2 * max(_loss_at(o, 1.71e6) for o in at_bounds + [nominal])


def test_earth_table_speaks_of_a_rod_in_words_and_shows_the_rf_range(capsys):
    assert main(["report"]) == 0
    out = capsys.readouterr().out
    assert "a longer rod helps up to about" in out
    assert "(R " in out  # the RF resistance range under the impedance
    assert "earth electrodes as lossy lines" in out


def test_full_wave_ranges_over_real_soil_move_the_soil_under_the_aerial(monkeypatch):
    # input handling: the two full-wave tolerance runs over real soil solve over the soil's low and high ends
    from aerial.estimate import fullwave_sweep

    seen = []
    real = fullwave_sweep.full_wave_response

    def spy(site, geometry, frequency, earth_ohm, **kw):
        seen.append((site.soil.conductivity_s_m, site.soil.relative_permittivity, kw.get("ground")))
        return real(site, geometry, frequency, earth_ohm, **kw)

    monkeypatch.setattr(fullwave_sweep, "full_wave_response", spy)
    site = aerial.load_site(None)
    f = np.array([1.0e6])
    nominal = assemble._headline(site, site.wires, f, 50.0, method="full-wave", ground="reflection-coefficient")
    out = assemble.uncertainty(site, f, {}, method="full-wave", ground="reflection-coefficient", nominal=nominal)
    s = site.soil
    lo_eps, hi_eps = s.permittivity_bounds
    assert (s.conductivity_low_s_m, lo_eps, "reflection-coefficient") in seen
    assert (s.conductivity_high_s_m, hi_eps, "reflection-coefficient") in seen
    assert out["method"] == "full wave, the soil under the aerial at its bounds too"


def test_quick_ground_beside_a_building_runs_through_the_cli(capsys):
    # regression: the built-in site has a building; its wire-grid solve under --quick-ground lacked the soil
    assert main(["report", "--full-wave", "--lossy-ground", "--quick-ground", "--step", "400 kHz", "--json"]) == 0
    result = json.loads(capsys.readouterr().out)
    assert "reflection-coefficient" in result["aerial"]["ground_treatment"]


def test_consistency_one_run_of_the_soil_bounds_serves_the_earth_table_and_the_ranges():
    # consistency check: the report runs the soil's bounds once, at the band points and the centre frequency;
    # the earth table's RF ranges at the centre and the ranges at the band points are, to 1e-12, those of
    # separate runs at the centre alone and at the band points alone
    site = aerial.load_site(ROOT / "site_examples" / "backyard_inverted_l.toml")
    result = aerial.analyse(site)
    f_c = result["earth"]["centre_frequency_hz"]
    alone = assemble.earth_bounds(site, [f_c])
    value = result["earth"]["impedance_ohm"][result["frequencies_hz"].index(f_c)][0]
    low, high = min(float(alone["low_ohm"][0]), value), max(float(alone["high_ohm"][0]), value)
    assert result["earth"]["resistance_range_at_centre_ohm"] == pytest.approx([low, high], rel=1e-12, abs=0.0)
    for n, part in enumerate(result["earth"]["parts"]):
        zp = part["impedance_at_centre_ohm"][0]
        want = [min(float(alone["parts_low_ohm"][n][0]), zp), max(float(alone["parts_high_ohm"][n][0]), zp)]
        assert part["resistance_range_at_centre_ohm"] == pytest.approx(want, rel=1e-12, abs=0.0)
    freqs = np.asarray(result["frequencies_hz"])
    pts = assemble.band_points(site)
    resp = {k: np.asarray(v, float) for k, v in result["aerial"].items() if k in (
        "capacitance_f", "effective_height_m", "conductor_loss_ohm", "ground_loss_ohm", "series_resistance_ohm",
        "open_circuit_voltage_v", "available_power_w")}
    separate = assemble.ranges_at_band_points(site, freqs, resp, {}, pts, method="closed-form", ground="perfect",
                                              allow_large=False, progress=None)
    for key in assemble.HEADLINE_KEYS:
        assert np.allclose(np.asarray(result["ranges"][key]), separate[key], rtol=1e-12, atol=0.0), key


@pytest.mark.parametrize("name", ["backyard_inverted_l", "balcony_water_pipe", "portable_vertical_counterpoise"])
def test_consistency_soil_bound_runs_need_only_each_runs_value(name):
    # consistency check: the RF bounds, whose soil runs work the electrode formulas at their own conductivity
    # only (earth_system(bounds=False)), are those of runs given the whole DC figures, range included --
    # the counterpoise (a part that keeps its DC figure, read at the run's end of the range) too
    from aerial.estimate import earth

    site = aerial.load_site(ROOT / EXAMPLES / f"{name}.toml")
    f = np.array([0.6e6, 1.2e6])
    cp = earth.as_counterpoise_site(site)
    got = earth.resistance_bounds(site.electrodes, site.soil, f, cp)
    sigmas = np.geomspace(site.soil.conductivity_high_s_m, site.soil.conductivity_low_s_m,
                          earth.INTERIOR_SOIL_POINTS + 2)
    runs = []
    for k, sg in enumerate(sigmas):
        fixed = "low" if k == 0 else "high" if k == len(sigmas) - 1 else "nominal"
        dc = earth.earth_system(site.electrodes, site.soil._replace(conductivity_s_m=float(sg)), cp)
        runs += [earth.electrode_impedance(site.electrodes, site.soil._replace(conductivity_s_m=float(sg),
                                                                           relative_permittivity=float(ep)),
                                           f, cp, fixed=fixed, dc=dc)["impedance_ohm"].real
                 for ep in earth.soil_permittivities(site.soil)]
    assert np.array_equal(got["low_ohm"], np.min(runs, axis=0))
    assert np.array_equal(got["high_ohm"], np.max(runs, axis=0))
    full = earth.earth_system(site.electrodes, site.soil, cp)
    assert earth.earth_system(site.electrodes, site.soil, cp, bounds=False)["resistance_ohm"] == full["resistance_ohm"]
