"""Random houses and flats: does ``aerial report`` answer every site ``aerial check`` accepts?

Run from the repository root::

    python benchmarks/random_houses.py --count 200 --seed 1            # houses and flats
    python benchmarks/random_houses.py --kind flat --count 100 --seed 2

Each case is an invented site built from ``(seed, index)``: a house (rectangular or L-shaped footprint of
random size, height and construction, a span between two supports anywhere on the lot -- a chimney inside
the outline among them -- the lead-in from one end, the receiver and a rod anywhere) or a flat (a rail wire
on a balcony of a random floor and facade of a block, one or two pieces, the lead-in through the wall, a
water-pipe, a rod or a short rod as earth). Each site is checked, and every site the check accepts is
reported (metric, then US units); a report that fails is printed with its message and counted. The cases'
files are kept in a temporary folder named at the end. Not a test: the suite keeps the cases found
(tests/test_building.py); see docs/reliability.md.
"""

from __future__ import annotations

import argparse
import collections
import random
import subprocess
import sys
import tempfile
from pathlib import Path

CONSTRUCTIONS = ["timber frame", "brick", "reinforced concrete", "steel frame"]


def _r(v):
    return [round(x, 2) for x in v]


def house(rng: random.Random, i: int) -> str:
    w, d, height = rng.uniform(6, 20), rng.uniform(6, 14), rng.uniform(3, 15)
    if rng.random() < 0.5:
        fp = [[0, 0], [w, 0], [w, d], [0, d]]
    else:  # an L: one corner cut out
        cx, cy = rng.uniform(2, w - 2), rng.uniform(2, d - 2)
        fp = [[0, 0], [w, 0], [w, cy], [cx, cy], [cx, d], [0, d]]

    def spot():
        return _r([rng.uniform(-15, w + 40), rng.uniform(-15, d + 15)])

    return f'''[site]
name = "random house {i}"
[supports.a]
at = {spot()}
height = {rng.uniform(2, height + 6):.2f}
[supports.b]
at = {spot()}
height = {rng.uniform(2, 15):.2f}
[[spans]]
from = "a"
to = "b"
[lead_in]
from = "a"
[receiver]
at = {spot()}
height = 1
[building]
footprint = {[_r(p) for p in fp]}
height = {height:.2f}
construction = "{rng.choice(CONSTRUCTIONS)}"
[[earth.rods]]
length = "2.4 m"
at = {spot()}
'''


def flat(rng: random.Random, i: int) -> str:
    w, d, height = rng.uniform(10, 40), rng.uniform(8, 16), rng.uniform(6, 40)
    floor, out = rng.uniform(2, height - 2), rng.uniform(0.3, 2.5)
    x0 = rng.uniform(-3, w - 2)
    x1 = x0 + rng.uniform(1, 10)
    z = floor + 1
    if rng.random() < 0.5:  # the south facade
        pts = [[x0, -out, z], [x1, -out, z]] + ([[x1, -0.2, z]] if rng.random() < 0.5 else [])
        rx, via = [x0, 1.0], [[x0, 0.0, z]]
    else:  # the east facade
        y0 = x0 % d
        pts = [[w + out, y0, z], [w + out, min(d + 2, y0 + rng.uniform(1, 8)), z]]
        rx, via = [w - 1.0, y0], [[w, y0, z]]
    text = f'''[site]
name = "random flat {i}"
[[runs]]
name = "rail"
points = {[_r(p) for p in pts]}
[lead_in]
from = {_r(pts[0])}
via = {[_r(p) for p in via]}
[receiver]
at = {_r(rx)}
height = {floor + 0.9:.2f}
[building]
footprint = [[0, 0], [{w:.2f}, 0], [{w:.2f}, {d:.2f}], [0, {d:.2f}]]
height = {height:.2f}
construction = "{rng.choice(CONSTRUCTIONS + ['unknown'])}"
balcony_floor = {floor:.2f}
'''
    earth = rng.choice(["pipe", "rod", "short rod"])
    if earth == "pipe":
        return text + f'[earth.water_pipe]\nburied_length = "20 m"\ndiameter = "22 mm"\ncontinuous_metal = true\nat = {_r(rx)}\n'
    if earth == "rod":
        return text + f'[[earth.rods]]\nlength = "2.4 m"\nat = [{rng.uniform(-5, w + 5):.2f}, -2]\n'
    return text + '[[earth.rods]]\nlength = "1.2 m"\n'


def aerial(*args) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "aerial", *map(str, args)], capture_output=True, text=True)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--count", type=int, default=100)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--kind", choices=["both", "house", "flat"], default="both")
    a = ap.parse_args(argv)
    folder = Path(tempfile.mkdtemp(prefix="aerial-houses-"))
    refused, failed, accepted = collections.Counter(), 0, 0
    for i in range(a.count):
        rng = random.Random(a.seed * 1_000_003 + i)
        kind = a.kind if a.kind != "both" else ("house" if i % 2 == 0 else "flat")
        site = folder / f"{kind}{i:05d}.toml"
        site.write_text((house if kind == "house" else flat)(rng, i), encoding="utf-8")
        c = aerial("check", site, "--json")
        if c.returncode != 0:
            refused[c.stderr.split(": ", 2)[-1].split(":")[0][:60]] += 1
            continue
        accepted += 1
        for extra in ([], ["--units", "us"]):
            r = aerial("report", site, "--json", "--quiet", *extra)
            if r.returncode != 0 or r.stderr.strip():
                failed += 1
                print(f"{site.name} {' '.join(extra)}: exit {r.returncode}: {r.stderr.strip()[:300]}")
                break
    print(f"{a.count} sites (seed {a.seed}, {a.kind}): {accepted} accepted by check, {failed} of them failed in "
          f"report; refused by check: {sum(refused.values())}")
    for why, n in refused.most_common(5):
        print(f"  {n:4d}  {why}")
    print(f"site files: {folder}")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
