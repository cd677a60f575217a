"""Timing of the tuning designed for the listed stations, and of the worst legal station list.

Run: python benchmarks/bench_station_design.py
Prints a Markdown table for docs/performance.md. The stations are invented demo inputs.
"""

from __future__ import annotations

import os
import time
from pathlib import Path

from aerial.estimate.assemble import analyse
from aerial.site.reader import MAX_STATIONS, load_site_text

ROOT = Path(__file__).resolve().parents[1]


def with_stations(n: int, crowded: bool = False) -> str:
    base = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text().split("[[stations]]")[0]
    out = [base]
    for i in range(n):
        f = 531 + (i % 120) * 9 if crowded else 540 + i * 110
        p = "2 MW" if crowded else f"{5 + 5 * (i % 4)} kW"
        d = f"{5 + i % 7} km" if crowded else f"{10 + 15 * i} km"
        out.append(f'\n[[stations]]\nname = "Demo {i}"\nfrequency = "{f} kHz"\npower = "{p}"\ndistance = "{d}"\n')
    return "".join(out)


def timed(text: str, name: str, repeats: int = 3) -> float:
    site = load_site_text(text, name)
    best = float("inf")
    for _ in range(repeats):
        t0 = time.perf_counter()
        analyse(site)
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    print(f"cores (os.cpu_count): {os.cpu_count()}")
    print("| site | stations | whole report (day, night, tuning designed for the stations) |")
    print("|---|---|---|")
    for label, n, crowded in (("backyard example, its own stations", 0, False), ("ten stations across the band", 10, False),
                              (f"worst legal list: {MAX_STATIONS} strong stations on 120 channels", MAX_STATIONS, True)):
        text = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text() if n == 0 else with_stations(n, crowded)
        t = timed(text, "bench.toml", 1 if n == MAX_STATIONS else 3)
        print(f"| {label} | {n or 3} | {t * 1e3:.0f} ms |")


if __name__ == "__main__":
    main()
