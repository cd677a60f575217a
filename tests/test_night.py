"""Night-time reception inputs and figures: positions, sky waves and the noise floor.

Sites here are invented test inputs; the physics checks live in tests/models/test_skywave.py.
"""

from __future__ import annotations

import math

import pytest

from aerial.cli import main
from aerial.estimate import night, reception
from aerial.models import skywave as sw
from aerial.site.reader import load_site_text

BASE = """
[site]
name = "night test"
{site_extra}

[[runs]]
points = [[0, 0, 0.5], [0, 0, 10]]

[receiver]
at = [0, 0]
height = "0 m"

[[earth.rods]]
length = "2.4 m"

[[stations]]
name = "Far station"
frequency = "700 kHz"
power = "100 kW"
{station_extra}
"""


def _site(site_extra="", station_extra='distance = "800 km"'):
    return load_site_text(BASE.format(site_extra=site_extra, station_extra=station_extra))


def test_positions_give_the_station_distance_and_bearing():
    s = _site('latitude = "51.5 N"\nlongitude = "0.1 W"', 'latitude = 48.0\nlongitude = "2.0 E"')
    st = s.stations[0]
    d, b = sw.great_circle(51.5, -0.1, 48.0, 2.0)
    assert st.distance_m == pytest.approx(float(d)) and st.bearing_deg == pytest.approx(float(b))
    assert s.latitude_deg == 51.5 and s.longitude_deg == -0.1


@pytest.mark.parametrize("site_extra, station_extra, key, words", [
    ('latitude = 91', 'distance = "10 km"', "site.latitude", "from -90 to 90"),
    ('latitude = 50', 'distance = "10 km"', "site.longitude", "both latitude and longitude"),
    ('latitude = "50 E"\nlongitude = 1', 'distance = "10 km"', "site.latitude", "N or S"),
    ('season = "monsoon"', 'distance = "10 km"', "site.season", "winter"),
    ('atmospheric_noise = "loud"', 'distance = "10 km"', "site.atmospheric_noise", "P.372"),
    ('', 'latitude = 40\nlongitude = 3', "stations[0].latitude", "site's own"),
    ('latitude = 50\nlongitude = 1', 'latitude = 40\nlongitude = 3\ndistance = "9 km"', "stations[0].distance",
     "not both"),
])
def test_bad_night_inputs_name_the_key(site_extra, station_extra, key, words):
    from aerial.core.errors import SiteError

    with pytest.raises(SiteError) as err:
        _site(site_extra, station_extra)
    assert key in str(err.value) and words in str(err.value)


def test_sky_wave_uses_the_path_and_flags_its_assumptions():
    placed = night.sky_wave(*_one('latitude = 52.0\nlongitude = 0.0', 'distance = "800 km"\nbearing = 180'))
    unplaced = night.sky_wave(*_one("", 'distance = "800 km"'))
    assert placed["geomagnetic_latitude_from"] == "path control point"
    assert unplaced["geomagnetic_latitude_from"].startswith("assumed")
    for s in (placed, unplaced):
        lo, hi = s["field_range_v_per_m"]
        assert lo < s["field_v_per_m"] < hi
    # a wider assumed latitude band widens the range
    assert unplaced["field_range_v_per_m"][1] / unplaced["field_range_v_per_m"][0] > \
        placed["field_range_v_per_m"][1] / placed["field_range_v_per_m"][0]


def _one(site_extra, station_extra):
    s = _site(site_extra, station_extra)
    return s, s.stations[0]


def test_noise_floor_combines_man_made_and_atmospheric_and_says_which_dominates():
    quiet = _site('noise = "quiet-rural"\nlatitude = 30\nlongitude = 10\nseason = "summer"')
    floor = night.noise_floor(quiet, [600e3, 1.5e6])
    # quiet rural by night in summer at 30°: atmospheric noise dominates (ITU-R P.372: by night at MF
    # atmospheric noise exceeds quiet-rural man-made noise in most places — from memory)
    assert floor["night"]["dominant"] == ["atmospheric", "atmospheric"]
    assert all(t >= max(m, a) for t, m, a in zip(floor["night"]["noise_figure_db"], floor["night"]["man_made_db"],
                                                floor["night"]["atmospheric_db"]))
    city = _site('noise = "city"\nlatitude = 52\nlongitude = 0\nseason = "winter"')
    assert night.noise_floor(city, [1e6])["day"]["dominant"] == ["man-made"]


