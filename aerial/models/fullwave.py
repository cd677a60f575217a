"""Full-wave thin-wire solver: method of moments for straight wires over ground.

Frame: metres, x east, y north, z up; the ground is the plane z = 0.

Formulation: the mixed-potential electric-field integral equation (EFIE) for
thin wires with the reduced kernel, triangle (rooftop) basis functions and
Galerkin testing ([1]_, [2]_), images in the ground plane, a delta-gap feed,
distributed skin-effect impedance of the wire and the lumped earth-electrode
resistance. See :mod:`aerial.models.fullwave_geometry` for the topology and
:mod:`aerial.models.fullwave_kernel` for the matrix fill.

Ground models (``ground``):

* ``"perfect"`` (default): a perfectly conducting plane, exact images.
* ``"lossy"``: the reflection-coefficient approximation: the image of each
  basis function is scaled by the Fresnel plane-wave reflection coefficients
  of the soil (complex permittivity eps_c = eps_r - j sigma/(omega eps0)) at
  the specular angle between the two basis functions' centres, the horizontal
  current by R_h and the vertical current and charge by R_v ([3]_, [4]_). It
  is a far-field approximation: rough for wires lower than about a tenth of a
  wavelength, which at LF/MF is nearly every receiving aerial, so the result
  carries a warning. The ground loss of the earth system is better added
  through ``series_ohm`` over a perfect ground.

Validity: thin wires (radius << piece length << wavelength, radius << wavelength),
all wires above the ground plane, the feed at the junction of the aerial and
the earth side. Out-of-range conditions come back in ``warnings``.

References
----------
.. [1] S. M. Rao, D. R. Wilton and A. W. Glisson, "Electromagnetic scattering
   by surfaces of arbitrary shape", IEEE Trans. Antennas Propag. 30(3),
   409-418, 1982 (triangle basis, mixed-potential Galerkin form).
.. [2] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
   1968, ch. 4.
.. [3] C. A. Balanis, *Antenna Theory: Analysis and Design*, 3rd ed., Wiley,
   2005, sec. 4.8 (ground effects, reflection coefficients). (from memory)
.. [4] E. K. Miller, A. J. Poggio, G. J. Burke and E. S. Selden, "Analysis of
   wire antennas in the presence of a conducting half-space", Can. J. Phys.
   50, 1972 (the reflection-coefficient approximation for wires). (from memory)
.. [5] E. H. Newman, "Generation of wide-band data from the method of
   moments by interpolating the impedance matrix", IEEE Trans. Antennas
   Propag. 36(12), 1820-1824, 1988. (from memory)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import scipy.linalg as sla
from scipy.constants import c as C0
from scipy.constants import epsilon_0, mu_0

from aerial.errors import ModelInputError
from aerial.models.fullwave_geometry import (
    DEFAULT_MIN_PIECES_PER_WIRE,
    Topology,
    build_topology,
    check_segments,
    piece_counts,
)
from aerial.models.fullwave_kernel import DEFAULT_GAUSS_POINTS, Filler
from aerial.models.segments import Segments

try:  # the shared conductor model
    from aerial.models.conductor import internal_impedance_per_m as _internal_impedance
except ImportError:  # pragma: no cover - private fallback
    _internal_impedance = None

ETA0 = mu_0 * C0  # free-space wave impedance [ohm]

#: Valid ``ground`` options.
GROUND_MODELS = ("perfect", "lossy")

#: Longest piece as a fraction of the shortest wavelength (lambda/20). [1]
DEFAULT_MAX_SEGMENT_WAVELENGTHS = 0.05
#: Relative change of Z from N to 2N pieces accepted as converged. [1]
DEFAULT_CONVERGENCE_TOLERANCE = 0.01
#: Target relative accuracy of the band-interpolated matrix. [1]
DEFAULT_INTERPOLATION_TOLERANCE = 1e-11
#: Memory allowed for the interpolation tables and the matrices. [byte]
DEFAULT_MEMORY_LIMIT = 200 * 2**20
#: Relative error of the input resistance (from the condition number) above
#: which the resistance is taken from the power balance instead. [1]
RESISTANCE_RESOLUTION_TOLERANCE = 1e-3
#: Estimated relative error of the currents above which the moment solution
#: is replaced by the quasi-static one. [1]
QUASI_STATIC_HANDOFF = 1e-6
#: Electrical size k * (largest dimension) below which the quasi-static
#: solution is used directly. [1]
QUASI_STATIC_KD = 1e-6
#: ka above which the thin-wire approximation is doubtful. [1]
MAX_KA = 0.05
#: Wire height (in wavelengths) below which the reflection-coefficient
#: approximation is flagged as rough. [1]
RCA_MIN_HEIGHT_WAVELENGTHS = 0.1
#: Highest interpolation degree before a band is split. [1]
MAX_INTERPOLATION_DEGREE = 8
#: Relative mismatch between the power-balance and V/I resistances reported as a warning. [1]
POWER_BALANCE_WARNING = 0.02

_EPS = np.finfo(float).eps


@dataclass(frozen=True)
class FullWaveResult:
    """Result of :func:`solve_full_wave` (all arrays indexed by frequency first).

    Attributes
    ----------
    frequency : ndarray, shape (F,)
        Frequencies. [Hz]
    impedance : ndarray of complex, shape (F,)
        Input impedance at the feed, including ``series_resistance``. [ohm]
    feed_current : ndarray of complex, shape (F,)
        Feed current for 1 V at the gap. [A]
    current_position : ndarray, shape (P, 3)
        Piece midpoints where ``current`` is given. [m]
    current_direction : ndarray, shape (P, 3)
        Unit vector of the positive current direction on each piece.
    current : ndarray of complex, shape (F, P)
        Current at each piece midpoint for 1 V at the feed. [A]
    current_ends : ndarray of complex, shape (F, P, 2)
        Current at each piece's start and end for 1 V at the feed. [A]
    effective_height : ndarray of complex, shape (F,)
        Vertical current moment divided by the feed current,
        (1/I0) int I(s) s_z ds over the real wires. [m]
    open_circuit_voltage_per_field : ndarray of complex, shape (F,)
        Open-circuit voltage per unit vertical field at the ground (the field
        including its ground reflection), by reciprocity equal to
        ``effective_height``. [V per V/m]
    radiation_resistance : ndarray, shape (F,)
        2 P_rad / |I0|^2 with P_rad from the far field integrated over the
        upper half-space. [ohm]
    conductor_loss_resistance : ndarray, shape (F,)
        Skin-effect loss of the wires referred to the feed current. [ohm]
    electrode_loss_resistance : ndarray, shape (F,)
        Earth-electrode loss (``electrode_ohm`` |I_e/I0|^2). [ohm]
    series_resistance : float
        Ground-system loss added in series (the ``series_ohm`` argument). [ohm]
    ground_loss_resistance : ndarray, shape (F,)
        Lossy ground only: input resistance not accounted for by the space-wave
        radiation and the wire and electrode losses (ground absorption plus
        power leaving along the surface); zero on a perfect ground. [ohm]
    efficiency : ndarray, shape (F,)
        radiation_resistance / Re(impedance). [1]
    capacitance : ndarray, shape (F,)
        -1/(omega X) where the reactance X < 0, else 0. [F]
    capacitive : ndarray of bool, shape (F,)
        Where X < 0 (``capacitance`` is meaningful).
    power_balance_mismatch : ndarray, shape (F,)
        |R_in - (R_rad + R_loss)| / R_in on a perfect ground (the self-check of
        the far-field integration); 0 when the resistance was taken from the
        power balance or the ground is lossy. [1]
    condition_number : ndarray, shape (F,)
        1-norm condition number estimate of the impedance matrix. [1]
    method : tuple of str, length F
        "moment", "moment, resistance from power balance" or "quasi-static".
    convergence : float
        |Z(2N) - Z(N)| / |Z(2N)| at ``convergence_frequency`` (the highest
        frequency); N/2 against N when 2N does not fit the memory limit. [1]
    convergence_resistance : float
        The same for the resistance. [1]
    convergence_frequency : float
        Where the check was made (0 when it was skipped). [Hz]
    converged : bool
        ``convergence`` below ``convergence_tolerance``.
    convergence_tolerance : float
        [1]
    n_unknowns, n_pieces : int
        Basis functions and pieces.
    interpolation : str
        How the band was filled (direct, or the interpolation sub-bands and degrees).
    ground : str
        The ground option used.
    model : str
        One line naming the method and the ground treatment.
    warnings : tuple of str
        Everything outside a model's validity range, and hand-offs.
    """

    frequency: np.ndarray
    impedance: np.ndarray
    feed_current: np.ndarray
    current_position: np.ndarray
    current_direction: np.ndarray
    current: np.ndarray
    current_ends: np.ndarray
    effective_height: np.ndarray
    open_circuit_voltage_per_field: np.ndarray
    radiation_resistance: np.ndarray
    conductor_loss_resistance: np.ndarray
    electrode_loss_resistance: np.ndarray
    series_resistance: float
    ground_loss_resistance: np.ndarray
    efficiency: np.ndarray
    capacitance: np.ndarray
    capacitive: np.ndarray
    power_balance_mismatch: np.ndarray
    condition_number: np.ndarray
    method: tuple
    convergence: float
    convergence_resistance: float
    convergence_frequency: float
    converged: bool
    convergence_tolerance: float
    n_unknowns: int
    n_pieces: int
    interpolation: str
    ground: str
    model: str
    warnings: tuple = field(default=())


# ============================================================== small physics functions
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
    >>> round(e.real, 3), round(e.imag, 2)
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
    With c = cos(theta), s^2 = 1 - c^2 ([1]_ eqs. 4-125, 4-126; numbering from memory)::

        r_h = (c - sqrt(eps_c - s^2)) / (c + sqrt(eps_c - s^2))
        r_v = (eps_c c - sqrt(eps_c - s^2)) / (eps_c c + sqrt(eps_c - s^2))

    References
    ----------
    .. [1] C. A. Balanis, *Antenna Theory*, 3rd ed., Wiley, 2005, sec. 4.8. (from memory)

    Examples
    --------
    >>> r_h, r_v = fresnel_reflection(1.0, 4.0)      # normal incidence, eps = 4
    >>> float(r_h.real), float(r_v.real)
    (-0.3333333333333333, 0.3333333333333333)
    """
    c = np.asarray(cos_incidence, dtype=float)
    root = np.sqrt(eps_c - (1.0 - c * c) + 0j)
    r_h = (c - root) / (c + root)
    r_v = (eps_c * c - root) / (eps_c * c + root)
    return r_h, r_v


