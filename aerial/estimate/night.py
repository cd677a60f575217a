"""Night-time reception: each station's sky wave and the noise floor by day and by night.

Connects the site's positions and night-time keys to
:mod:`aerial.models.skywave` (ITU-R P.1147) and
:mod:`aerial.models.atmospheric_noise` (ITU-R P.372), returning JSON-ready
figures. The station verdicts use them through :func:`station_nights`.
"""

from __future__ import annotations

import math

import numpy as np

from aerial.models import atmospheric_noise as atm
from aerial.models import noise as noise_mod
from aerial.models import skywave as sw
from aerial.models import sun

#: Geomagnetic latitude assumed when the site gives no position (mid latitudes),
#: with the range carried into the figures. [deg]
ASSUMED_GEOMAGNETIC_LATITUDE_DEG = (45.0, 30.0, 60.0)

#: Latitude assumed for the atmospheric noise when the site gives no position. [deg]
ASSUMED_LATITUDE_DEG = 45.0

#: Sunspot number for the median when the site gives none (mid-cycle); the range
#: spans the whole cycle (:data:`aerial.models.skywave.SUNSPOT_RANGE`). [1]
DEFAULT_SUNSPOT_NUMBER = 75.0

#: Sky and ground waves within this many dB of each other beat and fade. [dB]
FADING_WINDOW_DB = 10.0


def solar_factor(latitude_deg: float | None, longitude_deg: float | None) -> tuple[float, str]:
    """The P.1147 solar-activity factor b for the site's part of the world (from memory).

    Returns (b, region name). North America 4, Europe and Australia 1, elsewhere 0.

    Examples
    --------
    >>> solar_factor(45.0, -90.0)
    (4.0, 'north america')
    >>> solar_factor(None, None)
    (0.0, 'unknown')
    """
    if latitude_deg is None or longitude_deg is None:
        return 0.0, "unknown"
    if latitude_deg > 15 and -170 <= longitude_deg <= -50:
        name = "north america"
    elif latitude_deg > 34 and -25 <= longitude_deg <= 45:
        name = "europe"
    elif latitude_deg < -10 and 110 <= longitude_deg <= 155:
        name = "australia"
    else:
        name = "elsewhere"
    return sw.SOLAR_ACTIVITY_FACTOR[name], name


#: Representative day of the year for a season in the northern hemisphere (mid-season). [d]
SEASON_DAY_NORTH = {"winter": 15, "spring": 105, "summer": 196, "autumn": 288}

#: Named listening times without a site position: hours after sunset and after sunrise on an
#: assumed twelve-hour night (sunset 18 h, sunrise 6 h local time), and the local clock hour.
ASSUMED_NAMED_HOURS = {"evening": (2.0, -10.0, 20.0), "midnight": (6.0, -6.0, 0.0), "before dawn": (11.0, -1.0, 5.0)}


#: Local clock hours for "evening" and "before dawn" where the sun neither sets nor rises. [h]
POLAR_CLOCK_HOURS = {"evening": 20.0, "before dawn": 5.0}


def _season_day(season: str, latitude_deg: float | None) -> int:
    """Mid-season day of the year, half a year on in the southern hemisphere. [d]"""
    day = SEASON_DAY_NORTH[season]
    return (day + 182) % 365 or 365 if (latitude_deg or 0.0) < 0 else day


def _day_of_year(site) -> tuple[int, str]:
    """(day of the year, how it was found) for the sun's times."""
    if site.day_of_year is not None:
        return site.day_of_year, f"the date {site.date_iso}"
    if site.season is not None:
        return _season_day(site.season, site.latitude_deg), f"mid-{site.season}"
    return 80, "the March equinox: no date or season given"


def _utc_offset(site) -> tuple[float, str]:
    if site.utc_offset_h is not None:
        return site.utc_offset_h, ""
    zone = round(site.longitude_deg / 15.0)
    return float(zone), f"clock taken as UTC{zone:+d} for the longitude (give [site] utc_offset)"


