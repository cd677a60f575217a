"""Capacitance and static effective height of thin-wire aerials over a perfect ground.

Two kinds of model:

* average-potential (Howe) closed forms for a straight wire: isolated, vertical
  above the ground with a base gap, horizontal at a height; the per-unit-length
  capacitance of an infinite wire over ground; Jackson's asymptotic series for
  the isolated wire;
* an electrostatic moment solution for any :class:`~aerial.models.segments.Segments`
  set, with images in the ground plane z = 0, aerial segments at 1 V and
  earth-lead segments at 0 V.

Frame: metres, x east, y north, z up; the ground is the plane z = 0.

Feed-gap convention: a base-fed aerial's lowest point sits ``FEED_GAP_M``
(0.02 m) above the ground plane (see :mod:`aerial.models.segments`); a wire
that touched the plane would touch its own image.

References
----------
.. [1] G. W. O. Howe, "The capacity of radio-telegraphic antennae", The
   Electrician, 1914 (average-potential method). (from memory)
.. [2] J. D. Jackson, "Charge density on thin straight wire, revisited",
   Am. J. Phys. 68, 789 (2000). (from memory)
.. [3] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
   1968, ch. 2 (electrostatic thin-wire moment method, pulse basis, point
   matching). (from memory)
"""

from __future__ import annotations

import threading

import numpy as np
from aerial.core.constants import EPSILON_0 as epsilon_0

from aerial.core.arrays import scratch_planes
from aerial.core.records import NamedTuple
from aerial.core.threads import blas_threads
from aerial.core.errors import ModelInputError
from aerial.models.segments import FEED_GAP_M, Segments
from aerial.models.checks import positive as _check_positive

_TWO_PI_EPS0 = 2 * np.pi * epsilon_0
_FOUR_PI_EPS0 = 4 * np.pi * epsilon_0

#: Default number of unknowns the moment solution aims for over the whole wire set.
DEFAULT_TARGET_UNKNOWNS = 240
#: Fewest sub-segments any one segment is cut into.
DEFAULT_MIN_SUBSEGMENTS = 2
#: Longest sub-segment allowed, as a fraction of the segment it belongs to.
DEFAULT_MAX_SUBSEGMENT_FRACTION = 1.0 / 20.0
#: Sub-segments are not made shorter than this multiple of the wire radius
#: (the thin-wire kernel needs length >> radius).
DEFAULT_MIN_LENGTH_TO_RADIUS = 8.0
#: Largest number of unknowns accepted (memory: N^2 * 3 doubles for the fill).
DEFAULT_MAX_UNKNOWNS = 4000
#: Relative change in capacitance between the chosen and a half-density
#: subdivision below which the solution is reported as converged.
DEFAULT_RELATIVE_TOLERANCE = 0.01
#: An earth-side segment reaching this close to the ground plane connects to it;
#: an earth side that never does is a counterpoise and floats. [m]
GROUND_CONTACT_M = 1e-3
#: An earth-side segment reaching this close to a grounded wall plane is bonded to it. [m]
WALL_CONTACT_M = 0.05




# --------------------------------------------------------------------------------------
# Average-potential closed forms
# --------------------------------------------------------------------------------------


def isolated_wire_capacitance(length, radius):
    """Capacitance of an isolated straight wire by the average-potential (Howe) method.

    Parameters
    ----------
    length : array_like
        Wire length. [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Capacitance. [F]

    Notes
    -----
    C = 2 pi eps0 L / [ln(2L/a) - 1] ([1]_). By Thomson's theorem a uniform
    charge gives a lower bound on the true capacitance; valid for L >> a
    (flagging is left to the caller: below L/a ~ 20 the thin-wire form fails).

    References
    ----------
    .. [1] G. W. O. Howe, The Electrician, 1914. (from memory)

    Examples
    --------
    >>> round(float(isolated_wire_capacitance(20.0, 1e-3)) * 1e12, 2)
    115.94
    """
    L = _check_positive("length", length)
    a = _check_positive("radius", radius)
    return _TWO_PI_EPS0 * L / (np.log(2 * L / a) - 1.0)


def isolated_wire_capacitance_jackson(length, radius):
    """Capacitance of an isolated straight wire by Jackson's asymptotic series.

    Parameters
    ----------
    length : array_like
        Wire length. [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Capacitance. [F]

    Notes
    -----
    With Lambda = ln(L/a) ([1]_, from memory)::

        C = (2 pi eps0 L / Lambda) {1 + (1 - ln 2)/Lambda
                                    + [1 + (1 - ln 2)^2 - pi^2/12]/Lambda^2}

    References
    ----------
    .. [1] J. D. Jackson, "Charge density on thin straight wire, revisited",
       Am. J. Phys. 68, 789-799 (2000). (from memory)

    Examples
    --------
    >>> round(float(isolated_wire_capacitance_jackson(20.0, 1e-3)) * 1e12, 2)
    116.14
    """
    L = _check_positive("length", length)
    a = _check_positive("radius", radius)
    lam = np.log(L / a)
    c1 = 1.0 - np.log(2.0)
    return _TWO_PI_EPS0 * L / lam * (1.0 + c1 / lam + (1.0 + c1**2 - np.pi**2 / 12.0) / lam**2)


