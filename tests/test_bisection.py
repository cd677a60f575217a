"""The look-ahead bisection helpers (aerial.core.arrays) against a plain one-halving-at-a-time bisection."""

from __future__ import annotations

import math

import numpy as np
import pytest

from aerial.core.arrays import bisect_ahead, bisection_midpoints, pin_crossing, replay_bisection


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


def test_consistency_bisect_ahead_stops_where_a_halving_at_a_time_search_would():
    """With ``done`` the look-ahead bisection takes exactly the halvings a one-at-a-time search stopping at the
    same test takes (consistency check)."""
    good, bad = np.array([1e-12, 2e-12]), np.array([1.0, 2.0])

    def passes(x):
        return x <= np.array([3e-4, 7e-7])

    def close(g, b):
        return bool(np.all(b / g - 1.0 <= 1e-9))

    ref_g, ref_b = good.copy(), bad.copy()
    while not close(ref_g, ref_b):
        ref_g, ref_b = _halving_one_at_a_time(ref_g, ref_b, passes, 1)
    g, b = bisect_ahead(good, bad, passes, 200, 4, done=close)
    assert np.array_equal(g, ref_g) and np.array_equal(b, ref_b)


def test_pin_crossing_brackets_each_change_tightly_or_settles_at_an_end():
    """Regula falsi (Illinois) narrows every bracket round its root to 1e-13 in a few calls; a bracket whose bad
    end passes, or whose good end fails, is settled at that end (consistency check on x^3 = r)."""
    roots = np.array([2.0, 5.0, 0.01, 7.5])
    good, bad = np.array([1.0, 9.0, 1e-6, 1.0]), np.array([4.0, 3.0, 1.0, 5.0])  # the last one's root lies beyond

    def measure(x):
        gap = np.log(roots**3 / x**3) * np.where(bad > good, 1.0, -1.0)
        return gap >= 0.0, gap

    calls = []

    def counted(x):
        calls.append(1)
        return measure(x)

    a, b = pin_crossing(good, bad, measure(good)[1], measure(bad)[1], counted)
    assert len(calls) <= 12
    for i in range(3):
        assert min(a[i], b[i]) <= roots[i] <= max(a[i], b[i])
        assert abs(b[i] / a[i] - 1.0) <= 1e-13
    assert a[3] == b[3] == bad[3]


@pytest.mark.parametrize("width", [1e-13, 1e-6, None])
def test_consistency_replay_bisection_is_the_one_at_a_time_bisection_exactly(width):
    """Halvings replayed against a pinned crossing (tight, loose, or none: the brackets' own ends) give the
    one-at-a-time bisection's brackets, stopping where it would, and test only midpoints inside the pin
    (consistency check)."""
    rng = np.random.default_rng(5)
    target = rng.uniform(1.0, 100.0, size=(2, 3))
    good, bad = np.full(target.shape, 1e4), np.full(target.shape, 0.01)  # the good end the larger here
    if width is None:
        a, b = good, bad
    else:
        a, b = target * (1.0 + width), target * (1.0 - width)
    tested = []

    def passes(x):
        tested.append(1)
        return x >= target

    def close(g, z):
        return bool(np.all(g / z - 1.0 <= 1e-9))

    ref_g, ref_b = good.copy(), bad.copy()
    while not close(ref_g, ref_b):
        ref_g, ref_b = _halving_one_at_a_time(ref_g, ref_b, lambda x: x >= target, 1)
    g, z = replay_bisection(good, bad, a, b, passes, 200, done=close)
    assert np.array_equal(g, ref_g) and np.array_equal(z, ref_b)
    if width == 1e-13:
        assert len(tested) <= 2  # a 1e-9 bracket rarely has its midpoint within 1e-13 of the root
    one_g, one_b = replay_bisection(good[0, 0], bad[0, 0], a[0, 0] if width else good[0, 0],
                                    b[0, 0] if width else bad[0, 0], lambda x: x >= target[0, 0], 40)
    want = _halving_one_at_a_time(good[0, 0], bad[0, 0], lambda x: x >= target[0, 0], 40)
    assert float(one_g) == float(want[0]) and float(one_b) == float(want[1])
