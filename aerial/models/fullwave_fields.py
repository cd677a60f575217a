"""Ground reflection and far-field radiated power for the full-wave solver.

Frame: metres, x east, y north, z up; the ground is the plane z = 0.
Time convention exp(+j omega t).

References
----------
.. [1] C. A. Balanis, *Antenna Theory: Analysis and Design*, 3rd ed., Wiley,
   2005, ch. 4 (radiation vector, far field, radiated power; sec. 4.8 ground
   effects and reflection coefficients). (from memory)
"""

from __future__ import annotations

import math

import numpy as np
import scipy.sparse as sp
from aerial.core.constants import SPEED_OF_LIGHT as C0
from aerial.core.constants import EPSILON_0 as epsilon_0
from aerial.core.constants import MU_0 as mu_0

ETA0 = mu_0 * C0  # free-space wave impedance [ohm]


def complex_permittivity(frequency, relative_permittivity, conductivity):
    """Complex relative permittivity of the soil.

    Parameters
    ----------
    frequency : array_like
        Frequency. [Hz]
    relative_permittivity : float
        Relative permittivity of the soil. [1]
    conductivity : float
        Soil conductivity. [S/m]

    Returns
    -------
    ndarray of complex
        eps_c = eps_r - j sigma / (omega eps0). [1]

    Notes
    -----
    Time convention exp(+j omega t) ([1]_ sec. 4.8).

    References
    ----------
    .. [1] C. A. Balanis, *Antenna Theory*, 3rd ed., Wiley, 2005, sec. 4.8. (from memory)

    Examples
    --------
    >>> e = complex_permittivity(1e6, 15.0, 1e-3)   # ITU-R P.527 medium dry ground
    >>> round(float(e.real), 3), round(float(e.imag), 2)
    (15.0, -17.98)
    """
    omega = 2.0 * np.pi * np.asarray(frequency, dtype=float)
    return relative_permittivity - 1j * conductivity / (omega * epsilon_0)


def fresnel_reflection(cos_incidence, eps_c):
    """Fresnel plane-wave reflection coefficients of a flat half-space.

    Parameters
    ----------
    cos_incidence : array_like
        Cosine of the angle of incidence from the vertical (0 grazing .. 1 normal). [1]
    eps_c : complex or array_like
        Complex relative permittivity of the lower medium. [1]

    Returns
    -------
    r_h, r_v : ndarray of complex
        Coefficients for horizontal polarisation (E parallel to the ground)
        and vertical polarisation (E in the plane of incidence), normalised so
        that a perfect conductor gives r_h = -1 and r_v = +1. [1]

    Notes
    -----
    With c = cos(theta), s^2 = 1 - c^2 ([1]_ sec. 4.8, from memory)::

        r_h = (c - sqrt(eps_c - s^2)) / (c + sqrt(eps_c - s^2))
        r_v = (eps_c c - sqrt(eps_c - s^2)) / (eps_c c + sqrt(eps_c - s^2))

    References
    ----------
    .. [1] C. A. Balanis, *Antenna Theory*, 3rd ed., Wiley, 2005, sec. 4.8. (from memory)

    Examples
    --------
    >>> r_h, r_v = fresnel_reflection(1.0, 4.0)      # normal incidence, eps = 4
    >>> round(float(r_h.real), 6), round(float(r_v.real), 6)
    (-0.333333, 0.333333)
    """
    c = np.asarray(cos_incidence, dtype=float)
    root = np.sqrt(eps_c - (1.0 - c * c) + 0j)
    r_h = (c - root) / (c + root)
    r_v = (eps_c * c - root) / (eps_c * c + root)
    return r_h, r_v