def _f_log(x):
    """F(x) = x ln x - x with F(0) = 0: the double integral of 1/|s - s'| between collinear intervals."""
    x = np.asarray(x, dtype=float)
    safe = np.where(x > 0, x, 1.0)
    return np.where(x > 0, safe * np.log(safe) - safe, 0.0)


def vertical_wire_capacitance(height, radius, base_gap=FEED_GAP_M):
    """Capacitance of a vertical wire above a perfect ground plane (average potential, image form).

    Parameters
    ----------
    height : array_like
        Height of the wire's top above the ground plane. [m]
    radius : array_like
        Wire radius. [m]
    base_gap : array_like, optional
        Height of the wire's lower end above the ground plane (the feed gap). [m]

    Returns
    -------
    ndarray
        Capacitance to ground. [F]

    Notes
    -----
    Uniform charge on z in [h0, h] and its image on [-h, -h0]; with L = h - h0
    and F(x) = x ln x - x the average potential gives::

        C = 4 pi eps0 L^2 / {2 L [ln(2L/a) - 1] - [F(2h) - 2 F(h + h0) + F(2 h0)]}

    For h0 = 0 this reduces to C = 2 pi eps0 h / [ln(h/a) - 1]. A lower bound
    (Thomson's theorem); thin wire L >> a.

    References
    ----------
    G. W. O. Howe, The Electrician, 1914 (average-potential method). (from memory)

    Examples
    --------
    >>> round(float(vertical_wire_capacitance(10.0, 1e-3, 0.0)) * 1e12, 3)
    67.759
    """
    h = _check_positive("height", height)
    a = _check_positive("radius", radius)
    h0 = np.asarray(base_gap, dtype=float)
    if np.any(~np.isfinite(h0) | (h0 < 0) | (h0 >= h)):
        raise ModelInputError(f"base_gap must be zero or positive and below the height; got {base_gap!r}")
    L = h - h0
    d = _f_log(2 * h) - 2 * _f_log(h + h0) + _f_log(2 * h0)
    return 2 * _FOUR_PI_EPS0 * L**2 / (2 * (2 * L * (np.log(2 * L / a) - 1.0) - d))


def horizontal_wire_capacitance(length, height, radius):
    """Capacitance of a horizontal wire of finite length above a perfect ground (average potential).

    Parameters
    ----------
    length : array_like
        Wire length. [m]
    height : array_like
        Height of the wire's axis. [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Capacitance to ground. [F]

    Notes
    -----
    C = 2 pi eps0 l / {ln(2l/a) - 1 - asinh(l/2H) + [sqrt(l^2 + 4H^2) - 2H]/l}:
    uniform charge on the wire and its image at distance 2H. Lower bound
    (Thomson's theorem); thin wire, H >> a.

    References
    ----------
    G. W. O. Howe, The Electrician, 1914 (average-potential method). (from memory)

    Examples
    --------
    >>> round(float(horizontal_wire_capacitance(30.0, 10.0, 1e-3)) * 1e12, 1)
    178.6
    """
    ell = _check_positive("length", length)
    H = _check_positive("height", height)
    a = _check_positive("radius", radius)
    denom = np.log(2 * ell / a) - 1.0 - np.arcsinh(ell / (2 * H)) + (np.sqrt(ell**2 + 4 * H**2) - 2 * H) / ell
    return _TWO_PI_EPS0 * ell / denom


def horizontal_wire_capacitance_per_m(height, radius):
    """Capacitance per unit length of an infinite horizontal wire over a perfect ground.

    Parameters
    ----------
    height : array_like
        Height of the wire's axis; must exceed the radius. [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Capacitance per metre. [F/m]

    Notes
    -----
    C' = 2 pi eps0 / arccosh(H/a), exact for a round wire (image method);
    approximately 2 pi eps0 / ln(2H/a) when H >> a.

    References
    ----------
    Image method for a cylinder over a conducting plane; e.g. S. Ramo,
    J. R. Whinnery and T. Van Duzer, *Fields and Waves in Communication
    Electronics*, 3rd ed., 1994, ch. 1. (from memory)

    Examples
    --------
    >>> round(float(horizontal_wire_capacitance_per_m(10.0, 1e-3)) * 1e12, 4)
    5.6175
    """
    H = _check_positive("height", height)
    a = _check_positive("radius", radius)
    if np.any(H <= a):
        raise ModelInputError("height must exceed the wire radius (the wire would touch the ground)")
    return _TWO_PI_EPS0 / np.arccosh(H / a)


# --------------------------------------------------------------------------------------
# Electrostatic moment solution
# --------------------------------------------------------------------------------------


