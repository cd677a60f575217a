"""Where people wait: start-up, the full-wave band sweep, the closed forms and memory, as ratios in one run.

Run from the repository root::

    python benchmarks/bench_speed.py                          # this tree
    python benchmarks/bench_speed.py --before ../older-tree   # and an older source tree, paired

Every figure is measured in fresh processes started by this script, each
importing aerial from the tree measured (``PYTHONPATH``), with the trees
interleaved round by round so both see the same machine load; medians are
reported. On a shared machine expect ±30 % on absolute times; the ratios
(each measured against a reference taken in the same round) are steadier.

1. Start-up: wall time of ``aerial report EXAMPLE --json`` and ``aerial
   check EXAMPLE --json`` (run as the console script runs them, through
   ``aerial.__main__.run``) against ``python -c "import numpy, scipy, shapely,
   rich"`` (goal: report <= 1.5 x). Byte-code caches are allowed (the
   variable PYTHONDONTWRITEBYTECODE is removed) and warmed first. The
   processor time of each run (user + system) is shown beside it: on a
   busy machine the wall time of a short process is mostly waiting.
2. Full-wave band sweep: time per frequency of a 100-point sweep
   (531-1602 kHz; an invented 10 m + 30 m inverted-L, 1 mm wire; set-up
   included) against one complex ``scipy.linalg.lu_factor`` of the same N,
   timed in the same process, at N = 201, 401 and 801 (goals: <= 4 x at
   200, <= 3 x at 400).
3. Closed forms: inverted-L evaluations per second (geometries as a column x
   100 frequencies) at 1e4 to 1e7 elements, in pieces and in one piece
   (goal >= 1e7 per second at any size).
4. Memory: peak traced memory and resident size of one N = 2000 frequency
   (goal < 250 MB).

BLAS threads: the start-up runs get the environment a user has (no thread
variable set, so the library's default unless aerial chooses); the sweep,
closed-form and memory runs get one thread (``--threads``), so the solver
and its LU reference run alike.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = "site_examples/backyard_inverted_l.toml"
BARE = "import numpy, scipy, shapely, rich"

SWEEP_CHILD = r"""
import json, sys, time
import numpy as np, scipy.linalg as sla
from aerial.models.fullwave import solve_full_wave
from aerial.models.segments import Segments
seg = Segments([[0, 0, 0.02], [0, 0, 10.02]], [[0, 0, 10.02], [30, 0, 10.02]], 1e-3, False, [0, 0, 0.02],
               wire_index=[0, 0])
band = np.linspace(531e3, 1602e3, 100)
pieces = int(sys.argv[1])
rng = np.random.default_rng(1)
def lu(n, reps=9):
    a = rng.random((n, n)) + 1j * rng.random((n, n))
    ts, cs = [], []
    for _ in range(reps):
        b = a.copy()
        c = time.process_time(); t = time.perf_counter()
        sla.lu_factor(b, overwrite_a=True, check_finite=False)
        ts.append(time.perf_counter() - t); cs.append(time.process_time() - c)
    return float(np.median(ts)), float(np.median(cs))
l1, c1 = lu(pieces + 2)
c = time.process_time(); t = time.perf_counter()
r = solve_full_wave(seg, band, min_pieces_per_wire=pieces, convergence_check=False)
sweep, sweep_cpu = time.perf_counter() - t, time.process_time() - c
l2, c2 = lu(r.n_unknowns)
print(json.dumps({"n": int(r.n_unknowns), "sweep_s": sweep, "lu_s": 0.5 * (l1 + l2), "sweep_cpu_s": sweep_cpu,
                  "lu_cpu_s": 0.5 * (c1 + c2), "how": r.band_method}))
"""

MEMORY_CHILD = r"""
import json, resource, time, tracemalloc
from aerial.models.fullwave import solve_full_wave
from aerial.models.segments import Segments
seg = Segments([[0, 0, 0.02], [0, 0, 10.02]], [[0, 0, 10.02], [30, 0, 10.02]], 1e-3, False, [0, 0, 0.02],
               wire_index=[0, 0])
