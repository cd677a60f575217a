"""The exact lossy half-space: Sommerfeld integrals and the moment solver over real soil.

Small wire sets and one or two frequencies each, so the whole file runs in a few
seconds; convergence studies are in benchmarks/bench_sommerfeld.py.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.special import j0

from aerial.models.fullwave import solve_full_wave
from aerial.models.fullwave_system import System
from aerial.models.fullwave_geometry import piece_counts
from aerial.models.segments import Segments, polyline_segments
from aerial.models.sommerfeld import closed_form_parts, remainder_integrals, soil_wavenumbers, sommerfeld_table
from aerial.cli import main

SEA = dict(soil_permittivity=80.0, soil_conductivity=5.0)  # sea water, ITU-R P.527 (common practice)
MEDIUM = dict(soil_permittivity=15.0, soil_conductivity=0.005)  # medium ground, ITU-R P.527 (common practice)


def _quad_complex(fn, a, b):
    re = quad(lambda x: fn(x).real, a, b, limit=400)[0]
    im = quad(lambda x: fn(x).imag, a, b, limit=400)[0]
    return re + 1j * im


def test_te_remainder_matches_scipy_quadrature():
    """The horizontal-current Sommerfeld integral against scipy.integrate.quad (a general reference library)."""
    k0, k1, eps = soil_wavenumbers(1e6, **{"relative_permittivity": 15.0, "conductivity": 0.005})
    rho, h = 5.0, 0.5

    def f(lam):
        u = np.sqrt(lam * lam - k0 * k0 + 0j)
        u1 = np.sqrt(lam * lam - k1 * k1 + 0j)
        return (u - u1) / (u + u1) * lam / u * j0(lam * rho) * np.exp(-u * h)

    # [0, k0] and [k0, 2 k0] with the branch point removed by substitution, then the real axis
    ref = _quad_complex(lambda p: f(k0 * np.sin(p)) * k0 * np.cos(p), 0, np.pi / 2)
    ref += _quad_complex(lambda p: f(k0 * np.cosh(p)) * k0 * np.sinh(p), 1e-12, np.arccosh(2.0))
    ref += _quad_complex(f, 2 * k0, 60 * abs(k1) + 300 / np.hypot(rho, h))
    ours = remainder_integrals(k0, eps, np.array([rho]), np.array([h]))[0, 0] * 4 * np.pi
    assert ours == pytest.approx(ref, rel=1e-6)


def test_closed_form_parts_match_quadrature():
    # int J0(l rho)(e^{-l a} - e^{-l b})/l dl = asinh(b/rho) - asinh(a/rho): checked by scipy quad
    k0, k1, eps = soil_wavenumbers(1e6, 15.0, 0.005)
    rho, h = 2.0, 1.0
    c = 1 / abs(k1)
    ref = quad(lambda x: j0(x * rho) * (np.exp(-x * h) - np.exp(-x * (h + c))) / x, 0, 200, limit=2000)[0]
    kq = (eps - 1) / (eps + 1)
    assert closed_form_parts(k0, eps, rho, h)[1] * 4 * np.pi / kq == pytest.approx(ref, rel=1e-6)


def test_free_soil_gives_no_reflection():
    # eps_c = 1: every reflection coefficient is zero (free space)
    k0, _, eps = soil_wavenumbers(1e6, 1.0, 0.0)
    assert np.all(remainder_integrals(k0, eps, np.array([1.0, 3.0]), np.array([2.0, 0.1])) == 0)


def test_tables_are_built_once_and_shared():
    """Consistency check: a second geometry at the same soil and frequency reuses the table's values."""
    a = sommerfeld_table(1.2e6, 15.0, 0.005, 10.0)
    b = sommerfeld_table(1.2e6, 15.0, 0.005, 12.0)
    assert a.values.shape == b.values.shape and np.array_equal(a.values, b.values)


def _sloping():
    return polyline_segments([[0, 0, 0.02], [20, 0, 12]], 1e-3)


def _elevated_fed():
    """A horizontal wire fed 6 m up, with a vertical earth lead to the ground (invented demo layout)."""
    start = np.array([[0, 0, 6.0], [0, 0, 6.0]])
    end = np.array([[25, 0, 6.0], [0, 0, 0.0]])
    return Segments(start, end, np.full(2, 1e-3), np.array([False, True]), np.array([0, 0, 6.0]),
                    wire_index=np.array([0, 1]))


