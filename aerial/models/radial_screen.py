"""Ground loss of a vertical over a radial wire screen: Wait's surface impedance and the compensation theorem.

Frame: metres, z up, the soil fills z < 0, the aerial's foot and the radials'
hub at the origin; time convention exp(+j omega t).

The soil seen from the air is a surface impedance (Leontovich; [1]_)::

    Z_soil = eta0 / sqrt(eps_c),     eps_c = eps_r - j sigma/(omega eps0)

A screen of N straight radial wires of radius c lying on (or just in) the soil
is, at a distance r from the hub, a grid of parallel wires spaced
d = 2 pi r / N. For the field of a vertical (E radial, H azimuthal) such a
grid is an inductive sheet of impedance ([2]_, [3]_)::

    Z_wires = j omega mu0 (d / 2 pi) ln(d / (2 pi c)),

in parallel with the soil under it; beyond the radials' length L only the soil
remains::

    Z(r) = Z_soil Z_wires / (Z_soil + Z_wires)   (r < L),     Z_soil   (r > L).

Where d <= 2 pi c (close to the hub) the wires touch in the sense of the
formula and the screen is taken as solid (Z = 0).

The change of the aerial's input impedance from a perfectly conducting ground
to this surface is, by Monteath's compensation theorem ([4]_; the form Wait and
Pope use, [3]_)::

    Delta Z = (1 / I0^2) int_0^inf Z(r) H_phi(r)^2 2 pi r dr,

with H_phi the magnetic field the aerial's current (and its image) sets up on a
perfectly conducting ground. Re Delta Z is the ground loss the radial system
adds in series with the aerial at its base; it takes in the soil between and
beyond the radials, so no separate electrode resistance is added for the
radials. H_phi here is that of a vertical of height h whose current is the
closed forms' standing wave I(z) = I0 sin(delta + k(h - z)) / sin(delta + kh)
(delta: the top-loading angle, 0 for a plain vertical), integrated numerically
from the field of a current element and its image::

    H_phi(r) = (1 / 2 pi) int_0^h I(z) (1 + j k R) e^{-jkR} r / R^3 dz,   R = sqrt(r^2 + z^2).

Beyond ``FAR_WAVELENGTHS`` wavelengths the field is taken in its far form
H_phi = j k I0 h_e e^{-jkr} / (2 pi r) (h_e the vertical's effective height)
and the rest of the integral is Z_soil (j k I0 h_e / 2 pi)^2 2 pi E1(2 j k r_far)
(E1 the exponential integral, :func:`aerial.models.special_functions.exp1`).

Validity: the field of the top's horizontal wires is left out (their currents'
image field at the ground, largest under the top, is not part of the
axisymmetric screen problem); the radials are taken on the surface (Wait's
screen; burying them a few centimetres changes little at MF while the depth
is small against the soil's skin depth); the screen is centred on the foot of
the vertical.

References
----------
.. [1] J. R. Wait, *Electromagnetic Waves in Stratified Media*, Pergamon,
   1962, ch. 2 (surface impedance of a homogeneous ground). (from memory)
.. [2] J. R. Wait, "The theory of an antenna over an inhomogeneous ground
   plane", in *Electromagnetic Theory and Antennas*, Pergamon, 1963,
   1079-1097 (the radial-wire screen as an anisotropic surface impedance).
   (from memory)
.. [3] J. R. Wait and W. A. Pope, "Input resistance of LF unipole aerials",
   Wireless Engineer 32, 131-138, 1955; and "The characteristics of a vertical
   antenna with a radial conductor ground system", Applied Scientific Research
   B4, 177-195, 1954. (from memory)
.. [4] G. D. Monteath, "Application of the compensation theorem to certain
   radiation and propagation problems", Proc. IEE 98(IV), 23-30, 1951.
   (from memory)
.. [5] G. H. Brown, R. F. Lewis and J. Epstein, "Ground systems as a factor in
   antenna efficiency", Proc. IRE 25(6), 753-787, 1937 (measured input
   resistance of a vertical against the number and length of buried radials).
   (from memory)
"""

