"""The exact lossy half-space in the moment-method fill: the Sommerfeld remainder terms.

Frame: metres, z up, the soil fills z < 0; time convention exp(+j omega t).

Over a soil of complex relative permittivity eps_c, the field reflected by the
ground is the quasi-static image (charges scaled by -K, vertical currents by
+K, horizontal currents by 0; K = (eps_c - 1)/(eps_c + 1)), which the
ordinary image fill provides with those coefficients, plus the Sommerfeld
remainders of :mod:`aerial.models.sommerfeld`. In the mixed-potential
Galerkin form (Michalski and Zheng's formulation C for a half-space, [1]_) the
remainders add to the vector-potential matrix A and the scalar-potential
matrix Phi (Z = j k eta A + eta/(j k) Phi)::

    A_mn   += int int f_m f_n [ (t_m,h . t_n,h) F_TE + t_m,z t_n,z F_TM
                                - t_m,z (t_n,h . rho^) T1 ]
            + int int f_m' f_n t_n,z T0
    Phi_mn += int int f_m' f_n' F_phi

where rho^ points from the source point to the observation point, F_TE,
F_TM, F_phi are the tabulated remainders and T1 = -dT/drho, T0 = k0^2 T
(table plus closed form). The last two terms are the horizontal-to-vertical
coupling of the vector potential and its counterpart in the scalar potential
of vertical currents; together they keep the matrix symmetric (reciprocity).
With eps_c -> infinity the remainders vanish except F_TE -> -e^{-jkR'}/(4 pi R'),
and the fill becomes the perfect-ground image fill; with eps_c = 1 every
reflected term is zero (free space).

A wire that ends on the ground passes its current to the earth electrode,
modelled as a lumped impedance at that point (the electrode's own field in the
soil is not part of the fill).

References
----------
.. [1] K. A. Michalski and D. Zheng, "Electromagnetic scattering and radiation
   by surfaces of arbitrary shape in layered media, Part I: Theory", IEEE
   Trans. Antennas Propag. 38(3), 335-344, 1990. (from memory)
"""

from __future__ import annotations

import weakref

import numpy as np

from aerial.models.fullwave_kernel import Filler
from aerial.models.sommerfeld import SommerfeldTable, closed_form_parts

__all__ = ["remainder_matrices"]


#: Pair geometry per filler (dropped with it). [1]
_GEOMETRY: "weakref.WeakKeyDictionary" = weakref.WeakKeyDictionary()

#: Point pairs up to which the pair geometry (distances, table cells) is kept between frequencies. [1]
GEOMETRY_CACHE_PAIRS = 2_000_000


def _blocks(n_pieces, rows):
    """Blocks (r0, r1, c0, c1) of piece rows and columns on and above the block diagonal."""
    edges = list(range(0, n_pieces, rows)) + [n_pieces]
    spans = list(zip(edges[:-1], edges[1:]))
    return [(r0, r1, c0, c1) for i, (r0, r1) in enumerate(spans) for (c0, c1) in spans[i:]]


def _pair_geometry(filler, table, block):
    """Horizontal offsets, distance, height sum and table cells of every point pair of a block (obs rows, src cols)."""
    r0, r1, c0, c1 = block
    x, y = filler.pts[r0:r1], filler.pts[c0:c1]
    dx = x[:, :, None, None, 0] - y[None, None, :, :, 0]
    dy = x[:, :, None, None, 1] - y[None, None, :, :, 1]
    rho = np.hypot(dx, dy)
    h = x[:, :, None, None, 2] + y[None, None, :, :, 2]
    with np.errstate(invalid="ignore", divide="ignore"):
        inv = np.where(rho > 0, 1.0 / np.where(rho > 0, rho, 1.0), 0.0)
    return {"dx": dx * inv, "dy": dy * inv, "rho": rho, "h": h, "cells": table.cells(rho, h)}


def _geometry(filler, table, blocks):
    """Pair geometry of every block, kept on the filler between frequencies when it is small enough."""
    key = (table.log_r[0], table.log_r[-1], table.log_r.size, table.angle.size, tuple(blocks))
    cache = _GEOMETRY.setdefault(filler, {})
    if key in cache:
        return cache[key]
    pairs = (filler.topo.n_pieces * filler.q) ** 2
    if pairs > GEOMETRY_CACHE_PAIRS:
        return None
    cache.clear()
    cache[key] = [_pair_geometry(filler, table, b) for b in blocks]
    return cache[key]


def _reduce(x, kern, y):
    """out[a, b] = sum_ij x[a, i] kern[a, i, b, j] y[b, j]."""
    return np.einsum("ai,aibj,bj->ab", x, kern, y, optimize=False)


