"""Shared-page timing: how long the HTML page adds to a report, picture by picture.

Run: python benchmarks/bench_page.py
Prints a Markdown table for docs/performance.md: CPU time (the machine is shared), best of three, after one warm-up
that pays for importing matplotlib).
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import numpy as np

from aerial.estimate.assemble import analyse
from aerial.outputs import charts, site_drawings
from aerial.outputs.page_report import report_page
from aerial.site.reader import load_site

ROOT = Path(__file__).resolve().parents[1]


def best_of(fn, n=3) -> float:
    best = np.inf
    for _ in range(n):
        t0 = time.process_time()
        fn()
        best = min(best, time.process_time() - t0)
    return best


def main() -> None:
    print(f"cores (os.cpu_count): {os.cpu_count()}")
    t0 = time.process_time()
    import matplotlib.figure  # noqa: F401

    print(f"importing matplotlib: {1e3 * (time.process_time() - t0):.0f} ms")
    print("| example | report | whole page | plan + elevation | impedance + capacitance | tuning | stations | page size |")
    print("|---|---|---|---|---|---|---|---|")
    for path in sorted((ROOT / "site_examples").glob("*.toml")):
        site = load_site(path)
        t_report = best_of(lambda: analyse(site), 1)
        result = analyse(site)
        surroundings = site_drawings.site_surroundings(site)
        report_page(result, surroundings)  # warm-up
        scene = site_drawings.report_scene(result, surroundings)
        t_page = best_of(lambda: report_page(result, surroundings))
        t_plan = best_of(lambda: (site_drawings.plan_chart(scene), site_drawings.elevation_chart(scene)))
        t_freq = best_of(lambda: (charts.impedance_chart(result), charts.capacitance_chart(result)))
        t_tune = best_of(lambda: charts.tuning_chart(result))
        t_st = best_of(lambda: charts.station_chart(result))
        size = len(report_page(result, surroundings).encode("utf-8"))
        print(f"| {path.name} | {t_report * 1e3:.0f} ms | {t_page * 1e3:.0f} ms | {t_plan * 1e3:.0f} ms | "
              f"{t_freq * 1e3:.0f} ms | {t_tune * 1e3:.0f} ms | {t_st * 1e3:.0f} ms | {size / 1024:.0f} KiB |")


if __name__ == "__main__":
    main()
