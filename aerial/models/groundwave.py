"""Ground-wave field strength at LF/MF over a flat, homogeneous earth.

References
----------
.. [1] ITU-R Recommendation P.368, Ground-wave propagation curves for
   frequencies between 10 kHz and 30 MHz (cymomotive force 300 V: a short
   vertical monopole radiating 1 kW over perfect earth gives 300 mV/m at 1 km).
.. [2] A. Sommerfeld, "Über die Ausbreitung der Wellen in der drahtlosen
   Telegraphie", Annalen der Physik 28, 665-736, 1909.
.. [3] K. A. Norton, "The propagation of radio waves over the surface of the
   earth and in the upper atmosphere", Proc. IRE 24, 1367-1387, 1936, and
   Proc. IRE 25, 1203-1236, 1937.
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import EPSILON_0 as epsilon_0
from aerial.core.constants import SPEED_OF_LIGHT as c

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.models.checks import positive as _positive
from aerial.models.special_functions import wofz

#: Flat-earth range coefficient: use the flat-earth formula within 80 / f_MHz^(1/3) km (from memory). [km]
FLAT_EARTH_RANGE_KM_AT_1MHZ = 80.0

#: Frequency range of ITU-R P.368 ground-wave curves. [Hz]
GROUNDWAVE_FREQUENCY_RANGE_HZ = (10e3, 30e6)




def reference_field(power, distance):
    """Field of a short vertical monopole over perfect, flat earth (no ground loss).

    Parameters
    ----------
    power : array_like
        Radiated power. [W]
    distance : array_like
        Great-circle distance. [m]

    Returns
    -------
    ndarray
        RMS vertical electric field. [V/m]

    Notes
    -----
    E0 = 300 √P_kW / d_km mV/m [1]_, i.e. E0 = √(90 P)/d in SI units.

    References
    ----------
    .. [1] ITU-R P.368 (cymomotive force 300 V for 1 kW from a short monopole).

    Examples
    --------
    >>> round(float(reference_field(1e3, 1e3)) * 1e3, 3)
    300.0
    """
    p = np.asarray(power, dtype=float)
    if not np.all(np.isfinite(p)) or np.any(p < 0):
        raise ModelInputError(f"power must be a non-negative finite number, got {power!r}")
    d = _positive("distance", distance)
    return 0.3 * np.sqrt(p / 1e3) / (d / 1e3)  # [1] 300 mV/m x sqrt(P_kW) / d_km


def complex_relative_permittivity(relative_permittivity, conductivity, frequency):
    """Complex relative permittivity of the ground, εc = εr − jσ/(ωε0).

    Parameters
    ----------
    relative_permittivity : array_like
        [1]
    conductivity : array_like
        [S/m]
    frequency : array_like
        [Hz]

    Returns
    -------
    ndarray of complex
        εc. [1]

    Notes
    -----
    σ/(ωε0) ≈ 60 λ σ (with λ in metres).

    References
    ----------
    Norton, Proc. IRE 24, 1936.

    Examples
    --------
    >>> round(float(-complex_relative_permittivity(15, 1e-3, 1e6).imag), 1)
    18.0
    """
    er = _positive("relative_permittivity", relative_permittivity)
    sigma = np.asarray(conductivity, dtype=float)
    if not np.all(np.isfinite(sigma)) or np.any(sigma < 0):
        raise ModelInputError(f"conductivity must be a non-negative finite number, got {conductivity!r}")
    f = _positive("frequency", frequency)
    return er - 1j * sigma / (2.0 * np.pi * f * epsilon_0)


def norton_attenuation(distance, frequency, relative_permittivity, conductivity):
    """Sommerfeld–Norton flat-earth ground-wave attenuation factor (vertical polarisation).

    Parameters
    ----------
    distance : array_like
        [m]
    frequency : array_like
        [Hz]
    relative_permittivity : array_like
        Ground relative permittivity. [1]
    conductivity : array_like
        Ground conductivity. [S/m]

    Returns
    -------
    ndarray of complex
        F, with |F| ≤ 1 the ratio of the field to the perfect-earth field. [1]

    Notes
    -----
    εc = εr − jσ/(ωε0); numerical distance w = −j(πd/λ)(εc − 1)/εc²;

        F = 1 − j√(πw) e^(−w) erfc(j√w)  [2]_, [3]_,

    evaluated as F = 1 − j√π s·wofz(−s) with s = √w (Faddeeva function, no
    overflow at large w). Valid at distances of many wavelengths over a flat,
    homogeneous earth; see :func:`flat_earth_range`.

    References
    ----------
    .. [2] Sommerfeld, Annalen der Physik 28, 1909.
    .. [3] Norton, Proc. IRE 24 (1936), 25 (1937).

    Examples
    --------
    >>> round(float(abs(norton_attenuation(10e3, 1e6, 30, 1e-2))), 3)
    0.708
    """
    d = _positive("distance", distance)
    f = _positive("frequency", frequency)
    eps = complex_relative_permittivity(relative_permittivity, conductivity, f)
    lam = c / f
    w = -1j * (np.pi * d / lam) * (eps - 1.0) / eps**2
    s = np.sqrt(w + 0j)
    return 1.0 - 1j * np.sqrt(np.pi) * s * wofz(-s)


def flat_earth_range(frequency):
    """Distance within which the flat-earth ground-wave formula may be used.

    Parameters
    ----------
    frequency : array_like
        [Hz]

    Returns
    -------
    ndarray
        80 / f_MHz^(1/3) km, in metres. [m]

    Notes
    -----
    A rule of thumb (from memory); beyond it the earth's curvature lowers the
    field further than the flat-earth formula says.

    References
    ----------
    Norton, Proc. IRE 25, 1937 (curvature becomes important beyond roughly this range).

    Examples
    --------
    >>> round(float(flat_earth_range(1e6)) / 1e3, 1)
    80.0
    """
    f = _positive("frequency", frequency)
    return FLAT_EARTH_RANGE_KM_AT_1MHZ * 1e3 / np.cbrt(f / 1e6)


class GroundWave(NamedTuple):
    field: np.ndarray  #: RMS vertical field at the receiver [V/m]
    attenuation: np.ndarray  #: |F| [1]
    beyond_flat_earth: np.ndarray  #: True where curved-earth effects matter (field likely lower)
    too_close: np.ndarray  #: True within one wavelength (formula not valid)
    outside_frequency_range: np.ndarray  #: True outside 10 kHz - 30 MHz


def groundwave_field(power, distance, frequency, relative_permittivity, conductivity):
    """Ground-wave field of a short vertical transmitting aerial over flat earth.

    Parameters
    ----------
    power : array_like
        Radiated power. [W]
    distance : array_like
        [m]
    frequency : array_like
        [Hz]
    relative_permittivity : array_like
        Ground relative permittivity along the path. [1]
    conductivity : array_like
        Ground conductivity along the path. [S/m]

    Returns
    -------
    GroundWave
        Field [V/m], |F| and flags. All arguments broadcast together.

    Notes
    -----
    E = E0 |F| with E0 = 300 √P_kW / d_km mV/m (ITU-R P.368) and F the
    Sommerfeld–Norton attenuation factor (:func:`norton_attenuation`).
    Curved earth and mixed paths are not modelled: beyond
    :func:`flat_earth_range` the result is flagged ("field likely lower").

    References
    ----------
    ITU-R P.368; Sommerfeld 1909; Norton, Proc. IRE 1936-37.

    Examples
    --------
    >>> g = groundwave_field(10e3, 50e3, 1e6, 30, 1e-2)
    >>> round(float(g.field) * 1e3, 2), bool(g.beyond_flat_earth)
    (5.26, False)
    """
    d, f = np.broadcast_arrays(_positive("distance", distance), _positive("frequency", frequency))
    e0 = reference_field(power, d)
    att = np.abs(norton_attenuation(d, f, relative_permittivity, conductivity))
    lo, hi = GROUNDWAVE_FREQUENCY_RANGE_HZ
    return GroundWave(
        field=e0 * att,
        attenuation=att,
        beyond_flat_earth=np.asarray(d > flat_earth_range(f)),
        too_close=np.asarray(d < c / f),
        outside_frequency_range=np.asarray((f < lo) | (f > hi)),
    )