@pytest.mark.parametrize("make", [_sloping, _elevated_fed], ids=["base-fed", "elevated-fed"])
def test_very_conductive_soil_reproduces_the_image_solution(make):
    """sigma -> infinity: the exact half-space tends to the perfect-ground image solution (within 3 % in R_rad and X)."""
    seg = make()
    pec = solve_full_wave(seg, [1e6], convergence_check=False)
    ex = solve_full_wave(seg, [1e6], ground="lossy", soil_permittivity=10.0, soil_conductivity=1e4,
                         convergence_check=False)
    assert ex.radiation_resistance[0] == pytest.approx(pec.radiation_resistance[0], rel=0.03)
    assert ex.impedance[0].imag == pytest.approx(pec.impedance[0].imag, rel=0.03)


def test_sea_water_keeps_the_sign_of_the_reactance():
    """Sea water (5 S/m) is nearly a perfect conductor at MF: X within 3 % of the image solution (it was +311 ohm
    against -1660 ohm under the reflection-coefficient approximation), with one warning per condition."""
    seg = _sloping()
    f = np.array([531e3, 1.0e6, 1.7e6])
    pec = solve_full_wave(seg, f, convergence_check=False)
    ex = solve_full_wave(seg, f, ground="lossy", convergence_check=False, **SEA)
    np.testing.assert_allclose(ex.impedance.imag, pec.impedance.imag, rtol=0.03)
    assert np.all(ex.ground_loss_resistance >= 0) and np.all(ex.ground_loss_resistance < ex.impedance.real)
    assert "Sommerfeld" in ex.model
    quick = solve_full_wave(seg, f, ground="reflection-coefficient", convergence_check=False, **SEA)
    assert "reflection-coefficient" in quick.model
    assert len(quick.warnings) <= 4 and all("531000 Hz," not in w or "frequencies" in w or w.count("Hz") <= 4
                                             for w in quick.warnings)


def test_free_space_limit_is_the_half_wave_dipole():
    """eps_r -> 1, sigma -> 0: a half-wave dipole (the earth side an insulated counterpoise) 1.5 wavelengths up
    behaves as in free space: Z -> 73.08 + j42.52 ohm for a very thin wire (Balanis, Antenna Theory, 3rd ed.,
    induced EMF, check values section 2), within 4 % of |Z| at a = 1e-8 wavelength as for the monopole."""
    f = 10e6
    lam = 299_792_458.0 / f
    zh = 1.5 * lam
    start = np.array([[0, 0, zh], [0, 0, zh]])
    end = np.array([[lam / 4, 0, zh], [-lam / 4, 0, zh]])
    seg = Segments(start, end, np.full(2, 1e-8 * lam), np.array([False, True]), np.array([0, 0, zh]),
                   wire_index=np.array([0, 1]), resistivity=0.0)
    r = solve_full_wave(seg, [f], ground="lossy", soil_permittivity=1.0, soil_conductivity=0.0,
                        convergence_check=False, min_pieces_per_wire=24)
    ref = 73.08 + 42.52j
    assert abs(r.impedance[0] - ref) / abs(ref) < 0.04
    # consistency check: twice the quarter-wave monopole over a perfect ground (image theory)
    m = polyline_segments([[0, 0, 0.0], [0, 0, lam / 4]], 1e-8 * lam)
    m = Segments(m.start, m.end, m.radius, m.grounded, m.feed, wire_index=m.wire_index, resistivity=0.0)
    mono = solve_full_wave(m, [f],
                           convergence_check=False, min_pieces_per_wire=24)
    assert r.impedance[0] == pytest.approx(2 * mono.impedance[0], rel=1e-6)


def test_reflection_coefficient_approximation_converges_at_a_quarter_wavelength():
    """The approximation agrees with the exact treatment for wires a quarter wavelength and more above the soil
    (Burke and Miller, IEEE Trans. AP-32(10), 1984: accurate above about 0.1-0.2 wavelength; from memory)."""
    f = 10e6
    lam = 299_792_458.0 / f
    errs = []
    for zh in (0.25 * lam, 0.5 * lam):
        start = np.array([[0, 0, zh], [0, 0, zh]])
        end = np.array([[lam / 4, 0, zh], [-lam / 4, 0, zh]])
        seg = Segments(start, end, np.full(2, 1e-3), np.array([False, True]), np.array([0, 0, zh]),
                       wire_index=np.array([0, 1]))
        ex = solve_full_wave(seg, [f], ground="lossy", convergence_check=False, **MEDIUM)
        rc = solve_full_wave(seg, [f], ground="reflection-coefficient", convergence_check=False, **MEDIUM)
        errs.append(abs(rc.impedance[0] - ex.impedance[0]) / abs(ex.impedance[0]))
    assert errs[0] < 0.05 and errs[1] < 0.05


