"""Matrix fill for the full-wave thin-wire solver (mixed-potential EFIE, Galerkin).

For triangle basis functions f_m, f_n on straight pieces, with the reduced
thin-wire kernel G(R) = exp(-jkR)/(4 pi R), R = sqrt(|r - r'|^2 + a^2), the
Galerkin impedance matrix of the mixed-potential electric-field integral
equation is ([1]_ eq. 9-10, [2]_ ch. 4)::

    Z_mn = j k eta  A_mn  +  eta/(j k)  Phi_mn,
    A_mn   = int int f_m(s) . f_n(s') G ds ds',
    Phi_mn = int int (df_m/ds) (df_n/ds') G ds ds'

(j omega mu = j k eta, 1/(j omega eps) = eta/(j k)). The ground adds the image
of every piece (mirrored in z = 0, horizontal current reversed, charge
negated). This module returns A and Phi split into parts (direct, image
horizontal, image vertical) so the caller can combine them with frequency
factors or reflection coefficients.

Quadrature: ``n_gauss`` Gauss-Legendre points per piece for every pair. For
pairs of pieces closer than about one piece length (and a piece with itself)
the static part 1/(4 pi R) is replaced by an accurate value: the inner
integral analytically (line source with linear density, [3]_), the outer one
by a composite Gauss rule graded toward the piece ends; only the smooth
remainder (exp(-jkR) - 1)/(4 pi R) is left to the plain Gauss rule. That
correction does not depend on frequency and is computed once.

References
----------
.. [1] S. M. Rao, D. R. Wilton and A. W. Glisson, "Electromagnetic scattering
   by surfaces of arbitrary shape", IEEE Trans. Antennas Propag. 30(3),
   409-418, 1982.
.. [2] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
   1968.
.. [3] D. R. Wilton, S. M. Rao, A. W. Glisson, D. H. Schaubert, O. M.
   Al-Bundak and C. M. Butler, "Potential integrals for uniform and linear
   source distributions on polygonal and polyhedral domains", IEEE Trans.
   Antennas Propag. 32(3), 276-281, 1984 (the line-segment case).
"""

from __future__ import annotations

import functools
import math

import numpy as np
import scipy.sparse as sp

from aerial.models.fullwave_geometry import Topology

#: Gauss-Legendre points per piece for the regular part of the fill. [1]
DEFAULT_GAUSS_POINTS = 3

#: Pieces whose gap is below this many piece lengths get the accurate static part. [1]
NEAR_GAP_FACTOR = 2.0

#: Bytes allowed for one block of kernel values during the fill. [byte]
DEFAULT_CHUNK_BYTES = 2**20

_FOUR_PI = 4.0 * np.pi
PART_NAMES = ("A_direct", "Phi_direct", "A_image_h", "A_image_v", "Phi_image")


@functools.lru_cache(maxsize=16)
def _gauss01_rule(n):
    x, w = np.polynomial.legendre.leggauss(n)  # an eigenvalue problem: worked out once per n
    u, w = 0.5 * (x + 1.0), 0.5 * w
    u.flags.writeable = w.flags.writeable = False
    return u, w


def _gauss01(n):
    """Gauss-Legendre nodes and weights on [0, 1] (read-only arrays, shared)."""
    return _gauss01_rule(int(n))


def pair_weights(u, w):
    """Weights turning kernel values at Gauss point pairs into the five integrals of one piece pair.

    Parameters
    ----------
    u, w : ndarray, shape (Q,)
        Gauss nodes and weights on [0, 1].

    Returns
    -------
    ndarray, shape (5, Q^2)
        Row c applied to the kernel values g_ij of a piece pair (i the
        observation point, j the source point, flattened as i Q + j) gives
        sum_ij c_e(i) c_f(j) g_ij for (e, f) = (0, 0), (0, 1), (1, 0), (1, 1)
        (c = 0 .. 3, c = 2 e + f) and their sum (c = 4), with c_0 = w (1 - u),
        c_1 = w u (the two triangle halves). Multiplied by both pieces'
        lengths they are the integrals S_ef of the basis-function ends over
        the pair. [1]

    Notes
    -----
    With the kernel values of a block laid out (Q^2, pairs) every piece pair
    of the block is reduced in one real matrix product (BLAS; real and
    imaginary parts side by side), instead of one pass over the kernel values
    per weight.
    """
    c = np.stack([w * (1.0 - u), w * u])  # (2, Q)
    cc = np.einsum("ei,fj->efij", c, c).reshape(4, -1)
    return np.concatenate([cc, cc.sum(axis=0, keepdims=True)])


