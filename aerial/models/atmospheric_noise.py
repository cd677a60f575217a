"""Atmospheric radio noise at LF and MF (lightning), after ITU-R P.372.

Distant thunderstorms fill LF and MF with impulsive noise that the ionosphere
carries thousands of kilometres by night. ITU-R P.372 gives its median level
as world maps of Fam at 1 MHz for six four-hour time blocks in each season,
plus curves that carry the 1 MHz value to other frequencies. Those maps are
not a closed form and are not shipped with aerial. This module offers:

* the combination of noise sources (powers add) and which one dominates;
* the frequency conversion from Fam at 1 MHz, as a straight-line reading of
  the P.372 frequency-variation curves at LF/MF (from memory, about ±5 dB);
* indicative Fam(1 MHz) by latitude band, season and day or night, read
  **from memory** of the P.372 maps (the median of a band; a given place can
  differ by 10 dB or more), used only when the site does not give its own
  value read from the maps. The range carried with them is ±10 dB.

References
----------
.. [1] ITU-R Recommendation P.372, Radio noise: §5 (atmospheric noise due to
   lightning), the world maps of Fam at 1 MHz by season and time block, and
   the curves of the variation of Fam with frequency. Recalled from memory.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from aerial.core.errors import ModelInputError

#: Seasons as P.372 groups the maps. [-]
SEASONS = ("winter", "spring", "summer", "autumn")

#: Times of day used here: "night" stands for the 20–24 h and 00–04 h local
#: time blocks, "day" for 08–12 h and 12–16 h. [-]
TIMES_OF_DAY = ("day", "night")

#: Indicative median Fam at 1 MHz [dB above kT0b] by geographic latitude band
#: (upper edge of |latitude|, degrees), time of day and season. Read from
#: memory of the ITU-R P.372 maps; a planning default, not a measurement.
INDICATIVE_FAM_1MHZ_DB: dict[tuple[float, str], dict[str, float]] = {
    (20.0, "night"): {"winter": 80.0, "spring": 85.0, "summer": 85.0, "autumn": 85.0},
    (35.0, "night"): {"winter": 65.0, "spring": 72.0, "summer": 80.0, "autumn": 75.0},
    (60.0, "night"): {"winter": 55.0, "spring": 62.0, "summer": 70.0, "autumn": 62.0},
    (90.0, "night"): {"winter": 45.0, "spring": 50.0, "summer": 55.0, "autumn": 50.0},
    (20.0, "day"): {"winter": 45.0, "spring": 50.0, "summer": 50.0, "autumn": 50.0},
    (35.0, "day"): {"winter": 35.0, "spring": 40.0, "summer": 45.0, "autumn": 40.0},
    (60.0, "day"): {"winter": 25.0, "spring": 30.0, "summer": 35.0, "autumn": 30.0},
    (90.0, "day"): {"winter": 20.0, "spring": 22.0, "summer": 25.0, "autumn": 22.0},
}

#: Spread carried with an indicative value (a place within a latitude band). [dB]
INDICATIVE_SPREAD_DB = 10.0

#: Slope of Fam with log10(frequency) at LF/MF, read from memory of the P.372
#: frequency-variation curves (night: falls with frequency; day: roughly flat
#: over MF). [dB per decade]
FREQUENCY_SLOPE_DB_PER_DECADE = {"night": -15.0, "day": 0.0}

#: Frequencies over which the conversion is used. [Hz]
CONVERSION_RANGE_HZ = (100e3, 2e6)


class AtmosphericNoise(NamedTuple):
    noise_figure_db: np.ndarray  #: median Fam at the frequency [dB above kT0b]
    low_db: np.ndarray  #: lower end of the range [dB]
    high_db: np.ndarray  #: upper end of the range [dB]
    indicative: bool  #: True when Fam(1 MHz) came from the built-in indicative table
    outside_range: np.ndarray  #: True outside 100 kHz – 2 MHz (conversion extended)


def _choice(value: str, valid, what: str) -> str:
    if value not in valid:
        raise ModelInputError(f"'{value}' is not a valid {what}, must be one of " + ", ".join(f"'{v}'" for v in valid))
    return value


def indicative_fam_1mhz(latitude_deg: float, time_of_day: str, season: str) -> float:
    """Indicative median atmospheric noise Fam at 1 MHz for a latitude band.

    Parameters
    ----------
    latitude_deg : float
        Geographic latitude of the site, north positive. [deg]
    time_of_day : {"day", "night"}
    season : {"winter", "spring", "summer", "autumn"}
        The site's local season.

    Returns
    -------
    float
        Fam at 1 MHz. [dB above kT0b]

    References
    ----------
    .. [1] ITU-R P.372, maps of Fam at 1 MHz. Read from memory; ±10 dB.

    Examples
    --------
    >>> indicative_fam_1mhz(52.0, "night", "summer")
    70.0
    """
    _choice(time_of_day, TIMES_OF_DAY, "time of day")
    _choice(season, SEASONS, "season")
    lat = abs(float(latitude_deg))
    if not np.isfinite(lat) or lat > 90:
        raise ModelInputError(f"latitude must be from -90 to 90 degrees, got {latitude_deg!r}")
    for (edge, tod), by_season in INDICATIVE_FAM_1MHZ_DB.items():
        if tod == time_of_day and lat <= edge:
            return by_season[season]
    raise AssertionError("unreachable: the last band reaches 90 degrees")


def atmospheric_noise_figure(frequency_hz, fam_1mhz_db: float, time_of_day: str = "night",
                             spread_db: float = 0.0, indicative: bool = False) -> AtmosphericNoise:
    """Atmospheric noise figure at LF/MF from its value at 1 MHz.

    Parameters
    ----------
    frequency_hz : array_like
        [Hz]
    fam_1mhz_db : float
        Median Fam at 1 MHz for the place, season and time block (ITU-R P.372
        maps, or :func:`indicative_fam_1mhz`). [dB above kT0b]
    time_of_day : {"day", "night"}
    spread_db : float
        Half-width of the range to carry (10 dB for an indicative value; the
        frequency conversion adds 5 dB). [dB]
    indicative : bool
        Whether the 1 MHz value is the built-in indicative one.

    Returns
    -------
    AtmosphericNoise

    Notes
    -----
    Fam(f) = Fam(1 MHz) + s·log10(f / 1 MHz), s from
    ``FREQUENCY_SLOPE_DB_PER_DECADE`` (a straight-line reading, from memory,
    of the P.372 curves over 0.1–2 MHz).

    Examples
    --------
    >>> n = atmospheric_noise_figure([0.5e6, 1e6], 70.0)
    >>> [round(float(v), 1) for v in n.noise_figure_db]
    [74.5, 70.0]
    """
    _choice(time_of_day, TIMES_OF_DAY, "time of day")
    f = np.asarray(frequency_hz, dtype=float)
    if not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError(f"frequency must be a positive finite number, got {frequency_hz!r}")
    if not np.isfinite(fam_1mhz_db):
        raise ModelInputError(f"Fam at 1 MHz must be a finite number of dB, got {fam_1mhz_db!r}")
    fam = fam_1mhz_db + FREQUENCY_SLOPE_DB_PER_DECADE[time_of_day] * np.log10(f / 1e6)
    half = float(spread_db) + 5.0
    outside = (f < CONVERSION_RANGE_HZ[0]) | (f > CONVERSION_RANGE_HZ[1])
    return AtmosphericNoise(fam, fam - half, fam + half, bool(indicative), outside)


def combine_noise_figures(*figures_db):
    """Total external noise figure of independent sources (their powers add).

    Parameters
    ----------
    *figures_db : array_like
        Noise figures of each source. [dB]

    Returns
    -------
    total_db : numpy.ndarray
        10·log10 Σ 10^(F_i/10). [dB]
    dominant : numpy.ndarray of int
        Index of the strongest source at each point.

    Examples
    --------
    Two equal sources give 3 dB more:

    >>> t, d = combine_noise_figures(60.0, 60.0)
    >>> round(float(t), 2), int(d)
    (63.01, 0)
    """
    if not figures_db:
        raise ModelInputError("at least one noise figure is needed")
    stack = np.stack(np.broadcast_arrays(*[np.asarray(x, dtype=float) for x in figures_db]))
    total = 10.0 * np.log10(np.sum(10.0 ** (stack / 10.0), axis=0))
    return total, np.argmax(stack, axis=0)