from __future__ import annotations

import functools

import numpy as np

from aerial.core.constants import MU_0 as mu_0
from aerial.core.constants import SPEED_OF_LIGHT as C0
from aerial.core.errors import ModelInputError
from aerial.core.arrays import scratch_planes
from aerial.core.lengthtext import metres
from aerial.core.records import NamedTuple
from aerial.models.groundwave import complex_relative_permittivity
from aerial.models.short_aerial import ETA0
from aerial.models.special_functions import exp1

__all__ = ["soil_surface_impedance", "wait_screen_impedance", "radial_screen_impedance", "vertical_ground_field",
           "radial_screen_loss", "RadialScreenLoss", "FAR_WAVELENGTHS", "static_ground_field", "screen_loss_of_field",
           "screen_loss_by_length"]

#: Distance beyond which the field is taken in its far form (the rest of the integral in closed form). [wavelengths]
FAR_WAVELENGTHS = 3.0
#: Integration points per e-fold of distance (trapezoid in ln r) and along the vertical (Gauss-Legendre). [1]
POINTS_PER_E_FOLD = 40
HEIGHT_POINTS = 24


def soil_surface_impedance(frequency, conductivity, relative_permittivity):
    """Leontovich surface impedance of a homogeneous soil, eta0 / sqrt(eps_c). [ohm]

    Parameters
    ----------
    frequency : array_like
        [Hz]
    conductivity : float
        [S/m]
    relative_permittivity : float
        [1]

    Returns
    -------
    ndarray of complex
        Re >= 0, Im >= 0 (inductive). [ohm]

    References
    ----------
    Wait, *Electromagnetic Waves in Stratified Media*, 1962, ch. 2 (module reference [1]; from memory).

    Examples
    --------
    >>> z = soil_surface_impedance(1e6, 5.0, 70.0)     # sea water: about sqrt(omega mu0 / 2 sigma) (1 + j)
    >>> round(float(z.real), 3), round(float(z.imag), 3)
    (0.889, 0.888)
    """
    return ETA0 / np.sqrt(complex_relative_permittivity(relative_permittivity, conductivity, frequency))


def wait_screen_impedance(frequency, distance, count, wire_radius):
    """Surface impedance of N radial wires at a distance from the hub: j omega mu0 (d/2 pi) ln(d/(2 pi c)). [ohm]

    Parameters
    ----------
    frequency : array_like
        [Hz]
    distance : array_like
        From the hub. [m]
    count : int
        Number of radials. [1]
    wire_radius : float
        [m]

    Returns
    -------
    ndarray of complex
        Purely inductive; 0 where the spacing d = 2 pi r / N is at most 2 pi c
        (the screen taken as solid). Broadcast of ``frequency`` and ``distance``. [ohm]

    References
    ----------
    Wait, "The theory of an antenna over an inhomogeneous ground plane", 1963 (module reference [2]; from memory).

    Examples
    --------
    >>> z = wait_screen_impedance(1e6, 10.0, 60, 1e-3)      # d = 1.047 m: 2 pi f mu0 d/(2 pi) ln(166.7)
    >>> round(float(z.imag), 3)
    6.732
    """
    omega = 2 * np.pi * np.asarray(frequency, float)
    d = 2 * np.pi * np.asarray(distance, float) / count
    log = np.log(np.maximum(d / (2 * np.pi * wire_radius), 1.0))
    return 1j * omega * mu_0 * d / (2 * np.pi) * log


