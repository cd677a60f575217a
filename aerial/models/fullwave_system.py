"""Impedance matrices, band tables and the linear solves of the full-wave solver.

Everything here belongs to one discretisation (:class:`System`) and does not
depend on frequency until asked: the topology, quadrature, near-pair
corrections, loss-matrix pattern, loop-tree basis.

Band sweeps (perfect ground): the kernel exp(-jkR)/R is expanded in a Taylor
series in k about the centre of each sub-band, so the impedance matrix becomes
a matrix polynomial Z(k) = (j eta / k) sum_j Y_j x^j, x = (k - k0)/h. The Y_j
cost one pass over the quadrature points (one exponential per point pair);
each frequency then costs a Horner evaluation (a few array operations of size
N^2) instead of a fill. This is the expansion used by asymptotic waveform
evaluation for the method of moments ([1]_); the order is chosen from the
remainder bound (h R_max)^(n+1)/(n+1)! and the table is checked against a
direct fill at the sub-band edge. Newman's interpolation of the phase-removed
matrix ([2]_) was tried first; it needs two N^2 complex exponentials per
frequency, which cost more than the LU factorisation at N = 200.

References
----------
.. [1] C. J. Reddy, M. D. Deshpande, C. R. Cockrell and F. B. Beck, "Fast RCS
   computation over a frequency band using method of moments in conjunction
   with asymptotic waveform evaluation technique", IEEE Trans. Antennas
   Propag. 46(8), 1229-1233, 1998. (from memory)
.. [2] E. H. Newman, "Generation of wide-band data from the method of
   moments by interpolating the impedance matrix", IEEE Trans. Antennas
   Propag. 36(12), 1820-1824, 1988. (from memory)
.. [3] J. R. Mautz and R. F. Harrington, "An E-field solution for a
   conducting surface small or comparable to the wavelength", IEEE Trans.
   Antennas Propag. 32(4), 330-339, 1984 (loop-tree decomposition). (from memory)
"""

from __future__ import annotations

import math

import numpy as np
import scipy.linalg as sla
import scipy.sparse as sp
from aerial.core.constants import SPEED_OF_LIGHT as C0

from aerial.core.threads import blas_threads
from aerial.models.fullwave_fields import ETA0, complex_permittivity, fresnel_reflection
from aerial.models.fullwave_geometry import Topology, build_topology
from aerial.models.fullwave_halfspace import remainder_matrices
from aerial.models.fullwave_kernel import Filler
from aerial.models.sommerfeld import sommerfeld_table

from aerial.models.conductor import internal_impedance_per_m

#: Highest Taylor order of a band table before the band is split. [1]
MAX_SERIES_ORDER = 16
#: Relative change of the input impedance between the band table and a direct
#: fill above which the table's order is raised. [1]
SERIES_CHECK_TOLERANCE = 1e-7


def wire_impedance_per_m(radius, frequency, resistivity, relative_permeability):
    """Internal (skin-effect) impedance per metre; zero resistivity is a perfect conductor.

    Parameters
    ----------
    radius : ndarray
        Wire radius. [m]
    frequency : float
        Frequency. [Hz]
    resistivity : ndarray
        Conductor resistivity, 0 for a perfect conductor. [ohm m]
    relative_permeability : ndarray
        Relative permeability of the conductor. [1]

    Returns
    -------
    ndarray of complex
        Z' = R' + j X'. [ohm/m]

    Notes
    -----
    Uses :func:`aerial.models.conductor.internal_impedance_per_m` (the exact
    Bessel form of Ramo, Whinnery and Van Duzer).
    """
    radius, frequency, resistivity, mur = np.broadcast_arrays(radius, frequency, resistivity, relative_permeability)
    out = np.zeros(radius.shape, dtype=complex)
    ok = resistivity > 0
    if np.any(ok):
        out[ok] = np.asarray(internal_impedance_per_m(radius[ok], frequency[ok], resistivity[ok], mur[ok]), dtype=complex)
    return out


