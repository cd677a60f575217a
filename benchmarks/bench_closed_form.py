"""Speed of the closed-form aerial models.

Run: python benchmarks/bench_closed_form.py

1. A batch of 10,000 random inverted-L geometries x 100 frequencies through the
   vectorised top-loading-angle model in one call (no Python loop per geometry
   or frequency); prints evaluations per second (goal >= 1e6).
2. The electrostatic moment solution for the reference shapes (vertical,
   inverted-L 10 + 20 and 10 + 40 m, T, horizontal wire; a = 1 mm, 2 cm gap).
3. closed_form_response for the 10 + 20 m inverted-L at 100 frequencies.

The geometries are random draws, not real installations.
"""

from __future__ import annotations

import os
import time

import numpy as np

from aerial.models.capacitance import electrostatic_solution
from aerial.models.closed_form import closed_form_response
from aerial.models.segments import Segments, polyline_segments
from aerial.models.short_aerial import inverted_l

N_GEOMETRIES = 10_000
N_FREQUENCIES = 100
REPEATS = 5


def best_of(fn, repeats=REPEATS):
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t)
    return min(times), out


def main() -> list[str]:
    rng = np.random.default_rng(2024)
    height = rng.uniform(3.0, 25.0, N_GEOMETRIES)[:, None]
    top = rng.uniform(5.0, 60.0, N_GEOMETRIES)[:, None]
    radius = rng.uniform(0.3e-3, 2e-3, N_GEOMETRIES)[:, None]
    freq = np.linspace(0.15e6, 1.7e6, N_FREQUENCIES)[None, :]

    t_batch, res = best_of(lambda: inverted_l(height, top, radius, freq))
    evals = N_GEOMETRIES * N_FREQUENCIES
    assert res.reactance_ohm.shape == (N_GEOMETRIES, N_FREQUENCIES)
    assert np.all(np.isfinite(res.reactance_ohm))
    lines = [
        f"cores (os.cpu_count): {os.cpu_count()}",
        f"inverted-L batch: {N_GEOMETRIES} geometries x {N_FREQUENCIES} frequencies = {evals:,} evaluations "
        f"in {t_batch * 1e3:.1f} ms (best of {REPEATS}) -> {evals / t_batch:,.0f} evaluations per second",
    ]

    a, gap = 1e-3, 0.02
    shapes = {
        "vertical 10 m": polyline_segments([[0, 0, gap], [0, 0, 10]], a),
        "inverted-L 10 + 20 m": polyline_segments([[0, 0, gap], [0, 0, 10], [20, 0, 10]], a),
        "inverted-L 10 + 40 m": polyline_segments([[0, 0, gap], [0, 0, 10], [40, 0, 10]], a),
        "T 10 m + 2 x 10 m": Segments(
            [[0, 0, gap], [0, 0, 10], [0, 0, 10]], [[0, 0, 10], [10, 0, 10], [-10, 0, 10]], a, False, [0, 0, gap]
        ),
        "horizontal 30 m at 10 m": polyline_segments([[0, 0, 10], [30, 0, 10]], a),
    }
    lines.append("electrostatic moment solution (default subdivision, includes the half-density convergence check):")
    for name, seg in shapes.items():
        t, sol = best_of(lambda seg=seg: electrostatic_solution(seg))
        lines.append(
            f"  {name}: {sol.n_unknowns} unknowns, {t * 1e3:.1f} ms, C = {sol.capacitance_f * 1e12:.2f} pF, "
            f"h_e = {sol.effective_height_m:.3f} m, change vs half density {sol.relative_change:.2%}"
        )
    f100 = np.linspace(0.15e6, 1.7e6, 100)
    t, _ = best_of(lambda: closed_form_response(shapes["inverted-L 10 + 20 m"], f100))
    lines.append(f"closed_form_response, inverted-L 10 + 20 m, 100 frequencies: {t * 1e3:.1f} ms")
    return lines


if __name__ == "__main__":
    for line in main():
        print(line)
