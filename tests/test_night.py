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
    ('listening_time = "dusk"', 'distance = "10 km"', "site.listening_time", "before dawn"),
    ('listening_time = "25:10"', 'distance = "10 km"', "site.listening_time", "21:30"),
    ('date = "15/01/2026"', 'distance = "10 km"', "site.date", "year-month-day"),
    ('utc_offset = "+15"', 'distance = "10 km"', "site.utc_offset", "-12 to +14"),
    ('latitude = 50\nlongitude = 1\nseason = "winter"\ndate = 2026-07-01', 'distance = "10 km"', "site.season",
     "falls in summer"),
    ('distance_to_sea = "-3 km"', 'distance = "10 km"', "site.distance_to_sea", "at least 0"),
    ('sea_bearing = 90', 'distance = "10 km"', "site.sea_bearing", "distance_to_sea"),
    ('', 'distance = "10 km"\ndistance_to_sea = "near"', "stations[0].distance_to_sea", "length"),
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


def test_the_listening_hour_date_offset_and_sea_are_read():
    s = _site('latitude = -33.9\nlongitude = 151.2\nlistening_time = "21:30"\ndate = 2026-01-15\n'
              'utc_offset = "+11"\ndistance_to_sea = "2 km"', 'distance = "800 km"\ndistance_to_sea = 0')
    assert (s.listening_time, s.listening_hour, s.day_of_year, s.utc_offset_h) == ("clock", 21.5, 15, 11.0)
    assert s.season == "summer"  # from the date, southern hemisphere (astronomical seasons)
    assert s.distance_to_sea_m == 2e3 and s.stations[0].distance_to_sea_m == 0.0


def test_evening_sky_wave_is_below_the_reference_hour_and_daylight_has_none():
    # ITU-R P.1147-4 §3 (from memory): two hours after sunset the field is still a few dB below the
    # reference hour's; in full daylight at the path's midpoint the method gives no sky wave
    where = 'latitude = 52.0\nlongitude = -1.0\ndate = 2026-01-15\nutc_offset = 0\n'
    station = 'distance = "900 km"\nbearing = 120'
    ref = night.sky_wave(*_one(where, station))
    eve = night.sky_wave(*_one(where + 'listening_time = "evening"', station))
    noon = night.sky_wave(*_one(where + 'listening_time = "12:30"', station))
    assert ref["hourly_loss_db"] == 0.0 and ref["listening_time"].startswith("six hours after sunset")
    assert 0.5 < eve["hourly_loss_db"] < 6.0 and eve["field_v_per_m"] < ref["field_v_per_m"]
    assert 1.0 < eve["time_after_sunset_at_midpoint_s"] / 3600 < 3.0
    assert noon["daylight_at_midpoint"] and noon["field_v_per_m"] == 0.0


def test_a_coastal_site_gets_the_sea_gain():
    # ITU-R P.1147-4 §4 (from memory): a terminal on the coast raises the sky wave by a few dB
    inland = night.sky_wave(*_one('latitude = 52.0\nlongitude = -1.0', 'distance = "900 km"\nbearing = 120'))
    coast = night.sky_wave(*_one('latitude = 52.0\nlongitude = -1.0\ndistance_to_sea = 0',
                                 'distance = "900 km"\nbearing = 120'))
    assert inland["sea_gain_db"] == 0.0 and 3.0 < coast["sea_gain_db"] < 5.0
    assert 20 * math.log10(coast["field_v_per_m"] / inland["field_v_per_m"]) == pytest.approx(coast["sea_gain_db"])
    # derivation (straight coast): a path leaving at 60° from the sea's direction meets the sea 2x away;
    # a station behind the site gets no gain from the site's sea
    def gain(sea_bearing, dist="2 km"):
        return night.sky_wave(*_one(f'latitude = 52.0\nlongitude = -1.0\ndistance_to_sea = "{dist}"\n'
                                    f'sea_bearing = {sea_bearing}', 'distance = "900 km"\nbearing = 120'))["sea_gain_db"]
    assert gain(300) == 0.0 and gain(120) > gain(60) > 0.0
    assert gain(60, "1 km") == pytest.approx(gain(120, "2 km"))


def test_the_night_noise_follows_the_block_of_the_listening_hour():
    s = _site('noise = "quiet-rural"\nlatitude = 45\nlongitude = 10\nseason = "summer"\nlistening_time = "02:00"')
    floor = night.noise_floor(s, [1e6])
    assert floor["night"]["time_block"] == "00–04 h" and floor["day"]["time_block"] == "08–12 h and 12–16 h"
    # quiet rural in a dark summer block: atmospheric noise sets the floor (ITU-R P.372 maps, from memory)
    assert floor["night"]["dominant"] == ["atmospheric"]
    assert floor["night"]["atmospheric_db"][0] > floor["day"]["atmospheric_db"][0] + 10