def _internal_impedance_fallback(radius, frequency, resistivity, relative_permeability):
    """Skin-effect internal impedance per metre (private fallback, Bessel form)."""
    from scipy.special import ive

    gamma = np.sqrt(1j * 2 * np.pi * frequency * mu_0 * relative_permeability / resistivity)
    ga = gamma * radius
    return gamma * resistivity / (2 * np.pi * radius) * ive(0, ga) / ive(1, ga)


def wire_impedance_per_m(radius, frequency, resistivity, relative_permeability):
    """Internal (skin-effect) impedance of each wire per metre; zero resistivity is a perfect conductor. [ohm/m]"""
    radius, resistivity, mur = np.broadcast_arrays(radius, resistivity, relative_permeability)
    out = np.zeros(radius.shape, dtype=complex)
    ok = resistivity > 0
    if np.any(ok):
        fn = _internal_impedance if _internal_impedance is not None else _internal_impedance_fallback
        out[ok] = np.asarray(fn(radius[ok], frequency, resistivity[ok], mur[ok]), dtype=complex)
    return out


def _check_option(name, value, choices):
    if value not in choices:
        raise ModelInputError(f"{value!r} is not a valid {name}, must be one of " + ", ".join(repr(c) for c in choices))


# ============================================================== the solver
class _System:
    """Everything about one discretisation that does not depend on frequency."""

    def __init__(self, segments, counts, ground, eps_soil, sigma_soil, n_gauss):
        self.topo: Topology = build_topology(segments, counts)
        self.ground = ground
        self.eps_soil, self.sigma_soil = eps_soil, sigma_soil
        self.filler = Filler(self.topo, n_gauss=n_gauss)
        topo = self.topo
        # support centroids of the basis functions (phase reference, RCA angles)
        mid = topo.midpoint
        te0, te1 = abs(topo.t_end[0]), abs(topo.t_end[1])
        w = (te0 + te1).T.tocsr()  # (N, P) pieces each basis lives on
        wl = w @ topo.length
        self.centroid = (w @ (mid * topo.length[:, None])) / wl[:, None]
        flip = np.array([1.0, 1.0, -1.0])
        dc = self.centroid
        self.r_direct = np.linalg.norm(dc[:, None, :] - dc[None, :, :], axis=2)
        self.r_image = np.linalg.norm(dc[:, None, :] - (dc * flip)[None, :, :], axis=2)
        # mass matrix of the linear shapes on one piece: [[1/3, 1/6], [1/6, 1/3]] L
        self._static = None
        pts = np.vstack([topo.start, topo.end])
        self.size = float(max(np.ptp(pts, axis=0).max(), pts[:, 2].max() * 2, topo.length.sum() / 4))

    # ---------- parts of Z
    def pec_coefficients(self, k):
        a, p = 1j * k * ETA0, ETA0 / (1j * k)
        return {"A_direct": a, "A_image_h": -a, "A_image_v": a, "Phi_direct": p, "Phi_image": -p}

    def reflection(self, k):
        """Per basis pair (r_h, r_v) for the lossy ground, at the centroid specular angle."""
        f = k * C0 / (2 * np.pi)
        eps_c = complex_permittivity(f, self.eps_soil, self.sigma_soil)
        zsum = self.centroid[:, 2][:, None] + self.centroid[:, 2][None, :]
        cos_t = np.clip(zsum / np.maximum(self.r_image, 1e-30), 0.0, 1.0)
        return fresnel_reflection(cos_t, eps_c)

    def matrix_direct(self, k):
        """Free-of-loss impedance matrix at k by a direct fill. [ohm]"""
        if self.ground == "perfect":
            (z,) = self.filler.fill(k, [self.pec_coefficients(k)])
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
        r_h, r_v = self.reflection(k)
        ad += r_h * ah + r_v * av
        pd -= r_v * pi_
        return ad, pd

    def loop_tree(self):
        """Orthonormal loop and tree bases of the current space: (U, number of loops).

        Loops (including loops closed through the ground) are the null space
        of the charge matrix: currents that deposit no charge anywhere.
        """
        if not hasattr(self, "_lt"):
            d = self.topo.charge.toarray() * self.topo.length[:, None]
            _, s, vt = np.linalg.svd(d, full_matrices=True)
            rank = int(np.count_nonzero(s > s.max() * 1e-10)) if s.size else 0
            u = np.vstack([vt[rank:], vt[:rank]]).T  # loops first
            self._lt = (u, vt.shape[0] - rank)
        return self._lt

    def loss_matrix(self, f):
        """Wire internal impedance and electrode resistance, (N, N). [ohm]"""
        topo = self.topo
        zi = wire_impedance_per_m(topo.radius, f, topo.resistivity, topo.relative_permeability)
        zl = zi * topo.length
        t0, t1 = topo.t_end
        m = (t0.T @ (t0.multiply(zl[:, None] / 3)) + t0.T @ (t1.multiply(zl[:, None] / 6))
             + t1.T @ (t0.multiply(zl[:, None] / 6)) + t1.T @ (t1.multiply(zl[:, None] / 3)))
        out = m.toarray().astype(complex)
        out[np.diag_indices_from(out)] += self.topo.electrode
        return out, zi

    def static_potential(self):
        """The k -> 0 scalar-potential matrix Phi (direct minus image), real. [1/m]"""
        if self._static is None:
            (phi,) = self.filler.fill(0.0, [{"Phi_direct": 1.0, "Phi_image": -1.0}])
            self._static = phi.real
        return self._static