class FarField:
    """Radiated power over the upper half-space from piece currents (fixed direction grid).

    Parameters
    ----------
    start, end : ndarray, shape (P, 3)
        Piece end points. [m]
    group : ndarray of int, shape (P,)
        Pieces with the same value lie on one straight line, consecutively
        (the pieces cut from one input segment).
    k_max : float
        Highest wavenumber the grid must resolve. [rad/m]

    Notes
    -----
    Consecutive collinear pieces are gathered into straight runs no longer
    than 2/k_max. On a run with unit vector t, centre c and local coordinate
    s, the piecewise-linear current has moments M_n = int I(s) s^n ds (exact,
    piece by piece), and its radiation vector is ([1]_ ch. 4)::

        N(r^) = t e^{jk r^.c} sum_n (jk r^.t)^n / n! M_n,

    the series converging to 1e-13 for |k r^.t s| <= 1. The image (perfect
    ground) is the run mirrored in z = 0 with its horizontal current
    reversed. E = -j k eta e^{-jkr}/(4 pi r) (N_theta, N_phi) and the radiated
    power P = k^2 eta/(32 pi^2) int_upper (|N_theta|^2 + |N_phi|^2) dOmega,
    with Gauss-Legendre in cos(theta) and the trapezoid rule in phi (the
    integrand is a trigonometric polynomial of low degree for a structure of
    this electrical size).
    """

    N_TERMS = 18

    def __init__(self, start, end, group, k_max):
        length = np.linalg.norm(end - start, axis=1)
        t = (end - start) / length[:, None]
        P = len(length)
        # split groups into runs of at most 2/k_max
        max_run = 2.0 / max(k_max, 1e-30)
        run = np.zeros(P, dtype=int)
        r, acc = 0, 0.0
        for p in range(P):
            if p and (group[p] != group[p - 1] or acc + length[p] > max_run):
                r += 1
                acc = 0.0
            run[p] = r
            acc += length[p]
        n_run = r + 1
        first = np.searchsorted(run, np.arange(n_run))
        last = np.searchsorted(run, np.arange(n_run), side="right") - 1
        a, b = start[first], end[last]
        self.centre = 0.5 * (a + b)
        self.t = t[first]
        s_a = np.einsum("pk,pk->p", start - self.centre[run], self.t[run])
        s_b = s_a + length
        x_max = k_max * float(np.maximum(np.abs(s_a), np.abs(s_b)).max())
        nt = 1
        while nt < self.N_TERMS and x_max ** (nt + 1) / math.factorial(nt + 1) > 1e-14:
            nt += 1
        self.n_terms = nt
        n = np.arange(nt + 2)
        self.pow_int = (s_b[:, None] ** (n + 1) - s_a[:, None] ** (n + 1)) / (n + 1)  # int s^n ds per piece
        self.s_a, self.length = s_a, length
        self.runs = sp.csr_matrix((np.ones(P), (run, np.arange(P))), shape=(n_run, P))
        self.fact = np.array([math.factorial(i) for i in range(nt + 1)], dtype=float)

        pts = np.vstack([start, end])
        size = float(np.ptp(np.vstack([pts, pts * [1.0, 1.0, -1.0]]), axis=0).max())
        ka = k_max * size
        self.n_t = int(min(64, 4 + math.ceil(0.75 * ka)))
        self.n_p = int(min(128, 6 + 2 * math.ceil(ka)))
        mu, w = np.polynomial.legendre.leggauss(self.n_t)
        self.mu, self.w_mu = 0.5 * (mu + 1.0), 0.5 * w
        phi = 2 * np.pi * np.arange(self.n_p) / self.n_p
        st = np.sqrt(1.0 - self.mu**2)
        cp, sp_ = np.cos(phi), np.sin(phi)
        shape = (self.n_t, self.n_p)
        rhat = np.stack([st[:, None] * cp, st[:, None] * sp_, np.broadcast_to(self.mu[:, None], shape)], -1)
        th = np.stack([self.mu[:, None] * cp, self.mu[:, None] * sp_, np.broadcast_to(-st[:, None], shape)], -1)
        ph = np.stack([np.broadcast_to(-sp_, shape), np.broadcast_to(cp, shape), np.zeros(shape)], -1)
        d = self.n_t * self.n_p
        rhat = rhat.reshape(d, 3)
        flip = np.array([1.0, 1.0, -1.0])
        # per direction, for the runs and then their images (columns 0..R-1, R..2R-1):
        # r^.c, r^.t, and the theta and phi components of the current direction
        # (perfect-conductor image: horizontal part reversed)
        tim = self.t * np.array([-1.0, -1.0, 1.0])
        self.rc = np.hstack([rhat @ self.centre.T, rhat @ (self.centre * flip).T])  # (D, 2R)
        self.rt = np.hstack([rhat @ self.t.T, rhat @ (self.t * flip).T])
        tt = np.vstack([self.t, tim])
        self.t_theta = th.reshape(d, 3) @ tt.T  # (D, 2R)
        self.t_phi = ph.reshape(d, 3) @ tt.T
        self.n_run = n_run

    def power(self, k, current_ends, eps_c=None):
        """Radiated power into the upper half-space. [W]

        Parameters
        ----------
        k : float
            Wavenumber. [rad/m]
        current_ends : ndarray of complex, shape (P, 2)
            Current at each piece's start and end along its tangent. [A]
        eps_c : complex, optional
            Soil permittivity for the lossy ground (image scaled by r_v for the
            theta component and -r_h for the phi component); None for a
            perfect ground.
        """
        eps = None if eps_c is None else np.array([eps_c], dtype=complex)
        return float(self.power_many(np.array([k], dtype=float), np.asarray(current_ends)[None], eps)[0])

    #: Direction-run-frequency values worked on at once in :meth:`power_many`. [1]
    CHUNK_VALUES = 2**18

    def power_many(self, k, current_ends, eps_c=None):
        """Radiated power into the upper half-space at several wavenumbers at once. [W]

        Parameters
        ----------
        k : ndarray, shape (F,)
            Wavenumbers. [rad/m]
        current_ends : ndarray of complex, shape (F, P, 2)
            Current at each piece's start and end along its tangent, per wavenumber. [A]
        eps_c : ndarray of complex, shape (F,), optional
            Soil permittivity per wavenumber (lossy ground); None for a perfect ground.

        Returns
        -------
        ndarray, shape (F,)
            The radiated power of :meth:`power` at each wavenumber. [W]
        """
        k = np.asarray(k, dtype=float)
        out = np.empty(k.size)
        step = max(1, self.CHUNK_VALUES // max(self.rt.size, 1))
        for i0 in range(0, k.size, step):
            sl = slice(i0, i0 + step)
            out[sl] = self._power_chunk(k[sl], current_ends[sl], None if eps_c is None else eps_c[sl])
        return out

    def _power_chunk(self, k, current_ends, eps_c):
        """:meth:`power_many` for one chunk of wavenumbers."""
        F, P = current_ends.shape[:2]
        ia, ib = current_ends[..., 0], current_ends[..., 1]
        beta = (ib - ia) / self.length
        alpha = ia - beta * self.s_a
        nt = self.n_terms
        per_piece = alpha[:, :, None] * self.pow_int[:, : nt + 1] + beta[:, :, None] * self.pow_int[:, 1 : nt + 2]
        moments = self.runs @ per_piece.transpose(1, 0, 2).reshape(P, -1)  # (R, F (nt+1))
        moments = moments.reshape(self.n_run, F, nt + 1).transpose(1, 0, 2)
        moments = np.concatenate([moments, moments], axis=1) / self.fact  # (F, 2R, nt+1): runs then images
        u = 1j * k[:, None, None] * self.rt  # (F, D, 2R)
        acc = np.broadcast_to(moments[:, None, :, nt], u.shape).copy()
        for n in range(nt - 1, -1, -1):
            acc *= u
            acc += moments[:, None, :, n]
        acc *= np.exp(1j * k[:, None, None] * self.rc)
        r = self.n_run
        a_t, a_p = acc * self.t_theta, acc * self.t_phi
        nt_d, nt_i = a_t[..., :r].sum(axis=-1), a_t[..., r:].sum(axis=-1)
        np_d, np_i = a_p[..., :r].sum(axis=-1), a_p[..., r:].sum(axis=-1)
        if eps_c is not None:
            r_h, r_v = fresnel_reflection(np.repeat(self.mu, self.n_p)[None, :], np.asarray(eps_c)[:, None])
            nt_i, np_i = nt_i * r_v, np_i * (-r_h)
        dens = np.abs(nt_d + nt_i) ** 2 + np.abs(np_d + np_i) ** 2
        integral = np.sum(dens.reshape(F, self.n_t, self.n_p) * self.w_mu[:, None], axis=(1, 2)) * (2 * np.pi / self.n_p)
        return k**2 * ETA0 / (32 * np.pi**2) * integral