def graded_rule(levels: int = 12, ratio: float = 0.25, panels: int = 6, order: int = 6):
    """Composite Gauss rule on [0, 1], graded geometrically toward both ends.

    Integrates the logarithmic end singularities of the line-source potential
    (observation point on or near a neighbouring piece's axis) to about 1e-9.

    Returns
    -------
    nodes, weights : ndarray
    """
    geo = 0.5 / panels * ratio ** np.arange(levels, 0, -1)
    uni = np.linspace(0.0, 1.0, panels + 1)
    br = np.unique(np.concatenate([[0.0], geo, uni, 1.0 - geo, [1.0]]))
    x, w = _gauss01(order)
    a, b = br[:-1, None], br[1:, None]
    return (a + (b - a) * x).ravel(), ((b - a) * w).ravel()


def line_potential(obs, a_pt, tangent, length, radius2):
    """Static potential integrals of a straight line source with linear density.

    Parameters
    ----------
    obs : ndarray, shape (..., 3)
        Observation points. [m]
    a_pt, tangent : ndarray, shape (..., 3)
        Source start point [m] and unit tangent.
    length : ndarray, shape (...)
        Source length. [m]
    radius2 : ndarray, shape (...)
        Squared reduced-kernel radius. [m^2]

    Returns
    -------
    j0, j1 : ndarray
        int_0^L phi(s') / R ds' for phi = 1 - s'/L and phi = s'/L, with
        R = sqrt(|r - r'|^2 + a^2). [1]

    Notes
    -----
    With s0 the axial and rho the (reduced) radial coordinate of the
    observation point::

        int_0^L ds'/R   = asinh((L - s0)/rho) + asinh(s0/rho)
        int_0^L s' ds'/R = R(L) - R(0) + s0 int_0^L ds'/R
    """
    d = obs - a_pt
    s0 = np.einsum("...k,...k->...", d, tangent)
    perp = np.cross(d, tangent)
    rho2 = np.einsum("...k,...k->...", perp, perp) + radius2
    rho = np.sqrt(rho2)
    i0 = np.arcsinh((length - s0) / rho) + np.arcsinh(s0 / rho)
    r_l = np.sqrt((length - s0) ** 2 + rho2)
    r_0 = np.sqrt(s0**2 + rho2)
    i1 = (r_l - r_0) + s0 * i0
    j1 = i1 / length
    return i0 - j1, j1


def add_transpose(w, step=256):
    """w <- w + w^T in place, by square blocks (no second N x N array).

    Examples
    --------
    >>> w = np.arange(9.0).reshape(3, 3)
    >>> add_transpose(w, step=2).tolist()
    [[0.0, 4.0, 8.0], [4.0, 8.0, 12.0], [8.0, 12.0, 16.0]]
    """
    n = w.shape[0]
    for a in range(0, n, step):
        rows = slice(a, min(n, a + step))
        w[rows, rows] += w[rows, rows].T.copy()
        for b in range(a + step, n, step):
            cols = slice(b, min(n, b + step))
            both = w[rows, cols] + w[cols, rows].T
            w[rows, cols] = both
            w[cols, rows] = both.T
    return w


