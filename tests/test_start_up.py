"""What a command loads: the quick commands stay clear of the slow-to-import libraries.

Import costs themselves are measured in benchmarks/bench_speed.py (docs/performance.md), not
here; these tests only check which modules a fresh process has loaded after the command.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys

from .conftest import ROOT

PROBE = """
import contextlib, io, json, sys
from aerial.cli import main
with contextlib.redirect_stdout(io.StringIO()):
    code = main(sys.argv[1:])
print(json.dumps({"code": code, "loaded": sorted(m for m in sys.modules if m.startswith(("scipy.", "numpy.ma")))}))
"""


def _fresh_process(probe, *argv):
    """Run ``probe`` in a fresh Python with this tree's aerial; return the JSON of its last line."""
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    proc = subprocess.run([sys.executable, "-c", probe, *argv], capture_output=True, text=True, env=env, cwd=ROOT,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout.strip().splitlines()[-1])


def _loaded(*argv):
    return _fresh_process(PROBE, *argv)


def test_check_loads_no_scipy_special_constants_or_optimize():
    # consistency check: validating a site needs none of these (scipy.special alone costs about as much
    # as importing numpy, scipy, shapely and rich together)
    out = _loaded("check", str(ROOT / "site_examples" / "backyard_inverted_l.toml"), "--json")
    assert out["code"] == 0
    for heavy in ("scipy.special", "scipy.constants", "scipy.optimize", "scipy.linalg", "scipy.sparse"):
        assert heavy not in out["loaded"], heavy
    assert "numpy.ma" not in out["loaded"]  # numpy.unique's test for a masked array loads it: not used


def test_closed_form_report_loads_no_scipy_special_constants_optimize_or_linalg():
    # consistency check: a closed-form report takes its Bessel, elliptic, exponential-integral and
    # Faddeeva functions from aerial.models.special_functions, so no scipy.special (its import alone
    # costs about as much as numpy, scipy, shapely and rich together)
    out = _loaded("report", str(ROOT / "site_examples" / "backyard_inverted_l.toml"), "--json")
    assert out["code"] == 0
    for heavy in ("scipy.special", "scipy.constants", "scipy.optimize", "scipy.linalg", "scipy.sparse"):
        assert heavy not in out["loaded"], heavy
    assert "numpy.ma" not in out["loaded"]  # the sweep grid's distinct values without numpy.unique's masked test


def test_coil_for_an_inductance_loads_no_scipy_optimize_or_special():
    # consistency check: the turns for an inductance come from aerial.models.roots (Brent's method), the
    # Nagaoka coefficient and the wire's skin effect from aerial.models.special_functions
    out = _loaded("coil", "--diameter", "60 mm", "--wire", "0.5 mm", "--inductance", "240 uH", "--json")
    assert out["code"] == 0
    for heavy in ("scipy.special", "scipy.optimize", "scipy.constants", "scipy.linalg", "scipy.sparse"):
        assert heavy not in out["loaded"], heavy


TOP_LEVEL = """
import contextlib, io, json, sys
import aerial.cli
if sys.argv[1:]:
    with contextlib.redirect_stdout(io.StringIO()):
        code = aerial.cli.main(sys.argv[1:])
else:
    code = 0
print(json.dumps({"code": code, "loaded": sorted({m.split(".")[0] for m in sys.modules})}))
"""


def _packages(*argv):
    return _fresh_process(TOP_LEVEL, *argv)


def test_importing_the_command_line_loads_no_numpy_shapely_scipy_or_rich():
    # consistency check: `import aerial.cli` (and with it `import aerial`) loads only the core; each
    # command imports what it uses when it runs
    out = _packages()
    for heavy in ("numpy", "shapely", "scipy", "rich", "matplotlib"):
        assert heavy not in out["loaded"], heavy
    # nor the unit reader and its decimal arithmetic: ``aerial --version`` needs neither (a misspelt option
    # loads the units for its "did you mean")
    assert "decimal" not in out["loaded"]


def test_a_report_with_no_plan_or_building_loads_no_shapely():
    # consistency check: plan geometry (outlines, overhead lines, fall zones) is only built for a site that
    # has a [plan] or a building; a plain backyard wire's report needs none of it
    out = _packages("report", str(ROOT / "site_examples" / "rural_long_wire.toml"), "--json")
    assert out["code"] == 0
    assert "shapely" not in out["loaded"] and "numpy" in out["loaded"]


AERIAL_MODULES = """
import contextlib, io, json, sys
from aerial.cli import main
with contextlib.redirect_stdout(io.StringIO()):
    code = main(sys.argv[1:])
print(json.dumps({"code": code, "loaded": sorted(m for m in sys.modules if m.startswith("aerial."))}))
"""


def test_a_report_loads_the_coil_physics_only_for_a_coil_to_work_out(tmp_path):
    # consistency check: a coil given as an inductance needs the winding record, not the coil's physics
    # (aerial.models.coil and its root finder); a winding given by its turns does
    out = _fresh_process(AERIAL_MODULES, "report", str(ROOT / "site_examples" / "backyard_inverted_l.toml"), "--json")
    assert out["code"] == 0
    assert "aerial.models.winding" in out["loaded"]
    assert "aerial.models.coil" not in out["loaded"] and "aerial.models.roots" not in out["loaded"]
    text = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text(encoding="utf-8")
    assert 'coil = "240 uH"' in text
    wound = tmp_path / "wound.toml"
    wound.write_text(text.replace('coil = "240 uH"', 'coil = { diameter = "60 mm", turns = 70, gauge = "24 AWG", '
                                                      'length = "45 mm" }'), encoding="utf-8")
    out = _fresh_process(AERIAL_MODULES, "report", str(wound), "--json")
    assert out["code"] == 0 and "aerial.models.coil" in out["loaded"]


def test_a_plain_report_loads_no_argparse_decimal_or_bisect():
    # consistency check: a plain command line is read without argparse (and gettext and locale under it), the
    # units' decimal products are worked out in whole numbers and the series lengths by a search of our own
    out = _packages("report", str(ROOT / "site_examples" / "backyard_inverted_l.toml"), "--json")
    assert out["code"] == 0
    for module in ("argparse", "gettext", "locale", "decimal", "bisect"):
        assert module not in out["loaded"], module