def matrix_norm1(z, upper_blocks=None):
    """Largest row sum of |z_ij|: the infinity norm of z, the 1-norm of z^T (and of a symmetric z). [as z]

    Parameters
    ----------
    z : ndarray, shape (N, N)
        The matrix, C order.
    upper_blocks : sequence of int, optional
        Row-block edges 0 = e_0 < ... = N of a symmetric z held only as the
        rectangles z[e_b:e_(b+1), e_b:] (:meth:`SeriesTable.matrix`); nothing
        below them is read. Row i's sum is then its part in its own
        rectangle plus column i of the rectangles above it.

    Returns
    -------
    float
        inf or nan when an entry read is not finite.

    Examples
    --------
    >>> full = np.array([[1.0, -2.0, 0.5], [-2.0, 4.0, 1.0], [0.5, 1.0, -3.0]])
    >>> held = full.copy(); held[1:, 0] = np.nan   # below the first block's rectangle: never read
    >>> matrix_norm1(held, [0, 1, 3]), matrix_norm1(full)
    (7.0, 7.0)
    """
    n = z.shape[0]
    if upper_blocks is None:
        step = max(1, 2**21 // max(n, 1))
        return max((float(np.abs(z[r0 : r0 + step]).sum(axis=1).max()) for r0 in range(0, n, step)), default=0.0)
    sums = np.zeros(n)
    for a, b in zip(upper_blocks[:-1], upper_blocks[1:]):
        mag = np.abs(z[a:b, a:])
        sums[a:b] += mag.sum(axis=1)
        sums[b:] += mag[:, b - a :].sum(axis=0)
    return float(sums.max(initial=0.0)) if np.all(np.isfinite(sums)) else float("nan")


def solve_matrix(z, rhs, symmetric=True, anorm=None):
    """Solve z x = rhs in place (z is overwritten); return x and a condition estimate.

    A complex symmetric z (z^T = z, not Hermitian: the Galerkin matrix of a
    reciprocal kernel, over a perfect ground or with the reflection
    coefficients) is factored as z = L D L^T with Bunch-Kaufman pivoting
    (LAPACK sytrf, sytrs, sycon: [4]_), half the arithmetic of an LU
    factorisation; the factorisation then reads z's upper triangle only, so
    a z symmetric in exact arithmetic but not to the last bit (the loop-tree
    matrix U^T Z U) is taken as its upper triangle mirrored. Any other z
    (the half-space's Sommerfeld remainder is symmetric only to its table's
    accuracy) is factored as P L U (getrf, getrs, gecon). The transpose of
    the C-ordered z is passed (a Fortran-ordered view, no copy) and the
    transposed system solved. The condition number is the LAPACK 1-norm
    estimate of z^T (the infinity-norm one of z). The LAPACK routines are
    called directly: the same computation as ``scipy.linalg.lu_factor`` /
    ``lu_solve`` or ``ldl``, without their checks of the arguments, which
    cost a third of a factorisation at N = 200.

    Parameters
    ----------
    z : ndarray of complex, shape (N, N)
        The matrix, C order; overwritten. [ohm]
    rhs : ndarray, shape (N,)
        Right-hand side. [V]
    symmetric : bool
        z is symmetric.
    anorm : float, optional
        :func:`matrix_norm1` of z, when the caller has it (or z is held
        as its upper row blocks).

    Returns
    -------
    x : ndarray of complex, shape (N,)
        The solution. [A]
    cond : float
        Estimated condition number, inf where the factorisation met an
        exactly singular pivot. [1]

    References
    ----------
    .. [4] J. R. Bunch and L. Kaufman, "Some stable methods for calculating
       inertia and solving symmetric linear systems", Math. Comp. 31(137),
       163-179, 1977; E. Anderson et al., *LAPACK Users' Guide*, 3rd ed.,
       SIAM, 1999 (xSYTRF, xSYTRS, xSYCON, xGETRF). (from memory)

    Examples
    --------
    >>> z = np.array([[2.0 + 1j, 1.0], [1.0, 3.0]])
    >>> x, cond = solve_matrix(z.copy(), np.array([1.0, 0.0]))
    >>> bool(np.allclose(z @ x, [1.0, 0.0]))
    True
    """
    n = z.shape[0]
    if anorm is None:
        anorm = matrix_norm1(z)
    rhs = np.asarray(rhs, dtype=complex)
    with blas_threads(n, threaded=True):
        if symmetric:
            sytrf, sytrs, sycon, lwork = sla.get_lapack_funcs(("sytrf", "sytrs", "sycon", "sytrf_lwork"), (z,))
            work, _ = lwork(n, lower=1)
            ldl, ipiv, info = sytrf(z.T, lower=1, lwork=max(1, int(work.real)), overwrite_a=True)
            _check_info(info)
            x, _ = sytrs(ldl, ipiv, rhs, lower=1)
            rcond, _ = sycon(ldl, ipiv, anorm, lower=1)
        else:
            getrf, getrs, gecon = sla.get_lapack_funcs(("getrf", "getrs", "gecon"), (z,))
            lu, piv, info = getrf(z.T, overwrite_a=True)
            _check_info(info)
            x, _ = getrs(lu, piv, rhs, trans=1)
            rcond, _ = gecon(lu, anorm, norm="1")
    cond = 1.0 / rcond if (info == 0 and rcond > 0) else np.inf
    return x, cond


def _check_info(info):
    if info < 0:  # pragma: no cover - an argument LAPACK rejects is a bug here
        raise ValueError(f"illegal value in argument {-info} of the matrix factorisation")


def longest_kernel_distance(start, end, radius):
    """Longest reduced-kernel distance between two points of the wires or of a wire and an image. [m]

    Parameters
    ----------
    start, end : ndarray, shape (S, 3)
        Ends of the straight wires (z up, ground plane z = 0). [m]
    radius : float
        Largest wire radius. [m]

    Returns
    -------
    float
        R_max = sqrt(d_max^2 + a^2), d_max the largest distance between a
        point of one wire and a point of another wire or of any wire's image
        in z = 0. The distance between points of two straight wires is a
        convex function of the positions along them, so its largest value
        lies at wire ends: only the ends (and their images) are compared. [m]

    Notes
    -----
    This is the length in the Taylor remainder of the band tables: the
    kernel exp(-jkR)/R expanded about k0 has the remainder bound
    (h R)^(n+1)/(n+1)! relative to |exp(-jk0R)/R| for |k - k0| <= h, and
    the largest R over the source and image pairs is what the bound needs.

    Examples
    --------
    >>> round(longest_kernel_distance(np.array([[0.0, 0, 10]]), np.array([[30.0, 0, 10]]), 0.0), 3)
    36.056
    """
    pts = np.unique(np.vstack([start, end]), axis=0)
    both = np.vstack([pts, pts * [1.0, 1.0, -1.0]])
    d2 = 0.0
    step = max(1, 2**16 // max(len(both), 1))  # point pairs per chunk
    for a in range(0, len(pts), step):
        d2 = max(d2, float((np.square(pts[a : a + step, None, :] - both[None, :, :]).sum(axis=2)).max()))
    return math.sqrt(d2 + float(radius) ** 2)


class System:
    """One discretisation of a wire set over ground.

    Parameters
    ----------
    segments : Segments
        Checked wire set.
    counts : ndarray of int
        Pieces per segment.
    ground : str
        "perfect", "lossy" (the exact half-space by Sommerfeld integrals) or
        "reflection-coefficient" (the fast approximation).
    eps_soil, sigma_soil : float or None
        Soil relative permittivity [1] and conductivity [S/m] (lossy ground).
    n_gauss : int
        Gauss points per piece. [1]
    """

    def __init__(self, segments, counts, ground, eps_soil, sigma_soil, n_gauss):
        self.topo: Topology = build_topology(segments, counts)
        self.ground = ground
        #: The impedance matrix is symmetric to the last bit (the half-space's remainder tables are not).
        self.symmetric = ground != "lossy"
        self.eps_soil, self.sigma_soil = eps_soil, sigma_soil
        self.filler = Filler(self.topo, n_gauss=n_gauss)
        topo = self.topo
        # support centroids of the basis functions (reflection-coefficient angles)
        w = (abs(topo.t_end[0]) + abs(topo.t_end[1])).T.tocsr()  # (N, P)
        wl = w @ topo.length
        self.centroid = (w @ (topo.midpoint * topo.length[:, None])) / wl[:, None]
        pts = np.vstack([topo.start, topo.end])
        self.size = float(np.ptp(np.vstack([pts, pts * [1.0, 1.0, -1.0]]), axis=0).max())
        self.reach = longest_kernel_distance(segments.start, segments.end, topo.radius.max())
        self._static = None
        self._lt = None
        kinds = np.stack([topo.radius, topo.resistivity, topo.relative_permeability], axis=1)
        uniq, self._wire_of_piece = np.unique(kinds, axis=0, return_inverse=True)
        self._wire_of_piece = self._wire_of_piece.ravel()
        self._wire_kinds = (uniq[:, 0], uniq[:, 1], uniq[:, 2])
        self._electrode_at = np.flatnonzero(topo.electrode)
        self._loss_pattern()

    # ------------------------------------------------------------ losses
    def _loss_pattern(self):
        """Sparse map from per-piece impedances Z' L to entries of the loss matrix."""
        t0, t1 = (m.tocoo() for m in self.topo.t_end)
        rows, cols, piece, weight = [], [], [], []
        for ta, tb, mass in ((t0, t0, 1 / 3), (t0, t1, 1 / 6), (t1, t0, 1 / 6), (t1, t1, 1 / 3)):
            # every entry of ta with every entry of tb on the same piece
            order = np.argsort(tb.row, kind="stable")
            b_row = tb.row[order]
            lo = np.searchsorted(b_row, ta.row, side="left")
            hits = np.searchsorted(b_row, ta.row, side="right") - lo
            a_idx = np.repeat(np.arange(ta.nnz), hits)
            b_idx = order[np.repeat(lo - np.concatenate([[0], np.cumsum(hits)[:-1]]), hits) + np.arange(a_idx.size)]
            rows.append(ta.col[a_idx])
            cols.append(tb.col[b_idx])
            piece.append(ta.row[a_idx])
            weight.append(mass * ta.data[a_idx] * tb.data[b_idx])
        rows, cols, piece, weight = (np.concatenate(v) for v in (rows, cols, piece, weight))
        n = self.topo.n_unknowns
        flat = np.asarray(rows, dtype=np.int64) * n + np.asarray(cols, dtype=np.int64)
        uniq, inv = np.unique(flat, return_inverse=True)
        self._loss_index = (uniq // n, uniq % n)
        self._loss_map = sp.csr_matrix((weight, (inv.ravel(), piece)), shape=(len(uniq), self.topo.n_pieces))

    def piece_impedance(self, frequency):
        """Wire internal impedance Z' of every piece, shape (P,) or (P, F) for an array of frequencies. [ohm/m]"""
        r, rho, mur = self._wire_kinds
        f = np.asarray(frequency, dtype=float)
        if f.ndim == 0:
            return wire_impedance_per_m(r, float(f), rho, mur)[self._wire_of_piece]
        zk = wire_impedance_per_m(r[:, None], f[None, :], rho[:, None], mur[:, None])  # (kinds, F)
        return zk[self._wire_of_piece]

    def loss_entries(self, zi):
        """Values of the loss matrix at ``loss_index`` for Z' per piece, shape (nnz,) or (nnz, F). [ohm]"""
        zl = zi * (self.topo.length if zi.ndim == 1 else self.topo.length[:, None])
        return self._loss_map @ zl

    def add_losses(self, z, zi=None, entries=None):
        """Add the wire impedance (zi [ohm/m] per piece, or precomputed ``entries``) and the electrode resistance."""
        if entries is None:
            entries = self.loss_entries(zi)
        z[self._loss_index] += entries
        if self._electrode_at.size:
            z[self._electrode_at, self._electrode_at] += self.topo.electrode[self._electrode_at]
        return z

    def loss_matrix(self, zi):
        """The loss matrix alone (dense) for wire impedance zi per piece. [ohm]"""
        n = self.topo.n_unknowns
        return self.add_losses(np.zeros((n, n), dtype=complex), zi)

    # ------------------------------------------------------------ matrices
    def reflection(self, k):
        """Per basis pair (r_h, r_v) for the lossy ground, at the centroid specular angle."""
        f = k * C0 / (2 * np.pi)
        eps_c = complex_permittivity(f, self.eps_soil, self.sigma_soil)
        flip = np.array([1.0, 1.0, -1.0])
        dc = self.centroid
        r_image = np.linalg.norm(dc[:, None, :] - (dc * flip)[None, :, :], axis=2)
        zsum = dc[:, 2][:, None] + dc[:, 2][None, :]
        cos_t = np.clip(zsum / np.maximum(r_image, 1e-30), 0.0, 1.0)
        return fresnel_reflection(cos_t, eps_c)

    def matrix_direct(self, k):
        """Impedance matrix without losses at k by a direct fill. [ohm]"""
        if self.ground == "perfect":
            a, p = 1j * k * ETA0, ETA0 / (1j * k)
            (z,) = self.filler.fill(
                k, [{"A_direct": a, "A_image_h": -a, "A_image_v": a, "Phi_direct": p, "Phi_image": -p}]
            )
            return z
        a_part, phi_part = self.potential_parts(k)
        a_part *= 1j * k * ETA0
        a_part += (ETA0 / (1j * k)) * phi_part
        return a_part

    def potential_parts(self, k):
        """Vector- and scalar-potential matrices A and Phi (images included) at k. [m], [1/m]"""
        if self.ground == "perfect":
            a_part, phi_part = self.filler.fill(
                k, [{"A_direct": 1.0, "A_image_h": -1.0, "A_image_v": 1.0}, {"Phi_direct": 1.0, "Phi_image": -1.0}]
            )
            return a_part, phi_part
        ad, pd, ah, av, pi_ = self.filler.fill(
            k, [{"A_direct": 1.0}, {"Phi_direct": 1.0}, {"A_image_h": 1.0}, {"A_image_v": 1.0}, {"Phi_image": 1.0}]
        )
        if self.ground == "lossy":
            table = self.sommerfeld(k)
            kq = table.quasi_static_image
            a_extra, phi_extra = remainder_matrices(self.filler, table)
            ad += kq * av + a_extra
            pd += phi_extra - kq * pi_
            return ad, pd
        r_h, r_v = self.reflection(k)
        ad += r_h * ah + r_v * av
        pd -= r_v * pi_
        return ad, pd

    def sommerfeld(self, k):
        """The soil's Sommerfeld table at wavenumber k (built once per soil and frequency, then reused)."""
        f = k * C0 / (2 * np.pi)
        pts = np.vstack([self.topo.start, self.topo.end])
        reach = float(np.linalg.norm(np.ptp(np.vstack([pts, pts * [1.0, 1.0, -1.0]]), axis=0)))  # box diagonal
        return sommerfeld_table(f, self.eps_soil, self.sigma_soil, 1.05 * reach)

    def static_potential(self):
        """The k -> 0 scalar-potential matrix Phi (direct minus image), real. [1/m]"""
        if self._static is None:
            (phi,) = self.filler.fill(0.0, [{"Phi_direct": 1.0, "Phi_image": -1.0}])
            self._static = phi.real
        return self._static

    def loop_tree(self):
        """Orthonormal loop and tree bases of the current space: (U, number of loops).

        Loops (including loops closed through the ground) are the null space
        of the charge matrix: currents that deposit no charge anywhere.
        """
        if self._lt is None:
            d = self.topo.charge.toarray() * self.topo.length[:, None]
            with blas_threads(max(d.shape)):
                _, s, vt = np.linalg.svd(d, full_matrices=True)
            rank = int(np.count_nonzero(s > s.max() * 1e-10)) if s.size else 0
            u = np.vstack([vt[rank:], vt[:rank]]).T  # loops first
            self._lt = (u, vt.shape[0] - rank)
        return self._lt

    def feed_impedance(self, z, upper_blocks=None):
        """Input impedance V/I0 of a full matrix, or of one held as its upper row blocks (overwritten). [ohm]"""
        v = self.topo.feed_weight.astype(complex)
        cur, _ = solve_matrix(z, v, self.symmetric, matrix_norm1(z, upper_blocks))
        return 1.0 / (v @ cur)


class SeriesTable:
    """The impedance matrix of one sub-band as a polynomial in k (perfect ground).

    Parameters
    ----------
    system : System
        The discretisation.
    k_lo, k_hi : float
        Sub-band edges. [rad/m]
    order : int
        Taylor order of the kernel expansion. [1]
    """

    #: Row blocks the upper triangle is stored in. [1]
    ROW_BLOCKS = 8

    def __init__(self, system: System, k_lo, k_hi, order):
        self.k_lo, self.k_hi, self.order = k_lo, k_hi, order
        self.k0 = 0.5 * (k_lo + k_hi)
        self.h = max(0.5 * (k_hi - k_lo), 1e-300)
        self.n = n = system.topo.n_unknowns
        self.edges = upper_row_blocks(n, self.ROW_BLOCKS)
        self.blocks = system.filler.series_upper(self.k0, self.h, order, self.edges)

    def matrix(self, k):
        """Impedance matrix without losses at k, held as its upper row blocks. [ohm]

        Only the rectangles z[a:b, a:] for the row edges ``edges`` are
        written: the matrix is symmetric, and :func:`solve_matrix` and
        :func:`matrix_norm1` (given ``edges``) read no more.
        """
        x = (k - self.k0) / self.h
        # sum_j x^j Y_j on the upper row blocks (|x| <= 1, terms falling off)
        p = (1j * ETA0 / k) * x ** np.arange(self.order + 3)
        n, edges = self.n, self.edges
        z = np.empty((n, n), dtype=complex)
        for a, b, y in zip(edges[:-1], edges[1:], self.blocks):
            z[a:b, a:] = (p @ y).reshape(b - a, n - a)
        return z


def upper_row_blocks(n, blocks):
    """Row boundaries splitting the upper triangle of an n x n matrix into blocks of about equal size."""
    rows = np.arange(n + 1)
    held = rows * n - rows * (rows - 1) // 2  # elements on and above the diagonal in rows 0 .. i-1
    want = np.linspace(0, held[-1], max(1, min(blocks, n)) + 1)
    edges = np.unique(np.concatenate([[0], np.searchsorted(held, want[1:-1]), [n]]))
    return [int(e) for e in edges]


def series_order(half_width, r_max, tol):
    """Smallest Taylor order n with (h R_max)^(n+1)/(n+1)! <= tol, or None above MAX_SERIES_ORDER."""
    x = half_width * r_max
    for n in range(1, MAX_SERIES_ORDER + 1):
        if x ** (n + 1) / math.factorial(n + 1) <= tol:
            return n
    return None


def plan_band(system: System, k_sorted, tol, memory_limit):
    """Sub-bands worth a Taylor-series table for a sweep (perfect ground).

    Returns
    -------
    plan : list of (k_lo, k_hi, order)
        Sub-bands holding four or more of the frequencies, in increasing k.
        Tables are built one at a time (:func:`build_table`) as the sweep
        reaches them, so only one is held in memory.
    notes : list of str
        Why no table is planned.
    """
    notes = []
    if len(k_sorted) < 4:
        return [], notes
    N = system.topo.n_unknowns
    k_lo, k_hi = k_sorted[0], k_sorted[-1]
    n_sub = 1
    order = series_order(0.5 * (k_hi - k_lo), system.reach, tol)
    while order is None:
        n_sub *= 2
        order = series_order(0.5 * (k_hi - k_lo) / n_sub, system.reach, tol)
    if (MAX_SERIES_ORDER + 4) * N * N * 16 > memory_limit:
        notes.append("band tables skipped: they would exceed the memory limit; direct fill at every frequency")
        return [], notes
    edges = np.linspace(k_lo, k_hi, n_sub + 1)
    plan = []
    for a, b in zip(edges[:-1], edges[1:]):
        if np.count_nonzero((k_sorted >= a) & (k_sorted <= b)) >= 4:
            plan.append((a, b, order))
    return plan, notes


def build_table(system: System, k_lo, k_hi, order):
    """Build one sub-band table and check it against a direct fill at the upper edge.

    The order is raised by 4 (up to ``MAX_SERIES_ORDER``) while the input
    impedance from the table differs from the direct one by more than
    ``SERIES_CHECK_TOLERANCE``.

    Returns
    -------
    table : SeriesTable or None
        None when no order passes the check (the sub-band is then filled directly).
    note : str
        Empty, or what happened.
    """
    z_dir = system.feed_impedance(system.matrix_direct(k_hi))
    note = ""
    while True:
        tab = SeriesTable(system, k_lo, k_hi, order)
        err = abs(system.feed_impedance(tab.matrix(k_hi), tab.edges) - z_dir) / abs(z_dir)
        if err <= SERIES_CHECK_TOLERANCE:
            return tab, note
        if order + 4 > MAX_SERIES_ORDER:
            return None, f"band table rejected (check mismatch {err:.2g}); direct fill used in that sub-band"
        order += 4
        note = f"band table order raised to {order} (check mismatch {err:.2g})"


def loop_tree_currents(system: System, k, v, zloss):
    """Currents at low frequency in the loop-tree basis (no low-frequency breakdown).

    Notes
    -----
    In the basis U = [loops, tree] the scalar-potential part vanishes exactly
    on the loops (they carry no charge), so it is set to zero there instead of
    being left as round-off of a term 1/(kL)^2 larger than the loop terms; the
    system is then equilibrated by the square roots of its diagonal and
    solved ([3]_ of the module, here in its wire form).
    """
    u, n_loop = system.loop_tree()
    a_part, phi_part = system.potential_parts(k)
    with blas_threads(len(u)):
        zp = u.T @ ((1j * k * ETA0) * a_part + zloss) @ u
        pp = u.T @ phi_part @ u
    pp[:n_loop, :] = 0.0
    pp[:, :n_loop] = 0.0
    zp += (ETA0 / (1j * k)) * pp
    s = 1.0 / np.sqrt(np.maximum(np.abs(np.diag(zp)), 1e-300))
    m = s[:, None] * zp * s[None, :]
    y, cond = solve_matrix(m, s * (u.T @ v), system.symmetric)
    return u @ (s * y), cond


def quasi_static_currents(system: System, k, v):
    """Currents of the k -> 0 charge problem, Phi I = (j k / eta) V, for a wire set without loops."""
    phi = system.static_potential()
    with blas_threads(len(phi)):
        x = sla.solve(phi, v.real, assume_a="sym", check_finite=False)
        cond = np.linalg.cond(phi, 1)
    return (1j * k / ETA0) * x, float(cond)
