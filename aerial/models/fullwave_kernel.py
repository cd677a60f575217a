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

import numpy as np

from aerial.models.fullwave_geometry import Topology

#: Gauss-Legendre points per piece for the regular part of the fill. [1]
DEFAULT_GAUSS_POINTS = 3

#: Pieces whose gap is below this many piece lengths get the accurate static part. [1]
NEAR_GAP_FACTOR = 2.0

#: Bytes allowed for one block of kernel values during the fill. [byte]
DEFAULT_CHUNK_BYTES = 4 * 2**20

_FOUR_PI = 4.0 * np.pi
PART_NAMES = ("A_direct", "Phi_direct", "A_image_h", "A_image_v", "Phi_image")


def _gauss01(n):
    x, w = np.polynomial.legendre.leggauss(n)
    return 0.5 * (x + 1.0), 0.5 * w


def _gauss_sum(g, w):
    """h[a, i, b] = sum_j g[a, i, b, j] w[b, j], summed in order of j.

    The same numbers as ``np.einsum("aibj,bj->aib", g, w)`` (bit for bit: the
    same products added in the same order) at half its time for complex g.
    """
    h = g[..., 0] * w[:, 0]
    for j in range(1, g.shape[-1]):
        h += g[..., j] * w[:, j]
    return h


