"""Earth electrodes: Dwight rods and stars, IEEE Std 142 factors, Sunde buried wire, pipes, parallel sets."""

# "check values §N" refers to the sections of docs/check-values.md.

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from aerial.core.errors import ModelInputError
from aerial.models import electrodes as el


def test_dwight_rod_formula_value():
    # Dwight's formula R = ρ/(2πL)[ln(4L/a) − 1] (Dwight 1936; the form given in IEEE Std 142; from memory)
    # evaluated for a 5/8 in x 8 ft rod (15.875 mm x 2.44 m) in 100 ohm m: 39.88 ohm. This is the formula's
    # own output [num], not a worked example read from the standard.
    r = el.dwight_rod(2.44, 15.875e-3 / 2, 100.0)
    assert r.resistance_ohm == pytest.approx(39.88, abs=0.05)
    assert r.warnings == ()


def test_dwight_rod_second_value():
    # [num] check values §6: 3.0 m x 16 mm rod in 100 ohm m, 33.49 ohm.
    assert el.dwight_rod(3.0, 8e-3, 100.0).resistance_ohm == pytest.approx(33.49, abs=0.01)


def test_sunde_buried_wire():
    # Sunde, Earth Conduction Effects (1949), from memory; [num] check values §6: 10 m x 2 mm at 0.3 m, 100 ohm m: 18.16 ohm.
    assert el.sunde_buried_wire(10.0, 1e-3, 0.3, 100.0).resistance_ohm == pytest.approx(18.16, abs=0.01)


def test_dwight_two_arm_star_agrees_with_sunde():
    # Dwight's straight buried wire (length 2L, depth s/2) is Sunde's formula plus small s/L terms (both from memory).
    dw = el.dwight_star(2, 10.0, 1e-3, 0.3, 100.0).resistance_ohm
    su = el.sunde_buried_wire(20.0, 1e-3, 0.3, 100.0).resistance_ohm
    assert dw == pytest.approx(su, rel=0.01)


@pytest.mark.parametrize("n", [2, 3, 4, 6, 8])
@pytest.mark.parametrize("arm, radius, depth", [(10.0, 1e-3, 0.3), (30.0, 2e-3, 0.1), (5.0, 5e-3, 0.5)])
def test_dwight_star_coefficients_match_average_potential(n, arm, radius, depth):
    # Dwight's published star formulas (1936, tabulated in IEEE Std 142; coefficients from memory)
    # against this module's own average-potential integration: two routes, consistency within 0.1 %.
    dw = el.dwight_star(n, arm, radius, depth, 100.0).resistance_ohm
    ap = el.star_average_potential(n, arm, radius, depth, 100.0).resistance_ohm
    assert ap == pytest.approx(dw, rel=1e-3)


def test_star_other_counts_use_average_potential_and_say_so():
    r = el.dwight_star(5, 10.0, 1e-3, 0.3, 100.0)
    assert any("no published Dwight formula" in w for w in r.warnings)
    r4, r6 = (el.dwight_star(n, 10.0, 1e-3, 0.3, 100.0).resistance_ohm for n in (4, 6))
    assert r6 < r.resistance_ohm < r4


def test_two_rods():
    # Dwight 1936 (from memory). Far apart the pair tends to half one rod (consistency).
    one = el.dwight_rod(3.0, 8e-3, 100.0).resistance_ohm
    far = el.dwight_two_rods(3.0, 8e-3, 3000.0, 100.0)
    assert far.resistance_ohm == pytest.approx(one / 2, rel=1e-3)
    near = el.dwight_two_rods(3.0, 8e-3, 2.0, 100.0)
    assert any("spacing" in w for w in near.warnings)


