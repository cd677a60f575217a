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
