"""The look-ahead bisection helpers (aerial.core.arrays) against a plain one-halving-at-a-time bisection."""

from __future__ import annotations

import math

import numpy as np
import pytest

from aerial.core.arrays import bisect_ahead, bisection_midpoints


def _halving_one_at_a_time(good, bad, passes, halvings):
    """The textbook bisection in log scale, one midpoint per step (the reference of these consistency checks)."""
    good, bad = np.asarray(good, dtype=float).copy(), np.asarray(bad, dtype=float).copy()
    for _ in range(halvings):
        mid = np.sqrt(good * bad)
        ok = passes(mid)
        good, bad = np.where(ok, mid, good), np.where(ok, bad, mid)
    return good, bad


def test_consistency_midpoints_are_the_tree_of_brackets():
    # node i's bracket halves to node 2i + 1 (below its midpoint) and 2i + 2 (above it)
    lo, hi = np.array([1.0, 0.5]), np.array([16.0, 8.0])
    mids = bisection_midpoints(lo, hi, 3)
    assert mids.shape == (7, 2)
    assert np.array_equal(mids[0], np.sqrt(lo * hi))
    assert np.array_equal(mids[1], np.sqrt(lo * mids[0])) and np.array_equal(mids[2], np.sqrt(mids[0] * hi))
    assert np.array_equal(mids[5], np.sqrt(mids[0] * mids[2]))
    assert np.array_equal(mids[6], np.sqrt(mids[2] * hi))


@pytest.mark.parametrize("depth", [1, 3, 5])
def test_consistency_bisect_ahead_is_the_one_at_a_time_bisection_exactly(depth):
    rng = np.random.default_rng(3)
    target = rng.uniform(1.0, 100.0, size=(3, 4))
    good, bad = np.full(target.shape, 0.01), np.full(target.shape, 1e4)
    seen = []

    def passes(x):
        seen.append(x.shape)
        return x <= target

    got = bisect_ahead(good, bad, passes, 37, depth)
    want = _halving_one_at_a_time(good, bad, lambda x: x <= target, 37)
    assert np.array_equal(got[0], want[0]) and np.array_equal(got[1], want[1])
    assert len(seen) == math.ceil(37 / depth)
    assert all(s[1:] == target.shape for s in seen)


def test_bisect_ahead_finds_a_root_from_either_side():
    # the good end may be the larger one: the root of x**2 = 2 (math.sqrt, Python standard library)
    g, b = bisect_ahead(4.0, 1.0, lambda x: x * x >= 2.0, 50, 4)
    assert float(g) == pytest.approx(math.sqrt(2.0), rel=1e-12) and float(b) < math.sqrt(2.0) <= float(g)