def _row_sum(w, h, out):
    """out[a, b] = sum_i w[a, i] h[a, i, b], summed in order of i (``np.einsum("ai,aib->ab")``, bit for bit)."""
    np.multiply(w[:, 0, None], h[:, 0], out=out)
    for i in range(1, w.shape[1]):
        out += w[:, i, None] * h[:, i]


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
            out_p.append(p + i0)
            out_q.append(q)
        return np.concatenate(out_p), np.concatenate(out_q)

    def _near_correction(self, image):
        """Accurate minus Gauss static integrals for near pairs, shape (n, 2, 2)."""
        topo = self.topo
        p, q = self._near_pairs(image)
        if len(p) == 0:
            return p, q, np.zeros((0, 2, 2))
        flip = np.array([1.0, 1.0, -1.0]) if image else np.ones(3)
        a_q = topo.start[q] * flip
        t_q = topo.tangent[q] * flip
        L_q = topo.length[q]
        a2 = 0.5 * (self.rad2[p] + self.rad2[q])
        # accurate: graded outer rule on piece p, analytic inner on piece q
        uo, wo = graded_rule()
        acc = np.zeros((len(p), 2, 2))
        step = max(1, int(2**18 // len(uo)))
        for s in range(0, len(p), step):
            sl = slice(s, s + step)
            obs = topo.start[p[sl], None, :] + uo[None, :, None] * (topo.end[p[sl]] - topo.start[p[sl]])[:, None, :]
            j0, j1 = line_potential(obs, a_q[sl, None, :], t_q[sl, None, :], L_q[sl, None], a2[sl, None])
            wl = wo[None, :] * topo.length[p[sl], None] / _FOUR_PI
            for e, phi in enumerate((1.0 - uo, uo)):
                acc[sl, e, 0] = np.sum(wl * phi * j0, axis=1)
                acc[sl, e, 1] = np.sum(wl * phi * j1, axis=1)
        # the plain Gauss static value the fill will have used
        xp = self.pts[p]  # (n,Q,3)
        xq = self.pts[q] * flip
        r = np.sqrt(np.sum((xp[:, :, None, :] - xq[:, None, :, :]) ** 2, axis=-1) + a2[:, None, None])
        g = 1.0 / (_FOUR_PI * r)
        for e in range(2):
            for f in range(2):
                acc[:, e, f] -= np.einsum("ni,nij,nj->n", self.wphi[e][p], g, self.wphi[f][q])
        return p, q, acc

    # ---------------------------------------------------------------- fill
    def _distances(self, r0, r1, image):
        """Reduced-kernel distances between the Gauss points of rows r0:r1 and all pieces, (Pc,Q,P,Q). [m]"""
        Q = self.q
        x = self.pts[r0:r1].reshape(-1, 3)
        y = self.pts.reshape(-1, 3)
        if image:
            y = y * np.array([1.0, 1.0, -1.0])
        d2 = (x[:, None, 0] - y[None, :, 0]) ** 2
        d2 += (x[:, None, 1] - y[None, :, 1]) ** 2
        d2 += (x[:, None, 2] - y[None, :, 2]) ** 2
        Pc, P = r1 - r0, self.pts.shape[0]
        d2 = d2.reshape(Pc, Q, P, Q)
        d2 += 0.5 * (self.rad2[r0:r1, None, None, None] + self.rad2[None, None, :, None])
        return np.sqrt(d2, out=d2)

    def _reduce(self, g, r0, r1, image, static_correction):
        """Piece-level integrals S_ef (2, 2, Pc, P) of kernel values g at the Gauss points."""
        Pc, P = r1 - r0, self.pts.shape[0]
        S = np.empty((2, 2, Pc, P), dtype=complex)
        h1 = _gauss_sum(g, self.wphi[1])
        h0 = _gauss_sum(g, self.wphi[0])
        for e in range(2):
            we = self.wphi[e][r0:r1]
            _row_sum(we, h0, S[e, 0])
            _row_sum(we, h1, S[e, 1])
        if static_correction:
            p, q, corr = self._near[image]
            sel = (p >= r0) & (p < r1)
            if np.any(sel):
                for e in range(2):
                    for f in range(2):
                        S[e, f, p[sel] - r0, q[sel]] += corr[sel, e, f]
        return S

    def _assemble(self, S, r0, r1, image, coefs, out, block_rows=None):
        """Add the basis-level contribution of piece rows r0:r1 to ``out``.

        ``out`` is (N, N), or (len(block_rows), N) holding only the basis rows
        ``block_rows`` (sorted; every row pieces r0:r1 touch, :meth:`block_rows`).
        """
        te_T, ch_T = self.te_T, self.charge_T
        if image:
            t = self.t
            parts = {"A_image_h": t[r0:r1, :2] @ t[:, :2].T, "A_image_v": np.outer(t[r0:r1, 2], t[:, 2])}
            pname = "Phi_image"
        else:
            parts = {"A_direct": self.t[r0:r1] @ self.t.T}
            pname = "Phi_direct"
        # vector-potential parts: sum over ends of T_e^T (TT * S_ef) T_f
        tt = sum(coefs[n] * parts[n] for n in parts if n in coefs)
        if not isinstance(tt, int):
            for e in range(2):
                m = (te_T[0] @ (tt * S[e, 0]).T + te_T[1] @ (tt * S[e, 1]).T).T  # (Pc, N)
                rows, left = self._rows(("t", e, r0, r1), te_T[e], block_rows)
                out[rows] += left @ m
        if pname in coefs:
            g = S.sum(axis=(0, 1)) * coefs[pname]
            rows, left = self._rows(("c", r0, r1), ch_T, block_rows)
            out[rows] += left @ (ch_T @ g.T).T

    def _rows(self, key, mat_T, block_rows=None):
        """Basis rows touched by pieces r0:r1 of a (N, P) incidence matrix, and that block (cached).

        With ``block_rows`` the rows are returned as positions in it.
        """
        hit = self._row_cache.get(key)
        if hit is None:
            r0, r1 = key[-2], key[-1]
            block = mat_T[:, r0:r1].tocsr()
            rows = np.unique(block.nonzero()[0])
            hit = (rows, block[rows])
            self._row_cache[key] = hit
        if block_rows is None:
            return hit
        return np.searchsorted(block_rows, hit[0]), hit[1]

    def block_rows(self, r0, r1):
        """Sorted basis rows that pieces r0:r1 contribute to (either end of a triangle, or its charge)."""
        keys = ((("t", 0, r0, r1), self.te_T[0]), (("t", 1, r0, r1), self.te_T[1]), (("c", r0, r1), self.charge_T))
        return np.unique(np.concatenate([self._rows(key, mat)[0] for key, mat in keys]))

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
        """
        N, P = self.topo.n_unknowns, self.topo.n_pieces
        out = [np.zeros((N, N), dtype=complex) for _ in outputs]
        need_image = self.image and any(n in o for o in outputs for n in PART_NAMES[2:])
        for r0 in range(0, P, self.rows):
            r1 = min(P, r0 + self.rows)
            for image in (False, True) if need_image else (False,):
                r = self._distances(r0, r1, image)
                if k == 0.0:
                    g = (1.0 / _FOUR_PI) / r
                else:
                    kr = k * r
                    g = np.exp(-1j * kr) / (_FOUR_PI * r)
                S = self._reduce(g, r0, r1, image, True)
                for o, coefs in zip(out, outputs):
                    self._assemble(S, r0, r1, image, coefs, o)
            if progress is not None:
                progress(r1, P)
        return out

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
        static correction of near pairs enters the n = 0 term only.
        """
        N, P = self.topo.n_unknowns, self.topo.n_pieces
        y = np.zeros((order + 3, N, N), dtype=complex)
        a_coefs = [{"A_direct": 1.0}, {"A_image_h": -1.0, "A_image_v": 1.0}]
        p_coefs = [{"Phi_direct": 1.0}, {"Phi_image": -1.0}]
        for r0 in range(0, P, self.rows):
            r1 = min(P, r0 + self.rows)
            # only the basis rows these pieces touch change: work on those rows alone
            rows = self.block_rows(r0, r1)
            tmp_a = np.zeros((len(rows), N), dtype=complex)
            tmp_p = np.zeros((len(rows), N), dtype=complex)
            for image in ((False, True) if self.image else (False,)):
                r = self._distances(r0, r1, image)
                g = np.exp(-1j * k0 * r) / (_FOUR_PI * r)
                r *= half_width
                scale = 1.0 + 0j
                for n in range(order + 1):
                    if n:
                        g *= r  # e^{-j k0 R} (h R)^n / (4 pi R)
                        scale *= -1j / n
                    S = self._reduce(g, r0, r1, image, n == 0)
                    if n:
                        S *= scale
                    tmp_a[:] = 0.0
                    tmp_p[:] = 0.0
                    self._assemble(S, r0, r1, image, a_coefs[image], tmp_a, rows)
                    self._assemble(S, r0, r1, image, p_coefs[image], tmp_p, rows)
                    y[n, rows] += k0 * k0 * tmp_a - tmp_p
                    y[n + 1, rows] += (2 * k0 * half_width) * tmp_a
                    y[n + 2, rows] += (half_width * half_width) * tmp_a
        return y