class _BandTable:
    """Impedance matrix interpolated in wavenumber across a sub-band (perfect ground).

    The direct and image parts of A and Phi are filled at Chebyshev points of
    k, multiplied by exp(+jkR) with R the distance between basis centroids
    (removing the fast phase, [5]_ of the module) and fitted with a polynomial
    in k; Z = (j eta / k) [k^2 A(k) - Phi(k)] exp(-jkR) is then rebuilt at
    any k of the sub-band with a few array operations.
    """

    def __init__(self, system: _System, k_lo, k_hi, degree):
        self.k_lo, self.k_hi, self.degree = k_lo, k_hi, degree
        self.c0, self.c1 = 0.5 * (k_hi + k_lo), 0.5 * (k_hi - k_lo)
        n = degree + 1
        xs = np.cos(np.pi * (np.arange(n) + 0.5) / n)[::-1]
        vinv = np.linalg.inv(np.vander(xs, n, increasing=True))
        sysm = system
        rd, ri = sysm.r_direct, sysm.r_image
        N = system.topo.n_unknowns
        vals = np.empty((4, n, N, N), dtype=complex)
        for i, x in enumerate(xs):
            k = self.c0 + self.c1 * x
            ad, pd, ai, pi_ = sysm.filler.fill(
                k, [{"A_direct": 1.0}, {"Phi_direct": 1.0}, {"A_image_h": -1.0, "A_image_v": 1.0}, {"Phi_image": -1.0}]
            )
            ed, ei = np.exp(1j * k * rd), np.exp(1j * k * ri)
            vals[0, i], vals[1, i], vals[2, i], vals[3, i] = ad * ed, pd * ed, ai * ei, pi_ * ei
        coef = np.tensordot(vinv, vals, axes=([1], [1]))  # (n, 4, N, N) monomial coefficients in x
        # Y(x) = k^2 A(x) - Phi(x), k = c0 + c1 x
        y = np.zeros((2, n + 2, N, N), dtype=complex)
        for part, (ia, ip) in enumerate(((0, 1), (2, 3))):
            for j in range(n):
                a = coef[j, ia]
                y[part, j] += self.c0**2 * a
                y[part, j + 1] += 2 * self.c0 * self.c1 * a
                y[part, j + 2] += self.c1**2 * a
                y[part, j] -= coef[j, ip]
        self.y = y
        self.rd, self.ri = rd, ri

    def matrix(self, k):
        x = (k - self.c0) / self.c1
        out = None
        for part, r in ((0, self.rd), (1, self.ri)):
            acc = self.y[part, -1].copy()
            for j in range(self.y.shape[1] - 2, -1, -1):
                acc *= x
                acc += self.y[part, j]
            acc *= np.exp(-1j * k * r)
            if out is None:
                out = acc
            else:
                out += acc
        out *= 1j * ETA0 / k
        return out


