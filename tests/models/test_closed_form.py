"""Closed-form response of whole wire sets (geometries invented for the tests)."""

# "check values §N" refers to the sections of docs/check-values.md.

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import epsilon_0, mu_0
from scipy.special import iv

from aerial.core.errors import ModelInputError
from aerial.models import short_aerial as sa
from aerial.models.capacitance import electrostatic_solution
from aerial.models.closed_form import closed_form_response
from aerial.models.conductor import resistance_per_m
from aerial.models.segments import Segments, polyline_segments

A = 1e-3
INV_L = polyline_segments([[0, 0, 0.02], [0, 0, 10], [20, 0, 10]], A)
VERTICAL = polyline_segments([[0, 0, 0.02], [0, 0, 10]], A)
KEYS = ("capacitance_f", "static_capacitance_f", "effective_height_m", "radiation_resistance_ohm",
        "reactance_ohm", "conductor_loss_ohm")


def test_consistency_static_limit_is_the_electrostatic_solution():
    # consistency check with this package's electrostatic solver, plus [num] check values §3 (independent
    # moment solution): 181.6 pF, 8.133 m for the 10 + 20 m inverted-L. Outside check: the next test.
    r = closed_form_response(INV_L, [1e3, 10e3])
    es = electrostatic_solution(INV_L)
    assert r["capacitance_f"] == pytest.approx([es.capacitance_f] * 2, rel=1e-6)
    assert r["effective_height_m"] == pytest.approx([es.effective_height_m] * 2, rel=1e-5)
    assert r["capacitance_f"][0] == pytest.approx(181.6e-12, rel=0.01)
    assert r["effective_height_m"][0] == pytest.approx(8.133, rel=0.01)
    assert r["model"] == "closed form: inverted-L, top-loading angle normalised to electrostatic moment solution"
    assert r["shape"]["kind"] == "inverted-L"


def test_static_vertical_against_howe_bound_and_triangular_height():
    # Outside: Howe's average-potential capacitance of a vertical wire from the ground, C = 2πε0h/[ln(h/a) − 1]
    # (Howe, from memory), is a lower bound on the true value (Thomson's theorem) and within about 1 % of it
    # for a thin wire; the 10 m wire (9.98 m above a 2 cm gap) must sit between the bound and 2 % above it.
    # h_e of a short monopole lies below h/2 = 5 m (Balanis ch. 4: triangular current; a real base feed
    # makes it slightly less): check values §3 [num] 4.866 m, within 1 %.
    r = closed_form_response(VERTICAL, [1e3])
    howe = 2 * np.pi * epsilon_0 * 9.98 / (np.log(9.98 / A) - 1)
    assert howe < r["capacitance_f"][0] < 1.02 * howe
    assert r["effective_height_m"][0] < 5.0
    assert r["effective_height_m"][0] == pytest.approx(4.866, rel=0.01)


def test_frequency_dependence_follows_top_loading_model():
    # Consistency with the un-normalised top-loading model (check values §4 [num]: X = -779.8 ohm, h_e = 8.274 m
    # at 1 MHz); normalisation changes them by the static ratios, well under 1 % here.
    r = closed_form_response(INV_L, [1e6])
    line = sa.inverted_l(9.98, 20.0, A, 1e6)
    assert r["reactance_ohm"][0] == pytest.approx(float(line.reactance_ohm), rel=0.01)
    assert r["effective_height_m"][0] == pytest.approx(float(line.effective_height_m), rel=0.01)
    assert r["capacitance_f"][0] > r["static_capacitance_f"][0]  # capacitance rises towards resonance


def test_vertical_conductor_loss_short_limit_is_triangular():
    # Triangular current: R = R' h / 3 (power balance; Balanis sec. 2.14, from memory).
    f = 1e5
    r = closed_form_response(VERTICAL, [f])
    expected = float(resistance_per_m(A, f)) * 9.98 / 3
    assert r["conductor_loss_ohm"][0] == pytest.approx(expected, rel=2e-3)


def test_consistency_earth_lead_loss_is_added():
    # consistency check with this package's conductor model; the outside value is in the next test
    lead = Segments([[0, 0, 1], [0, 0, 1], [0, 0, 10]], [[0, 0, 0], [0, 0, 10], [20, 0, 10]], A, [True, False, False], [0, 0, 1])
    base = polyline_segments([[0, 0, 1], [0, 0, 10], [20, 0, 10]], A)
    with_lead = closed_form_response(lead, [0.5e6])["conductor_loss_ohm"][0]
    without = closed_form_response(base, [0.5e6])["conductor_loss_ohm"][0]
    assert with_lead - without == pytest.approx(float(resistance_per_m(A, 0.5e6)) * 1.0, rel=0.05)


