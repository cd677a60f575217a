"""Benchmark of the full-wave solver: band-sweep time per frequency against one LU, and memory.

Run from the repository root::

    python benchmarks/bench_fullwave.py                # BLAS threads as the environment sets them
    python benchmarks/bench_fullwave.py --threads 1    # one BLAS thread (steadier on a busy machine)

Measures, in one process:

* the time per frequency of a band sweep (531-1602 kHz in 9 kHz steps, 120
  frequencies; an invented inverted-L of 10 m + 30 m, 1 mm copper) at about
  N = 200 and N = 400 unknowns, against one LAPACK LU factorisation
  (scipy.linalg.lu_factor) of a random complex N x N matrix, timed in
  alternation with the sweeps; both "amortised" (whole sweep / 120, set-up
  included) and "marginal" (the extra cost of each further frequency, from a
  sweep of 240 minus a sweep of 120);
* the peak memory (tracemalloc, numpy allocations included) of one solve at
  N = 2000, and the process's peak resident size.

Prints a Markdown table for docs/performance-full-wave.md.
"""

from __future__ import annotations

import argparse
import os
import sys


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--threads", type=int, default=None, help="BLAS threads (sets OPENBLAS/OMP/MKL_NUM_THREADS)")
    ap.add_argument("--repeats", type=int, default=3, help="repeats of each timing; the median is reported")
    ap.add_argument("--skip-memory", action="store_true", help="skip the N = 2000 memory measurement")
    args = ap.parse_args(argv)
    if args.threads is not None:
        for var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
            os.environ[var] = str(args.threads)

    import resource
    import time
    import tracemalloc

    import numpy as np
    import scipy
    import scipy.linalg as sla

    sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))
    from aerial.models.fullwave import solve_full_wave
    from aerial.models.segments import Segments

    # invented layout: 10 m lead-in from a 2 cm base gap, 30 m top span
    seg = Segments([[0, 0, 0.02], [0, 0, 10.02]], [[0, 0, 10.02], [30, 0, 10.02]], 1e-3, False, [0, 0, 0.02],
                   wire_index=[0, 0])
    band = np.arange(531e3, 1602e3 + 1, 9e3)
    dense = np.linspace(band[0], band[-1], 2 * len(band))

    def lu_time(n, reps=15):
        rng = np.random.default_rng(1)
        a = rng.random((n, n)) + 1j * rng.random((n, n))
        ts = []
        for _ in range(reps):
            b = a.copy()
            t = time.perf_counter()
            sla.lu_factor(b, overwrite_a=True, check_finite=False)
            ts.append(time.perf_counter() - t)
        return float(np.median(ts))

    def sweep_time(freqs, pieces):
        t = time.perf_counter()
        r = solve_full_wave(seg, freqs, min_pieces_per_wire=pieces, convergence_check=False)
        return time.perf_counter() - t, r

    rows = []
    for pieces in (199, 399):
        lu, t1, t2 = [], [], []
        for _ in range(args.repeats):
            lu.append(lu_time(pieces + 2))
            a, r = sweep_time(band, pieces)
            t1.append(a)
            lu.append(lu_time(pieces + 2))
            b, _ = sweep_time(dense, pieces)
            t2.append(b)
        n = r.n_unknowns
        lu_t = float(np.median(lu))
        lu_n = lu_time(n)
        lu_t = 0.5 * (lu_t + lu_n)
        amort = float(np.median(t1)) / len(band)
        marg = (float(np.median(t2)) - float(np.median(t1))) / (len(dense) - len(band))
        rows.append((n, lu_t, amort, marg, r.band_method))

    print(f"nproc: {os.cpu_count()}; BLAS threads: {os.environ.get('OPENBLAS_NUM_THREADS', 'library default')}; "
          f"numpy {np.__version__}, scipy {scipy.__version__}; load average {os.getloadavg()[0]:.2f}")
    print()
    print("| N | LU of N x N [ms] | sweep, amortised [ms/freq] | ratio | sweep, marginal [ms/freq] | ratio | band method |")
    print("|---|---|---|---|---|---|---|")
    for n, lu_t, amort, marg, how in rows:
        print(f"| {n} | {lu_t * 1e3:.2f} | {amort * 1e3:.2f} | {amort / lu_t:.1f} | {marg * 1e3:.2f} | "
              f"{marg / lu_t:.1f} | {how} |")

    if not args.skip_memory:
        tracemalloc.start()
        t = time.perf_counter()
        r = solve_full_wave(seg, [1.602e6], min_pieces_per_wire=1999)
        elapsed = time.perf_counter() - t
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # kB on Linux
        print()
        print(f"N = {r.n_unknowns}: one frequency with the convergence check ({r.warnings[-1] if r.warnings else ''}): "
              f"{elapsed:.1f} s, peak traced memory {peak / 2**20:.0f} MB, process peak resident {rss:.0f} MB")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
