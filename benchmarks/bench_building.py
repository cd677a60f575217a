"""Benchmark of the building as a wire grid in the full-wave solver: mesh convergence, cost, image limit.

Run from the repository root::

    python benchmarks/bench_building.py                 # everything (a few minutes on the 2-core machine)
    python benchmarks/bench_building.py --part mesh     # only the mesh convergence table
    python benchmarks/bench_building.py --part cost     # only unknowns and time of the report's grid
    python benchmarks/bench_building.py --part image    # only the image limit on a larger wall
    python benchmarks/bench_building.py --part resonance  # closed form against full wave, many buildings

Measures, with one BLAS thread:

* **mesh** -- the balcony example's building (site_examples/balcony_water_pipe.toml,
  30 m x 12 m, 15 m tall, reinforced concrete) gridded at 6, 4, 3, 2 and
  1.5 m: grid wires, unknowns, the grid's effective height for the worst
  and the best bearing of arrival and their geometric mean (the report's
  middle figure, perfectly conducting: s = 1), and the reactance with the
  grid, at 0.6 and 1.6 MHz (one solve of both). Each figure's change
  against the finest mesh is printed in dB (heights) or per cent (X);
* **cost** -- the report's full-wave building run (`building_full_wave_response`,
  the mesh the tool picks, convergence check on as in the report) for the
  balcony and high-floor examples: unknowns, the time of one frequency and of
  the band sweep the report makes (the site's bands at the default step), and
  the estimate the refusal uses (`estimate_site_full_wave`);
* **image** -- the outside check of tests/test_building_grid.py on a larger
  wall (3 lambda x 1.5 lambda at lambda/8 mesh): the same figures, to show the
  edge error shrinking as the wall grows;
* **resonance** -- the closed form (`aerial report`) against the full-wave
  grid (`aerial report --full-wave`, the middle of the worst and best
  bearing) for steel-framed blocks 10, 20, 30 and 40 m tall, on a square
  (15 m x 15 m) and a long (45 m x 12 m) footprint, a 6 m wire on a rail
  1.6 m out from the facade near the top (rail 2 m below the roof) and on a
  middle floor, and for the two flat examples, from 150 kHz to 1.71 MHz:
  the difference in dB without ("static": the grounded box's screening,
  `box_screen`) and with the building's own currents
  (`building_charge_factor`); a star marks a frequency above the limit
  where the closed form holds its figures and warns.

Prints Markdown tables for docs/models-building.md and docs/performance.md.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
MESHES_M = (6.0, 4.0, 3.0, 2.0, 1.5)
MESH_FREQUENCIES_HZ = (0.6e6, 1.6e6)


def _site(name):
    from aerial import load_site

    return load_site(os.path.join(ROOT, "site_examples", name))


def _geometry(site, frequency):
    from aerial.estimate.assemble import earth_at_frequency
    from aerial.geometry.resolve import resolve

    earth = earth_at_frequency(site, frequency)["impedance_ohm"].real
    return resolve(site, electrode_ohm=float(earth[len(earth) // 2])), earth


def mesh_table():
    """Rows of the mesh convergence table for the balcony example's building (perfect conductor)."""
    import numpy as np

    from aerial.estimate.fullwave_sweep import with_building_grid
    from aerial.models.fullwave import solve_full_wave
    from aerial.models.fullwave_reception import bearing_range

    site = _site("balcony_water_pipe.toml")
    f = np.array(MESH_FREQUENCIES_HZ)
    geo, _ = _geometry(site, f)
    rows = []
    for mesh in MESHES_M:
        gridded = with_building_grid(geo.segments, geo.building, mesh)
        t = time.perf_counter()
        res = solve_full_wave(gridded, f, convergence_check=False)
        seconds = time.perf_counter() - t
        span = bearing_range(res)
        rows.append({"mesh_m": mesh, "grid_wires": len(gridded) - len(geo.segments), "unknowns": res.n_unknowns,
                     "worst_m": span["worst_m"], "best_m": span["best_m"],
                     "middle_m": np.sqrt(span["worst_m"] * span["best_m"]),
                     "reactance_ohm": np.asarray(res.impedance).imag, "seconds": seconds})
        print(f"  mesh {mesh:g} m: {rows[-1]['unknowns']} unknowns, {seconds:.1f} s", file=sys.stderr)
    return rows


