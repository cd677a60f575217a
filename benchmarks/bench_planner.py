"""Benchmark: rank many candidate layouts with the site planner.

Builds an invented lot (80 m x 60 m, a power line along the south side, two
buildings and an obstacle) with N candidate supports at seeded random places
and heights, and times :func:`aerial.planner.search.plan_layouts` end to end (plan
parsing, enumeration, fall-zone and crossing checks, vectorised scoring,
ranking). Run:

    python benchmarks/bench_planner.py            # default: 23 and 40 supports
    python benchmarks/bench_planner.py 23 60 80   # chosen support counts

Results go in docs/performance-planner.md (with ``nproc``).
"""

from __future__ import annotations

import os
import sys
import time

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))

from aerial.planner.search import estimate_candidates, plan_layouts
from aerial.site.reader import load_site_text

TARGET_CANDIDATES = 10_000
TARGET_SECONDS = 2.0


def site_text(n_supports: int, seed: int = 1, stations: bool = True, power_line: bool = True) -> str:
    """An invented site with ``n_supports`` candidate supports (deterministic for a seed).

    ``power_line=False`` gives an open field: no line, no buildings, no obstacle,
    so nearly every candidate reaches the scoring stage.
    """
    rng = np.random.default_rng(seed)
    xs = rng.uniform(2, 78, n_supports)
    ys = rng.uniform(12, 58, n_supports)
    hs = rng.uniform(4, 15, n_supports)
    kinds = rng.choice(["tree", "mast", "pole", "gable"], n_supports)
    lines = [
        '[site]\nname = "benchmark lot"\nregion = "US"\nbands = ["mf"]\n',
        "[[runs]]\npoints = [[40, 30, 2.5], [40, 30, 8]]\n",
        "[receiver]\nat = [40, 30]\nheight = \"1 m\"\n",
        "[[earth.rods]]\nlength = \"2.4 m\"\nat = [41, 30]\n",
    ]
    if stations:
        lines.append('[[stations]]\nname = "station A"\nfrequency = "700 kHz"\npower = "10 kW"\ndistance = "30 km"\n')
        lines.append('[[stations]]\nname = "station B"\nfrequency = "1200 kHz"\npower = "5 kW"\ndistance = "15 km"\n')
    lines.append("[plan]\nlot = [[0, 0], [80, 0], [80, 60], [0, 60]]\n")
    lines.append("[plan.entry]\nat = [40, 30]\nheight = \"2.5 m\"\n")
    if power_line:
        lines.append('[[plan.buildings]]\nname = "house"\noutline = [[30, 22], [50, 22], [50, 30], [30, 30]]\nheight = "7 m"\n')
        lines.append('[[plan.buildings]]\nname = "barn"\noutline = [[60, 40], [72, 40], [72, 50], [60, 50]]\nheight = "6 m"\n')
        lines.append('[[plan.obstacles]]\nname = "greenhouse"\noutline = [[10, 40], [16, 40], [16, 46], [10, 46]]\n')
    if power_line:
        lines.append('[[plan.overhead_lines]]\nname = "road line"\npath = [[-20, -4], [100, -4]]\nheight = "8 m"\nkind = "power"\n')
    for q in range(n_supports):
        lines.append(f'[[plan.supports]]\nname = "s{q}"\nat = [{xs[q]:.2f}, {ys[q]:.2f}]\nheight = "{hs[q]:.2f} m"\n'
                     f'kind = "{kinds[q]}"\n')
    return "\n".join(lines)


def run(n_supports: int, repeats: int = 3, power_line: bool = True) -> dict:
    site = load_site_text(site_text(n_supports, power_line=power_line), f"<benchmark {n_supports}>")
    best = np.inf
    result = None
    for _ in range(repeats):
        t0 = time.perf_counter()
        result = plan_layouts(site, best=5)
        best = min(best, time.perf_counter() - t0)
    return {"supports": n_supports, "candidates": estimate_candidates(n_supports), "seconds": best,
            "per_second": estimate_candidates(n_supports) / best, "refused": result["candidates_refused"],
            "scored": estimate_candidates(n_supports) - result["candidates_refused"]}


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    counts = [int(a) for a in argv] or [23, 40]
    print(f"cpus visible: {os.cpu_count()}")
    ok = True
    for n, line in [(n, line) for n in counts for line in (True, False)]:
        r = run(n, power_line=line)
        print(f"{'lot with line' if line else 'open field   '}  {r['supports']:4d} supports  {r['candidates']:9,d} candidates  "
              f"{r['scored']:9,d} scored  {r['seconds']:.3f} s  {r['per_second']:,.0f} candidates/s")
        if r["candidates"] >= TARGET_CANDIDATES and r["candidates"] <= 2 * TARGET_CANDIDATES:
            ok &= r["seconds"] < TARGET_SECONDS
    print("target (>= 10,000 candidates in < 2 s):", "met" if ok else "NOT met")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
