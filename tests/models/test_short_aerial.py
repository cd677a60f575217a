"""Short-aerial closed forms: radiation resistance, average Z0, line reactance, top loading."""

# "check values §N" refers to the sections of docs/check-values.md.

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import c, mu_0
from scipy.special import sici

from aerial.core.errors import ModelInputError
from aerial.models import short_aerial as sa

ETA0 = mu_0 * c
EULER_GAMMA = 0.5772156649015329


def induced_emf_monopole(height, radius, frequency, eta=ETA0):
    """Induced-EMF impedance of a thin monopole over perfect ground (sinusoidal current).

    Balanis, Antenna Theory, ch. 8 (self-impedance of a centre-fed dipole, equations for Rm, Xm
    and the input values Rm/sin^2(kl/2), Xm/sin^2(kl/2)); the monopole is half the dipole with
    l = 2h. Transcribed from check values §2 (from memory of the text).
    """
    k = 2 * np.pi * frequency / c
    ell = 2 * height
    kl = k * ell
    si1, ci1 = sici(kl)
    si2, ci2 = sici(2 * kl)
    _, cia = sici(2 * k * radius**2 / ell)
    rm = eta / (2 * np.pi) * (
        EULER_GAMMA + np.log(kl) - ci1 + 0.5 * np.sin(kl) * (si2 - 2 * si1)
        + 0.5 * np.cos(kl) * (EULER_GAMMA + np.log(kl / 2) + ci2 - 2 * ci1)
    )
    xm = eta / (4 * np.pi) * (2 * si1 + np.cos(kl) * (2 * si1 - si2) - np.sin(kl) * (2 * ci1 - ci2 - cia))
    s2 = np.sin(kl / 2) ** 2
    return 0.5 * rm / s2, 0.5 * xm / s2


def test_induced_emf_oracle_half_wave():
    # Balanis, Antenna Theory, ch. 4/8: half-wave dipole 73 + j42.5 ohm (published, with eta = 120 pi,
    # 73.13 unrounded); check values §2 [num] with the CODATA eta0: 73.08 + j42.52. The quarter-wave
    # monopole is half of the dipole.
    f = 1e6
    lam = c / f
    r, x = induced_emf_monopole(lam / 4, 1e-5 * lam, f)
    assert 2 * r == pytest.approx(73.08, abs=0.01)
    assert 2 * x == pytest.approx(42.52, abs=0.01)
    r120, x120 = induced_emf_monopole(lam / 4, 1e-5 * lam, f, eta=120 * np.pi)
    assert 2 * r120 == pytest.approx(73.0, abs=0.2)
    assert 2 * x120 == pytest.approx(42.5, abs=0.1)


def test_radiation_resistance_uniform_and_triangular():
    # Balanis ch. 4 / Terman (from memory): Rr = 160 pi^2 (h_e/lambda)^2; uniform h_e = h, triangular h/2.
    # check values §1 [num]: 10 m at 1 MHz, 1.757 ohm and 0.4393 ohm (with eta = 120 pi; CODATA eta0 is 0.06 % lower).
    assert sa.radiation_resistance_uniform(10.0, 1e6) == pytest.approx(1.757, rel=1e-3)
    assert sa.radiation_resistance_triangular(10.0, 1e6) == pytest.approx(0.4393, rel=1e-3)
    assert sa.radiation_resistance_triangular(10.0, 1e6) == pytest.approx(40 * np.pi**2 * (10 / (c / 1e6)) ** 2, rel=1e-3)


def test_schelkunoff_z0_and_reactance():
    # Schelkunoff & Friis, Antennas: Theory and Practice, 1952 (from memory): Z0 = 60 [ln(2h/a) - 1], X = -Z0 cot(kh).
    h, a, f = 10.0, 1e-3, 1e6
    z0 = sa.monopole_z0_schelkunoff(h, a)
    assert z0 == pytest.approx(60 * (np.log(2 * h / a) - 1), rel=1e-3)
    k = 2 * np.pi * f / c
    assert sa.monopole_reactance(h, a, f, "schelkunoff") == pytest.approx(-z0 / np.tan(k * h), rel=1e-12)
    # check values §2 [num]: -2511.5 ohm
    assert sa.monopole_reactance(h, a, f, "schelkunoff") == pytest.approx(-2511.5, rel=1e-3)


def test_uniform_charge_z0_agrees_with_induced_emf():
    # Induced-EMF reactance (Balanis ch. 8 via scipy.special.sici) against the two average impedances:
    # the uniform-charge form within 1 %, Schelkunoff's form about 8 % high (check values §2 [num]).
    h, a, f = 10.0, 1e-3, 1e6
    _, x_emf = induced_emf_monopole(h, a, f)
    x_uc = sa.monopole_reactance(h, a, f, "uniform-charge")
    x_sch = sa.monopole_reactance(h, a, f, "schelkunoff")
    assert x_uc == pytest.approx(x_emf, rel=0.01)
    assert abs(x_sch / x_emf - 1) > 0.05
    assert sa.monopole_reactance(h, a, f) == x_uc  # the default


