"""Small array helpers shared by the stages.

:func:`sorted_unique` is ``numpy.unique`` for a plain 1-D array of numbers:
the same values in the same order, without ``numpy.unique``'s test for a
masked array, which imports ``numpy.ma`` (some milliseconds of start-up that
a report otherwise never needs). :func:`bisection_midpoints` lets a bisection
in log scale look several halvings ahead with one call of a costly model.
:func:`scratch_planes` lends the models' inner loops working arrays from one
reused buffer.
"""

from __future__ import annotations

import math
import threading

import numpy as np

_scratch = threading.local()


def scratch_planes(rows: int, cols: int, count: int) -> tuple:
    """``count`` float planes of shape (rows, cols): views of one per-thread buffer, reused from call to call.

    Fresh arrays of a few hundred kB cost more in first-touch page faults than the arithmetic done on them
    (several microseconds a page on a virtual machine); the models' inner loops (the electrostatic fill, a
    building's field heights) work in these planes instead, and all of them in the same memory. The views
    hold only until the next call from the same thread: a caller uses them and keeps none.

    Examples
    --------
    >>> a, b = scratch_planes(2, 3, 2)
    >>> a.shape, bool(np.shares_memory(a, b))
    ((2, 3), False)
    """
    n = int(rows) * int(cols)
    buf = getattr(_scratch, "buffer", None)
    if buf is None or buf.size < count * n:
        buf = _scratch.buffer = np.empty(max(count * n, 1 << 19))  # pages untouched cost nothing
    return tuple(buf[k * n:(k + 1) * n].reshape(rows, cols) for k in range(count))


def sorted_unique(values) -> np.ndarray:
    """The distinct values of ``values``, sorted (as ``numpy.unique`` gives them; NaN-free input).

    Parameters
    ----------
    values : array_like
        Any shape; flattened.

    Returns
    -------
    ndarray, shape (K,)
        Sorted, each value once.

    Examples
    --------
    >>> sorted_unique([3.0, 1.0, 3.0, 2.0]).tolist()
    [1.0, 2.0, 3.0]
    >>> sorted_unique(np.zeros(0)).shape
    (0,)
    """
    a = np.sort(np.asarray(values).ravel())
    if a.size < 2:
        return a
    keep = np.empty(a.size, dtype=bool)
    keep[0] = True
    np.not_equal(a[1:], a[:-1], out=keep[1:])
    return a[keep]


def bisection_midpoints(lo, hi, depth: int) -> np.ndarray:
    """Midpoints √(lo·hi) of every bracket the next ``depth`` halvings of a bisection in log scale can reach.

    Parameters
    ----------
    lo, hi : array_like
        The brackets now (positive, broadcast together).
    depth : int
        Halvings looked ahead (≥ 1).

    Returns
    -------
    ndarray, shape (2**depth − 1, ...)
        Node 0 is the midpoint of [lo, hi]; node i's bracket halves to node 2i + 1 (the part
        below its midpoint) or node 2i + 2 (the part above). The values are the very midpoints
        the halvings taken one at a time compute, so a bisection that evaluates its model at
        all of them in one call and then walks down the tree gives the same answer.

    Examples
    --------
    >>> [round(float(m), 6) for m in bisection_midpoints(1.0, 16.0, 2)]
    [4.0, 2.0, 8.0]
    """
    lo, hi = np.asarray(lo, dtype=float), np.asarray(hi, dtype=float)
    shape = lo.shape if lo.shape == hi.shape else np.broadcast_shapes(lo.shape, hi.shape)
    out = np.empty((2 ** int(depth) - 1,) + shape)
    # the level's bracket ends in order from lo to hi: bracket i is [ends[i], ends[i + 1]]
    ends = np.empty((2,) + shape)
    ends[0], ends[1] = lo, hi
    for level in range(int(depth)):  # one level of the tree at a time: its 2**level brackets side by side
        m = out[2 ** level - 1:2 ** (level + 1) - 1]
        np.multiply(ends[:-1], ends[1:], out=m)
        np.sqrt(m, out=m)
        if level + 1 < int(depth):  # each midpoint splits its bracket: the part below it, then the one above
            finer = np.empty((2 * ends.shape[0] - 1,) + shape)
            finer[0::2], finer[1::2] = ends, m
            ends = finer
    return out