def print_mesh_table(rows):
    import numpy as np

    ref = rows[-1]
    print(f"\nMesh convergence, balcony example's building, perfectly conducting grid; change against the "
          f"{ref['mesh_m']:g} m mesh in brackets\n")
    head = "| mesh [m] | grid wires | unknowns |"
    for fz in MESH_FREQUENCIES_HZ:
        mhz = f"{fz / 1e6:g} MHz"
        head += f" h_e worst / best / middle at {mhz} [m] | X at {mhz} [ohm] |"
    print(head + " time, 2 frequencies [s] |")
    print("|" + "---|" * (4 + 2 * len(MESH_FREQUENCIES_HZ)))
    for r in rows:
        cells = [f"{r['mesh_m']:g}", str(r["grid_wires"]), str(r["unknowns"])]
        for i in range(len(MESH_FREQUENCIES_HZ)):
            db = [20 * np.log10(r[k][i] / ref[k][i]) for k in ("worst_m", "best_m", "middle_m")]
            cells.append(f"{r['worst_m'][i]:.3f} / {r['best_m'][i]:.3f} / {r['middle_m'][i]:.3f} "
                         f"({db[0]:+.2f} / {db[1]:+.2f} / {db[2]:+.2f} dB)")
            pc = 100 * (r["reactance_ohm"][i] / ref["reactance_ohm"][i] - 1)
            cells.append(f"{r['reactance_ohm'][i]:.0f} ({pc:+.1f} %)")
        cells.append(f"{r['seconds']:.1f}")
        print("| " + " | ".join(cells) + " |")


def cost_table():
    """Unknowns and time of the report's full-wave building run on the two flat examples."""
    import numpy as np

    from aerial.estimate.assemble import frequency_grid
    from aerial.estimate.fullwave_sweep import building_full_wave_response, building_mesh, estimate_site_full_wave

    rows = []
    for name in ("balcony_water_pipe.toml", "high_floor_flat.toml"):
        site = _site(name)
        band = frequency_grid(site, None)
        for label, f in (("one frequency (1 MHz)", np.array([1.0e6])), (f"band sweep, {len(band)} frequencies", band)):
            geo, earth = _geometry(site, f)
            est = estimate_site_full_wave(geo, f)
            t = time.perf_counter()
            out = building_full_wave_response(site, geo, f, earth)
            seconds = time.perf_counter() - t
            info = out["building_full_wave"]
            rows.append({"site": name, "run": label, "mesh_m": building_mesh(f), "grid_wires": info["grid_wires"],
                         "unknowns": info["unknowns"], "seconds": seconds, "estimate_s": est["seconds"],
                         "estimate_mb": est["memory_bytes"] / 2**20})
            print(f"  {name} {label}: {seconds:.1f} s", file=sys.stderr)
    print("\nFull-wave building run as the report makes it (wire alone + wire with the grid, convergence check on)\n")
    print("| example | run | mesh [m] | grid wires | unknowns with the grid | time [s] | refusal estimate [s] | "
          "refusal estimate [MB] |")
    print("|---|---|---|---|---|---|---|---|")
    for r in rows:
        print(f"| {r['site']} | {r['run']} | {r['mesh_m']:g} | {r['grid_wires']} | {r['unknowns']} | "
              f"{r['seconds']:.1f} | {r['estimate_s']:.1f} | {r['estimate_mb']:.0f} |")


def image_check():
    """The facade-grid image check of tests/test_building_grid.py on a 3 lambda x 1.5 lambda wall."""
    import math

    import numpy as np
    from scipy.constants import c

    from aerial.estimate.fullwave_sweep import with_building_grid
    from aerial.models.building import BuildingBody
    from aerial.models.fullwave import solve_full_wave
    from aerial.models.fullwave_reception import arrival_effective_height
    from aerial.models.segments import polyline_segments

    lam = 10.0
    k = 2 * math.pi / lam
    d = 0.25 * lam
    print("\nFacade grid against the ground-plus-wall image solution (short monopole lambda/4 in front of the wall)\n")
    print("| wall | mesh | unknowns | h_e ratio to the image solution at 0 / 30 / 60 deg [dB] | "
          "R / R_open (image solution) | time [s] |")
    print("|---|---|---|---|---|---|")
    for w, h, per in ((2.0, 1.0, 6.0), (3.0, 1.5, 8.0)):
        mesh = lam / per
        mono = polyline_segments([[0.0, d, 0.002 * lam], [0.0, d, 0.05 * lam]], 0.05 * lam / 200)
        body = BuildingBody([[-w * lam / 2, -mesh], [w * lam / 2, -mesh], [w * lam / 2, 0.0], [-w * lam / 2, 0.0]],
                            h * lam, "steel frame")
        t = time.perf_counter()
        open_ = solve_full_wave(mono, [c / lam], convergence_check=False)
        grid = solve_full_wave(with_building_grid(mono, body, mesh), [c / lam], convergence_check=False,
                               max_segment_wavelengths=1.01 * mesh / lam, min_pieces_per_wire=1)
        seconds = time.perf_counter() - t
        b = np.array([0.0, 30.0, 60.0])
        ratio = (np.abs(arrival_effective_height(grid, b)) / np.abs(arrival_effective_height(open_, b)))[0]
        expected = 2 * np.abs(np.sin(k * d * np.cos(np.radians(b))))
        x = 2 * k * d
        r_image = 1 - 1.5 * (math.sin(x) / x + math.cos(x) / x**2 - math.sin(x) / x**3)
        r = float(grid.impedance[0].real / open_.impedance[0].real)
        db = " / ".join(f"{v:+.2f}" for v in 20 * np.log10(ratio / expected))
        print(f"| {w:g} lambda x {h:g} lambda | lambda/{per:g} | {grid.n_unknowns} | {db} | {r:.3f} ({r_image:.3f}, "
              f"{100 * (r / r_image - 1):+.1f} %) | {seconds:.1f} |")