def _dot3(a, b):
    """Sum over the last axis (length 3) of a * b, added left to right as ``np.sum`` does, without its slow short reduction."""
    return (a[..., 0] * b[..., 0] + a[..., 1] * b[..., 1]) + a[..., 2] * b[..., 2]


def segment_potential_integral(point, seg_start, seg_end, radius):
    """Exact integral of 1/R over a straight segment (reduced thin-wire kernel).

    Parameters
    ----------
    point : array_like, shape (..., 3)
        Observation points. [m]
    seg_start, seg_end : array_like, shape (..., 3)
        Segment end points, broadcast against ``point``. [m]
    radius : array_like
        Source wire radius, broadcast likewise. [m]

    Returns
    -------
    ndarray
        integral_0^L ds / sqrt(|p - x(s)|^2 + a^2). [1]
        Multiply by lambda / (4 pi eps0) for the potential of a uniform line
        charge lambda.

    Notes
    -----
    With z the coordinate of p along the segment from its start and rho^2 the
    squared distance from the axis (|w x u|^2, w = p - start, u the unit direction: no cancellation for a
    point on or near the axis) plus a^2::

        I = ln{[(L - z) + R2] / [R1 - z]},  R1 = sqrt(z^2 + rho^2),  R2 = sqrt((L - z)^2 + rho^2)

    evaluated with z folded into z <= L/2 (the integral is symmetric about the
    segment's centre) and R1 - z = rho^2 / (R1 + z) when z > 0, so there is no
    cancellation near or far from the segment.

    References
    ----------
    R. F. Harrington, *Field Computation by Moment Methods*, 1968, ch. 2.
    (from memory)

    Examples
    --------
    >>> v = segment_potential_integral([0, 0, 0], [0, 0, -0.5], [0, 0, 0.5], 1e-3)
    >>> bool(abs(v - 2 * np.arcsinh(0.5 / 1e-3)) < 1e-9)
    True
    """
    p = np.asarray(point, dtype=float)
    a0 = np.asarray(seg_start, dtype=float)
    d = np.asarray(seg_end, dtype=float) - a0
    L = np.sqrt(_dot3(d, d))
    u = d / L[..., None]
    w = p - a0
    z = _dot3(w, u)
    r2 = np.asarray(radius, dtype=float) ** 2
    across = np.cross(w, u)
    rho2 = _dot3(across, across) + r2
    z = np.where(z > 0.5 * L, L - z, z)
    r1 = np.sqrt(z * z + rho2)
    r2_ = np.sqrt((L - z) ** 2 + rho2)
    num = (L - z) + r2_
    den = np.where(z > 0, rho2 / (r1 + np.abs(z)), r1 - z)
    return np.log(num / den)


#: Largest (rows × knots) block the potential fill works on at once, in five planes of
#: :func:`aerial.core.arrays.scratch_planes`: a few such planes stay in the processor's cache. [1]
FILL_BLOCK_ELEMENTS = 1 << 16
_fill_scratch = threading.local()


#: Largest system (unknowns + 1, squared) whose matrix is filled in a per-thread buffer kept for the next
#: solve instead of a new array: a report solves a dozen wire sets of a few hundred unknowns. [1]
SYSTEM_BUFFER_ELEMENTS = 1 << 19


def _system_matrix(rows: int, cols: int):
    """An uninitialised (rows, cols) array in column order for a system matrix: a view of a per-thread buffer
    when small.

    The matrix is only read by the solve that follows (``numpy.linalg.solve`` works on a copy, in LAPACK's
    column order: a column-ordered matrix is copied a column at a time), so the next solve may fill the same
    memory. The fill (:func:`_potential_fill`) writes a piece's column at a time too.
    """
    if rows * cols > SYSTEM_BUFFER_ELEMENTS:
        return np.empty((rows, cols), order="F")
    buf = getattr(_fill_scratch, "system", None)
    if buf is None:
        buf = _fill_scratch.system = np.empty(SYSTEM_BUFFER_ELEMENTS)
    return buf[:rows * cols].reshape(cols, rows).T


def _knots(length, counts):
    """Knots of segments cut into ``counts`` equal pieces each: (segment of each knot, its distance along the
    segment [m], the columns of the pieces among the differences of consecutive knots)."""
    counts = np.asarray(counts, dtype=np.int64)
    seg = np.repeat(np.arange(len(counts)), counts + 1)
    first = np.concatenate([[0], np.cumsum(counts + 1)[:-1]])
    k = np.arange(seg.size) - first[seg]
    return seg, length[seg] * (k / counts[seg]), np.flatnonzero(seg[1:] == seg[:-1])