def listening_moment(site) -> dict:
    """When the night column is for, JSON-ready.

    ``label`` in words; ``utc_h`` the instant in UTC hours (None for the method's reference hour
    or without the site's position); ``local_h`` the local clock hour (for the noise time block);
    ``day_of_year``; ``assumed`` (hours after sunset and sunrise on an assumed twelve-hour night,
    when the site gives no position); ``notes``.
    """
    when = site.listening_time
    out: dict = {"utc_h": None, "local_h": None, "day_of_year": None, "assumed": None, "notes": []}
    if when is None:
        out["label"] = "six hours after sunset (the method's reference hour)"
        return out
    if site.latitude_deg is None:
        if when == "clock":
            h = site.listening_hour
            out["assumed"] = (float(sun.hours_after(h, 18.0)), float(sun.hours_after(h, 6.0)))
            out["local_h"] = h
            out["label"] = f"{_clock(h)} local time (sunset taken as 18 h)"
        else:
            ss, sr, local = ASSUMED_NAMED_HOURS[when]
            out["assumed"], out["local_h"] = (ss, sr), local
            out["label"] = when + " (on an assumed twelve-hour night)"
        out["notes"].append("The site gives no position: the listening hour is placed on an assumed twelve-hour "
                            "night. Add latitude and longitude to [site] for the sun's own times.")
        return out
    day, from_what = _day_of_year(site)
    offset, offset_note = _utc_offset(site)
    t = sun.sun_times(day, site.latitude_deg, site.longitude_deg)
    polar = str(t.polar)
    words = {"evening": "evening, two hours after sunset", "before dawn": "before dawn, an hour before sunrise",
             "midnight": "midnight"}.get(when)
    if polar and when in POLAR_CLOCK_HOURS:  # no sunset or sunrise to count from: a clock hour instead
        utc = POLAR_CLOCK_HOURS[when] - offset
        words = f"{when}, {polar} at the site"
    elif when == "evening":
        utc = float(t.sunset_utc_h) + 2.0
    elif when == "before dawn":
        utc = float(t.sunrise_utc_h) - 1.0
    else:
        utc = (site.listening_hour or 0.0) - offset
    local = (utc + offset) % 24.0
    label = f"{words} ({_clock(local)} local time, {from_what})" if words else f"{_clock(local)} local time, {from_what}"
    out.update(utc_h=utc % 24.0, local_h=local, day_of_year=day, label=label)
    if offset_note:
        out["notes"].append("Listening hour: " + offset_note + ".")
    if polar:
        out["notes"].append(f"At the site's latitude on {from_what} there is {polar}.")
    return out


def _clock(hour: float) -> str:
    m = int(round(float(hour) % 24.0 * 60.0)) % 1440
    return f"{m // 60:02d}:{m % 60:02d}"


def _station_position(site, st):
    """The station's (latitude, longitude), when the site and the station's bearing or position give it."""
    if st.latitude_deg is not None:
        return st.latitude_deg, st.longitude_deg
    if site.latitude_deg is not None and st.bearing_deg is not None:
        lat, lon = sw.point_along(site.latitude_deg, site.longitude_deg, st.bearing_deg, st.distance_m)
        return float(lat), float(lon)
    return None