def radial_screen_impedance(frequency, distance, count, radial_length, wire_radius, conductivity,
                            relative_permittivity):
    """The radial system's surface impedance: soil and wires in parallel within the radials, soil beyond. [ohm]

    Parameters
    ----------
    frequency, distance : array_like (broadcast)
        [Hz], [m]
    count : int or sequence of int
        Number of radials (0: the soil alone); several sets of radials of
        different lengths from the same hub as sequences, the screen at each
        distance made of the radials reaching it. [1]
    radial_length : float, sequence of float, or array_like of shape (..., S)
        Length of the radials of each set; several systems of sets at once along the leading axes
        (the result then gains those axes in front of the distance's). [m]
    wire_radius : float or array_like
        Broadcast against the result (one per system: shape (..., 1) for a 1-D distance). [m]
    conductivity, relative_permittivity : float
        [S/m], [1]

    Returns
    -------
    ndarray of complex
        [ohm]

    References
    ----------
    Wait, 1963, and Wait and Pope, 1955 (module references [2], [3]; from memory).

    Examples
    --------
    >>> z = radial_screen_impedance(1e6, [1.0, 30.0], 16, 20.0, 1e-3, 5e-3, 15.0)
    >>> bool(abs(z[0]) < abs(z[1]))          # inside the radials, the screen shorts most of the soil
    True
    """
    f = np.asarray(frequency, float)
    r = np.asarray(distance, float)
    z_soil = soil_surface_impedance(f, conductivity, relative_permittivity) * np.ones_like(r)
    counts = np.atleast_1d(np.asarray(count, float))
    lengths = np.asarray(radial_length, float)
    lengths = np.broadcast_to(lengths, lengths.shape[:-1] + counts.shape if lengths.ndim else counts.shape)
    # radials reaching each distance (sets of different lengths from one hub), per system of lengths
    reaching = np.zeros(r.shape)
    for k, n in enumerate(counts):
        edge = lengths[..., k]
        reaching = reaching + n * (r < edge.reshape(edge.shape + (1,) * r.ndim))
    if not np.any(reaching > 0):
        return np.broadcast_to(z_soil, np.broadcast_shapes(z_soil.shape, reaching.shape)).copy()
    z_w = wait_screen_impedance(f, r, np.maximum(reaching, 1.0), wire_radius)
    with np.errstate(invalid="ignore", divide="ignore"):
        both = np.where(np.abs(z_w) > 0, z_soil * z_w / (z_soil + z_w), 0.0)
    return np.where(reaching > 0, both, z_soil)


def _trapezoid_pieces(g, x):
    """The trapezoid rule's piece between each pair of neighbouring points, along the last axis.

    Parameters
    ----------
    g : ndarray, shape (..., N)
        The integrand at the points. [any]
    x : ndarray, shape (N,)
        Increasing points. [any]

    Returns
    -------
    ndarray, shape (..., N - 1)
        (g_i + g_{i+1}) / 2 (x_{i+1} - x_i). [g × x]

    Examples
    --------
    >>> _trapezoid_pieces(np.array([0.0, 1.0, 4.0]), np.array([0.0, 1.0, 2.0]))
    array([0.5, 2.5])
    """
    return 0.5 * (g[..., 1:] + g[..., :-1]) * np.diff(x)


@functools.lru_cache(maxsize=4)
def _gauss(n):
    x, w = np.polynomial.legendre.leggauss(n)
    return 0.5 * (x + 1.0), 0.5 * w