def _reflections(start, u, image: bool, wall):
    """The source lines and their images as (start [m], unit direction, charge sign): the segments, their
    images in the ground plane z = 0 (``image``), in a grounded vertical plane (``wall``: a point on it and
    its horizontal unit normal) and, with both, the ground images of the wall images."""
    flip = np.array([1.0, 1.0, -1.0])
    sets = [(start, u, 1.0)]
    if image:
        sets.append((start * flip, u * flip, -1.0))
    if wall is not None:
        p0, n = (np.asarray(v, dtype=float) for v in wall)
        m = np.eye(3) - 2.0 * np.outer(n, n)
        shifted = start @ m + 2.0 * float(np.dot(p0, n)) * n
        sets.append((shifted, u @ m, -1.0))
        if image:
            sets.append((shifted * flip, (u @ m) * flip, 1.0))
    return sets


def _axis_offsets(points, start, u, r2):
    """Each point's coordinate along each line from its start [m] and 1 / rho [1/m], rho^2 the squared
    distance from the line (from the cross product: no cancellation on or near the line) plus ``r2``:
    (lines, points) arrays (a line's row runs over the points: the long axis in numpy's inner loop)."""
    wx, wy, wz = (np.ascontiguousarray(points[:, k]) - start[:, k, None] for k in range(3))
    ux, uy, uz = u[:, 0, None], u[:, 1, None], u[:, 2, None]
    # in place, the same operations in the same order as (wx ux + wy uy) + wz uz and |w x u|^2 + r2
    along, part = wx * ux, wy * uy
    along += part
    along += np.multiply(wz, uz, out=part)
    cx, cy, cz = wy * uz, wz * ux, wx * uy
    cx -= np.multiply(wz, uy, out=part)
    cy -= np.multiply(wx, uz, out=part)
    cz -= np.multiply(wy, ux, out=part)
    cx *= cx
    cy *= cy
    cx += cy
    cz *= cz
    cx += cz
    cx += np.reshape(r2, (-1, 1))
    np.sqrt(cx, out=cx)
    return along, np.divide(1.0, cx, out=cx)


