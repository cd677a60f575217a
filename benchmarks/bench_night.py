"""Cost of night-time reception: sky waves, atmospheric noise and the second (night) station assessment.

Run: python benchmarks/bench_night.py
Times a closed-form report of an invented site with ten stations, with and
without the night-time part, paired, and prints medians for docs/performance.md.
"""

from __future__ import annotations

import os
import statistics
import time
from unittest import mock

from aerial.estimate import assemble, receiver
from aerial.site.reader import load_site_text

SITE = """
[site]
name = "ten stations (invented)"
latitude = 52.0
longitude = -1.5
season = "winter"

[supports.house]
at = [0, 0]
height = "7 m"
kind = "eave"

[supports.tree]
at = [30, 0]
height = "10 m"
kind = "tree"

[[spans]]
from = "house"
to = "tree"

[receiver]
at = [0, -1]
height = "1 m"

[[earth.rods]]
at = [0, -1.5]
length = "2.4 m"
""" + "".join(f"""
[[stations]]
name = "Invented {i}"
frequency = "{540 + 110 * i} kHz"
power = "{10 + 5 * i} kW"
distance = "{20 + 90 * i} km"
bearing = {36 * i}
""" for i in range(10))


def _day_only(site, f, r, x, rr, he, parts, own=None):
    """The station step as it would be by day alone: one assessment, ground wave, man-made noise."""
    from aerial.estimate import reception

    own = [None] * len(site.stations) if own is None else own
    st = [reception.Station(s.name, s.frequency_hz, s.power_w, s.distance_m, s.soil.relative_permittivity,
                            s.soil.conductivity_s_m, effective_height_m=h) for s, h in zip(site.stations, own)]
    return reception.assess_stations(f, r, x, rr, he, parts, st, noise_category=site.noise.replace("-", " ")), []


def _station_step_inputs(site):
    """The arguments the report passes to the station step, captured from one report."""
    seen = {}
    real = receiver._stations_day_and_night

    def spy(*args):
        seen["args"] = args
        return real(*args)

    with mock.patch.object(receiver, "_stations_day_and_night", spy):
        assemble.analyse(site)
    return seen["args"]


def _median_time(fn, args, repeats):
    out = []
    for _ in range(repeats):
        t = time.perf_counter()
        fn(*args)
        out.append(time.perf_counter() - t)
    return statistics.median(out)


def main(repeats: int = 7) -> None:
    site = load_site_text(SITE)
    with_night, without = [], []
    for k in range(repeats):  # paired, alternating which goes first
        for night_first in ((True, False) if k % 2 == 0 else (False, True)):
            t = time.perf_counter()
            if night_first:
                assemble.analyse(site)
                with_night.append(time.perf_counter() - t)
            else:
                with mock.patch.object(receiver, "_stations_day_and_night", _day_only):
                    assemble.analyse(site)
                without.append(time.perf_counter() - t)
    a, b = statistics.median(with_night), statistics.median(without)
    args = _station_step_inputs(site)
    step_both = _median_time(receiver._stations_day_and_night, args, 5 * repeats)
    step_day = _median_time(_day_only, args, 5 * repeats)
    print(f"cores: {os.cpu_count()}; load average {os.getloadavg()[0]:.1f}; {repeats} paired runs, medians")
    print("| report, 10 stations | day only | day and night | night share |")
    print("|---|---|---|---|")
    print(f"| closed form, MF (whole report) | {b * 1e3:.0f} ms | {a * 1e3:.0f} ms | {100 * (a - b) / a:.0f} % |")
    print(f"| the station step alone | {step_day * 1e3:.1f} ms | {step_both * 1e3:.1f} ms | "
          f"{100 * (step_both - step_day) / a:.1f} % of the report |")


if __name__ == "__main__":
    main()