def test_a_given_atmospheric_noise_replaces_the_indicative_one():
    s = _site('latitude = 52\nlongitude = 0\natmospheric_noise = "60 dB"')
    floor = night.noise_floor(s, [1e6])
    assert floor["night"]["atmospheric_db"][0] == pytest.approx(60.0)
    assert "site file" in floor["night"]["atmospheric_source"]


def test_ground_and_sky_waves_add_in_power_and_fade_when_comparable():
    total, fades = night.combined_night_field(1e-3, 1e-3)
    assert total == pytest.approx(math.sqrt(2) * 1e-3) and fades
    assert night.combined_night_field(1e-3, 1e-5)[1] is False


def test_check_accepts_positions_in_the_users_words(write_site, capsys):
    p = write_site(BASE.format(site_extra='latitude = "51.5°"\nlongitude = "0.12 W"\nseason = "winter"',
                               station_extra='latitude = "48.9 N"\nlongitude = "2.3 E"'))
    assert main(["check", str(p)]) == 0


def test_report_gives_each_station_a_day_and_a_night_verdict(write_site, capsys):
    import json

    p = write_site(BASE.format(site_extra='latitude = 52.0\nlongitude = -1.0\nseason = "winter"',
                               station_extra='distance = "600 km"\nbearing = 135'))
    assert main(["report", str(p), "--json"]) == 0
    st = json.loads(capsys.readouterr().out)["stations"][0]
    n = st["night"]
    # by day the ground wave alone; by night the sky wave adds in power
    assert st["sky_wave_field_v_per_m"] == 0.0
    assert n["field_v_per_m"] == pytest.approx(math.hypot(n["ground_wave_field_v_per_m"], n["sky_wave_field_v_per_m"]))
    assert n["sky_wave_field_range_v_per_m"][0] < n["sky_wave_field_v_per_m"] < n["sky_wave_field_range_v_per_m"][1]
    assert n["verdict"] in reception.VERDICTS
    assert n["noise_dominant"] in ("man-made", "atmospheric")
    # 600 km away a 100 kW station is far beyond its daytime ground wave but arrives by sky wave at night
    assert n["field_v_per_m"] > 10 * st["field_v_per_m"]
    assert main(["report", str(p)]) == 0
    out = capsys.readouterr().out
    assert "by night" in out and "by day" in out


def test_consistency_check_day_and_night_in_one_pass_match_two_separate_assessments():
    # consistency check: judging both conditions in one vectorised pass gives the figures of two passes
    f = [500e3, 1000e3, 1700e3]
    x = [-1 / (2 * math.pi * fi * 100e-12) for fi in f]
    parts = reception.TuningParts(coil_inductance_h=200e-6, capacitor_min_f=15e-12, capacitor_max_f=365e-12)
    aerial = dict(frequency_hz=f, aerial_r_ohm=[25, 25, 25], aerial_x_ohm=x, aerial_rr_ohm=[0.3, 1.2, 3.0],
                  effective_height_m=[8, 8, 8])
    day = [reception.Station("Demo Near", 700e3, 5e3, 30e3, 15.0, 1e-3),
           reception.Station("Demo Far", 1.2e6, 50e3, 700e3, 15.0, 1e-3)]
    night = [reception.Station("Demo Near", 700e3, 5e3, 30e3, 15.0, 1e-3, sky_wave_field_v_per_m=2e-4,
                               atmospheric_noise_db=55.0),
             reception.Station("Demo Far", 1.2e6, 50e3, 700e3, 15.0, 1e-3, sky_wave_field_v_per_m=1e-3,
                               atmospheric_noise_db=55.0)]
    joint = reception.assess_stations_by_condition(**aerial, parts=parts, conditions=[day, night])
    for together, alone in zip(joint, (reception.assess_stations(**aerial, parts=parts, stations=day),
                                       reception.assess_stations(**aerial, parts=parts, stations=night))):
        for a, b in zip(together, alone):
            assert a["verdict_text"] == b["verdict_text"]
            assert a["field_v_per_m"] == pytest.approx(b["field_v_per_m"], rel=1e-12)
            assert a["detector_power_w"] == pytest.approx(b["detector_power_w"], rel=1e-3)
            assert [h["name"] for h in a["heard_behind"]] == [h["name"] for h in b["heard_behind"]]
