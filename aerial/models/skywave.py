"""Night-time sky-wave field strength at LF and MF (ITU-R P.1147 method).

At LF and MF the ionosphere's E layer returns signals to the ground after
dark, bringing stations from hundreds to thousands of kilometres. ITU-R
Recommendation P.1147 ("Prediction of sky-wave field strength at frequencies
between about 150 and 1 700 kHz") gives the annual median field strength for
a night-time hour from a few closed expressions: a slant distance over a
reflection height of 100 km, a basic loss factor that grows with frequency and
geomagnetic latitude, a solar-activity term, and the within-night spread.

All the expressions here are the method's as recalled **from memory** of
ITU-R P.1147-4 (not re-read against the Recommendation); the numbers they give
agree with the common-practice figure that a 50 kW medium-wave station on a
clear channel lays down about 0.5 mV/m by night at about 1 000 km. Treat the
results as the usual planning medians with several dB of uncertainty, which
the ranges carry.

Frame and units: latitudes and longitudes in degrees (north and east
positive), distances in metres, frequencies in hertz, field strengths in
dB(µV/m).

References
----------
.. [1] ITU-R Recommendation P.1147-4, Prediction of sky-wave field strength at
   frequencies between about 150 and 1 700 kHz, §2 (annual median field
   strength, eq. for E, slant distance p, basic loss factor k), §3 (hourly
   loss factor), §5 (excess polarization coupling loss), §7 (variability).
   Recalled from memory.
.. [2] Final Acts of the Regional Administrative LF/MF Broadcasting
   Conference, Geneva 1975, Annex 2 (the same sky-wave method for Regions 1
   and 3). Recalled from memory.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from aerial.core.errors import ModelInputError

#: Mean Earth radius used for great-circle distances. [m]
EARTH_RADIUS_M = 6_371_000.0

#: Geomagnetic north pole of the dipole approximation used by ITU-R P.1147-4
#: (78.5° N, 69° W; from memory). [deg]
GEOMAGNETIC_POLE_DEG = (78.5, -69.0)

#: Reflection height of the E layer in the slant-distance expression. [m]
REFLECTION_HEIGHT_M = 100e3

#: Frequency range of the method. [Hz]
SKY_WAVE_FREQUENCY_RANGE_HZ = (150e3, 1700e3)

#: Path lengths over which the method is stated to hold. [m]
SKY_WAVE_DISTANCE_RANGE_M = (50e3, 12_000e3)

#: Solar-activity factor b by region (North America 4, Europe and Australia 1,
#: elsewhere 0; ITU-R P.1147 from memory). [1]
SOLAR_ACTIVITY_FACTOR = {"north america": 4.0, "europe": 1.0, "australia": 1.0, "elsewhere": 0.0}

#: Smoothed sunspot numbers spanning a solar cycle, used for the year-to-year range. [1]
SUNSPOT_RANGE = (0.0, 150.0)


class SkyWaveField(NamedTuple):
    """Night-time sky-wave field of one transmitter at one receiving site."""

    median_dbuv_m: np.ndarray  #: annual median at the reference night hour [dB(µV/m)]
    low_dbuv_m: np.ndarray  #: lower decile within the night, worst year of the cycle [dB(µV/m)]
    high_dbuv_m: np.ndarray  #: upper decile within the night, best year of the cycle [dB(µV/m)]
    slant_distance_m: np.ndarray  #: p [m]
    loss_factor_db_per_1000km: np.ndarray  #: k_R at the sunspot number used for the median [dB]
    control_geomagnetic_latitude_deg: np.ndarray  #: Φ used for k [deg]
    outside_range: np.ndarray  #: True where frequency or distance is outside the method's range


def _as_array(value, name: str) -> np.ndarray:
    arr = np.asarray(value, dtype=float)
    if not np.all(np.isfinite(arr)):
        raise ModelInputError(f"{name} must be finite, got {value!r}")
    return arr


def geomagnetic_latitude(latitude_deg, longitude_deg):
    """Geomagnetic latitude in the dipole approximation of ITU-R P.1147.

    Parameters
    ----------
    latitude_deg : array_like
        Geographic latitude, north positive. [deg]
    longitude_deg : array_like
        Geographic longitude, east positive. [deg]

    Returns
    -------
    numpy.ndarray
        Geomagnetic latitude Φ. [deg]

    Notes
    -----
    Φ = arcsin[sin a · sin a_p + cos a · cos a_p · cos(b − b_p)], with the
    dipole's north pole at (a_p, b_p) = (78.5° N, 69° W) [1]_ (from memory).

    References
    ----------
    .. [1] ITU-R P.1147-4, §2 (geomagnetic latitude). From memory.

    Examples
    --------
    >>> float(geomagnetic_latitude(78.5, -69.0))
    90.0
    >>> round(float(geomagnetic_latitude(0.0, -69.0)), 1)
    11.5
    """
    a = np.radians(_as_array(latitude_deg, "latitude"))
    b = np.radians(_as_array(longitude_deg, "longitude"))
    ap, bp = np.radians(GEOMAGNETIC_POLE_DEG[0]), np.radians(GEOMAGNETIC_POLE_DEG[1])
    s = np.sin(a) * np.sin(ap) + np.cos(a) * np.cos(ap) * np.cos(b - bp)
    return np.degrees(np.arcsin(np.clip(s, -1.0, 1.0)))


def great_circle(lat1_deg, lon1_deg, lat2_deg, lon2_deg):
    """Great-circle distance and initial bearing from point 1 to point 2 on a sphere.

    Parameters
    ----------
    lat1_deg, lon1_deg, lat2_deg, lon2_deg : array_like
        Latitudes (north positive) and longitudes (east positive). [deg]

    Returns
    -------
    distance_m : numpy.ndarray
        Great-circle distance on a sphere of radius ``EARTH_RADIUS_M``. [m]
    bearing_deg : numpy.ndarray
        Initial bearing from point 1, clockwise from true north, 0–360. [deg]

    Notes
    -----
    Haversine formula for the distance; the usual spherical-trigonometry
    expression for the initial course.

    Examples
    --------
    One degree of latitude along a meridian is R·π/180:

    >>> d, b = great_circle(0.0, 0.0, 1.0, 0.0)
    >>> round(float(d)), float(b)
    (111195, 0.0)
    """
    p1, p2 = np.radians(_as_array(lat1_deg, "latitude")), np.radians(_as_array(lat2_deg, "latitude"))
    dl = np.radians(_as_array(lon2_deg, "longitude") - _as_array(lon1_deg, "longitude"))
    h = np.sin((p2 - p1) / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(dl / 2) ** 2
    distance = 2 * EARTH_RADIUS_M * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))
    y = np.sin(dl) * np.cos(p2)
    x = np.cos(p1) * np.sin(p2) - np.sin(p1) * np.cos(p2) * np.cos(dl)
    bearing = np.degrees(np.arctan2(y, x)) % 360.0
    return distance, bearing


def point_along(latitude_deg, longitude_deg, bearing_deg, distance_m):
    """The point reached by travelling ``distance_m`` from a start along a great circle.

    Parameters
    ----------
    latitude_deg, longitude_deg : array_like
        Start. [deg]
    bearing_deg : array_like
        Initial bearing, clockwise from true north. [deg]
    distance_m : array_like
        Distance along the great circle. [m]

    Returns
    -------
    latitude_deg, longitude_deg : numpy.ndarray
        The point reached; longitude in (−180, 180]. [deg]

    Examples
    --------
    >>> lat, lon = point_along(0.0, 0.0, 90.0, 111_194.93)
    >>> round(float(lat), 6), round(float(lon), 4)
    (0.0, 1.0)
    """
    p1 = np.radians(_as_array(latitude_deg, "latitude"))
    l1 = np.radians(_as_array(longitude_deg, "longitude"))
    th = np.radians(_as_array(bearing_deg, "bearing"))
    dr = _as_array(distance_m, "distance") / EARTH_RADIUS_M
    p2 = np.arcsin(np.clip(np.sin(p1) * np.cos(dr) + np.cos(p1) * np.sin(dr) * np.cos(th), -1, 1))
    l2 = l1 + np.arctan2(np.sin(th) * np.sin(dr) * np.cos(p1), np.cos(dr) - np.sin(p1) * np.sin(p2))
    lon = (np.degrees(l2) + 180.0) % 360.0 - 180.0
    return np.degrees(p2) + 0.0, lon + 0.0


def slant_distance(distance_m):
    """Slant propagation distance p of ITU-R P.1147 for a reflection at 100 km.

    Parameters
    ----------
    distance_m : array_like
        Great-circle ground distance d. [m]

    Returns
    -------
    numpy.ndarray
        p = √(d² + (2·100 km)²). [m]

    Notes
    -----
    In kilometres: p = √(d² + 40 000) [1]_ (from memory).

    References
    ----------
    .. [1] ITU-R P.1147-4, §2. From memory.

    Examples
    --------
    >>> float(slant_distance(0.0))
    200000.0
    """
    d = _as_array(distance_m, "distance")
    return np.sqrt(d**2 + (2 * REFLECTION_HEIGHT_M) ** 2)


def basic_loss_factor(frequency_hz, geomagnetic_latitude_deg):
    """The basic loss factor k of ITU-R P.1147, in dB per 1 000 km of slant path.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency. [Hz]
    geomagnetic_latitude_deg : array_like
        Geomagnetic latitude Φ of the path's control point. [deg]

    Returns
    -------
    numpy.ndarray
        k = 3.2 + 0.19·f^0.4·tan²(Φ + 3°), f in kHz, |Φ| limited to 60°. [dB]

    References
    ----------
    .. [1] ITU-R P.1147-4, §2 (basic loss factor). From memory.

    Examples
    --------
    >>> round(float(basic_loss_factor(1e6, 50.0)), 2)
    8.5
    """
    f_khz = _as_array(frequency_hz, "frequency") / 1e3
    phi = np.clip(np.abs(_as_array(geomagnetic_latitude_deg, "geomagnetic latitude")), 0.0, 60.0)
    return 3.2 + 0.19 * f_khz**0.4 * np.tan(np.radians(phi + 3.0)) ** 2


def within_night_deviation(geomagnetic_latitude_deg):
    """Amount by which the upper decile of the field exceeds the median within the night.

    Parameters
    ----------
    geomagnetic_latitude_deg : array_like
        Geomagnetic latitude Φ of the path's control point. [deg]

    Returns
    -------
    numpy.ndarray
        ΔE = 0.2·|Φ| − 2 dB, kept within 6 to 10 dB. [dB]

    References
    ----------
    .. [1] ITU-R P.1147-4, §7 (variability). From memory.

    Examples
    --------
    >>> float(within_night_deviation(50.0)), float(within_night_deviation(10.0))
    (8.0, 6.0)
    """
    phi = np.abs(_as_array(geomagnetic_latitude_deg, "geomagnetic latitude"))
    return np.clip(0.2 * phi - 2.0, 6.0, 10.0)


def control_latitude(lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg):
    """Geomagnetic latitude Φ that sets the basic loss factor of a path.

    The path's midpoint for paths up to 3 000 km; for longer paths the
    points 1 000 km from each end, taking the one with the larger |Φ| (the
    larger loss) [1]_ (from memory).

    Parameters
    ----------
    lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg : float
        Transmitter and receiver positions. [deg]

    Returns
    -------
    float
        Φ. [deg]

    Examples
    --------
    >>> round(control_latitude(78.5, -69.0, 78.5, -69.0), 1)
    90.0
    """
    d, brg = great_circle(lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg)
    d = float(d)
    if d <= 3_000e3:
        lat, lon = point_along(lat_tx_deg, lon_tx_deg, brg, d / 2)
        return float(geomagnetic_latitude(lat, lon))
    lat1, lon1 = point_along(lat_tx_deg, lon_tx_deg, brg, 1_000e3)
    lat2, lon2 = point_along(lat_tx_deg, lon_tx_deg, brg, d - 1_000e3)
    phis = [float(geomagnetic_latitude(lat1, lon1)), float(geomagnetic_latitude(lat2, lon2))]
    return max(phis, key=abs)


def night_sky_wave_field(frequency_hz, distance_m, power_w, geomagnetic_latitude_deg, *,
                         solar_factor: float = 0.0, sunspot_number: float = 0.0,
                         sea_gain_db=0.0, polarization_loss_db=0.0, hourly_loss_db=0.0) -> SkyWaveField:
    """Annual median night-time sky-wave field strength by the ITU-R P.1147 method.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency. [Hz]
    distance_m : array_like
        Great-circle distance from transmitter to receiver. [m]
    power_w : array_like
        Transmitter power into a short vertical aerial (cymomotive force 300 V
        at 1 kW; taller masts have vertical-plane gain that this ignores). [W]
    geomagnetic_latitude_deg : array_like
        Φ of the path's control point (:func:`control_latitude`). [deg]
    solar_factor : float
        Solar-activity factor b (``SOLAR_ACTIVITY_FACTOR``). [1]
    sunspot_number : float
        Twelve-month smoothed sunspot number R for the median. [1]
    sea_gain_db : array_like
        Sea-gain correction G_S for paths with a terminal by the sea. [dB]
    polarization_loss_db : array_like
        Excess polarization coupling loss L_p (:func:`polarization_coupling_loss`). [dB]
    hourly_loss_db : array_like
        Hourly loss factor L_t relative to the reference hour (six hours after
        sunset); 0 gives the reference night-time median. [dB]

    Returns
    -------
    SkyWaveField
        Median and the within-night deciles widened by the solar-cycle swing
        (R from 0 to 150). [dB(µV/m)]

    Notes
    -----
    E = V + G_S − L_p + A − 20·log10(p) − k_R·p/1000 − L_t [1]_, with
    V = 10·log10(P/1 kW) (the transmitter's cymomotive force over 300 V),
    A = 106.6 − 2·sin Φ, p in km, k_R = k + 0.01·b·R. From memory.

    References
    ----------
    .. [1] ITU-R P.1147-4, §2. From memory.

    Examples
    --------
    A 50 kW station 1 000 km away at Φ = 50° (common practice: about
    0.5 mV/m by night):

    >>> e = night_sky_wave_field(1e6, 1_000e3, 50e3, 50.0)
    >>> round(float(e.median_dbuv_m), 1)
    53.2
    """
    f = _as_array(frequency_hz, "frequency")
    d = _as_array(distance_m, "distance")
    p_w = _as_array(power_w, "power")
    if np.any(f <= 0) or np.any(d < 0) or np.any(p_w <= 0):
        raise ModelInputError("frequency and power must be positive and distance non-negative")
    phi = _as_array(geomagnetic_latitude_deg, "geomagnetic latitude")
    v = 10 * np.log10(p_w / 1e3)
    p_km = slant_distance(d) / 1e3
    a = 106.6 - 2 * np.sin(np.radians(phi))
    k = basic_loss_factor(f, phi)

    def field(r):
        k_r = k + 0.01 * solar_factor * r
        return v + sea_gain_db - polarization_loss_db + a - 20 * np.log10(p_km) - k_r * p_km / 1e3 - hourly_loss_db

    median = field(sunspot_number)
    spread = within_night_deviation(phi)
    worst, best = field(SUNSPOT_RANGE[1]), field(SUNSPOT_RANGE[0])
    low = np.minimum(worst, median) - spread
    high = np.maximum(best, median) + spread
    outside = ((f < SKY_WAVE_FREQUENCY_RANGE_HZ[0]) | (f > SKY_WAVE_FREQUENCY_RANGE_HZ[1])
               | (d < SKY_WAVE_DISTANCE_RANGE_M[0]) | (d > SKY_WAVE_DISTANCE_RANGE_M[1]))
    return SkyWaveField(median, low, high, p_km * 1e3, k + 0.01 * solar_factor * sunspot_number, phi + 0 * median,
                        outside)


def magnetic_dip(geomagnetic_latitude_deg):
    """Magnetic dip I of a centred dipole field: tan I = 2·tan Φ.

    Parameters
    ----------
    geomagnetic_latitude_deg : array_like
        Φ. [deg]

    Returns
    -------
    numpy.ndarray
        Dip angle I, positive in the northern geomagnetic hemisphere. [deg]

    References
    ----------
    .. [1] Any geomagnetism text, dipole field: tan I = 2 tan Φ.

    Examples
    --------
    >>> round(float(magnetic_dip(45.0)), 2)
    63.43
    """
    phi = np.radians(_as_array(geomagnetic_latitude_deg, "geomagnetic latitude"))
    return np.degrees(np.arctan(2 * np.tan(phi)))


def polarization_coupling_loss(dip_deg, path_azimuth_deg):
    """Excess polarization coupling loss L_p at a terminal in low magnetic latitudes.

    Parameters
    ----------
    dip_deg : array_like
        Magnetic dip I at the terminal. [deg]
    path_azimuth_deg : array_like
        Azimuth of the path at the terminal from true north (used here in place
        of the magnetic east–west bearing the method asks for). [deg]

    Returns
    -------
    numpy.ndarray
        L_p = 180·(36 + θ² + I²)^(−1/2) − 2 dB for |I| ≤ 45°, else 0, where θ is
        the path's angle from magnetic east–west (0–90°); never negative. [dB]

    References
    ----------
    .. [1] ITU-R P.1147-4, §5. From memory.

    Examples
    --------
    >>> float(polarization_coupling_loss(60.0, 0.0))
    0.0
    >>> round(float(polarization_coupling_loss(0.0, 90.0)), 1)
    28.0
    """
    i = np.abs(_as_array(dip_deg, "dip"))
    az = _as_array(path_azimuth_deg, "azimuth") % 180.0
    theta = np.abs(90.0 - az)  # 0 for an east–west path, 90 for north–south
    lp = 180.0 / np.sqrt(36.0 + theta**2 + i**2) - 2.0
    return np.where(i <= 45.0, np.maximum(lp, 0.0), 0.0)