tracemalloc.start()
t = time.perf_counter()
r = solve_full_wave(seg, [1.602e6], min_pieces_per_wire=1999)
el = time.perf_counter() - t
_, peak = tracemalloc.get_traced_memory()
rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
print(json.dumps({"n": int(r.n_unknowns), "seconds": el, "traced_mb": peak / 2**20, "rss_mb": rss}))
"""

CLOSED_CHILD = r"""
import json, sys, time
import numpy as np
import aerial.models.short_aerial as sa
rng = np.random.default_rng(2024)
out = {}
for n_geo in (100, 1000, 10000, 100000):
    h = rng.uniform(3, 25, (n_geo, 1)); top = rng.uniform(5, 60, (n_geo, 1)); a = rng.uniform(0.3e-3, 2e-3, (n_geo, 1))
    f = np.linspace(0.15e6, 1.7e6, 100)[None, :]
    row = {}
    for label, chunk in (("pieces", getattr(sa, "CHUNK_ELEMENTS", None)), ("whole", 10**15)):
        if chunk is None:
            continue
        if hasattr(sa, "CHUNK_ELEMENTS"):
            sa.CHUNK_ELEMENTS = chunk
        best, best_cpu = float("inf"), float("inf")
        for _ in range(3 if n_geo < 100000 else 2):
            c = time.process_time(); t = time.perf_counter()
            sa.inverted_l(h, top, a, f)
            best, best_cpu = min(best, time.perf_counter() - t), min(best_cpu, time.process_time() - c)
        row[label] = n_geo * 100 / best
        row[label + "_cpu"] = n_geo * 100 / max(best_cpu, 1e-9)
    out[n_geo * 100] = row
