"""Man-made radio noise (ITU-R P.372) and decibel conversions.

Atmospheric noise, which dominates at LF and at MF by night in many places,
is given in ITU-R P.372 only as world maps by season and time of day; it is not
included here.

References
----------
.. [1] ITU-R Recommendation P.372, Radio noise, Table 1 (man-made noise
   coefficients c, d) and the relation between noise figure and field strength
   for a short vertical monopole over perfect ground (from memory; the values
   match a secondary quotation).
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

#: ITU-R P.372 Table 1: median man-made noise Fam = c − d·log10(f_MHz), dB above kT0b.
MAN_MADE_NOISE_COEFFICIENTS: dict[str, tuple[float, float]] = {
    "city": (76.8, 27.7),
    "residential": (72.5, 27.7),
    "rural": (67.2, 27.7),
    "quiet rural": (53.6, 28.6),
}

#: Frequency range of the man-made noise lines in ITU-R P.372. [Hz]
MAN_MADE_NOISE_RANGE_HZ = (0.3e6, 250e6)

#: Said of a figure below the lines' range: the line extended (alone, where the atmospheric noise is added to it),
#: and with the atmospheric noise this model leaves out.
BELOW_RANGE_EXTENDED = "below 0.3 MHz the ITU-R P.372 man-made noise line is extended beyond its range"
BELOW_RANGE_NOTE = (
    BELOW_RANGE_EXTENDED + "; atmospheric noise at LF/MF needs the P.372 world maps and is not included"
)


def check_noise_category(category: str) -> str:
    """Return ``category`` if it is a known man-made noise category, else raise.

    Examples
    --------
    >>> check_noise_category("rural")
    'rural'
    """
    if category not in MAN_MADE_NOISE_COEFFICIENTS:
        valid = ", ".join(f"'{k}'" for k in MAN_MADE_NOISE_COEFFICIENTS)
        raise ModelInputError(f"'{category}' is not a valid noise category, must be one of {valid}")
    return category


class ManMadeNoise(NamedTuple):
    noise_figure_db: np.ndarray  #: Fam, dB above kT0b (T0 = 290 K) [dB]
    below_range: np.ndarray  #: True below 0.3 MHz (line extended, flagged)
    above_range: np.ndarray  #: True above 250 MHz


def man_made_noise_figure(frequency, category="residential"):
    """Median man-made external noise figure.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    category : {"city", "residential", "rural", "quiet rural"}
        Environment.

    Returns
    -------
    ManMadeNoise
        Fam [dB] and range flags.

    Notes
    -----
    Fam = c − d·log10(f_MHz) [1]_ (Table 1), valid 0.3–250 MHz. Outside the
    range the straight line is extended and the point is flagged.

    References
    ----------
    .. [1] ITU-R P.372, Table 1.

    Examples
    --------
    >>> round(float(man_made_noise_figure(1e6, "residential").noise_figure_db), 1)
    72.5
    """
    c, d = MAN_MADE_NOISE_COEFFICIENTS[check_noise_category(category)]
    f = np.asarray(frequency, dtype=float)
    if not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError(f"frequency must be a positive finite number, got {frequency!r}")
    lo, hi = MAN_MADE_NOISE_RANGE_HZ
    return ManMadeNoise(c - d * np.log10(f / 1e6), np.asarray(f < lo), np.asarray(f > hi))


def noise_field_dbuv_per_m(noise_figure_db, frequency, bandwidth):
    """RMS noise field in a bandwidth for a given external noise figure.

    Parameters
    ----------
    noise_figure_db : array_like
        External noise figure Fa. [dB]
    frequency : array_like
        [Hz]
    bandwidth : array_like
        Noise bandwidth. [Hz]

    Returns
    -------
    ndarray
        Noise field. [dB(µV/m)]

    Notes
    -----
    En = Fa + 20 log10 f_MHz + 10 log10 b_Hz − 95.5 dB(µV/m), for a short
    vertical monopole over perfect ground [1]_.

    References
    ----------
    .. [1] ITU-R P.372.

    Examples
    --------
    >>> round(float(noise_field_dbuv_per_m(72.5, 1e6, 10e3)), 1)
    17.0
    """
    f = np.asarray(frequency, dtype=float)
    b = np.asarray(bandwidth, dtype=float)
    if not np.all(np.isfinite(f)) or np.any(f <= 0) or not np.all(np.isfinite(b)) or np.any(b <= 0):
        raise ModelInputError("frequency and bandwidth must be positive finite numbers")
    return np.asarray(noise_figure_db, dtype=float) + 20.0 * np.log10(f / 1e6) + 10.0 * np.log10(b) - 95.5


def dbuv_per_m_from_v_per_m(field):
    """Field in dB(µV/m) from V/m (zero or negative fields give −300 dB).

    Examples
    --------
    >>> float(dbuv_per_m_from_v_per_m(1e-3))
    60.0
    """
    return 20.0 * np.log10(np.maximum(np.asarray(field, dtype=float), 1e-21) / 1e-6)


def v_per_m_from_dbuv_per_m(level):
    """Field in V/m from dB(µV/m).

    Examples
    --------
    >>> float(v_per_m_from_dbuv_per_m(60.0))
    0.001
    """
    return 1e-6 * 10.0 ** (np.asarray(level, dtype=float) / 20.0)


def db_from_power_ratio(ratio):
    """10·log10 of a power ratio (clamped at −300 dB for zero).

    Examples
    --------
    >>> float(db_from_power_ratio(100.0))
    20.0
    """
    return 10.0 * np.log10(np.maximum(np.asarray(ratio, dtype=float), 1e-30))


def db_from_voltage_ratio(ratio):
    """20·log10 of a voltage (or field) ratio (clamped at −300 dB for zero).

    Examples
    --------
    >>> float(db_from_voltage_ratio(10.0))
    20.0
    """
    return 20.0 * np.log10(np.maximum(np.asarray(ratio, dtype=float), 1e-15))