def vertical_ground_field(distance, frequency, height, loading_angle=0.0):
    """H_phi on a perfect ground from a vertical of height h, per ampere at its base. [A/m per A]

    Parameters
    ----------
    distance : array_like, shape (R,)
        From the foot. [m]
    frequency : array_like, shape (F,)
        [Hz]
    height : float
        [m]
    loading_angle : float or array_like, shape (F,)
        Top-loading angle delta. [rad]

    Returns
    -------
    ndarray of complex, shape (F, R)

    Notes
    -----
    The current I(z)/I0 = sin(delta + k(h - z)) / sin(delta + kh); see the
    module docstring for the integral. Close to the foot H_phi -> 1/(2 pi r)
    (Ampere's law: the whole base current returns through the ground).

    References
    ----------
    Wait and Pope, 1955, the sinusoidal current of a top-loaded vertical (module reference [3]; from memory).

    Examples
    --------
    >>> h = vertical_ground_field([0.01], [1e6], 10.0)
    >>> round(float(abs(h[0, 0]) * 2 * np.pi * 0.01), 3)    # close to the foot: the whole base current
    0.999
    """
    r = np.atleast_1d(np.asarray(distance, float))[None, :, None]
    f = np.atleast_1d(np.asarray(frequency, float))
    k = (2 * np.pi * f / C0)[:, None, None]
    delta = np.broadcast_to(np.asarray(loading_angle, float), f.shape)[:, None, None]
    u, w = _gauss(HEIGHT_POINTS)
    z = (height * u)[None, None, :]
    current = np.sin(delta + k * (height - z)) / np.sin(delta + k * height)
    big_r = np.sqrt(r * r + z * z)
    # the static part of the base current, int_0^h r/R^3 dz = h / (r sqrt(r^2 + h^2)), in closed form; the
    # rest is smooth where the integrand peaks (z ~ r) close to the foot
    g = (current * (1 + 1j * k * big_r) * np.exp(-1j * k * big_r) - 1.0) * r / big_r**3
    static = height / (r[..., 0] * np.sqrt(r[..., 0] ** 2 + height**2))
    return (np.sum(g * (height * w)[None, None, :], axis=-1) + static) / (2 * np.pi)


class RadialScreenLoss(NamedTuple):
    """The ground loss of a vertical over a radial screen, per frequency.

    Attributes
    ----------
    frequency : ndarray
        [Hz]
    impedance_change : ndarray of complex
        Delta Z from a perfect ground to the radial system and soil. [ohm]
    resistance : ndarray
        Re Delta Z, the ground loss (never below 0). [ohm]
    within_radials : ndarray
        The part of Re Delta Z from within the radials' length. [ohm]
    method : str
    warnings : tuple of str
    """

    frequency: np.ndarray
    impedance_change: np.ndarray
    resistance: np.ndarray
    within_radials: np.ndarray
    method: str
    warnings: tuple