print(json.dumps(out))
"""


def child_env(tree: Path, threads: int | None) -> dict:
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    env["PYTHONPATH"] = str(tree) + os.pathsep + env.get("PYTHONPATH", "")
    for var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS", "AERIAL_BLAS_DEFAULT"):
        env.pop(var, None)
    if threads is not None:
        for var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
            env[var] = str(threads)
    return env


def _children_cpu() -> float:
    ru = resource.getrusage(resource.RUSAGE_CHILDREN)
    return ru.ru_utime + ru.ru_stime


def wall(argv, env, cwd, cpu: list | None = None) -> float:
    """Wall time of one run [s]; its processor time (user + system) is appended to ``cpu``."""
    c = _children_cpu()
    t = time.perf_counter()
    proc = subprocess.run(argv, env=env, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    el = time.perf_counter() - t
    if proc.returncode != 0:
        raise SystemExit(f"{argv} failed ({proc.returncode}): {proc.stderr[-500:]}")
    if cpu is not None:
        cpu.append(_children_cpu() - c)
    return el


def child_json(code: str, args, env, cwd) -> dict:
    proc = subprocess.run([sys.executable, "-c", code, *args], env=env, cwd=cwd, capture_output=True, text=True)
    if proc.returncode != 0:
        raise SystemExit(f"benchmark child failed: {proc.stderr[-800:]}")
    return json.loads(proc.stdout.strip().splitlines()[-1])


def cli(tree: Path, *args) -> list[str]:
    """The command as the ``aerial`` console script runs it (``aerial.__main__.run``), from ``tree``."""
    return [sys.executable, "-c", "import sys; sys.argv[0] = 'aerial'; from aerial.__main__ import run; run()", *args]


def startup(trees, rounds):
    """Paired rounds: bare imports, report, check, for every tree; medians of times and of per-round ratios.

    Wall time and processor time (user + system of the child) are both kept: on a machine shared
    with other work the wall time of a short process is mostly waiting for a core, the
    processor time much less so.
    """
    res = {name: {k: [] for k in ("bare", "report", "check", "bare_cpu", "report_cpu", "check_cpu")} for name in trees}
    for name, tree in trees.items():  # warm the byte-code caches
        wall(cli(tree, "report", EXAMPLE, "--json"), child_env(tree, None), tree)
        wall(cli(tree, "check", EXAMPLE, "--json"), child_env(tree, None), tree)
    for _ in range(rounds):
        for name, tree in trees.items():
            env = child_env(tree, None)
            res[name]["bare"].append(wall([sys.executable, "-c", BARE], env, tree, res[name]["bare_cpu"]))
            res[name]["report"].append(wall(cli(tree, "report", EXAMPLE, "--json"), env, tree, res[name]["report_cpu"]))
            res[name]["check"].append(wall(cli(tree, "check", EXAMPLE, "--json"), env, tree, res[name]["check_cpu"]))
    out = {}
    for name, r in res.items():
        out[name] = {k: statistics.median(v) for k, v in r.items()}
        out[name]["report_ratio"] = statistics.median(a / b for a, b in zip(r["report"], r["bare"]))
        out[name]["check_ratio"] = statistics.median(a / b for a, b in zip(r["check"], r["bare"]))
        out[name]["report_cpu_ratio"] = statistics.median(a / b for a, b in zip(r["report_cpu"], r["bare_cpu"]))
        out[name]["check_cpu_ratio"] = statistics.median(a / b for a, b in zip(r["check_cpu"], r["bare_cpu"]))
    return out


def sweeps(trees, sizes, repeats, threads):
    res = {name: {n: [] for n in sizes} for name in trees}
    for _ in range(repeats):
        for n in sizes:
            for name, tree in trees.items():
                res[name][n].append(child_json(SWEEP_CHILD, [str(n - 2)], child_env(tree, threads), tree))
    out = {}
    for name, r in res.items():
        out[name] = {}
        for n, runs in r.items():
            out[name][n] = {
                "sweep_s": statistics.median(x["sweep_s"] for x in runs),
                "lu_s": statistics.median(x["lu_s"] for x in runs),
                "ratio": statistics.median(x["sweep_s"] / 100 / x["lu_s"] for x in runs),
                "cpu_ratio": statistics.median(x["sweep_cpu_s"] / 100 / x["lu_cpu_s"] for x in runs),
                "how": runs[-1]["how"],
            }
    return out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--before", metavar="DIR", help="an older source tree to measure alongside, paired")
    ap.add_argument("--rounds", type=int, default=7, help="start-up rounds (default 7)")
    ap.add_argument("--repeats", type=int, default=3, help="sweep repeats per size (default 3)")
    ap.add_argument("--sizes", type=int, nargs="+", default=[201, 401, 801], help="sweep sizes N (default 201 401 801)")
    ap.add_argument("--threads", type=int, default=1, help="BLAS threads in the sweep, closed-form and memory runs (default 1)")
    ap.add_argument("--skip", nargs="*", default=[], choices=["startup", "sweep", "closed", "memory"])
    args = ap.parse_args(argv)
    trees = {"after": ROOT}
    if args.before:
        trees = {"before": Path(args.before).resolve(), "after": ROOT}
    names = list(trees)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    import numpy
    import scipy

    print(f"nproc {os.cpu_count()}; numpy {numpy.__version__}, scipy {scipy.__version__}; "
          f"BLAS threads: start-up as the environment gives, other runs {args.threads}; load average at start {load:.2f}")
    print()

    def table(header, rows):
        print("| " + " | ".join(header) + " |")
        print("|" + "---|" * len(header))
        for row in rows:
            print("| " + " | ".join(row) + " |")
        print()

    if "startup" not in args.skip:
        s = startup(trees, args.rounds)
        print(f"Start-up ({args.rounds} paired rounds, medians; `aerial report {EXAMPLE} --json`):")
        table(["", *names],
              [["bare imports [s]", *(f"{s[n]['bare']:.2f}" for n in names)],
               ["report --json [s]", *(f"{s[n]['report']:.2f}" for n in names)],
               ["check --json [s]", *(f"{s[n]['check']:.2f}" for n in names)],
               ["report / bare imports (goal <= 1.5)", *(f"{s[n]['report_ratio']:.2f}" for n in names)],
               ["check / bare imports", *(f"{s[n]['check_ratio']:.2f}" for n in names)],
               ["processor time: bare imports [s]", *(f"{s[n]['bare_cpu']:.2f}" for n in names)],
               ["processor time: report --json [s]", *(f"{s[n]['report_cpu']:.2f}" for n in names)],
               ["processor time: report / bare imports", *(f"{s[n]['report_cpu_ratio']:.2f}" for n in names)],
               ["processor time: check / bare imports", *(f"{s[n]['check_cpu_ratio']:.2f}" for n in names)]])
    if "sweep" not in args.skip:
        w = sweeps(trees, args.sizes, args.repeats, args.threads)
        print(f"Full-wave band sweep, 100 frequencies, set-up included ({args.repeats} repeats, medians):")
        rows = []
        for n in args.sizes:
            rows.append([f"N = {n}", f"{w[names[0]][n]['lu_s'] * 1e3:.1f}",
                         *(f"{w[m][n]['sweep_s']:.2f} s = {w[m][n]['ratio']:.1f} x LU "
                           f"(processor time: {w[m][n]['cpu_ratio']:.1f} x)" for m in names)])
        table(["size", "one LU [ms]", *(f"sweep, {m}" for m in names)], rows)
    if "closed" not in args.skip:
        c = {m: child_json(CLOSED_CHILD, [], child_env(trees[m], args.threads), trees[m]) for m in names}
        print("Closed forms, inverted-L evaluations per second (geometries x 100 frequencies in one call):")
        rows = []
        for size in c[names[-1]]:
            cells = []
            for m in names:
                r = c[m][size]
                cells.append(" / ".join(f"{r[k]:.2e}" for k in ("pieces", "whole") if k in r)
                             + " (processor time: " + " / ".join(f"{r[k + '_cpu']:.2e}" for k in ("pieces", "whole")
                                                                 if k + "_cpu" in r) + ")")
            rows.append([f"{int(size):,}", *cells])
        first = next(iter(c[names[-1]]))
        table(["elements", *(f"{m}: in pieces / whole" if "pieces" in c[m][first] else f"{m}: whole" for m in names)],
              rows)
    if "memory" not in args.skip:
        rows = []
        for m in names:
            r = child_json(MEMORY_CHILD, [], child_env(trees[m], args.threads), trees[m])
            rows.append([m, str(r["n"]), f"{r['seconds']:.1f}", f"{r['traced_mb']:.0f}", f"{r['rss_mb']:.0f}"])
        print("One frequency at N = 2000 (goal < 250 MB):")
        table(["tree", "N", "time [s]", "peak traced [MB]", "peak resident [MB]"], rows)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
