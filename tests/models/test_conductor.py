"""Conductor loss: resistivity, skin depth, round-wire and clad-wire internal impedance."""

# "check values §N" refers to the sections of docs/check-values.md.

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import mu_0

from aerial.core.errors import ModelInputError
from aerial.models import conductor as cd

# ASTM B258: d = 0.127 mm x 92**((36 - n)/39) (published formula).
AWG14_RADIUS = 0.5 * 0.127e-3 * 92 ** ((36 - 14) / 39)


def test_copper_resistivity_is_iec_60028():
    # IEC 60028 annealed copper, 1/58 ohm mm^2/m = 1.72414e-8 ohm m (from memory).
    assert cd.COPPER_RESISTIVITY == pytest.approx(1 / 58e6, rel=1e-5)
    assert cd.COPPER_TEMPERATURE_COEFFICIENT == pytest.approx(0.00393)


def test_skin_depth_copper_1mhz_with_scipy_mu0():
    # delta = sqrt(rho / (pi f mu0)) with scipy.constants.mu_0; check values §5: 66.09 um at 1 MHz.
    expected = np.sqrt(1.72414e-8 / (np.pi * 1e6 * mu_0))
    assert cd.skin_depth(1e6) == pytest.approx(expected, rel=1e-12)
    assert cd.skin_depth(1e6) == pytest.approx(66.09e-6, rel=2e-4)
    # 1/sqrt(f) scaling: 66.09/sqrt(f) mm
    assert cd.skin_depth(4e6) == pytest.approx(0.5 * cd.skin_depth(1e6), rel=1e-12)


def test_awg14_at_1mhz():
    # [num] consistency value, check values §5: exact Bessel solution 53.15 mOhm/m, R_dc 8.286 mOhm/m.
    assert cd.dc_resistance_per_m(AWG14_RADIUS) == pytest.approx(8.286e-3, rel=5e-4)
    assert cd.resistance_per_m(AWG14_RADIUS, 1e6) == pytest.approx(53.15e-3, rel=5e-4)


def test_thick_wire_asymptote():
    # Ramo, Whinnery & Van Duzer, Fields and Waves, sec. 5.5 (from memory): R ~ R_dc (a/2delta + 1/4) for a/delta >~ 3.
    a, f = 2e-3, 5e6
    ratio = a / cd.skin_depth(f)
    approx = cd.dc_resistance_per_m(a) * (ratio / 2 + 0.25)
    assert cd.resistance_per_m(a, f) == pytest.approx(approx, rel=2e-3)
    # internal reactance -> resistance for a >> delta (surface impedance (1 + j) Rs)
    z = cd.internal_impedance_per_m(a, 1e8)
    assert z.imag == pytest.approx(z.real, rel=1e-2)


def test_low_frequency_limit_and_zero_frequency():
    # Low-frequency series R = R_dc [1 + (a/delta)^4 / 48] (same source, from memory): at a/delta = 0.1 the excess is 2e-6.
    a = 1e-4
    assert cd.resistance_per_m(a, 0.0) == pytest.approx(cd.dc_resistance_per_m(a), rel=1e-14)
    f = (a / 0.1) ** -2 * 1.72414e-8 / (np.pi * mu_0)  # frequency where a/delta = 0.1
    assert cd.resistance_per_m(a, f) / cd.dc_resistance_per_m(a) - 1 == pytest.approx(0.1**4 / 48, rel=0.05)


def test_steel_is_lossier_than_copper():
    # Consistency: higher resistivity and mu_r both raise RF resistance (R ~ sqrt(rho mu_r) at high frequency).
    cu = cd.resistance_per_m(1e-3, 1e6)
    fe = cd.resistance_per_m(1e-3, 1e6, 1.4e-7, 100.0)
    assert fe / cu == pytest.approx(np.sqrt(1.4e-7 / 1.72414e-8 * 100.0), rel=0.05)


class TestCladWire:
    def test_dc_is_parallel_of_cladding_and_core(self):
        # Consistency with the DC parallel of two conductors.
        a, frac = 1e-3, 0.24
        area = np.pi * a**2
        expected = 1 / (frac * area / 1.72414e-8 + (1 - frac) * area / 1.4e-7)
        assert cd.clad_wire_impedance_per_m(a, 0.0, frac).real == pytest.approx(expected, rel=1e-9)
        # at 10 Hz the steel core (mu_r 100) already shows a 1e-5 skin-effect excess
        assert cd.clad_wire_impedance_per_m(a, 10.0, frac).real == pytest.approx(expected, rel=1e-4)

    def test_high_frequency_is_solid_copper(self):
        # Cladding t = a (1 - sqrt(0.76)) = 128 um; copper skin depth at 30 MHz is 12 um: current stays in copper.
        a = 1e-3
        clad = cd.clad_wire_impedance_per_m(a, 30e6, 0.24)
        cu = cd.internal_impedance_per_m(a, 30e6)
        assert clad.real == pytest.approx(cu.real, rel=1e-3)

    def test_copper_core_gives_solid_copper_at_every_frequency(self):
        f = np.logspace(0, 8, 17)
        clad = cd.clad_wire_impedance_per_m(1e-3, f, 0.3, core_resistivity=1.72414e-8, core_relative_permeability=1.0)
        assert np.allclose(clad, cd.internal_impedance_per_m(1e-3, f), rtol=1e-9)

    def test_rejects_bad_fraction(self):
        with pytest.raises(ModelInputError, match="cladding_area_fraction"):
            cd.clad_wire_impedance_per_m(1e-3, 1e6, 1.2)


def test_referred_loss_triangular_and_uniform():
    # Power balance (Balanis, Antenna Theory, sec. 2.14, from memory): triangular R'h/3, uniform R'h.
    assert cd.referred_loss_resistance(0.03, 10.0, "triangular") == pytest.approx(0.1)
    assert cd.referred_loss_resistance(0.03, 10.0, "uniform") == pytest.approx(0.3)
    s = np.linspace(0, 10, 4001)
    assert cd.loss_from_current(0.03, s, 1 - s / 10) == pytest.approx(0.1, rel=1e-6)


def test_bad_distribution_lists_choices():
    with pytest.raises(ModelInputError, match="'parabolic' is not a valid current distribution, must be one of 'uniform', 'triangular'"):
        cd.referred_loss_resistance(0.03, 10.0, "parabolic")


def test_rejects_negative_radius():
    with pytest.raises(ModelInputError, match="radius must be finite and positive"):
        cd.internal_impedance_per_m(-1e-3, 1e6)


@settings(max_examples=60, deadline=None)
@given(
    radius=st.floats(1e-4, 5e-2),
    frequency=st.floats(1e5, 3e7),
    material=st.sampled_from([(1.72414e-8, 1.0), (2.8264e-8, 1.0), (1.4e-7, 100.0)]),
)
def test_resistance_positive_finite_and_above_dc(radius, frequency, material):
    rho, mur = material
    r = cd.resistance_per_m(radius, frequency, rho, mur)
    assert np.isfinite(r) and r > 0
    assert r >= cd.dc_resistance_per_m(radius, rho) * (1 - 1e-12)
    clad = cd.clad_wire_impedance_per_m(radius, frequency, 0.24)
    assert np.isfinite(clad.real) and clad.real > 0
