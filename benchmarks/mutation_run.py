"""Mutation run: does the test suite notice a wrong number in the physics?

Run: python benchmarks/mutation_run.py [--only ID ...] [--list] [--markdown]

Each mutant is one textual change to the package (a constant, a factor, a sign,
a dropped term). For each, the package and its tests are copied to a temporary
folder, the change is applied there (the working tree is never touched), and only
the tests relevant to that change are run (``pytest -x -q``). A mutant is
*killed* when those tests fail, *survived* when they pass. The change is found
by its code text, not by a line number, so the list stays valid while the code
around it moves; a change whose text no longer occurs exactly once is reported
as "not applicable" (fix its text here).

The table it prints (``--markdown`` for docs/validation.md) is the kill table.
Mutants tagged "listed" are the ones an audit found surviving the whole suite.
"""

from __future__ import annotations

import argparse
import os
import shutil
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
TIMEOUT_S = 300


@dataclass(frozen=True)
class Mutant:
    ident: str
    path: str  # file inside the repository
    old: str  # code text that must occur exactly once
    new: str
    tests: tuple  # the relevant tests (files or node ids)
    what: str
    listed: bool = False


M = Mutant
RECEPTION = ("tests/test_reception.py", "tests/models/test_detector.py")
BUDGET = ("tests/test_loss_budget.py",)