def bisect_ahead(good, bad, passes, halvings: int, depth: int, done=None):
    """Bisection in log scale of brackets [good, bad], several halvings per call of the test.

    Parameters
    ----------
    good, bad : array_like
        Each bracket's end that passes the test and the end that fails it (positive, broadcast
        together; either may be the larger).
    passes : callable
        passes(x) -> bool array of the shape of ``x``: x has shape (2**d − 1,) + the brackets'
        shape and every value is judged on its own.
    halvings : int
        Halvings to take.
    depth : int
        Halvings looked ahead per call of ``passes``.
    done : callable, optional
        done(good, bad) -> bool (the brackets flattened): stop as soon as it holds, tried before
        the first halving and after each one, so that no halving is taken past it (at most
        ``halvings`` in any case).

    Returns
    -------
    (ndarray, ndarray)
        ``good`` and ``bad`` after the halvings: the very values a bisection taking them one by
        one (midpoint √(good·bad), kept as the new good end when it passes) gives.

    Examples
    --------
    >>> g, b = bisect_ahead(1.0, 16.0, lambda x: x <= 3.0, 20, 4)
    >>> round(float(g), 4), bool(b > 3.0)
    (3.0, True)
    >>> g, b = bisect_ahead(1.0, 16.0, lambda x: x <= 3.0, 200, 4, done=lambda g, b: bool(abs(b / g - 1) <= 0.01))
    >>> bool(abs(b / g - 1) <= 0.01), round(float(g), 1)
    (True, 3.0)
    """
    good, bad = np.broadcast_arrays(np.asarray(good, dtype=float), np.asarray(bad, dtype=float))
    shape = good.shape
    good, bad = good.ravel(), bad.ravel()
    column = np.arange(good.size)
    taken = 0
    finished = done is not None and done(good, bad)
    while taken < int(halvings) and not finished:
        d = min(int(depth), int(halvings) - taken)
        mids = bisection_midpoints(good, bad, d)
        passed = np.asarray(passes(mids.reshape((-1,) + shape)), dtype=bool).reshape(mids.shape)
        node = None  # every bracket at the root, node 0
        for _ in range(d):
            mid, ok = (mids[0], passed[0]) if node is None else (mids[node, column], passed[node, column])
            good, bad = np.where(ok, mid, good), np.where(ok, bad, mid)
            step = np.where(ok, 2, 1)  # node 2i + 2: the bracket from the midpoint to the bad end
            node = step if node is None else 2 * node + step
            taken += 1
            finished = done is not None and done(good, bad)
            if finished:
                break
    return good.reshape(shape), bad.reshape(shape)


def replay_bisection(good, bad, a, b, passes, halvings: int, done=None):
    """:func:`bisect_ahead`'s brackets, the halvings replayed against each bracket's crossing pinned beforehand.

    Parameters
    ----------
    good, bad : array_like
        The brackets as :func:`bisect_ahead` takes them (positive, one shape; either end may be the larger).
    a, b : array_like
        Each bracket's crossing pinned (:func:`pin_crossing`): the test passes at ``a`` and fails at ``b``,
        both within [good, bad], ``a`` the nearer to ``good``.
    passes : callable
        passes(x) -> bool array of the shape of ``x`` (the brackets' shape).
    halvings : int
        Halvings to take.
    done : callable, optional
        As :func:`bisect_ahead`'s.

    Returns
    -------
    (ndarray, ndarray)
        ``good`` and ``bad`` after the halvings: what :func:`bisect_ahead` gives whenever the test changes
        answer once between the brackets' ends (it passes all the way from ``good`` to ``a`` and fails from
        ``b`` on). A midpoint on ``a``'s side of [a, b] (or at ``a``) is taken to pass, one on ``b``'s side
        (or at ``b``) to fail, and only a midpoint strictly between them is tested: a step with any such
        calls ``passes`` once, at every bracket's midpoint.

    Examples
    --------
    >>> g, b = replay_bisection(1.0, 16.0, 2.9999999, 3.0000001, lambda x: x <= 3.0, 30)
    >>> (g, b) == bisect_ahead(1.0, 16.0, lambda x: x <= 3.0, 30, 4)
    True
    """
    good, bad, a, b = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (good, bad, a, b)))
    shape = good.shape
    if good.size == 1:  # one bracket: the halvings in plain floats (the same products and square roots)
        g, z = _replay_one(float(good.flat[0]), float(bad.flat[0]), float(a.flat[0]), float(b.flat[0]),
                           lambda x: bool(np.asarray(passes(np.full(shape, x))).flat[0]), int(halvings), done)
        return np.full(shape, g), np.full(shape, z)
    up = np.where(bad > good, 1.0, -1.0)  # the failing side lies above (+1) or below (−1)
    good, bad = good.ravel().copy(), bad.ravel().copy()
    a, b, up = a.ravel(), b.ravel(), up.ravel()
    taken = 0
    finished = done is not None and done(good, bad)
    while taken < int(halvings) and not finished:
        mid = np.sqrt(good * bad)
        ok = (mid - a) * up <= 0.0
        unsure = ~ok & ((mid - b) * up < 0.0)
        if unsure.any():
            ok = np.where(unsure, np.asarray(passes(mid.reshape(shape)), dtype=bool).ravel(), ok)
        np.copyto(good, mid, where=ok)
        np.copyto(bad, mid, where=~ok)
        taken += 1
        finished = done is not None and done(good, bad)
    return good.reshape(shape), bad.reshape(shape)