RESONANCE_FREQUENCIES_HZ = (0.15e6, 0.52e6, 1.0e6, 1.4e6, 1.71e6)
RESONANCE_BLOCK = """
[site]
name = "Test block"
region = "EU"
noise = "city"
bands = ["mf"]
soil = "intermediate"
[wire]
diameter = "1.0 mm"
material = "copper"
[[runs]]
name = "front rail"
points = [[0.5, 1.6, {z}], [6.5, 1.6, {z}]]
[lead_in]
from = [0.5, 1.6, {z}]
via = [[0.5, 0.0, {zl}]]
[receiver]
at = [0.5, -0.8]
height = "{zl} m"
[earth.water_pipe]
buried_length = "20 m"
diameter = "28 mm"
depth = "1.0 m"
continuous_metal = true
at = [0.5, -0.8]
[building]
footprint = [[{x0}, {y0}], [{x1}, {y0}], [{x1}, 0.0], [{x0}, 0.0]]
height = "{h} m"
construction = "steel frame"
balcony_floor = "{fl} m"
rail_bonded = true
"""


def _block_site(width, depth, height, where):
    """A steel-framed block with a 6 m rail wire on a balcony near its top or on a middle floor."""
    import tempfile

    from aerial import load_site

    floor = height - 3.0 if where == "top" else 3.0 * (height // 6.0)
    z = floor + 1.0
    text = RESONANCE_BLOCK.format(z=z, zl=z - 0.2, x0=3.5 - width / 2, x1=3.5 + width / 2, y0=-depth, h=height,
                                  fl=floor)
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "block.toml")
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(text)
        return load_site(path)


def resonance_rows():
    """Closed form against the full-wave grid, before and after the building's own currents, in dB."""
    import numpy as np

    from aerial.estimate.fullwave_sweep import building_full_wave_response
    from aerial.models.closed_form import closed_form_response

    f = np.array(RESONANCE_FREQUENCIES_HZ)
    cases = [(f"{h:g} m, {w:g} x {d:g} m, {where}", _block_site(w, d, h, where))
             for h in (10.0, 20.0, 30.0, 40.0) for (w, d) in ((15.0, 15.0), (45.0, 12.0)) for where in ("top", "middle")]
    cases += [(name, _site(name)) for name in ("balcony_water_pipe.toml", "high_floor_flat.toml")]
    rows = []
    for label, site in cases:
        geo, earth = _geometry(site, f)
        t = time.perf_counter()
        full = building_full_wave_response(site, geo, f, float(earth[len(earth) // 2]), convergence_check=False)
        closed = closed_form_response(geo.segments, f, building=geo.building)
        after = np.asarray(closed["effective_height_m"], float)
        before = after / np.asarray(closed["building"]["current_ratio"], float)
        fw = np.asarray(full["effective_height_m"], float)
        rows.append({"case": label, "before_db": 20 * np.log10(fw / before), "after_db": 20 * np.log10(fw / after),
                     "past": f > closed["building"]["current_limit_hz"], "limit_hz": closed["building"]["current_limit_hz"],
                     "full_m": fw, "closed_m": after})
        print(f"  {label}: {time.perf_counter() - t:.1f} s", file=sys.stderr)
    return rows


def print_resonance_table(rows):
    import numpy as np

    print("\nFull wave over closed form, effective height [dB]: static screening / with the building's currents "
          "(* above the closed form's limit)\n")
    print("| building, wire | " + " | ".join(f"{v / 1e6:g} MHz" for v in RESONANCE_FREQUENCIES_HZ)
          + " | limit [MHz] | largest, within the limit |")
    print("|---|" + "---|" * (len(RESONANCE_FREQUENCIES_HZ) + 2))
    for r in rows:
        cells = [f"{b:+.1f} / {a:+.1f}{'*' if p else ''}" for b, a, p in zip(r["before_db"], r["after_db"], r["past"])]
        ok = ~r["past"]
        worst = float(np.max(np.abs(r["after_db"][ok]))) if np.any(ok) else float("nan")
        print(f"| {r['case']} | " + " | ".join(cells) + f" | {r['limit_hz'] / 1e6:.2f} | {worst:.1f} |")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--part", choices=("mesh", "cost", "image", "resonance", "all"), default="all")
    args = ap.parse_args(argv)
    for var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
        os.environ.setdefault(var, "1")
    sys.path.insert(0, ROOT)
    if args.part in ("mesh", "all"):
        print_mesh_table(mesh_table())
    if args.part in ("cost", "all"):
        cost_table()
    if args.part in ("image", "all"):
        image_check()
    if args.part in ("resonance", "all"):
        print_resonance_table(resonance_rows())


if __name__ == "__main__":
    main()