def test_earth_lead_loss_against_the_bessel_form():
    # Outside: a 1 m earth lead in series at the base carries the whole base current, so it adds R'·1 m, with
    # R' the round-wire internal impedance Re{γ I0(γa) / (2πaσ I1(γa))}, γ = (1 + j)/δ (Ramo, Whinnery &
    # Van Duzer, Fields and Waves; from memory), copper 1.72414e-8 Ω·m (IEC 60028), δ = √(ρ/(πfµ0)). At 0.5 MHz
    # for a = 1 mm: 30.8 mΩ (R_dc(a/2δ + 1/4) gives 30.7 mΩ). 5 % for the small change of the current distribution on the rest of the wire.
    f, rho = 0.5e6, 1.72414e-8
    delta = np.sqrt(rho / (np.pi * f * mu_0))
    ga = (1 + 1j) * A / delta
    r_per_m = (ga / (2 * np.pi * A**2 / rho) * iv(0, ga) / iv(1, ga)).real
    lead = Segments([[0, 0, 1], [0, 0, 1], [0, 0, 10]], [[0, 0, 0], [0, 0, 10], [20, 0, 10]], A, [True, False, False], [0, 0, 1])
    base = polyline_segments([[0, 0, 1], [0, 0, 10], [20, 0, 10]], A)
    added = closed_form_response(lead, [f])["conductor_loss_ohm"][0] - closed_form_response(base, [f])["conductor_loss_ohm"][0]
    assert r_per_m == pytest.approx(30.8e-3, rel=0.005)
    assert added == pytest.approx(r_per_m, rel=0.05)


def test_past_resonance_returns_static_capacitance_and_warns():
    f = np.array([0.5e6, 3e6, 30e6])
    r = closed_form_response(INV_L, f)
    for k in KEYS:
        assert np.all(np.isfinite(r[k])), k
    assert r["capacitance_f"][1] == r["static_capacitance_f"][1]
    assert list(r["reliable"]) == [True, False, False]
    text = " ".join(r["warnings"])
    assert "1/8 wavelength" in text and "first resonance" in text


def test_irregular_shape_uses_uniform_line_and_warns():
    horiz = polyline_segments([[0, 0, 10], [30, 0, 10]], A)
    r = closed_form_response(horiz, [1e3, 0.5e6])
    assert r["shape"]["kind"] == "irregular"
    assert "uniform-line equivalent" in r["model"]
    assert any("irregular shape" in w for w in r["warnings"])
    # [num] check values §3: horizontal 30 m at 10 m, 179.1 pF
    assert r["capacitance_f"][0] == pytest.approx(179.1e-12, rel=0.01)


def test_z0_form_choice_is_checked():
    with pytest.raises(ModelInputError, match="'wide' is not a valid z0_form, must be one of 'uniform-charge', 'schelkunoff'"):
        closed_form_response(INV_L, [1e6], z0_form="wide")
    both = [closed_form_response(INV_L, [1e6], z0_form=z)["reactance_ohm"][0] for z in sa.Z0_FORMS]
    assert both[0] == pytest.approx(both[1], rel=0.05)  # normalisation leaves only the ratio Zv/Zt


def test_rejects_bad_frequency():
    with pytest.raises(ModelInputError, match="frequency"):
        closed_form_response(INV_L, [0.0, 1e6])


@settings(max_examples=25, deadline=None)
@given(
    height=st.floats(0.5, 100.0),
    top=st.floats(1.0, 1000.0),
    radius=st.floats(1e-4, 5e-2),
    kind=st.sampled_from(["inverted-L", "T", "vertical", "sloper"]),
)
def test_no_nan_and_positive_losses_for_extreme_valid_inputs(height, top, radius, kind):
    if height < 10 * radius:
        return
    if kind == "inverted-L":
        seg = polyline_segments([[0, 0, 0.02], [0, 0, height], [top, 0, height]], radius)
    elif kind == "T":
        seg = Segments([[0, 0, 0.02], [0, 0, height], [0, 0, height]],
                       [[0, 0, height], [top / 2, 0, height], [-top / 2, 0, height]], radius, False, [0, 0, 0.02])
    elif kind == "vertical":
        seg = polyline_segments([[0, 0, 0.02], [0, 0, height]], radius)
    else:
        seg = polyline_segments([[0, 0, 0.02], [top, 0, height]], radius)
    f = np.geomspace(1e5, 3e7, 25)
    r = closed_form_response(seg, f)
    for k in KEYS:
        assert np.all(np.isfinite(r[k])), k
    assert np.all(r["conductor_loss_ohm"] > 0)
    assert np.all(r["radiation_resistance_ohm"] >= 0)
    assert np.all(r["capacitance_f"] > 0)