def _potential_fill(points, seg_start, seg_end, counts, radius, image: bool = False, wall=None, out=None):
    """The potential integral of every piece of every segment, and of its images, at every point.

    Each segment is cut into ``counts`` equal pieces (in order along it, the pieces of one segment after
    those of the one before); the result is the (points, pieces) matrix D - G - W + WG of
    :func:`segment_potential_integral` terms: D of the pieces themselves, G of their images in the ground
    (``image``), W of their images in a grounded vertical plane (``wall``: a point on it and its horizontal
    unit normal) and WG of the ground images of those (exact for two perpendicular planes). ``radius`` is
    per segment; ``out``: a (points, pieces) array (or view) to fill instead of a new one.

    Notes
    -----
    Along a straight line the integral of 1/sqrt((t - z)^2 + rho^2) has the antiderivative
    asinh((t - z) / rho), z the point's coordinate along the line and rho^2 its squared distance from it
    plus a^2, so a piece's integral is the difference of asinh at its two ends, and the pieces of a segment
    share their ends: one asinh per knot instead of two square roots and a logarithm per piece. z and rho
    are worked out once per point and segment, rho from the cross product |w x u| (no cancellation for a
    point on or near the wire's own line, however far along it). The images' asinh are added to the pieces'
    own at every knot (with their signs) before the differences are taken, so one difference per piece
    serves every image. Rounding: asinh (:func:`_asinh`) is within a few ulp of its value (at most
    ln(2 L / a) ~ 12 here), so each term is within ~1e-15 absolute of the exact integral, 1e-11 relative for
    the smallest terms of a report's wire sets (tests/models/test_capacitance.py).

    References
    ----------
    Harrington, 1968, ch. 2 (module reference [3]); the antiderivative of 1/sqrt(x^2 + a^2) is a standard
    integral. (from memory)
    """
    p = np.asarray(points, dtype=float)
    start = np.asarray(seg_start, dtype=float)
    d = np.asarray(seg_end, dtype=float) - start
    length = np.sqrt(_dot3(d, d))
    seg, t, pieces = _knots(length, counts)
    r2 = np.asarray(radius, dtype=float) ** 2
    # each point's coordinate along each line and 1 / rho (small: segments × points), for every set of lines
    # at once (the sets stacked), then taken apart by set
    sets = _reflections(start, d / length[:, None], image, wall)
    along, inv_rho = _axis_offsets(p, np.concatenate([v[0] for v in sets]), np.concatenate([v[1] for v in sets]),
                                   np.tile(r2, len(sets)))
    n_seg = len(start)
    lines = [((along[k * n_seg:(k + 1) * n_seg], inv_rho[k * n_seg:(k + 1) * n_seg]), v[2])
             for k, v in enumerate(sets)]
    rows, cols, knots = len(p), len(pieces), len(seg)
    out = np.empty((rows, cols)) if out is None else out
    step = max(1, FILL_BLOCK_ELEMENTS // max(knots, 1))
    step = -(-rows // -(-rows // step))  # blocks of even size
    t = t[:, None]
    # the planes run (knots, points): a segment's z and 1 / rho taken for its knots are whole rows, gathered
    # straight into the scratch planes (no temporary arrays)
    for r0 in range(0, rows, step):
        r1 = min(rows, r0 + step)
        total, x, root, f, t_plane = scratch_planes(knots, r1 - r0, 5)
        np.copyto(t_plane, t)  # spread once here for every line set (a broadcast column costs numpy a copy per use)
        for k, ((along, inv_rho), sign) in enumerate(lines):
            np.take(along[:, r0:r1], seg, axis=0, out=x, mode="clip")  # (in range: no clipping)
            np.subtract(t_plane, x, out=x)
            x *= np.take(inv_rho[:, r0:r1], seg, axis=0, out=root, mode="clip")  # (t - z) / rho at every knot
            _asinh(x, root, total if k == 0 else f)
            if k == 0:
                continue
            if sign > 0:
                total += f
            else:
                total -= f
        np.subtract(total[1:], total[:-1], out=x[:-1])  # each piece: the sum's change along it
        # the pieces' rows (in range: no clipping), gathered into a contiguous plane and copied into place (numpy
        # gathers into a strided ``out`` through a temporary array of its own)
        np.take(x, pieces, axis=0, out=f[:cols], mode="clip")
        np.copyto(out[r0:r1].T, f[:cols])
    return out


def _asinh(x, root, out):
    """asinh(x) into ``out`` as sgn(x) ln(|x| + sqrt(x^2 + 1)) (``root`` a scratch array of x's shape; all
    three contiguous float64).

    Within a few ulp of 1 absolute of asinh for small |x| and a few ulp relative for large |x|: the
    accuracy the fill's differences of asinh need, at about half the cost of ``numpy.arcsinh``. [1]
    (dimensionless). |x| up to about 1e150 (x^2 must not overflow); the fill's x, a length along a
    wire over at least a wire radius, stays far below.

    References
    ----------
    Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, eq. 4.6.20 (asinh x = ln(x + sqrt(x^2 + 1)));
    from memory. Checked against ``numpy.arcsinh`` in tests/models/test_capacitance.py.
    """
    np.multiply(x, x, out=root)
    root += 1.0
    np.sqrt(root, out=root)
    np.abs(x, out=out)
    out += root
    np.log(out, out=out)
    # copysign(out, x): the logarithm of a number >= 1 is >= +0, so x's sign bit set on it is the same value
    # (two integer passes numpy vectorises, where its copysign goes element by element)
    sign = root.view(np.int64)
    np.bitwise_and(x.view(np.int64), _SIGN_BIT, out=sign)
    np.bitwise_or(out.view(np.int64), sign, out=out.view(np.int64))


#: The sign bit of a float64, as the int64 of the same bits.
_SIGN_BIT = np.int64(-0x8000000000000000)


class ElectrostaticSolution(NamedTuple):
    """Result of :func:`electrostatic_solution`.

    Attributes
    ----------
    capacitance_f : float
        Charge on the aerial per volt between aerial and earth (or, with a
        floating counterpoise, between aerial and counterpoise). [F]
    effective_height_m : float
        Sum over all real charges of q z, divided by the aerial charge. [m]
    charge_c : ndarray, shape (M,)
        Charge on each sub-segment at 1 V. [C]
    start, end : ndarray, shape (M, 3)
        Sub-segment end points. [m]
    grounded : ndarray of bool, shape (M,)
        True for earth-lead sub-segments.
    parent : ndarray of int, shape (M,)
        Index of the segment each sub-segment was cut from.
    n_unknowns : int
        Number of sub-segments (unknown charges).
    relative_change : float
        |C(M) - C(about M/2)| / C(M): the change from a half-density subdivision.
    converged : bool
        ``relative_change`` below ``tolerance``.
    tolerance : float
        The tolerance the convergence was judged against.
    """

    capacitance_f: float
    effective_height_m: float
    charge_c: np.ndarray
    start: np.ndarray
    end: np.ndarray
    grounded: np.ndarray
    parent: np.ndarray
    n_unknowns: int
    relative_change: float
    converged: bool
    tolerance: float


def _subdivide(seg_start, seg_end, counts):
    """Segments cut into ``counts`` equal pieces each: (piece starts, piece ends, segment of each piece)."""
    idx = np.repeat(np.arange(len(counts)), counts)
    first = np.concatenate([[0], np.cumsum(counts)[:-1]])
    k = np.arange(idx.size) - np.repeat(first, counts)
    c = counts[idx].astype(float)
    t0 = (k / c)[:, None]
    t1 = ((k + 1) / c)[:, None]
    d = seg_end[idx] - seg_start[idx]
    return seg_start[idx] + t0 * d, seg_start[idx] + t1 * d, idx


#: Solutions kept for reuse (a report solves some wire sets more than once: the headline, the
#: building's figures and the what-if base share them); each entry holds some tens of kB.
_SOLVE_CACHE_SIZE = 64
_solve_cache: dict = {}


def _solve(seg_start, seg_end, radius, grounded, counts, image, floating=False, wall=None):
    """Charges for 1 V on the aerial, the segments cut into ``counts`` pieces each.

    Returns (charge of each piece [C], piece starts, piece ends [m], segment of each piece, piece midpoints
    [m], counterpoise potential [V]). ``radius`` and ``grounded`` are per segment.

    With ``floating`` the earth side (``grounded``) is a counterpoise insulated
    from the ground: its potential is an unknown and the aerial and counterpoise
    together carry no net charge (the source only moves charge between them).
    The same wire set solved again (the same numbers bit for bit) is taken from
    a small cache.
    """
    arrays = [np.ascontiguousarray(v, dtype=float) for v in (seg_start, seg_end, radius)]
    arrays.append(np.ascontiguousarray(grounded, dtype=bool))
    arrays.append(np.ascontiguousarray(counts, dtype=np.int64))
    wall_key = None if wall is None else tuple(np.asarray(v, dtype=float).tobytes() for v in wall)
    key = (tuple((v.shape, v.tobytes()) for v in arrays), bool(image), bool(floating), wall_key)
    hit = _solve_cache.pop(key, None)
    if hit is None:
        hit = _solve_uncached(*arrays, image, floating, wall)
        if len(_solve_cache) >= _SOLVE_CACHE_SIZE:
            _solve_cache.pop(next(iter(_solve_cache)))  # the least recently used
    _solve_cache[key] = hit
    return tuple(v.copy() if isinstance(v, np.ndarray) else v for v in hit)


def _singular_words(mid) -> str:
    """Why the potential matrix has no inverse, in the wire's own words: two pieces on one spot."""
    d = np.linalg.norm(mid[:, None, :] - mid[None, :, :], axis=2)
    np.fill_diagonal(d, np.inf)
    i, _ = np.unravel_index(int(np.argmin(d)), d.shape)
    x, y, z = mid[i]
    return (f"two wire pieces lie on top of each other near ({x:.2f}, {y:.2f}, {z:.2f}) m (a wire doubling back "
            "along itself, or along another wire or its image in the ground or a facade); wires touching along "
            "their length are one conductor: draw them as one")


def _linear_solve(matrix, rhs, mid):
    """``numpy.linalg.solve`` that turns a singular or non-finite system into a ModelInputError."""
    with blas_threads(len(rhs)):
        try:
            sol = np.linalg.solve(matrix, rhs)
        except np.linalg.LinAlgError:
            sol = None
    if sol is None or not np.all(np.isfinite(sol)):
        raise ModelInputError(_singular_words(mid))
    return sol


#: Pieces whose midpoints round to the same point on this grid are on top of each other. [m]
COINCIDENT_M = 1e-9


def _coincident(mid) -> bool:
    """Whether two pieces share a midpoint (to ``COINCIDENT_M``): their rows of the system are the same, so it
    has no solution, whatever the rounding of the factorisation makes of it."""
    grid = np.round(mid / COINCIDENT_M)
    order = np.lexsort(grid.T)
    return bool(np.any(np.all(grid[order[1:]] == grid[order[:-1]], axis=1)))


def _solve_uncached(seg_start, seg_end, radius, grounded, counts, image, floating=False, wall=None):
    start, end, parent = _subdivide(seg_start, seg_end, counts)
    mid = 0.5 * (start + end)
    if _coincident(mid):
        raise ModelInputError(_singular_words(mid))
    lengths = np.linalg.norm(end - start, axis=1)
    # unknowns: line charge density lambda_j; potential = lambda_j * I_ij / (4 pi eps0)
    rhs = np.where(grounded[parent], 0.0, 1.0)
    n = len(rhs)
    if not floating:
        pot = _potential_fill(mid, seg_start, seg_end, counts, radius, image, wall, out=_system_matrix(n, n))
        lam = _linear_solve(pot, rhs, mid) * _FOUR_PI_EPS0
        return lam * lengths, start, end, parent, mid, 0.0
    system = _system_matrix(n + 1, n + 1)
    _potential_fill(mid, seg_start, seg_end, counts, radius, image, wall, out=system[:n, :n])
    system[:n, n] = -grounded[parent].astype(float)  # counterpoise rows: potential - V_c = 0
    system[n, n] = 0.0
    system[n, :n] = lengths  # no net charge on aerial + counterpoise
    sol = _linear_solve(system, np.append(rhs, 0.0), mid)
    return sol[:n] * _FOUR_PI_EPS0 * lengths, start, end, parent, mid, float(sol[n])


def _subdivision_counts(segments, target, min_subsegments, max_subsegment_fraction, min_length_to_radius):
    """Sub-segments per segment for about ``target`` unknowns within the length limits."""
    lengths = segments.length
    n = np.ceil(lengths / (float(np.sum(lengths)) / target)).astype(int)
    n = np.maximum(n, int(min_subsegments))
    n = np.maximum(n, int(np.ceil(1.0 / max_subsegment_fraction - 1e-9)))
    n_max = np.maximum(np.floor(lengths / (min_length_to_radius * segments.radius)).astype(int), 1)
    return np.minimum(n, n_max)


def _check_options(segments, target_unknowns, min_subsegments, max_subsegment_fraction, min_length_to_radius,
                   tolerance, ground_plane):
    """Raise ModelInputError for an empty set or an option out of its range."""
    if len(segments) == 0:
        raise ModelInputError("no segments to solve")
    if not np.any(segments.aerial):
        raise ModelInputError("the segment set has no aerial (ungrounded) segment")
    for name, v in (("target_unknowns", target_unknowns), ("min_subsegments", min_subsegments)):
        if int(v) < 1:
            raise ModelInputError(f"{name} must be at least 1; got {v!r}")
    if not (0 < max_subsegment_fraction <= 1):
        raise ModelInputError(f"max_subsegment_fraction must lie in (0, 1]; got {max_subsegment_fraction!r}")
    if not (min_length_to_radius > 0):
        raise ModelInputError(f"min_length_to_radius must be positive; got {min_length_to_radius!r}")
    if not (0 < tolerance < 1):
        raise ModelInputError(f"tolerance must lie in (0, 1); got {tolerance!r}")
    if np.any(segments.length <= 0):
        raise ModelInputError("every segment must have a positive length")
    if ground_plane and np.any(np.minimum(segments.start[:, 2], segments.end[:, 2]) < 0):
        raise ModelInputError("segments must lie on or above the ground plane z = 0")


def _earth_touches(segments, wall) -> bool:
    """True when an earth-side segment reaches the ground plane (or the grounded wall, when there is one)."""
    low = np.minimum(segments.start[:, 2], segments.end[:, 2])
    touch = low <= GROUND_CONTACT_M
    if wall is not None:
        p0, n = (np.asarray(v, dtype=float) for v in wall)
        near = np.minimum((segments.start - p0) @ n, (segments.end - p0) @ n)
        touch = touch | (near <= WALL_CONTACT_M)
    return bool(np.any(segments.grounded & touch))


def electrostatic_solution(
    segments: Segments,
    *,
    target_unknowns: int = DEFAULT_TARGET_UNKNOWNS,
    min_subsegments: int = DEFAULT_MIN_SUBSEGMENTS,
    max_subsegment_fraction: float = DEFAULT_MAX_SUBSEGMENT_FRACTION,
    min_length_to_radius: float = DEFAULT_MIN_LENGTH_TO_RADIUS,
    max_unknowns: int = DEFAULT_MAX_UNKNOWNS,
    tolerance: float = DEFAULT_RELATIVE_TOLERANCE,
    ground_plane: bool = True,
    wall=None,
    convergence_check: bool = True,
) -> ElectrostaticSolution:
    """Capacitance and static effective height of any thin-wire set by the moment method.

    Parameters
    ----------
    segments : Segments
        The aerial (``grounded`` False, held at 1 V) and earth lead
        (``grounded`` True, held at 0 V). Frame: m, z up, ground at z = 0.
    target_unknowns : int, optional
        Number of sub-segments aimed for over the whole set. [1]
    min_subsegments : int, optional
        Fewest sub-segments per segment. [1]
    max_subsegment_fraction : float, optional
        Longest sub-segment as a fraction of its segment. [1]
    min_length_to_radius : float, optional
        Shortest sub-segment in wire radii (thin-wire validity). [1]
    max_unknowns : int, optional
        Refuse subdivisions larger than this (memory bound). [1]
    tolerance : float, optional
        Relative change of C against a half-density subdivision below which
        the result is reported converged. [1]
    ground_plane : bool, optional
        Include the images in the perfect ground plane z = 0 (default). Without
        it the wire set is isolated in free space (used for checks against
        isolated-wire formulas).
    wall : tuple of (array_like, array_like), optional
        A grounded vertical plane (a building's facade taken as a perfect
        conductor): a point on it [m] and its horizontal unit normal pointing
        to the side the wires are on [1]. Its images (and, with the ground
        plane, the images of those) join the fill; every segment must lie in
        front of it.
    convergence_check : bool, optional
        Solve the half-density subdivision too (default). False, for a
        caller that never reads the convergence report, skips that solve:
        ``relative_change`` is then NaN and ``converged`` False (not checked);
        the capacitance, effective height and charges are the same.

    Returns
    -------
    ElectrostaticSolution
        Capacitance, effective height, charges and a convergence report.

    Notes
    -----
    Each segment is cut into sub-segments (about ``target_unknowns`` in all,
    at least ``min_subsegments`` and at most ``max_subsegment_fraction`` of
    the segment each, none shorter than ``min_length_to_radius`` radii) each
    carrying a uniform line charge (pulse basis). The potential is matched at
    sub-segment centres on the wire axis with the reduced kernel
    1/sqrt(R^2 + a^2), integrated exactly over every source segment and its
    image (:func:`segment_potential_integral`; no point-charge approximation
    anywhere; the pieces of a segment share the antiderivative at their ends,
    :func:`_potential_fill`)::

        sum_j lambda_j [I(p_i; seg_j) - I(p_i; image of seg_j)] / (4 pi eps0) = V_i,

    V_i = 1 V on the aerial, 0 on the earth lead. Then C = sum over the aerial
    of q, and h_e = sum over every real charge (aerial and earth lead) of q z,
    divided by the aerial charge.

    Why that h_e is the open-circuit voltage per unit vertical field (Green's
    reciprocity): state 1 is this solution, potentials phi1 = 1 on the aerial
    and 0 on the earth lead and ground, charges q1. State 2 is reception: a
    uniform vertical field E0 (external potential -E0 z, zero on the ground),
    the aerial open-circuit (net charge 0, potential V) and the earth lead at
    0; induced charges q2. Reciprocity between the two sets of conductor
    charges, sum q1 phi_ind2 = sum q2 phi1, with phi_ind2 = phi2 - (-E0 z):
    the right side is Q2_aerial * 1 = 0; the left side is
    V Q1_aerial + E0 sum_(aerial + lead) q1 z (the ground's charges sit at
    z = 0). Hence |V| = E0 sum q1 z / Q1_aerial. In the short limit the same
    quantity is (1/I0) integral I dz, because the current at a point is
    j omega times the charge beyond it.

    A counterpoise (an earth side that never reaches the ground plane) floats:
    its potential V_c is one more unknown, closed by the condition that the
    aerial and the counterpoise together carry no net charge (the receiver
    only moves charge between them). Then C = Q_aerial / (1 - V_c), and the
    same reciprocity argument, with both conductors open in state 2, gives the
    open-circuit voltage between aerial and counterpoise as
    E0 sum_(aerial + counterpoise) q1 z / Q1_aerial.

    The pulse-basis solution converges from below in C with subdivision; the
    result reports the change against a half-density subdivision.

    References
    ----------
    .. [1] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
       1968, ch. 2 (from memory).
    .. [2] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., 1999, problem
       1.12 (Green's reciprocation theorem) (from memory).

    Examples
    --------
    >>> from aerial.models.segments import polyline_segments
    >>> s = polyline_segments([[0, 0, 0.02], [0, 0, 10]], 1e-3)
    >>> sol = electrostatic_solution(s)
    >>> round(sol.capacitance_f * 1e12, 0), round(sol.effective_height_m, 1)
    (68.0, 4.9)
    """
    _check_options(segments, target_unknowns, min_subsegments, max_subsegment_fraction, min_length_to_radius,
                   tolerance, ground_plane)
    if wall is not None:
        p0, n = (np.asarray(v, dtype=float) for v in wall)
        ends = np.concatenate([segments.start, segments.end]) - p0
        if np.any(ends @ n < -1e-6):
            raise ModelInputError("every segment must lie in front of the wall plane (on the side its normal points to)")
    counts = _subdivision_counts(segments, int(target_unknowns), min_subsegments, max_subsegment_fraction,
                                 min_length_to_radius)
    if int(np.sum(counts)) > max_unknowns:
        raise ModelInputError(
            f"the subdivision needs {int(np.sum(counts))} unknowns, above max_unknowns = {max_unknowns}; "
            "raise max_unknowns or merge short segments"
        )
    # an earth side that never reaches the ground plane is a counterpoise: it floats
    floating = bool(np.any(segments.grounded)) and not _earth_touches(segments, wall)
    q, start, end, parent, mid, v_cp = _solve(segments.start, segments.end, segments.radius, segments.grounded,
                                              counts, ground_plane, floating, wall)
    gnd = segments.grounded[parent]
    aerial_q = float(np.sum(q[~gnd]))
    h_e = float(np.sum(q * mid[:, 2]) / aerial_q)
    capacitance = aerial_q / (1.0 - v_cp)

    # half-density check
    coarse = np.maximum((counts + 1) // 2, 1)
    if not convergence_check:
        rel = float("nan")
    elif np.array_equal(coarse, counts):
        rel = 0.0
    else:
        q2, _, _, p2, _, v2 = _solve(segments.start, segments.end, segments.radius, segments.grounded, coarse,
                                     ground_plane, floating, wall)
        c2 = float(np.sum(q2[~segments.grounded[p2]])) / (1.0 - v2)
        rel = abs(capacitance - c2) / abs(capacitance)
    return ElectrostaticSolution(
        capacitance_f=capacitance,
        effective_height_m=h_e,
        charge_c=q,
        start=start,
        end=end,
        grounded=gnd,
        parent=parent,
        n_unknowns=int(q.size),
        relative_change=float(rel),
        converged=bool(rel < tolerance),
        tolerance=float(tolerance),
    )