def _replay_one(good: float, bad: float, a: float, b: float, passes, halvings: int, done):
    """:func:`replay_bisection` of one bracket in plain floats."""
    up = 1.0 if bad > good else -1.0
    taken = 0
    finished = done is not None and done(np.array([good]), np.array([bad]))
    while taken < halvings and not finished:
        mid = math.sqrt(good * bad)
        if (mid - a) * up <= 0.0:
            good = mid
        elif (mid - b) * up >= 0.0:
            bad = mid
        elif passes(mid):
            good = mid
        else:
            bad = mid
        taken += 1
        finished = done is not None and done(np.array([good]), np.array([bad]))
    return good, bad


#: Relative width to which :func:`pin_crossing` narrows a bracket, and its limit on steps.
PIN_RTOL = 1e-13
PIN_MAX_ITER = 40


def pin_crossing(good, bad, gap_good, gap_bad, measure, rtol=PIN_RTOL, max_iter=PIN_MAX_ITER):
    """Narrow brackets [good, bad] of a test's change of answer to a relative width ``rtol``.

    Parameters
    ----------
    good, bad : ndarray
        Brackets' ends (positive, one shape): the test passes at ``good`` and fails at ``bad`` (either
        may be the larger); an end that does not (a failing good end, a passing bad end) is where the
        change is taken to lie.
    gap_good, gap_bad : ndarray
        A smooth signed measure of the test at the ends: at least 0 where it passes, below where it fails.
    measure : callable
        measure(x) -> (passes, gap) at ``x`` of the brackets' shape.
    rtol : float
        Relative width to reach. [1]
    max_iter : int
        Calls of ``measure`` at most.

    Returns
    -------
    (ndarray, ndarray)
        The narrowed brackets' passing and failing ends (equal where the change lies at an end).

    Notes
    -----
    Regula falsi on the gap in ln x with the Illinois modification [1]_ (the end kept twice running
    has its gap halved), each trial kept a little away from the ends: a superlinear search that
    needs a handful of calls where a bisection to the same width needs forty.

    References
    ----------
    .. [1] M. Dowell, P. Jarratt, "A modified regula falsi method for computing the root of an
       equation", BIT 11, 1971, pp. 168-174 (from memory).

    Examples
    --------
    >>> a, b = pin_crossing(np.array([1.0]), np.array([16.0]), np.array([2.0]), np.array([-13.0]),
    ...                     lambda x: (x <= 3.0, 3.0 - x))
    >>> bool(a[0] <= 3.0 < b[0]) and bool(b[0] / a[0] - 1.0 <= 1e-13)
    True
    """
    pass_good = np.asarray(gap_good, dtype=float) >= 0.0
    pass_bad = np.asarray(gap_bad, dtype=float) >= 0.0
    a = np.where(pass_bad, bad, good)  # no change inside: it lies at the end that does not answer as it should
    b = np.where(pass_good, bad, good)
    ga, gb = np.maximum(gap_good, 0.0), np.minimum(gap_bad, 0.0)
    settled = pass_bad | ~pass_good
    side = np.zeros(np.shape(a), dtype=int)  # the end replaced last: -1 the passing one, +1 the failing one
    for _ in range(int(max_iter)):
        settled = settled | (np.abs(b / a - 1.0) <= rtol)
        if settled.all():
            break
        la, lb = np.log(a), np.log(b)
        flat = settled | (ga == gb)
        t = np.where(flat, 0.5, ga / np.where(flat, 1.0, ga - gb))
        # a trial no nearer an end than a fraction of the width sought: an end that meets the test to the
        # last bit (gap 0 there) would otherwise keep the step on itself
        keep = np.minimum(0.4 * rtol / np.maximum(np.abs(lb - la), 1e-300), 0.5)
        trial = np.exp(la + np.clip(t, keep, 1.0 - keep) * (lb - la))
        stuck = ~((np.minimum(a, b) < trial) & (trial < np.maximum(a, b)))
        trial = np.where(stuck, np.sqrt(a * b), trial)
        passed, gap = measure(trial)
        inside, outside = passed & ~settled, ~passed & ~settled
        ga = np.where(inside, np.maximum(gap, 0.0), np.where(outside & (side == 1), 0.5 * ga, ga))
        gb = np.where(outside, np.minimum(gap, 0.0), np.where(inside & (side == -1), 0.5 * gb, gb))
        a, b = np.where(inside, trial, a), np.where(outside, trial, b)
        side = np.where(inside, -1, np.where(outside, 1, side))
    return a, b

