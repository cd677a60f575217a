"""Sommerfeld integrals of the field reflected by a lossy half-space, and their interpolation tables.

Frame: metres, z up, the soil fills z < 0; time convention exp(+j omega t).
Source and observation points are both in the air; rho is their horizontal
distance and h = z + z' the height of the observation point above the
source's mirror image, R' = sqrt(rho^2 + h^2).

With u = sqrt(lambda^2 - k0^2), u1 = sqrt(lambda^2 - k1^2) (Re >= 0),
eps = k1^2/k0^2 the soil's complex relative permittivity, the plane-wave
reflection coefficients of the soil are ([1]_, [2]_)::

    R_TE = (u - u1)/(u + u1),   R_TM = (eps u - u1)/(eps u + u1),
    K = (eps - 1)/(eps + 1)     (R_TM as lambda -> infinity: the quasi-static image),

and the reflected potentials of a current element are, in the mixed-potential
form of Michalski and Zheng's "formulation C" for a half-space ([2]_), the
Sommerfeld integrals (Sommerfeld identity e^{-jkR}/R = int J0(lambda rho)
e^{-u|z-z'|} lambda/u dlambda)::

    horizontal vector potential   int R_TE        J0 e^{-uh} lambda/u dlambda / (4 pi)
    vertical vector potential     int R_TM        J0 e^{-uh} lambda/u dlambda / (4 pi)
    scalar potential (charges)    int R_phi       J0 e^{-uh} lambda/u dlambda / (4 pi),
                                  R_phi = (k0^2 R_TE - u^2 R_TM)/lambda^2
    horizontal-to-vertical        T = int (R_TE + R_TM)/lambda J0 e^{-uh} dlambda / (4 pi)

This module evaluates the parts that are left once the quasi-static image
(K e^{-jk0 R'}/(4 pi R'), given to the matrix fill in closed form) and a
closed-form logarithmic part of T are taken out; what remains is bounded and
smooth, and is tabulated over (log R', angle from the vertical) and
interpolated, the scheme of Burke and Miller ([3]_). Each integral runs along
the real lambda axis: [0, k0] with lambda = k0 sin(phi) and [k0, 2 k0] with
lambda = k0 cosh(psi), which remove the branch point at k0 exactly; then
Gauss-Legendre panels no wider than a quarter period of the Bessel function;
the oscillating tail by partial integrals over half periods summed with
repeated averaging (the weighted-averages family reviewed by Michalski, [4]_).

References
----------
.. [1] A. Sommerfeld, "Uber die Ausbreitung der Wellen in der drahtlosen
   Telegraphie", Annalen der Physik 28, 665-736, 1909; A. Banos,
   *Dipole Radiation in the Presence of a Conducting Half-Space*, Pergamon,
   1966, ch. 2 (the Hertz potentials of vertical and horizontal dipoles over
   a half-space). (from memory)
.. [2] K. A. Michalski and D. Zheng, "Electromagnetic scattering and radiation
   by surfaces of arbitrary shape in layered media, Part I: Theory", IEEE
   Trans. Antennas Propag. 38(3), 335-344, 1990 (mixed-potential kernels,
   formulation C). (from memory)
.. [3] G. J. Burke and E. K. Miller, "Modeling antennas near to and
   penetrating a lossy interface", IEEE Trans. Antennas Propag. 32(10),
   1040-1049, 1984 (quasi-static image taken out, the remainder interpolated
   over distance and angle). (from memory)
.. [4] K. A. Michalski, "Extrapolation methods for Sommerfeld integral tails",
   IEEE Trans. Antennas Propag. 46(10), 1405-1418, 1998. (from memory)
"""

from __future__ import annotations

import functools
import math
import time
from collections import OrderedDict
from dataclasses import dataclass

import numpy as np
from aerial.core.constants import EPSILON_0 as epsilon_0
from aerial.core.constants import SPEED_OF_LIGHT as C0
from scipy.special import j0, j1

from aerial.core.errors import ModelInputError

