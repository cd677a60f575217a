"""Tests for the tank circuit and its coupling to the aerial."""

# "check values §N" refers to the sections of docs/check-values.md.

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from aerial.core.errors import ModelInputError
from aerial.models import tank

TWO_PI = 2 * np.pi


def test_resonance_thomson_formula():
    # f0 = 1/(2π√(LC)) (Terman, Radio Engineers' Handbook); hand value: 240 µH with 100 pF -> 1027.3 kHz
    assert float(tank.resonant_frequency(240e-6, 100e-12)) == pytest.approx(1027.3e3, rel=1e-4)
    c = tank.resonant_capacitance(np.array([531e3, 1602e3]), 240e-6)
    np.testing.assert_allclose(tank.resonant_frequency(240e-6, c), [531e3, 1602e3], rtol=1e-12)


def test_capacitance_ratio_for_bands():
    # check values §10: (f_max/f_min)² = 9.10 for 531–1602 kHz, 10.29 for 530–1700, 3.33 for 153–279
    for lo, hi, ratio in [(531e3, 1602e3, 9.10), (530e3, 1700e3, 10.29), (153e3, 279e3, 3.33)]:
        c = tank.resonant_capacitance(np.array([lo, hi]), 100e-6)
        assert c[0] / c[1] == pytest.approx(ratio, abs=0.005)


def test_series_to_shunt_hand_worked():
    # hand-worked: 25 − j795.8 Ω at 1 MHz (a 200 pF aerial with 25 Ω):
    # |Z|² = 25² + 795.8² = 633 930; Rp = 633 930/25 = 25.36 kΩ; Cp = 795.8/(ω·633 930) = 199.8 pF
    s = tank.series_to_shunt(1e6, 25.0, -795.8)
    assert float(s.resistance) == pytest.approx(25357, rel=1e-3)
    assert float(s.capacitance) == pytest.approx(199.8e-12, rel=1e-3)


def test_tap_transforms_by_n_squared():
    # Z/n² for an ideal tap (check values §10)
    za = 25 - 800j
    t = tank.tank_coupling("coil tap", 1e6, za.real, za.imag, 240e-6, 5.0, tap_fraction=0.3)
    assert complex(t.aerial_admittance) == pytest.approx(0.09 / za)


def test_series_capacitor_combines_in_series():
    # check values §10: Cs = Ca·Cc/(Ca + Cc); 200 pF with 100 pF -> 66.67 pF (lossless aerial limit)
    f = 1e6
    xa = -1 / (TWO_PI * f * 200e-12)
    t = tank.tank_coupling("series capacitor", f, 1e-6, xa, 240e-6, 5.0, series_capacitance=100e-12)
    c = tank.shunt_from_admittance(f, t.aerial_admittance).capacitance
    assert float(c) == pytest.approx(200 * 100 / 300 * 1e-12, rel=1e-6)


def test_separate_primary_against_mesh_solution():
    # independent oracle: solve the two-mesh circuit (aerial + primary, coil + capacitor) directly
    f, L, lp, k, cap = 1e6, 240e-6, 60e-6, 0.3, 80e-12
    za = 25 - 700j
    w = TWO_PI * f
    rc, rp = 6.0, 2.0
    m = k * np.sqrt(L * lp)
    t = tank.tank_coupling("separate primary", f, za.real, za.imag, L, rc, primary_inductance=lp,
                           coupling_coefficient=k, primary_resistance=rp)
    y_total = t.coil_admittance + t.aerial_admittance + 1j * w * cap
    v_model = t.current_per_volt / y_total
    zc = 1 / (1j * w * cap)
    a = np.array([[za + rp + 1j * w * lp, -1j * w * m], [-1j * w * m, rc + 1j * w * L + zc]])
    i1, i2 = np.linalg.solve(a, np.array([1.0, 0.0]))
    v_mesh = -i2 * zc  # voltage across the capacitor (tank top)
    assert abs(complex(v_model)) == pytest.approx(abs(v_mesh), rel=1e-9)


def test_loaded_q_and_bandwidth():
    # Zverev (from memory): 1/QL = 1/Qu + Σ1/Qext; BW = f0/QL; (1 − QL/Qu)² with both ports matched
    ql = tank.loaded_q(200.0, 100.0, 200.0)
    assert float(ql) == pytest.approx(50.0)
    assert float(tank.bandwidth(1e6, ql)) == pytest.approx(20e3)
    assert float(tank.matched_power_ratio(100.0, 200.0)) == pytest.approx(0.25)


def test_universal_resonance_curve_at_half_bandwidth():
    # Terman (from memory): the response is 1/√2 at f0 ± f0/(2Q) (to first order in 1/Q)
    q = 200.0
    assert float(tank.single_tuned_response(1e6 * (1 + 1 / (2 * q)), 1e6, q)) == pytest.approx(2**-0.5, rel=2e-3)