MUTANTS = (
    # ---- the five found surviving by the audit
    M("audible-x10", "aerial/estimate/reception.py", "AUDIBLE_POWER_W = 1e-10", "AUDIBLE_POWER_W = 1e-9",
      RECEPTION, "audibility threshold ×10", True),
    M("audible-div10", "aerial/estimate/reception.py", "AUDIBLE_POWER_W = 1e-10", "AUDIBLE_POWER_W = 1e-11",
      RECEPTION, "audibility threshold ÷10"),
    M("earth-dropped", "aerial/estimate/assemble.py", "r_total = rr + rc + rg", "r_total = rr + rc",
      BUDGET + ("tests/test_cli.py",), "earth-electrode loss dropped from series resistance and efficiency", True),
    M("rod-factor-12", "aerial/models/electrodes.py", "1.36, 1.68, 1.80, 1.92, 2.00, 2.16])", "1.36, 1.68, 1.90, 1.92, 2.00, 2.16])",
      ("tests/models/test_electrodes.py",), "multiple-rod factor F(12) 1.80 → 1.90", True),
    M("span-35ft", "aerial/planner/codes.py", "SPAN_LIMITS_M = (10.668, 45.72)", "SPAN_LIMITS_M = (15.24, 45.72)",
      ("tests/test_planner.py",), "NFPA 70 810.16(A) span boundary 35 ft → 50 ft", True),
    M("earth-sign", "aerial/estimate/assemble.py", "r_total = rr + rc + rg", "r_total = rr + rc - rg",
      ("tests/test_loss_budget.py::test_response_adds_the_earth_by_value",), "ground-loss sign flip (checked by value, not by the input guard)", True),
    # ---- reception and detector
    M("clear-x10", "aerial/estimate/reception.py", "CLEAR_POWER_W = 1e-8", "CLEAR_POWER_W = 1e-7",
      RECEPTION, "'clearly heard' audio level ×10"),
    M("vt-10pc", "aerial/models/detector.py", "Boltzmann * _check(\"temperature\", temperature) / elementary_charge",
      "1.1 * Boltzmann * _check(\"temperature\", temperature) / elementary_charge",
      ("tests/models/test_detector.py",), "thermal voltage kT/q +10 %"),
    M("rin-factor", "aerial/models/detector.py", "r_in = vp / (2.0 * i_s)", "r_in = vp / (1.0 * i_s)",
      ("tests/models/test_detector.py",), "detector input resistance: RF fundamental factor 2 dropped"),
    M("audio-half", "aerial/models/detector.py", "va = 0.5 * (high.detected_voltage", "va = 1.0 * (high.detected_voltage",
      ("tests/models/test_detector.py",), "audio peak from the envelope swing ×2"),
    M("available-power", "aerial/estimate/assemble.py", 'out["available_power_w"] = voc**2 / (4.0 * r_total)',
      'out["available_power_w"] = voc**2 / (2.0 * r_total)', BUDGET, "aerial's available power V²/4R → V²/2R"),
    M("station-power", "aerial/estimate/reception.py", '"p_av": v_oc**2 / (4.0 * r_a)', '"p_av": v_oc**2 / (2.0 * r_a)',
      ("tests/test_cli.py::test_report_json_holds_the_contract",), "a station's available power V²/4R → V²/2R"),
    # ---- ground wave and noise
    M("e0-10pc", "aerial/models/groundwave.py", "return 0.3 * np.sqrt(p / 1e3)", "return 0.33 * np.sqrt(p / 1e3)",
      ("tests/models/test_groundwave.py",), "reference field E0 +10 %"),
    M("numerical-distance", "aerial/models/groundwave.py", "(eps - 1.0) / eps**2", "(eps - 1.0) / eps",
      ("tests/models/test_groundwave.py",), "Norton numerical distance: εc² → εc"),
    M("ground-permittivity", "aerial/models/groundwave.py", "sigma / (2.0 * np.pi * f * epsilon_0)",
      "sigma / (np.pi * f * epsilon_0)", ("tests/models/test_groundwave.py",), "σ/(ωε0) with ω → πf"),
    M("flat-earth-range", "aerial/models/groundwave.py", "FLAT_EARTH_RANGE_KM_AT_1MHZ = 80.0",
      "FLAT_EARTH_RANGE_KM_AT_1MHZ = 100.0", ("tests/models/test_groundwave.py",), "flat-earth range 80 → 100 km"),
    M("fam-residential", "aerial/models/noise.py", "\"residential\": (72.5, 27.7)", "\"residential\": (73.5, 27.7)",
      ("tests/models/test_noise.py",), "P.372 residential Fam +1 dB"),
    M("noise-field-constant", "aerial/models/noise.py", "10.0 * np.log10(b) - 95.5", "10.0 * np.log10(b) - 94.5",
      ("tests/models/test_noise.py",), "noise-field constant 95.5 → 94.5 dB"),
    # ---- coil and tank
    M("wheeler-40", "aerial/models/coil.py", "(18.0 * d + 40.0 * l)", "(18.0 * d + 36.0 * l)",
      ("tests/models/test_coil.py",), "Wheeler's formula 40 l → 36 l"),
    M("nagaoka-2pc", "aerial/models/coil.py", "return 4.0 / (3.0 * np.pi * kp)", "return 4.08 / (3.0 * np.pi * kp)",
      ("tests/models/test_coil.py",), "Nagaoka coefficient +2 %"),
    M("skin-depth", "aerial/models/coil.py", "/ (np.pi * f * mu_0 *", "/ (2.0 * np.pi * f * mu_0 *",
      ("tests/models/test_coil.py",), "coil skin depth: πfµ → 2πfµ"),
    M("tap-n", "aerial/models/tank.py", "TankCoupling(y_coil, n**2 / za, n / za)", "TankCoupling(y_coil, n / za, n / za)",
      ("tests/models/test_tank.py",), "tap transforms admittance by n, not n²"),
    M("loaded-q", "aerial/models/tank.py", "return np.minimum(1.0 / inv, qu)", "return np.minimum(1.3 / inv, qu)",
      ("tests/models/test_tank.py",), "loaded Q +30 %"),
    M("reflected-z", "aerial/models/tank.py", "zs = z_coil + (w * m) ** 2 / zp", "zs = z_coil + (w * m) / zp",
      ("tests/models/test_tank.py",), "reflected impedance (ωM)² → ωM"),
    # ---- electrodes
    M("dwight-4l", "aerial/models/electrodes.py", "r = rho / (2 * np.pi * L) * (np.log(4 * L / a) - 1.0)",
      "r = rho / (2 * np.pi * L) * (np.log(2 * L / a) - 1.0)", ("tests/models/test_electrodes.py",),
      "Dwight rod ln(4L/a) → ln(2L/a)"),
    M("sunde-depth", "aerial/models/electrodes.py", "np.log(2 * ell / np.sqrt(2 * a * d))",
      "np.log(2 * ell / np.sqrt(a * d))", ("tests/models/test_electrodes.py",), "Sunde buried wire √(2ad) → √(ad)"),
    M("two-rods-mutual", "aerial/models/electrodes.py", "+ rho / (4 * np.pi * s) * (", "+ rho / (2 * np.pi * s) * (",
      ("tests/models/test_electrodes.py",), "Dwight two rods: mutual term ×2"),
    # ---- short aerial, capacitance, conductor
    M("rr-5pc", "aerial/models/short_aerial.py", "return 4 * np.pi * ETA0 / 3 * (he / lam) ** 2",
      "return 4.2 * np.pi * ETA0 / 3 * (he / lam) ** 2", ("tests/models/test_short_aerial.py",),
      "radiation resistance +5 %"),
    M("z0-uniform", "aerial/models/short_aerial.py", "return _Z_UNIT * (np.log(h / a) - 1.0)",
      "return _Z_UNIT * (np.log(h / a) - 0.5)", ("tests/models/test_short_aerial.py",),
      "uniform-charge Z0: ln(h/a) − 1 → − 0.5"),
    M("z0-horizontal", "aerial/models/short_aerial.py", "return _Z_UNIT * np.arccosh(H / a)",
      "return _Z_UNIT * np.arccosh(2 * H / a)", ("tests/models/test_short_aerial.py",),
      "horizontal-wire Z0 arccosh(H/a) → arccosh(2H/a)"),
    M("howe-wire", "aerial/models/capacitance.py", "L / (np.log(2 * L / a) - 1.0)", "L / (np.log(2 * L / a) - 0.9)",
      ("tests/models/test_capacitance.py",), "Howe isolated-wire capacitance: − 1 → − 0.9"),
    M("copper-rho", "aerial/models/conductor.py", "COPPER_RESISTIVITY = 1.72414e-8", "COPPER_RESISTIVITY = 1.78e-8",
      ("tests/models/test_conductor.py",), "copper resistivity +3 %"),
    M("green-sign", "aerial/models/fullwave_kernel.py", "g = np.exp(-1j * k * r)",
      "g = np.exp(+1j * k * r)", ("tests/models/test_fullwave.py",),
      "full-wave Green's function: outgoing → incoming wave"),
    # ---- units, planner, codes
    M("foot", "aerial/core/units.py", "\"ft\": 0.3048,", "\"ft\": 0.305,", ("tests/test_units.py",),
      "foot 0.3048 → 0.305 m"),
    M("awg-92", "aerial/core/units.py", "0.127e-3 * 92.0 ** ((36.0 - gauge) / 39.0)",
      "0.127e-3 * 93.0 ** ((36.0 - gauge) / 39.0)", ("tests/test_units.py",), "AWG ratio 92 → 93"),
    M("fall-zone", "aerial/planner/clearance.py", "FALL_ZONE_FACTOR = 1.5", "FALL_ZONE_FACTOR = 1.25",
      ("tests/test_clearance.py",), "power-line fall zone 1.5 h → 1.25 h"),
    M("span-150ft", "aerial/planner/codes.py", "SPAN_LIMITS_M = (10.668, 45.72)", "SPAN_LIMITS_M = (10.668, 60.96)",
      ("tests/test_planner.py",), "NFPA 70 810.16(A) span boundary 150 ft → 200 ft"),
    M("arrival-phase", "aerial/models/fullwave_reception.py", "phase = np.exp(1j * k[:, None, None]",
      "phase = np.exp(-1j * k[:, None, None]", ("tests/test_building_grid.py",),
      "received wave's phase reversed (a station in front of the facade taken as behind it)"),
    M("grid-radius", "aerial/models/building.py", "return np.asarray(mesh, dtype=float) / (4.0 * np.pi)",
      "return np.asarray(mesh, dtype=float) / (40.0 * np.pi)", ("tests/test_building_grid.py",),
      "building grid wires ten times thinner than the equal-area rule"),
    M("lead-in-600mm", "aerial/planner/codes.py", "LEAD_IN_CLEARANCE_M = (0.6, 3.0)", "LEAD_IN_CLEARANCE_M = (0.5, 3.0)",
      ("tests/test_planner.py",), "NFPA 70 810.18(A) lead-in clearance 600 → 500 mm"),
)


