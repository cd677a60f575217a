"""Night-time sky-wave field strength at LF and MF (ITU-R P.1147 method).

At LF and MF the ionosphere's E layer returns signals to the ground after
dark, bringing stations from hundreds to thousands of kilometres. ITU-R
Recommendation P.1147 ("Prediction of sky-wave field strength at frequencies
between about 150 and 1 700 kHz") gives the annual median field strength for
a night-time hour from a few closed expressions: a slant distance over a
reflection height of 100 km, a basic loss factor that grows with frequency and
geomagnetic latitude, a solar-activity term, and the within-night spread; a
sea gain for terminals near the sea, and an hourly loss factor for hours other
than the reference hour six hours after sunset (read at the path's midpoint,
with the sun's times from :mod:`aerial.models.sun`).

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

import numpy as np

from aerial.core.constants import SPEED_OF_LIGHT
from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

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


class PathPoints(NamedTuple):
    """The points of a sky-wave path that the method reads, for many paths at once."""

    distance_m: np.ndarray  #: great-circle distance [m]
    control_geomagnetic_latitude_deg: np.ndarray  #: Φ that sets the loss factor [deg]
    midpoint_latitude_deg: np.ndarray  #: [deg]
    midpoint_longitude_deg: np.ndarray  #: [deg]


def path_points(lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg) -> PathPoints:
    """Distance, control-point geomagnetic latitude and midpoint of sky-wave paths (vectorised).

    Φ is taken at the path's midpoint for paths up to 3 000 km; for longer paths at
    the points 1 000 km from each end, the one with the larger |Φ| (the larger
    loss) [1]_ (from memory). The midpoint is where the hour relative to sunset
    and sunrise is read (§3 of [1]_).

    Parameters
    ----------
    lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg : array_like
        Transmitter and receiver positions. [deg]

    Returns
    -------
    PathPoints

    References
    ----------
    .. [1] ITU-R P.1147-4, §2 and §3. From memory.

    Examples
    --------
    >>> p = path_points([50.0, 50.0], [0.0, 0.0], [52.0, 10.0], [0.0, 0.0])
    >>> [round(float(v)) for v in p.distance_m / 1e3]
    [222, 4448]
    >>> [round(float(v), 1) for v in p.midpoint_latitude_deg]
    [51.0, 30.0]
    """
    d, brg = great_circle(lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg)
    mid_lat, mid_lon = point_along(lat_tx_deg, lon_tx_deg, brg, d / 2)
    lat1, lon1 = point_along(lat_tx_deg, lon_tx_deg, brg, np.minimum(1_000e3, d))
    lat2, lon2 = point_along(lat_tx_deg, lon_tx_deg, brg, np.maximum(d - 1_000e3, 0.0))
    phi_mid = geomagnetic_latitude(mid_lat, mid_lon)
    phi1, phi2 = geomagnetic_latitude(lat1, lon1), geomagnetic_latitude(lat2, lon2)
    phi_long = np.where(np.abs(phi1) >= np.abs(phi2), phi1, phi2)
    phi = np.where(d <= 3_000e3, phi_mid, phi_long)
    return PathPoints(d, phi, mid_lat, mid_lon)


def control_latitude(lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg):
    """Geomagnetic latitude Φ that sets the basic loss factor of one path (:func:`path_points`).

    Parameters
    ----------
    lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg : float
        Transmitter and receiver positions. [deg]

    Returns
    -------
    float
        Φ. [deg]

    References
    ----------
    ITU-R P.1147-4, §2 (control points of the path) (module reference [1]; recalled from memory).

    Examples
    --------
    >>> round(control_latitude(78.5, -69.0, 78.5, -69.0), 1)
    90.0
    """
    return float(path_points(lat_tx_deg, lon_tx_deg, lat_rx_deg, lon_rx_deg).control_geomagnetic_latitude_deg)


#: Hourly loss factor L_t of ITU-R P.1147 (its figure for MF), as (hours after sunset, dB) and
#: (hours after sunrise, dB) at the path midpoint, read from memory of the figure; the values are
#: uncertain by a few dB (``HOURLY_LOSS_SPREAD_DB``). Zero is the reference hour, six hours after
#: sunset; the curve is not given in full daylight, where the sky wave is taken as absent.
HOURLY_LOSS_AFTER_SUNSET = ((-1.0, 20.0), (-0.5, 15.0), (0.0, 10.5), (0.5, 7.0), (1.0, 4.5), (2.0, 2.0),
                            (3.0, 1.0), (4.0, 0.5), (5.0, 0.2), (6.0, 0.0))
HOURLY_LOSS_AFTER_SUNRISE = ((-4.0, 0.0), (-3.0, 0.3), (-2.0, 1.0), (-1.0, 2.5), (0.0, 5.5), (0.5, 9.0),
                             (1.0, 14.0))

#: Half-width carried with a value read from the hourly-loss curve. [dB]
HOURLY_LOSS_SPREAD_DB = 3.0


class HourlyLoss(NamedTuple):
    loss_db: np.ndarray  #: L_t relative to the reference hour [dB]
    daylight: np.ndarray  #: True where the midpoint is in full daylight (beyond the curve): no sky wave


def hourly_loss_factor(hours_after_sunset, hours_after_sunrise, night_length_h=12.0) -> HourlyLoss:
    """The P.1147 hourly loss factor L_t at the path midpoint.

    Parameters
    ----------
    hours_after_sunset : array_like
        Time since sunset at the midpoint (negative before it), folded into (−12, 12]. [h]
    hours_after_sunrise : array_like
        Time since sunrise at the midpoint, folded into (−12, 12]. [h]
    night_length_h : array_like
        Hours from sunset to sunrise at the midpoint (24 in polar night, 0 in midnight sun). [h]

    Returns
    -------
    HourlyLoss

    Notes
    -----
    L_t is the larger of the two curves ``HOURLY_LOSS_AFTER_SUNSET`` and
    ``HOURLY_LOSS_AFTER_SUNRISE`` (each zero through the middle of the night) [1]_;
    daylight is an hour or more after sunrise and before the hour before sunset.
    In polar night L_t = 0 at every hour; in midnight sun it is daylight throughout.

    References
    ----------
    .. [1] ITU-R P.1147-4, §3 and its figure of L_t. Read from memory.

    Examples
    --------
    Two hours after sunset, the reference hour, two hours before sunrise, at sunset,
    and at noon (twelve-hour night):

    >>> h = hourly_loss_factor([2.0, 6.0, 10.0, 0.0, -6.0], [-10.0, -6.0, -2.0, 12.0, 6.0])
    >>> [round(float(v), 1) for v in h.loss_db], h.daylight.tolist()
    ([2.0, 0.0, 1.0, 10.5, 20.0], [False, False, False, False, True])
    """
    ss = np.asarray(hours_after_sunset, dtype=float)
    sr = np.asarray(hours_after_sunrise, dtype=float)
    nl = np.broadcast_to(np.asarray(night_length_h, dtype=float), np.broadcast(ss, sr).shape)
    xs, ys = np.array(HOURLY_LOSS_AFTER_SUNSET).T
    xr, yr = np.array(HOURLY_LOSS_AFTER_SUNRISE).T
    evening = np.where((ss >= xs[0]) & (ss <= nl), np.interp(ss, xs, ys), 0.0)
    morning = np.where((sr <= xr[-1]) & (sr >= -nl), np.interp(sr, xr, yr), 0.0)
    dark = (ss >= 0) & (ss <= nl)
    daylight = ~dark & (ss < xs[0]) & (sr > xr[-1])
    loss = np.where(daylight, max(ys[0], yr[-1]), np.maximum(evening, morning))
    daylight = np.where(nl >= 24.0, False, np.where(nl <= 0.0, True, daylight))
    loss = np.where(nl >= 24.0, 0.0, loss)
    return HourlyLoss(loss, daylight)


#: Sea gain for one terminal on the coast, by path length: (km, dB). Read from memory of
#: ITU-R P.1147 (the gain grows with path length as the rays arrive lower, to about 5 dB a
#: terminal, 10 dB with both on the coast); uncertain by half its value.
SEA_GAIN_ONE_TERMINAL = ((50.0, 0.0), (100.0, 1.5), (200.0, 2.2), (500.0, 3.3), (1000.0, 4.3), (2000.0, 5.0))


def arrival_elevation(distance_m):
    """Elevation angle of a one-hop ray reflected at ``REFLECTION_HEIGHT_M`` over a spherical earth.

    Parameters
    ----------
    distance_m : array_like
        Ground distance of the hop. [m]

    Returns
    -------
    numpy.ndarray
        Elevation above the horizontal at each terminal, 0 when the hop is beyond the horizon. [deg]

    Notes
    -----
    With θ = d/(2a) the half-hop angle at the earth's centre and h the reflection
    height, tan Δ = (cos θ − a/(a + h)) / sin θ (plane geometry of the triangle
    earth centre, terminal, reflection point).

    References
    ----------
    ITU-R P.1147-4, §2 (slant distance for a reflection height of 100 km) (module reference [1]; recalled from memory).

    Examples
    --------
    >>> round(float(arrival_elevation(200e3)), 1)  # 100 km up, 100 km away: 45° less the curvature
    44.3
    """
    d = np.maximum(_as_array(distance_m, "distance"), 1.0)
    a, h = EARTH_RADIUS_M, REFLECTION_HEIGHT_M
    th = d / (2 * a)
    return np.degrees(np.maximum(np.arctan2(np.cos(th) - a / (a + h), np.sin(th)), 0.0))


def sea_gain(distance_m, frequency_hz, tx_sea_m=None, rx_sea_m=None):
    """Sea gain G_S for a path with one or both terminals near the sea.

    Parameters
    ----------
    distance_m : array_like
        Path length. [m]
    frequency_hz : array_like
        [Hz]
    tx_sea_m, rx_sea_m : array_like or None
        Distance of each terminal from the sea, with the sea lying along the path
        (None: inland, no gain). [m]

    Returns
    -------
    numpy.ndarray
        G_S ≥ 0. [dB]

    Notes
    -----
    G_S = Σ G_1(d)·s(x) over the terminals: G_1 from ``SEA_GAIN_ONE_TERMINAL``
    (ITU-R P.1147, from memory), and s(x) = max(0, 1 − x/x_F) the share kept by a
    terminal x from the coast, with x_F = λ/(2 sin²Δ) the far edge of the first
    Fresnel zone of the ground reflection in front of it for rays at elevation Δ
    (:func:`arrival_elevation`). The share is this project's reading of the
    method's correction for distance from the sea, not a value from it.

    References
    ----------
    .. [1] ITU-R P.1147-4, §4 (sea gain). From memory.

    Examples
    --------
    >>> round(float(sea_gain(1000e3, 1e6, 0.0, 0.0)), 1)
    8.6
    >>> float(sea_gain(1000e3, 1e6, None, 500e3))
    0.0
    """
    d = _as_array(distance_m, "distance")
    f = _as_array(frequency_hz, "frequency")
    xs, ys = np.array(SEA_GAIN_ONE_TERMINAL).T
    g1 = np.interp(d / 1e3, xs, ys, left=0.0, right=ys[-1])
    lam = SPEED_OF_LIGHT / f
    sin_el = np.maximum(np.sin(np.radians(arrival_elevation(d))), np.sin(np.radians(1.0)))
    x_f = lam / (2 * sin_el**2)
    total = np.zeros(np.broadcast(d, f).shape)
    for x in (tx_sea_m, rx_sea_m):
        if x is None:
            continue
        x = np.asarray(x, dtype=float)
        share = np.where(np.isfinite(x), np.clip(1.0 - np.nan_to_num(x, nan=np.inf) / x_f, 0.0, 1.0), 0.0)
        total = total + g1 * share
    return total


def night_sky_wave_field(frequency_hz, distance_m, power_w, geomagnetic_latitude_deg, *,
                         solar_factor: float = 0.0, sunspot_number: float = 0.0,
                         sea_gain_db=0.0, polarization_loss_db=0.0, hourly_loss_db=0.0,
                         spread_db=0.0) -> SkyWaveField:
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
        sunset; :func:`hourly_loss_factor`); 0 gives the reference night-time median. [dB]
    spread_db : array_like
        Further uncertainty of the terms given (sea gain, hourly loss) to widen the range by. [dB]

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
    low = np.minimum(worst, median) - spread - spread_db
    high = np.maximum(best, median) + spread + spread_db
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
