"""The closed-form report's own work, apart from the tuning and station verdicts: processor time per example.

Run from the repository root::

    python benchmarks/bench_report_rest.py                          # this tree
    python benchmarks/bench_report_rest.py --before ../older-tree   # and an older source tree, paired

"Own work" is what ``aerial report EXAMPLE --json`` does besides importing
the libraries and designing the tuning: reading the site file, the power-line
check, :func:`aerial.analyse` with the tuning and stations part
(``aerial.estimate.receiver.receiver_results``) replaced by its own result
kept from a first run, and writing the JSON text. Each measured run starts
with the electrostatic and ground-field caches empty, as in a fresh process.
Every tree is measured in child processes importing aerial from that tree
(``PYTHONPATH``), the trees interleaved round by round so both see the same
machine load; medians of processor time (user + system) are reported.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

EXAMPLES = ("backyard_inverted_l", "balcony_water_pipe", "high_floor_flat", "portable_vertical_counterpoise",
            "rural_long_wire", "suburban_lot_service_line")


def measure(repeats: int) -> dict:
    """In this process (the tree on the path): median processor time of the own work of each example. [s]"""
    import aerial.estimate.assemble as assemble
    import aerial.estimate.earth as earth
    import aerial.estimate.plain as plain
    import aerial.estimate.receiver as receiver
    import aerial.models.capacitance as capacitance
    from aerial.api import refusal_check
    from aerial.site.reader import load_site

    write = getattr(plain, "json_text", None) or (lambda r: json.dumps(r, indent=2, allow_nan=False))
    tuning = receiver.receiver_results
    out = {}
    for name in EXAMPLES:
        path = f"site_examples/{name}.toml"
        kept = {}

        def kept_tuning(*args, **kwargs):
            if "result" not in kept:
                kept["result"] = tuning(*args, **kwargs)
            return kept["result"]

        receiver.receiver_results = kept_tuning
        assemble.analyse(load_site(path))
        times = []
        for _ in range(repeats):
            capacitance._solve_cache.clear()
            getattr(earth, "_screen_cache", {}).clear()
            t = time.process_time()
            site = load_site(path)
            refusal_check(site)
            write(assemble.analyse(site))
            times.append(time.process_time() - t)
        receiver.receiver_results = tuning
        out[name] = statistics.median(times)
    return out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--before", help="an older source tree to measure alongside, paired round by round")
    parser.add_argument("--rounds", type=int, default=5)
    parser.add_argument("--repeats", type=int, default=5, help="runs per example in each child process")
    parser.add_argument("--child", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        print(json.dumps(measure(args.repeats)))
        return
    trees = [Path(args.before).resolve()] if args.before else []
    trees.append(Path(__file__).resolve().parents[1])
    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1", MKL_NUM_THREADS="1")
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    runs = {str(t): {e: [] for e in EXAMPLES} for t in trees}
    for _ in range(args.rounds):
        for t in trees:
            proc = subprocess.run([sys.executable, str(Path(__file__).resolve()), "--child", "--repeats",
                                   str(args.repeats)], capture_output=True, text=True, cwd=t,
                                  env=dict(env, PYTHONPATH=str(t)), check=True)
            for name, seconds in json.loads(proc.stdout.strip().splitlines()[-1]).items():
                runs[str(t)][name].append(seconds)
    print("own work of `aerial report EXAMPLE --json` (no tuning/stations), processor time, medians [ms]")
    for name in EXAMPLES:
        figures = [1e3 * statistics.median(runs[str(t)][name]) for t in trees]
        text = " -> ".join(f"{v:6.1f}" for v in figures)
        change = f"  ({figures[-1] / figures[0] - 1:+.0%})" if len(figures) == 2 else ""
        print(f"  {name:32s} {text}{change}")


if __name__ == "__main__":
    main()
