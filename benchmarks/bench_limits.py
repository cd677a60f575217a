"""The worst legal site file of each kind, run through the whole closed-form report.

Each site sits exactly at one limit of aerial/site/reader.py (supports, wire pieces, band entries,
sweep frequencies); the files are invented input-handling data. The tests load the same files
(tests/test_hardening.py) and check the refusal one past each limit; this measures how long the
report on each takes, which no test may do.

Run: python benchmarks/bench_limits.py
Prints a Markdown table for docs/reliability.md (Resource limits).
"""

from __future__ import annotations

import json
import os
import time

from aerial.api import run_report
from aerial.site.reader import MAX_BAND_ENTRIES, MAX_SUPPORTS, MAX_WIRE_PIECES, load_site_text

TAIL = "[receiver]\nat = [0, 0]\nheight = 0\n[[earth.rods]]\nlength = 2\n"
VERTICAL = "[[runs]]\npoints = [[0, 0, 0.5], [0, 0, 10]]\n"


def worst_sites() -> dict[str, str]:
    supports = "".join(f"[supports.s{i}]\nat = [{i * 0.5}, 20]\nheight = 8\n" for i in range(MAX_SUPPORTS))
    runs = "".join(f"[[runs]]\npoints = [[{i * 0.5}, 5, 1], [{i * 0.5}, 5, 11]]\n" for i in range(MAX_WIRE_PIECES - 2))
    wide = ", ".join(f'{{from = "{100 + i} kHz", to = "{30000 - i} kHz"}}' for i in range(MAX_BAND_ENTRIES))
    return {
        f"{MAX_SUPPORTS} supports, one span": supports + '[[spans]]\nfrom = "s0"\nto = "s1"\n' + TAIL.replace(
            "at = [0, 0]\nheight = 0", "at = [0, 20]\nheight = 1"),
        f"{MAX_WIRE_PIECES} wire pieces ({MAX_WIRE_PIECES - 2} runs, a vertical, its lead-in)": runs + VERTICAL + TAIL,
        '"lf", "mf", "hf" at 100 Hz steps': '[site]\nbands = ["lf", "mf", "hf"]\nfrequency_step = "100 Hz"\n'
                                             + VERTICAL + TAIL,
        f"{MAX_BAND_ENTRIES} bands of 0.1-30 MHz, default steps": f"[site]\nbands = [{wide}]\n" + VERTICAL + TAIL,
    }


def main() -> None:
    print(f"cores (os.cpu_count): {os.cpu_count()}; OPENBLAS_NUM_THREADS={os.environ.get('OPENBLAS_NUM_THREADS')}")
    print("| worst legal file | frequencies | report time | JSON size |")
    print("|---|---|---|---|")
    import tempfile

    for name, text in worst_sites().items():
        load_site_text(text, name)  # valid: it sits at the limit, not past it
        with tempfile.NamedTemporaryFile("w", suffix=".toml", delete=False) as fh:
            fh.write(text)
        t0 = time.perf_counter()
        result = run_report(fh.name)
        seconds = time.perf_counter() - t0
        os.unlink(fh.name)
        size = len(json.dumps(result))
        print(f"| {name} | {len(result['frequencies_hz']):,} | {seconds:.1f} s | {size / 1e6:.1f} MB |")


if __name__ == "__main__":
    main()
