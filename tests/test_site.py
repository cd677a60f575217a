"""Site-file loading and validation: one test per rejection, each asserting the message names the key.

The sites here are invented test inputs.
"""

import hashlib

import numpy as np
import pytest

from aerial.core.errors import SiteError
from aerial.site.reader import load_site, load_site_text

from .conftest import EXAMPLES, MINIMAL

SPAN_SITE = """
[supports.house]
at = [0, 0]
height = 6
kind = "eave"

[supports.tree]
at = [20, 0]
height = "10 m"
kind = "tree"

[[spans]]
from = "house"
to = "tree"
{span_extra}

[receiver]
at = [0, 0]
height = 1

[[earth.rods]]
length = 2.4
"""


def span_site(extra=""):
    return SPAN_SITE.replace("{span_extra}", extra)


def rejects(text, *fragments, path="t.toml"):
    with pytest.raises(SiteError) as info:
        load_site_text(text, path)
    msg = str(info.value)
    assert msg.startswith(path), msg
    for frag in fragments:
        assert frag in msg, msg
    return msg


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_every_example_loads(path):
    site = load_site(path)
    assert site.wires
    assert any(w.role in ("aerial",) for w in site.wires)


def test_builtin_example_matches_the_shipped_file():
    from aerial.site.reader import builtin_example
    from .conftest import ROOT

    shipped = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text()
    packaged = (ROOT / "aerial" / "data" / "backyard_inverted_l.toml").read_text()
    assert shipped == packaged
    assert builtin_example().name.startswith("Backyard")


def test_minimal_site_resolves():
    site = load_site_text(MINIMAL, "min.toml")
    assert site.wires[0].points_m.shape == (2, 3)
    assert site.receiver.height_m == 0.0


