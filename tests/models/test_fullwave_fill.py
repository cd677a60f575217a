"""Consistency checks of the full-wave fill's bookkeeping (the physics is checked in test_fullwave.py).

Every value here is computed by the project itself in two ways: these are
consistency checks, not checks against an outside source.
"""

from __future__ import annotations

import numpy as np
import pytest

from aerial.models.fullwave_geometry import close_pairs, build_topology, piece_counts
from aerial.models.fullwave_kernel import Filler
from aerial.models.fullwave_system import System, upper_row_blocks
from aerial.models.segments import Segments


def inverted_l(pieces):
    seg = Segments([[0, 0, 0.02], [0, 0, 10.02]], [[0, 0, 10.02], [30, 0, 10.02]], 1e-3, False, [0, 0, 0.02],
                   wire_index=[0, 0])
    return seg, piece_counts(seg, 1e9, pieces)


@pytest.mark.parametrize("seed", range(6))
def test_consistency_check_close_pairs_are_every_pair_within_tolerance(seed):
    # consistency check: the grid search against all pairs by brute force, with points on and near cell edges
    rng = np.random.default_rng(seed)
    tol = 10.0 ** rng.uniform(-9, -2)
    base = rng.uniform(-3, 3, (20, 3))
    pts = base[rng.integers(0, 20, 90)] + rng.normal(0.0, tol * rng.choice([0.1, 0.7, 3.0]), (90, 3))
    pts[::7] = np.round(pts[::7] / tol) * tol + 0.5 * tol  # on a cell boundary
    d = np.sqrt(((pts[:, None, :] - pts[None, :, :]) ** 2).sum(axis=-1))
    i, j = np.nonzero(np.triu(d <= tol, k=1))
    assert close_pairs(pts, tol).tolist() == np.stack([i, j], axis=1).tolist()


def test_consistency_check_close_pairs_with_no_pairs_and_far_coordinates():
    assert close_pairs(np.array([[1e6, -1e6, 3.0]]), 1e-9).shape == (0, 2)
    pts = np.array([[1e6, 0, 0], [1e6 + 5e-10, 0, 0], [-1e6, 0, 0]])
    assert close_pairs(pts, 1e-9).tolist() == [[0, 1]]


def test_consistency_check_fill_is_symmetric_and_independent_of_the_blocks():
    # consistency check: the symmetric half-fill against the same fill in blocks of one piece row
    seg, counts = inverted_l(30)
    topo = build_topology(seg, counts)
    whole = Filler(topo).fill(0.03, [{"A_direct": 1.0, "A_image_h": -1.0, "A_image_v": 1.0,
                                      "Phi_direct": 2.0, "Phi_image": -2.0}])[0]
    rows = Filler(topo, chunk_bytes=1).fill(0.03, [{"A_direct": 1.0, "A_image_h": -1.0, "A_image_v": 1.0,
                                                   "Phi_direct": 2.0, "Phi_image": -2.0}])[0]
    scale = np.abs(whole).max()
    assert np.abs(whole - whole.T).max() <= 1e-15 * scale
    assert np.abs(whole - rows).max() <= 1e-13 * scale


def test_consistency_check_band_table_upper_blocks_hold_the_series():
    # consistency check: the packed upper triangle against the full Taylor coefficients
    seg, counts = inverted_l(20)
    system = System(seg, counts, "perfect", None, None, 3)
    n = system.topo.n_unknowns
    edges = upper_row_blocks(n, 5)
    full = system.filler.series(0.02, 0.01, 6)
    blocks = system.filler.series_upper(0.02, 0.01, 6, edges)
    for a, b, y in zip(edges[:-1], edges[1:], blocks):
        assert np.abs(y.reshape(-1, b - a, n - a) - full[:, a:b, a:]).max() <= 1e-14 * np.abs(full).max()
    assert np.abs(full - full.transpose(0, 2, 1)).max() <= 1e-15 * np.abs(full).max()