def test_half_space_matrix_is_reciprocal():
    """Consistency check: the exact fill is symmetric (reciprocity) for a bent wire over medium soil."""
    seg = polyline_segments([[0, 0, 0.02], [0, 0, 8.0], [15, 0, 8.0]], 1e-3)
    counts = piece_counts(seg, 2.0, 6)
    sysm = System(seg, counts, "lossy", MEDIUM["soil_permittivity"], MEDIUM["soil_conductivity"], 3)
    z = sysm.matrix_direct(2 * np.pi * 1e6 / 299_792_458.0)
    assert np.max(np.abs(z - z.T)) < 2e-3 * np.max(np.abs(z))


def test_cli_names_the_ground_treatment(tmp_path, capsys):
    code = main(["report", "--quick-ground"])
    assert code == 2
    assert "--quick-ground" in capsys.readouterr().err


def test_cli_report_states_the_ground_treatment_of_each_loss(capsys, write_site):
    # the 10 m vertical of the shared fixtures, three frequencies: the words, not the figures, are checked here
    from ..conftest import MINIMAL

    code = main(["report", str(write_site(MINIMAL)), "--full-wave", "--lossy-ground", "--step", "600 kHz"])
    out = capsys.readouterr().out
    assert code == 0
    assert "exact half-space" in out and "loss budget" in out and "soil under the aerial" in out


@pytest.mark.parametrize("frequency, eps_r, sigma", [(1.0e6, 15.0, 0.005), (1.5e6, 7.0, 3e-4)])
def test_consistency_tabled_remainders_match_direct_integration(frequency, eps_r, sigma):
    """Consistency check: the interpolated table (cells, frequencies 5 % apart) against the direct integrals.

    The direct integrals themselves are checked against scipy quadrature above. Tolerance: 1 % of the
    quasi-static image's size K/(4 pi R') for the four 1/m kernels, 3 % of K/(4 pi) for the dimensionless
    J0/lambda one (bilinear interpolation over cells 1/8 decade by 7.5 degrees, measured 0.5 % and 1.5 %).
    """
    table = sommerfeld_table(frequency, eps_r, sigma, 64.0)
    rng = np.random.default_rng(7)
    rp = np.exp(rng.uniform(np.log(0.01), np.log(60.0), 12))
    ang = rng.uniform(0.0, np.pi / 2, 12)
    rho, h = rp * np.sin(ang), rp * np.cos(ang)
    k0, _, eps = soil_wavenumbers(frequency, eps_r, sigma)
    direct = np.stack([remainder_integrals(k0, eps, rho[i:i + 1], h[i:i + 1])[:, 0] for i in range(rho.size)], axis=1)
    tabled = table.evaluate(rho, h)
    k_q = abs((eps - 1) / (eps + 1))
    assert np.all(np.abs(tabled[:4] - direct[:4]) < 0.01 * k_q / (4 * np.pi * rp))
    assert np.all(np.abs(tabled[4] - direct[4]) < 0.03 * k_q / (4 * np.pi))


def test_consistency_block_fill_reuses_its_geometry_and_matches_a_fresh_fill():
    """Consistency check: a second frequency on the same filler (geometry kept) equals a fresh filler's fill."""
    from aerial.models.fullwave_halfspace import remainder_matrices

    seg = polyline_segments([[0, 0, 0.02], [0, 0, 8.0], [15, 0, 8.0]], 1e-3)
    counts = piece_counts(seg, 1.0, 6)
    k = 2 * np.pi * 1.1e6 / 299_792_458.0
    warm = System(seg, counts, "lossy", MEDIUM["soil_permittivity"], MEDIUM["soil_conductivity"], 3)
    warm.matrix_direct(2 * np.pi * 0.9e6 / 299_792_458.0)
    fresh = System(seg, counts, "lossy", MEDIUM["soil_permittivity"], MEDIUM["soil_conductivity"], 3)
    a1, p1 = remainder_matrices(warm.filler, warm.sommerfeld(k))
    a2, p2 = remainder_matrices(fresh.filler, fresh.sommerfeld(k))
    assert np.allclose(a1, a2, rtol=0, atol=1e-12 * np.abs(a2).max())
    assert np.allclose(p1, p2, rtol=0, atol=1e-12 * np.abs(p2).max())
