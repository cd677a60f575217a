"""Import the fuzzing harness (benchmarks/fuzz_sites.py) for the tests; it is not part of the package."""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
_PATH = ROOT / "benchmarks" / "fuzz_sites.py"


def load():
    """The harness module, loaded once by file path."""
    name = "aerial_fuzz_sites"
    if name in sys.modules:
        return sys.modules[name]
    spec = importlib.util.spec_from_file_location(name, _PATH)
    module = importlib.util.module_from_spec(spec)
    sys.modules[name] = module
    spec.loader.exec_module(module)
    return module