def _interp_degree(dk, dr, tol):
    """Smallest Chebyshev degree whose error bound 2 (dk dr / 4)^(p+1) / (p+1)! is below tol."""
    x = dk * dr / 4.0
    for p in range(2, MAX_INTERPOLATION_DEGREE + 1):
        if 2.0 * x ** (p + 1) / math.factorial(p + 1) <= tol:
            return p
    return None


def _lu_solve(z, rhs):
    """Solve z x = rhs by LU; return x and the 1-norm condition estimate."""
    anorm = np.abs(z).sum(axis=0).max()
    lu, piv = sla.lu_factor(z, overwrite_a=True, check_finite=False)
    x = sla.lu_solve((lu, piv), rhs, check_finite=False)
    rcond, info = sla.lapack.zgecon(lu, anorm, norm="1")
    cond = 1.0 / rcond if rcond > 0 else np.inf
    return x, cond


def _far_field_power(topo, currents_ends, k, ground_refl=None):
    """Radiated power over the upper half-space for the given piece-end currents. [W]

    Notes
    -----
    Radiation vector N(r^) = sum over the real pieces and their images of
    int I(s) t e^{jk r^.r} ds (2 Gauss points per piece), E = -j k eta/(4 pi r) (N_theta, N_phi)
    and P = k^2 eta / (32 pi^2) int_upper (|N_theta|^2 + |N_phi|^2) dOmega,
    with Gauss-Legendre in cos(theta) and the trapezoid rule in phi. For the
    lossy ground the image contribution is scaled by r_v(theta) for the
    theta component and -r_h(theta) for the phi component ([3]_ of the module).
    """
    size = np.ptp(np.vstack([topo.start, topo.end, topo.start * [1, 1, -1]]), axis=0).max()
    ka = k * size
    n_t = int(min(64, 6 + math.ceil(ka)))
    n_p = int(min(128, 8 + 2 * math.ceil(ka)))
    mu, wmu = np.polynomial.legendre.leggauss(n_t)
    mu, wmu = 0.5 * (mu + 1.0), 0.5 * wmu  # cos(theta) in (0, 1)
    phi = 2 * np.pi * np.arange(n_p) / n_p
    st = np.sqrt(1 - mu**2)
    # directions and unit vectors (n_t, n_p, 3)
    cp, sp_ = np.cos(phi), np.sin(phi)
    rhat = np.stack([st[:, None] * cp, st[:, None] * sp_, np.broadcast_to(mu[:, None], (n_t, n_p))], -1)
    th = np.stack([mu[:, None] * cp, mu[:, None] * sp_, np.broadcast_to(-st[:, None], (n_t, n_p))], -1)
    ph = np.stack([-np.broadcast_to(sp_, (n_t, n_p)), np.broadcast_to(cp, (n_t, n_p)), np.zeros((n_t, n_p))], -1)
    g = np.array([0.5 - 0.5 / np.sqrt(3), 0.5 + 0.5 / np.sqrt(3)])
    pts = topo.start[:, None, :] + g[None, :, None] * (topo.end - topo.start)[:, None, :]  # (P,2,3)
    i_at = currents_ends[:, 0, None] * (1 - g) + currents_ends[:, 1, None] * g  # (P,2)
    mom = (0.5 * topo.length[:, None] * i_at)[..., None] * topo.tangent[:, None, :]  # (P,2,3) current moments
    pts = pts.reshape(-1, 3)
    mom = mom.reshape(-1, 3)
    flip = np.array([1.0, 1.0, -1.0])
    dirs = rhat.reshape(-1, 3)
    ph_d = np.exp(1j * k * dirs @ pts.T)  # (D, M)
    ph_i = np.exp(1j * k * dirs @ (pts * flip).T)
    n_d = ph_d @ mom  # (D, 3)
    n_i = ph_i @ (mom * np.array([-1.0, -1.0, 1.0]))  # perfect-conductor image current
    thv, phv = th.reshape(-1, 3), ph.reshape(-1, 3)
    nt_d, np_d = np.sum(n_d * thv, 1), np.sum(n_d * phv, 1)
    nt_i, np_i = np.sum(n_i * thv, 1), np.sum(n_i * phv, 1)
    if ground_refl is not None:
        r_h, r_v = fresnel_reflection(np.repeat(mu, n_p), ground_refl)
        nt_i, np_i = nt_i * r_v, np_i * (-r_h)
    dens = np.abs(nt_d + nt_i) ** 2 + np.abs(np_d + np_i) ** 2
    integral = np.sum(dens.reshape(n_t, n_p) * wmu[:, None]) * (2 * np.pi / n_p)
    return k**2 * ETA0 / (32 * np.pi**2) * integral


