"""A bracketed root of one equation in one unknown (Brent's method), in plain Python.

The coil models solve one scalar equation (the turns that give an inductance);
this keeps them from importing a general optimisation library for it.

References
----------
.. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*,
   Prentice-Hall, 1973, ch. 4 (the zero-finding algorithm: inverse quadratic
   interpolation, secant and bisection, never slower than bisection by more
   than a small factor). (from memory)
.. [2] W. H. Press, S. A. Teukolsky, W. T. Vetterling and B. P. Flannery,
   *Numerical Recipes*, 3rd ed., Cambridge University Press, 2007, sec. 9.3
   (van Wijngaarden-Dekker-Brent method). (from memory)
"""

from __future__ import annotations

import math
from typing import Callable

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

_EPS = 2.0**-52


class Root(NamedTuple):
    """A root found inside a bracket."""

    root: float  #: the root [same unit as the bracket]
    converged: bool  #: True when the bracket shrank to the tolerance within the iteration limit
    iterations: int  #: function evaluations after the two at the bracket's ends


def _interpolated_step(a, b, c, fa, fb, fc, half, e, tol):
    """Brent's step from b: inverse quadratic (or secant) if it is safe, else bisection ([1]_ ch. 4)."""
    if abs(e) >= tol and abs(fa) > abs(fb):
        s = fb / fa
        if a == c:  # secant
            p, q = 2.0 * half * s, 1.0 - s
        else:  # inverse quadratic interpolation
            q, r = fa / fc, fb / fc
            p = s * (2.0 * half * q * (q - r) - (b - a) * (r - 1.0))
            q = (q - 1.0) * (r - 1.0) * (s - 1.0)
        if p > 0:
            q = -q
        p = abs(p)
        if 2.0 * p < min(3.0 * half * q - abs(tol * q), abs(e * q)):
            return p / q, True
    return half, False


def bracketed_root(func: Callable[[float], float], lo: float, hi: float, rtol: float = 1e-12,
                   max_iter: int = 100, xtol: float = 0.0) -> Root:
    """Root of a continuous function of one variable inside a bracket where it changes sign.

    Parameters
    ----------
    func : callable
        f(x), returning a float. [any]
    lo, hi : float
        Ends of the bracket, f(lo) and f(hi) of opposite signs (or one of them 0). [same as x]
    rtol : float, optional
        Relative tolerance on the root: stops when the bracket is narrower than about
        rtol |x| (plus a few units of rounding). [1]
    max_iter : int, optional
        Limit on function evaluations after the two at the ends.
    xtol : float, optional
        Absolute tolerance added to ``rtol`` |x|, for a root at or near zero. [same as x]

    Returns
    -------
    Root
        ``root``, ``converged`` and ``iterations``; on reaching the limit, the best estimate
        with ``converged`` False.

    Notes
    -----
    Brent's method ([1]_, [2]_ sec. 9.3): keep a bracket [b, c] with the better estimate b;
    try inverse quadratic interpolation through the last three points (the secant through
    two when they coincide); accept the step only if it lands well inside the bracket and
    shrinks faster than the step before last, else bisect. Superlinear for smooth
    functions, and never much slower than bisection.

    References
    ----------
    Brent 1973, ch. 4 (from memory); Press et al., *Numerical Recipes*, 3rd ed., sec. 9.3
    (from memory).

    Examples
    --------
    >>> r = bracketed_root(lambda x: x**3 - 2 * x - 5, 2.0, 3.0)   # Wallis's cubic
    >>> r.converged, round(r.root, 10)
    (True, 2.0945514815)
    """
    if not (rtol > 0 and xtol >= 0 and int(max_iter) >= 1):
        raise ModelInputError(f"rtol must be positive, xtol not negative and max_iter at least 1; got {rtol!r}, "
                              f"{xtol!r}, {max_iter!r}")
    if not (math.isfinite(lo) and math.isfinite(hi)) or lo == hi:
        raise ModelInputError(f"the bracket needs two different finite ends; got {lo!r}, {hi!r}")
    a, b = float(lo), float(hi)
    fa, fb = float(func(a)), float(func(b))
    if not (math.isfinite(fa) and math.isfinite(fb)):
        raise ModelInputError("the function is not finite at the ends of the bracket")
    if fa * fb > 0:
        raise ModelInputError(f"the function has the same sign at both ends of the bracket [{lo!r}, {hi!r}]")
    c, fc = b, fb
    d = e = b - a
    for iteration in range(1, int(max_iter) + 1):
        if (fb > 0 and fc > 0) or (fb < 0 and fc < 0):
            c, fc = a, fa  # keep the sign change between b and c
            d = e = b - a
        if abs(fc) < abs(fb):  # b is the better estimate
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 2.0 * _EPS * abs(b) + 0.5 * (rtol * abs(b) + xtol)
        half = 0.5 * (c - b)
        if abs(half) <= tol or fb == 0:
            return Root(b, True, iteration - 1)
        step, interpolated = _interpolated_step(a, b, c, fa, fb, fc, half, e, tol)
        e, d = (d, step) if interpolated else (step, step)
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, half)
        fb = float(func(b))
    return Root(b, False, int(max_iter))