__all__ = ["SommerfeldTable", "sommerfeld_table", "remainder_integrals", "closed_form_parts", "soil_wavenumbers",
           "TABLE_CACHE_SIZE"]

#: Gauss-Legendre points per panel of the lambda integrals. [1]
PANEL_POINTS = 8
#: Panels graded toward the branch point k0 (halving each time). [1]
GRADED_LEVELS = 12
#: Half periods of the Bessel function in the tail, summed by repeated averaging. [1]
TAIL_HALF_PERIODS = 12
#: Table points per decade of R' and over the angle from the vertical. [1]
POINTS_PER_DECADE = 8
ANGLE_POINTS = 13
#: Shortest R' tabulated; below it the (bounded) remainders are taken as at this distance. [m]
MIN_TABLE_DISTANCE = 1e-3
#: Tables kept for reuse (each is one frequency and one soil). [1]
TABLE_CACHE_SIZE = 512

_FOUR_PI = 4.0 * np.pi
_NAMES = ("te", "tm", "phi", "t1", "t0")


def soil_wavenumbers(frequency, relative_permittivity, conductivity):
    """Free-space and soil wavenumbers and the soil's complex relative permittivity.

    Parameters
    ----------
    frequency : float
        [Hz]
    relative_permittivity : float
        [1]
    conductivity : float
        [S/m]

    Returns
    -------
    k0 : float
        [rad/m]
    k1 : complex
        k0 sqrt(eps_c), Im <= 0. [rad/m]
    eps_c : complex
        eps_r - j sigma/(omega eps0). [1]

    Examples
    --------
    >>> k0, k1, e = soil_wavenumbers(1e6, 1.0, 0.0)
    >>> round(float(k1.real / k0), 12)
    1.0
    """
    omega = 2 * np.pi * float(frequency)
    eps_c = complex(relative_permittivity, -conductivity / (omega * epsilon_0))
    k0 = omega / C0
    return k0, k0 * np.sqrt(eps_c), eps_c


def _spectral(lam, u, k0, eps, c):
    """Remainder spectral functions at lambda (u given by the caller's parametrisation)."""
    k02 = k0 * k0
    d = k02 * (eps - 1.0)
    u1 = np.sqrt(lam * lam - eps * k02 + 0j)
    s = u + u1
    tmd = eps * u + u1
    r_te = d / (s * s)
    r_tm_k = 2.0 * eps * d / (s * tmd * (eps + 1.0))
    sigma_sum = 2.0 * d * lam * lam / (k02 * s * tmd) if k02 > 0 else 0.0 * lam
    r_phi_k = 2.0 * d / (s * tmd) - r_tm_k
    kq = (eps - 1.0) / (eps + 1.0)
    sub = kq * (1.0 - np.exp(-lam * c))
    return r_te, r_tm_k, r_phi_k, sigma_sum, sub


def _integrand_terms(lam, u, lam_over_u, k0, eps, c, rho, h):
    """The five integrands (without the measure), shape (5, ...) for rho, h broadcast against lam."""
    r_te, r_tm_k, r_phi_k, ssum, sub = _spectral(lam, u, k0, eps, c)
    e_u = np.exp(-u * h)
    e_l = np.exp(-lam * h)
    x = lam * rho
    b0, b1 = j0(x), j1(x)
    common = lam_over_u * e_u * b0
    tt = ssum * e_u - sub * e_l
    return np.stack([r_te * common, r_tm_k * common, r_phi_k * common, tt * b1,
                     tt * b0 / lam])


@functools.lru_cache(maxsize=8)
def _gauss(n):
    x, w = np.polynomial.legendre.leggauss(n)
    return 0.5 * (x + 1.0), 0.5 * w