def _checked(frequency, height, count, radial_length, wire_radius, conductivity, relative_permittivity):
    f = np.atleast_1d(np.asarray(frequency, float))
    if f.ndim != 1 or f.size == 0 or np.any(~np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError("frequency must be a non-empty 1-D array of positive finite values [Hz]")
    for name, v in (("height", height), ("wire_radius", wire_radius), ("conductivity", conductivity)):
        if not (np.isfinite(v) and v > 0):
            raise ModelInputError(f"{name} must be positive and finite, got {v!r}")
    if not (np.isfinite(radial_length) and radial_length >= 0):
        raise ModelInputError(f"radial_length must be >= 0 [m], got {radial_length!r}")
    if int(count) != count or count < 0:
        raise ModelInputError(f"count must be a whole number >= 0, got {count!r}")
    if not (np.isfinite(relative_permittivity) and relative_permittivity >= 1):
        raise ModelInputError(f"relative_permittivity must be >= 1, got {relative_permittivity!r}")
    return f


def radial_screen_loss(frequency, height, count, radial_length, wire_radius, conductivity, relative_permittivity,
                       loading_angle=0.0, foot_radius=1e-3) -> RadialScreenLoss:
    """Ground loss of a vertical over N radials of length L in a soil (Wait's screen, compensation theorem).

    Parameters
    ----------
    frequency : array_like, shape (F,)
        [Hz]
    height : float
        Height of the vertical (the down-lead). [m]
    count : int
        Number of radials; 0 for the soil alone. [1]
    radial_length : float
        [m]
    wire_radius : float
        Radius of the radial wires. [m]
    conductivity, relative_permittivity : float
        The soil. [S/m], [1]
    loading_angle : float or array_like, shape (F,)
        Top-loading angle of the vertical's current. [rad]
    foot_radius : float
        Where the integral starts without radials (the size of the
        connection to the soil; with radials it starts where the screen
        stops being solid, r = N c). [m]

    Returns
    -------
    RadialScreenLoss

    References
    ----------
    Monteath's compensation theorem over Wait's screen (module references [3], [4]; from memory).

    Examples
    --------
    >>> few = radial_screen_loss(1e6, 75.0, 4, 75.0, 1e-3, 5e-3, 15.0)
    >>> many = radial_screen_loss(1e6, 75.0, 120, 75.0, 1e-3, 5e-3, 15.0)
    >>> bool(many.resistance[0] < 0.2 * few.resistance[0])
    True
    """
    f = _checked(frequency, height, count, radial_length, wire_radius, conductivity, relative_permittivity)
    lam = C0 / f
    k = 2 * np.pi / lam
    r0 = max(count * wire_radius, foot_radius) if count > 0 else foot_radius
    delta = np.broadcast_to(np.asarray(loading_angle, float), f.shape)
    out = np.zeros(f.size, complex)
    inner = np.zeros(f.size)
    z_soil = soil_surface_impedance(f, conductivity, relative_permittivity)
    for i in range(f.size):  # one frequency at a time: the distance grid follows the wavelength
        r_far = max(FAR_WAVELENGTHS * lam[i], 4.0 * height, 2.0 * radial_length, 4.0 * r0)
        n = max(16, int(np.ceil(POINTS_PER_E_FOLD * np.log(r_far / r0))))
        lr = np.linspace(np.log(r0), np.log(r_far), n + 1)
        r = np.exp(lr)
        if 0 < radial_length < r_far:
            r = np.unique(np.concatenate([r, [radial_length * (1 - 1e-9), radial_length]]))
        h = vertical_ground_field(r, f[i:i + 1], height, delta[i:i + 1])[0]
        zs = radial_screen_impedance(f[i], r, count, radial_length, wire_radius, conductivity, relative_permittivity)
        seg = _trapezoid_pieces(zs * h * h * 2 * np.pi * r, r)
        out[i] = np.sum(seg)
        inside = r[1:] <= radial_length * (1 + 1e-12)
        inner[i] = float(np.sum(seg[inside]).real)
        # the far tail: H = j k I0 h_e e^{-jkr} / (2 pi r), integral of e^{-2jkr}/r is E1(2 j k r_far)
        kh = k[i] * height
        h_e = (np.cos(delta[i]) - np.cos(delta[i] + kh)) / (k[i] * np.sin(delta[i] + kh))
        a = 1j * k[i] * h_e / (2 * np.pi)
        out[i] += z_soil[i] * a * a * 2 * np.pi * exp1(2j * k[i] * r_far)
    warnings = []
    if np.any(out.real < 0):
        warnings.append("the ground loss of the radial system came out below zero at some frequencies "
                        "(shown as zero): the vertical is too far from the short, axisymmetric case")
    if np.any(k * height + delta >= np.pi / 2):
        warnings.append("the vertical is past its first resonance: the standing-wave current of the ground "
                        "field is rough there")
    method = (f"Wait's radial screen ({int(count)} radials of " + metres(radial_length)
              + ") and the soil beyond, compensation theorem" if count > 0 and radial_length > 0 else "the soil's surface impedance, "
              "compensation theorem")
    return RadialScreenLoss(f, out, np.maximum(out.real, 0.0), np.maximum(inner, 0.0), method, tuple(warnings))


def static_ground_field(points, charges, distance):
    """H_phi on the ground, averaged round the hub, of a short aerial's charges, per ampere at the feed. [1/m]

    Parameters
    ----------
    points : ndarray, shape (M, 2)
        Each charge's horizontal distance from the hub and its height. [m]
    charges : ndarray, shape (M,)
        The aerial's charges (any scale; normalised to their sum). [C]
    distance : ndarray, shape (R,)
        Increasing distances from the hub, the first close to it. [m]

    Returns
    -------
    ndarray, shape (R,)
        H_phi = P_out(r) / (2 pi r), P_out(r) the share of the charges'
        ground images lying beyond r. [1/m]

    Notes
    -----
    In the quasi-static limit (the aerial short against a wavelength) the
    current crossing a circle of radius r on the ground is j omega times the
    ground charge outside it, and on a perfect ground the surface current
    is n x H: averaged round the hub, H_phi(r) = I0 P_out(r) / (2 pi r). A
    charge q at height z and horizontal distance s from the hub induces
    sigma = -q z / (2 pi (rho'^2 + z^2)^{3/2}) on the ground (rho' from its
    foot); integrated round a circle of radius r' about the hub::

        int_0^{2 pi} dphi / (A - B cos phi)^{3/2} = 4 E(m) / ((A - B) sqrt(A + B)),
        A = r'^2 + s^2 + z^2,  B = 2 r' s,  m = 2B / (A + B)

    (E the complete elliptic integral of the second kind,
    :func:`aerial.models.special_functions.ellipe`;
    Gradshteyn and Ryzhik 2.575, from memory), then over r' by the trapezoid
    rule. For a charge over the hub, P_out = z / sqrt(r^2 + z^2) exactly.

    References
    ----------
    Monteath, compensation theorem, with the ground field of the aerial's charges (module reference [4]; from memory).

    Examples
    --------
    >>> r = np.geomspace(1e-3, 1e3, 600)
    >>> h = static_ground_field(np.array([[0.0, 10.0]]), np.array([1.0]), r)
    >>> i = int(np.argmin(abs(r - 10.0)))
    >>> round(float(h[i] * 2 * np.pi * r[i] / (10.0 / np.hypot(r[i], 10.0))), 4)   # P_out = z / sqrt(r^2 + z^2)
    1.0
    """
    pts = np.asarray(points, float)
    q = np.asarray(charges, float)
    q = q / q.sum()
    r = np.asarray(distance, float)
    # a fine grid from the hub for the inner integral; the first point on the axis
    rr = np.concatenate([[0.0], np.geomspace(min(1e-4, r[0] / 10), r[-1], 1 + int(60 * np.log(r[-1] / min(1e-4, r[0] / 10))))])
    density = _ring_charge_density(pts[:, 0], np.maximum(pts[:, 1], 1e-6), q, rr)
    p_in = np.interp(r, rr, np.concatenate([[0.0], np.cumsum(_trapezoid_pieces(density, rr))]))
    return np.clip(1.0 - p_in, 0.0, 1.0) / (2 * np.pi * r)


#: Ring-integral values worked out at a time: a block of radii × all the charges, small enough to
#: stay in the processor's cache (and each block's elliptic integrals converge in their own steps). [1]
RING_BLOCK_ELEMENTS = 1 << 13


def _ring_charge_density(s, z, q, rr):
    """The charges' ground images per unit radius at each radius ``rr`` from the hub, summed: (N,) [1/m].

    Parameters
    ----------
    s, z : ndarray, shape (M,)
        Each charge's horizontal distance from the hub and its height (z > 0). [m]
    q : ndarray, shape (M,)
        The charges' shares. [1]
    rr : ndarray, shape (N,)
        Radii from the hub. [m]

    Notes
    -----
    The ring integral of :func:`static_ground_field` (its Notes) for every radius and charge, the
    (N, M) values in blocks of radii, each block summed over the charges with their shares at once:
    the trapezoid rule from the hub then runs once over the sum instead of once per charge.

    The elliptic integral is taken by the arithmetic-geometric mean in its homogeneous form (A&S
    17.6.3, 17.6.4 with every term scaled by d+): with d+^2 = A + B and d-^2 = A - B (the largest and
    the smallest squared distance from the charge to the ring), a_0 = d+, b_0 = d-, C_n = (a_(n-1) -
    b_(n-1)) / 2 and S = B + sum_(n>=1) 2^(n-1) C_n^2 (the first term, 2^-1 C_0^2 = d+^2 m / 2, is B),
    K(m) = pi d+ / (2 a_N) and E(m) = K (1 - S / d+^2), so that::

        4 E(m) / ((A - B) sqrt(A + B)) = 2 pi (A + B - S) / (a_N (A - B) (A + B))

    with no division to form m and no square root of A + B apart from d+ itself. The mean stops when
    every term 2^(n-1) C_n^2 is below a quarter ulp of the smallest d+^2 of the block (E's own
    rounding). The charges' s^2 + z^2 and their shares times z are taken once for every block, and
    the factor r' once for each radius after the sum. A - B > 0 everywhere, as z > 0. Every block
    works in the same reused scratch planes (:func:`aerial.core.arrays.scratch_planes`).

    References
    ----------
    M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, 1964, 17.6.3 and 17.6.4
    (the arithmetic-geometric mean for K and E); checked against ``scipy.special.ellipe`` in
    tests/models/test_radial_screen.py. (from memory)
    """
    out = np.empty(rr.size)
    step = max(1, RING_BLOCK_ELEMENTS // max(s.size, 1))
    s2z2 = s * s + z * z
    z2 = z * z
    weight = q * z  # q z 4 / (2 pi) times the pi / 2 of K
    planes = scratch_planes(min(step, rr.size), s.size, 6)
    with np.errstate(all="ignore"):  # a charge on the ground (A - B = 0) is caught just below
        for i in range(0, rr.size, step):
            _ring_block(rr[i:i + step, None], s, s2z2, z2, weight, planes, out[i:i + step])
    if not np.all(np.isfinite(out)):
        raise ModelInputError("a charge lies on the ground (its height is zero against its distance from the hub): "
                              "the ground's ring integral has no value there")
    out *= rr                                          # sum of q z r' / (2 pi) * 4 E(m) / ((A - B) sqrt(A + B))
    return out


def _ring_block(r, s, s2z2, z2, weight, planes, out):
    """:func:`_ring_charge_density` at the radii ``r`` (a column, (N, 1)) [m], before the factor r', into
    ``out`` (N,); ``planes``: its scratch planes, six of at least (N, M)."""
    plus, minus, total, a, b, c = (plane[:len(r)] for plane in planes)
    np.add(r * r, s2z2, out=minus)                 # A = r'^2 + s^2 + z^2
    np.multiply(2 * r, s, out=total)               # B = 2 r' s, the first term of S
    np.add(minus, total, out=plus)                 # A + B = d+^2
    minus -= total                                 # A - B = d-^2
    np.sqrt(plus, out=a)
    np.sqrt(minus, out=b)
    shift = float(r[0, 0]) + s                     # the block's smallest d+^2 is at its smallest radius
    limit = 0.25 * _EPS * float(np.min(shift * shift + z2))
    scale = 0.5
    for _ in range(64):
        np.subtract(a, b, out=c)
        c *= 0.5                                   # C_n
        b *= a
        np.sqrt(b, out=b)                          # b_n = sqrt(a_(n-1) b_(n-1))
        a -= c                                     # a_n = (a_(n-1) + b_(n-1)) / 2
        scale *= 2.0
        c *= c
        c *= scale
        total += c                                 # S += 2^(n-1) C_n^2
        if c.max() <= limit:
            break
    np.subtract(plus, total, out=c)                # A + B - S
    a *= minus
    a *= plus
    c /= a                                         # 2 E(m) / (pi (A - B) sqrt(A + B))
    np.dot(c, weight, out=out)


#: Half the spacing of doubles at 1. [1]
_EPS = 2.0 ** -53


def screen_loss_of_field(frequency, distance, field, count, radial_length, wire_radius, conductivity,
                         relative_permittivity):
    """Delta Z = int Z(r) H_phi(r)^2 2 pi r dr over the given ground field (compensation theorem). [ohm]

    Parameters
    ----------
    frequency : array_like, shape (F,)
        [Hz]
    distance : ndarray, shape (R,)
        Increasing distances from the hub. [m]
    field : ndarray, shape (R,) or (F, R)
        H_phi per ampere at the feed (e.g. :func:`static_ground_field`). [1/m]
    count, radial_length, wire_radius, conductivity, relative_permittivity
        The radials and the soil (see :func:`radial_screen_impedance`).

    Returns
    -------
    total, within : ndarray, shape (F,)
        Delta Z (complex), and the real part of the share within the radials. [ohm]

    References
    ----------
    Monteath's compensation theorem over Wait's screen (module references [2], [4]; from memory).

    Examples
    --------
    >>> r = np.geomspace(0.01, 300.0, 400)
    >>> h = static_ground_field(np.array([[0.0, 5.0]]), np.array([1.0]), r)
    >>> dz, inner = screen_loss_of_field([1e6], r, h, 60, 20.0, 1e-3, 5e-3, 15.0)
    >>> bool(0 < dz[0].real < 2.0)
    True
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    r = np.asarray(distance, float)
    z = radial_screen_impedance(f[:, None], r[None, :], count, radial_length, wire_radius, conductivity,
                                relative_permittivity)
    seg = _trapezoid_pieces(z * np.asarray(field) ** 2 * 2 * np.pi * r, r)
    inside = (r[1:] <= np.max(radial_length) * (1 + 1e-12))[None, :]
    return seg.sum(axis=1), np.where(inside, seg.real, 0.0).sum(axis=1)


def screen_loss_by_length(frequency, distance, field, counts, lengths, wire_radius, conductivity,
                          relative_permittivity):
    """Delta Z of :func:`screen_loss_of_field` at one frequency for several radial systems at once. [ohm]

    Parameters
    ----------
    frequency : float
        [Hz]
    distance : ndarray, shape (R,)
        Increasing distances from the hub. [m]
    field : ndarray, shape (R,)
        H_phi per ampere at the feed. [1/m]
    counts : sequence of int, length S
        Number of radials in each set (the same sets in every system). [1]
    lengths : array_like, shape (L, S)
        Each system's radial lengths, one row per system. [m]
    wire_radius : array_like, shape (L,)
        Each system's wire radius. [m]
    conductivity, relative_permittivity : float
        [S/m], [1]

    Returns
    -------
    ndarray of complex, shape (L,)
        Delta Z of each system: row ``i`` is ``screen_loss_of_field([frequency], distance, field, counts,
        lengths[i], wire_radius[i], ...)[0][0]`` (the same operations element by element, all rows in one
        pass). [ohm]

    Notes
    -----
    The screen at each distance is made of the radials reaching it (:func:`radial_screen_impedance`), in
    parallel with the soil; the loss is Monteath's integral of :func:`screen_loss_of_field`.

    References
    ----------
    Wait, 1963, and Monteath's compensation theorem (module references [2], [4]; from memory).

    Examples
    --------
    >>> r = np.geomspace(0.01, 300.0, 400)
    >>> h = static_ground_field(np.array([[0.0, 5.0]]), np.array([1.0]), r)
    >>> dz = screen_loss_by_length(1e6, r, h, [60], [[10.0], [20.0]], [1e-3, 1e-3], 5e-3, 15.0)
    >>> bool(dz[1].real < dz[0].real)            # longer radials: less loss
    True
    """
    r = np.asarray(distance, float)
    z = radial_screen_impedance(float(frequency), r, counts, lengths, np.asarray(wire_radius, float)[:, None],
                                conductivity, relative_permittivity)
    return _trapezoid_pieces(z * np.asarray(field) ** 2 * 2 * np.pi * r, r).sum(axis=1)
