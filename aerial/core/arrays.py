"""Small array helpers shared by the stages.

:func:`sorted_unique` is ``numpy.unique`` for a plain 1-D array of numbers:
the same values in the same order, without ``numpy.unique``'s test for a
masked array, which imports ``numpy.ma`` (some milliseconds of start-up that
a report otherwise never needs).
"""

from __future__ import annotations

import numpy as np


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
