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

import numpy as np

from aerial.models.fullwave_kernel import Filler
from aerial.models.sommerfeld import SommerfeldTable, closed_form_parts

__all__ = ["remainder_matrices"]


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
    """
    topo = filler.topo
    N, P = topo.n_unknowns, topo.n_pieces
    a_out = np.zeros((N, N), complex)
    phi_out = np.zeros((N, N), complex)
    w0, w1 = filler.wphi
    w_full = w0 + w1
    t = filler.t
    te = filler.te_T
    ch = filler.charge_T
    y = filler.pts  # (P, Q, 3)
    k0, eps_c = table.k0, table.eps_c
    rows = max(1, filler.rows // 2)
    for r0 in range(0, P, rows):
        r1 = min(P, r0 + rows)
        x = y[r0:r1]
        dx = x[:, :, None, None, 0] - y[None, None, :, :, 0]
        dy = x[:, :, None, None, 1] - y[None, None, :, :, 1]
        rho = np.hypot(dx, dy)
        h = x[:, :, None, None, 2] + y[None, None, :, :, 2]
        vals = table.evaluate(rho, h)
        t1c, t0c = closed_form_parts(k0, eps_c, rho, h)
        t1 = vals[3] + t1c
        t0 = k0 * k0 * (vals[4] + t0c)
        with np.errstate(invalid="ignore", divide="ignore"):
            proj = np.where(rho > 0, (t[None, None, :, None, 0] * dx + t[None, None, :, None, 1] * dy)
                            / np.where(rho > 0, rho, 1.0), 0.0)
        g_zx = -proj * t1
        te_rows = (te[0][:, r0:r1], te[1][:, r0:r1])
        tt_h = t[r0:r1, :2] @ t[:, :2].T
        tt_v = np.outer(t[r0:r1, 2], t[:, 2])
        tz_test = t[r0:r1, 2][:, None]
        for e, we in enumerate((w0[r0:r1], w1[r0:r1])):
            for f, wf in enumerate((w0, w1)):
                s_te = np.einsum("ai,aibj,bj->ab", we, vals[0], wf)
                s_tm = np.einsum("ai,aibj,bj->ab", we, vals[1], wf)
                s_zx = np.einsum("ai,aibj,bj->ab", we, g_zx, wf)
                m = tt_h * s_te + tt_v * s_tm + tz_test * s_zx
                a_out += te_rows[e] @ (te[f] @ m.T).T
        for f, wf in enumerate((w0, w1)):
            s_c = np.einsum("ai,aibj,bj->ab", w_full[r0:r1], t0, wf) * t[None, :, 2]
            a_out += ch[:, r0:r1] @ (te[f] @ s_c.T).T
        s_phi = np.einsum("ai,aibj,bj->ab", w_full[r0:r1], vals[2], w_full)
        phi_out += ch[:, r0:r1] @ (ch @ s_phi.T).T
    return a_out, phi_out