def solve_full_wave(
    segments: Segments,
    frequency,
    *,
    ground: str = "perfect",
    soil_permittivity: float | None = None,
    soil_conductivity: float | None = None,
    series_ohm: float = 0.0,
    max_segment_wavelengths: float = DEFAULT_MAX_SEGMENT_WAVELENGTHS,
    min_pieces_per_wire: int = DEFAULT_MIN_PIECES_PER_WIRE,
    convergence_check: bool = True,
    convergence_tolerance: float = DEFAULT_CONVERGENCE_TOLERANCE,
    band_interpolation: bool = True,
    interpolation_tolerance: float = DEFAULT_INTERPOLATION_TOLERANCE,
    memory_limit: int = DEFAULT_MEMORY_LIMIT,
    gauss_points: int = DEFAULT_GAUSS_POINTS,
    progress=None,
) -> FullWaveResult:
    """Input impedance, currents and effective height of a wire aerial by the method of moments.

    Parameters
    ----------
    segments : Segments
        The aerial and (optionally) the earth lead. Frame: m, z up, ground at z = 0.
    frequency : array_like
        Frequencies, positive. [Hz]
    ground : {"perfect", "lossy"}
        Perfect ground plane (images), or the reflection-coefficient
        approximation for a lossy soil.
    soil_permittivity : float, optional
        Relative permittivity of the soil; required for ``ground="lossy"``. [1]
    soil_conductivity : float, optional
        Soil conductivity; required for ``ground="lossy"``. [S/m]
    series_ohm : float
        Ground-system loss computed elsewhere, added in series to the input
        impedance and to the loss budget. [ohm]
    max_segment_wavelengths : float
        Longest piece as a fraction of the shortest wavelength. [1]
    min_pieces_per_wire : int
        Fewest pieces per user wire at any frequency. [1]
    convergence_check : bool
        Solve again with every piece halved at the highest frequency and
        report the relative change.
    convergence_tolerance : float
        Relative change of the impedance accepted as converged. [1]
    band_interpolation : bool
        Interpolate the impedance matrix across the band when it pays
        (perfect ground, several frequencies, memory permitting).
    interpolation_tolerance : float
        Target relative accuracy of the interpolated matrix elements. [1]
    memory_limit : int
        Memory the interpolation tables and the convergence check may use. [byte]
    gauss_points : int
        Gauss-Legendre points per piece in the matrix fill. [1]
    progress : callable, optional
        Called as ``progress(done, total)`` after each frequency.

    Returns
    -------
    FullWaveResult

    Notes
    -----
    Galerkin mixed-potential EFIE ([1]_ of the module)::

        sum_n Z_mn I_n = V_m,  Z_mn = j k eta A_mn + eta/(j k) Phi_mn + Z^loss_mn,

    V_m = 1 V on the basis function that crosses the feed gap. The input
    impedance is Z = 1/I0 + ``series_ohm``; the effective height
    h_e = (1/I0) int I(s) s_z ds; the radiation resistance 2 P_rad/|I0|^2 from
    the far field over the upper half-space; the capacitance -1/(omega X).

    Low frequencies: where the condition number says the small real part of
    V/I is not resolved, the resistance is taken from the power balance
    (radiated power from the far field plus the wire and electrode losses),
    which stays accurate; where even the currents are not resolved (or the
    aerial is electrically tiny) the quasi-static solution of the same
    discretisation is used (C and h_e from the k -> 0 charge problem,
    R_rad = 160 pi^2 (h_e/lambda)^2). Both hand-offs are reported in
    ``warnings`` and ``method``.

    References
    ----------
    See the module docstring.
    """
    _check_option("ground", ground, GROUND_MODELS)
    f = np.atleast_1d(np.asarray(frequency, dtype=float))
    if f.ndim != 1 or f.size == 0 or not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError(f"frequency must be a non-empty 1-D array of positive finite values [Hz], got {frequency!r}")
    for name, val, lo in (("max_segment_wavelengths", max_segment_wavelengths, 0.0),
                          ("convergence_tolerance", convergence_tolerance, 0.0),
                          ("interpolation_tolerance", interpolation_tolerance, 0.0)):
        if not (np.isfinite(val) and val > lo):
            raise ModelInputError(f"{name} must be positive and finite, got {val!r}")
    if max_segment_wavelengths > 0.25:
        raise ModelInputError(f"max_segment_wavelengths must be at most 0.25, got {max_segment_wavelengths!r}")
    if not (np.isfinite(series_ohm) and series_ohm >= 0):
        raise ModelInputError(f"series_ohm must be >= 0 [ohm], got {series_ohm!r}")
    if int(min_pieces_per_wire) < 1 or int(gauss_points) < 2:
        raise ModelInputError("min_pieces_per_wire must be >= 1 and gauss_points >= 2")
    eps_s = sig_s = None
    if ground == "lossy":
        if soil_permittivity is None or soil_conductivity is None:
            raise ModelInputError("ground='lossy' needs soil_permittivity [1] and soil_conductivity [S/m]")
        eps_s, sig_s = float(soil_permittivity), float(soil_conductivity)
        if not (np.isfinite(eps_s) and eps_s >= 1.0) or not (np.isfinite(sig_s) and sig_s >= 0.0):
            raise ModelInputError("soil_permittivity must be >= 1 and soil_conductivity >= 0 and finite")
    check_segments(segments)

    warnings: list[str] = []
    lam_min = C0 / f.max()
    counts = piece_counts(segments, max_segment_wavelengths * lam_min, min_pieces_per_wire)
    system = _System(segments, counts, ground, eps_s, sig_s, gauss_points)
    topo = system.topo
    warnings.extend(topo.warnings)
    N, P = topo.n_unknowns, topo.n_pieces
    if np.max(topo.length) > max_segment_wavelengths * lam_min * 1.0001:
        warnings.append("some pieces are longer than the requested fraction of a wavelength")
    ka = 2 * np.pi * f.max() / C0 * topo.radius.max()
    if ka > MAX_KA:
        warnings.append(f"wire radius is {ka:.3g}/k at the highest frequency: thin-wire approximation doubtful (ka > {MAX_KA:g})")
    if ground == "lossy":
        hmax = max(topo.start[:, 2].max(), topo.end[:, 2].max())
        if hmax < RCA_MIN_HEIGHT_WAVELENGTHS * lam_min:
            warnings.append(
                f"lossy ground: the reflection-coefficient approximation is rough for wires below "
                f"{RCA_MIN_HEIGHT_WAVELENGTHS:g} wavelength (highest point {hmax / lam_min:.3g} wavelength); "
                "its resistance is an indication only"
            )

    # ---------- band plan
    order = np.argsort(f)
    k_all = 2 * np.pi * f / C0
    tables = _plan_band(system, k_all[order], band_interpolation and ground == "perfect", interpolation_tolerance, memory_limit)
    interp_desc = "direct fill at every frequency" if not tables else "; ".join(
        f"{t.k_lo * C0 / 2 / np.pi / 1e6:.6g}-{t.k_hi * C0 / 2 / np.pi / 1e6:.6g} MHz degree {t.degree}" for t in tables
    )

    F = f.size
    z_in = np.zeros(F, complex)
    i_feed = np.zeros(F, complex)
    cur_ends = np.zeros((F, P, 2), complex)
    h_eff = np.zeros(F, complex)
    r_rad = np.zeros(F)
    r_cond = np.zeros(F)
    r_elec = np.zeros(F)
    r_gnd = np.zeros(F)
    mismatch = np.zeros(F)
    cond = np.zeros(F)
    method = [""] * F
    v = topo.feed_weight.astype(complex)
    t0, t1 = topo.t_end
    hand_pb, hand_qs, hand_lt = [], [], []

    for done, i in enumerate(order, start=1):
        fi, k = f[i], k_all[i]
        zloss, zi = system.loss_matrix(fi)
        qs = k * system.size < QUASI_STATIC_KD
        if not qs:
            tab = next((t for t in tables if t.k_lo <= k <= t.k_hi), None)
            z = tab.matrix(k) if tab is not None else system.matrix_direct(k)
            z += zloss
            if not np.all(np.isfinite(z)):
                qs = True
                warnings.append(f"non-finite matrix at {fi:.6g} Hz: quasi-static solution used")
            else:
                cur, cnd = _lu_solve(z, v)
                cond[i] = cnd
                delta = 10 * _EPS * cnd
                if not np.all(np.isfinite(cur)) or delta > QUASI_STATIC_HANDOFF:
                    qs = True
        if qs and system.loop_tree()[1] > 0:
            # loops (possibly through the ground): the charge-only limit is wrong, use loop-tree
            cur, cond[i] = _loop_tree_currents(system, k, v, zloss)
            qs = False
            hand_lt.append(fi)
            method[i] = "moment, loop-tree basis"
        elif qs:
            cur, cond[i] = _quasi_static_currents(system, k, v)
            method[i] = "quasi-static"
            hand_qs.append(fi)
        ie = np.stack([t0 @ cur, t1 @ cur], axis=-1)
        i0 = v @ cur
        cur_ends[i] = ie
        i_feed[i] = i0
        zvi = 1.0 / i0
        # effective height: vertical current moment over the real wires
        mz = np.sum(topo.tangent[:, 2] * topo.length * 0.5 * (ie[:, 0] + ie[:, 1]))
        h_eff[i] = mz / i0
        # losses
        pc = 0.5 * np.sum(zi.real * topo.length * (np.abs(ie[:, 0]) ** 2 + np.abs(ie[:, 1]) ** 2
                                                   + (ie[:, 0] * np.conj(ie[:, 1])).real) / 3.0)
        pe = 0.5 * np.sum(topo.electrode * np.abs(cur) ** 2)
        i0sq = abs(i0) ** 2
        r_cond[i], r_elec[i] = 2 * pc / i0sq, 2 * pe / i0sq
        lam = 2 * np.pi / k
        if method[i] == "quasi-static":
            r_rad[i] = 160 * np.pi**2 * abs(h_eff[i] / lam) ** 2
        else:
            refl = complex_permittivity(fi, eps_s, sig_s) if ground == "lossy" else None
            r_rad[i] = 2 * _far_field_power(topo, ie, k, refl) / i0sq
        r_pb = r_rad[i] + r_cond[i] + r_elec[i]
        if method[i] == "quasi-static":
            zvi = complex(r_pb, zvi.imag)
        else:
            res_err = 10 * _EPS * cond[i] * abs(zvi)
            if ground == "perfect" and res_err > RESISTANCE_RESOLUTION_TOLERANCE * r_pb:
                zvi = complex(r_pb, zvi.imag)
                method[i] = (method[i] or "moment") + ", resistance from power balance"
                hand_pb.append(fi)
            else:
                method[i] = method[i] or "moment"
                if ground == "perfect":
                    mismatch[i] = abs(zvi.real - r_pb) / max(abs(zvi.real), 1e-300)
                elif res_err > RESISTANCE_RESOLUTION_TOLERANCE * max(zvi.real, 1e-300):
                    warnings.append(
                        f"lossy ground at {fi:.6g} Hz: the input resistance is not resolved by the solution "
                        f"(estimated error {res_err:.3g} ohm)"
                    )
            if ground == "lossy":
                r_gnd[i] = max(zvi.real - r_pb, 0.0)
        z_in[i] = zvi + series_ohm
        if progress is not None:
            progress(done, F)

    if hand_pb:
        warnings.append(
            "low-frequency limit: at " + _freq_list(hand_pb) + " the input resistance is below what the matrix "
            "solution resolves; it is taken from the power balance (far-field radiation plus wire and electrode losses)"
        )
    if hand_lt:
        warnings.append(
            "low-frequency breakdown: at " + _freq_list(hand_lt) + " the wires form a loop and the plain solution "
            "is not resolved; solved in the loop-tree basis instead"
        )
    if hand_qs:
        warnings.append(
            "low-frequency breakdown: at " + _freq_list(hand_qs) + " the full-wave solution is not resolved; "
            "the quasi-static solution (capacitance, effective height, 160 pi^2 (h_e/lambda)^2) is used"
        )
    bad_pb = mismatch > POWER_BALANCE_WARNING
    if np.any(bad_pb):
        warnings.append(
            f"power balance: far-field radiated power and V/I resistance differ by up to {mismatch.max():.3g} "
            f"(at {_freq_list(f[bad_pb])})"
        )

    # ---------- convergence: N against 2N at the highest frequency
    conv = conv_r = 0.0
    f_conv = 0.0
    if convergence_check:
        conv, conv_r, f_conv, note = _convergence(system, segments, counts, f, i_feed, z_in, series_ohm, v,
                                                  gauss_points, memory_limit)
        if note:
            warnings.append(note)
    converged = (not convergence_check) or conv <= convergence_tolerance
    if convergence_check and not converged:
        warnings.append(
            f"not converged: the impedance changes by {conv:.3g} (relative) when every piece is halved "
            f"at {f_conv:.6g} Hz (tolerance {convergence_tolerance:g})"
        )

    x = z_in.imag
    capacitive = x < 0
    with np.errstate(divide="ignore"):
        cap = np.where(capacitive, -1.0 / (2 * np.pi * f * np.where(capacitive, x, -1.0)), 0.0)
    r_total = z_in.real
    eff = np.where(r_total > 0, r_rad / np.where(r_total > 0, r_total, 1.0), 0.0)
    cur_mid = 0.5 * (cur_ends[:, :, 0] + cur_ends[:, :, 1])

    gname = "perfect ground (images)" if ground == "perfect" else (
        f"lossy ground by the reflection-coefficient approximation (eps_r {eps_s:g}, sigma {sig_s:g} S/m)")
    model = ("full wave: method of moments, mixed-potential EFIE with triangle basis and Galerkin testing, "
             f"thin-wire reduced kernel, {gname}")
    result = FullWaveResult(
        frequency=f,
        impedance=z_in,
        feed_current=i_feed,
        current_position=topo.midpoint,
        current_direction=topo.tangent,
        current=cur_mid,
        current_ends=cur_ends,
        effective_height=h_eff,
        open_circuit_voltage_per_field=h_eff.copy(),
        radiation_resistance=r_rad,
        conductor_loss_resistance=r_cond,
        electrode_loss_resistance=r_elec,
        series_resistance=float(series_ohm),
        ground_loss_resistance=r_gnd,
        efficiency=eff,
        capacitance=cap,
        capacitive=capacitive,
        power_balance_mismatch=mismatch,
        condition_number=cond,
        method=tuple(method),
        convergence=float(conv),
        convergence_resistance=float(conv_r),
        convergence_frequency=float(f_conv),
        converged=bool(converged),
        convergence_tolerance=float(convergence_tolerance),
        n_unknowns=N,
        n_pieces=P,
        interpolation=interp_desc,
        ground=ground,
        model=model,
        warnings=tuple(dict.fromkeys(warnings)),
    )
    _assert_finite(result)
    return result