def _paths(site, stations) -> dict:
    """Every station's control latitude (with its range), midpoint and how they were found, as arrays."""
    n = len(stations)
    phi, lo, hi = (np.empty(n) for _ in range(3))
    mid = np.full((n, 2), np.nan)
    how = [""] * n
    pos = [_station_position(site, st) for st in stations]
    placed = [i for i, p in enumerate(pos) if p is not None]
    if placed:
        pts = sw.path_points([pos[i][0] for i in placed], [pos[i][1] for i in placed],
                             site.latitude_deg, site.longitude_deg)
        phi[placed] = lo[placed] = hi[placed] = pts.control_geomagnetic_latitude_deg
        mid[placed, 0], mid[placed, 1] = pts.midpoint_latitude_deg, pts.midpoint_longitude_deg
        for i in placed:
            how[i] = "path control point"
    for i in (i for i in range(n) if pos[i] is None):
        if site.latitude_deg is not None:
            # bearing unknown: the control point lies within half the distance of the site
            p = float(sw.geomagnetic_latitude(site.latitude_deg, site.longitude_deg))
            swing = math.degrees(stations[i].distance_m / 2 / sw.EARTH_RADIUS_M)
            phi[i], lo[i], hi[i] = p, p - swing, p + swing
            mid[i] = (site.latitude_deg, site.longitude_deg)
            how[i] = "site (station bearing not given)"
        else:
            phi[i], lo[i], hi[i] = ASSUMED_GEOMAGNETIC_LATITUDE_DEG
            how[i] = "assumed mid latitude (site position not given)"
    return {"phi": phi, "lo": lo, "hi": hi, "mid": mid, "how": how}


