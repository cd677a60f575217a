"""Whole-chain timing: a full MF sweep at 1 kHz steps for every example site (closed form).

Run: python benchmarks/bench_report.py
Prints a Markdown table for docs/performance.md.
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import numpy as np

from aerial.estimate.assemble import analyse, frequency_grid
from aerial.geometry.resolve import resolve
from aerial.models.closed_form import closed_form_response
from aerial.site.reader import load_site_text

ROOT = Path(__file__).resolve().parents[1]


def mf_only(text: str) -> str:
    import re

    return re.sub(r'^bands = .*$', 'bands = ["mf"]', text, flags=re.M) if "bands =" in text else text


def main() -> None:
    print(f"cores (os.cpu_count): {os.cpu_count()}")
    print("| example | frequencies | closed-form aerial sweep | whole report (with ranges, what-if, tuning, stations) |")
    print("|---|---|---|---|")
    for path in sorted((ROOT / "site_examples").glob("*.toml")):
        site = load_site_text(mf_only(path.read_text()), str(path))
        freqs = frequency_grid(site, 1e3)
        geo = resolve(site)
        best_model = best_all = np.inf
        for _ in range(3):
            t0 = time.perf_counter()
            closed_form_response(geo.segments, freqs)
            best_model = min(best_model, time.perf_counter() - t0)
            t0 = time.perf_counter()
            analyse(site, step_hz=1e3)
            best_all = min(best_all, time.perf_counter() - t0)
        print(f"| {path.name} | {len(freqs)} | {best_model * 1e3:.0f} ms | {best_all * 1e3:.0f} ms |")


if __name__ == "__main__":
    main()