def _freq_list(fs):
    fs = sorted(float(x) for x in fs)
    if len(fs) <= 3:
        return ", ".join(f"{x:.6g} Hz" for x in fs)
    return f"{len(fs)} frequencies from {fs[0]:.6g} to {fs[-1]:.6g} Hz"


def _loop_tree_currents(system: _System, k, v, zloss):
    """Currents at low frequency in the loop-tree basis (no low-frequency breakdown).

    Notes
    -----
    In the basis U = [loops, tree] the scalar-potential part vanishes exactly
    on the loops (they carry no charge), so it is set to zero there instead of
    being left as round-off of a term 1/(kL)^2 larger than the loop terms; the
    system is then equilibrated by the square roots of its diagonal and
    solved. This is the loop-tree decomposition (J. R. Mautz and R. F.
    Harrington, "An E-field solution for a conducting surface small or
    comparable to the wavelength", IEEE Trans. Antennas Propag. 32(4), 1984;
    from memory) in its wire form.
    """
    u, n_loop = system.loop_tree()
    a_part, phi_part = system.potential_parts(k)
    zp = u.T @ ((1j * k * ETA0) * a_part + zloss) @ u
    pp = u.T @ phi_part @ u
    pp[:n_loop, :] = 0.0
    pp[:, :n_loop] = 0.0
    zp += (ETA0 / (1j * k)) * pp
    s = 1.0 / np.sqrt(np.maximum(np.abs(np.diag(zp)), 1e-300))
    m = s[:, None] * zp * s[None, :]
    y, cond = _lu_solve(m, s * (u.T @ v))
    return u @ (s * y), cond