@pytest.mark.parametrize("q, ratio", [(50.0, 2**-0.5), (8.0, 0.2), (0.8, 0.1), (2.0, 0.01)])
def test_audible_tuning_span_edges_against_scipy_bandpass(q, ratio):
    """At either end of the span the tank tuned there passes the signal at exactly ``ratio`` of its level.

    Outside reference: the second-order band-pass H(s) = (ω_t/Q)s/(s² + (ω_t/Q)s + ω_t²) of scipy.signal.freqs
    (the single tuned circuit of Terman's universal resonance curve), tuned to each edge and read at the signal.
    The (Q, ratio) rows are ours: from a high-Q tank at −3 dB to a broad one (Q 0.8) with a strong signal.
    """
    from scipy import signal

    f = 1.13e6
    low, high = (float(v) for v in tank.audible_tuning_span(f, q, ratio))
    assert low < f < high
    for tuned in (low, high):
        wt = TWO_PI * tuned
        _, h = signal.freqs([wt / q, 0.0], [1.0, wt / q, wt**2], worN=[TWO_PI * f])
        assert abs(h[0]) == pytest.approx(ratio, rel=1e-9)
    # the width is f·x/Q across the whole curve, x = √(1/r² − 1) (consistency check of the closed form)
    assert high - low == pytest.approx(f * np.sqrt(1 / ratio**2 - 1) / q, rel=1e-12)


def test_audible_tuning_span_of_a_signal_not_heard_is_its_frequency_and_bad_ratios_are_refused():
    low, high = tank.audible_tuning_span([1e6, 1e6], 30.0, [1.5, np.inf])
    np.testing.assert_array_equal(low, [1e6, 1e6])
    np.testing.assert_array_equal(high, [1e6, 1e6])
    with pytest.raises(ModelInputError, match="level_ratio must be positive"):
        tank.audible_tuning_span(1e6, 30.0, 0.0)


def test_calibration_recovers_known_aerial():
    # consistency: build a tank with a known 150 pF, 30 Ω aerial, find where it resonates, recover the aerial
    L, cset, qu = 240e-6, 120e-12, 150.0
    ca, ra = 150e-12, 30.0
    f = np.linspace(500e3, 1500e3, 200001)
    w = TWO_PI * f
    t = tank.tank_coupling("direct", f, ra, -1 / (w * ca), L, w * L / qu)
    need = tank.capacitance_needed(f, t.coil_admittance, t.aerial_admittance)
    f0 = float(np.interp(0.0, (cset - need)[::-1] * -1, f[::-1]))
    cal = tank.calibrate_from_resonance(f0, L, cset)
    za = tank.aerial_impedance_from_admittance("direct", f0, cal.aerial_admittance, L, TWO_PI * f0 * L / qu)
    assert -1 / (TWO_PI * f0 * za.imag) == pytest.approx(ca, rel=0.01)


def test_calibration_flags_impossible_readings():
    cal = tank.calibrate_from_resonance(1e6, 240e-6, 200e-12)  # above what L and C alone give
    assert cal.shunt_capacitance == 0.0 and cal.warnings
    cal = tank.calibrate_from_resonance(1e6, 240e-6, 50e-12, bandwidth=1e3, coil_unloaded_q=150)
    assert cal.shunt_resistance is None and "narrower" in cal.warnings[0]


def test_unknown_arrangement_lists_choices():
    with pytest.raises(ModelInputError, match="'loop' is not a valid coupling arrangement, must be one of 'direct'"):
        tank.tank_coupling("loop", 1e6, 25, -800, 240e-6, 5.0)


@settings(max_examples=60, deadline=None)
@given(st.sampled_from(tank.ARRANGEMENTS), st.floats(2e5, 2e6), st.floats(1, 200), st.floats(-5000, -50),
       st.floats(0.05, 1.0), st.floats(0.05, 0.9))
def test_property_inversion_round_trip(arrangement, f, ra, xa, n, k):
    args = dict(series_capacitance=100e-12, tap_fraction=n, primary_inductance=50e-6, coupling_coefficient=k,
                primary_resistance=1.0)
    t = tank.tank_coupling(arrangement, f, ra, xa, 240e-6, 5.0, **args)
    za = tank.aerial_impedance_from_admittance(arrangement, f, complex(t.aerial_admittance), 240e-6, 5.0, **args)
    assert za == pytest.approx(complex(ra, xa), rel=1e-6, abs=1e-6)


@settings(max_examples=80, deadline=None)
@given(st.floats(5, 1000), st.lists(st.floats(0.1, 1e5), max_size=3), st.floats(1e5, 2e6))
def test_property_loaded_q_below_unloaded(qu, ext, f):
    ql = float(tank.loaded_q(qu, *ext))
    assert 0 < ql <= qu
    assert float(tank.bandwidth(f, ql)) > 0
