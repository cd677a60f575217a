"""Cost of the exact lossy half-space: Sommerfeld table build, per-point fill cost, against one LU.

Usage: python benchmarks/bench_sommerfeld.py [--unknowns 200]

Workload: an invented inverted-L (10 m lead-in from a 2 cm base gap, 30 m top span, 1 mm
copper) over medium ground (eps_r 15, 5 mS/m) at 1 MHz. Prints: one table build, the
remainder fill per point pair (first frequency, and the next ones with the pair geometry kept), a second
geometry at the same soil and frequency (no table built), the whole matrix with and without the
half-space terms, and one LU of the same size.
"""

from __future__ import annotations

import argparse
import time

import numpy as np
import scipy.linalg as sla

from aerial.models import sommerfeld as sm
from aerial.models.fullwave_geometry import piece_counts
from aerial.models.fullwave_halfspace import remainder_matrices
from aerial.models.fullwave_system import System
from aerial.models.segments import Segments


def _best(fn, repeats=3):
    best = np.inf
    for _ in range(repeats):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def main(argv=None):
    ap = argparse.ArgumentParser()
    ap.add_argument("--unknowns", type=int, default=200)
    args = ap.parse_args(argv)
    seg = Segments([[0, 0, 0.02], [0, 0, 10.02]], [[0, 0, 10.02], [30, 0, 10.02]], 1e-3, False, [0, 0, 0.02],
                   wire_index=[0, 1])
    counts = piece_counts(seg, 40.0 / args.unknowns, 6)
    f = 1e6
    k = 2 * np.pi * f / 299_792_458.0
    sm._CACHE.clear()
    t_build = _best(lambda: sm.SommerfeldTable.build(f, 15.0, 0.005, 64.0))
    perfect = System(seg, counts, "perfect", None, None, 3)
    lossy = System(seg, counts, "lossy", 15.0, 0.005, 3)
    n = lossy.topo.n_unknowns
    lossy.matrix_direct(k)  # tables built and cached
    table = lossy.sommerfeld(k)
    t_first = _best(lambda: remainder_matrices(lossy.filler, table), repeats=1)
    t_rem = _best(lambda: remainder_matrices(lossy.filler, table))  # pair geometry kept on the filler
    # another geometry at the same soil and frequencies (a layout search's next candidate): no new table
    seg2 = Segments([[5, 2, 0.02], [5, 2, 9.02]], [[5, 2, 9.02], [33, 9, 9.02]], 1e-3, False, [5, 2, 0.02],
                    wire_index=[0, 1])
    before = len(sm._CACHE)
    t0 = time.perf_counter()
    other = System(seg2, piece_counts(seg2, 40.0 / args.unknowns, 6), "lossy", 15.0, 0.005, 3)
    other.matrix_direct(k)
    t_other = time.perf_counter() - t0
    built = len(sm._CACHE) - before
    t_perfect = _best(lambda: perfect.matrix_direct(k))
    t_lossy = _best(lambda: lossy.matrix_direct(k))
    a = np.random.default_rng(1).standard_normal((n, n)) + 0j
    t_lu = _best(lambda: sla.lu_factor(a.copy()))
    pairs = (lossy.topo.n_pieces * lossy.filler.q) ** 2
    print(f"N = {n} unknowns, {lossy.topo.n_pieces} pieces, {pairs} quadrature-point pairs")
    print(f"one table build (one soil, one frequency, R' to 64 m): {1e3 * t_build:.0f} ms")
    print(f"half-space remainder fill: first frequency {1e3 * t_first:.1f} ms; next frequencies {1e3 * t_rem:.1f} ms"
          f" = {1e9 * t_rem / pairs:.0f} ns per point pair (symmetric blocks: each kernel value serves two pairs)")
    print(f"another geometry at the same soil and frequency: {built} new tables, whole set-up and matrix "
          f"{1e3 * t_other:.0f} ms")
    print(f"whole matrix: perfect ground {1e3 * t_perfect:.1f} ms, exact lossy ground {1e3 * t_lossy:.1f} ms")
    print(f"one LU of the same size: {1e3 * t_lu:.1f} ms; remainder fill / LU = {t_rem / t_lu:.1f}")


if __name__ == "__main__":
    main()