def test_report_names_the_listening_hour(write_site, capsys):
    import json

    p = write_site(BASE.format(site_extra='latitude = 52.0\nlongitude = -1.0\ndate = 2026-01-15\n'
                                          'listening_time = "evening"\ndistance_to_sea = "1 km"',
                               station_extra='distance = "600 km"\nbearing = 135'))
    assert main(["report", str(p), "--json"]) == 0
    n = json.loads(capsys.readouterr().out)["stations"][0]["night"]
    assert n["listening_time"].startswith("evening, two hours after sunset")
    assert n["hourly_loss_db"] > 0 and n["sea_gain_db"] > 0 and n["noise_time_block"] == "16–20 h"
    assert main(["report", str(p)]) == 0
    assert "by night: evening, two hours after sunset" in capsys.readouterr().out
    page = p.parent / "night.html"
    assert main(["report", str(p), "--page", str(page)]) == 0
    capsys.readouterr()
    assert "by night, evening, two hours after sunset" in page.read_text(encoding="utf-8")
    q = write_site(BASE.format(site_extra='listening_time = "teatime"', station_extra='distance = "600 km"'))
    assert main(["check", str(q)]) == 2
    assert "site.listening_time" in capsys.readouterr().err


def test_polar_night_and_midnight_sun_keep_the_listening_hour_sensible():
    # common practice: at 70° N there is no sunset at midwinter and no darkness at midsummer
    dark = _site('latitude = 70\nlongitude = 20\nutc_offset = 1\ndate = "2026-12-21"\nlistening_time = "evening"',
                 'distance = "800 km"\nbearing = 90')
    moment = night.listening_moment(dark)
    assert moment["label"].startswith("evening, polar night at the site (20:00 local time")
    sky = night.sky_wave(dark, dark.stations[0])
    assert sky["hourly_loss_db"] == 0.0 and sky["field_v_per_m"] > 0
    light = _site('latitude = 70\nlongitude = 20\nutc_offset = 1\ndate = "2026-06-21"\nlistening_time = "midnight"',
                  'distance = "800 km"\nbearing = 90')
    sky = night.sky_wave(light, light.stations[0])
    assert sky["daylight_at_midpoint"] and sky["field_v_per_m"] == 0.0


# --------------------------------------------------------------------------- the night keys through the command line


@pytest.mark.parametrize("site_extra, key, value, words", [
    ('sea_bearing = 270', "site.sea_bearing", "270", ['distance_to_sea = "3 km"', "leave sea_bearing out"]),
    ('distance_to_sea = "3 km"\nsea_bearing = "westish"', "site.sea_bearing", '"westish"',
     ["clockwise from true north", "such as 270", '"SW"']),
    ('distance_to_sea = "3 km"\nsea_bearing = "270 W"', "site.sea_bearing", '"270 W"', ["compass point"]),
    ('distance_to_sea = "3 km"\nsea_bearing = 400', "site.sea_bearing", "400", ["-360 to 360"]),
    ('distance_to_sea = "far"', "site.distance_to_sea", '"far"', ["length", '"12 m"']),
    ('distance_to_sea = "-3 km"', "site.distance_to_sea", '"-3 km"', ["at least 0"]),
    ('listening_time = 21', "site.listening_time", "21", ['"midnight"', '"21:30"']),
    ('date = 2026', "site.date", "2026", ["2025-01-15"]),
    ('utc_offset = true', "site.utc_offset", "true", ['"+5:30"']),
])
def test_a_bad_night_key_is_one_line_with_file_line_key_value_and_what_is_expected(capsys, write_site, site_extra,
                                                                                      key, value, words):
    """Invented inputs: every [site] key of night reception, wrong, gives one line and exit code 2."""
    from tests.conftest import one_line, run

    p = write_site(BASE.format(site_extra=site_extra, station_extra='distance = "800 km"'))
    code, out, err = run(capsys, "check", p)
    line = one_line(err)
    assert code == 2 and out == ""
    row = 4 + next(n for n, text in enumerate(site_extra.split("\n")) if text.startswith(key.split(".")[1] + " "))
    assert f"{p}:{row}: {key} = {value}: expected" in line, line
    for w in words:
        assert w in line, (w, line)


def test_a_sea_bearing_may_be_a_compass_point(capsys, write_site):
    """Invented inputs; the 16 points of the compass are 22.5° apart clockwise from north (common practice)."""
    for text, degrees in (("SW", 225.0), ("west", 270.0), ("NNE", 22.5), ("n", 0.0)):
        assert _site(f'distance_to_sea = "3 km"\nsea_bearing = "{text}"').sea_bearing_deg == degrees
    p = write_site(BASE.format(site_extra='distance_to_sea = "3 km"\nsea_bearing = "SW"',
                               station_extra='distance = "800 km"'))
    code, (out, err) = main(["check", str(p)]), capsys.readouterr()
    assert code == 0 and err == ""
