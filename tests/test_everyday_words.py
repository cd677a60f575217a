"""Words and numbers people write in a site file: read as meant, or refused with what to write instead.

The noise categories are ITU-R P.372's (business, residential, rural, quiet rural); "urban" and
"suburban" are common practice for the first two. "Average ground" and its kin are common practice
too, mapped to the ITU-R P.368 category that fits. AWG diameters: ASTM B258 (14 AWG = 0.0641 in,
1.628 mm, from memory).
"""

from __future__ import annotations

import json

import pytest

from tests.conftest import MINIMAL, one_line, run


def _site(write_site, text):
    return write_site(text)


@pytest.mark.parametrize("word, category", [("business", "city"), ("Urban", "city"), ("suburban", "residential"),
                                            ("quiet", "quiet-rural"), ("quiet rural", "quiet-rural")])
def test_noise_words_are_read_as_their_category(write_site, capsys, word, category):
    path = write_site(MINIMAL.replace('name = "test vertical"', f'name = "t"\nnoise = "{word}"'))
    code, out, err = run(capsys, "check", path, "--json")
    assert code == 0, err
    assert json.loads(out)["site"]["noise_category"] == category


@pytest.mark.parametrize("word, category", [("average", "intermediate"), ("average ground", "intermediate"),
                                            ("good", "wet"), ("poor soil", "dry"), ("very poor", "very-dry")])
def test_ground_quality_words_name_the_category_they_are_read_as(write_site, capsys, word, category):
    path = write_site(MINIMAL.replace('name = "test vertical"', f'name = "t"\nsoil = "{word}"'))
    code, out, err = run(capsys, "report", path)
    assert code == 0, err
    flat = " ".join(out.split())
    assert f'soil "{word}" is read as the category "{category}"' in flat
    assert "mS/m" in flat


def test_a_gauge_written_as_the_diameter_is_read_as_the_gauge(write_site, capsys):
    # ASTM B258: 14 AWG is 0.0641 in = 1.628 mm (from memory)
    path = write_site(MINIMAL.replace("[site]", '[wire]\ndiameter = "14 AWG"\n\n[site]'))
    code, out, err = run(capsys, "check", path, "--json")
    assert code == 0, err
    assert "14 AWG" in out


def test_a_gauge_out_of_range_as_a_diameter_names_the_diameter_key(write_site, capsys):
    path = write_site(MINIMAL.replace("[site]", '[wire]\ndiameter = "99 AWG"\n\n[site]'))
    code, out, err = run(capsys, "check", path)
    assert code == 2
    assert 'wire.diameter = "99 AWG": expected an AWG gauge from 4/0 to 40' in one_line(err)


def test_a_misnamed_table_is_shown_as_a_table(write_site, capsys):
    path = write_site(MINIMAL.replace("[[earth.rods]]", "[earth.rod]"))
    code, out, err = run(capsys, "check", path)
    assert code == 2
    line = one_line(err)
    assert 'earth.rod = {length = "2.4 m"}: unknown table; did you mean "rods"?' in line
    assert "'" not in line  # written as the site file writes it, not as Python shows it


@pytest.mark.parametrize("written, advice", [
    ("1,010 kHz", 'write "1010 kHz" for thousands or "1.010 kHz" for decimals'),
    ("1,71 MHz", 'write a point for decimals: "1.71 MHz"'),
    ("1,000,000 Hz", 'without thousands separators: "1000000 Hz"'),
])
def test_a_comma_in_a_number_says_what_to_write(write_site, capsys, written, advice):
    text = MINIMAL + f'\n[[stations]]\nname = "Somewhere"\nfrequency = "{written}"\npower = "1 kW"\ndistance = "10 km"\n'
    code, out, err = run(capsys, "check", write_site(text))
    assert code == 2
    line = one_line(err)
    assert f'stations[0].frequency = "{written}"' in line and advice in line


def test_a_slip_in_an_everyday_word_is_pointed_to_that_word(write_site, capsys):
    path = write_site(MINIMAL.replace('name = "test vertical"', 'name = "t"\nnoise = "urbn"'))
    code, out, err = run(capsys, "check", path)
    assert code == 2
    assert 'site.noise = "urbn": did you mean "urban"?' in one_line(err)


def test_a_misnamed_array_of_tables_gives_its_line(write_site, capsys):
    path = write_site(MINIMAL.replace("[[earth.rods]]", "[[earth.rod]]"))
    code, out, err = run(capsys, "check", path)
    assert code == 2
    line = one_line(err)
    header = next(i for i, t in enumerate(path.read_text().splitlines(), 1) if t.startswith("[[earth.rod]]"))
    assert f"site.toml:{header}: earth.rod = " in line and "unknown table" in line