def _quasi_static_currents(system: _System, k, v):
    """Currents of the k -> 0 charge problem: Phi I = (j k / eta) V (least squares if loops)."""
    phi = system.static_potential()
    try:
        x = sla.solve(phi, v.real, assume_a="sym", check_finite=False)
        cond = np.linalg.cond(phi, 1)
    except (sla.LinAlgError, ValueError):
        x = np.linalg.lstsq(phi, v.real, rcond=None)[0]
        cond = np.inf
    if not np.all(np.isfinite(x)):
        x = np.linalg.lstsq(phi, v.real, rcond=None)[0]
    return (1j * k / ETA0) * x, float(cond) if np.isfinite(cond) else 1e300


def _plan_band(system: _System, k_sorted, enabled, tol, memory_limit):
    """Sub-bands and interpolation tables worth building for this sweep."""
    if not enabled or len(k_sorted) < 4:
        return []
    N = system.topo.n_unknowns
    dr = 2.0 * system.topo.length.max() + 1e-12
    tables = []
    k_lo, k_hi = k_sorted[0], k_sorted[-1]
    p = _interp_degree(k_hi - k_lo, dr, tol)
    n_sub = 1
    while p is None:
        n_sub *= 2
        p = _interp_degree((k_hi - k_lo) / n_sub, dr, tol)
    edges = np.linspace(k_lo, k_hi, n_sub + 1)
    bytes_per = (2 * (p + 3) + 4 * (p + 1)) * N * N * 16
    if bytes_per > memory_limit:
        return []
    for a, b in zip(edges[:-1], edges[1:]):
        inside = np.count_nonzero((k_sorted >= a) & (k_sorted <= b))
        if inside <= p + 2:  # cheaper to fill directly
            continue
        if b - a < 1e-9 * b:
            continue
        tables.append(_BandTable(system, a, b, p))
    return tables


