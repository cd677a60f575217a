"""Numerical guards: extreme but valid sites give finite figures, and model-range breaches are flagged.

Property tests (hypothesis) over sites written as TOML text and run through
:func:`aerial.api.run_report`: wires from 1 m to 1 km, radii from 0.1 mm to
5 cm, heights from 0.5 m to 100 m, bands anywhere in 100 kHz - 30 MHz, every
soil category. The sites are generated test inputs, not reference data.

The one physical fact checked is the short-aerial limit: the closed forms are
stated valid up to 1/8 wavelength of wire (aerial.models.short_aerial
MAX_RELIABLE_LENGTH_WAVELENGTHS, common practice for "electrically short"),
with the wavelength c/f (c from scipy.constants).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from scipy.constants import c as SPEED_OF_LIGHT

from aerial.api import run_report
from aerial.estimate.fullwave_sweep import MEMORY_BUDGET_BYTES, TIME_BUDGET_S, check_full_wave_budget, estimate_full_wave
from aerial.core.errors import ResourceLimit
from aerial.core.materials import SOILS

from .fuzzlib import load

fz = load()

SHAPES = ("vertical", "horizontal", "inverted-L", "sloping")


@st.composite
def extreme_sites(draw):
    shape = draw(st.sampled_from(SHAPES))
    height = draw(st.floats(0.5, 100.0))
    length = draw(st.floats(1.0, 1000.0))
    radius = draw(st.floats(1e-4, 0.05))
    lo = draw(st.floats(100e3, 29.5e6))
    hi = draw(st.floats(min(lo * 1.01, 30e6), 30e6))
    assume(hi > lo)
    soil = draw(st.sampled_from(sorted(SOILS)))
    base = 0.5
    if shape == "vertical":
        top = min(base + length, 100.0)
        points = [[0, 0, base], [0, 0, top]]
    elif shape == "horizontal":
        points = [[0, 0, height], [length, 0, height]]
    elif shape == "inverted-L":
        h = max(height, base + 10 * radius + 0.01)
        points = [[0, 0, base], [0, 0, h], [length, 0, h]]
    else:
        points = [[0, 0, base], [length, 0, max(height, base + 0.01)]]
    step = min(1e6, max(100.0, (hi - lo) / 30.0))
    pts = ", ".join("[" + ", ".join(f"{v:.6g}" for v in p) + "]" for p in points)
    text = f"""
[site]
name = "extreme {shape}"
bands = [{{from = "{lo:.0f} Hz", to = "{hi:.0f} Hz"}}]
frequency_step = "{step:.0f} Hz"
soil = "{soil}"

[wire]
diameter = "{2 * radius * 1e3:.6g} mm"

[[runs]]
points = [{pts}]

[receiver]
at = [0, 0]
height = "0 m"
coil = "240 uH"
capacitor = ["15 pF", "365 pF"]

[[earth.rods]]
length = "2.4 m"

