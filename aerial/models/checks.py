"""Argument checks shared by the physics functions.

Each raises :class:`aerial.core.errors.ModelInputError` with the argument's name and
value, so a caller (or the command line) can say exactly what was wrong.
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError


def positive(name: str, value, allow_zero: bool = False) -> np.ndarray:
    """``value`` as a float array, after checking it is finite and > 0 (or >= 0).

    >>> positive("radius", [1e-3, 2e-3]).tolist()
    [0.001, 0.002]
    >>> positive("radius", -1.0)
    Traceback (most recent call last):
    ...
    aerial.core.errors.ModelInputError: radius must be finite and positive; got -1.0
    """
    arr = np.asarray(value, dtype=float)
    if type(value) is float:  # a plain number (the usual case): no array reductions
        lo = hi = value
    elif arr.size:  # two reductions instead of a mask: NaN makes both comparisons false, -inf fails the first
        lo, hi = arr.min(), arr.max()
    else:
        return arr
    if not ((lo >= 0.0 if allow_zero else lo > 0.0) and hi < np.inf):
        need = "zero or positive" if allow_zero else "positive"
        raise ModelInputError(f"{name} must be finite and {need}; got {value!r}")
    return arr


def option(name: str, value, choices) -> str:
    """Check a string option against its valid choices; the error lists them.

    >>> option("ground", "wet", ("perfect", "lossy"))
    Traceback (most recent call last):
    ...
    aerial.core.errors.ModelInputError: 'wet' is not a valid ground, must be one of 'perfect', 'lossy'
    """
    if value not in choices:
        raise ModelInputError(f"{value!r} is not a valid {name}, must be one of " + ", ".join(repr(c) for c in choices))
    return value
