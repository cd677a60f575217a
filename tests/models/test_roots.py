"""Brent's bracketed root against published roots and a general-purpose reference library."""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

from aerial.core.errors import ModelInputError
from aerial.models.roots import bracketed_root

CASES = [
    # Wallis's cubic x^3 - 2x - 5 = 0, root 2.0945514815423265 (the classic test of root finders; from memory)
    (lambda x: x**3 - 2 * x - 5, 2.0, 3.0),
    (math.cos, 0.0, 3.0),  # pi/2
    (lambda x: math.exp(x) - 1e6, 0.0, 100.0),  # ln 1e6, a steep and lopsided bracket
    (lambda x: math.atan(x - 0.3), -1e3, 1e4),  # flat far from the root
    (lambda x: x - 1e-3 * math.sin(1e3 * x) - 0.5, 0.0, 1.0),  # wiggles
]


@pytest.mark.parametrize("case", range(len(CASES)))
def test_root_matches_scipy_brentq(case):
    # general reference library: scipy.optimize.brentq with the same relative tolerance
    func, lo, hi = CASES[case]
    ours = bracketed_root(func, lo, hi, rtol=1e-14)
    theirs = brentq(func, lo, hi, rtol=1e-14, xtol=1e-300)
    assert ours.converged
    assert ours.root == pytest.approx(theirs, rel=3e-14)
    assert ours.iterations <= 100


def test_published_roots():
    # Wallis's cubic: 2.0945514815423265 (from memory); cos x = 0 at pi/2; e^x = 1e6 at 6 ln 10 (exact forms)
    assert bracketed_root(CASES[0][0], 2.0, 3.0, rtol=1e-15).root == pytest.approx(2.0945514815423265, rel=1e-15)
    assert bracketed_root(math.cos, 0.0, 3.0, rtol=1e-15).root == pytest.approx(math.pi / 2, rel=1e-15)
    assert bracketed_root(CASES[2][0], 0.0, 100.0, rtol=1e-15).root == pytest.approx(6 * math.log(10), rel=1e-14)


def test_root_at_an_end_or_at_zero():
    assert bracketed_root(lambda x: x - 2.0, 2.0, 5.0).root == 2.0
    r = bracketed_root(lambda x: x**3, -1.0, 2.0, xtol=1e-30, max_iter=400)
    assert r.converged and abs(r.root) < 1e-10


def test_limit_reached_is_reported_not_raised():
    r = bracketed_root(CASES[3][0], -1e3, 1e4, rtol=1e-15, max_iter=3)
    assert not r.converged and r.iterations == 3 and -1e3 <= r.root <= 1e4


def test_bad_brackets_are_refused():
    with pytest.raises(ModelInputError, match="same sign"):
        bracketed_root(math.exp, 0.0, 1.0)
    with pytest.raises(ModelInputError, match="two different finite ends"):
        bracketed_root(math.sin, 1.0, 1.0)
    with pytest.raises(ModelInputError, match="not finite"):
        bracketed_root(lambda x: math.inf, 0.0, 1.0)
    with pytest.raises(ModelInputError, match="rtol must be positive"):
        bracketed_root(math.sin, -1.0, 1.0, rtol=0.0)