def remainder_integrals(k0, eps_c, rho, h):
    """The five remainder integrals at points (rho, h) sharing one R' scale.

    Parameters
    ----------
    k0 : float
        Free-space wavenumber. [rad/m]
    eps_c : complex
        Soil complex relative permittivity. [1]
    rho, h : ndarray, shape (M,)
        Horizontal distance and height above the image. [m]

    Returns
    -------
    ndarray of complex, shape (5, M)
        Divided by 4 pi: R_TE (vector potential, horizontal), R_TM - K
        (vertical), R_phi + K (scalar), and the J1 and J0/lambda integrals of
        (R_TE + R_TM) less the closed-form part (see :func:`closed_form_parts`). [1/m]

    Notes
    -----
    Where eps_c = 1 every reflection coefficient is zero and so is every
    integral. The J0/lambda integral ("t0") enters the matrix multiplied by k0^2.
    """
    rho = np.asarray(rho, float)
    h = np.asarray(h, float)
    eps = complex(eps_c)
    if eps == 1.0:
        return np.zeros((5, rho.size), complex)
    r_scale = float(np.max(np.hypot(rho, h)))
    k1 = k0 * np.sqrt(eps)
    kmax = max(abs(k1), k0)
    c = 1.0 / kmax
    gx, gw = _gauss(PANEL_POINTS)
    total = np.zeros((5, rho.size), complex)
    R = rho[:, None]
    H = h[:, None]
    # [0, k0]: lambda = k0 sin(phi), u = j k0 cos(phi)
    if k0 > 0:
        # graded toward phi = pi/2 (lambda = k0), where the surface-wave pole of R_TM lies close to the path
        n_a = 1 + int(math.ceil(k0 * r_scale / 1.5))
        edges = np.unique(np.concatenate([np.linspace(0.0, 0.25 * np.pi, n_a + 1),
                                          0.5 * np.pi - 0.25 * np.pi * 0.5 ** np.arange(GRADED_LEVELS), [0.5 * np.pi]]))
        phi = (edges[:-1, None] + np.diff(edges)[:, None] * gx).ravel()
        wphi = (np.diff(edges)[:, None] * gw).ravel()
        lam = k0 * np.sin(phi)
        u = 1j * k0 * np.cos(phi)
        dl = k0 * np.cos(phi) * wphi
        lou_dl = -1j * k0 * np.sin(phi) * wphi
        terms = _integrand_terms(lam, u, 1.0, k0, eps, c, R, H)
        total[:3] += np.sum(terms[:3] * lou_dl, axis=-1)
        total[3:] += np.sum(terms[3:] * dl, axis=-1)
        # [k0, 2 k0]: lambda = k0 cosh(psi), u = k0 sinh(psi)
        top = math.acosh(2.0)
        n_b = 1 + int(math.ceil(k0 * r_scale / 1.5))
        edges = np.unique(np.concatenate([[0.0], top * 0.5 ** np.arange(GRADED_LEVELS, 0, -1),
                                          np.linspace(0.5 * top, top, n_b + 1)]))
        psi = (edges[:-1, None] + np.diff(edges)[:, None] * gx).ravel()
        wpsi = (np.diff(edges)[:, None] * gw).ravel()
        lam = k0 * np.cosh(psi)
        u = k0 * np.sinh(psi) + 0j
        terms = _integrand_terms(lam, u, 1.0, k0, eps, c, R, H)
        total[:3] += np.sum(terms[:3] * (k0 * np.cosh(psi) * wpsi), axis=-1)
        total[3:] += np.sum(terms[3:] * (k0 * np.sinh(psi) * wpsi), axis=-1)
        lam_b = 2.0 * k0
    else:
        lam_b = 0.0
    # [2 k0, Lambda]: panels no wider than a quarter period at R' and a quarter of k1
    lam_end = max(6.0 * k0, min(20.0 * kmax, 60.0 / r_scale), 8.0 / r_scale)
    edges = _panel_edges(lam_b, lam_end, 0.5 * np.pi / r_scale, kmax, [abs(k1.real), abs(k1)])
    lam = (edges[:-1, None] + np.diff(edges)[:, None] * gx).ravel()
    w = (np.diff(edges)[:, None] * gw).ravel()
    u = np.sqrt(lam * lam - k0 * k0 + 0j)
    step = 4096
    for s0 in range(0, lam.size, step):
        sl = slice(s0, s0 + step)
        terms = _integrand_terms(lam[sl], u[sl], lam[sl] / u[sl], k0, eps, c, R, H)
        total += np.sum(terms * w[sl], axis=-1)
    total += _tail(lam_end, k0, eps, c, rho, h, r_scale)
    return total / _FOUR_PI


