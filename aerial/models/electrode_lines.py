"""Earth electrodes at radio frequency: buried wires, radials, pipes and rods as lossy lines in the soil.

A conductor in the soil is a transmission line whose series impedance per
metre is its own internal impedance plus the inductance of the current's
return path through the soil, and whose shunt admittance per metre is the
leakage conductance and capacitance into the soil. Sunde gives both for a
conductor of radius a in soil of conductivity sigma and permittivity eps
(propagation constant gamma = sqrt(j omega mu0 (sigma + j omega eps))), [1]_
ch. 3 and 5 (from memory)::

    buried horizontal wire (depth d, a_e = sqrt(2 a d), the image in the surface):
        Z' = Z_int + (j omega mu0 / 2 pi) ln(1.85 / (gamma a_e))
        Y' = pi (sigma + j omega eps) / ln(1.12 / (gamma a_e))
    vertical rod from the surface (radius a; rod and its image in the surface):
        Z' = Z_int + (j omega mu0 / 2 pi) ln(1.85 / (gamma a))
        Y' = 2 pi (sigma + j omega eps) / ln(1.12 / (gamma a))

These hold where the line is long against the soil's skin depth (|gamma| l >> 1).
For a short line (or at low frequency) the length, not the skin depth,
bounds the leakage field, and the logarithms become the DC ones of the same
sources: ln(2 l / a_e) - 1 (Sunde's buried wire) and ln(4 l / a) - 1
(Dwight's rod). This module joins the two regimes by replacing gamma in the
logarithms with q = sqrt(|gamma|^2 + q0^2), q0 chosen so that at gamma = 0 the
logarithm is exactly the DC one (q0 = 1.12 e / (2 l) for the wire, 1.12 e / (4 l)
for the rod): an interpolation of this project, stated as such, exact in both
limits. The logarithms take the magnitude of gamma (real L, G, C per metre, as
in the circuit models of grounding electrodes): with the complex gamma the
shunt conductance turns negative where the soil's displacement current passes
its conduction current (dry soil at HF), outside Sunde's conductive-earth
assumption; the magnitude keeps the line passive there, at the price of
leaving out radiation into the soil. The line, open at its far end, presents::

    Z_in = Z0 coth(Gamma l),  Z0 = sqrt(Z'/Y'),  Gamma = sqrt(Z' Y'),

which tends to 1/(Y' l) = the DC resistance formula as f -> 0. Its effective
length, beyond which more wire lowers |Z_in| by less than 10 %, is
l_eff = ln(20) / (2 Re Gamma) (from coth(x) - 1 ~ 2 e^{-2x}), with Gamma of
the long line (q = gamma).

References
----------
.. [1] E. D. Sunde, *Earth Conduction Effects in Transmission Systems*,
   Van Nostrand, 1949 (Dover reprint 1968), ch. 3 (earth electrodes, buried
   wire) and ch. 5 (buried conductors as transmission lines). (from memory)
.. [2] H. B. Dwight, "Calculation of resistances to ground", Electrical
   Engineering 55, 1319-1328, 1936 (the rod formula).
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import EPSILON_0 as epsilon_0
from aerial.core.constants import MU_0 as mu_0

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

__all__ = ["LineElectrode", "buried_wire_line", "rod_line", "soil_gamma", "EFFECTIVE_LENGTH_CHANGE"]

#: |Z_in| changes by less than this fraction beyond the effective length. [1]
EFFECTIVE_LENGTH_CHANGE = 0.10


class LineElectrode(NamedTuple):
    """An electrode as a lossy line in the soil, at each frequency.

    Attributes
    ----------
    frequency : ndarray
        [Hz]
    impedance : ndarray of complex
        Input impedance at the end where the earth lead connects. [ohm]
    characteristic_impedance : ndarray of complex
        Z0 of the long line. [ohm]
    propagation : ndarray of complex
        Gamma of the long line. [1/m]
    effective_length : ndarray
        Length beyond which more conductor changes |Z_in| by less than 10 %. [m]
    dc_resistance : float
        The DC limit (Sunde's or Dwight's formula). [ohm]
    method : str
    warnings : tuple of str
    """

    frequency: np.ndarray
    impedance: np.ndarray
    characteristic_impedance: np.ndarray
    propagation: np.ndarray
    effective_length: np.ndarray
    dc_resistance: float
    method: str
    warnings: tuple


def soil_gamma(frequency, resistivity, relative_permittivity):
    """Propagation constant of the soil, gamma = sqrt(j omega mu0 (sigma + j omega eps)). [1/m]

    Parameters
    ----------
    frequency : array_like
        [Hz]
    resistivity : float
        [ohm m]
    relative_permittivity : float
        [1]

    Returns
    -------
    gamma : ndarray of complex
        [1/m]
    admittivity : ndarray of complex
        sigma + j omega eps. [S/m]

    Examples
    --------
    >>> g, y = soil_gamma(1e6, 100.0, 15.0)
    >>> round(float(abs(g)), 3)        # 1/|gamma| is about 3.6 m in 100 ohm m soil at 1 MHz
    0.281
    """
    omega = 2 * np.pi * np.asarray(frequency, float)
    y = 1.0 / resistivity + 1j * omega * epsilon_0 * relative_permittivity
    return np.sqrt(1j * omega * mu_0 * y), y


def _line(frequency, length, a_eff, factor, dc_log, resistivity, relative_permittivity, z_internal, method, warnings):
    f = np.atleast_1d(np.asarray(frequency, float))
    if f.ndim != 1 or np.any(~np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError("frequency must be positive and finite [Hz]")
    for name, v in (("length", length), ("resistivity", resistivity)):
        if not (np.isfinite(v) and v > 0):
            raise ModelInputError(f"{name} must be positive and finite, got {v!r}")
    if not (np.isfinite(relative_permittivity) and relative_permittivity >= 1):
        raise ModelInputError(f"relative_permittivity must be >= 1, got {relative_permittivity!r}")
    gamma, y_soil = soil_gamma(f, resistivity, relative_permittivity)
    omega = 2 * np.pi * f
    q0 = 1.12 * np.exp(-dc_log) / a_eff

    def per_metre(q):
        z = np.asarray(z_internal(f), complex) + 1j * omega * mu_0 / (2 * np.pi) * np.log(1.85 / (q * a_eff))
        y = factor * np.pi * y_soil / np.log(1.12 / (q * a_eff))
        return z, y

    mag = np.abs(gamma)
    z, y = per_metre(np.sqrt(mag**2 + q0**2))
    big_g = np.sqrt(z * y)
    z0 = np.sqrt(z / y)
    x = big_g * length
    with np.errstate(over="ignore"):
        coth = np.where(np.abs(x) < 20, 1.0 / np.tanh(np.where(np.abs(x) < 20, x, 1.0)), 1.0)
    z_in = z0 * coth
    zl, yl = per_metre(mag)
    g_long = np.sqrt(zl * yl)
    l_eff = np.log(2.0 / EFFECTIVE_LENGTH_CHANGE) / (2.0 * g_long.real)
    warn = list(warnings)
    if np.any(np.abs(gamma) * a_eff > 0.1):
        warn.append("the conductor is not thin against the soil's skin depth: the line model is rough")
    r_dc = float(dc_log / (factor * np.pi * length / resistivity))
    return LineElectrode(f, z_in, z0, g_long, l_eff, r_dc, method, tuple(warn))


def buried_wire_line(frequency, length, radius, depth, resistivity, relative_permittivity, z_internal=None):
    """A horizontal wire (radial, counterpoise in the soil, water pipe) buried at a depth, as a lossy line.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    length : float
        Buried length. [m]
    radius : float
        Conductor radius. [m]
    depth : float
        Burial depth. [m]
    resistivity : float
        Soil resistivity. [ohm m]
    relative_permittivity : float
        Soil relative permittivity. [1]
    z_internal : callable, optional
        Conductor's internal impedance per metre as a function of frequency
        [ohm/m]; zero when omitted.

    Returns
    -------
    LineElectrode
        Z_in -> rho/(pi l) [ln(2 l / sqrt(2 a d)) - 1] (Sunde's DC formula) as f -> 0.

    Notes
    -----
    See the module docstring (Sunde [1]_ ch. 3 and 5).

    Examples
    --------
    >>> e = buried_wire_line([1.0, 1e6], 10.0, 1e-3, 0.3, 100.0, 15.0)
    >>> round(float(e.impedance[0].real), 2), round(e.dc_resistance, 2)   # Sunde DC: 18.16 ohm
    (18.16, 18.16)
    """
    for name, v in (("radius", radius), ("depth", depth)):
        if not (np.isfinite(v) and v > 0):
            raise ModelInputError(f"{name} must be positive and finite, got {v!r}")
    a_e = float(np.sqrt(2 * radius * depth))
    dc_log = float(np.log(2 * length / a_e) - 1.0)
    warnings = []
    if length < 10 * depth:
        warnings.append("buried wire shorter than 10 depths: Sunde's long-wire formulas are unreliable")
    zi = z_internal or (lambda f: np.zeros_like(f))
    return _line(frequency, float(length), a_e, 1.0, dc_log, float(resistivity), float(relative_permittivity), zi,
                 "Sunde buried wire as a lossy line", warnings)


def rod_line(frequency, length, radius, resistivity, relative_permittivity, z_internal=None):
    """A driven rod from the surface down, as a lossy line.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    length : float
        Driven length. [m]
    radius : float
        Rod radius. [m]
    resistivity : float
        [ohm m]
    relative_permittivity : float
        [1]
    z_internal : callable, optional
        Internal impedance per metre of the rod [ohm/m]; zero when omitted.

    Returns
    -------
    LineElectrode
        Z_in -> rho/(2 pi l) [ln(4 l / a) - 1] (Dwight's formula) as f -> 0.

    Examples
    --------
    >>> e = rod_line([1.0], 2.44, 0.0079375, 100.0, 15.0)
    >>> round(float(e.impedance[0].real), 2)         # Dwight: 2.44 m x 15.875 mm in 100 ohm m, 39.88 ohm
    39.88
    """
    if not (np.isfinite(radius) and radius > 0):
        raise ModelInputError(f"radius must be positive and finite, got {radius!r}")
    dc_log = float(np.log(4 * length / radius) - 1.0)
    zi = z_internal or (lambda f: np.zeros_like(f))
    return _line(frequency, float(length), float(radius), 2.0, dc_log, float(resistivity), float(relative_permittivity),
                 zi, "Dwight rod as a lossy line", [])
