"""Sunrise and sunset from the date and position (NOAA's general solar-position formulas).

Sky waves at LF and MF follow the sun: the ionosphere's D layer, which absorbs
them by day, fades after sunset and returns after sunrise. The hour relative to
sunset and sunrise at the path's midpoint sets the ITU-R P.1147 hourly loss
factor (:func:`aerial.models.skywave.hourly_loss_factor`), and the share of
darkness in a four-hour block sets the atmospheric noise of that block.

The formulas are NOAA's "General Solar Position Calculations" (NOAA Global
Monitoring Division), a Fourier series in the fractional year for the equation
of time and the solar declination (after Spencer, 1971), with sunrise and
sunset when the sun's centre is 0.833° below the horizon (refraction and the
sun's semi-diameter). Their stated accuracy is about a minute of time away from
the poles — far finer than anything the sky-wave method can use.

References
----------
.. [1] NOAA Global Monitoring Division, General Solar Position Calculations
   (the fractional-year series for the equation of time and declination, and
   the sunrise/sunset hour angle at zenith 90.833°). Recalled from memory.
.. [2] J. Meeus, Astronomical Algorithms, 2nd ed., Willmann-Bell 1998, ch. 15
   (rising and setting; the standard altitude −0°50′ for the sun).
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

#: Zenith angle of the sun's centre at sunrise and sunset: 90° + 50′ (refraction 34′, semi-diameter 16′). [deg]
SUNRISE_ZENITH_DEG = 90.833


class SunTimes(NamedTuple):
    """Sunrise and sunset of one day at one place, in hours of Coordinated Universal Time."""

    sunrise_utc_h: np.ndarray  #: may lie outside 0–24 (the day before or after in UTC) [h]
    sunset_utc_h: np.ndarray  #: [h]
    night_length_h: np.ndarray  #: hours from sunset to the next sunrise (0 in midnight sun, 24 in polar night) [h]
    polar: np.ndarray  #: "" for an ordinary day, "polar night" or "midnight sun"


def _fractional_year(day_of_year, hour_utc=12.0):
    return 2.0 * np.pi / 365.0 * (np.asarray(day_of_year, dtype=float) - 1.0 + (np.asarray(hour_utc) - 12.0) / 24.0)


def equation_of_time(day_of_year, hour_utc=12.0):
    """Equation of time: apparent minus mean solar time.

    Parameters
    ----------
    day_of_year : array_like
        Day of the year, 1 for 1 January. [d]
    hour_utc : array_like
        Hour of the day. [h]

    Returns
    -------
    numpy.ndarray
        [min]

    Notes
    -----
    EoT = 229.18·(0.000075 + 0.001868 cos γ − 0.032077 sin γ − 0.014615 cos 2γ
    − 0.040849 sin 2γ) min, γ = 2π/365·(day − 1 + (hour − 12)/24) [1]_.

    References
    ----------
    .. [1] NOAA, General Solar Position Calculations. From memory.

    Examples
    --------
    Early November the sun is about a quarter of an hour ahead of the clock:

    >>> round(float(equation_of_time(307)), 1)
    16.4
    """
    g = _fractional_year(day_of_year, hour_utc)
    return 229.18 * (0.000075 + 0.001868 * np.cos(g) - 0.032077 * np.sin(g)
                     - 0.014615 * np.cos(2 * g) - 0.040849 * np.sin(2 * g))


def declination(day_of_year, hour_utc=12.0):
    """Solar declination.

    Parameters
    ----------
    day_of_year : array_like
        [d]
    hour_utc : array_like
        [h]

    Returns
    -------
    numpy.ndarray
        [deg]

    Notes
    -----
    δ = 0.006918 − 0.399912 cos γ + 0.070257 sin γ − 0.006758 cos 2γ + 0.000907 sin 2γ
    − 0.002697 cos 3γ + 0.00148 sin 3γ rad [1]_.

    References
    ----------
    .. [1] NOAA, General Solar Position Calculations (Spencer's series). From memory.

    Examples
    --------
    >>> round(float(declination(172)), 2)  # 21 June
    23.45
    """
    g = _fractional_year(day_of_year, hour_utc)
    d = (0.006918 - 0.399912 * np.cos(g) + 0.070257 * np.sin(g) - 0.006758 * np.cos(2 * g)
         + 0.000907 * np.sin(2 * g) - 0.002697 * np.cos(3 * g) + 0.00148 * np.sin(3 * g))
    return np.degrees(d)


def sun_times(day_of_year, latitude_deg, longitude_deg) -> SunTimes:
    """Sunrise and sunset in UTC hours for a day and place.

    Parameters
    ----------
    day_of_year : array_like
        [d]
    latitude_deg : array_like
        North positive. [deg]
    longitude_deg : array_like
        East positive. [deg]

    Returns
    -------
    SunTimes

    Notes
    -----
    cos H = cos 90.833° / (cos φ cos δ) − tan φ tan δ; sunrise = 720 − 4(λ + H) − EoT and
    sunset = 720 − 4(λ − H) − EoT minutes UTC, λ east positive [1]_. Where |cos H| > 1 the sun
    does not rise (polar night) or set (midnight sun).

    References
    ----------
    .. [1] NOAA, General Solar Position Calculations. From memory.

    Examples
    --------
    At the equator on the Greenwich meridian near the March equinox the day is twelve
    hours and seven minutes long (the 0.833° of refraction and semi-diameter):

    >>> t = sun_times(80, 0.0, 0.0)
    >>> round(float(t.sunset_utc_h - t.sunrise_utc_h) * 60)
    727
    """
    day = np.asarray(day_of_year, dtype=float)
    lat = np.asarray(latitude_deg, dtype=float)
    lon = np.asarray(longitude_deg, dtype=float)
    if not (np.all(np.isfinite(day)) and np.all(np.isfinite(lat)) and np.all(np.isfinite(lon))):
        raise ModelInputError("day of year, latitude and longitude must be finite")
    if np.any(np.abs(lat) > 90) or np.any((day < 1) | (day > 366)):
        raise ModelInputError("latitude must lie within ±90° and the day of year within 1–366")
    dec = np.radians(declination(day))
    phi = np.radians(np.clip(lat, -89.999, 89.999))
    cos_h = np.cos(np.radians(SUNRISE_ZENITH_DEG)) / (np.cos(phi) * np.cos(dec)) - np.tan(phi) * np.tan(dec)
    h = np.degrees(np.arccos(np.clip(cos_h, -1.0, 1.0)))
    eot = equation_of_time(day)
    rise = (720.0 - 4.0 * (lon + h) - eot) / 60.0
    sett = (720.0 - 4.0 * (lon - h) - eot) / 60.0
    polar = np.where(cos_h > 1.0, "polar night", np.where(cos_h < -1.0, "midnight sun", ""))
    night = np.where(cos_h > 1.0, 24.0, np.where(cos_h < -1.0, 0.0, 24.0 - (sett - rise)))
    return SunTimes(rise, sett, night, polar)


def hours_after(t_h, event_h):
    """Hours from an event to a time, folded into (−12, 12]. [h]

    Examples
    --------
    >>> float(hours_after(1.0, 23.0)), float(hours_after(22.0, 23.0))
    (2.0, -1.0)
    """
    x = (np.asarray(t_h, dtype=float) - np.asarray(event_h, dtype=float)) % 24.0
    return np.where(x > 12.0, x - 24.0, x)


def dark_fraction(start_h, end_h, sunrise_h, sunset_h, polar="", steps: int = 48):
    """Share of a span of the day (local or UTC hours, the same as the sun times) the sun is down.

    Parameters
    ----------
    start_h, end_h : float
        The span, start < end. [h]
    sunrise_h, sunset_h : float
        Sunrise and sunset on the same clock. [h]
    polar : str
        "polar night" (always dark), "midnight sun" (never) or "".
    steps : int
        Samples across the span.

    Returns
    -------
    float
        0 to 1.

    Examples
    --------
    >>> dark_fraction(20.0, 24.0, 6.0, 18.0), dark_fraction(16.0, 20.0, 6.0, 18.0)
    (1.0, 0.5)
    """
    if polar == "polar night":
        return 1.0
    if polar == "midnight sun":
        return 0.0
    t = start_h + (np.arange(steps) + 0.5) * (end_h - start_h) / steps
    since_rise = (t - sunrise_h) % 24.0
    day_length = (sunset_h - sunrise_h) % 24.0
    return float(np.mean(since_rise >= day_length))