def _panel_edges(lam_a, lam_end, quarter_period, kmax, breaks):
    """Panel edges on [lam_a, lam_end]: no wider than a quarter period, kmax/4, or half the distance from 0."""
    marks = sorted(b for b in breaks if lam_a < b < lam_end) + [lam_end]
    edges = [lam_a]
    a = lam_a
    for mark in marks:
        while a < mark * (1 - 1e-12):
            step = min(quarter_period, max(0.25 * kmax, 0.5 * a))
            a = min(a + step, mark)
            edges.append(a)
    return np.asarray(edges)


def _tail(lam_end, k0, eps, c, rho, h, r_scale):
    """Integral from lam_end to infinity: half-period partial sums, then repeated averaging."""
    gx, gw = _gauss(PANEL_POINTS)
    period = np.pi / np.maximum(rho, 0.3 * r_scale)  # half period of J0(lambda rho) [rad/m]
    n = TAIL_HALF_PERIODS
    x = (np.arange(n)[:, None] + gx[None, :]).ravel()  # in half periods
    wx = np.tile(gw, n)
    lam = lam_end + period[:, None] * x[None, :]  # (M, n*Q)
    u = np.sqrt(lam * lam - k0 * k0 + 0j)
    terms = _integrand_terms(lam, u, lam / u, k0, eps, c, rho[:, None], h[:, None])
    terms = terms * (period[:, None] * wx[None, :])
    parts = terms.reshape(5, rho.size, n, PANEL_POINTS).sum(axis=-1)
    sums = np.cumsum(parts, axis=-1)
    while sums.shape[-1] > 1:
        sums = 0.5 * (sums[..., 1:] + sums[..., :-1])
    return sums[..., 0]


def closed_form_parts(k0, eps_c, rho, h):
    """The closed-form parts taken out of the two (R_TE + R_TM) integrals.

    Parameters
    ----------
    k0 : float
        [rad/m]
    eps_c : complex
        [1]
    rho, h : ndarray
        [m]

    Returns
    -------
    t1, t0 : ndarray of complex
        (K/4 pi) int (1 - e^{-lambda c}) e^{-lambda h} J1 dlambda and the same
        with J0/lambda, c = 1/max(|k1|, k0). [1/m], [1]

    Notes
    -----
    int_0^inf J1(lambda rho) e^{-lambda a} dlambda = (1 - a/sqrt(rho^2 + a^2))/rho,
    int_0^inf J0(lambda rho) (e^{-lambda a} - e^{-lambda b})/lambda dlambda
    = asinh(b/rho) - asinh(a/rho) (tables of Laplace transforms; Gradshteyn
    and Ryzhik 6.611, from memory).
    """
    eps = complex(eps_c)
    kq = (eps - 1.0) / (eps + 1.0)
    k1 = k0 * np.sqrt(eps)
    c = 1.0 / max(abs(k1), k0)
    rho = np.asarray(rho, float)
    h = np.asarray(h, float)
    rp = np.hypot(rho, h)
    rc = np.hypot(rho, h + c)
    with np.errstate(divide="ignore", invalid="ignore"):
        t1 = np.where(rho > 1e-12 * np.maximum(rp, 1e-300),
                      ((h + c) / rc - h / np.maximum(rp, 1e-300)) / np.maximum(rho, 1e-300), 0.0)
    t0 = np.log((c + h + rc) / np.maximum(h + rp, 1e-300))
    return kq * t1 / _FOUR_PI, kq * t0 / _FOUR_PI