def _convergence(system, segments, counts, f, i_feed, z_in, series_ohm, v, n_gauss, memory_limit):
    """Relative change of Z at the highest frequency when every piece is halved (or doubled)."""
    i = int(np.argmax(f))
    k = 2 * np.pi * f[i] / C0
    N = system.topo.n_unknowns
    note = ""
    if (2 * N) ** 2 * 16 * 3 <= memory_limit:
        other = _System(segments, counts * 2, system.ground, system.eps_soil, system.sigma_soil, n_gauss)
        fine_is_other = True
    else:
        half = np.maximum(counts // 2, 1)
        other = _System(segments, half, system.ground, system.eps_soil, system.sigma_soil, n_gauss)
        fine_is_other = False
        note = f"convergence checked with half the pieces (N/2 against N): 2N = {2 * N} unknowns exceeds the memory limit"
    z = other.matrix_direct(k)
    zl, _ = other.loss_matrix(f[i])
    z += zl
    cur, _ = _lu_solve(z, other.topo.feed_weight.astype(complex))
    z_other = 1.0 / (other.topo.feed_weight @ cur) + series_ohm
    z_this = 1.0 / i_feed[i] + series_ohm
    fine, coarse = (z_other, z_this) if fine_is_other else (z_this, z_other)
    conv = abs(fine - coarse) / abs(fine)
    conv_r = abs(fine.real - coarse.real) / max(abs(fine.real), 1e-300)
    return conv, conv_r, f[i], note


def _assert_finite(result: FullWaveResult):
    for name in ("impedance", "feed_current", "current", "effective_height", "radiation_resistance",
                 "conductor_loss_resistance", "electrode_loss_resistance", "efficiency", "capacitance"):
        arr = getattr(result, name)
        if not np.all(np.isfinite(arr)):
            raise FloatingPointError(f"full-wave solver produced a non-finite {name}: please report this")