@pytest.mark.parametrize("h, a, f", [(5.0, 1e-3, 1e6), (20.0, 0.5e-3, 0.5e6), (10.0, 2e-3, 2e6)])
def test_uniform_charge_tracks_induced_emf_for_short_wires(h, a, f):
    # Same source; kh up to 0.42.
    _, x_emf = induced_emf_monopole(h, a, f)
    assert sa.monopole_reactance(h, a, f) == pytest.approx(x_emf, rel=0.015)


def test_wire_over_ground_impedance():
    # Image method: Z0 = (eta0 / 2 pi) arccosh(H/a); check values §3: 593.8 ohm at H = 10 m, a = 1 mm.
    assert sa.horizontal_wire_z0(10.0, 1e-3) == pytest.approx(593.8, rel=2e-4)
    # the trade's 138 log10(4H/d) form (common practice)
    assert sa.horizontal_wire_z0(10.0, 1e-3) == pytest.approx(138 * np.log10(4 * 10.0 / 2e-3), rel=2e-3)


class TestInvertedL:
    # check values §4 [num] check values for Laport's top-loading-angle method (from memory), computed
    # with Zv = 60 [ln(h/a) - 1] and Zt = 60 ln(2h/a); the module uses eta0/2pi and arccosh, 0.07 % apart.
    def test_one_megahertz(self):
        r = sa.inverted_l(10.0, 20.0, 1e-3, 1e6)
        assert np.degrees(r.loading_angle_rad) == pytest.approx(20.27, abs=0.02)
        assert r.effective_height_m == pytest.approx(8.274, rel=1e-3)
        assert r.reactance_ohm == pytest.approx(-779.8, rel=2e-3)
        assert r.radiation_resistance_ohm == pytest.approx(1.203, rel=2e-3)

    def test_two_hundred_kilohertz(self):
        r = sa.inverted_l(10.0, 20.0, 1e-3, 0.2e6)
        assert r.effective_height_m == pytest.approx(8.125, rel=1e-3)
        assert r.reactance_ohm == pytest.approx(-4401, rel=2e-3)

    def test_broadcast_geometries_by_frequencies(self):
        rng = np.random.default_rng(1)
        h = rng.uniform(3, 20, 50)[:, None]
        t = rng.uniform(5, 50, 50)[:, None]
        f = np.linspace(0.15e6, 1.7e6, 7)[None, :]
        r = sa.inverted_l(h, t, 1e-3, f)
        assert r.effective_height_m.shape == (50, 7)
        one = sa.inverted_l(float(h[3, 0]), float(t[3, 0]), 1e-3, float(f[0, 5]))
        assert r.reactance_ohm[3, 5] == pytest.approx(float(one.reactance_ohm), rel=1e-12)

    def test_consistency_static_limit_is_capacitance_ratio(self):
        # consistency check (expected value built from this module's Z0 functions): Terman / Laport
        # capacitance-ratio form (from memory) with line capacitances C = l / (c Z0); the top-loading
        # angle model reduces to it as k -> 0. The outside check is the next test.
        h, lt, a = 10.0, 20.0, 1e-3
        r = sa.inverted_l(h, lt, a, 1e3)
        cv = h / (c * sa.monopole_z0(h, a))
        ct = lt / (c * sa.horizontal_wire_z0(h, a))
        assert r.effective_height_m == pytest.approx(sa.effective_height_capacitance_ratio(h, ct, cv), rel=1e-6)


    def test_static_limit_against_outside_formulas_and_electrostatic_value(self):
        # Outside: the line impedances written here from their published forms, Zv = (η0/2π)[ln(h/a) − 1]
        # (Howe's average potential, from memory) and Zt = (η0/2π) arccosh(H/a) (image method), give
        # Cv = h/(c Zv), Ct = lt/(c Zt) and Terman's capacitance-ratio h_e = h (Ct + Cv/2)/(Ct + Cv)
        # (Terman / Laport, from memory); and check values §3 [num, an independent electrostatic moment
        # solution]: 8.133 m for the 10 + 20 m inverted-L, within 1 % (the line model is a thin-wire
        # approximation; it gives 8.125 m).
        h, lt, a = 10.0, 20.0, 1e-3
        zv = ETA0 / (2 * np.pi) * (np.log(h / a) - 1)
        zt = ETA0 / (2 * np.pi) * np.arccosh(h / a)
        cv, ct = h / (c * zv), lt / (c * zt)
        r = sa.inverted_l(h, lt, a, 1e3)
        assert float(r.effective_height_m) == pytest.approx(h * (ct + cv / 2) / (ct + cv), rel=1e-6)
        assert float(r.effective_height_m) == pytest.approx(8.133, rel=0.01)