@dataclass
class SommerfeldTable:
    """Remainder integrals of one soil at one frequency, tabulated over (log R', angle).

    Attributes
    ----------
    frequency : float
        [Hz]
    eps_c : complex
        Soil complex relative permittivity. [1]
    k0 : float
        [rad/m]
    quasi_static_image : complex
        K = (eps_c - 1)/(eps_c + 1). [1]
    log_r : ndarray
        Natural log of the tabulated R'. [ln m]
    angle : ndarray
        Angle of (rho, h) from the vertical, 0 .. pi/2. [rad]
    values : ndarray of complex, shape (5, len(log_r), len(angle))
        See :func:`remainder_integrals`, multiplied by R' e^{j k0 R'} (the
        spherical-wave factor taken out, as Burke and Miller do, so that
        the tabulated values vary slowly with distance). [1]
    build_seconds : float
        Time taken to build the table. [s]
    """

    frequency: float
    eps_c: complex
    k0: float
    quasi_static_image: complex
    log_r: np.ndarray
    angle: np.ndarray
    values: np.ndarray
    build_seconds: float

    @classmethod
    def build(cls, frequency, relative_permittivity, conductivity, max_distance):
        """Tabulate up to R' = ``max_distance`` [m]."""
        t_start = time.perf_counter()
        k0, _, eps_c = soil_wavenumbers(frequency, relative_permittivity, conductivity)
        r_hi = max(float(max_distance), 10 * MIN_TABLE_DISTANCE) * 1.02
        n_r = 1 + int(math.ceil(POINTS_PER_DECADE * math.log10(r_hi / MIN_TABLE_DISTANCE)))
        log_r = np.linspace(math.log(MIN_TABLE_DISTANCE), math.log(r_hi), n_r)
        angle = np.linspace(0.0, 0.5 * np.pi, ANGLE_POINTS)
        values = np.zeros((5, n_r, ANGLE_POINTS), complex)
        for i, lr in enumerate(log_r):
            r = math.exp(lr)
            # stored with the spherical-wave factor e^{-j k0 R'}/R' taken out, so what is interpolated is smooth
            values[:, i, :] = remainder_integrals(k0, eps_c, r * np.sin(angle), r * np.cos(angle)) * (
                r * np.exp(1j * k0 * r))
        kq = (eps_c - 1.0) / (eps_c + 1.0)
        return cls(float(frequency), eps_c, k0, kq, log_r, angle, values, time.perf_counter() - t_start)

    @property
    def max_distance(self) -> float:
        """Largest tabulated R'. [m]"""
        return float(math.exp(self.log_r[-1]))

    def cells(self, rho, h):
        """Where points (rho, h) [m] fall in the table: R' [m], flat cell index and the four bilinear weights.

        Depends on the geometry and the table's grid only, so a sweep keeps it between frequencies.
        """
        rho = np.asarray(rho, float).ravel()
        h = np.asarray(h, float).ravel()
        rp = np.maximum(np.hypot(rho, h), MIN_TABLE_DISTANCE)
        if np.any(rp > self.max_distance * 1.0001):
            raise ModelInputError(f"Sommerfeld table reaches {self.max_distance:.4g} m; asked for {rp.max():.4g} m")
        x = (np.log(rp) - self.log_r[0]) / (self.log_r[1] - self.log_r[0])
        y = np.arctan2(rho, h) / (self.angle[1] - self.angle[0])
        i = np.clip(np.floor(x).astype(np.intp), 0, len(self.log_r) - 2)
        j = np.clip(np.floor(y).astype(np.intp), 0, len(self.angle) - 2)
        fx, fy = np.clip(x - i, 0.0, 1.0), np.clip(y - j, 0.0, 1.0)
        weights = ((1 - fx) * (1 - fy), fx * (1 - fy), (1 - fx) * fy, fx * fy)
        return rp, i * len(self.angle) + j, weights

    def evaluate_cells(self, cells, shape):
        """Bilinear interpolation of the five remainders at points given by :meth:`cells`, shape (5,) + shape. [1/m]"""
        rp, idx, (w00, w10, w01, w11) = cells
        n_a = len(self.angle)
        flat = self.values.reshape(5, -1)
        out = w00 * flat[:, idx]
        out += w10 * flat[:, idx + n_a]
        out += w01 * flat[:, idx + 1]
        out += w11 * flat[:, idx + n_a + 1]
        out *= np.exp(-1j * self.k0 * rp) / rp
        return out.reshape((5,) + tuple(shape))

    def evaluate(self, rho, h):
        """Bilinear interpolation of the five remainders at (rho, h), shape (5,) + rho.shape. [1/m]"""
        rho = np.asarray(rho, float)
        h = np.asarray(h, float)
        rp = np.maximum(np.hypot(rho, h), MIN_TABLE_DISTANCE)
        if np.any(rp > self.max_distance * 1.0001):
            raise ModelInputError(f"Sommerfeld table reaches {self.max_distance:.4g} m; asked for {rp.max():.4g} m")
        x = (np.log(rp) - self.log_r[0]) / (self.log_r[1] - self.log_r[0])
        y = np.arctan2(rho, h) / (self.angle[1] - self.angle[0])
        i = np.clip(np.floor(x).astype(int), 0, len(self.log_r) - 2)
        j = np.clip(np.floor(y).astype(int), 0, len(self.angle) - 2)
        fx = np.clip(x - i, 0.0, 1.0)
        fy = np.clip(y - j, 0.0, 1.0)
        v = self.values
        out = ((1 - fx) * (1 - fy) * v[:, i, j] + fx * (1 - fy) * v[:, i + 1, j]
               + (1 - fx) * fy * v[:, i, j + 1] + fx * fy * v[:, i + 1, j + 1])
        return out * (np.exp(-1j * self.k0 * rp) / rp)


