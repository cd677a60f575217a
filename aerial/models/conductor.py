"""Conductor loss of round wires: DC resistance, skin depth, internal impedance.

All functions are pure and broadcast over numpy arrays; SI units throughout.

Validity
--------
Straight, isolated round wire carrying an axial current (no proximity effect
from nearby wires), good conductor (conduction current far above displacement
current, true for metals at radio frequencies), radius far below a wavelength.
Permeability is taken as a constant ``relative_permeability`` (steel's RF
permeability is uncertain; a factor of two in mu_r changes steel's RF
resistance by about 40 %).

References
----------
.. [1] S. Ramo, J. R. Whinnery and T. Van Duzer, *Fields and Waves in
   Communication Electronics*, 3rd ed., Wiley, 1994, sec. 5.5 (internal
   impedance of a round wire, Bessel-function solution). (from memory)
.. [2] IEC 60028, *International standard of resistance for copper*, 1925
   (annealed copper 1.72414e-8 ohm m at 20 degC; temperature coefficient
   0.00393 /K). (from memory)
.. [3] S. A. Schelkunoff, "The electromagnetic theory of coaxial transmission
   lines and cylindrical shields", Bell System Technical Journal 13, 1934,
   pp. 532-579 (impedances of cylindrical layers with I and K Bessel
   functions). (from memory)
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import MU_0 as mu_0

from aerial.core.errors import ModelInputError
from aerial.models.checks import positive as _positive
from aerial.models.special_functions import ive, kve

#: Resistivity of annealed copper at 20 degC, IEC 60028. [ohm m]
COPPER_RESISTIVITY = 1.72414e-8
#: Temperature coefficient of resistance of annealed copper at 20 degC, IEC 60028. [1/K]
COPPER_TEMPERATURE_COEFFICIENT = 0.00393

CURRENT_DISTRIBUTIONS = ("uniform", "triangular")




def dc_resistance_per_m(radius, resistivity=COPPER_RESISTIVITY):
    """DC resistance per unit length of a solid round wire.

    Parameters
    ----------
    radius : array_like
        Wire radius. [m]
    resistivity : array_like, optional
        Conductor resistivity. [ohm m]

    Returns
    -------
    ndarray
        Resistance per metre. [ohm/m]

    Notes
    -----
    R' = rho / (pi a^2).

    References
    ----------
    IEC 60028 (resistivity of annealed copper).

    Examples
    --------
    >>> round(float(dc_resistance_per_m(0.81386e-3)) * 1e3, 3)   # 14 AWG copper
    8.286
    """
    a = _positive("radius", radius)
    rho = _positive("resistivity", resistivity)
    return rho / (np.pi * a**2)


def skin_depth(frequency, resistivity=COPPER_RESISTIVITY, relative_permeability=1.0):
    """Skin depth of a good conductor.

    Parameters
    ----------
    frequency : array_like
        Frequency. [Hz]
    resistivity : array_like, optional
        Conductor resistivity. [ohm m]
    relative_permeability : array_like, optional
        Relative permeability of the conductor. [1]

    Returns
    -------
    ndarray
        Skin depth delta. [m]

    Notes
    -----
    delta = sqrt(rho / (pi f mu_0 mu_r)) ([1]_, sec. 5.4).

    References
    ----------
    .. [1] Ramo, Whinnery and Van Duzer, *Fields and Waves in Communication
       Electronics*, 3rd ed., 1994, sec. 5.4. (from memory)

    Examples
    --------
    >>> round(float(skin_depth(1e6)) * 1e6, 2)    # copper at 1 MHz, in micrometres
    66.09
    """
    f = _positive("frequency", frequency)
    rho = _positive("resistivity", resistivity)
    mur = _positive("relative_permeability", relative_permeability)
    return np.sqrt(rho / (np.pi * f * mu_0 * mur))


def _i0_over_i1(z):
    """I0(z)/I1(z) for complex z with arg(z) = 45 deg, overflow-free via ive."""
    return ive(0, z) / ive(1, z)


def internal_impedance_per_m(radius, frequency, resistivity=COPPER_RESISTIVITY, relative_permeability=1.0):
    """Exact internal impedance per unit length of a solid round wire.

    Parameters
    ----------
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency; 0 gives the DC resistance. [Hz]
    resistivity : array_like, optional
        Conductor resistivity. [ohm m]
    relative_permeability : array_like, optional
        Relative permeability of the conductor. [1]

    Returns
    -------
    ndarray of complex
        Internal impedance Z' = R' + j X'_int. [ohm/m]

    Notes
    -----
    With gamma = (1 + j)/delta ([1]_, eq. 5.5(11), from memory)::

        Z' = gamma / (2 pi a sigma) * I0(gamma a) / I1(gamma a)

    evaluated with the exponentially scaled Bessel functions
    :func:`aerial.models.special_functions.ive` (the scaling cancels in the ratio), so there is no
    overflow for a/delta in the thousands. For gamma a < 1e-3 the series
    Z' = R_dc (1 + (gamma a)^2 / 8) is used. Limits: R' -> R_dc at low
    frequency, R' -> R_dc (a / 2 delta + 1/4) for a/delta >~ 3.

    References
    ----------
    .. [1] Ramo, Whinnery and Van Duzer, *Fields and Waves in Communication
       Electronics*, 3rd ed., Wiley, 1994, sec. 5.5. (from memory)

    Examples
    --------
    >>> z = internal_impedance_per_m(0.81386e-3, 1e6)   # 14 AWG copper (d = 1.6277 mm), 1 MHz
    >>> round(float(z.real) * 1e3, 2)
    53.15
    >>> float(internal_impedance_per_m(1e-3, 0.0).real) == float(dc_resistance_per_m(1e-3))
    True
    """
    a = _positive("radius", radius)
    f = _positive("frequency", frequency, allow_zero=True)
    rho = _positive("resistivity", resistivity)
    mur = _positive("relative_permeability", relative_permeability)
    a, f, rho, mur = np.broadcast_arrays(a, f, rho, mur)
    rdc = rho / (np.pi * a**2)
    # gamma^2 = j omega mu sigma
    gamma = np.sqrt(1j * 2 * np.pi * f * mu_0 * mur / rho)
    ga = gamma * a
    small = np.abs(ga) < 1e-3
    ga_safe = np.where(small, 1.0 + 1.0j, ga)
    exact = gamma / (2 * np.pi * a / rho) * _i0_over_i1(ga_safe)
    series = rdc * (1.0 + ga**2 / 8.0)
    return np.where(small, series, exact)


def resistance_per_m(radius, frequency, resistivity=COPPER_RESISTIVITY, relative_permeability=1.0):
    """AC resistance per unit length of a solid round wire (real part of the internal impedance).

    Parameters
    ----------
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency. [Hz]
    resistivity : array_like, optional
        Conductor resistivity. [ohm m]
    relative_permeability : array_like, optional
        Relative permeability. [1]

    Returns
    -------
    ndarray
        Resistance per metre. [ohm/m]

    Notes
    -----
    R' = Re Z', Z' from :func:`internal_impedance_per_m`.

    References
    ----------
    Ramo, Whinnery and Van Duzer, *Fields and Waves in Communication
    Electronics*, 3rd ed., 1994, sec. 5.5. (from memory)
    """
    return internal_impedance_per_m(radius, frequency, resistivity, relative_permeability).real


def clad_wire_impedance_per_m(
    radius,
    frequency,
    cladding_area_fraction,
    cladding_resistivity=COPPER_RESISTIVITY,
    core_resistivity=1.4e-7,
    core_relative_permeability=100.0,
    cladding_relative_permeability=1.0,
):
    """Internal impedance per unit length of a clad wire (e.g. copper-clad steel).

    Parameters
    ----------
    radius : array_like
        Overall wire radius. [m]
    frequency : array_like
        Frequency; 0 gives the DC parallel of cladding and core. [Hz]
    cladding_area_fraction : array_like
        Fraction of the cross-section that is cladding, in (0, 1). [1]
    cladding_resistivity, core_resistivity : array_like, optional
        Resistivities of the cladding and the core. [ohm m]
    core_relative_permeability, cladding_relative_permeability : array_like, optional
        Relative permeabilities. [1]

    Returns
    -------
    ndarray of complex
        Internal impedance per metre. [ohm/m]

    Notes
    -----
    This is the exact two-layer solution of the same quasi-static field
    problem that gives the solid-wire formula, rather than a blend between
    limits: it reaches both limits by itself and is right in between. In the
    core (r < b) E_z = C I0(g2 r); in the cladding (b < r < a)
    E_z = A I0(g1 r) + B K0(g1 r), g_i = (1 + j)/delta_i. Continuity of E_z and
    of H_phi = (1/(j omega mu)) dE_z/dr at r = b gives::

        p   = (g2 mu1 / (g1 mu2)) I1(g2 b)/I0(g2 b)
        B/A = [I1(g1 b) - p I0(g1 b)] / [K1(g1 b) + p K0(g1 b)]
        Z'  = g1/(2 pi a sigma1) [I0(g1 a) + (B/A) K0(g1 a)] / [I1(g1 a) - (B/A) K1(g1 a)]

    (the cylindrical-layer method of [2]_). Scaled Bessel functions (``ive``,
    ``kve``) keep every exponential bounded. Limits, checked in the tests:
    at DC the parallel of the cladding and core resistances; when the
    cladding is several skin depths thick, the solid-copper wire of the same
    radius (current confined to the cladding's skin). Cladding thickness
    t = a (1 - sqrt(1 - fraction)). Validity as for the solid wire; the steel
    core's permeability is an uncertain input.

    References
    ----------
    .. [1] Ramo, Whinnery and Van Duzer, *Fields and Waves in Communication
       Electronics*, 3rd ed., 1994, sec. 5.5. (from memory)
    .. [2] S. A. Schelkunoff, "The electromagnetic theory of coaxial
       transmission lines and cylindrical shields", Bell Syst. Tech. J. 13,
       1934. (from memory)

    Examples
    --------
    >>> r0 = clad_wire_impedance_per_m(1e-3, 0.0, 0.24).real
    >>> rdc = 1 / (0.24 * np.pi * 1e-6 / 1.72414e-8 + 0.76 * np.pi * 1e-6 / 1.4e-7)
    >>> bool(abs(r0 / rdc - 1) < 1e-6)
    True
    """
    a = _positive("radius", radius)
    f = _positive("frequency", frequency, allow_zero=True)
    frac = np.asarray(cladding_area_fraction, dtype=float)
    if np.any(~np.isfinite(frac) | (frac <= 0) | (frac >= 1)):
        raise ModelInputError(f"cladding_area_fraction must lie strictly between 0 and 1; got {cladding_area_fraction!r}")
    rho1 = _positive("cladding_resistivity", cladding_resistivity)
    rho2 = _positive("core_resistivity", core_resistivity)
    mu2 = _positive("core_relative_permeability", core_relative_permeability)
    mu1 = _positive("cladding_relative_permeability", cladding_relative_permeability)
    a, f, frac, rho1, rho2, mu1, mu2 = np.broadcast_arrays(a, f, frac, rho1, rho2, mu1, mu2)
    b = a * np.sqrt(1.0 - frac)
    rdc = 1.0 / (np.pi * (a**2 - b**2) / rho1 + np.pi * b**2 / rho2)
    w = 2 * np.pi * f
    g1 = np.sqrt(1j * w * mu_0 * mu1 / rho1)
    g2 = np.sqrt(1j * w * mu_0 * mu2 / rho2)
    small = (np.abs(g1 * a) < 1e-3) & (np.abs(g2 * a) < 1e-3)
    g1 = np.where(small, (1 + 1j) / a, g1)  # placeholders; replaced below
    g2 = np.where(small, (1 + 1j) / a, g2)
    x2 = g2 * b
    p = (g2 * mu1) / (g1 * mu2) * ive(1, x2) / ive(0, x2)
    x1b, x1a = g1 * b, g1 * a
    # I(x) = ive(x) e^{Re x}, K(x) = kve(x) e^{-x}; B/A carries e^{Re x1b + x1b}.
    ratio_scaled = (ive(1, x1b) - p * ive(0, x1b)) / (kve(1, x1b) + p * kve(0, x1b))
    # after dividing numerator and denominator by e^{Re x1a}: factor on the K terms
    factor = np.exp((x1b.real - x1a.real) + (x1b - x1a))
    num = ive(0, x1a) + ratio_scaled * factor * kve(0, x1a)
    den = ive(1, x1a) - ratio_scaled * factor * kve(1, x1a)
    exact = g1 * rho1 / (2 * np.pi * a) * num / den
    return np.where(small, rdc + 0j, exact)


def referred_loss_resistance(resistance_per_m, length, distribution="triangular"):
    """Conductor loss referred to the base (feed) current for a simple current shape.

    Parameters
    ----------
    resistance_per_m : array_like
        Conductor resistance per metre. [ohm/m]
    length : array_like
        Wire length. [m]
    distribution : {"uniform", "triangular"}
        Current shape along the wire: constant, or falling linearly from the
        feed to zero at the open end (a short unloaded wire).

    Returns
    -------
    ndarray
        Loss resistance in series with the feed. [ohm]

    Notes
    -----
    R = integral R' |I(s)/I0|^2 ds: uniform R' l, triangular R' l / 3.

    References
    ----------
    Power balance P = 1/2 |I0|^2 R = 1/2 integral R' |I(s)|^2 ds; see e.g.
    C. A. Balanis, *Antenna Theory*, 3rd ed., Wiley, 2005, sec. 2.14
    (loss resistance referred to the input). (from memory)

    Examples
    --------
    >>> round(float(referred_loss_resistance(0.03, 10.0, "triangular")), 12)
    0.1
    """
    if distribution not in CURRENT_DISTRIBUTIONS:
        raise ModelInputError(
            f"{distribution!r} is not a valid current distribution, must be one of "
            + ", ".join(repr(c) for c in CURRENT_DISTRIBUTIONS)
        )
    r = _positive("resistance_per_m", resistance_per_m, allow_zero=True)
    length = _positive("length", length, allow_zero=True)
    return r * length * (1.0 if distribution == "uniform" else 1.0 / 3.0)


def loss_from_current(resistance_per_m, position, current):
    """Conductor loss referred to the first current sample, for any sampled current.

    Parameters
    ----------
    resistance_per_m : array_like
        Resistance per metre at each sample (or a scalar). [ohm/m]
    position : array_like, shape (..., K)
        Arc length along the wire, increasing. [m]
    current : array_like, shape (..., K)
        Current (complex allowed) at each position; the first sample is the
        reference I0. [A]

    Returns
    -------
    ndarray
        R = integral R' |I/I0|^2 ds by the trapezoidal rule. [ohm]

    Notes
    -----
    Same power balance as :func:`referred_loss_resistance`.

    References
    ----------
    C. A. Balanis, *Antenna Theory*, 3rd ed., 2005, sec. 2.14. (from memory)

    Examples
    --------
    >>> s = np.linspace(0, 10, 2001)
    >>> round(float(loss_from_current(0.03, s, 1 - s / 10)), 6)
    0.1
    """
    s = np.asarray(position, dtype=float)
    i = np.asarray(current)
    i0 = i[..., :1]
    if np.any(np.abs(i0) == 0):
        raise ModelInputError("the reference (first) current sample must be non-zero")
    ratio2 = np.abs(i / i0) ** 2
    r = np.broadcast_to(np.asarray(resistance_per_m, dtype=float), ratio2.shape)
    return np.trapezoid(r * ratio2, s, axis=-1)
