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


def _station_position(site, st):
    """The station's (latitude, longitude), when the site and the station's bearing or position give it."""
    if st.latitude_deg is not None:
        return st.latitude_deg, st.longitude_deg
    if site.latitude_deg is not None and st.bearing_deg is not None:
        lat, lon = sw.point_along(site.latitude_deg, site.longitude_deg, st.bearing_deg, st.distance_m)
        return float(lat), float(lon)
    return None


def _control_latitudes(site, st) -> tuple[float, float, float, str]:
    """(Φ, Φ low, Φ high, how it was found) for one station's path."""
    pos = _station_position(site, st)
    if pos is not None:
        phi = sw.control_latitude(pos[0], pos[1], site.latitude_deg, site.longitude_deg)
        return phi, phi, phi, "path control point"
    if site.latitude_deg is not None:
        # bearing unknown: the control point lies within half the distance of the site
        phi = float(sw.geomagnetic_latitude(site.latitude_deg, site.longitude_deg))
        swing = math.degrees(st.distance_m / 2 / sw.EARTH_RADIUS_M)
        return phi, phi - swing, phi + swing, "site (station bearing not given)"
    mid, lo, hi = ASSUMED_GEOMAGNETIC_LATITUDE_DEG
    return mid, lo, hi, "assumed mid latitude (site position not given)"


def sky_wave(site, st) -> dict:
    """Night-time sky-wave field of one station at the site, JSON-ready (fields in V/m)."""
    phi, phi_lo, phi_hi, how = _control_latitudes(site, st)
    b, region = solar_factor(site.latitude_deg, site.longitude_deg)
    spots = site.sunspot_number if site.sunspot_number is not None else DEFAULT_SUNSPOT_NUMBER
    lp = 0.0
    if site.latitude_deg is not None and st.bearing_deg is not None:
        dip = sw.magnetic_dip(sw.geomagnetic_latitude(site.latitude_deg, site.longitude_deg))
        lp = float(sw.polarization_coupling_loss(dip, st.bearing_deg))
    runs = [sw.night_sky_wave_field(st.frequency_hz, st.distance_m, st.power_w, p, solar_factor=b,
                                    sunspot_number=spots, polarization_loss_db=lp) for p in (phi, phi_lo, phi_hi)]
    median = float(runs[0].median_dbuv_m)
    low = min(float(r.low_dbuv_m) for r in runs)
    high = max(float(r.high_dbuv_m) for r in runs)
    return {
        "field_v_per_m": float(noise_mod.v_per_m_from_dbuv_per_m(median)),
        "field_range_v_per_m": [float(noise_mod.v_per_m_from_dbuv_per_m(low)),
                                float(noise_mod.v_per_m_from_dbuv_per_m(high))],
        "geomagnetic_latitude_deg": phi,
        "geomagnetic_latitude_from": how,
        "polarization_loss_db": lp,
        "solar_region": region,
        "sunspot_number": spots,
        "outside_method": bool(runs[0].outside_range),
    }


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


def noise_floor(site, frequency_hz) -> dict:
    """External noise figure by day and by night at the given frequencies: man-made plus atmospheric.

    Returns a JSON-ready dict with, for "day" and "night", the total Fam and its
    range [dB], the atmospheric and man-made parts, and which dominates.
    """
    f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
    man = noise_mod.man_made_noise_figure(f, site.noise.replace("-", " ")).noise_figure_db
    lat = site.latitude_deg if site.latitude_deg is not None else ASSUMED_LATITUDE_DEG
    seasons = [site.season] if site.season else ["winter", "summer"]
    out: dict = {"notes": []}
    for tod in ("day", "night"):
        given = site.atmospheric_noise_db is not None and tod == "night"
        if given:
            fam1 = [site.atmospheric_noise_db]
            spread = 0.0
        else:
            fam1 = [atm.indicative_fam_1mhz(lat, tod, s) for s in seasons]
            spread = atm.INDICATIVE_SPREAD_DB
        mid = float(np.mean(fam1))
        half = (max(fam1) - min(fam1)) / 2 + spread
        a = atm.atmospheric_noise_figure(f, mid, tod, spread_db=half, indicative=not given)
        total, dominant = atm.combine_noise_figures(man, a.noise_figure_db)
        low, _ = atm.combine_noise_figures(man, a.low_db)
        high, _ = atm.combine_noise_figures(man, a.high_db)
        out[tod] = {
            "frequencies_hz": f,
            "noise_figure_db": total,
            "noise_figure_range_db": [low, high],
            "man_made_db": man,
            "atmospheric_db": a.noise_figure_db,
            "dominant": ["man-made" if d == 0 else "atmospheric" for d in dominant],
            "atmospheric_source": ("site file (ITU-R P.372 maps)" if given else
                                   "indicative value for the latitude band (ITU-R P.372 maps, from memory, ±10 dB)"),
        }
    if site.latitude_deg is None:
        out["notes"].append("The site gives no latitude: atmospheric noise and sky waves assume mid latitudes. "
                            "Add latitude and longitude to [site] for your own.")
    if site.atmospheric_noise_db is None:
        out["notes"].append("Night-time atmospheric noise is an indicative value for the latitude band; read Fam at "
                            "1 MHz for your place, season and the 20–24 h block from the ITU-R P.372 maps and give it "
                            "as [site] atmospheric_noise for a better floor.")
    return out