def test_counterpoise_earth_wires_are_flagged():
    # Invented portable vertical with two raised counterpoise wires (grounded segments that end in the air).
    seg = Segments(
        [[0, 0, 0.3], [0, 0, 0.3], [0, 0, 0.3]],
        [[0, 0, 7.0], [0, 8, 0.2], [0, -8, 0.2]],
        A, [False, True, True], [0, 0, 0.3],
    )
    r = closed_form_response(seg, [1e6])
    assert r["shape"]["kind"] == "vertical"
    assert any("treated as a counterpoise" in w for w in r["warnings"])


def test_counterpoise_floats_and_agrees_with_the_full_wave_solver():
    # Consistency between two independent formulations (electrostatic moment solution with a floating
    # counterpoise, and the method-of-moments solver in the short limit): invented 7 m vertical over two
    # 8 m counterpoise wires 0.2 m up. A floating counterpoise lowers the capacitance below the
    # value with the counterpoise tied to earth (series combination with its own capacitance to ground).
    from aerial.models.capacitance import electrostatic_solution
    from aerial.models.fullwave import solve_full_wave

    seg = Segments(
        [[0, 0, 0.3], [0, 0, 0.3], [0, 0, 0.3]],
        [[0, 0, 7.0], [0, 8, 0.2], [0, -8, 0.2]],
        A, [False, True, True], [0, 0, 0.3],
    )
    static = electrostatic_solution(seg)
    f = 3e5
    fw = solve_full_wave(seg, [f], convergence_check=False)
    c_fw = -1.0 / (2 * np.pi * f * fw.impedance[0].imag)
    assert c_fw == pytest.approx(static.capacitance_f, rel=0.02)
    assert abs(fw.effective_height[0]) == pytest.approx(static.effective_height_m, rel=0.02)
    r = closed_form_response(seg, [f])
    assert r["static_capacitance_f"][0] == pytest.approx(static.capacitance_f, rel=1e-9)
    # tie the counterpoise to the earth with a wire from the feed down to the ground: the capacitance rises
    tied = Segments(
        [[0, 0, 0.3], [0, 0, 0.3], [0, 0, 0.3], [0, 0, 0.3]],
        [[0, 0, 7.0], [0, 8, 0.2], [0, -8, 0.2], [0, 0, 0.0]],
        A, [False, True, True, True], [0, 0, 0.3],
    )
    assert electrostatic_solution(tied).capacitance_f > 1.05 * static.capacitance_f


def test_consistency_skipping_the_convergence_solve_keeps_every_figure():
    # consistency check: without the half-density solve (tolerance runs, what-ifs, the facade solution) the
    # figures are those of the full run to the last bit, open ground and beside a building; only the report
    # on convergence (and its warning) is left out
    from aerial.models.building import BuildingBody

    s = polyline_segments([[0, 0, 0.3], [0, 0, 9], [25, 0, 9]], 1e-3)
    f = np.array([0.3e6, 0.9e6, 1.6e6])
    body = BuildingBody(np.array([[-10.0, 4.0], [30.0, 4.0], [30.0, 14.0], [-10.0, 14.0]]), 12.0, "masonry")
    for building in (None, body):
        full = closed_form_response(s, f, building=building)
        quick = closed_form_response(s, f, building=building, convergence_check=False)
        for key in ("capacitance_f", "effective_height_m", "radiation_resistance_ohm", "reactance_ohm",
                    "conductor_loss_ohm", "static_capacitance_f"):
            assert np.array_equal(np.asarray(full[key]), np.asarray(quick[key])), key
        assert not any("between subdivisions" in w for w in quick["warnings"])
    es, quick = electrostatic_solution(s), electrostatic_solution(s, convergence_check=False)
    assert es.capacitance_f == quick.capacitance_f and np.array_equal(es.charge_c, quick.charge_c)
    assert np.isnan(quick.relative_change) and not quick.converged


def test_consistency_past_resonance_static_capacitance_only_where_inductive():
    # consistency check: past the first resonance the line model turns capacitive again beyond the
    # half-wave; the capacitance shown there is -1/(omega X), not the static value, so the warning
    # says the static value stands only where the reactance comes out inductive
    f = np.linspace(0.5e6, 30e6, 400)
    r = closed_form_response(INV_L, f)
    x, c, cs = r["reactance_ohm"], r["capacitance_f"], r["static_capacitance_f"]
    past = ~np.asarray(r["reliable"]) & (f >= r["wavelength_validity"]["resonance_from_hz"])
    assert np.any(past & (x < 0)) and np.any(past & (x >= 0))
    assert np.all(c[x >= 0] == cs[x >= 0])
    assert np.allclose(c[x < 0], -1.0 / (2 * np.pi * f[x < 0] * x[x < 0]))
    text = " ".join(r["warnings"])
    assert "where its reactance comes out inductive, the capacitance shown is the static value" in text
