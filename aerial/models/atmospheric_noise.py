"""Atmospheric radio noise at LF and MF (lightning), after ITU-R P.372.

Distant thunderstorms fill LF and MF with impulsive noise that the ionosphere
carries thousands of kilometres by night. ITU-R P.372 gives its median level
as world maps of Fam at 1 MHz for six four-hour time blocks in each season,
plus curves that carry the 1 MHz value to other frequencies. Those maps are
not a closed form and are not shipped with aerial. This module offers:

* the combination of noise sources (powers add) and which one dominates;
* the frequency conversion from Fam at 1 MHz, a reading of the P.372
  frequency-variation curves at LF/MF whose slope depends on the 1 MHz level
  (the curves fan out: the quieter the place at 1 MHz, the steeper the rise
  towards LF), from memory, about ±5 dB at the band edges;
* the P.372 time blocks (00–04, 04–08, … 20–24 h local time): each block's
  Fam(1 MHz) is the power mean of the night and day levels over the hours of
  the block that are dark and light at the site's latitude and date (an
  interpolation of ours between the maps' night-time and daytime levels);
* the upper and lower deciles D_u and D_l of the hourly values about the
  block's median, by block (from memory of the P.372 tables, about ±3 dB);
* indicative Fam(1 MHz) by latitude band, season and day or night, read
  **from memory** of the P.372 maps (the median of a band; a given place can
  differ by 10 dB or more), used only when the site does not give its own
  value read from the maps. The range carried with them is ±10 dB.

The parts of the range are independent and combine as a root sum of squares.

References
----------
.. [1] ITU-R Recommendation P.372, Radio noise: §5 (atmospheric noise due to
   lightning), the world maps of Fam at 1 MHz by season and time block, and
   the curves of the variation of Fam with frequency. Recalled from memory.
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

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

#: Local-time blocks of the P.372 maps: (start, end) hours. [h]
TIME_BLOCKS = ((0.0, 4.0), (4.0, 8.0), (8.0, 12.0), (12.0, 16.0), (16.0, 20.0), (20.0, 24.0))

#: Upper and lower deciles of the hourly Fam about the block's median at 1 MHz, (D_u, D_l) by
#: block, read from memory of the P.372 tables (larger in the blocks with sunrise or sunset and
#: by day, when nearby storms dominate). [dB]
DECILE_DEVIATIONS_DB = ((7.0, 6.0), (9.0, 7.0), (11.0, 8.0), (11.0, 8.0), (10.0, 7.0), (8.0, 6.0))

#: Frequency curves of P.372 at LF/MF as slopes of Fam with log10(f): below 1 MHz the slope is
#: ``a + b·Fam(1 MHz)`` within [lo, hi], above 1 MHz a fixed slope; read from memory of the
#: curves (night: the noise rises towards LF, less where it is already loud at 1 MHz; day: MF
#: is absorbed, so LF stands much higher). [dB per decade]
FREQUENCY_CURVES = {
    "night": {"a": -38.0, "b": 0.28, "lo": -35.0, "hi": -8.0, "above": -10.0},
    "day": {"a": -50.0, "b": 0.35, "lo": -45.0, "hi": -15.0, "above": 5.0},
}

#: Uncertainty of the frequency conversion at the band edges. [dB]
CONVERSION_SPREAD_DB = 5.0

#: Frequencies over which the conversion is used. [Hz]
CONVERSION_RANGE_HZ = (100e3, 2e6)


def time_block(local_hour: float) -> int:
    """Index in ``TIME_BLOCKS`` of the block holding a local clock hour.

    Examples
    --------
    >>> time_block(21.5), time_block(0.0), time_block(24.0)
    (5, 0, 0)
    """
    h = float(local_hour) % 24.0
    return int(h // 4.0)


def block_name(index: int) -> str:
    """The block as P.372 names it: "20–24 h".

    Examples
    --------
    >>> block_name(5)
    '20–24 h'
    """
    a, b = TIME_BLOCKS[index]
    return f"{a:02.0f}–{b:02.0f} h"


def block_fam_1mhz(night_db: float, day_db: float, dark_fraction: float) -> float:
    """Fam at 1 MHz for a block part dark and part light: the power mean over its hours.

    Parameters
    ----------
    night_db, day_db : float
        Fam at 1 MHz in darkness and in daylight. [dB above kT0b]
    dark_fraction : float
        Share of the block's hours with the sun down (:func:`aerial.models.sun.dark_fraction`). [1]

    Returns
    -------
    float
        10·log10(x·10^(N/10) + (1 − x)·10^(D/10)). [dB above kT0b]

    References
    ----------
    ITU-R P.372, §5, the Fam maps by season and time block (module reference [1]; recalled from memory).

    Examples
    --------
    >>> block_fam_1mhz(60.0, 30.0, 1.0), round(block_fam_1mhz(60.0, 30.0, 0.5), 1)
    (60.0, 57.0)
    """
    x = min(max(float(dark_fraction), 0.0), 1.0)
    return float(10.0 * np.log10(x * 10 ** (night_db / 10) + (1 - x) * 10 ** (day_db / 10)))


def frequency_slope(fam_1mhz_db, time_of_day: str = "night", above_1mhz=False):
    """Slope of Fam with log10(frequency) from the P.372 curves (from memory). [dB per decade]

    References
    ----------
    ITU-R P.372, §5, the curves of Fam against frequency (module reference [1]; recalled from memory).

    Examples
    --------
    >>> float(frequency_slope(60.0)), float(frequency_slope(20.0)), float(frequency_slope(60.0, "day"))
    (-21.2, -32.4, -29.0)
    """
    c = FREQUENCY_CURVES[_choice(time_of_day, TIMES_OF_DAY, "time of day")]
    below = np.clip(c["a"] + c["b"] * np.asarray(fam_1mhz_db, dtype=float), c["lo"], c["hi"])
    return np.where(above_1mhz, c["above"], below)


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
                             spread_db: float = 0.0, indicative: bool = False, block: int | None = None
                             ) -> AtmosphericNoise:
    """Atmospheric noise figure at LF/MF from its value at 1 MHz, with its range.

    Parameters
    ----------
    frequency_hz : array_like
        [Hz]
    fam_1mhz_db : float
        Median Fam at 1 MHz for the place, season and time block (ITU-R P.372
        maps, or :func:`indicative_fam_1mhz`). [dB above kT0b]
    time_of_day : {"day", "night"}
        Which of the frequency curves to follow.
    spread_db : float
        Uncertainty of the 1 MHz value itself (10 dB for an indicative value). [dB]
    indicative : bool
        Whether the 1 MHz value is the built-in indicative one.
    block : int, optional
        Time block (``TIME_BLOCKS``) for the deciles D_u, D_l; without it the
        range leaves out the hour-to-hour variation.

    Returns
    -------
    AtmosphericNoise

    Notes
    -----
    Fam(f) = Fam(1 MHz) + s·log10(f / 1 MHz), s from :func:`frequency_slope`.
    The range is median − √(D_l² + u² + c²) to median + √(D_u² + u² + c²), u the
    1 MHz value's uncertainty and c the conversion's, growing from 0 at 1 MHz to
    ``CONVERSION_SPREAD_DB`` a decade away.

    References
    ----------
    ITU-R P.372, §5: Fam, D_u and D_l (module reference [1]; recalled from memory).

    Examples
    --------
    >>> n = atmospheric_noise_figure([0.5e6, 1e6], 70.0)
    >>> [round(float(v), 1) for v in n.noise_figure_db]
    [75.5, 70.0]
    >>> n = atmospheric_noise_figure(1e6, 60.0, block=5)
    >>> float(n.low_db), float(n.high_db)
    (54.0, 68.0)
    """
    _choice(time_of_day, TIMES_OF_DAY, "time of day")
    f = np.asarray(frequency_hz, dtype=float)
    if not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError(f"frequency must be a positive finite number, got {frequency_hz!r}")
    if not np.isfinite(fam_1mhz_db):
        raise ModelInputError(f"Fam at 1 MHz must be a finite number of dB, got {fam_1mhz_db!r}")
    decades = np.log10(f / 1e6)
    fam = fam_1mhz_db + frequency_slope(fam_1mhz_db, time_of_day, decades > 0) * decades
    du, dl = DECILE_DEVIATIONS_DB[block] if block is not None else (0.0, 0.0)
    conv = CONVERSION_SPREAD_DB * np.minimum(np.abs(decades), 1.0)
    up = np.sqrt(du**2 + float(spread_db) ** 2 + conv**2)
    down = np.sqrt(dl**2 + float(spread_db) ** 2 + conv**2)
    outside = (f < CONVERSION_RANGE_HZ[0]) | (f > CONVERSION_RANGE_HZ[1])
    return AtmosphericNoise(fam, fam - down, fam + up, bool(indicative), outside)


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

    References
    ----------
    ITU-R P.372, §8 (the total noise of several sources added as powers) (module reference [1]; recalled from memory).

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
