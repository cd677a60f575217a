"""Plain JSON values from a result: numpy types to Python ones, non-finite numbers to null with a warning."""

from __future__ import annotations

import math

import numpy as np


def finalise(result: dict) -> dict:
    """Turn numpy values into plain JSON types; any non-finite number becomes null with a warning."""
    bad: list[str] = []

    def clean(value, path):
        if isinstance(value, dict):
            return {k: clean(v, f"{path}.{k}" if path else k) for k, v in value.items()}
        if isinstance(value, (list, tuple)):
            return [clean(v, path) for v in value]
        if isinstance(value, np.ndarray):
            return clean(value.tolist(), path)
        if isinstance(value, (np.bool_, bool)):
            return bool(value)
        if isinstance(value, (np.integer,)):
            return int(value)
        if isinstance(value, (float, np.floating)):
            v = float(value)
            if not math.isfinite(v):
                bad.append(path)
                return None
            return v
        if isinstance(value, complex):
            return [clean(value.real, path), clean(value.imag, path)]
        return value

    out = clean(result, "")
    if bad:
        out.setdefault("warnings", []).append(
            "Some figures could not be computed and are shown as null: " + ", ".join(sorted(set(bad)))
        )
    return out
