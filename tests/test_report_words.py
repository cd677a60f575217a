"""Words and figures a user reads in the report: ranges that do not move, one bleed-resistor wording,
what-if steps in round feet, the bandwidth search range, and labels that stay apart in the pictures.

Sites are the invented examples in site_examples/ (input handling and consistency checks, named so).
"""

import json
import re

import numpy as np
import pytest

from aerial.models.network import detector_bandwidth
from aerial.models.tank import BLEED_REMEDY

from .conftest import ROOT, run

HIGH = ROOT / "site_examples" / "high_floor_flat.toml"
BALCONY = ROOT / "site_examples" / "balcony_water_pipe.toml"
BACKYARD = ROOT / "site_examples" / "backyard_inverted_l.toml"

#: A range whose two ends print the same figure: "(51.1–51.1 pF)" or "51.1 pF – 51.1 pF".
SAME_ENDS = re.compile(r"\((\d+(?:\.\d+)?)–\1 |(\d+(?:\.\d+)? \S+) – \2(?!\d)")


def flat(text: str) -> str:
    return " ".join(text.replace("│", " ").split())


def test_a_range_that_does_not_move_says_no_spread(capsys):
    code, out, err = run(capsys, "report", HIGH)
    assert code == 0, err
    assert not SAME_ENDS.search(out), SAME_ENDS.search(out)
    assert "(no spread)" in out  # the steel frame pins the capacitance at the band edges


def test_the_bleed_resistor_is_worded_once(capsys):
    code, out, err = run(capsys, "report", BACKYARD)  # series-capacitor coupling
    assert code == 0, err
    text = flat(out)
    assert text.count(BLEED_REMEDY) >= 2  # the tuning note and the safety panel say the same
    assert "about 1 MΩ)" not in text


def test_what_if_steps_are_round_feet_under_us_units(capsys):
    code, out, err = run(capsys, "report", BACKYARD, "--units", "us")
    assert code == 0, err
    text = flat(out)
    assert "raise the wire 10 ft" in text and "add 30 ft to the far end" in text
    assert "9.84 ft" not in text and "32.8 ft" not in text
    from aerial import load_site
    from aerial.estimate.assemble import report_centre_frequency, what_if

    site = load_site(BACKYARD)
    f = report_centre_frequency(site)
    rows = {r["change"]: r for r in what_if(site, f, {}, units="us")}
    # figures stay SI: the step is 10 ft = 3.048 m exactly (NIST SP 811: 1 ft = 0.3048 m, exact by definition),
    # its label written as the tables write a length
    assert "raise the wire 3.05 m" in rows and "add 9.14 m to the far end" in rows
    si = {r["change"]: r for r in what_if(site, f, {})}
    assert "raise the wire 3 m" in si
    # consistency check: raised 3.048 m rather than 3 m, the wire's effective height is a little higher
    assert rows["raise the wire 3.05 m"]["effective_height_m"] > si["raise the wire 3 m"]["effective_height_m"]


def test_the_bandwidth_note_names_the_range_the_search_covers():
    from aerial.estimate import reception

    # a tank of Q 0.2: at f/3 and 3f it is still above 1/√2 of its peak (0.2 × 8/3 = 0.53 < 1), so its -3 dB
    # edges lie beyond the search and the bandwidth found is a lower bound (universal resonance curve)
    r = detector_bandwidth(np.array([1e6]), lambda f: 1 / np.abs(1 + 1j * 0.2 * (f / 1e6 - 1e6 / f)))
    assert bool(r.wider_than_searched[0])
    assert "from a third of the frequency to three times it" in reception.BANDWIDTH_LOWER_BOUND_NOTE
    # just inside the search the edges are found: Q 0.6 puts them at f/1.9 and 1.9f (within f/3 to 3f)
    r = detector_bandwidth(np.array([1e6]), lambda f: 1 / np.abs(1 + 1j * 0.6 * (f / 1e6 - 1e6 / f)))
    assert not bool(r.wider_than_searched[0])


def _renderer(fig):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    return canvas.get_renderer()


def _text_boxes(fig, ax):
    renderer = _renderer(fig)
    return [(t.get_text(), t.get_window_extent(renderer)) for t in ax.texts if t.get_text().strip()]