def _block(filler, table, block, geo, m_a, m_c, m_phi):
    """Fill one block of piece pairs (and, off the diagonal, its mirror: the kernels are symmetric).

    ``m_a[e][f]``, ``m_c[f]``, ``m_phi``: piece-by-piece matrices (observation piece, source piece) of the
    vector potential between basis ends e and f, of the charge-to-vertical-current term and of the scalar potential.
    """
    r0, r1, c0, c1 = block
    A, B = slice(r0, r1), slice(c0, c1)
    t = filler.t
    w0, w1 = filler.wphi
    wa, wb = (w0[A], w1[A]), (w0[B], w1[B])
    full_a, full_b = wa[0] + wa[1], wb[0] + wb[1]
    ux, uy, rho, h = geo["dx"], geo["dy"], geo["rho"], geo["h"]
    vals = table.evaluate_cells(geo["cells"], rho.shape)
    t1c, t0c = closed_form_parts(table.k0, table.eps_c, rho, h)
    t1 = vals[3] + t1c
    t0 = table.k0 ** 2 * (vals[4] + t0c)
    tt_h = (t[A, :2] @ t[B, :2].T)[:, None, :, None]
    tt_v = np.outer(t[A, 2], t[B, 2])[:, None, :, None]
    base = tt_h * vals[0] + tt_v * vals[1]
    # source in B, observation in A: -t_A,z (t_B,h . rho^) T1, rho^ the unit vector from the source point
    fwd = base - (t[A, 2][:, None, None, None] * (t[None, None, B, None, 0] * ux + t[None, None, B, None, 1] * uy)) * t1
    for e in range(2):
        for f in range(2):
            m_a[e][f][A, B] = _reduce(wa[e], fwd, wb[f])
    for f in range(2):
        m_c[f][A, B] = _reduce(full_a, t0, wb[f]) * t[None, B, 2]
    m_phi[A, B] = _reduce(full_a, vals[2], full_b)
    if r0 == c0:
        return
    # the mirror block: source in A, observation in B (rho^ reversed, the source tangent now A's)
    back = base + (t[None, None, B, 2, None] * (t[A, None, None, None, 0] * ux + t[A, None, None, None, 1] * uy)) * t1
    for e in range(2):
        for f in range(2):
            m_a[e][f][B, A] = _reduce(wa[f], back, wb[e]).T
    for f in range(2):
        m_c[f][B, A] = _reduce(wa[f], t0, full_b).T * t[None, A, 2]
    m_phi[B, A] = m_phi[A, B].T


#: Point pairs per block of the remainder fill (memory of one block's kernels, about 16 bytes x 12 each). [1]
BLOCK_PAIRS = 40_000


def remainder_matrices(filler: Filler, table: SommerfeldTable):
    """Vector- and scalar-potential remainder matrices of the half-space at the table's frequency.

    Parameters
    ----------
    filler : Filler
        The discretisation's quadrature (Gauss points and weights per piece).
    table : SommerfeldTable
        The soil's remainder integrals at this frequency.

    Returns
    -------
    a_extra, phi_extra : ndarray of complex, shape (N, N)
        To be added to A [m] and Phi [1/m] (see the module docstring).

    Notes
    -----
    The remainder kernels depend on a pair of points only through the
    horizontal distance and the height sum, so they are evaluated once for
    each block of piece pairs on and above the block diagonal and serve the
    mirror block too (only the horizontal-to-vertical term, which takes the
    source's tangent, is formed for each side). The pair geometry and the
    table cells it falls in are kept on the filler between the frequencies of
    a sweep (up to ``GEOMETRY_CACHE_PAIRS`` point pairs). The piece-by-piece
    matrices go to the basis functions once, at the end.
    """
    topo = filler.topo
    P = topo.n_pieces
    te, ch = filler.te_T, filler.charge_T
    m_a = [[np.zeros((P, P), complex) for _ in range(2)] for _ in range(2)]
    m_c = [np.zeros((P, P), complex) for _ in range(2)]
    m_phi = np.zeros((P, P), complex)
    rows = max(4, int(np.sqrt(BLOCK_PAIRS) // filler.q))
    blocks = _blocks(P, rows)
    geos = _geometry(filler, table, blocks)
    for n, block in enumerate(blocks):
        geo = geos[n] if geos is not None else _pair_geometry(filler, table, block)
        _block(filler, table, block, geo, m_a, m_c, m_phi)
    a_out = sum(te[e] @ (te[f] @ m_a[e][f].T).T for e in range(2) for f in range(2))
    a_out = a_out + sum(ch @ (te[f] @ m_c[f].T).T for f in range(2))
    phi_out = ch @ (ch @ m_phi.T).T
    return np.asarray(a_out, complex), np.asarray(phi_out, complex)