def test_consistency_t_is_inverted_l_with_half_top():
    # consistency check (expected value built from this module's Z0 functions); Laport (from memory):
    # a T is the inverted-L form with Zt/2 and lt/2. The outside check is the next test.
    h, half, a, f = 10.0, 10.0, 1e-3, 1e6
    k = 2 * np.pi * f / c
    zv, zt = sa.monopole_z0(h, a), sa.horizontal_wire_z0(h, a)
    delta = np.arctan(zv / (zt / 2) * np.tan(k * half))
    r = sa.t_aerial(h, half, a, f)
    assert float(r.loading_angle_rad) == pytest.approx(delta, rel=1e-12)


def test_t_against_outside_top_loading_formulas():
    # Outside: Laport's top-loading angle (Radio Antenna Engineering, from memory) with the line impedances
    # written here from their published forms (see above): δ = arctan[(Zv/(Zt/2)) tan(k lt/2)],
    # h_e = [cos δ − cos(δ + kh)]/[k sin(δ + kh)], X = −Zv cot(δ + kh); and check values §3 [num, independent
    # electrostatic solution]: the T 10 m + 2 × 10 m has h_e 8.120 m in the static limit (1 %).
    h, half, a, f = 10.0, 10.0, 1e-3, 1e6
    k = 2 * np.pi * f / c
    zv = ETA0 / (2 * np.pi) * (np.log(h / a) - 1)
    zt = ETA0 / (2 * np.pi) * np.arccosh(h / a)
    delta = np.arctan(zv / (zt / 2) * np.tan(k * half))
    r = sa.t_aerial(h, half, a, f)
    assert float(r.loading_angle_rad) == pytest.approx(delta, rel=1e-9)
    he = (np.cos(delta) - np.cos(delta + k * h)) / (k * np.sin(delta + k * h))
    assert float(r.effective_height_m) == pytest.approx(he, rel=1e-9)
    assert float(r.reactance_ohm) == pytest.approx(-zv / np.tan(delta + k * h), rel=1e-9)
    assert float(sa.t_aerial(h, half, a, 1e3).effective_height_m) == pytest.approx(8.120, rel=0.01)


def test_consistency_vertical_monopole_short_limit_is_triangular():
    # consistency check against this module's own triangular formula; Balanis ch. 4: short unloaded
    # monopole, triangular current, h_e = h/2. The outside check is the next test.
    r = sa.vertical_monopole(10.0, 1e-3, 10e3)
    assert r.effective_height_m == pytest.approx(5.0, rel=1e-6)
    assert r.radiation_resistance_ohm == pytest.approx(sa.radiation_resistance_triangular(10.0, 10e3), rel=1e-6)


def test_vertical_monopole_short_limit_against_balanis():
    # Outside: Balanis ch. 4 (from memory), Rr = 40π²(h/λ)² for the triangular current, written here with
    # scipy.constants.c: 10 m at 10 kHz = 43.93 µΩ; and the induced-EMF monopole (Balanis ch. 8, the helper
    # above) for a short thin wire, 10 m of 1 mm at 300 kHz (kh = 0.063), within 0.2 %.
    r = sa.vertical_monopole(10.0, 1e-3, 10e3)
    assert float(r.radiation_resistance_ohm) == pytest.approx(40 * np.pi**2 * (10.0 * 10e3 / c) ** 2, rel=1e-3)
    assert float(r.radiation_resistance_ohm) == pytest.approx(43.93e-6, rel=1e-3)
    rr_emf, _ = induced_emf_monopole(10.0, 1e-3, 300e3)
    assert float(sa.vertical_monopole(10.0, 1e-3, 300e3).radiation_resistance_ohm) == pytest.approx(rr_emf, rel=2e-3)


def test_sloping_wire_projects_on_vertical():
    vert = sa.vertical_monopole(10.0, 1e-3, 1e6)
    slope = sa.sloping_wire(10.0, 6.0, 1e-3, 1e6)
    assert slope.effective_height_m == pytest.approx(0.6 * vert.effective_height_m, rel=1e-12)
    with pytest.raises(ModelInputError, match="rise"):
        sa.sloping_wire(10.0, 12.0, 1e-3, 1e6)


def test_flags_long_wire_and_resonance():
    r = sa.inverted_l(10.0, 20.0, 1e-3, [0.5e6, 1.3e6, 3e6])  # 30 m of wire: lambda/8 at 1.25 MHz
    assert list(r.too_long) == [False, True, True]
    assert list(r.past_resonance) == [False, False, True]
    assert r.warnings()
    q = sa.vertical_monopole(10.0, 1e-3, c / 40.0)  # exactly a quarter wave: finite, flagged
    assert np.isfinite(q.reactance_ohm) and bool(q.past_resonance)