def test_plan_view_labels_do_not_overlap(capsys):
    from aerial import load_site
    from aerial.outputs.site_drawings import layout_scene, plan_figure, site_surroundings

    for example in (BALCONY, BACKYARD, ROOT / "site_examples" / "suburban_lot_service_line.toml"):
        code, out, err = run(capsys, "layout", example, "--json")
        assert code == 0, err
        layouts = json.loads(out)["layouts"]
        fig = plan_figure(layout_scene(site_surroundings(load_site(example)), layouts[:3]))
        boxes = _text_boxes(fig, fig.axes[0])
        words = [t for t, _ in boxes]
        assert "#1 (chosen)" in words and "#2" in words
        for i, (ta, a) in enumerate(boxes):
            for tb, b in boxes[i + 1:]:
                if ta.startswith(("power line", "telephone/cable")) or tb.startswith(("power line", "telephone/cable")):
                    continue  # the line names run along their lines
                assert not a.overlaps(b), (example.name, ta, tb)


def test_station_tuning_legend_covers_no_point(capsys):
    from aerial.outputs.charts import station_design_figure

    code, out, err = run(capsys, "report", BALCONY, "--json")
    assert code == 0, err
    fig = station_design_figure(json.loads(out))
    renderer = _renderer(fig)
    ax = fig.axes[0]
    legend = fig.legends[0] if fig.legends else ax.get_legend()
    assert not legend.get_window_extent(renderer).overlaps(ax.get_window_extent(renderer))


def test_layout_page_names_the_frequency_and_the_present_wire(capsys, tmp_path):
    page = tmp_path / "plan.html"
    code, out, err = run(capsys, "layout", BACKYARD, "--page", page, "--quiet")
    assert code == 0, err
    html = page.read_text(encoding="utf-8")
    assert "effective height at 940 kHz" in html  # the report's what-if and earth-table frequency
    assert "your present wire, as &#x27;aerial report&#x27; figures it at 940 kHz" in html or \
        "your present wire, as 'aerial report' figures it at 940 kHz" in html


def test_a_far_station_is_kilometres_on_the_terminal_and_the_page(capsys, write_site, tmp_path):
    """A 2000 km sky-wave station reads "2000 km", never "2 Mm" (a megametre is no unit a listener reads)."""
    from .conftest import MINIMAL

    p = write_site(MINIMAL.replace('height = "0 m"', 'height = "0 m"\ncoil = "240 uH"')
                   + '\n[[stations]]\nname = "Far clear channel"\nfrequency = "720 kHz"\npower = "50 kW"\n'
                     'distance = "2000 km"\n')
    page = tmp_path / "far.html"
    code, out, err = run(capsys, "report", p, "--width", "200", "--page", page)  # the terminal report and the page
    assert code == 0, err
    assert "2000 km" in out and "Mm" not in out
    text = page.read_text(encoding="utf-8")
    assert "2000 km" in text and "2 Mm" not in text


def test_a_station_outside_the_swept_bands_is_said_in_the_warnings(capsys, write_site):
    """A 198 kHz station on a site swept over MF only: the terminal's warnings name it, say its aerial figures are
    worked out at its own frequency but the tuning covers the MF band, and how to sweep its band; its other warnings (flat-earth range, noise line) are said there too,
    once per text, and none claims the atmospheric noise is left out (the report adds it). Input handling."""
    from .conftest import MINIMAL

    p = write_site(MINIMAL.replace('height = "0 m"', 'height = "0 m"\ncoil = "240 uH"')
                   + '\n[[stations]]\nname = "Longwave far"\nfrequency = "198 kHz"\npower = "500 kW"\n'
                     'distance = "150 km"\n')
    code, out, err = run(capsys, "report", p, "--width", "200")
    assert code == 0, err
    text = flat(out)
    assert ("Longwave far: 198 kHz lies outside the swept bands (520 kHz to 1.71 MHz): the aerial's and the earth's "
            "figures are worked out at its own frequency, but the tuning parts are designed for the MF broadcast band "
            "only; add its band to [site] bands for its own tuning") in text
    assert "nearest band edge" not in text
    assert "Longwave far: beyond the flat-earth range" in text
    assert "Longwave far: below 0.3 MHz the ITU-R P.372 man-made noise line is extended beyond its range" in text
    assert "is not included" not in text