def copy_tree(dest: Path) -> None:
    for name in ("aerial", "tests", "site_examples", "docs"):
        shutil.copytree(ROOT / name, dest / name, ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
    for name in ("pyproject.toml", "README.md"):
        if (ROOT / name).exists():
            shutil.copy2(ROOT / name, dest / name)


def run_tests(where: Path, tests) -> tuple[bool, float, str]:
    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1", MKL_NUM_THREADS="1",
               PYTHONDONTWRITEBYTECODE="1")
    env.pop("PYTHONPATH", None)
    t0 = time.perf_counter()
    try:
        p = subprocess.run([sys.executable, "-m", "pytest", "-x", "-q", "-p", "no:cacheprovider",
                            "-o", "addopts=", *tests], cwd=where, env=env, capture_output=True, text=True,
                           timeout=TIMEOUT_S)
        passed, tail = p.returncode == 0, (p.stdout.strip().splitlines() or [""])[-1]
    except subprocess.TimeoutExpired:
        passed, tail = False, f"timed out after {TIMEOUT_S} s"
    return passed, time.perf_counter() - t0, tail


def imports_the_copy(where: Path) -> bool:
    p = subprocess.run([sys.executable, "-c", "import aerial, sys; sys.stdout.write(aerial.__file__)"],
                       cwd=where, capture_output=True, text=True, env=dict(os.environ, PYTHONPATH=""))
    return Path(p.stdout).resolve().is_relative_to(where.resolve())