def test_two_rods_mutual_term_is_the_point_source_potential():
    # Outside: far apart, each rod sees the other as a point current source at the surface of a half-space,
    # potential ρI/(2πs) (any electromagnetics text); two rods sharing I in parallel give R = R1/2 + ρ/(4πs).
    # At s = 50 L the mutual term is checked within 1 %; at s = 2 L against Dwight's series written here,
    # ρ/(4πL)[ln(4L/a) − 1] + ρ/(4πs)[1 − L²/(3s²) + 2L⁴/(5s⁴)] (Dwight 1936, from memory).
    L, a, rho = 3.0, 8e-3, 100.0
    one = float(el.dwight_rod(L, a, rho).resistance_ohm)
    s = 150.0
    mutual = float(el.dwight_two_rods(L, a, s, rho).resistance_ohm) - one / 2
    assert mutual == pytest.approx(rho / (4 * np.pi * s), rel=0.01)
    s = 6.0
    dwight = rho / (4 * np.pi * L) * (np.log(4 * L / a) - 1) + rho / (4 * np.pi * s) * (
        1 - L**2 / (3 * s**2) + 2 * L**4 / (5 * s**4))
    assert float(el.dwight_two_rods(L, a, s, rho).resistance_ohm) == pytest.approx(dwight, rel=1e-9)


def test_multiple_rod_factors():
    # IEEE Std 142 multiple-rod table (from memory): F = 1.16, 1.29, 1.36, 1.68, 1.80, 1.92, 2.00, 2.16
    # for n = 2, 3, 4, 8, 12, 16, 20, 24 (rods at one rod length; R_n = R_1 F / n). Every row is checked.
    one = float(el.dwight_rod(3.0, 8e-3, 100.0).resistance_ohm)
    for n, f in [(2, 1.16), (3, 1.29), (4, 1.36), (8, 1.68), (12, 1.80), (16, 1.92), (20, 2.00), (24, 2.16)]:
        r = el.multiple_rods(n, 3.0, 8e-3, 3.0, 100.0)
        assert float(r.resistance_ohm) == pytest.approx(one * f / n, rel=1e-12)
        assert r.warnings == ()
    # interpolated between 4 (1.36) and 8 (1.68): n = 6 -> 1.52
    assert float(el.multiple_rods(6, 3.0, 8e-3, 3.0, 100.0).resistance_ohm) == pytest.approx(one * 1.52 / 6)


def test_multiple_rods_flags_outside_table_and_spacing():
    assert any("outside the IEEE Std 142 table" in w for w in el.multiple_rods(30, 3.0, 8e-3, 3.0, 100.0).warnings)
    assert any("one rod length" in w for w in el.multiple_rods(4, 3.0, 8e-3, 1.0, 100.0).warnings)
    with pytest.raises(ModelInputError, match="whole number"):
        el.multiple_rods(2.5, 3.0, 8e-3, 3.0, 100.0)


def test_water_pipe_and_parallel_warnings():
    pipe = el.water_pipe(20.0, 0.01, 0.8, 100.0)
    assert pipe.resistance_ohm == pytest.approx(el.sunde_buried_wire(20.0, 0.01, 0.8, 100.0).resistance_ohm)
    assert any("plastic" in w for w in pipe.warnings)
    # NFPA 70 Art. 250 (from memory): at least 3 m in contact with the earth
    assert any("3 m" in w for w in el.water_pipe(2.0, 0.01, 0.5, 100.0).warnings)
    par = el.parallel_combination([40.0, 40.0, 20.0])
    assert par.resistance_ohm == pytest.approx(10.0)
    assert any("optimistic" in w for w in par.warnings)


def test_resistivity_from_conductivity():
    # IEEE Std 80 / 142 soil classes (from memory): moist soil ~100 ohm m = 0.01 S/m.
    assert el.resistivity_from_conductivity(0.01) == pytest.approx(100.0)
    with pytest.raises(ModelInputError, match="conductivity"):
        el.resistivity_from_conductivity(0.0)


@settings(max_examples=60, deadline=None)
@given(
    length=st.floats(1.0, 100.0),
    radius=st.floats(1e-3, 2e-2),
    rho=st.floats(10.0, 1e4),
    grow=st.floats(1.1, 3.0),
)
def test_resistances_positive_and_fall_with_length(length, radius, rho, grow):
    rod1, rod2 = (el.dwight_rod(x, radius, rho).resistance_ohm for x in (length, length * grow))
    assert rod1 > 0 and rod2 < rod1
    w1, w2 = (el.sunde_buried_wire(x, radius, 0.5, rho).resistance_ohm for x in (length * 10, length * 10 * grow))
    assert w1 > 0 and w2 < w1
    s = el.star_average_potential(4, length * 5, radius, 0.3, rho).resistance_ohm
    assert np.isfinite(s) and s > 0