[[stations]]
frequency = "{math.sqrt(lo * hi):.0f} Hz"
power = "10 kW"
distance = "30 km"
"""
    return text, hi


@settings(max_examples=14, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(extreme_sites())
def test_extreme_sites_give_finite_figures_and_flag_long_wires(tmp_path, site):
    text, f_top = site
    p = tmp_path / "extreme.toml"
    p.write_text(text, encoding="utf-8")
    result = run_report(str(p))
    # no figure came out null (finalise turns a NaN or inf into null plus a warning)
    assert fz._nulls(result) == []
    assert not any("could not be computed" in w for w in result["warnings"]), result["warnings"]
    # every model-range breach is flagged: wire longer than 1/8 wavelength at the top frequency
    total = result["geometry"]["total_length_m"]
    eighth = SPEED_OF_LIGHT / f_top / 8.0
    flagged = any("1/8 wavelength" in w for w in result["warnings"])
    # within 1 % of the limit either answer is right: the band's top point and the wire's length are
    # both rounded on the way in
    if total > 1.01 * eighth:
        assert flagged, (total, eighth, result["warnings"])
    elif total < 0.99 * eighth:
        assert not flagged, (total, eighth, result["warnings"])


@settings(max_examples=40, deadline=None)
@given(st.floats(1.0, 2000.0), st.floats(1e5, 30e6), st.integers(2, 3000))
def test_full_wave_estimate_grows_with_length_and_frequencies(length, f_top, n_freq):
    # consistency check: more wire or more frequencies never needs less memory or time, but for one piece of
    # rounding (below). (With a single
    # frequency it can: the solver skips its convergence check at twice the pieces once that would pass
    # its memory limit, and the estimate follows the solver.)
    import numpy as np

    from aerial.models.segments import polyline_segments

    f = np.linspace(f_top / 2, f_top, n_freq)
    a = estimate_full_wave(polyline_segments(np.array([[0, 0, 0.5], [0, 0, 8], [length, 0, 8]]), 1e-3), f)
    b = estimate_full_wave(polyline_segments(np.array([[0, 0, 0.5], [0, 0, 8], [2 * length, 0, 8]]), 1e-3), f)
    c = estimate_full_wave(polyline_segments(np.array([[0, 0, 0.5], [0, 0, 8], [length, 0, 8]]), 1e-3),
                           np.linspace(f_top / 2, f_top, n_freq + 10))
    # A wire's fewest pieces are shared between its straight segments in proportion to length, each rounded up:
    # lengthening one segment can move that rounding, so the count may drop by at most (segments - 1) = 1 here
    # (the sum of the round-ups lies between the minimum and the minimum + segments - 1).
    assert b["unknowns"] >= a["unknowns"] - 1
    if b["unknowns"] >= a["unknowns"]:
        assert b["seconds"] >= a["seconds"] and b["memory_bytes"] >= a["memory_bytes"]
    assert c["seconds"] > a["seconds"]
    assert all(math.isfinite(v) and v > 0 for v in (a["seconds"], a["memory_bytes"]))


def test_full_wave_over_budget_is_refused_with_numbers_and_a_way_out():
    import numpy as np

    from aerial.models.segments import polyline_segments

    # a 1 km wire swept over HF in 1 kHz steps: far past any budget
    seg = polyline_segments(np.array([[0, 0, 0.5], [0, 0, 10], [1000, 0, 10]]), 1e-3)
    f = np.arange(2.3e6, 26.1e6, 1e3)
    with pytest.raises(ResourceLimit, match=r"unknowns at \d+ frequencies: .*budget.*--step.*--allow-large"):
        check_full_wave_budget(seg, f)
    est = check_full_wave_budget(seg, f, allow_large=True)
    assert est["seconds"] > TIME_BUDGET_S or est["memory_bytes"] > MEMORY_BUDGET_BYTES


def test_report_full_wave_refuses_a_large_sweep_before_solving(capsys, tmp_path):
    from aerial.cli import main

    p = tmp_path / "long.toml"
    p.write_text("""
[site]
bands = ["hf"]
[[runs]]
points = [[0, 0, 0.5], [0, 0, 10], [1000, 0, 10]]
[receiver]
at = [0, 0]
height = 0
coil = "240 uH"
[[earth.rods]]
length = "2.4 m"
""", encoding="utf-8")
    code = main(["report", str(p), "--full-wave", "--step", "1 kHz", "--json"])
    out, err = capsys.readouterr()
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "--allow-large" in err and "unknowns" in err


def _many_stations_site(n: int) -> str:
    """The worst legal station list: every station strong, near, tunable and crowded onto few channels.

    Generated test input (invented stations), not reference data.
    """
    from importlib import resources

    base = resources.files("aerial.data").joinpath("backyard_inverted_l.toml").read_text(encoding="utf-8")
    base = base.split("[[stations]]")[0]
    lines = [base]
    for i in range(n):
        lines.append(f'\n[[stations]]\nname = "Demo {i}"\nfrequency = "{531 + (i % 120) * 9} kHz"\n'
                     f'power = "2 MW"\ndistance = "{5 + i % 7} km"\n')
    return "".join(lines)


def test_the_worst_legal_station_list_is_answered(tmp_path):
    """At the station limit, with every station heard behind every other, the report finishes and answers."""
    from aerial.site.reader import MAX_STATIONS

    p = tmp_path / "many.toml"
    p.write_text(_many_stations_site(MAX_STATIONS), encoding="utf-8")
    result = run_report(str(p))
    assert len(result["stations"]) == MAX_STATIONS
    assert fz._nulls(result) == []


def test_one_station_past_the_limit_is_refused(tmp_path, capsys):
    from aerial.cli import main
    from aerial.site.reader import MAX_STATIONS

    p = tmp_path / "too_many.toml"
    p.write_text(_many_stations_site(MAX_STATIONS + 1), encoding="utf-8")
    assert main(["check", str(p)]) == 2
    err = capsys.readouterr().err
    assert "too many stations" in err and f"stations[{MAX_STATIONS}]" in err