_CACHE: "OrderedDict[tuple, SommerfeldTable]" = OrderedDict()

#: Tables are built at frequencies 10^(j / FREQUENCIES_PER_DECADE) Hz and interpolated between them. [1]
FREQUENCIES_PER_DECADE = 48


def _cached(frequency, relative_permittivity, conductivity, reach):
    key = (float(frequency), float(relative_permittivity), float(conductivity), float(reach))
    table = _CACHE.get(key)
    if table is None:
        table = SommerfeldTable.build(frequency, relative_permittivity, conductivity, reach)
        _CACHE[key] = table
        while len(_CACHE) > TABLE_CACHE_SIZE:
            _CACHE.popitem(last=False)
    else:
        _CACHE.move_to_end(key)
    return table


def sommerfeld_table(frequency, relative_permittivity, conductivity, max_distance) -> SommerfeldTable:
    """The remainder table for this soil at ``frequency`` [Hz], reaching at least ``max_distance`` [m].

    Tables are built on a fixed grid of frequencies (``FREQUENCIES_PER_DECADE``
    per decade, about 5 % apart) and distances (a power of two), kept (up to
    ``TABLE_CACHE_SIZE``) and interpolated linearly in log frequency, so one
    band's few tables serve every frequency of a sweep and every geometry of a
    layout search or a what-if. The quasi-static image and the closed-form
    parts are always evaluated at the exact frequency.

    Examples
    --------
    >>> t = sommerfeld_table(1e6, 15.0, 0.005, 20.0)
    >>> t.max_distance >= 20.0, round(t.frequency)
    (True, 1000000)
    """
    f = float(frequency)
    reach = 2.0 ** math.ceil(math.log2(max(float(max_distance), 1e-3)))
    x = math.log10(f) * FREQUENCIES_PER_DECADE
    j = math.floor(x)
    frac = x - j
    lo = _cached(10 ** (j / FREQUENCIES_PER_DECADE), relative_permittivity, conductivity, reach)
    if frac < 1e-9:
        values = lo.values
    else:
        hi = _cached(10 ** ((j + 1) / FREQUENCIES_PER_DECADE), relative_permittivity, conductivity, reach)
        values = (1.0 - frac) * lo.values + frac * hi.values
    k0, _, eps_c = soil_wavenumbers(f, relative_permittivity, conductivity)
    return SommerfeldTable(f, eps_c, k0, (eps_c - 1.0) / (eps_c + 1.0), lo.log_r, lo.angle, values, 0.0)