@pytest.mark.parametrize("n, blocks", [(1, 8), (2, 8), (10, 3), (401, 8)])
def test_consistency_check_upper_row_blocks_cover_every_row(n, blocks):
    edges = upper_row_blocks(n, blocks)
    assert edges[0] == 0 and edges[-1] == n and all(a < b for a, b in zip(edges[:-1], edges[1:]))
    assert len(edges) - 1 <= blocks


def test_longest_kernel_distance_of_an_inverted_l_is_its_far_end_to_the_image_of_its_top():
    # Pythagoras (geometry, common practice): the longest distance is from the base (0, 0, 0.02) or the top
    # corner (0, 0, 10.02) to the image of the far end (30, 0, -10.02): sqrt(30^2 + 20.04^2) from the corner,
    # with the reduced radius a = 1 mm added in quadrature
    from aerial.models.fullwave_system import longest_kernel_distance

    seg, _ = inverted_l(10)
    expected = np.sqrt(30.0**2 + 20.04**2 + 1e-3**2)
    assert longest_kernel_distance(seg.start, seg.end, 1e-3) == pytest.approx(expected, rel=1e-14)


def test_consistency_check_band_order_uses_the_longest_kernel_distance():
    # consistency check: the planned order meets the Lagrange remainder bound (h R_max)^(n+1)/(n+1)! <= tol of
    # exp(-j theta) with the source-to-image distance, and the order below it does not
    from math import factorial

    from aerial.models.fullwave_system import plan_band

    seg, counts = inverted_l(20)
    system = System(seg, counts, "perfect", None, None, 3)
    k = 2 * np.pi * np.linspace(531e3, 1602e3, 10) / 299_792_458.0
    (k_lo, k_hi, order), = plan_band(system, k, 1e-10, 2**30)[0]
    x = 0.5 * (k_hi - k_lo) * system.reach
    assert system.reach > system.size  # the diagonal to the image is longer than the largest single extent
    assert x ** (order + 1) / factorial(order + 1) <= 1e-10 < x**order / factorial(order)


@pytest.mark.parametrize("symmetric", [True, False])
def test_solve_matrix_against_numpy_solve_and_condition_number(symmetric):
    # reference library: numpy.linalg.solve and numpy.linalg.cond(z, inf) (the estimate is that of the 1-norm
    # of z^T, the infinity norm of z; the same for a symmetric z); the LAPACK estimate of the condition number
    # is a lower bound, normally within a factor 3 of the true value (LAPACK Users' Guide, from memory)
    from aerial.models.fullwave_system import solve_matrix

    rng = np.random.default_rng(7)
    z = rng.normal(size=(40, 40)) + 1j * rng.normal(size=(40, 40))
    if symmetric:
        z = z + z.T
    rhs = rng.normal(size=40) + 0j
    x, cond = solve_matrix(z.copy(), rhs, symmetric)
    assert np.allclose(x, np.linalg.solve(z, rhs), rtol=1e-10, atol=1e-12)
    exact = np.linalg.cond(z, np.inf)
    assert exact / 3 <= cond <= exact * (1 + 1e-12)


def test_solve_matrix_reads_only_the_upper_triangle_of_a_symmetric_matrix():
    # consistency check: the lower triangle of a symmetric matrix is not read by the factorisation
    from aerial.models.fullwave_system import solve_matrix

    rng = np.random.default_rng(8)
    z = rng.normal(size=(12, 12)) + 1j * rng.normal(size=(12, 12))
    z = z + z.T
    rhs = rng.normal(size=12) + 0j
    spoiled = z.copy()
    spoiled[np.tril_indices(12, -1)] += 1e-3  # the norm still reads it; the solution must not
    x, _ = solve_matrix(spoiled, rhs, True)
    assert np.allclose(x, np.linalg.solve(z, rhs), rtol=1e-10, atol=1e-12)