def _same_shapes(rel_end, rel_src, t_src, length_src, a2, shortest):
    """Group piece pairs of one shape: (number of shapes, one pair of each, the shape of every pair).

    A pair is described relative to its observation piece's start: that piece's end, the source
    piece's start, direction and length, and the squared reduced radius; values equal to 1e-12 of
    the shortest piece (directions to 1e-12) count as equal.
    """
    extent = max(float(np.abs(rel_src).max(initial=0.0)), float(length_src.max(initial=0.0)), shortest)
    grid = max(1e-12 * shortest, 1e-15 * extent)
    keys = np.column_stack([
        np.round(np.column_stack([rel_end, rel_src, length_src]) / grid),
        np.round(t_src / 1e-12),
        np.round(a2 / (1e-12 * max(float(a2.max(initial=0.0)), 1e-300))),
    ]).astype(np.int64)
    _, first, again = np.unique(keys, axis=0, return_index=True, return_inverse=True)
    return len(first), first, again.ravel()


def _static_integrals(rel_end, length_obs, rel_src, t_src, length_src, a2):
    """Static integrals S_ef of piece pairs: graded outer rule on the observation piece, analytic inner.

    Coordinates relative to the observation piece's start. [m]; returns (n, 2, 2) [1]
    """
    uo, wo = graded_rule()
    acc = np.zeros((len(length_obs), 2, 2))
    step = max(1, int(2**18 // len(uo)))
    for s in range(0, len(length_obs), step):
        sl = slice(s, s + step)
        obs = uo[None, :, None] * rel_end[sl, None, :]
        j0, j1 = line_potential(obs, rel_src[sl, None, :], t_src[sl, None, :], length_src[sl, None], a2[sl, None])
        wl = wo[None, :] * length_obs[sl, None] / _FOUR_PI
        for e, phi in enumerate((1.0 - uo, uo)):
            acc[sl, e, 0] = np.sum(wl * phi * j0, axis=1)
            acc[sl, e, 1] = np.sum(wl * phi * j1, axis=1)
    return acc


class Filler:
    """Frequency-independent data for filling the impedance matrix of one topology.

    Parameters
    ----------
    topo : Topology
        Pieces and basis functions.
    n_gauss : int
        Gauss points per piece. [1]
    chunk_bytes : int
        Memory allowed for one block of kernel values. [byte]
    image : bool
        Include the ground-plane image terms.
    """

    def __init__(self, topo: Topology, n_gauss: int = DEFAULT_GAUSS_POINTS, chunk_bytes: int = DEFAULT_CHUNK_BYTES, image: bool = True):
        self.topo = topo
        self.image = image
        P = topo.n_pieces
        u, w = _gauss01(n_gauss)
        self.q = n_gauss
        self.pts = topo.start[:, None, :] + u[None, :, None] * (topo.end - topo.start)[:, None, :]  # (P,Q,3)
        W = w[None, :] * topo.length[:, None]
        self.wphi = (W * (1.0 - u)[None, :], W * u[None, :])  # shape weights, (P,Q) each
        self.rad2 = topo.radius**2
        self.t = topo.tangent
        self.rows = max(1, int(chunk_bytes // (16 * n_gauss * n_gauss * P)))
        self.pts_T = np.ascontiguousarray(self.pts.transpose(2, 1, 0))  # (3, Q, P)
        self._weights = pair_weights(u, w)
        # the ends' signs in the charge (d/ds of the triangle halves): s_e s_f for ef = 00, 01, 10, 11
        self._charge_sign = np.array([1.0, -1.0, -1.0, 1.0])
        self._near = {False: self._near_correction(False)}
        if image:
            self._near[True] = self._near_correction(True)
        te = topo.t_end
        self.te_T = (te[0].T.tocsr(), te[1].T.tocsr())
        self.charge_T = topo.charge.T.tocsr()
        self._row_cache = {}

    # ---------------------------------------------------------------- near pairs
    def _near_pairs(self, image):
        topo = self.topo
        mid = topo.midpoint
        src = mid * np.array([1.0, 1.0, -1.0]) if image else mid
        half = 0.5 * topo.length
        out_p, out_q = [], []
        step = max(1, int(2**20 // max(len(mid), 1)))
        for i0 in range(0, len(mid), step):
            d = np.linalg.norm(mid[i0 : i0 + step, None, :] - src[None, :, :], axis=2)
            gap = d - half[i0 : i0 + step, None] - half[None, :]
            lim = NEAR_GAP_FACTOR * np.maximum(topo.length[i0 : i0 + step, None], topo.length[None, :])
            p, q = np.nonzero(gap < lim)
            keep = q >= p + i0  # the relation is symmetric: each pair once
            out_p.append(p[keep] + i0)
            out_q.append(q[keep])
        return np.concatenate(out_p), np.concatenate(out_q)

    def _near_correction(self, image):
        """Accurate minus Gauss static integrals of the near pairs, per unit length of both pieces.

        Returns
        -------
        p, q : ndarray of int
            Observation and source pieces of each near pair.
        corr : ndarray, shape (n, 5)
            The corrections of S_ef / (L_p L_q) for (e, f) = 00, 01, 10, 11 and
            their sum (the layout of :func:`pair_weights`). [1/m]
        """
        topo = self.topo
        p0, q0 = self._near_pairs(image)  # q0 >= p0
        if len(p0) == 0:
            return p0, q0, np.zeros((0, 5))
        # each pair once, with the graded outer rule on the shorter piece and the analytic inner integral on
        # the longer one (the accurate way round when a short piece meets a long one); the other order follows
        # by reciprocity with the ends e and f swapped
        swap = topo.length[q0] < topo.length[p0]
        p, q = np.where(swap, q0, p0), np.where(swap, p0, q0)
        flip = np.array([1.0, 1.0, -1.0]) if image else np.ones(3)
        a_q = topo.start[q] * flip
        t_q = topo.tangent[q] * flip
        L_q = topo.length[q]
        a2 = 0.5 * (self.rad2[p] + self.rad2[q])
        # accurate: graded outer rule on piece p, analytic inner on piece q; pairs of the same shape (the
        # same lengths, directions and offset, to 1e-12 of the shortest piece) are worked out once
        rel_end = topo.end[p] - topo.start[p]
        rel_src = a_q - topo.start[p]
        shape, first, again = _same_shapes(rel_end, rel_src, t_q, L_q, a2, topo.length.min())
        acc = _static_integrals(rel_end[first], topo.length[p[first]], rel_src[first], t_q[first], L_q[first],
                                a2[first])[again]
        # the plain Gauss static value the fill will have used
        xp = self.pts[p]  # (n,Q,3)
        xq = self.pts[q] * flip
        r = np.sqrt(np.sum((xp[:, :, None, :] - xq[:, None, :, :]) ** 2, axis=-1) + a2[:, None, None])
        g = 1.0 / (_FOUR_PI * r)
        for e in range(2):
            for f in range(2):
                acc[:, e, f] -= np.einsum("ni,nij,nj->n", self.wphi[e][p], g, self.wphi[f][q])
        corr = acc.reshape(-1, 4) / (topo.length[p] * L_q)[:, None]
        corr = np.concatenate([corr, corr.sum(axis=1, keepdims=True)], axis=1)
        corr[swap] = corr[swap][:, [0, 2, 1, 3, 4]]  # back to (p0, q0)
        # the mirrored pairs (q0, p0)
        off = p0 != q0
        p, q = np.concatenate([p0, q0[off]]), np.concatenate([q0, p0[off]])
        return p, q, np.concatenate([corr, corr[off][:, [0, 2, 1, 3, 4]]])

    # ---------------------------------------------------------------- fill
    def _distances(self, r0, r1, image):
        """Reduced-kernel distances from the Gauss points of pieces r0:r1 to those of pieces r0:P, (Q,Q,Pc,P-r0). [m]

        Only pieces from r0 on are sources: the matrices are symmetric, so each block of pieces is paired with
        itself and the pieces after it (:meth:`fill`). The pieces are the last axes so that every array
        operation runs along rows of P - r0 numbers.
        """
        x = self.pts_T[:, :, None, r0:r1, None]  # (3, Q, 1, Pc, 1)
        y = self.pts_T[:, None, :, None, r0:]  # (3, 1, Q, 1, P')
        sign = (1.0, 1.0, -1.0) if image else (1.0, 1.0, 1.0)
        d2 = np.square(x[0] - sign[0] * y[0])
        d2 += np.square(x[1] - sign[1] * y[1])
        d2 += np.square(x[2] - sign[2] * y[2])
        d2 += 0.5 * (self.rad2[None, None, r0:r1, None] + self.rad2[None, None, None, r0:])
        return np.sqrt(d2, out=d2)

    def _kernel(self, k, r):
        """Kernel values exp(-jkR)/(4 pi R) at distances r (real at k = 0). [1/m]"""
        if k == 0.0:
            return (1.0 / _FOUR_PI) / r
        g = np.exp(-1j * k * r)
        g /= _FOUR_PI * r
        return g

    def _reduce(self, g, r0, r1, image, static_correction):
        """Piece-pair integrals of kernel values g (Q,Q,Pc,P'), per unit length of both pieces: (5, Pc, P').

        Sources are pieces r0:P. The first axis holds S_ef / (L_a L_b) for (e, f) = 00, 01, 10, 11 and
        their sum (:func:`pair_weights`); near pairs get their static correction when asked.
        """
        Pc, Pr = g.shape[2:]
        q2 = g.shape[0] * g.shape[1]
        if np.iscomplexobj(g):
            S = (self._weights @ g.view(float).reshape(q2, -1)).view(complex).reshape(5, Pc, Pr)
        else:  # k = 0: real kernel values
            S = (self._weights @ g.reshape(q2, -1)).reshape(5, Pc, Pr).astype(complex)
        if static_correction:
            p, q, corr = self._near[image]
            sel = (p >= r0) & (p < r1) & (q >= r0)
            if np.any(sel):
                S[:, p[sel] - r0, q[sel] - r0] += corr[sel].T
        return S

    def _tangent_products(self, r0, r1, image, coefs):
        """Coefficient x tangent products x L_a L_b summed over the vector-potential parts in ``coefs``, (Pc, P-r0)."""
        t, length = self.t, self.topo.length
        if image:
            parts = {"A_image_h": lambda: t[r0:r1, :2] @ t[r0:, :2].T,
                     "A_image_v": lambda: np.outer(t[r0:r1, 2], t[r0:, 2])}
        else:
            parts = {"A_direct": lambda: t[r0:r1] @ t[r0:].T}
        tt = 0.0
        for name, make in parts.items():
            if name in coefs:
                tt = tt + coefs[name] * make()
        if isinstance(tt, float):
            return None
        return tt * (length[r0:r1, None] * length[None, r0:])

    def _piece_terms(self, S, r0, r1, image, coefs, out=None):
        """Piece-level matrices X_ef (4, Pc, P-r0) of one output: the vector-potential parts and the scalar one.

        X_ef = sum_parts c_part (t_a . t_b)_part L_a L_b S_ef + c_Phi s_e s_f S_sum, so that the basis
        matrix is sum_ef T_e^T X_ef T_f (:meth:`_assemble`): the charge of a triangle end is s_e / L with
        s_0 = -1, s_1 = +1. Added into ``out`` when given.
        """
        if out is None:
            out = np.zeros((4,) + S.shape[1:], dtype=complex)
        tt = self._tangent_products(r0, r1, image, coefs)
        if tt is not None:
            out += tt * S[:4]
        pname = "Phi_image" if image else "Phi_direct"
        if pname in coefs:
            phi = coefs[pname] * S[4]
            for c in range(4):
                out[c] += self._charge_sign[c] * phi
        return out

    def _assemble(self, X, r0, r1, out):
        """Add sum_ef T_e^T X_ef T_f of piece rows r0:r1 (sources r0:P) to ``out``, halving the diagonal block.

        ``X`` is (4, Pc, P-r0) for one matrix, or (M, 4, Pc, P-r0) for M matrices at once; it is
        overwritten. ``out`` is one (N, N) matrix, or a list of M. Summed over all blocks this gives W
        with W + W^T the full matrix. Only the basis columns from the first one that pieces r0:P touch
        are formed and added (the others get nothing from these sources).
        """
        many = X.ndim == 4
        M = X.shape[0] if many else 1
        Pc, Pr = X.shape[-2], X.shape[-1]
        X[..., :Pc] *= 0.5  # pairs within the block appear both ways: W + W^T counts them once
        c0, cols = self._cols(r0)
        width = cols[0].shape[0]
        for e in range(2):
            # (T_0^T X_e0^T + T_1^T X_e1^T) over the sources: (N - c0, M Pc), then the rows' incidence
            m = sum(cols[f] @ np.ascontiguousarray(X[..., 2 * e + f, :, :].reshape(M * Pc, Pr).T) for f in range(2))
            m = np.ascontiguousarray(m.reshape(width, M, Pc).transpose(2, 1, 0)).reshape(Pc, M * width)
            rows, left = self._rows(("t", e, r0, r1))
            add = (left @ m).reshape(len(rows), M, width)
            if many:
                for i, o in enumerate(out):
                    o[rows, c0:] += add[:, i]
            else:
                out[rows, c0:] += add[:, 0]

    def _cols(self, r0):
        """The first basis function pieces r0:P touch (c0), and the incidences of their ends on basis c0:N.

        Returns (c0, (T_0, T_1)) with T_f of shape (N - c0, P - r0), read from the (P, N) incidences' row
        pointers. Not cached: there is one per block, and at large N the copies would add up to more than
        the matrix.
        """
        P, N = self.topo.n_pieces, self.topo.n_unknowns
        parts = []
        for t in self.topo.t_end:
            lo = t.indptr[r0]
            parts.append((t.data[lo:], t.indices[lo:], t.indptr[r0:] - lo))
        touched = np.concatenate([idx for _, idx, _ in parts])
        c0 = int(touched.min()) if touched.size else N
        return c0, tuple(sp.csr_matrix((d, idx - c0, ptr), shape=(P - r0, N - c0)).T for d, idx, ptr in parts)

    def _rows(self, key):
        """Basis rows touched by ends e of pieces r0:r1 (key ("t", e, r0, r1)), and that (rows, Pc) block (cached).

        Read straight from the (P, N) incidence's row pointers.
        """
        hit = self._row_cache.get(key)
        if hit is None:
            _, e, r0, r1 = key
            t = self.topo.t_end[e]
            lo, hi = t.indptr[r0], t.indptr[r1]
            piece = np.repeat(np.arange(r1 - r0), np.diff(t.indptr[r0 : r1 + 1]))
            rows, at = np.unique(t.indices[lo:hi], return_inverse=True)
            order = np.argsort(at, kind="stable")  # entries by basis row, pieces in order within a row
            ptr = np.concatenate([[0], np.cumsum(np.bincount(at.ravel(), minlength=len(rows)))])
            hit = (rows, sp.csr_matrix((t.data[lo:hi][order], piece[order], ptr), shape=(len(rows), r1 - r0)))
            self._row_cache[key] = hit
        return hit

    def fill(self, k: float, outputs, progress=None):
        """Basis-level matrices at wavenumber k.

        Parameters
        ----------
        k : float
            Free-space wavenumber. [rad/m]
        outputs : list of dict
            Each dict maps part names (``PART_NAMES``) to complex coefficients;
            one N x N matrix is returned per dict, the weighted sum of the parts.

        Returns
        -------
        list of ndarray, complex, shape (N, N)

        Notes
        -----
        Every part is symmetric (Galerkin testing of a reciprocal kernel; the
        distance to an image point is symmetric in the two pieces), so each
        block of pieces is paired with itself and the pieces after it only:
        the blocks give W, and the matrix is W + W^T.
        """
        N, P = self.topo.n_unknowns, self.topo.n_pieces
        out = [np.zeros((N, N), dtype=complex) for _ in outputs]
        need_image = self.image and any(n in o for o in outputs for n in PART_NAMES[2:])
        for r0, r1 in self._blocks():
            xs = [None] * len(outputs)
            for image in (False, True) if need_image else (False,):
                g = self._kernel(k, self._distances(r0, r1, image))
                S = self._reduce(g, r0, r1, image, True)
                del g
                for i, coefs in enumerate(outputs):
                    xs[i] = self._piece_terms(S, r0, r1, image, coefs, xs[i])
            for o, x in zip(out, xs):
                self._assemble(x, r0, r1, o)
            if progress is not None:
                progress(r1, P)
        for o in out:
            add_transpose(o)
        return out

    def _blocks(self, rows=None):
        """Blocks (r0, r1) of piece rows, each paired with pieces r0:P, of about equal work."""
        P = self.topo.n_pieces
        pairs = max(1, (rows or self.rows) * P)  # point pairs of one block, as with whole rows
        edges, r0 = [], 0
        while r0 < P:
            r1 = min(P, r0 + max(1, pairs // (P - r0)))
            edges.append((r0, r1))
            r0 = r1
        return edges

    def series(self, k0: float, half_width: float, order: int):
        """Taylor coefficients in x = (k - k0)/half_width of Y(k) = k^2 A(k) - Phi(k) (perfect ground).

        Parameters
        ----------
        k0 : float
            Expansion point. [rad/m]
        half_width : float
            Scale of x (half the sub-band). [rad/m]
        order : int
            Highest power of x kept in the kernel expansion. [1]

        Returns
        -------
        ndarray, complex, shape (order + 3, N, N)
            Y_j with Y(k) = sum_j Y_j x^j; the impedance matrix is
            Z = (j eta / k) Y(k). [1/m]

        Notes
        -----
        exp(-jkR)/R = exp(-j k0 R)/R * sum_n (-j h R x)^n / n!, h = half_width,
        so each kernel value needs one exponential and ``order`` products; the
        static correction of near pairs enters the n = 0 term only. With
        k = k0 + h x, k^2 A = sum_n (k0^2 + 2 k0 h x + h^2 x^2) x^n A_n, so
        Y_m = k0^2 A_m + 2 k0 h A_(m-1) + h^2 A_(m-2) - Phi_m; these sums are
        formed piece by piece and every Y_m of a block of pieces is then
        assembled onto the basis functions in one pass (each block with itself
        and the pieces after it, as in :meth:`fill`).
        """
        y = self._series_halves(k0, half_width, order)
        for w in y:
            add_transpose(w)
        return np.stack(y)

    def series_upper(self, k0: float, half_width: float, order: int, edges):
        """The upper triangles of :meth:`series`' coefficients, by blocks of rows.

        Parameters
        ----------
        k0, half_width, order
            As for :meth:`series`.
        edges : sequence of int
            Row-block boundaries 0 = e_0 < e_1 < ... = N.

        Returns
        -------
        list of ndarray, complex, shape (order + 3, (e_(b+1) - e_b) (N - e_b))
            For each block b, Y_j[e_b:e_(b+1), e_b:] of every j, flattened. [1/m]

        Notes
        -----
        Each matrix is symmetric, so its upper triangle holds it all; the
        blocks take about half the memory of the full coefficients and half
        the time to evaluate (:class:`aerial.models.fullwave_system.SeriesTable`).
        """
        y = self._series_halves(k0, half_width, order)
        M, N = len(y), self.topo.n_unknowns
        blocks = [np.empty((M, (b - a) * (N - a)), dtype=complex) for a, b in zip(edges[:-1], edges[1:])]
        for m in range(M):
            w = y[m]
            for (a, b), out in zip(zip(edges[:-1], edges[1:]), blocks):
                out[m] = (w[a:b, a:] + w[a:, a:b].T).ravel()
            y[m] = w = None  # each coefficient's full matrix is dropped once packed
        return blocks

    def _series_halves(self, k0, half_width, order):
        """The coefficients' halves W_j (list of (N, N)), with Y_j = W_j + W_j^T (:meth:`series`)."""
        N = self.topo.n_unknowns
        M = order + 3
        y = [np.zeros((N, N), dtype=complex) for _ in range(M)]
        coefs = ({"A_direct": 1.0, "Phi_direct": -1.0}, {"A_image_h": -1.0, "A_image_v": 1.0, "Phi_image": 1.0})
        for r0, r1 in self._blocks(max(1, self.rows // 4)):  # every order's terms of a block are held at once (in cache)
            x = self._series_block(r0, r1, k0, half_width, order, coefs)
            self._assemble(x, r0, r1, y)
            del x
        return y

    def _series_block(self, r0, r1, k0, half_width, order, coefs):
        """Piece-level terms (order + 3, 4, Pc, P-r0) of every Y_m for piece rows r0:r1 (:meth:`series`)."""
        P = self.topo.n_pieces
        a_n = np.empty((order + 1, 4, r1 - r0, P - r0), dtype=complex)  # A_n n! / (-j)^n, piece level
        phi_n = np.empty((order + 1, r1 - r0, P - r0), dtype=complex)  # -Phi_n n! / (-j)^n, piece level
        a_re = a_n.view(float)  # real and imaginary parts side by side: real factors act on both at once
        for first, image in zip((True, False), (False, True) if self.image else (False,)):
            r = self._distances(r0, r1, image)
            g = self._kernel(k0, r)
            r *= half_width
            r_re = np.repeat(r, 2, axis=-1)
            del r
            g_re = g.view(float)
            tt = np.repeat(self._tangent_products(r0, r1, image, coefs[image]), 2, axis=-1)
            sign = coefs[image]["Phi_image" if image else "Phi_direct"]
            for n in range(order + 1):
                if n:
                    g_re *= r_re  # e^{-j k0 R} (h R)^n / (4 pi R)
                S = self._reduce(g, r0, r1, image, n == 0)
                s_re = S[:4].view(float)
                s_re *= tt  # S is this order's scratch: scaled in place
                S[4] *= sign
                if first:
                    a_re[n] = s_re
                    phi_n[n] = S[4]
                else:
                    a_re[n] += s_re
                    phi_n[n] += S[4]
        x = (series_combination(k0, half_width, order) @ a_n.reshape(order + 1, -1)).reshape((order + 3,) + a_n.shape[1:])
        phi_n *= np.array([(-1j) ** n / math.factorial(n) for n in range(order + 1)])[:, None, None]
        for c in range(4):
            if self._charge_sign[c] > 0:
                x[: order + 1, c] += phi_n
            else:
                x[: order + 1, c] -= phi_n
        return x


def series_combination(k0, half_width, order):
    """Matrix C with Y_m = sum_n C_mn A'_n: the Taylor terms of k^2 A(k) from the kernel's power terms.

    A'_n is the vector potential with the kernel exp(-j k0 R) (h R)^n / (4 pi R), so that
    A_n = (-j)^n / n! A'_n is the n-th Taylor coefficient in x = (k - k0)/h; with
    k^2 = k0^2 + 2 k0 h x + h^2 x^2 the coefficient of x^m in k^2 A(k) is
    k0^2 A_m + 2 k0 h A_(m-1) + h^2 A_(m-2) ([1]_ of :mod:`aerial.models.fullwave_system`).

    Parameters
    ----------
    k0, half_width : float
        Expansion point and half-width h of the sub-band. [rad/m]
    order : int
        Highest power n of the kernel's expansion. [1]

    Returns
    -------
    ndarray of complex, shape (order + 3, order + 1)
        [m^-2]

    Examples
    --------
    >>> series_combination(2.0, 1.0, 1).round(3).tolist()
    [[(4+0j), 0j], [(4+0j), -4j], [(1+0j), -4j], [0j, -1j]]
    """
    s = np.array([(-1j) ** n / math.factorial(n) for n in range(order + 1)])
    c = np.zeros((order + 3, order + 1), dtype=complex)
    n = np.arange(order + 1)
    c[n, n] += k0 * k0 * s
    c[n + 1, n] += 2 * k0 * half_width * s
    c[n + 2, n] += half_width * half_width * s
    return c