def test_bad_z0_form_lists_choices():
    with pytest.raises(ModelInputError, match="'thick' is not a valid z0_form, must be one of 'uniform-charge', 'schelkunoff'"):
        sa.monopole_z0(10.0, 1e-3, "thick")


def test_lossless_available_power_independent_of_height():
    # [der] check values §1: P = E^2 lambda^2 / (640 pi^2) for any short height (160 pi^2 form; CODATA eta0 0.06 % apart).
    e, f = 1e-3, 1e6
    lam = c / f
    for h in (2.0, 10.0, 30.0):
        rr = sa.radiation_resistance(h, f)
        assert sa.available_power(e, h, rr, 0.0) == pytest.approx(e**2 * lam**2 / (640 * np.pi**2), rel=1e-3)
    assert sa.efficiency(1.0, 3.0) == pytest.approx(0.25)
    assert sa.open_circuit_voltage(2e-3, 5.0) == pytest.approx(0.01)


@settings(max_examples=50, deadline=None)
@given(h=st.floats(0.5, 100.0), t=st.floats(1.0, 100.0), f=st.floats(1e5, 3e5))
def test_rr_proportional_to_f_squared_when_short(h, t, f):
    # Short regime (total length << lambda): Rr(2f)/Rr(f) = 4 within 5 %.
    lam = c / (2 * f)
    if h + t > lam / 20:
        return
    r1 = sa.inverted_l(h, t, 1e-3, f).radiation_resistance_ohm
    r2 = sa.inverted_l(h, t, 1e-3, 2 * f).radiation_resistance_ohm
    assert r2 / r1 == pytest.approx(4.0, rel=0.05)


@settings(max_examples=100, deadline=None)
@given(h=st.floats(0.5, 100.0), t=st.floats(1.0, 1000.0), a=st.floats(1e-4, 5e-3), f=st.floats(1e5, 3e7))
def test_inverted_l_effective_height_between_half_and_full_height(h, t, a, f):
    r = sa.inverted_l(h, t, a, f)
    if bool(r.past_resonance):
        return
    assert 0.5 * h * (1 - 1e-9) <= float(r.effective_height_m) <= h * (1 + 1e-9)


@settings(max_examples=150, deadline=None)
@given(
    h=st.floats(0.5, 100.0),
    t=st.floats(1.0, 1000.0),
    a=st.floats(1e-4, 5e-2),
    f=st.floats(1e5, 3e7),
    form=st.sampled_from(sa.Z0_FORMS),
)
def test_no_nan_or_inf_for_extreme_valid_inputs(h, t, a, f, form):
    if h < 10 * a:
        return  # thin-wire models need length >> radius
    for r in (sa.inverted_l(h, t, a, f, z0_form=form), sa.t_aerial(h, t, a, f, z0_form=form),
              sa.vertical_monopole(h, a, f, form), sa.sloping_wire(t, min(h, t), a, f, form)):
        for v in (r.effective_height_m, r.reactance_ohm, r.radiation_resistance_ohm, r.loading_angle_rad):
            assert np.all(np.isfinite(v))
        assert np.all(r.radiation_resistance_ohm >= 0)


@pytest.mark.parametrize("func, args", [
    ("inverted_l", lambda g, f: (g[0], g[1], g[2], f)),
    ("t_aerial", lambda g, f: (g[0], g[1], g[2], f)),
    ("vertical_monopole", lambda g, f: (g[0], g[2], f)),
    ("sloping_wire", lambda g, f: (g[0] + g[1], g[0], g[2], f)),
])
def test_large_calls_in_pieces_give_the_same_numbers(monkeypatch, func, args):
    # consistency check: a call split into pieces (as every call above CHUNK_ELEMENTS is) returns
    # exactly what one whole call returns, flags included, for geometries as columns x frequencies as a row
    import aerial.models.short_aerial as sa

    rng = np.random.default_rng(5)
    geo = (rng.uniform(3, 25, (37, 1)), rng.uniform(5, 60, (37, 1)), rng.uniform(0.3e-3, 2e-3, (37, 1)))
    f = np.linspace(0.15e6, 3e6, 23)[None, :]
    whole = getattr(sa, func)(*args(geo, f))
    monkeypatch.setattr(sa, "CHUNK_ELEMENTS", 50)
    pieces = getattr(sa, func)(*args(geo, f))
    for name in ("effective_height_m", "reactance_ohm", "radiation_resistance_ohm", "loading_angle_rad",
                 "too_long", "past_resonance"):
        a, b = getattr(whole, name), getattr(pieces, name)
        assert a.shape == b.shape == (37, 23)
        assert np.array_equal(a, b), name
