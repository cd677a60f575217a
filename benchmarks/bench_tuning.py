"""Processor time of the report's tuning work: analyse() and its tuning part, per example, steady state.

Run: python benchmarks/bench_tuning.py [--before OLD_TREE]
For each example in site_examples/, one process loads the site, runs ``aerial.analyse`` once (the
first call fills the caches of a process) and then five times more; the median processor time
(``time.process_time``: this process's user + system time, which other work on a shared machine
disturbs much less than the wall clock) of those five is given for the whole analysis and for the
tuning design and station verdicts within it (``aerial.estimate.receiver.receiver_results``).
With ``--before OLD_TREE`` the same measurement runs on the aerial package of another checkout
(put first on ``PYTHONPATH``) and both are printed as a Markdown table for docs/performance.md.
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

ROOT = Path(__file__).resolve().parents[1]
REPEATS = 5


def measure(example: Path) -> dict:
    """Median processor time [s] of analyse() and of its tuning part, over REPEATS steady-state calls."""
    import aerial
    from aerial.estimate import receiver

    original = receiver.receiver_results
    spent: list = []

    def timed(*args, **kwargs):
        t0 = time.process_time()
        try:
            return original(*args, **kwargs)
        finally:
            spent.append(time.process_time() - t0)

    receiver.receiver_results = timed
    try:
        site = aerial.load_site(example)
        aerial.analyse(site)
        whole, tuning = [], []
        for _ in range(REPEATS):
            spent.clear()
            t0 = time.process_time()
            aerial.analyse(site)
            whole.append(time.process_time() - t0)
            tuning.append(sum(spent))
    finally:
        receiver.receiver_results = original
    return {"analyse_s": statistics.median(whole), "tuning_s": statistics.median(tuning)}


def run_tree(tree: Path | None) -> dict:
    """The measurement of every example, in a fresh process on ``tree``'s aerial package (None: this one)."""
    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1", MKL_NUM_THREADS="1")
    if tree is not None:
        env["PYTHONPATH"] = str(tree) + os.pathsep + env.get("PYTHONPATH", "")
    out = subprocess.run([sys.executable, __file__, "--one"], env=env, capture_output=True, text=True, check=True,
                         cwd=ROOT)
    return json.loads(out.stdout)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--before", type=Path, help="another checkout of aerial to measure first")
    parser.add_argument("--one", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    examples = sorted((ROOT / "site_examples").glob("*.toml"))
    if args.one:
        print(json.dumps({p.stem: measure(p) for p in examples}))
        return
    before = run_tree(args.before) if args.before else None
    after = run_tree(None)
    print("| example | analyse() before | analyse() after | tuning before | tuning after |")
    print("|---|---|---|---|---|")
    for name, a in after.items():
        b = before.get(name) if before else None
        cells = [f"{b['analyse_s'] * 1e3:.0f} ms" if b else "—", f"{a['analyse_s'] * 1e3:.0f} ms",
                 f"{b['tuning_s'] * 1e3:.0f} ms" if b else "—", f"{a['tuning_s'] * 1e3:.0f} ms"]
        print(f"| {name} | " + " | ".join(cells) + " |")


if __name__ == "__main__":
    main()