def test_one_station_outside_the_sky_wave_method_reads_its_not_their(capsys, write_site):
    """One station 20 km away (the P.1147 method starts at 50 km): "treat its night figures", not "their"."""
    from .conftest import MINIMAL

    p = write_site(MINIMAL.replace('height = "0 m"', 'height = "0 m"\ncoil = "240 uH"')
                   + '\n[[stations]]\nname = "Town"\nfrequency = "1 MHz"\npower = "5 kW"\ndistance = "20 km"\n')
    code, out, err = run(capsys, "report", p, "--width", "200")
    assert code == 0, err
    assert "extended for Town — treat its night figures with care." in flat(out)


def test_a_bench_calibration_note_is_not_repeated_as_a_station_warning(capsys, write_site):
    """The tuning notes say where the aerial's capacitance came from; the warnings do not say it again per
    station (input handling)."""
    from .conftest import MINIMAL

    site = (MINIMAL.replace('height = "0 m"', 'height = "0 m"\ncoil = "240 uH"\ncapacitor = ["15 pF", "365 pF"]')
            + '\n[receiver.measured]\ncoil = "240 uH"\ncapacitor = "150 pF"\nfrequency = "700 kHz"\n'
            + '\n[[stations]]\nname = "Near one"\nfrequency = "1 MHz"\npower = "5 kW"\ndistance = "20 km"\n')
    code, out, err = run(capsys, "report", write_site(site), "--width", "200")
    assert code == 0, err
    text = flat(out)
    assert "taken from your measured resonance at 700 kHz" in text
    assert "Near one: aerial capacitance" not in text


@pytest.mark.parametrize(("bands", "station", "edge_hz"), [
    # below every swept band: not the 520 kHz band edge's figures
    (None, 'name = "Longwave far"\nfrequency = "198 kHz"\npower = "500 kW"\ndistance = "150 km"', 520e3),
    # in the gap between LF (to 283.5 kHz) and MF (from 520 kHz): not a straight line drawn across the gap
    # (the radiation resistance grows as f², so a line across the gap overstates it: about 9 % on the
    # efficiency here)
    ('["lf", "mf"]', 'name = "Between"\nfrequency = "400 kHz"\npower = "50 kW"\ndistance = "100 km"', None),
])
def test_a_station_off_the_swept_bands_gets_the_aerial_at_its_own_frequency(capsys, write_site, bands, station,
                                                                             edge_hz):
    """Consistency check: a station below every swept band, or between two of them, is heard with the aerial's
    figures at its own frequency: its effective height and its aerial efficiency (radiation resistance over
    radiation + conductor + earth loss) in the JSON equal the closed forms evaluated there through the public
    model function, with the earth system's impedance there."""
    from aerial import load_site
    from aerial.estimate.assemble import earth_at_frequency
    from aerial.geometry.resolve import resolve
    from aerial.models.closed_form import closed_form_response
    from .conftest import MINIMAL

    text = MINIMAL if bands is None else MINIMAL.replace('name = "test vertical"',
                                                         f'name = "test vertical"\nbands = {bands}')
    p = write_site(text.replace('height = "0 m"', 'height = "0 m"\ncoil = "240 uH"') + f"\n[[stations]]\n{station}\n")
    code, out, err = run(capsys, "report", p, "--json")
    assert code == 0, err
    result = json.loads(out)["stations"][0]
    site = load_site(p)
    f = np.array([site.stations[0].frequency_hz])
    model = closed_form_response(resolve(site).segments, f)
    earth_ohm = earth_at_frequency(site, f)["impedance_ohm"].real
    rr = float(model["radiation_resistance_ohm"][0])
    assert result["effective_height_m"] == pytest.approx(float(model["effective_height_m"][0]), rel=1e-9)
    assert result["aerial_efficiency_ratio"] == pytest.approx(
        rr / (rr + float(model["conductor_loss_ohm"][0]) + float(earth_ohm[0])), rel=1e-9)
    if edge_hz is not None:
        edge = closed_form_response(resolve(site).segments, np.array([edge_hz]))
        assert result["effective_height_m"] != pytest.approx(float(edge["effective_height_m"][0]), rel=1e-6)