def test_units_in_site_file():
    site = load_site_text(span_site('sag = "12 in"'), "t.toml")
    span = site.wires[0]
    # parabolic sag: the midpoint hangs 12 in = 0.3048 m (NIST SP 811) below the chord
    mid = span.points_m[len(span.points_m) // 2]
    assert mid[2] == pytest.approx(8.0 - 0.3048)


def test_point_below_ground():
    text = MINIMAL.replace("[0, 0, 0.5]", "[0, 0, -1]")
    rejects(text, "runs[0].points[0][2]", "below ground")


def test_zero_length_span():
    text = span_site().replace("at = [20, 0]\nheight = \"10 m\"", "at = [0, 0]\nheight = 6")
    rejects(text, "spans[0].to", "zero-length span")


def test_radius_not_small_next_to_segment():
    text = MINIMAL.replace("[site]", '[wire]\ndiameter = "150 mm"\n\n[site]')
    text = text.replace("[[0, 0, 0.5], [0, 0, 10]]", "[[0, 0, 0.5], [0, 0, 1.0], [0, 0, 10]]")
    rejects(text, "runs[0]", "not small next to", "0.5 m piece")


def test_span_naming_a_missing_support():
    text = span_site().replace('to = "tree"', 'to = "oak"')
    msg = rejects(text, "spans[0].to", '"oak"', "no support of that name")
    assert '"tree"' in msg  # lists the supports that exist


def test_unknown_unit():
    text = MINIMAL.replace('length = "2.4 m"', 'length = "2.4 cubits"')
    rejects(text, "earth.rods[0].length", 'unknown unit "cubits"')


def test_negative_conductivity():
    text = '[soil]\nconductivity = -0.01\n' + MINIMAL
    rejects(text, "soil.conductivity", "greater than zero")


def test_sag_deeper_than_supports():
    rejects(span_site('sag = "7 m"'), "spans[0].sag", "sag deeper than the supports are high")


def test_malformed_toml():
    msg = rejects("[site\nname = 1\n", "not valid TOML")
    assert ":1" in msg  # the line is named


def test_missing_file(tmp_path):
    with pytest.raises(SiteError, match="no such file"):
        load_site(tmp_path / "nothing.toml")


def test_directory_instead_of_file(tmp_path):
    with pytest.raises(SiteError, match="is a folder"):
        load_site(tmp_path)


def test_gas_pipe_earth_is_refused():
    text = MINIMAL + '\n[earth.gas_pipe]\nburied_length = "10 m"\n'
    rejects(text, "earth.gas_pipe", "gas piping is never an earth electrode")


def test_water_pipe_said_to_carry_gas_is_refused():
    text = MINIMAL.replace("[[earth.rods]]\nlength = \"2.4 m\"", '[earth.water_pipe]\ncontents = "natural gas"')
    rejects(text, "earth.water_pipe.contents", "gas piping")


def test_water_pipe_with_plastic_section_is_refused():
    text = MINIMAL.replace("[[earth.rods]]\nlength = \"2.4 m\"", "[earth.water_pipe]\ncontinuous_metal = false")
    rejects(text, "earth.water_pipe.continuous_metal", "plastic section")


def test_unknown_key_lists_the_choices():
    rejects(MINIMAL.replace('name = "test vertical"', 'nmae = "x"'), "site.nmae", "unknown key", "name")


def test_unknown_soil_category_lists_choices():
    rejects('[soil]\ncategory = "quicksand"\n' + MINIMAL, "soil.category", '"medium-dry"')


def test_line_number_is_given():
    msg = rejects(span_site('sag = "7 m"'), "spans[0].sag")
    assert "t.toml:" in msg.split(" ")[0]


def test_missing_earth_is_refused():
    rejects(MINIMAL.replace('[[earth.rods]]\nlength = "2.4 m"', ""), "earth", "no earth")


def test_gauge_needs_its_system():
    rejects(MINIMAL.replace("[site]", '[wire]\ngauge = 14\n\n[site]'), "wire.gauge", '"14 AWG"')


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_input_files_are_never_modified(path):
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    load_site(path)
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before


def test_geometry_has_segments_and_footprint():
    from aerial.geometry.resolve import resolve

    site = load_site_text(span_site('sag = "0.5 m"'), "t.toml")
    geo = resolve(site)
    assert geo.total_length_m > 20.0
    assert np.all(geo.segments.length > 0)
    assert geo.footprint().length == pytest.approx(20.0 + 0.0, abs=1e-6)
    assert geo.max_height_m == pytest.approx(10.0)


@pytest.mark.parametrize("table, expected", [
    ('[earth.water_pipe]\nburied_length = "1e-300 m"', "earth.water_pipe.buried_length"),
    ('[[earth.buried_wires]]\nlength = "5 m"\ndepth = "8 m"', "earth.buried_wires[0].depth"),
    ('[[earth.rods]]\nlength = "1 cm"', "earth.rods[0].length"),
])
def test_electrodes_outside_their_formulas_are_refused(table, expected):
    # regression (found by the fuzzing harness): a 1e-300 m water pipe gave a negative resistance
    text = MINIMAL.replace('[[earth.rods]]\nlength = "2.4 m"', table)
    rejects(text, expected)


def test_soil_categories_name_their_itu_source():
    # ITU-R P.527 lists sea 70/5, fresh water 80/3e-3, wet 30/1e-2, medium dry 15/1e-3, very dry 3/1e-4;
    # 22/3e-3 ("land") and 7/3e-4 ("dry ground") are ITU-R P.368 curve parameters (both from memory)
    from aerial.core.materials import SOILS

    p527 = {"sea": (70.0, 5.0), "fresh-water": (80.0, 3e-3), "wet": (30.0, 1e-2), "medium-dry": (15.0, 1e-3),
            "very-dry": (3.0, 1e-4)}
    p368 = {"intermediate": (22.0, 3e-3, "land"), "dry": (7.0, 3e-4, "dry ground")}
    for name, (er, sigma) in p527.items():
        s = SOILS[name]
        assert (s.relative_permittivity, s.conductivity_s_m, s.source) == (er, sigma, "ITU-R P.527 category")
    for name, (er, sigma, curve) in p368.items():
        s = SOILS[name]
        assert (s.relative_permittivity, s.conductivity_s_m) == (er, sigma)
        assert s.source == f"ITU-R P.368 curve '{curve}'"


def test_soil_permittivity_ranges_span_the_neighbouring_itu_categories():
    # ITU-R P.527 / P.368 permittivities (from memory, as above): very dry 3, dry 7, medium dry 15, land 22, wet 30;
    # each land category's range runs from its drier neighbour's permittivity to its wetter neighbour's, the same
    # neighbours that bound its conductivity. Sea: 70 (average salinity) to 80 (low salinity), P.527 (from memory);
    # fresh water 78-88: water's permittivity between 25 and 0 degC (CRC Handbook, from memory).
    from aerial.core.materials import SOILS

    expected = {"very-dry": (3.0, 7.0), "dry": (3.0, 15.0), "medium-dry": (7.0, 22.0), "intermediate": (15.0, 30.0),
                "wet": (22.0, 30.0), "sea": (70.0, 80.0), "fresh-water": (78.0, 88.0)}
    for name, bounds in expected.items():
        s = SOILS[name]
        assert (s.relative_permittivity_low, s.relative_permittivity_high) == bounds, name
        assert bounds[0] <= s.relative_permittivity <= bounds[1]


def test_a_given_permittivity_is_kept_and_a_category_brings_its_range():
    # input handling, invented sites
    by_category = load_site_text('[soil]\ncategory = "medium-dry"\n' + MINIMAL, "s.toml").soil
    assert by_category.permittivity_bounds == (7.0, 22.0)
    measured = load_site_text('[soil]\ncategory = "medium-dry"\nrelative_permittivity = 12\n' + MINIMAL, "s.toml").soil
    assert measured.permittivity_bounds == (12.0, 12.0)
    only_sigma = load_site_text('[soil]\nconductivity = "2 mS/m"\n' + MINIMAL, "s.toml").soil
    assert (only_sigma.relative_permittivity, only_sigma.permittivity_bounds) == (15.0, (7.0, 22.0))


def test_a_band_in_everyday_words_gets_a_hint_on_its_own_line(tmp_path, capsys):
    """ "am" is not read silently (AM could be any band) but the message names the band meant, and the line is the
    one the bands are written on, not the [site] header (input handling)."""
    from aerial.cli import main

    p = tmp_path / "bands.toml"
    p.write_text('[site]\nname = "x"\nnoise = "rural"\nbands = ["AM"]\n\n[[runs]]\npoints = [[0, 0, 0.5], [0, 0, 10]]\n'
                 '\n[receiver]\nat = [0, 0]\nheight = "0 m"\n', encoding="utf-8")
    assert main(["check", str(p)]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f'aerial: {p}:4: site.bands[0] = "AM": did you mean "mf" (the medium-wave AM broadcast band')


def test_consistency_soil_word_notes_give_the_resistivities_as_the_site_file_guide_does():
    # consistency check: the note a soil word brings writes its typical resistivity (BS 7430, from
    # memory) as docs/site-file.md's table does: an en dash between the ends and the unit Ω·m
    import re
    from pathlib import Path

    from aerial.core.materials import SOIL_WORDS, soil_category

    guide = (Path(__file__).resolve().parents[1] / "docs" / "site-file.md").read_text(encoding="utf-8")
    for word in SOIL_WORDS:
        category, note = soil_category(word)
        figure = re.search(r"(\d[\d.–]* Ω·m)", note)
        assert figure, note
        row = next(line for line in guide.splitlines() if line.startswith(f"| `{word}`"))
        assert figure.group(1) in row, (note, row)
        assert "ohm m" not in note and not re.search(r"\d-\d", note)


def test_a_lead_in_point_off_the_wire_is_refused_with_the_nearest_point_of_the_aerial():
    # input handling: a T's down-lead written at a round height where the span, with its sag, hangs a
    # little lower; the message gives how far off it is and the nearest point, to paste in instead
    # (invented site: 6 m and 10 m supports 20 m apart, no sag: 8 m high mid-span)
    text = span_site() + '\n[lead_in]\nfrom = [10, 0, 8.3]\n'
    msg = rejects(text, "lead_in.from", "not on any span or run", "the nearest point of the aerial is 0.294 m away",
                  "at [10.06, 0.00, 8.01] (metres",
                  "straight above or below that plan position the aerial is 8 m high")
    assert msg.count("\n") == 0


@pytest.mark.parametrize("written, noted", [('"2000 ohm"', True), ("2000", True), ('"4 kohm"', True),
                                            ('"high-impedance"', False), ('"32 ohm"', False), ('"20 kohm"', False)])
def test_an_earphone_given_as_a_headset_marking_brings_a_note(written, noted):
    # input handling: a magnetic headset is marked with its DC resistance ("2000 ohm"), roughly 10 kohm at
    # 1 kHz (common practice, from memory); a figure in that marking's range is read as written, with a note
    text = span_site().replace("[receiver]\n", f"[receiver]\nearphone = {written}\n")
    site = load_site_text(text, "t.toml")
    notes = [n for n in site.notes if n.startswith("receiver.earphone")]
    assert bool(notes) == noted
    if noted:
        assert f"receiver.earphone = {written} is taken as the earphone's impedance" in notes[0]
        assert 'write earphone = "high-impedance"' in notes[0]


@pytest.mark.parametrize("line, key, hint", [
    ("frequency = 1340\npower = \"1 kW\"\ndistance = \"10 km\"", "stations[0].frequency",
     'a plain number is in Hz: write "1340 kHz" for kilohertz'),
    ("frequency = \"1340 kHz\"\npower = \"1 kW\"\ndistance = 45", "stations[0].distance",
     'a plain number is in metres: write "45 km" or "45 mi"'),
])
def test_a_plain_number_meant_in_kilohertz_or_kilometres_is_refused_with_the_unit_to_write(line, key, hint):
    # input handling: a station's frequency or distance written without its unit reads as Hz or metres
    rejects(MINIMAL + f"\n[[stations]]\nname = \"Demo\"\n{line}\n", key, hint)


def test_a_written_unit_too_small_is_refused_without_the_plain_number_hint():
    # input handling: "45 m" has its unit; the hint for a bare number is not given
    msg = rejects(MINIMAL + '\n[[stations]]\nname = "Demo"\nfrequency = "1340 kHz"\npower = "1 kW"\ndistance = "45 m"\n',
                  "stations[0].distance", "at least 100 m")
    assert "plain number" not in msg


@pytest.mark.parametrize("height, side", [(7.9, "below"), (8.12, "above")])
def test_a_lead_in_point_a_little_off_a_span_starts_on_the_wire_with_a_note(height, side):
    # input handling: the invented span of the test above (6 m and 10 m supports 20 m apart, 8 m high mid-span);
    # a down-lead written 10 or 12 cm from the wire starts on it, and the warning says where the wire is
    site = load_site_text(span_site() + f'\n[lead_in]\nfrom = [10, 0, {height}]\nvia = [[10, 3, 5]]\n', "t.toml")
    lead = next(w for w in site.wires if w.role == "lead-in")
    assert lead.points_m[0][2] == pytest.approx(8.0, abs=1e-9)
    note = next(str(n) for n in site.notes if str(n).startswith("lead_in.from"))
    assert "the aerial wire is 8 m high at that point" in note and f"m {side} it" in note


@pytest.mark.parametrize("start", ["[10, 0, 8]", "[5, 0, 7]", "[15, 0, 9]"])
def test_a_down_lead_from_a_straight_span_at_a_quarter_or_the_middle_is_a_t_not_a_duplicate(start):
    # input handling: the invented straight span above (no sag: one piece); a lead-in leaving it exactly where the
    # duplicate-wire check samples the piece (a quarter, half, three quarters along) was refused as "two wires in
    # one place"; it is a junction, as at a piece's own end
    site = load_site_text(span_site() + f"\n[lead_in]\nfrom = {start}\n", "t.toml")
    assert any(w.role == "lead-in" for w in site.wires)


def test_a_lead_in_laid_along_a_span_is_still_refused_as_a_duplicate():
    # input handling: the same span, and a lead-in that runs along it from the middle to the house end
    rejects(span_site() + "\n[lead_in]\nfrom = [10, 0, 8]\nvia = [[0.5, 0, 6.1]]\n", "lies along", "two wires in one place")