def run_one(mutant: Mutant, base: Path) -> tuple[str, float, str]:
    target = base / mutant.path
    text = target.read_text(encoding="utf-8")
    if text.count(mutant.old) != 1:
        return "not applicable", 0.0, f"code text found {text.count(mutant.old)} times"
    try:
        target.write_text(text.replace(mutant.old, mutant.new), encoding="utf-8")
        passed, secs, tail = run_tests(base, mutant.tests)
    finally:
        target.write_text(text, encoding="utf-8")
    return ("survived" if passed else "killed"), secs, tail


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--only", nargs="*", help="mutant ids to run")
    ap.add_argument("--list", action="store_true", help="list the mutants and stop")
    ap.add_argument("--markdown", action="store_true", help="print the table as Markdown")
    args = ap.parse_args(argv)
    chosen = [m for m in MUTANTS if not args.only or m.ident in args.only]
    if args.list:
        for m in chosen:
            print(f"{m.ident:22s} {m.path:34s} {m.what}")
        return 0
    with tempfile.TemporaryDirectory(prefix="aerial-mutants-") as tmp:
        base = Path(tmp)
        copy_tree(base)
        if not imports_the_copy(base):
            print("the copy does not import its own package; stopping", file=sys.stderr)
            return 2
        files = sorted({t.split("::")[0] for m in chosen for t in m.tests})
        ok, secs, tail = run_tests(base, files)
        print(f"unmutated: {'pass' if ok else 'FAIL'} in {secs:.1f} s ({tail})", file=sys.stderr)
        if not ok:
            return 2
        rows = []
        for m in chosen:
            status, secs, tail = run_one(m, base)
            rows.append((m, status, secs, tail))
            print(f"{m.ident:22s} {status:15s} {secs:5.1f} s  {tail}", file=sys.stderr)
    killed = sum(s == "killed" for _, s, _, _ in rows)
    listed = [(m, s) for m, s, _, _ in rows if m.listed]
    if args.markdown:
        print("| mutant | file | change | relevant tests | result |")
        print("|---|---|---|---|---|")
        for m, s, _, _ in rows:
            tag = " (listed)" if m.listed else ""
            tests = ", ".join(f"`{t}`" for t in m.tests)
            print(f"| {m.ident}{tag} | `{m.path.removeprefix('aerial/')}` | {m.what} | {tests} | {s} |")
        print()
    print(f"killed {killed} of {len(rows)} ({100 * killed / max(len(rows), 1):.0f} %); "
          f"listed: {sum(s == 'killed' for _, s in listed)} of {len(listed)} killed")
    return 0 if all(s == "killed" for _, s in listed) else 1


if __name__ == "__main__":
    sys.exit(main())