def _hours(site, moment, mid) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(L_t, daylight, hours after sunset at the midpoint) for each path."""
    n = len(mid)
    if moment["assumed"] is not None:
        ss, sr = moment["assumed"]
        h = sw.hourly_loss_factor(np.full(n, ss), np.full(n, sr))
        return h.loss_db, h.daylight, np.full(n, ss)
    if moment["utc_h"] is None:
        return np.zeros(n), np.zeros(n, bool), np.full(n, np.nan)
    t = sun.sun_times(moment["day_of_year"], mid[:, 0], mid[:, 1])
    ss = sun.hours_after(moment["utc_h"], t.sunset_utc_h)
    sr = sun.hours_after(moment["utc_h"], t.sunrise_utc_h)
    h = sw.hourly_loss_factor(ss, sr, t.night_length_h)
    return h.loss_db, h.daylight, ss


def _site_sea_distance(site, bearing_deg) -> np.ndarray:
    """The site's distance from the sea along each station's path (NaN: no sea that way). [m]

    With ``sea_bearing`` the coast is taken as a straight line with the sea that way: along a
    path at Δ from it the sea is x / cos Δ away, and behind the site (|Δ| ≥ 90°) not at all.
    Without it, or for a station whose bearing is not known, the sea is taken to lie along the path.
    """
    n = len(bearing_deg)
    if site.distance_to_sea_m is None:
        return np.full(n, np.nan)
    x = np.full(n, float(site.distance_to_sea_m))
    if site.sea_bearing_deg is None:
        return x
    delta = np.radians(bearing_deg - site.sea_bearing_deg)
    cos = np.cos(delta)
    along = np.where(cos > 1e-6, x / np.maximum(cos, 1e-6), np.nan)
    return np.where(np.isfinite(bearing_deg), along, x)


def sky_waves(site, stations=None, moment=None) -> list[dict]:
    """Night-time sky-wave field of each station at the site, JSON-ready (fields in V/m), in one pass.

    The median is for the listening hour (:func:`listening_moment`), with the P.1147 hourly
    loss factor read at each path's midpoint, the sea gain where the site or the station gives
    its distance from the sea, and the polarization loss where the path's bearing is known.
    """
    stations = list(site.stations if stations is None else stations)
    if not stations:
        return []
    moment = listening_moment(site) if moment is None else moment
    paths = _paths(site, stations)
    b, region = solar_factor(site.latitude_deg, site.longitude_deg)
    spots = site.sunspot_number if site.sunspot_number is not None else DEFAULT_SUNSPOT_NUMBER
    f = np.array([st.frequency_hz for st in stations])
    d = np.array([st.distance_m for st in stations])
    p_w = np.array([st.power_w for st in stations])
    bearing = np.array([np.nan if st.bearing_deg is None else st.bearing_deg for st in stations])
    lp = np.zeros(len(stations))
    if site.latitude_deg is not None:
        dip = sw.magnetic_dip(sw.geomagnetic_latitude(site.latitude_deg, site.longitude_deg))
        known = np.isfinite(bearing)
        lp[known] = sw.polarization_coupling_loss(dip, bearing[known])
    tx_sea = np.array([np.nan if st.distance_to_sea_m is None else st.distance_to_sea_m for st in stations])
    rx_sea = _site_sea_distance(site, bearing)
    gs = sw.sea_gain(d, f, tx_sea, rx_sea)
    lt, daylight, after_sunset = _hours(site, moment, paths["mid"])
    hour_read = moment["utc_h"] is not None or moment["assumed"] is not None
    spread = np.hypot(0.5 * gs, sw.HOURLY_LOSS_SPREAD_DB if hour_read else 0.0)
    runs = [sw.night_sky_wave_field(f, d, p_w, paths[k], solar_factor=b, sunspot_number=spots, sea_gain_db=gs,
                                    polarization_loss_db=lp, hourly_loss_db=lt, spread_db=spread)
            for k in ("phi", "lo", "hi")]
    median = runs[0].median_dbuv_m
    low = np.minimum.reduce([r.low_dbuv_m for r in runs])
    high = np.maximum.reduce([r.high_dbuv_m for r in runs])
    to_v = noise_mod.v_per_m_from_dbuv_per_m
    out = []
    for i in range(len(stations)):
        lit = bool(daylight[i])
        out.append({
            "field_v_per_m": 0.0 if lit else float(to_v(median[i])),
            "field_range_v_per_m": [0.0, 0.0] if lit else [float(to_v(low[i])), float(to_v(high[i]))],
            "geomagnetic_latitude_deg": float(paths["phi"][i]),
            "geomagnetic_latitude_from": paths["how"][i],
            "polarization_loss_db": float(lp[i]),
            "sea_gain_db": float(gs[i]),
            "hourly_loss_db": float(lt[i]),
            "time_after_sunset_at_midpoint_s": (None if not np.isfinite(after_sunset[i])
                                                else float(after_sunset[i]) * 3600.0),
            "daylight_at_midpoint": lit,
            "solar_region": region,
            "sunspot_number": spots,
            "outside_method": bool(runs[0].outside_range[i]),
            "listening_time": moment["label"],
        })
    return out


def sky_wave(site, st) -> dict:
    """Night-time sky-wave field of one station at the site (:func:`sky_waves`), JSON-ready."""
    return sky_waves(site, [st])[0]


def combined_night_field(ground_v_per_m: float, sky_v_per_m: float) -> tuple[float, bool]:
    """Ground and sky wave together by night: their powers add on average; (field [V/m], fading?).

    Examples
    --------
    >>> f, fades = combined_night_field(3e-3, 4e-3)
    >>> round(f * 1e3, 3), fades
    (5.0, True)
    """
    total = math.hypot(ground_v_per_m, sky_v_per_m)
    if ground_v_per_m <= 0 or sky_v_per_m <= 0:
        return total, False
    return total, abs(20 * math.log10(ground_v_per_m / sky_v_per_m)) < FADING_WINDOW_DB


#: Local hours of the day column's noise: the 08–12 and 12–16 h blocks. [h]
DAY_BLOCKS = (2, 3)

#: The night column's block when the site asks for no hour: 20–24 h (what [site] atmospheric_noise is for).
DEFAULT_NIGHT_BLOCK = 5


def _block_darkness(site, block: int, day: int) -> float:
    """Share of a local-time block with the sun down at the site on a day (06–18 h sun without a position)."""
    a, b = atm.TIME_BLOCKS[block]
    if site.latitude_deg is None:
        return sun.dark_fraction(a, b, 6.0, 18.0)
    offset, _ = _utc_offset(site)
    t = sun.sun_times(day, site.latitude_deg, site.longitude_deg)
    return sun.dark_fraction(a, b, float(t.sunrise_utc_h) + offset, float(t.sunset_utc_h) + offset, str(t.polar))


def _season_days(site) -> list[tuple[str, int]]:
    if site.day_of_year is not None:
        return [(site.season, site.day_of_year)]
    seasons = [site.season] if site.season else ["winter", "summer"]
    return [(s, _season_day(s, site.latitude_deg)) for s in seasons]


def _block_fam(site, darkness, given: bool) -> tuple[float, float]:
    """(Fam at 1 MHz, its half-range from the seasons) for blocks of the site.

    ``darkness``: (season, [share of each block with the sun down]) for each of :func:`_season_days`.
    """
    if given:
        return float(site.atmospheric_noise_db), 0.0
    lat = site.latitude_deg if site.latitude_deg is not None else ASSUMED_LATITUDE_DEG
    values = []
    for season, darks in darkness:
        night_db = atm.indicative_fam_1mhz(lat, "night", season)
        day_db = atm.indicative_fam_1mhz(lat, "day", season)
        values += [atm.block_fam_1mhz(night_db, day_db, x) for x in darks]
    return float(np.mean(values)), (max(values) - min(values)) / 2


def noise_floor(site, frequency_hz, moment=None) -> dict:
    """External noise figure by day and by night at the given frequencies: man-made plus atmospheric.

    Returns a JSON-ready dict with, for "day" and "night", the total Fam and its
    range [dB], the atmospheric and man-made parts, which dominates, and the
    ITU-R P.372 time block; by night the block holding the listening hour
    (20–24 h when the site asks for none).
    """
    f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
    man = noise_mod.man_made_noise_figure(f, site.noise.replace("-", " ")).noise_figure_db
    moment = listening_moment(site) if moment is None else moment
    night_block = DEFAULT_NIGHT_BLOCK if moment["local_h"] is None else atm.time_block(moment["local_h"])
    out: dict = {"notes": []}
    for tod, blocks in (("day", DAY_BLOCKS), ("night", (night_block,))):
        given = site.atmospheric_noise_db is not None and tod == "night"
        darkness = [(season, [_block_darkness(site, k, day) for k in blocks]) for season, day in _season_days(site)]
        mid, seasons_half = _block_fam(site, darkness, given)
        spread = 0.0 if given else float(np.hypot(seasons_half, atm.INDICATIVE_SPREAD_DB))
        dark = np.mean([x for _, darks in darkness for x in darks])
        curve = "night" if dark >= 0.5 else "day"  # which P.372 frequency curves the block follows
        a = atm.atmospheric_noise_figure(f, mid, curve, spread_db=spread, indicative=not given, block=blocks[0])
        total, dominant = atm.combine_noise_figures(man, a.noise_figure_db)
        low, _ = atm.combine_noise_figures(man, a.low_db)
        high, _ = atm.combine_noise_figures(man, a.high_db)
        out[tod] = {
            "frequencies_hz": f,
            "noise_figure_db": total,
            "noise_figure_range_db": [low, high],
            "man_made_db": man,
            "atmospheric_db": a.noise_figure_db,
            "atmospheric_1mhz_db": mid,
            "time_block": " and ".join(atm.block_name(k) for k in blocks),
            "dominant": ["man-made" if d == 0 else "atmospheric" for d in dominant],
            "atmospheric_source": ("site file (ITU-R P.372 maps)" if given else
                                   "indicative value for the latitude band (ITU-R P.372 maps, from memory, ±10 dB), "
                                   "blended between night and day by the darkness of the time block"),
        }
    if site.latitude_deg is None:
        out["notes"].append("The site gives no latitude: atmospheric noise and sky waves assume mid latitudes. "
                            "Add latitude and longitude to [site] for your own.")
    if site.atmospheric_noise_db is None:
        out["notes"].append("Night-time atmospheric noise is an indicative value for the latitude band; read Fam at "
                            f"1 MHz for your place, season and the {out['night']['time_block']} block from the ITU-R "
                            "P.372 maps and give it as [site] atmospheric_noise for a better floor.")
    return out
