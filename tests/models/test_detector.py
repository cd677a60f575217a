"""Tests for the diode detector."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.special import i0

from aerial.core.errors import ModelInputError
from aerial.models import detector as det


@pytest.mark.parametrize("name", ["germanium", "schottky"])
def test_metal_semiconductor_presets_turn_on_low(name):
    # common practice: metal–semiconductor junctions conduct from about 0.15–0.46 V
    d = det.get_diode(name)
    assert 0.15 <= float(det.conduction_voltage(d.saturation_current_a, d.ideality)) <= 0.46


def test_silicon_preset_turns_on_near_0_6_v():
    # common practice: silicon pn junctions conduct from about 0.6 V
    d = det.get_diode("silicon")
    assert 0.55 <= float(det.conduction_voltage(d.saturation_current_a, d.ideality)) <= 0.75


def test_thermal_voltage_scipy_constants():
    # scipy.constants: kT/q at 300 K = 25.852 mV
    assert float(det.thermal_voltage(300.0)) == pytest.approx(0.025852, rel=1e-4)


def test_open_circuit_matches_bessel_and_square_law():
    # Terman (from memory): Vdc = nVT ln I0(Vp/nVT); square law Vp²/(4nVT) for Vp << nVT.
    vt = float(det.thermal_voltage())
    vp = np.array([0.1, 1.0, 3.0]) * vt
    np.testing.assert_allclose(det.open_circuit_detected_voltage(vp, 1.0), vt * np.log(i0(vp / vt)), rtol=1e-10)
    small = 0.01 * vt
    assert float(det.open_circuit_detected_voltage(small, 1.0)) == pytest.approx(small**2 / (4 * vt), rel=1e-4)


def test_no_overflow_for_large_signals():
    v = det.open_circuit_detected_voltage(50.0, 1.0)  # x ≈ 1900: I0 overflows a float
    assert np.isfinite(v) and 49.8 < float(v) < 50.0


def test_input_resistance_limits():
    # small signal -> video resistance nVT/Is; strong signal -> R_L/2 (Terman, from memory)
    d = det.get_diode("schottky")
    vt = d.ideality * float(det.thermal_voltage())
    weak = det.loaded_detector(1e-5, d.saturation_current_a, d.ideality, 10e3)
    assert float(weak.input_resistance) == pytest.approx(vt / d.saturation_current_a, rel=1e-3)
    strong = det.loaded_detector(30.0, d.saturation_current_a, d.ideality, 10e3)
    assert float(strong.input_resistance) == pytest.approx(5e3, rel=0.05)
    assert bool(strong.converged)


def test_low_impedance_headphones_pull_input_resistance_down():
    # Terman (from memory): a strong-signal peak detector presents about R_L/2; with 32 Ω headphones
    # that is ~16 Ω across a tank whose resonant resistance is tens of kΩ (the circuit-level effect
    # on audio is tested in tests/test_reception.py)
    d = det.get_diode("germanium")
    r = det.loaded_detector(3.0, d.saturation_current_a, d.ideality, 32.0)
    assert 14 < float(r.input_resistance) < 25


def test_unknown_detector_lists_choices():
    with pytest.raises(ModelInputError, match="'crystal' is not a valid detector, must be one of 'germanium'"):
        det.get_diode("crystal")


@settings(max_examples=60, deadline=None)
@given(st.floats(0, 20), st.sampled_from(list(det.DIODE_PRESETS)), st.floats(30, 1e6))
def test_property_detector_finite_and_bounded(vp, name, load):
    d = det.get_diode(name)
    r = det.loaded_detector(vp, d.saturation_current_a, d.ideality, load)
    oc = det.open_circuit_detected_voltage(vp, d.ideality)
    assert np.isfinite(r.detected_voltage) and np.isfinite(r.input_resistance)
    assert 0 <= float(r.detected_voltage) <= float(oc) + 1e-12
    assert float(r.input_resistance) > 0
