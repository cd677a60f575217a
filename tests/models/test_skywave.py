"""Night-time sky wave (ITU-R P.1147 method) and atmospheric noise (ITU-R P.372).

The Recommendations' texts were not at hand: their expressions are implemented
from memory and the checks here say so. Geometry checks use plain spherical
trigonometry (derivations, named as such).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from aerial.core.errors import ModelInputError
from aerial.models import atmospheric_noise as an
from aerial.models import skywave as sw


# --------------------------------------------------------------------------- geometry (derivations)

def test_one_degree_of_meridian_is_r_pi_over_180():
    # derivation: arc length = R·Δφ on a sphere of radius R = 6 371 km
    d, bearing = sw.great_circle(10.0, 20.0, 11.0, 20.0)
    assert float(d) == pytest.approx(sw.EARTH_RADIUS_M * math.pi / 180, rel=1e-12)
    assert float(bearing) == pytest.approx(0.0, abs=1e-9)


def test_quarter_of_the_equator_and_its_bearing():
    # derivation: a quarter great circle is π R / 2; travelling east along the equator
    d, bearing = sw.great_circle(0.0, 0.0, 0.0, 90.0)
    assert float(d) == pytest.approx(math.pi * sw.EARTH_RADIUS_M / 2, rel=1e-12)
    assert float(bearing) == pytest.approx(90.0)


def test_point_along_returns_to_the_target():
    # consistency check: going the computed distance along the computed bearing lands on the target
    d, b = sw.great_circle(51.0, -1.0, 40.0, 15.0)
    lat, lon = sw.point_along(51.0, -1.0, b, d)
    assert float(lat) == pytest.approx(40.0, abs=1e-9) and float(lon) == pytest.approx(15.0, abs=1e-9)


def test_geomagnetic_latitude_is_90_at_the_dipole_pole_and_symmetric():
    # ITU-R P.1147-4 dipole pole 78.5° N, 69° W (from memory)
    assert float(sw.geomagnetic_latitude(78.5, -69.0)) == pytest.approx(90.0)
    assert float(sw.geomagnetic_latitude(-78.5, 111.0)) == pytest.approx(-90.0)
    # along the pole's meridian the geomagnetic latitude is the geographic one plus the pole's co-latitude offset
    assert float(sw.geomagnetic_latitude(0.0, -69.0)) == pytest.approx(90 - 78.5)


def test_magnetic_dip_of_a_dipole():
    # dipole field (any geomagnetism text): tan I = 2 tan Φ; I = 0 at the magnetic equator, 90° at the pole
    assert float(sw.magnetic_dip(0.0)) == pytest.approx(0.0)
    assert float(sw.magnetic_dip(89.999)) == pytest.approx(90.0, abs=0.01)
    assert float(sw.magnetic_dip(30.0)) == pytest.approx(math.degrees(math.atan(2 * math.tan(math.radians(30)))))


# --------------------------------------------------------------------------- the P.1147 expressions (from memory)

def test_slant_distance_over_a_100_km_reflection_height():
    # ITU-R P.1147-4 §2 (from memory): p = sqrt(d² + 40 000) km
    assert float(sw.slant_distance(1_000e3)) / 1e3 == pytest.approx(math.sqrt(1000**2 + 40_000))


def test_basic_loss_factor_formula_and_latitude_cap():
    # ITU-R P.1147-4 §2 (from memory): k = 3.2 + 0.19 f^0.4 tan²(Φ + 3°), f in kHz, |Φ| ≤ 60°
    expected = 3.2 + 0.19 * 1000**0.4 * math.tan(math.radians(53)) ** 2
    assert float(sw.basic_loss_factor(1e6, 50.0)) == pytest.approx(expected, rel=1e-12)
    assert float(sw.basic_loss_factor(1e6, 75.0)) == pytest.approx(float(sw.basic_loss_factor(1e6, 60.0)))
    # the loss grows with frequency and with latitude
    assert float(sw.basic_loss_factor(1.6e6, 50.0)) > float(sw.basic_loss_factor(0.6e6, 50.0))
    assert float(sw.basic_loss_factor(1e6, 55.0)) > float(sw.basic_loss_factor(1e6, 35.0))


def test_field_falls_with_distance_as_the_method_says():
    # ITU-R P.1147-4 §2 (from memory): between two distances the field changes by
    # −20 log(p2/p1) − k (p2 − p1)/1000, every other term being the same
    f, phi = 900e3, 45.0
    e1 = float(sw.night_sky_wave_field(f, 500e3, 10e3, phi).median_dbuv_m)
    e2 = float(sw.night_sky_wave_field(f, 2_000e3, 10e3, phi).median_dbuv_m)
    p1, p2 = math.sqrt(500**2 + 4e4), math.sqrt(2000**2 + 4e4)
    k = 3.2 + 0.19 * 900**0.4 * math.tan(math.radians(48)) ** 2
    assert e1 - e2 == pytest.approx(20 * math.log10(p2 / p1) + k * (p2 - p1) / 1000, abs=1e-9)


def test_power_scales_the_field_by_10_log_p():
    a = float(sw.night_sky_wave_field(1e6, 800e3, 1e3, 45.0).median_dbuv_m)
    b = float(sw.night_sky_wave_field(1e6, 800e3, 100e3, 45.0).median_dbuv_m)
    assert b - a == pytest.approx(20.0)


def test_a_clear_channel_station_lays_down_about_half_a_millivolt_a_metre_at_1000_km():
    # common practice: a 50 kW MF station gives a night-time median sky wave of roughly
    # 0.3–1 mV/m at about 1 000 km in mid latitudes
    e = float(sw.night_sky_wave_field(1e6, 1_000e3, 50e3, 50.0).median_dbuv_m)
    assert 20 * math.log10(300) <= e <= 20 * math.log10(1000)


def test_the_range_brackets_the_median_and_includes_the_within_night_spread():
    # ITU-R P.1147-4 §7 (from memory): upper decile exceeds the median by 0.2|Φ| − 2 dB, within 6–10 dB
    s = sw.night_sky_wave_field([600e3, 1.5e6], [300e3, 3_000e3], 20e3, 52.0, solar_factor=1.0, sunspot_number=60.0)
    assert np.all(s.low_dbuv_m < s.median_dbuv_m) and np.all(s.median_dbuv_m < s.high_dbuv_m)
    assert np.all(s.high_dbuv_m - s.median_dbuv_m >= 8.4 - 1e-9)
    assert float(sw.within_night_deviation(80.0)) == 10.0 and float(sw.within_night_deviation(5.0)) == 6.0


def test_more_sunspots_mean_less_night_signal_where_the_region_has_a_solar_term():
    # ITU-R P.1147 (from memory): k_R = k + 0.01 b R, b = 4 in North America, 0 elsewhere
    quiet = float(sw.night_sky_wave_field(1e6, 1_500e3, 50e3, 55.0, solar_factor=4.0, sunspot_number=0).median_dbuv_m)
    busy = float(sw.night_sky_wave_field(1e6, 1_500e3, 50e3, 55.0, solar_factor=4.0, sunspot_number=150).median_dbuv_m)
    p = math.sqrt(1500**2 + 4e4)
    assert quiet - busy == pytest.approx(0.01 * 4 * 150 * p / 1000)


def test_outside_the_method_is_flagged_not_extrapolated_silently():
    s = sw.night_sky_wave_field([100e3, 1e6, 1e6], [500e3, 20e3, 500e3], 1e3, 45.0)
    assert s.outside_range.tolist() == [True, True, False]
    assert np.all(np.isfinite(s.median_dbuv_m))


def test_polarization_loss_only_in_low_magnetic_latitudes():
    # ITU-R P.1147-4 §5 (from memory): L_p applies where |I| ≤ 45°, most for east–west paths
    assert float(sw.polarization_coupling_loss(50.0, 90.0)) == 0.0
    assert float(sw.polarization_coupling_loss(10.0, 90.0)) > float(sw.polarization_coupling_loss(10.0, 0.0)) >= 0.0


def test_bad_input_is_refused_with_words():
    with pytest.raises(ModelInputError, match="positive"):
        sw.night_sky_wave_field(1e6, 100e3, 0.0, 45.0)
    with pytest.raises(ModelInputError, match="finite"):
        sw.night_sky_wave_field(float("nan"), 100e3, 1e3, 45.0)


# --------------------------------------------------------------------------- atmospheric noise (P.372, from memory)

def test_noise_powers_add():
    # derivation: independent noise powers add; two equal sources are 10 log 2 = 3.01 dB up
    total, dominant = an.combine_noise_figures([60.0, 50.0], [60.0, 70.0])
    assert total[0] == pytest.approx(60 + 10 * math.log10(2))
    assert total[1] == pytest.approx(10 * math.log10(1e5 + 1e7))
    assert dominant.tolist() == [0, 1]


def test_atmospheric_noise_is_higher_by_night_and_in_summer_and_towards_the_tropics():
    # ITU-R P.372 maps (from memory): night-time and summer values exceed daytime and winter ones;
    # levels rise towards the equatorial thunderstorm belts
    assert an.indicative_fam_1mhz(50, "night", "summer") > an.indicative_fam_1mhz(50, "day", "summer")
    assert an.indicative_fam_1mhz(50, "night", "summer") > an.indicative_fam_1mhz(50, "night", "winter")
    assert an.indicative_fam_1mhz(10, "night", "winter") > an.indicative_fam_1mhz(50, "night", "winter")
    assert an.indicative_fam_1mhz(-50, "night", "winter") == an.indicative_fam_1mhz(50, "night", "winter")


def test_night_atmospheric_noise_rises_towards_lf():
    # ITU-R P.372 frequency-variation curves (from memory): by night Fam falls with frequency across LF/MF
    n = an.atmospheric_noise_figure([200e3, 1e6, 1.6e6], 65.0, "night", spread_db=10.0, indicative=True)
    assert n.noise_figure_db[0] > n.noise_figure_db[1] > n.noise_figure_db[2]
    assert np.all(n.low_db < n.noise_figure_db) and np.all(n.noise_figure_db < n.high_db)
    assert n.indicative


def test_bad_choices_list_the_valid_ones():
    with pytest.raises(ModelInputError, match="'monsoon' is not a valid season, must be one of 'winter'"):
        an.indicative_fam_1mhz(40, "night", "monsoon")
    with pytest.raises(ModelInputError, match="time of day"):
        an.atmospheric_noise_figure(1e6, 60.0, "dusk")


# --------------------------------------------------------------------------- the sun's times (NOAA formulas)

from aerial.models import sun  # noqa: E402


def test_declination_at_the_solstices_is_the_obliquity():
    # obliquity of the ecliptic 23.44° (IAU value for the epoch J2000, 23°26'21"; from memory)
    assert float(sun.declination(172)) == pytest.approx(23.44, abs=0.1)
    assert float(sun.declination(355)) == pytest.approx(-23.44, abs=0.1)
    assert abs(float(sun.declination(80))) < 0.5  # March equinox about 20–21 March


def test_equation_of_time_extremes():
    # common practice (almanacs; from memory): about −14.2 min in mid-February, +16.4 min in early November
    days = np.arange(1, 366)
    eot = sun.equation_of_time(days)
    assert float(eot.min()) == pytest.approx(-14.2, abs=0.4) and 35 <= int(days[np.argmin(eot)]) <= 50
    assert float(eot.max()) == pytest.approx(16.4, abs=0.4) and 300 <= int(days[np.argmax(eot)]) <= 312


def test_greenwich_sunrise_and_sunset_at_midsummer_and_midwinter():
    # almanac times for Greenwich (51.48° N, 0°), from memory: 21 June sunrise 03:43 and sunset 20:21 UTC;
    # 21 December sunrise 08:04 and sunset 15:53 UTC. NOAA's series claims about a minute; allow 3.
    june, dec = sun.sun_times(172, 51.48, 0.0), sun.sun_times(355, 51.48, 0.0)
    for got, want in ((june.sunrise_utc_h, 3 + 43 / 60), (june.sunset_utc_h, 20 + 21 / 60),
                      (dec.sunrise_utc_h, 8 + 4 / 60), (dec.sunset_utc_h, 15 + 53 / 60)):
        assert float(got) == pytest.approx(want, abs=3 / 60)


def test_equinox_day_at_the_equator_is_twelve_hours_and_seven_minutes():
    # Meeus, Astronomical Algorithms ch. 15: the sun rises and sets at altitude −0°50′, so the equinoctial
    # day at the equator is 2·(90.833°)/15° h = 12 h 6.7 min (derivation from that standard altitude)
    t = sun.sun_times(80, 0.0, 0.0)
    assert float(t.sunset_utc_h - t.sunrise_utc_h) == pytest.approx(2 * 90.833 / 15, abs=0.02)


def test_polar_night_and_midnight_sun():
    # common practice: at 70° N there is midnight sun at midsummer and polar night at midwinter
    assert str(sun.sun_times(172, 70.0, 20.0).polar) == "midnight sun"
    assert str(sun.sun_times(355, 70.0, 20.0).polar) == "polar night"
    assert float(sun.sun_times(355, 70.0, 20.0).night_length_h) == pytest.approx(24.0)


# --------------------------------------------------------------------------- hourly loss, sea gain (P.1147, from memory)

def test_hourly_loss_is_zero_at_the_reference_hour_and_falls_through_the_evening():
    # ITU-R P.1147-4 §3 (from memory): L_t is relative to the field six hours after sunset; it is large at
    # sunset, falls through the evening, and rises again towards and after sunrise
    h = sw.hourly_loss_factor([0.0, 1.0, 2.0, 4.0, 6.0], [-12.0, -11.0, -10.0, -8.0, -6.0])
    assert float(h.loss_db[-1]) == 0.0
    assert np.all(np.diff(h.loss_db) < 0)
    assert float(h.loss_db[0]) >= 10.0  # at sunset the sky wave is still well down (from memory: about 10 dB)
    dawn = sw.hourly_loss_factor([10.0, 11.0, 12.0, 12.5], [-2.0, -1.0, 0.0, 0.5])
    assert np.all(np.diff(dawn.loss_db) > 0) and not dawn.daylight.any()


def test_daytime_sky_wave_is_not_given_in_full_daylight():
    # ITU-R P.1147 (from memory): the method's field is for darkness and the hours about sunset and sunrise;
    # by day D-layer absorption removes the MF sky wave (common practice)
    h = sw.hourly_loss_factor([-5.0, -1.5, 14.0 - 24], [7.0, 10.5, 2.0])
    assert h.daylight.tolist() == [True, True, True]
    polar = sw.hourly_loss_factor(-3.0, 9.0, night_length_h=24.0)
    assert float(polar.loss_db) == 0.0 and not bool(polar.daylight)


def test_arrival_elevation_approaches_the_flat_earth_angle_on_short_hops():
    # derivation: over a flat earth a hop reflected at height h arrives at atan(2h/d)
    for d in (50e3, 150e3):
        flat = math.degrees(math.atan(2 * sw.REFLECTION_HEIGHT_M / d))
        assert float(sw.arrival_elevation(d)) == pytest.approx(flat, abs=0.6)
    assert float(sw.arrival_elevation(2_300e3)) == pytest.approx(0.0, abs=1.0)  # near the one-hop horizon


def test_sea_gain_by_the_coast_grows_with_path_length_and_fades_inland():
    # ITU-R P.1147-4 §4 (from memory): sea gain for terminals near the sea, larger on longer paths (lower rays),
    # up to about 10 dB with both terminals on the coast; it fades with the terminal's distance from the sea
    both = sw.sea_gain([200e3, 1_000e3, 3_000e3], 1e6, 0.0, 0.0)
    assert np.all(np.diff(both) > 0) and float(both[-1]) == pytest.approx(10.0, abs=0.1)
    one = sw.sea_gain(1_000e3, 1e6, 0.0, None)
    assert float(both[1]) == pytest.approx(2 * float(one))
    inland = sw.sea_gain(1_000e3, 1e6, [0.0, 2e3, 10e3, 200e3], None)
    assert np.all(np.diff(inland) <= 0) and float(inland[-1]) == 0.0
    assert float(sw.sea_gain(1_000e3, 1e6, None, None)) == 0.0


def test_sea_gain_and_hourly_loss_enter_the_field_in_decibels():
    # ITU-R P.1147-4 §2 (from memory): E = V + G_S − L_p + A − 20 log p − k_R p/1000 − L_t
    base = float(sw.night_sky_wave_field(1e6, 800e3, 10e3, 50.0).median_dbuv_m)
    other = float(sw.night_sky_wave_field(1e6, 800e3, 10e3, 50.0, sea_gain_db=4.0, hourly_loss_db=2.5).median_dbuv_m)
    assert other - base == pytest.approx(1.5)


def test_path_points_use_the_midpoint_up_to_3000_km_and_the_worse_end_point_beyond():
    # ITU-R P.1147-4 §2 (from memory)
    short = sw.path_points(40.0, -100.0, 45.0, -90.0)
    mid_lat, mid_lon = sw.point_along(40.0, -100.0, sw.great_circle(40.0, -100.0, 45.0, -90.0)[1],
                                      float(short.distance_m) / 2)
    assert float(short.control_geomagnetic_latitude_deg) == pytest.approx(float(sw.geomagnetic_latitude(mid_lat, mid_lon)))
    long = sw.path_points(0.0, -70.0, 60.0, -70.0)  # 6 700 km northward along a meridian
    _, brg = sw.great_circle(0.0, -70.0, 60.0, -70.0)
    ends = [sw.geomagnetic_latitude(*sw.point_along(0.0, -70.0, brg, x)) for x in (1_000e3, float(long.distance_m) - 1_000e3)]
    assert float(long.control_geomagnetic_latitude_deg) == pytest.approx(float(max(ends, key=lambda v: abs(float(v)))))


# --------------------------------------------------------------------------- time blocks and deciles (P.372, from memory)

def test_time_blocks_and_the_power_mean_of_a_half_dark_block():
    # ITU-R P.372: six four-hour blocks of local time; derivation: a block half dark averages the powers
    assert [an.time_block(h) for h in (0.5, 5, 9, 13, 17, 23.9)] == [0, 1, 2, 3, 4, 5]
    assert an.block_fam_1mhz(60.0, 30.0, 0.5) == pytest.approx(10 * math.log10((1e6 + 1e3) / 2))
    assert sun.dark_fraction(16.0, 20.0, 6.0, 18.0) == pytest.approx(0.5)


def test_noise_range_carries_the_deciles_of_the_block():
    # ITU-R P.372 (from memory): D_u exceeds D_l, a few to ten dB about the block median
    n = an.atmospheric_noise_figure(1e6, 60.0, "night", block=5)
    du, dl = an.DECILE_DEVIATIONS_DB[5]
    assert float(n.high_db) - 60.0 == pytest.approx(du) and 60.0 - float(n.low_db) == pytest.approx(dl)
    assert all(u >= d for u, d in an.DECILE_DEVIATIONS_DB)


def test_quieter_places_rise_faster_towards_lf_and_daytime_lf_stands_well_above_mf():
    # ITU-R P.372 frequency-variation curves (from memory): the curves fan out towards LF; by day MF is
    # absorbed while LF noise still arrives, so the day curve is steeper below 1 MHz
    assert float(an.frequency_slope(20.0)) < float(an.frequency_slope(80.0)) < 0
    assert float(an.frequency_slope(30.0, "day")) < float(an.frequency_slope(30.0, "night"))
    day = an.atmospheric_noise_figure([150e3, 1e6], 30.0, "day")
    assert float(day.noise_figure_db[0] - day.noise_figure_db[1]) > 15.0
